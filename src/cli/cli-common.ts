/** Pieces every `atlas` subcommand shares: the command shape, usage errors, reading models, writing output. */
import { readFileSync, writeFileSync } from 'node:fs';
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
  const text = `${JSON.stringify(json)}\n`;
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

