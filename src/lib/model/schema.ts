import { z } from 'zod';
import { checkExpression } from './check-expression';
import { MODEL_LIMITS } from './limits';
import { listNames, nameProblem } from './names';

/**
 * zod schema of model documents (`brinkmap/network-1` and `brinkmap/ode-1`). Objects are strict
 * (unknown fields are errors). Structural checks are zod's; cross-field checks (unique ids, link
 * endpoints, the swept parameter, names, caps) and the expression whitelist run in `superRefine`, so
 * a successful parse means the document compiles. Use `validateModelDocument` for path-named issues.
 */

const finite = z.number().finite();
const expression = z.string();

// zod builds records by assignment, which would silently swallow a "__proto__" key; refuse it.
const recordKey = z.string().refine((k) => k !== '__proto__', { message: "'__proto__' cannot be used as a name" });
const parameterMap = z.record(recordKey, finite);

const startList = z.array(z.array(finite)).max(MODEL_LIMITS.maxStartGuesses);

const sweepSchema = z
  .object({ parameter: z.string(), from: finite, to: finite })
  .strict();

export const elementSchema = z
  .object({ variable: z.string(), rate: expression, parameters: parameterMap.default({}) })
  .strict();

export const nodeSchema = z
  .object({
    id: z
      .string()
      .min(1)
      .max(MODEL_LIMITS.maxNameLength)
      .refine((id) => !/[\u0000-\u001f\u007f]/.test(id), { message: 'must not contain control characters (line breaks, tabs, ...)' })
      .refine((id) => id.trim() === id, { message: 'must not start or end with spaces' }),
    parameters: parameterMap.optional(),
  })
  .strict();

export const linkSchema = z
  .object({ from: z.string(), to: z.string(), weight: finite.default(1), twoWay: z.boolean().default(false) })
  .strict();

export const DEFAULT_COUPLING_TERM = 'source - target';

export const couplingSchema = z
  .object({ parameter: z.string(), value: finite, term: expression.default(DEFAULT_COUPLING_TERM) })
  .strict();

const positive = finite.positive();

/**
 * Additive noise on every state variable, dx = F dt + sigma dW (docs/noise.md): one amplitude for all,
 * optionally overridden per node (network form) or per variable (ODE form). Optional: documents
 * without it mean what they meant before and keep their hash.
 */
export const networkNoiseSchema = z
  .object({ amplitude: positive, perNode: z.record(recordKey, positive).optional() })
  .strict();
export const odeNoiseSchema = z
  .object({ amplitude: positive, perVariable: z.record(recordKey, positive).optional() })
  .strict();

export const networkDocumentObject = z
  .object({
    format: z.literal('brinkmap/network-1'),
    name: z.string().min(1).max(MODEL_LIMITS.maxDocumentNameLength),
    element: elementSchema,
    nodes: z.array(nodeSchema).min(1).max(MODEL_LIMITS.maxVariables),
    links: z.array(linkSchema).max(MODEL_LIMITS.maxLinks).default([]),
    coupling: couplingSchema,
    sweep: sweepSchema,
    start: startList.optional(),
    noise: networkNoiseSchema.optional(),
  })
  .strict();

export const odeDocumentObject = z
  .object({
    format: z.literal('brinkmap/ode-1'),
    name: z.string().min(1).max(MODEL_LIMITS.maxDocumentNameLength),
    variables: z.array(z.string()).min(1).max(MODEL_LIMITS.maxVariables),
    parameters: parameterMap,
    rates: z.record(recordKey, expression),
    sweep: sweepSchema,
    start: startList.optional(),
    noise: odeNoiseSchema.optional(),
  })
  .strict();

/** Field names of each strict object, for "unknown field" messages (keyed by the object's role). */
export const KNOWN_FIELDS: Readonly<Record<string, readonly string[]>> = {
  network: Object.keys(networkDocumentObject.shape),
  ode: Object.keys(odeDocumentObject.shape),
  element: Object.keys(elementSchema.shape),
  nodes: Object.keys(nodeSchema.shape),
  links: Object.keys(linkSchema.shape),
  coupling: Object.keys(couplingSchema.shape),
  sweep: Object.keys(sweepSchema.shape),
  noise: [...new Set([...Object.keys(networkNoiseSchema.shape), ...Object.keys(odeNoiseSchema.shape)])],
};

type NetworkShape = z.output<typeof networkDocumentObject>;
type OdeShape = z.output<typeof odeDocumentObject>;

export const modelDocumentSchema = z
  .discriminatedUnion('format', [networkDocumentObject, odeDocumentObject])
  .superRefine((doc, ctx) => {
    const add = (path: (string | number)[], message: string) => ctx.addIssue({ code: z.ZodIssueCode.custom, path, message });
    if (doc.format === 'brinkmap/network-1') checkNetwork(doc, add);
    else checkOde(doc, add);
  });

export type ModelDocument = z.output<typeof modelDocumentSchema>;
export type NetworkDocument = Extract<ModelDocument, { format: 'brinkmap/network-1' }>;
export type OdeDocument = Extract<ModelDocument, { format: 'brinkmap/ode-1' }>;
/** What a caller may write (defaults not yet applied). */
export type ModelDocumentInput = z.input<typeof modelDocumentSchema>;

type Add = (path: (string | number)[], message: string) => void;

function checkParameterNames(params: Record<string, number>, at: (string | number)[], add: Add, taken: Map<string, string>): void {
  const keys = Object.keys(params);
  if (keys.length > MODEL_LIMITS.maxParameters) {
    add(at, `at most ${MODEL_LIMITS.maxParameters} parameters are allowed, got ${keys.length}`);
  }
  for (const k of keys) {
    const problem = nameProblem(k);
    if (problem) add([...at, k], problem);
    else if (taken.has(k)) add([...at, k], `'${k}' is already used as ${taken.get(k)}`);
  }
}

function checkSweepRange(sweep: { from: number; to: number }, add: Add): void {
  if (sweep.from === sweep.to) add(['sweep', 'to'], `must differ from sweep.from (both are ${sweep.from})`);
}

function checkStart(start: number[][] | undefined, n: number, what: string, add: Add): void {
  start?.forEach((guess, i) => {
    if (guess.length !== n) add(['start', i], `expected ${n} values (one per ${what}), got ${guess.length}`);
  });
}

function reportExpression(text: string, allowed: readonly string[], at: (string | number)[], add: Add): void {
  const result = checkExpression(text, allowed);
  if (!result.ok) for (const m of result.messages) add(at, m);
}

function checkNetwork(doc: NetworkShape, add: Add): void {
  const { element, coupling } = doc;
  // Over a size cap zod has already reported it; cross-checks would only repeat work and noise.
  if (doc.nodes.length > MODEL_LIMITS.maxVariables || doc.links.length > MODEL_LIMITS.maxLinks) return;
  if (Object.keys(element.parameters).length > MODEL_LIMITS.maxParameters) {
    add(['element', 'parameters'], `at most ${MODEL_LIMITS.maxParameters} parameters are allowed, got ${Object.keys(element.parameters).length}`);
    return;
  }
  const taken = new Map<string, string>([
    ['source', 'the coupling source state'],
    ['target', 'the coupling target state'],
  ]);
  const variableProblem = nameProblem(element.variable);
  if (variableProblem) add(['element', 'variable'], variableProblem);
  else if (taken.has(element.variable)) add(['element', 'variable'], `'${element.variable}' is reserved for ${taken.get(element.variable)}`);
  taken.set(element.variable, 'the element variable');
  checkParameterNames(element.parameters, ['element', 'parameters'], add, taken);
  const elementParams = Object.keys(element.parameters);
  for (const k of elementParams) if (!taken.has(k)) taken.set(k, 'an element parameter');

  const couplingProblem = nameProblem(coupling.parameter);
  if (couplingProblem) add(['coupling', 'parameter'], couplingProblem);
  else if (taken.has(coupling.parameter)) add(['coupling', 'parameter'], `'${coupling.parameter}' is already used as ${taken.get(coupling.parameter)}`);

  reportExpression(element.rate, [element.variable, ...elementParams], ['element', 'rate'], add);
  reportExpression(coupling.term, ['source', 'target', ...elementParams], ['coupling', 'term'], add);

  const index = new Map<string, number>();
  doc.nodes.forEach((node, i) => {
    const first = index.get(node.id);
    if (first !== undefined) add(['nodes', i, 'id'], `duplicate node id '${node.id}' (also nodes[${first}])`);
    else index.set(node.id, i);
    for (const k of Object.keys(node.parameters ?? {})) {
      if (!Object.hasOwn(element.parameters, k)) {
        add(['nodes', i, 'parameters', k], `not a parameter of the element (element parameters: ${listNames(elementParams)})`);
      }
    }
  });

  const nodeList = listNames(index.keys());
  const seen = new Map<string, number>();
  doc.links.forEach((link, i) => {
    let ok = true;
    for (const end of ['from', 'to'] as const) {
      if (!index.has(link[end])) {
        add(['links', i, end], `unknown node '${link[end]}' (nodes: ${nodeList})`);
        ok = false;
      }
    }
    if (!ok) return;
    const directed = link.twoWay ? [[link.from, link.to], [link.to, link.from]] : [[link.from, link.to]];
    if (link.twoWay && link.from === link.to) directed.pop();
    for (const [f, t] of directed) {
      const key = JSON.stringify([f, t]);
      const other = seen.get(key);
      if (other !== undefined && other !== i) {
        add(['links', i], `repeats the link '${f}' -> '${t}' of links[${other}]; combine them into one weight`);
      } else seen.set(key, i);
    }
  });

  const sweepName = doc.sweep.parameter;
  if (sweepName !== coupling.parameter && !Object.hasOwn(element.parameters, sweepName)) {
    add(['sweep', 'parameter'], `unknown parameter '${sweepName}' (parameters: ${listNames([coupling.parameter, ...elementParams])})`);
  } else if (sweepName !== coupling.parameter && doc.nodes.every((n) => n.parameters && Object.hasOwn(n.parameters, sweepName))) {
    add(['sweep', 'parameter'], `every node overrides '${sweepName}', so sweeping it changes nothing`);
  }
  checkSweepRange(doc.sweep, add);
  checkStart(doc.start, doc.nodes.length, 'node', add);
  for (const id of Object.keys(doc.noise?.perNode ?? {})) {
    if (!index.has(id)) add(['noise', 'perNode', id], `unknown node '${id}' (nodes: ${nodeList})`);
  }
}

function checkOde(doc: OdeShape, add: Add): void {
  if (doc.variables.length > MODEL_LIMITS.maxVariables) return;
  if (Object.keys(doc.parameters).length > MODEL_LIMITS.maxParameters) {
    add(['parameters'], `at most ${MODEL_LIMITS.maxParameters} parameters are allowed, got ${Object.keys(doc.parameters).length}`);
    return;
  }
  if (Object.keys(doc.rates).length > MODEL_LIMITS.maxVariables) {
    add(['rates'], `at most ${MODEL_LIMITS.maxVariables} rates are allowed, got ${Object.keys(doc.rates).length}`);
    return;
  }
  const taken = new Map<string, string>();
  doc.variables.forEach((v, i) => {
    const problem = nameProblem(v);
    if (problem) add(['variables', i], problem);
    else if (taken.has(v)) add(['variables', i], `duplicate variable '${v}'`);
    else taken.set(v, 'a variable');
  });
  checkParameterNames(doc.parameters, ['parameters'], add, taken);
  const symbols = [...doc.variables, ...Object.keys(doc.parameters)];
  for (const v of doc.variables) {
    if (!Object.hasOwn(doc.rates, v)) add(['rates', v], `missing: every variable needs a rate (variables: ${listNames(doc.variables)})`);
  }
  for (const [k, text] of Object.entries(doc.rates)) {
    if (!doc.variables.includes(k)) {
      add(['rates', k], `not a declared variable (variables: ${listNames(doc.variables)})`);
      continue;
    }
    reportExpression(text, symbols, ['rates', k], add);
  }
  if (!Object.hasOwn(doc.parameters, doc.sweep.parameter)) {
    add(['sweep', 'parameter'], `unknown parameter '${doc.sweep.parameter}' (parameters: ${listNames(Object.keys(doc.parameters))})`);
  }
  checkSweepRange(doc.sweep, add);
  checkStart(doc.start, doc.variables.length, 'variable', add);
  for (const v of Object.keys(doc.noise?.perVariable ?? {})) {
    if (!doc.variables.includes(v)) add(['noise', 'perVariable', v], `not a declared variable (variables: ${listNames(doc.variables)})`);
  }
}
