export * from './types';
export { resolveNoise, sigmaOf, NoiseSettingError } from './noise-spec';
export { noiseGraphAt, type NoiseGraphFailure } from './graph-at';
