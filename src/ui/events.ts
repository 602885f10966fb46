/**
 * The events the sheet's components send up. Components only report what the
 * user did; the sheet forwards each event to its controller.
 */
import type { SpecEdit } from './spec-draft.ts';

/** How results leave the sheet: the results document, a flat table, or the standalone report. */
export type ResultsFormat = 'json' | 'csv' | 'html';

export interface SheetEventDetails {
  'ff-edit': SpecEdit;
  'ff-preset': { id: string };
  'ff-file': { name: string; text: string };
  'ff-presenter': null;
  'ff-dismiss': null;
  'ff-run': null;
  'ff-cancel': null;
  'ff-again': null;
  'ff-show-problems': null;
  'ff-forget': null;
  'ff-workers': { count: number };
  'ff-copy-link': null;
  'ff-export-results': { format: ResultsFormat };
  /** Download the trained network of the run with this index (weights manifest + shard). */
  'ff-download-network': { index: number };
  'ff-export-figure': { name: string; format: 'svg' | 'png'; svg: SVGSVGElement };
  'ff-log-scale': { on: boolean };
}

export type SheetEventName = keyof SheetEventDetails;

declare global {
  interface HTMLElementEventMap {
    'ff-edit': CustomEvent<SpecEdit>;
    'ff-preset': CustomEvent<{ id: string }>;
    'ff-file': CustomEvent<{ name: string; text: string }>;
    'ff-presenter': CustomEvent<null>;
    'ff-dismiss': CustomEvent<null>;
    'ff-run': CustomEvent<null>;
    'ff-cancel': CustomEvent<null>;
    'ff-again': CustomEvent<null>;
    'ff-show-problems': CustomEvent<null>;
    'ff-forget': CustomEvent<null>;
    'ff-workers': CustomEvent<{ count: number }>;
    'ff-copy-link': CustomEvent<null>;
    'ff-export-results': CustomEvent<{ format: ResultsFormat }>;
    'ff-download-network': CustomEvent<{ index: number }>;
    'ff-export-figure': CustomEvent<{ name: string; format: 'svg' | 'png'; svg: SVGSVGElement }>;
    'ff-log-scale': CustomEvent<{ on: boolean }>;
  }
}

/** Send an event up through shadow roots. */
export function emit<K extends SheetEventName>(from: HTMLElement, name: K, detail: SheetEventDetails[K]): void {
  from.dispatchEvent(new CustomEvent(name, { detail, bubbles: true, composed: true }));
}
