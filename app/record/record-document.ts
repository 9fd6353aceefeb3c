/**
 * A record laid out as a sequence of blocks (headings, key–value lists, tables,
 * plots…). HTML and PDF render these same blocks, so both show the same content
 * in the same order; only the drawing differs.
 */
import type { PlotSpec } from './plot-spec';

export type Block =
  | { kind: 'heading'; text: string }
  | { kind: 'paragraph'; text: string; emphasis?: 'warning' | 'normal' }
  | { kind: 'keyValues'; rows: Array<[string, string]> }
  | { kind: 'table'; caption?: string; columns: string[]; rows: string[][]; alignRight?: boolean[] }
  | { kind: 'plot'; spec: PlotSpec }
  | { kind: 'list'; items: string[] }
  | { kind: 'verdict'; pass: boolean | null; headline: string; reasons: string[] }
  | { kind: 'code'; caption: string; text: string };

export interface RecordDocument {
  title: string;
  /** Shown under the title, e.g. "Simulated bench" warnings. */
  banner: string | null;
  blocks: Block[];
  footer: string;
}
