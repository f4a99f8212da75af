export { compileTwoParameter, withSecond, type TwoParameterSystem, type TwoParameterOptions } from './two-parameter-system.js';
// The driver and the extended-system interface live in src/lib/numerics (one driver for equilibria and every curve).
export { continueCurve, type CurveOptions, type CurveEnd, type CurveDirection, type CurveHooks } from '../numerics/continue-curve.js';
export { correctExtended, extendedTangent, startTangent, type ExtendedSystem, type CurvePoint } from '../numerics/extended-system.js';
export { SaddleNodeSystem } from './saddle-node-curve.js';
export { HopfSystem } from './hopf-curve.js';
export { SymmetricBranchPointSystem, findSymmetry, type Symmetry } from './branch-point-curve.js';
export { traceMap } from './trace-map.js';
export { defaultMapSettings, type MapSettings, type MapCurve, type MapCurveEnd, type MapCurveType, type MapCurvePoint, type MapPoint, type MapPointType, type MapRegion, type TwoParameterMap, type MapHooks } from './map-types.js';
export { saddleNodesAt, type SlicePoint } from './slice.js';
export { EquilibriumSystem } from './equilibrium-system.js';
export { MAP_ENGINE_VERSION } from './map-version.js';
