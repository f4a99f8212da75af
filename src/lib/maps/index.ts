export { compileTwoParameter, withSecond, type TwoParameterSystem, type TwoParameterOptions } from './two-parameter-system.js';
export { continueCurve, correctOn, curveTangent, startTangent, type ExtendedSystem, type CurveOptions, type CurveEnd, type CurvePoint, type CurveDirection } from './curve-continuation.js';
export { SaddleNodeSystem } from './saddle-node-curve.js';
export { SymmetricBranchPointSystem, findSymmetry, type Symmetry } from './branch-point-curve.js';
export { traceMap, defaultMapSettings, type MapSettings, type MapCurve, type MapCurvePoint, type MapPoint, type MapRegion, type TwoParameterMap, type MapHooks } from './trace-map.js';
export { saddleNodesAt, type SlicePoint } from './slice.js';
export { EquilibriumSystem } from './equilibrium-system.js';
export { MAP_ENGINE_VERSION } from './map-version.js';
