/**
 * The legend: every mark of the scheme with what it means, in columns that fit the width
 * given. Pure: entries and their positions; SchemeLegend.svelte draws each entry's glyph.
 */
import type { SchemeGraph } from './scheme-graph';
import { FLOW_WIDTHS, widthForMass } from './flow-widths';
import { formatMass } from './scheme-words';
import { wrapText } from './text-metrics';

export const LEGEND_METRICS = Object.freeze({
  headHeight: 26,
  glyphWidth: 64,
  rowMin: 30,
  font: 12,
  line: 15,
  colMinWidth: 290,
  colGap: 16,
  rowGap: 8
});

const L = LEGEND_METRICS;

export type LegendGlyph =
  | { kind: 'zone'; zone: string }
  | { kind: 'tile' }
  | { kind: 'spark' }
  | { kind: 'untracked' }
  | { kind: 'flow'; widths: number[] }
  | { kind: 'boundary' }
  | { kind: 'chip'; chip: 'forcing' | 'parameter' | 'more' }
  | { kind: 'readout' };

export interface LegendEntry {
  key: string;
  glyph: LegendGlyph;
  text: string;
}

export interface LegendItem extends LegendEntry {
  x: number;
  y: number;
  width: number;
  height: number;
  lines: string[];
}

export interface LegendLayout {
  width: number;
  height: number;
  heading: string;
  items: LegendItem[];
}

/** What the legend says for `graph`; `masses` (conserved unit per year) after a run. */
export function legendEntries(graph: SchemeGraph, masses: Record<string, number> | null): LegendEntry[] {
  const element = graph.conserved?.element ?? 'mass';
  const unit = graph.conserved ? `${graph.conserved.unit} ${graph.conserved.element}/yr` : 'per year';
  const out: LegendEntry[] = graph.zones.map((z) => ({
    key: `zone:${z.key}`,
    glyph: { kind: 'zone', zone: z.key },
    text: z.key === '' ? 'compartments the model puts in no zone' : `zone "${z.name}": the band of its compartments and their ground`
  }));
  out.push({ key: 'tile', glyph: { kind: 'tile' }, text: 'a compartment: zone, id, label and unit; opens it in Build' });
  if (masses) {
    out.push({ key: 'spark', glyph: { kind: 'spark' }, text: "line in a tile's band: its yearly mean over the run, between its smallest and largest value" });
  }
  if (graph.nodes.some((n) => !n.conserved)) {
    out.push({ key: 'untracked', glyph: { kind: 'untracked' }, text: 'dashed border: kept out of the mass inventory' });
  }
  const values = masses ? Object.values(masses).map(Math.abs).filter((v) => v > 0 && Number.isFinite(v)) : [];
  if (values.length > 0) {
    const largest = Math.max(...values);
    const samples = [largest, largest / 100, largest / 10 ** FLOW_WIDTHS.decades];
    out.push({
      key: 'flow',
      glyph: { kind: 'flow', widths: samples.map((m) => widthForMass(m, largest)) },
      text:
        `a flow of ${element}; its width is the mean annual mass, on a log scale: ` +
        `${formatMass(samples[0])}, ${formatMass(samples[1])} and ${formatMass(samples[2])} ${unit} or less`
    });
  } else {
    out.push({
      key: 'flow',
      glyph: { kind: 'flow', widths: [FLOW_WIDTHS.even] },
      text: `a flow of ${element}, labelled with its id; all of one width until annual masses are shown`
    });
  }
  out.push({ key: 'boundary', glyph: { kind: 'boundary' }, text: "a flow across the lake's boundary (ring on the frame): an import or an export" });
  out.push({ key: 'forcing', glyph: { kind: 'chip', chip: 'forcing' }, text: 'chip with a wave: a forcing the rate reads (directly or through derived quantities)' });
  out.push({ key: 'parameter', glyph: { kind: 'chip', chip: 'parameter' }, text: 'chip: a parameter the rate reads directly' });
  out.push({
    key: 'more',
    glyph: { kind: 'chip', chip: 'more' },
    text: 'dashed chip: that many more parameters, read through derived quantities; the flow\'s details name them'
  });
  if (graph.reported.length > 0) {
    out.push({ key: 'readout', glyph: { kind: 'readout' }, text: 'a reported quantity in the readout strip; its formula on hover or focus' });
  }
  return out;
}

/** Entries in as many columns of at least LEGEND_METRICS.colMinWidth as `width` holds. */
export function legendLayout(entries: readonly LegendEntry[], width: number): LegendLayout {
  const cols = Math.max(1, Math.floor((width + L.colGap) / (L.colMinWidth + L.colGap)));
  const colWidth = (width - (cols - 1) * L.colGap) / cols;
  const perCol = Math.ceil(entries.length / cols);
  const items: LegendItem[] = [];
  let height: number = L.headHeight;
  for (let c = 0; c < cols; c++) {
    let y: number = L.headHeight;
    for (const e of entries.slice(c * perCol, (c + 1) * perCol)) {
      const lines = wrapText(e.text, L.font, colWidth - L.glyphWidth - 8, 4);
      const h = Math.max(L.rowMin, lines.length * L.line + 6);
      items.push({ ...e, x: c * (colWidth + L.colGap), y, width: colWidth, height: h, lines });
      y += h + L.rowGap;
    }
    height = Math.max(height, y - L.rowGap);
  }
  return { width, height: Math.ceil(height + 2), heading: 'Legend', items };
}
