import type { CompiledSystem } from './compiled-system';
import { compileNetwork } from './compile-network';
import { compileOde } from './compile-ode';
import { ModelError, type ModelIssue } from './errors';
import { atPath } from './internal-tree';
import { listNames } from './names';
import type { ModelDocument } from './schema';
import { validateModelDocument } from './validate';

export interface CompileOptions {
  /**
   * Sweep this parameter instead of the document's `sweep.parameter` (default: the document's).
   * Network form: the coupling parameter or an element parameter; ode form: any parameter. The
   * document's swept parameter then stays fixed at its value in the document.
   */
  readonly sweepParameter?: string;
  /** Sweep range to report in `CompiledSystem.sweep` (default: the document's `sweep.from`/`to`). */
  readonly sweep?: { readonly from: number; readonly to: number };
}

/**
 * Compile a model document into a CompiledSystem: rates, state Jacobian and parameter derivative as
 * closures generated once (see codegen.ts), the Jacobian built symbolically (differentiate.ts).
 * The document is validated first (so a hand-built object is checked too); any problem throws a
 * ModelError whose message names the field path.
 */
export function compileModel(document: ModelDocument, options: CompileOptions = {}): CompiledSystem {
  return compileModelJson(document, options);
}

/** Validate untrusted input (parsed JSON) and compile it; throws ModelError on any problem. */
export function compileModelJson(input: unknown, options: CompileOptions = {}): CompiledSystem {
  const checked = validateModelDocument(input);
  if (!checked.ok) throw new ModelError(checked.issues);
  // Anything but a ModelError from here on is a compiler bug; it still leaves as a ModelError.
  return atPath('(document)', () => compileValidated(checked.document, options));
}

function compileValidated(doc: ModelDocument, options: CompileOptions): CompiledSystem {
  const issues: ModelIssue[] = [];

  const parameter = options.sweepParameter ?? doc.sweep.parameter;
  if (options.sweepParameter !== undefined) {
    if (doc.format === 'brinkmap/network-1') {
      const names = [doc.coupling.parameter, ...Object.keys(doc.element.parameters)];
      if (!names.includes(parameter)) {
        issues.push({ path: 'options.sweepParameter', message: `unknown parameter '${parameter}' (parameters: ${listNames(names)})` });
      } else if (parameter !== doc.coupling.parameter && doc.nodes.every((node) => node.parameters && Object.hasOwn(node.parameters, parameter))) {
        issues.push({ path: 'options.sweepParameter', message: `every node overrides '${parameter}', so sweeping it changes nothing` });
      }
    } else if (!Object.hasOwn(doc.parameters, parameter)) {
      issues.push({ path: 'options.sweepParameter', message: `unknown parameter '${parameter}' (parameters: ${listNames(Object.keys(doc.parameters))})` });
    }
  }
  const sweep = options.sweep ?? doc.sweep;
  if (options.sweep !== undefined) {
    if (!Number.isFinite(sweep.from)) issues.push({ path: 'options.sweep.from', message: 'expected a finite number' });
    if (!Number.isFinite(sweep.to)) issues.push({ path: 'options.sweep.to', message: 'expected a finite number' });
    if (sweep.from === sweep.to) issues.push({ path: 'options.sweep.to', message: `must differ from options.sweep.from (both are ${sweep.from})` });
  }
  if (issues.length > 0) throw new ModelError(issues);

  return doc.format === 'brinkmap/network-1'
    ? compileNetwork(doc, parameter, sweep)
    : compileOde(doc, parameter, sweep);
}
