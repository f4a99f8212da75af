import { describe, expect, it } from 'vitest';
import { compileModelJson, ModelError, validateModelDocument, type ModelIssue } from '../../../src/lib/model';
import { copy, lorenz, threeLakes } from './fixtures';

function issuesOf(input: unknown): ModelIssue[] {
  const r = validateModelDocument(input);
  if (r.ok) throw new Error('expected the document to be refused');
  // The same input must make compileModelJson throw a ModelError with the same issues.
  let thrown: unknown;
  try {
    compileModelJson(input);
  } catch (err) {
    thrown = err;
  }
  expect(thrown).toBeInstanceOf(ModelError);
  expect((thrown as ModelError).issues).toEqual(r.issues);
  expect((thrown as ModelError).message).not.toContain('\n');
  return r.issues;
}

const network = (edit: (d: any) => void) => {
  const d = copy(threeLakes);
  edit(d);
  return d;
};
const ode = (edit: (d: any) => void) => {
  const d = copy(lorenz);
  edit(d);
  return d;
};
const rate = (text: string) => network((d) => (d.element.rate = text));

describe('validateModelDocument accepts the issue examples', () => {
  it('accepts the three-lake network and fills defaults', () => {
    const r = validateModelDocument(threeLakes);
    expect(r.ok).toBe(true);
    if (r.ok && r.document.format === 'brinkmap/network-1') {
      expect(r.document.links[0].twoWay).toBe(false);
      expect(r.document.coupling.term).toBe('source - target');
    }
  });
  it('accepts the Lorenz ode-1 example', () => {
    expect(validateModelDocument(lorenz).ok).toBe(true);
  });
  it('does not mutate its input', () => {
    const d = copy(threeLakes);
    delete d.coupling.term;
    const before = JSON.stringify(d);
    validateModelDocument(d);
    expect(JSON.stringify(d)).toBe(before);
  });
});

describe('validateModelDocument names the path of every problem', () => {
  it.each<[string, unknown, ModelIssue]>([
    ['a non-object', 42, { path: '(document)', message: 'expected an object, got a number' }],
    ['an unknown format', { ...copy(threeLakes), format: 'brinkmap/network-9' }, { path: 'format', message: "expected one of \"brinkmap/network-1\", \"brinkmap/ode-1\"" }],
    ['an unknown top-level key', network((d) => (d.extra = 1)), { path: 'extra', message: expect.stringContaining('unknown field (allowed: format, name, element') as any }],
    ['an unknown element key', network((d) => (d.element.foo = 1)), { path: 'element.foo', message: 'unknown field (allowed: variable, rate, parameters)' }],
    ['an unknown node key', network((d) => (d.nodes[2].label = 'x')), { path: 'nodes[2].label', message: 'unknown field (allowed: id, parameters)' }],
    ['an unknown link key', network((d) => (d.links[1].both = true)), { path: 'links[1].both', message: 'unknown field (allowed: from, to, weight, twoWay)' }],
    ['an unknown sweep key', ode((d) => (d.sweep.step = 0.1)), { path: 'sweep.step', message: 'unknown field (allowed: parameter, from, to)' }],
    ['a missing rate', network((d) => delete d.element.rate), { path: 'element.rate', message: 'is required' }],
    ['a missing sweep', ode((d) => delete d.sweep), { path: 'sweep', message: 'is required' }],
    ['a missing name', ode((d) => delete d.name), { path: 'name', message: 'is required' }],
    ['a string weight', network((d) => (d.links[0].weight = '1')), { path: 'links[0].weight', message: 'expected a number, got a string' }],
    ['a string parameter value', network((d) => (d.nodes[1].parameters.a = 'x')), { path: 'nodes[1].parameters.a', message: 'expected a number, got a string' }],
    ['a non-finite number', network((d) => (d.coupling.value = Infinity)), { path: 'coupling.value', message: 'expected a finite number' }],
    ['a NaN start entry', ode((d) => (d.start = [[0, NaN, 0]])), { path: 'start[0][1]', message: expect.any(String) as any }],
    ['no nodes', network((d) => (d.nodes = [])), { path: 'nodes', message: 'needs at least 1 entry' }],
    ['duplicate node ids', network((d) => (d.nodes[2].id = 'upper')), { path: 'nodes[2].id', message: "duplicate node id 'upper' (also nodes[0])" }],
    ['an unknown link endpoint', network((d) => (d.links[0].to = 'lowr')), { path: 'links[0].to', message: "unknown node 'lowr' (nodes: upper, middle, lower)" }],
    ['a repeated link', network((d) => d.links.push({ from: 'lower', to: 'middle', weight: 2 })), { path: 'links[2]', message: expect.stringContaining("repeats the link 'lower' -> 'middle' of links[1]") as any }],
    ['a node override of a non-parameter', network((d) => (d.nodes[1].parameters = { c: 1 })), { path: 'nodes[1].parameters.c', message: 'not a parameter of the element (element parameters: a, b)' }],
    ['an unknown sweep parameter (network)', network((d) => (d.sweep.parameter = 'gamma')), { path: 'sweep.parameter', message: "unknown parameter 'gamma' (parameters: beta, a, b)" }],
    ['an unknown sweep parameter (ode)', ode((d) => (d.sweep.parameter = 'r')), { path: 'sweep.parameter', message: "unknown parameter 'r' (parameters: sigma, rho, b)" }],
    ['a sweep over a parameter every node overrides', network((d) => { d.sweep.parameter = 'b'; for (const n of d.nodes) n.parameters = { b: 1 }; }), { path: 'sweep.parameter', message: "every node overrides 'b', so sweeping it changes nothing" }],
    ['from equal to to', ode((d) => (d.sweep.to = 0)), { path: 'sweep.to', message: 'must differ from sweep.from (both are 0)' }],
    ['a start guess of the wrong length', network((d) => (d.start = [[0, 0]])), { path: 'start[0]', message: 'expected 3 values (one per node), got 2' }],
    ['a missing ode rate', ode((d) => delete d.rates.z), { path: 'rates.z', message: 'missing: every variable needs a rate (variables: x, y, z)' }],
    ['an extra ode rate', ode((d) => (d.rates.w = 'x')), { path: 'rates.w', message: 'not a declared variable (variables: x, y, z)' }],
    ['a duplicate ode variable', ode((d) => (d.variables = ['x', 'y', 'x'])), { path: 'variables[2]', message: "duplicate variable 'x'" }],
    ['a parameter named like a variable', ode((d) => (d.parameters.x = 1)), { path: 'parameters.x', message: "'x' is already used as a variable" }],
    ['an invalid parameter name', network((d) => (d.element.parameters['2a'] = 1)), { path: 'element.parameters["2a"]', message: "'2a' is not a valid name (letters, digits and '_', not starting with a digit)" }],
    ['a reserved name', ode((d) => { d.variables = ['x', 'y', 'mod']; d.rates = { x: 'x', y: 'y', mod: '1' }; }), { path: 'variables[2]', message: "'mod' is reserved (an operator, keyword or function name)" }],
    ['the element variable named source', network((d) => { d.element.variable = 'source'; d.element.rate = 'a - source'; }), { path: 'element.variable', message: "'source' is reserved for the coupling source state" }],
    ['the coupling parameter named like an element parameter', network((d) => { d.coupling.parameter = 'a'; d.sweep.parameter = 'a'; }), { path: 'coupling.parameter', message: "'a' is already used as an element parameter" }],
    ['an unknown symbol', rate('a - c * P'), { path: 'element.rate', message: "unknown symbol 'c' (allowed: P, a, b)" }],
    ['an unknown symbol in the term', network((d) => (d.coupling.term = 'source - x')), { path: 'coupling.term', message: "unknown symbol 'x' (allowed: source, target, a, b)" }],
    ['the coupling parameter inside the term', network((d) => (d.coupling.term = 'beta * source')), { path: 'coupling.term', message: "unknown symbol 'beta' (allowed: source, target, a, b)" }],
    ['an assignment', rate('x = 3'), { path: 'element.rate', message: "assignment ('=') is not allowed: an expression only computes a value" }],
    ['a function definition', rate('f(x) = x'), { path: 'element.rate', message: 'function definitions are not allowed' }],
    ['a matrix', rate('[1,2]'), { path: 'element.rate', message: 'matrices and lists are not allowed' }],
    ['a string', rate("'a'"), { path: 'element.rate', message: 'text strings are not allowed ("a")' }],
    ['import(...)', rate('import({})'), { path: 'element.rate', message: expect.stringMatching(/^unknown function 'import' \(allowed functions: abs, acos/) as any }],
    ["evaluate('1')", rate("evaluate('1')"), { path: 'element.rate', message: expect.stringMatching(/^unknown function 'evaluate'/) as any }],
    ['property access', rate('P.constructor'), { path: 'element.rate', message: 'property and index access is not allowed' }],
    ['a range', rate('1:3'), { path: 'element.rate', message: "ranges (':') are not allowed" }],
    ['a conditional', rate('P > 1 ? a : b'), { path: 'element.rate', message: "conditional expressions ('? :') are not allowed" }],
    ['a comparison', rate('P == 1'), { path: 'element.rate', message: "operator '==' is not allowed (allowed: + - * / ^)" }],
    ['a factorial', rate('P!'), { path: 'element.rate', message: "operator '!' is not allowed (allowed: + - * / ^)" }],
    ['implicit multiplication', rate('2 P'), { path: 'element.rate', message: "implicit multiplication is not allowed: write '*' (as in '2 * x'), found '2 P'" }],
    ['two statements', rate('P; a'), { path: 'element.rate', message: "only one expression is allowed (no ';' or line breaks between statements)" }],
    ['wrong function arity', rate('exp(P, 2)'), { path: 'element.rate', message: 'function \'exp\' takes 1 argument, got 2' }],
    ['a boolean', rate('true'), { path: 'element.rate', message: "'true' is not a number" }],
    ['a non-finite literal', rate('1e400 * P'), { path: 'element.rate', message: "the number 'Infinity' is not finite" }],
    ['a syntax error with position', rate('a - * P'), { path: 'element.rate', message: 'syntax error at character 5: Value expected' }],
    ['an empty expression', rate('  '), { path: 'element.rate', message: 'expression is empty' }],
    ['an expression that is not a string', rate(3 as any), { path: 'element.rate', message: 'expected a string, got a number' }],
    ['too long an expression', rate(`P${' + P'.repeat(500)}`), { path: 'element.rate', message: 'expression is too long: at most 2000 characters are allowed, got 2001' }],
    ['too deep brackets', rate(`${'('.repeat(250)}P${')'.repeat(250)}`), { path: 'element.rate', message: 'expression nests brackets deeper than 200 levels (character 201)' }],
    ['a chain of more than 400 operations', rate(Array(450).fill('P').join('*')), { path: 'element.rate', message: 'expression is nested more than 400 operations deep (split long products or chains)' }],
    ['a node id with a line break', network((d) => (d.nodes[0].id = 'up\nper')), { path: 'nodes[0].id', message: 'must not contain control characters (line breaks, tabs, ...)' }],
    ['a node id with outer spaces', network((d) => (d.nodes[0].id = ' upper')), { path: 'nodes[0].id', message: 'must not start or end with spaces' }],
    ['65 nodes', network((d) => { d.nodes = Array.from({ length: 65 }, (_, i) => ({ id: `n${i}` })); d.links = []; }), { path: 'nodes', message: 'at most 64 nodes are allowed, got 65' }],
    ['65 variables', ode((d) => { d.variables = Array.from({ length: 65 }, (_, i) => `x${i}`); }), { path: 'variables', message: 'at most 64 variables are allowed, got 65' }],
    ['too long a node id', network((d) => (d.nodes[0].id = 'n'.repeat(65))), { path: 'nodes[0].id', message: 'at most 64 characters are allowed, got 65' }],
    ['too many parameters', ode((d) => { for (let i = 0; i < 70; i++) d.parameters[`k${i}`] = i; }), { path: 'parameters', message: 'at most 64 parameters are allowed, got 73' }],
  ])('%s', (_title, input, expected) => {
    const issues = issuesOf(input);
    expect(issues).toContainEqual(expected);
  });

  it('refuses "__proto__" keys that JSON.parse keeps but object assignment would swallow', () => {
    const text = JSON.stringify(copy(lorenz)).replace('"sigma":10', '"__proto__":1,"sigma":10');
    expect(issuesOf(JSON.parse(text))).toContainEqual({ path: 'parameters.__proto__', message: "'__proto__' cannot be used as a name" });
    const nodeText = JSON.stringify(copy(threeLakes)).replace('"parameters":{"a":0.07}', '"parameters":{"__proto__":{"a":1}}');
    expect(issuesOf(JSON.parse(nodeText)).map((i) => i.path)).toContain('nodes[1].parameters.__proto__');
    const top = JSON.stringify(copy(threeLakes)).replace('"format"', '"__proto__":{},"format"');
    expect(issuesOf(JSON.parse(top))[0].path).toBe('__proto__');
  });

  it('reports every problem, not only the first', () => {
    const d = network((x) => {
      x.element.rate = 'a - c * P';
      x.nodes[2].id = 'upper';
      x.links[0].to = 'nowhere';
    });
    const paths = issuesOf(d).map((i) => i.path);
    expect(paths).toEqual(expect.arrayContaining(['element.rate', 'nodes[2].id', 'links[0].to']));
  });

  it('the ModelError message is one line naming the first field and counting the rest', () => {
    try {
      compileModelJson(network((x) => { x.element.rate = 'a - c * P'; x.links[0].to = 'nowhere'; }));
      throw new Error('not refused');
    } catch (err) {
      expect(err).toBeInstanceOf(ModelError);
      expect((err as Error).message).toBe("element.rate: unknown symbol 'c' (allowed: P, a, b) (and 1 more problem)");
    }
  });

  it('lists at most 50 issues and counts the rest', () => {
    const d = network((x) => {
      x.links = Array.from({ length: 300 }, () => ({ from: 'upper', to: 'middle' }));
    });
    const issues = issuesOf(d);
    expect(issues.length).toBe(51);
    // 300 copies of one link: 299 repeats, 50 listed.
    expect(issues[50]).toEqual({ path: '(document)', message: 'and 249 more problems' });
  });

  it('refuses an oversized list before looking at its entries', () => {
    const d = network((x) => {
      x.links = Array.from({ length: 100_000 }, () => 'not even a link');
    });
    expect(issuesOf(d)).toEqual([{ path: 'links', message: 'at most 4096 links are allowed, got 100000' }]);
  });

  it('keeps ModelError.message on one line even when an expression spans lines', () => {
    // 'P\n+' fails to parse; whatever mathjs quotes, control characters are escaped in the message.
    const d = rate('a -\n c * P');
    issuesOf(d);
    try {
      compileModelJson(d);
    } catch (err) {
      expect((err as Error).message).not.toMatch(/[\n\r]/);
    }
  });

  it('refuses more links than 64 * 64', () => {
    const d = network((x) => {
      x.links = Array.from({ length: 64 * 64 + 1 }, () => ({ from: 'upper', to: 'middle' }));
    });
    expect(issuesOf(d)).toContainEqual({ path: 'links', message: 'at most 4096 links are allowed, got 4097' });
  });
});

describe('validateModelDocument checks the optional noise field', () => {
  it('accepts an amplitude with per-node (network) and per-variable (ODE) overrides', () => {
    const nodeId = copy(threeLakes).nodes[0].id;
    expect(validateModelDocument(network((d) => { d.noise = { amplitude: 0.1, perNode: { [nodeId]: 0.05 } }; })).ok).toBe(true);
    expect(validateModelDocument(ode((d) => { d.noise = { amplitude: 0.2, perVariable: { x: 0.1 } }; })).ok).toBe(true);
  });

  it('refuses a sigma that is zero, negative or not finite, naming the field', () => {
    expect(issuesOf(network((d) => { d.noise = { amplitude: 0 }; })).map((i) => i.path)).toContain('noise.amplitude');
    expect(issuesOf(network((d) => { d.noise = { amplitude: -1 }; })).map((i) => i.path)).toContain('noise.amplitude');
    const nodeId = copy(threeLakes).nodes[0].id;
    expect(issuesOf(network((d) => { d.noise = { amplitude: 0.1, perNode: { [nodeId]: -0.1 } }; }))[0].path).toBe(`noise.perNode.${nodeId}`);
  });

  it('refuses per-node keys that are not nodes and per-variable keys that are not variables', () => {
    const a = issuesOf(network((d) => { d.noise = { amplitude: 0.1, perNode: { nowhere: 0.1 } }; }));
    expect(a[0].path).toBe('noise.perNode.nowhere');
    expect(a[0].message).toMatch(/unknown node 'nowhere'/);
    const b = issuesOf(ode((d) => { d.noise = { amplitude: 0.1, perVariable: { w: 0.1 } }; }));
    expect(b[0].path).toBe('noise.perVariable.w');
  });

  it('refuses the other form\'s override key and a missing amplitude', () => {
    expect(issuesOf(network((d) => { d.noise = { amplitude: 0.1, perVariable: {} }; }))[0].message).toMatch(/perVariable/);
    expect(issuesOf(network((d) => { d.noise = {}; }))[0].path).toBe('noise.amplitude');
  });
});
