/**
 * The parameters a map can vary as its second one, with their document values: a network's coupling
 * parameter and element parameters (not one that every node overrides), an ode document's
 * parameters; never the swept one. The same rules as compileTwoParameter's check of `second`
 * (src/lib/maps/two-parameter-system.ts), so the form offers nothing the server refuses. Pure.
 */
export interface MapParameterChoice { readonly name: string; readonly value: number }

export function mapParameterChoices(document: unknown): { swept: string; parameters: MapParameterChoice[] } {
  const d = document as {
    format?: string; sweep?: { parameter?: string }; parameters?: Record<string, number>;
    element?: { parameters?: Record<string, number> }; coupling?: { parameter?: string; value?: number }; nodes?: { parameters?: Record<string, number> }[];
  } | null;
  const swept = d?.sweep?.parameter ?? '';
  const out: MapParameterChoice[] = [];
  if (d?.format === 'brinkmap/network-1') {
    if (d.coupling?.parameter && d.coupling.parameter !== swept) out.push({ name: d.coupling.parameter, value: d.coupling.value ?? 0 });
    for (const [name, value] of Object.entries(d.element?.parameters ?? {})) {
      if (name === swept) continue;
      if ((d.nodes ?? []).length > 0 && (d.nodes ?? []).every((n) => n.parameters && Object.hasOwn(n.parameters, name))) continue;
      out.push({ name, value });
    }
  } else {
    for (const [name, value] of Object.entries(d?.parameters ?? {})) if (name !== swept) out.push({ name, value });
  }
  return { swept, parameters: out };
}
