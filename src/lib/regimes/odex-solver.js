// Re-export of package odex. Kept as plain JavaScript beside odex-solver.d.ts because the package
// ships TypeScript source that does not compile under this project's strict settings; the .d.ts
// declares the parts flow.ts uses, so the compiler never opens the package's own .ts file.
// Loaded through require: under `node --import tsx` (worker, CLI, seeds) an ESM import of 'odex'
// resolves to the package's TypeScript source and yields Solver === undefined; require gives the
// package's compiled src/odex.js everywhere (tsx, plain node, vitest).
import { createRequire } from 'node:module';

const odex = createRequire(import.meta.url)('odex');
export const Solver = odex.Solver;
export const Outcome = odex.Outcome;
