import type { Diagram } from '../../lib/atlas/types';
import type { Provenance } from '../../lib/plot/provenance';
import type { BandTag, EscapeGraph, RegimeBand } from '../../lib/regimes/types';
import type { VersionStudy } from './band-studies';

/** Props of the diagram island. Everything but onAddTag is plain JSON, so Astro can pass it. */
export interface DiagramViewProps {
  readonly diagram: Diagram;
  readonly regimes?: RegimeBand[];
  readonly escapeGraphs?: EscapeGraph[];
  readonly tags?: BandTag[];
  /** Per-node thresholds (the uncoupled unstable equilibria); enables the "number of tipped nodes" projection. */
  readonly thresholds?: number[];
  readonly provenance: Provenance;
  /** URL of the model document of exactly this version (GET …/versions/:n/export), for the figure bundle. */
  readonly documentUrl?: string;
  /** Shows the tag form in the band panel (modelers). */
  readonly canTag?: boolean;
  /** Called with a new tag; reject to show the error in the form. Only usable from React parents. */
  readonly onAddTag?: (tag: BandTag) => Promise<void> | void;
  /** Alternative to onAddTag for Astro pages: the tag is POSTed as JSON to this URL. */
  readonly tagEndpoint?: string;
  /** Height of the plot in CSS pixels (default 420). */
  readonly height?: number;
  /** Initial projection key: "node:0", "mean", "tipped", "norm". */
  readonly initialProjection?: string;
  /** Shown above the plot. */
  readonly title?: string;
  /** Finished escape studies of the same model version (newest first): the band panel links each and shows its prediction inside the band. */
  readonly escapeStudies?: VersionStudy[];
}

export type Selection =
  | { readonly kind: 'point'; readonly branch: number; readonly index: number }
  | { readonly kind: 'special'; readonly id: string }
  | { readonly kind: 'band'; readonly index: number }
  /** An unlabelled stretch (unlabelledInRun's list, in order). */
  | { readonly kind: 'gap'; readonly index: number }
  /** A tag on any parameter range (starts as the visible range). */
  | { readonly kind: 'range'; readonly from: number; readonly to: number }
  | null;
