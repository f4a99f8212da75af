import { describe, it, expect } from 'vitest';
import { expressionToTex, rateEquationTex } from '../../../src/lib/editor';

describe('expressionToTex', () => {
  it('typesets a quotient as \\frac and a power with braces', () => {
    const r = expressionToTex('P^8 / (1 + P^8)');
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.tex).toContain('\\frac');
      expect(r.tex).toContain('^{8}');
    }
  });
  it('returns the parser message for a broken expression instead of throwing', () => {
    const r = expressionToTex('a - (b');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message.length).toBeGreaterThan(0);
  });
  it('rateEquationTex prefixes the time derivative of the variable', () => {
    const r = rateEquationTex('x', 'r + x^2');
    expect(r.ok && r.tex.startsWith('\\frac{\\mathrm{d}x}{\\mathrm{d}t} = ')).toBe(true);
  });
  it('sets every parameter in italics, also names mathjs knows as units ("b", "rK")', () => {
    const r = expressionToTex('a - b * P + rK * P');
    expect(r.ok && r.tex).toContain('\\mathit{b}');
    expect(r.ok && r.tex).toContain('\\mathit{rK}');
    expect(r.ok && r.tex).not.toContain('\\mathrm');
  });
});
