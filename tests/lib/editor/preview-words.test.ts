import { describe, expect, it } from 'vitest';
import { engineWords } from '../../../src/lib/editor/preview-words';

describe('engineWords(message)', () => {
  it('drops the engine setting names the modeler cannot set in the preview', () => {
    expect(engineWords('the point cap was reached (800 points per direction, maxPointsPerBranch = 800)')).toBe('the point cap was reached (800 points per direction)');
    expect(engineWords('stopped at 40 branches (maxBranches); 3 more were not traced')).toBe('stopped at 40 branches (a limit of the quick preview; a full run goes further); 3 more were not traced');
    expect(engineWords('12 starting equilibria found; only the first 8 (maxStartingPoints) are traced')).toBe('12 starting equilibria found; only the first 8 (a limit of the quick preview; a full run goes further) are traced');
  });
  it('names the matrices in words', () => {
    expect(engineWords('J_x is singular at the starting equilibrium x = [1]')).toBe('the Jacobian is singular at the starting equilibrium x = [1]');
    expect(engineWords('is a branch point (two-dimensional null space of [J_x | F_p])')).toBe('is a branch point (two-dimensional null space of the Jacobian extended by the parameter derivative)');
  });
  it('leaves other messages alone', () => {
    expect(engineWords('no equilibrium found near x = [0.1, 0.2]')).toBe('no equilibrium found near x = [0.1, 0.2]');
  });
});
