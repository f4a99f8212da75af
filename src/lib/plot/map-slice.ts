/**
 * The model document at one value of the map's second parameter: a copy with that parameter set
 * (network: the coupling value or the element default; ode: the parameter), for tracing the
 * one-parameter diagram at a value picked on the map. Node overrides are left alone (the map varies
 * the element default on the nodes that do not override it, docs/maps.md §1). Pure; the input is not
 * changed. Returns null when the document has no such parameter.
 */
export function documentAtSecond(document: unknown, name: string, value: number): Record<string, unknown> | null {
  if (!Number.isFinite(value) || !document || typeof document !== 'object') return null;
  const d = structuredClone(document) as {
    format?: string; parameters?: Record<string, number>; element?: { parameters?: Record<string, number> }; coupling?: { parameter?: string; value?: number };
  } & Record<string, unknown>;
  if (d.format === 'brinkmap/network-1') {
    if (d.coupling?.parameter === name) { d.coupling.value = value; return d; }
    if (d.element?.parameters && Object.hasOwn(d.element.parameters, name)) { d.element.parameters[name] = value; return d; }
    return null;
  }
  if (d.parameters && Object.hasOwn(d.parameters, name)) { d.parameters[name] = value; return d; }
  return null;
}

/**
 * A clicked value of the second parameter rounded to a step of about 1/1000 of the map's range (a
 * power of ten), inside the range: clicks a pixel apart ask for the same slice, so the cached run is
 * found again, and the label reads as typed. (The step is common practice, no source.)
 */
export function snapSecond(value: number, range: readonly number[]): number {
  const lo = Math.min(range[0], range[1]), hi = Math.max(range[0], range[1]);
  const width = hi - lo;
  if (!Number.isFinite(value) || !(width > 0)) return value;
  const step = 10 ** Math.floor(Math.log10(width / 1000));
  const snapped = Number((Math.round(value / step) * step).toPrecision(12));
  return Math.min(hi, Math.max(lo, snapped));
}
