import { notFound } from './service-error.ts';

/** A positive integer id from the path; anything else is "not found" (never a 500). */
export function idParam(value: string | undefined, what: string): number {
  if (!value || !/^[1-9][0-9]{0,9}$/.test(value)) throw notFound(what);
  return Number(value);
}

/** Query string as a plain object (first value per key), for a strict zod schema. */
export function queryObject(url: URL): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of url.searchParams) if (!(k in out)) out[k] = v;
  // ?workspace= selects the active workspace in the middleware; it is not a filter.
  delete out.workspace;
  return out;
}
