export * from './types.js';
export { traceDiagram, traceDiagramWith, traceBlock, type TraceHooks, type TraceBlockRunner } from './trace-diagram.js';
export { blockCount, mergeBlocks, AUTO_BLOCKS_FROM, type TraceBlock, type BlockResult } from './trace-blocks.js';
export { defaultTraceSettings, type TraceSettings, type ResolvedTraceSettings } from './trace-settings.js';
export { findStartingEquilibria, isUncoupledAt, type StartingEquilibria } from './starting-equilibria.js';
export { ENGINE_VERSION } from './engine-version.js';
export { SAME_POINT_PARAMETER, SAME_POINT_STATE } from './special-point-registry.js';
export { toTraceJson, type TraceJson } from './trace-json.js';
