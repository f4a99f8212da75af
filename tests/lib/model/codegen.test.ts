import { describe, expect, it } from 'vitest';
import { compileFunction, emit, numberLiteral } from '../../../src/lib/model/codegen';
import { bin, call, neg, num, sym } from '../../../src/lib/model/expr';
import { fold, foldConstants } from '../../../src/lib/model/fold';

describe('codegen safety checks', () => {
  it('emit refuses a symbol reference that is not an index-built name', () => {
    expect(() => emit(sym('a'), () => 'alert(1)')).toThrow(/bad symbol reference/);
    expect(() => emit(sym('a'), () => 'x[0]);process.exit(1);(')).toThrow(/bad symbol reference/);
    expect(emit(sym('a'), () => 'q[3]')).toBe('q[3]');
  });

  it('numberLiteral prints finite numbers only, with signs and -0 in brackets', () => {
    expect(numberLiteral(0.5)).toBe('0.5');
    expect(numberLiteral(-2)).toBe('(-2)');
    expect(numberLiteral(-0)).toBe('(-0)');
    expect(numberLiteral(1e-300)).toBe('1e-300');
    expect(() => numberLiteral(NaN)).toThrow();
    expect(() => numberLiteral(Infinity)).toThrow();
  });

  it('compileFunction refuses argument names other than plain lower-case words', () => {
    expect(() => compileFunction(['x', 'a=alert(1)'], 'return 1;')).toThrow(/bad argument name/);
    expect(() => compileFunction(['x'], 'return 1;', new Set([40]))).toThrow(/bad power/);
  });

  it('emitted negation of a negative literal stays valid JavaScript: -(-2) = 2', () => {
    const f = compileFunction<() => number>([], `return ${emit(neg(num(-2)), () => 'p')};`);
    expect(f()).toBe(2);
  });
});

describe('fold', () => {
  const u = bin('+', sym('x'), num(1));
  it('rewrites c * abs(u) / u to c * sign(u)', () => {
    expect(fold(bin('/', bin('*', num(3), call('abs', u)), u))).toEqual(bin('*', num(3), call('sign', u)));
    expect(fold(bin('/', call('abs', u), u))).toEqual(call('sign', u));
  });
  it('drops neutral elements and folds finite constants', () => {
    expect(fold(bin('+', bin('*', num(1), sym('x')), bin('-', num(8), num(1))))).toEqual(bin('+', sym('x'), num(7)));
    expect(fold(bin('*', num(0), call('exp', sym('x'))))).toEqual(num(0));
  });
  it('foldConstants keeps 0 * u so that IEEE NaN and infinity propagate as written', () => {
    const e = bin('*', num(0), call('exp', sym('x')));
    expect(foldConstants(e)).toEqual(e);
    expect(foldConstants(bin('*', num(2), num(3)))).toEqual(num(6));
    // 1 / 0 is not finite, so it stays as written.
    expect(foldConstants(bin('/', num(1), num(0)))).toEqual(bin('/', num(1), num(0)));
  });
});
