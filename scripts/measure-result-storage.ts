/**
 * Measures how fast one stored diagram is read back in the two layouts considered for `results`
 * (docs/architecture.md, "Storing results"):
 *   A. JSON text: the whole diagram in one LONGTEXT column, one row per result (what we use);
 *   B. compact tables: one row per branch point (p DOUBLE, unstable SMALLINT, x as a BLOB of
 *      little-endian float64) plus one row per branch, rebuilt into a Diagram on read.
 * Both reads end where the API needs them: JSON text to send (A: as stored; B: rebuilt and
 * stringified), and, for comparison, a parsed Diagram object (A: JSON.parse; B: the rebuilt object).
 *
 *   node --import tsx scripts/measure-result-storage.ts [--diagram FILE] [--repeat 15]
 *
 * Uses the database named by the environment (DB_* or DATABASE_URL; load .env.test for the test
 * database), in two scratch tables it creates and drops. Without --diagram it traces an invented
 * 20-lake chain with the real engine first (takes a while).
 */
import { readFileSync } from 'node:fs';
import { db, closeDb } from '../src/lib/server/db.ts';
import type { Branch, Diagram } from '../src/lib/atlas/types.ts';

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

async function twentyLakes(): Promise<Diagram> {
  const { computeTrace } = await import('../src/lib/server/runs/compute.ts');
  const ids = Array.from({ length: 20 }, (_, i) => `lake${i + 1}`);
  const doc = {
    format: 'brinkmap/network-1', name: 'Twenty invented lakes',
    element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
    nodes: ids.map((id, i) => ({ id, parameters: { a: 0.04 + 0.002 * i } })),
    links: ids.slice(1).map((id, i) => ({ from: ids[i], to: id, weight: 1 })),
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 0.5 },
  };
  const out = computeTrace(JSON.stringify(doc), {}, { onProgress: () => undefined, isCancelled: () => false });
  const { decodeDiagram } = await import('../src/lib/storage/index.ts');
  return decodeDiagram(out.diagramBlob);
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function main(): Promise<void> {
  const file = arg('diagram');
  const repeat = Math.max(3, Number(arg('repeat') ?? 15));
  const diagram: Diagram = file ? JSON.parse(readFileSync(file, 'utf8')).diagramJson
    ? JSON.parse(JSON.parse(readFileSync(file, 'utf8')).diagramJson)
    : JSON.parse(readFileSync(file, 'utf8')) : await twentyLakes();
  const n = diagram.variables.length;
  const points = diagram.branches.reduce((s, b) => s + b.points.length, 0);
  const text = JSON.stringify(diagram);
  console.log(`diagram: ${n} state variables, ${diagram.branches.length} branches, ${points} points, ${(text.length / 1024).toFixed(0)} KiB of JSON`);

  const A = 'measure_json_results';
  const B = 'measure_compact_points';
  const BB = 'measure_compact_branches';
  for (const t of [A, B, BB]) await db.schema.dropTableIfExists(t);
  await db.schema.createTable(A, (t) => { t.increments('id'); t.text('diagram', 'longtext').notNullable(); });
  await db.schema.createTable(BB, (t) => {
    t.integer('result_id').notNullable(); t.integer('branch').notNullable(); t.string('branch_id', 32);
    t.text('meta').notNullable(); t.primary(['result_id', 'branch']);
  });
  await db.schema.createTable(B, (t) => {
    t.integer('result_id').notNullable(); t.integer('branch').notNullable(); t.integer('seq').notNullable();
    t.double('p').notNullable(); t.smallint('unstable').notNullable(); t.binary('x').notNullable();
    t.primary(['result_id', 'branch', 'seq']);
  });
  // The rest of the diagram (special points, diagnostics, settings) is small; layout B keeps it as JSON beside the tables.
  const rest = JSON.stringify({ ...diagram, branches: [] });
  try {
    await db(A).insert({ id: 1, diagram: text });
    await db(BB).insert(diagram.branches.map((b, i) => ({ result_id: 1, branch: i, branch_id: b.id, meta: JSON.stringify({ origin: b.origin, ends: b.ends }) })));
    const rows = diagram.branches.flatMap((b, i) => b.points.map((pt, k) => ({
      result_id: 1, branch: i, seq: k, p: pt.p, unstable: pt.unstable, x: Buffer.from(new Float64Array(pt.x).buffer),
    })));
    for (let i = 0; i < rows.length; i += 2000) await db(B).insert(rows.slice(i, i + 2000));

    const readA = async (parse: boolean) => {
      const row = await db(A).where({ id: 1 }).first('diagram');
      return parse ? JSON.parse(row.diagram) : row.diagram;
    };
    const readB = async (asText: boolean) => {
      const [branchRows, pointRows] = await Promise.all([
        db(BB).where({ result_id: 1 }).orderBy('branch'),
        db(B).where({ result_id: 1 }).orderBy(['branch', 'seq']).select('branch', 'p', 'unstable', 'x'),
      ]);
      const branches: Branch[] = branchRows.map((r) => { const m = JSON.parse(r.meta); return { id: r.branch_id, points: [], origin: m.origin, ends: m.ends }; });
      for (const r of pointRows) {
        const buf: Buffer = r.x;
        const x = Array.from(new Float64Array(buf.buffer.slice(buf.byteOffset, buf.byteOffset + buf.byteLength)));
        (branches[r.branch].points as unknown as object[]).push({ p: r.p, x, unstable: r.unstable });
      }
      const d = { ...JSON.parse(rest), branches };
      return asText ? JSON.stringify(d) : d;
    };
    // Both layouts must give back the same diagram, bit for bit.
    if (JSON.stringify(await readB(false)) !== text) throw new Error('layout B did not round-trip the diagram exactly');

    const timings: Record<string, number[]> = { 'A text (as sent)': [], 'A parsed': [], 'B rebuilt, as text': [], 'B rebuilt, object': [] };
    for (let i = 0; i < repeat; i++) {
      // Interleaved so that cache warmth and machine load affect both layouts alike.
      for (const [label, fn] of [
        ['A text (as sent)', () => readA(false)], ['A parsed', () => readA(true)],
        ['B rebuilt, as text', () => readB(true)], ['B rebuilt, object', () => readB(false)],
      ] as const) {
        const s = performance.now();
        await fn();
        timings[label].push(performance.now() - s);
      }
    }
    const base = median(timings['A text (as sent)']);
    for (const [label, t] of Object.entries(timings)) {
      console.log(`${label.padEnd(20)} median ${median(t).toFixed(1).padStart(7)} ms   (${(median(t) / base).toFixed(1)}x layout A as sent)`);
    }
    for (const t of [A, B, BB]) await db.raw(`ANALYZE TABLE ${t}`);
    const sizes = await db.raw(`SELECT table_name AS t, data_length + index_length AS bytes FROM information_schema.tables WHERE table_schema = DATABASE() AND table_name IN (?, ?, ?)`, [A, B, BB]);
    for (const r of sizes[0]) console.log(`table ${r.t ?? r.TABLE_NAME}: ${(Number(r.bytes) / 1024).toFixed(0)} KiB on disk`);
  } finally {
    for (const t of [A, B, BB]) await db.schema.dropTableIfExists(t);
    await closeDb();
  }
}

main().catch((e) => { console.error(e); process.exit(1); });
