import fc from 'fast-check';
import { derivative, evaluate } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { checkExpression, compileModelJson, ModelError, validateModelDocument } from '../../../src/lib/model';
import { copy, threeLakes } from './fixtures';

const TOKENS = [
  'P', 'a', 'b', 'c', 'x', '+', '-', '*', '/', '^', '(', ')', '[', ']', '{', '}', ',', ';', '=', '?', ':', '!',
  "'", '"', '.', '1', '2.5', '1e400', 'e', 'pi', 'sin', 'exp', 'pow', 'log', 'import', 'evaluate', 'parse',
  'constructor', '__proto__', ' ', '==', '&', '|', 'end', 'mod', 'to', 'cm', 'Infinity', 'NaN', 'true',
  '@', '#', '$', '\\', '\n', '%', '~', 'f(x)', '=>', '`', '0x1F', '1/0',
];

const tokenSoup = fc.array(fc.constantFrom(...TOKENS), { maxLength: 30 }).map((t) => t.join(''));
const anyText = fc.oneof(fc.string({ maxLength: 80 }), fc.string({ unit: 'binary', maxLength: 40 }), tokenSoup);

describe('checkExpression and validation on arbitrary text (fast-check)', () => {
  it('never throw: they return issues on element.rate or a document that compiles', () => {
    fc.assert(
      fc.property(anyText, (text) => {
        const direct = checkExpression(text, ['P', 'a', 'b']);
        const d = copy(threeLakes);
        d.element.rate = text;
        const r = validateModelDocument(d);
        expect(r.ok).toBe(direct.ok);
        if (!r.ok) {
          expect(r.issues.length).toBeGreaterThan(0);
          for (const issue of r.issues) expect(issue.path).toBe('element.rate');
        }
        try {
          const sys = compileModelJson(d);
          expect(r.ok).toBe(true);
          const out = sys.rates(Float64Array.from([0.1, 0.2, 0.3]), 0.5, new Float64Array(3));
          expect(out.length).toBe(3);
        } catch (err) {
          expect(err).toBeInstanceOf(ModelError);
          expect(r.ok).toBe(false);
        }
      }),
      { numRuns: 600 },
    );
  });

  it('never throw on text in the coupling term or an ode rate either', () => {
    fc.assert(
      fc.property(anyText, (text) => {
        const d = copy(threeLakes);
        d.coupling.term = text;
        const r = validateModelDocument(d);
        if (!r.ok) for (const issue of r.issues) expect(issue.path).toBe('coupling.term');
        const o = { format: 'brinkmap/ode-1', name: 'soup', variables: ['x'], parameters: { k: 1 }, rates: { x: text }, sweep: { parameter: 'k', from: 0, to: 1 } };
        try {
          compileModelJson(o);
        } catch (err) {
          expect(err).toBeInstanceOf(ModelError);
          expect((err as ModelError).issues.every((i) => i.path === 'rates.x')).toBe(true);
        }
      }),
      { numRuns: 300 },
    );
  });
});

/**
 * Random valid arithmetic over x and y, written with and without brackets (so operator precedence is
 * exercised): the compiled rate must equal mathjs.evaluate on the same text, an independent evaluator.
 * Domains are kept real (sqrt and log of positive arguments, integer exponents) because mathjs would
 * answer with complex numbers where the compiled code, being real, gives NaN.
 */
const literal = fc.oneof(
  fc.integer({ min: 0, max: 9 }).map(String),
  fc.integer({ min: 1, max: 99999 }).map((n) => String(n / 1000)),
);
const { expr } = fc.letrec<{ expr: string; leaf: string; binary: string; unary: string; call: string; power: string }>((tie) => ({
  expr: fc.oneof(
    { maxDepth: 6, depthSize: 'medium', depthIdentifier: 'expr' },
    { arbitrary: tie('leaf'), weight: 2 },
    { arbitrary: tie('binary'), weight: 4 },
    { arbitrary: tie('unary'), weight: 1 },
    { arbitrary: tie('call'), weight: 2 },
    { arbitrary: tie('power'), weight: 1 },
  ),
  leaf: fc.oneof(fc.constantFrom('x', 'y', 'pi'), literal),
  binary: fc
    .tuple(tie('expr'), fc.constantFrom('+', '-', '*', '/'), tie('expr'), fc.boolean())
    .map(([a, op, b, brackets]) => (brackets ? `(${a}) ${op} (${b})` : `${a} ${op} ${b}`)),
  unary: fc.tuple(fc.constantFrom('-', '+'), tie('expr')).map(([op, a]) => `${op}(${a})`),
  power: fc
    .tuple(tie('expr'), fc.integer({ min: 0, max: 4 }), fc.boolean())
    .map(([a, k, fn]) => (fn ? `pow(${a}, ${k})` : `(${a}) ^ ${k}`)),
  call: fc.oneof(
    fc.tuple(fc.constantFrom('exp', 'sin', 'cos', 'tan', 'atan', 'tanh', 'sinh', 'cosh', 'abs'), tie('expr')).map(([f, a]) => `${f}(${a})`),
    tie('expr').map((a) => `sqrt(1 + abs(${a}))`),
    tie('expr').map((a) => `log(2 + abs(${a}))`),
    tie('expr').map((a) => `asin(tanh(${a}))`),
    tie('expr').map((a) => `acos(tanh(${a}))`),
  ),
}));

function close(actual: number, expected: number, rel: number): boolean {
  if (Number.isNaN(expected)) return Number.isNaN(actual);
  if (!Number.isFinite(expected)) return actual === expected;
  return Math.abs(actual - expected) <= rel * Math.max(1, Math.abs(expected));
}

function system(text: string) {
  return compileModelJson({
    format: 'brinkmap/ode-1', name: 'random', variables: ['x'], parameters: { y: 0, k: 0 },
    rates: { x: text }, sweep: { parameter: 'y', from: 0, to: 1 },
  });
}

describe('compiled expressions against mathjs (fast-check)', () => {
  const point = fc.tuple(fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: -3, max: 3, noNaN: true }));

  it('every generated valid expression is accepted and evaluates like mathjs.evaluate', () => {
    fc.assert(
      fc.property(expr, point, (text, [x, y]) => {
        expect(checkExpression(text, ['x', 'y', 'k']).ok).toBe(true);
        const got = system(text).rates(Float64Array.from([x]), y, new Float64Array(1))[0];
        const want = evaluate(text, { x, y });
        expect(typeof want).toBe('number');
        if (!close(got, want as number, 1e-12)) throw new Error(`${text} at x=${x}, y=${y}: compiled ${got}, mathjs ${want}`);
      }),
      { numRuns: 1500 },
    );
  });

  it('the compiled Jacobian equals mathjs.evaluate of mathjs.derivative of the same text', () => {
    fc.assert(
      fc.property(expr, point, (text, [x, y]) => {
        const sys = system(text);
        const got = sys.jacobian(Float64Array.from([x]), y, new Float64Array(1))[0];
        const gotP = sys.parameterDerivative(Float64Array.from([x]), y, new Float64Array(1))[0];
        const want = derivative(text, 'x', { simplify: false }).evaluate({ x, y });
        const wantP = derivative(text, 'y', { simplify: false }).evaluate({ x, y });
        // mathjs writes d|u| as |u|/u (0/0 at u = 0) and may overflow in intermediate terms where the
        // folded tree does not; compare where its value is an ordinary finite number.
        for (const [g, w] of [[got, want], [gotP, wantP]] as const) {
          if (typeof w !== 'number' || !Number.isFinite(w) || Math.abs(w) > 1e12) continue;
          if (!close(g, w, 1e-9)) throw new Error(`d/d of ${text} at x=${x}, y=${y}: compiled ${g}, mathjs ${w}`);
        }
      }),
      { numRuns: 800 },
    );
  });
});
