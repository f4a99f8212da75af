import type { ModelDocument } from '../model/schema';
import type { NoiseSpec } from './types';

/** Thrown when a noise setting is unusable; `field` names it the way the caller's input does. */
export class NoiseSettingError extends Error {
  constructor(readonly field: string, message: string) {
    super(`${field}: ${message}`);
    this.name = 'NoiseSettingError';
  }
}

/**
 * Per-variable noise of a study. The level is `override` when given (a run setting or the CLI's
 * --noise), else the document's `noise.amplitude`. Per-node (network) or per-variable (ODE)
 * overrides keep their ratio to the document's amplitude, so `--noise` rescales the whole vector:
 * sigma_i = level * (documentSigma_i / documentAmplitude). Without a `noise` field every variable
 * gets the level (weights 1), and then a level must be given.
 */
export function resolveNoise(document: ModelDocument, override?: number): NoiseSpec {
  const names = document.format === 'brinkmap/network-1' ? document.nodes.map((n) => n.id) : document.variables;
  if (override !== undefined && !(Number.isFinite(override) && override > 0)) {
    throw new NoiseSettingError('noise', `must be a positive finite number, got ${override}`);
  }
  const noise = document.noise;
  const level = override ?? noise?.amplitude;
  if (level === undefined) throw new NoiseSettingError('noise', 'the model has no noise field; give a noise amplitude (sigma > 0)');
  const given: Record<string, number> = (noise && ('perNode' in noise ? noise.perNode : 'perVariable' in noise ? noise.perVariable : undefined)) ?? {};
  const weights = new Float64Array(names.length);
  names.forEach((name, i) => {
    weights[i] = noise && Object.hasOwn(given, name) ? given[name] / noise.amplitude : 1;
  });
  return { level, weights };
}

/** sigma_i = level * weights_i. */
export function sigmaOf(spec: NoiseSpec): Float64Array {
  return spec.weights.map((w) => w * spec.level);
}
