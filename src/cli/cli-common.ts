/** Pieces every `atlas` subcommand shares: the command shape, usage errors, reading models, writing output. */
import { readFileSync, writeFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { compileModelJson } from '../lib/model/index.js';
import type { CompiledSystem } from '../lib/model/index.js';

/** Bad input: message is one line naming the field. main() prints it and exits 2. */
export class UsageError extends Error {}

export interface Command {
  readonly summary: string;
  readonly help: string;
  /** May return a promise (e.g. commands that use worker threads); main() awaits it. */
  run(argv: string[]): void | Promise<void>;
}

export function readModel(path: string | undefined): unknown {
  if (path === undefined) throw new UsageError('MODEL.json: missing model file argument (see --help)');
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new UsageError(`MODEL.json: cannot read '${path}' (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new UsageError(`MODEL.json: '${path}' is not valid JSON (${(e as Error).message.split('\n')[0]})`);
  }
}

export function numberOption(name: string, value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  const v = Number(value);
  if (value.trim() === '' || !Number.isFinite(v)) throw new UsageError(`--${name}: expected a finite number, got '${value}'`);
  return v;
}

export function compile(model: unknown, from: number | undefined, to: number | undefined): CompiledSystem {
  const base = compileModelJson(model);
  if (from === undefined && to === undefined) return base;
  const sweep = { from: from ?? base.sweep.from, to: to ?? base.sweep.to };
  if (sweep.from === sweep.to) throw new UsageError(`--${to !== undefined ? 'to' : 'from'}: the sweep needs from != to (both are ${sweep.from})`);
  return compileModelJson(model, { sweep });
}

export function emit(json: unknown, out: string | undefined): void {
  emitText(`${JSON.stringify(json)}\n`, out);
}

/** Writes text to standard output, or to FILE for --out (a write failure names --out). */
export function emitText(text: string, out: string | undefined): void {
  if (out === undefined) {
    process.stdout.write(text);
    return;
  }
  try {
    writeFileSync(out, text);
  } catch (e) {
    throw new UsageError(`--out: cannot write '${out}' (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
}


/** What parseModelCommand read: the flags as strings, the one model path, the sweep overrides. */
export interface ModelCommandArgs {
  readonly values: Record<string, string | boolean | undefined>;
  /** --out FILE, when given. */
  readonly out: string | undefined;
  readonly modelPath: string | undefined;
  readonly from: number | undefined;
  readonly to: number | undefined;
}

/**
 * Parses `MODEL.json [--from P] [--to P] [--out FILE] [--help]` plus a command's own flags
 * (`extra`: name -> 'string' | 'boolean'). Prints `help` and returns null for --help; refuses more
 * than one model file and a non-numeric --from/--to (UsageError naming the flag).
 */
export function parseModelCommand(
  argv: string[],
  help: string,
  extra: Readonly<Record<string, 'string' | 'boolean'>> = {},
): ModelCommandArgs | null {
  const options: Record<string, { type: 'string' | 'boolean' }> = {
    from: { type: 'string' }, to: { type: 'string' }, out: { type: 'string' }, help: { type: 'boolean' },
  };
  for (const [name, type] of Object.entries(extra)) options[name] = { type };
  const { values, positionals } = parseArgs({ args: argv, allowPositionals: true, options });
  if (values.help) {
    process.stdout.write(`${help}\n`);
    return null;
  }
  if (positionals.length > 1) throw new UsageError(`MODEL.json: expected one model file, got ${positionals.length}`);
  return {
    values,
    modelPath: positionals[0],
    out: values.out as string | undefined,
    from: numberOption('from', values.from as string | undefined),
    to: numberOption('to', values.to as string | undefined),
  };
}
