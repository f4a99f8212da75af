/**
 * Bench section for stored results (src/lib/storage, docs/storage.md), issue 12 goal 2: a fully
 * bistable 6-node two-way network (every one of the 3^6 patterns an equilibrium at zero coupling)
 * under 10 s for the whole run in the worker, stored in under 3 MB.
 *
 * The network comes from bench.ts's builder (invented cubic elements x' = r_i + x - x^3, r_i spread
 * over [0.05, 0.15], diffusive two-way chain links). The run is computeTrace, exactly what the
 * worker thread runs (trace, band labelling, critical coupling, encoding). Beside it, in the same
 * process and on the same diagram, the JSON-text storage it replaced (baseline, what issue 12
 * measured): JSON.stringify of the diagram and of its preview, all three texts stored. Each side's
 * write (what the thread does before handing the result over), the hand-over to the worker's main
 * thread (structuredClone, as piscina posts it), and the reads the API does (full JSON text, the
 * preview's text, the objects) are timed as the best of 3 after one untimed round.
 * The database write is not in this bench (no database here); docs/architecture.md gives it.
 */
import { loadavg } from 'node:os';
import type { BenchSection } from './bench.js';
import { computeTrace } from '../src/lib/server/runs/compute.js';
import { decodeDiagram, decodeDiagramText, diagramBlobInfo } from '../src/lib/storage/index.js';
import { encodeForStorage, storedDiagramText } from '../src/lib/server/results/stored-diagram.js';
import { previewOf } from '../src/lib/server/results/preview.js';

const fmt = (v: number, digits = 3) => (Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : '-');
const mb = (bytes: number) => `${(bytes / 1e6).toFixed(2)} MB`;

function best(f: () => unknown, reps = 3): number {
  f();
  let b = Infinity;
  for (let k = 0; k < reps; k++) {
    const t = performance.now();
    f();
    b = Math.min(b, performance.now() - t);
  }
  return b;
}

/** The section for the document `makeDoc` builds (bench.ts passes its 6-node two-way cubic chain). */
export function storageSection(makeDoc: () => unknown): BenchSection {
  return {
    title: 'Result storage, issue 12 goal 2: encoded diagram vs JSON text, fully bistable 6-node two-way chain (same process)',
    run() {
      const documentText = JSON.stringify(makeDoc());
      const started = performance.now();
      const out = computeTrace(documentText, {}, { onProgress: () => undefined, isCancelled: () => false });
      const wholeMs = performance.now() - started;
      const f = out.phasesMs;
      const diagram = decodeDiagram(out.diagramBlob);
      const regimesBytes = Buffer.byteLength(out.regimesJson);

      // Baseline: the JSON-text storage (diagram text, preview text, regimes text).
      const jsonWrite = () => {
        const text = JSON.stringify(diagram);
        const preview = previewOf(diagram);
        return { text, previewText: preview === diagram ? text : JSON.stringify(preview) };
      };
      const json = jsonWrite();
      const jsonBytes = Buffer.byteLength(json.text) + Buffer.byteLength(json.previewText) + regimesBytes;
      const blob = out.diagramBlob;
      const blobBytes = blob.byteLength + regimesBytes;
      const same = decodeDiagramText(blob) === json.text && storedDiagramText({ blob }, 'preview') === json.previewText;

      const t = {
        jsonWrite: best(jsonWrite),
        blobWrite: best(() => encodeForStorage(diagram)),
        jsonHand: best(() => structuredClone({ d: json.text, p: json.previewText, g: out.regimesJson })),
        blobHand: best(() => structuredClone({ d: blob, g: out.regimesJson })),
        jsonReadText: 0, // stored text is passed through as is
        blobReadText: best(() => decodeDiagramText(blob)),
        jsonReadPreview: 0,
        blobReadPreview: best(() => storedDiagramText({ blob }, 'preview')),
        jsonReadObjects: best(() => JSON.parse(json.text)),
        blobReadObjects: best(() => decodeDiagram(blob)),
      };
      const points = diagram.branches.reduce((n, b) => n + b.points.length, 0);
      console.log(`  ${diagram.branches.length} branches, ${points} points, ${diagram.bifurcations.length} special points; encoded layout "${diagramBlobInfo(blob).layout}", JSON text and decoded text identical: ${same ? 'yes' : 'NO'}`);
      const rows: [string, string, string, string][] = [
        ['stored bytes (diagram + preview + regimes)', mb(jsonBytes), mb(blobBytes), fmt(jsonBytes / blobBytes)],
        ['write in the thread ms (stringify / encode)', fmt(t.jsonWrite), fmt(t.blobWrite), fmt(t.jsonWrite / t.blobWrite)],
        ['hand-over to the main thread ms (structuredClone)', fmt(t.jsonHand), fmt(t.blobHand), fmt(t.jsonHand / t.blobHand)],
        ['read: full JSON text ms', fmt(t.jsonReadText), fmt(t.blobReadText), '-'],
        ['read: preview JSON text ms', fmt(t.jsonReadPreview), fmt(t.blobReadPreview), '-'],
        ['read: diagram objects ms (parse / decode)', fmt(t.jsonReadObjects), fmt(t.blobReadObjects), fmt(t.jsonReadObjects / t.blobReadObjects)],
      ];
      console.log(`  ${'measure'.padEnd(52)}${'JSON text'.padStart(12)}${'encoded'.padStart(12)}${'JSON/enc x'.padStart(12)}`);
      for (const r of rows) console.log(`  ${r[0].padEnd(52)}${r[1].padStart(12)}${r[2].padStart(12)}${r[3].padStart(12)}`);
      const storageShare = f.encode / wholeMs;
      console.log(`  goal 2, whole run in the worker thread < 10 s -> ${wholeMs < 10_000 ? 'met' : 'NOT met'} (${fmt(wholeMs / 1000)} s: trace ${fmt(f.trace / 1000)} s, labelling ${fmt(f.label / 1000)} s, critical coupling ${fmt(f.onset / 1000)} s, encoding ${fmt(f.encode / 1000)} s = ${fmt(100 * storageShare, 2)} %; the database write comes on top, docs/architecture.md)`);
      console.log(`  goal 2, stored in under 3 MB -> ${blobBytes < 3e6 && same ? 'met' : 'NOT met'} (${mb(blobBytes)}: diagram ${mb(blob.byteLength)} + regimes ${mb(regimesBytes)}; JSON text storage ${mb(jsonBytes)}, ${fmt(jsonBytes / blobBytes)}x more)`);
      console.log(`  Reads of the JSON text storage pass stored text through (0 ms) but move ${fmt(jsonBytes / blobBytes)}x the bytes out of the database; the API caches decoded text per result (body-cache.ts).`);
      console.log(`  Load average ${loadavg()[0].toFixed(2)}.`);
    },
  };
}
