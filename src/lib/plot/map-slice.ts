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
