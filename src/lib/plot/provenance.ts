/** Where a figure came from: printed in the footer of every export and in the data files. */
export interface Provenance {
  readonly modelName: string;
  readonly versionHash: string;
  readonly runId: string;
  readonly engineVersion: string;
  /** ISO 8601 date-time of the export (or of the run, when the caller prefers). */
  readonly date: string;
  /** A parameter overridden for this run only (src/lib/plot/run-override.ts, e.g. "r = 0.42 overridden (slice of map run 12)"). */
  readonly override?: string | null;
}

/** One line of provenance, as printed under exported figures. */
export function provenanceLine(p: Provenance): string {
  const hash = p.versionHash.length > 12 ? p.versionHash.slice(0, 12) : p.versionHash;
  return `Model ${p.modelName} · version ${hash}${p.override ? ` with ${p.override}` : ''} · run ${p.runId} · engine ${p.engineVersion} · ${p.date}`;
}

export const INDICATIVE_NOTE = 'Model results are indicative; defer to domain experts and local regulation.';
