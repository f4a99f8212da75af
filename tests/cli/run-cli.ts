import { spawn } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** Runs the CLI as `npm run atlas` does (node --import tsx src/cli/atlas.ts), without blocking the test worker. */
export function runCli(args: string[]): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--import', 'tsx', 'src/cli/atlas.ts', ...args], { timeout: 90_000 });
    let stdout = '';
    let stderr = '';
    child.stdout.setEncoding('utf8').on('data', (c: string) => (stdout += c));
    child.stderr.setEncoding('utf8').on('data', (c: string) => (stderr += c));
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}

/** A scratch folder for one test file's model documents; `file(name, content)` writes one and returns its path. */
export function scratchFiles(prefix: string): { dir: string; file: (name: string, content: unknown) => string } {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  const file = (name: string, content: unknown) => {
    const path = join(dir, name);
    writeFileSync(path, typeof content === 'string' ? content : JSON.stringify(content));
    return path;
  };
  return { dir, file };
}
