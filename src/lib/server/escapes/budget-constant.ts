/** Node-steps allowed per parameter value: the engine's default budget (src/lib/noise/budget.ts). */
import { DEFAULT_BUDGET } from '../../noise/budget.ts';

export const ESCAPE_BUDGET_PER_VALUE = DEFAULT_BUDGET;
