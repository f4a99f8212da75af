/**
 * The `brinkmap/network-1` document as the editor reads and writes it (field names fixed by issue 3).
 * The document has no description field (the schema is strict): a model's description lives on the
 * model record, so the editor keeps it beside the document.
 * Kept structural here so the editor helpers do not depend on the validator's zod schema; the server's
 * validator stays the authority on what is valid.
 */
export interface NetworkNodeDoc {
  id: string;
  parameters?: Record<string, number>;
}

export interface NetworkLinkDoc {
  from: string;
  to: string;
  weight: number;
  twoWay?: boolean;
}

export interface NetworkDocument {
  format: 'brinkmap/network-1';
  name: string;
  element: { variable: string; rate: string; parameters: Record<string, number> };
  nodes: NetworkNodeDoc[];
  links: NetworkLinkDoc[];
  coupling: { parameter: string; value: number; term?: string };
  sweep: { parameter: string; from: number; to: number };
  start?: number[][];
}
