/**
 * The measured content of the scheme's boxes, fixed before the layout runs: a tile's lines
 * and size, a flow label's chips and size. The SVG component draws exactly these lines at
 * the offsets given here, so the layout and the drawing agree.
 */
import type { SchemeFlow, SchemeState } from './scheme-graph';
import { textWidth, wrapText, ellipsize } from './text-metrics';

/** Type sizes (px) and box metrics of the scheme, in one place. */
export const SCHEME_METRICS = Object.freeze({
  tileMinWidth: 150,
  tileMaxWidth: 196,
  tilePad: 8,
  bandHeight: 17,
  bandFont: 10,
  idFont: 14,
  idLine: 19,
  labelFont: 11.5,
  labelLine: 14,
  labelLines: 2,
  unitFont: 11,
  unitLine: 15,
  flowFont: 12,
  flowLine: 16,
  chipFont: 10.5,
  chipHeight: 16,
  chipGap: 3,
  chipPad: 5,
  /** Room for the wave mark inside a forcing chip. */
  waveWidth: 11,
  /** A flow label's chip rows: wide and low across horizontal arrows, narrow and tall on vertical ones. */
  labelShape: { RIGHT: { maxWidth: 210, rows: 1 }, DOWN: { maxWidth: 124, rows: 3 } }
});

/** How wide a flow label may be and how many rows of chips it may have. */
export interface LabelShape {
  maxWidth: number;
  rows: number;
}

const M = SCHEME_METRICS;

export interface TileContent {
  width: number;
  height: number;
  /** The zone name as written on the band. */
  band: string;
  id: string;
  /** Label lines (possibly none). */
  label: string[];
  unit: string;
}

/** The lines of a state's tile and the tile's size. */
export function tileContent(state: SchemeState, zoneName: string): TileContent {
  const inner = M.tileMaxWidth - 2 * M.tilePad;
  const band = ellipsizeIfWide(zoneName.toUpperCase(), M.bandFont, inner, true);
  const id = ellipsizeIfWide(state.id, M.idFont, inner, true);
  const label = state.label ? wrapText(state.label, M.labelFont, inner, M.labelLines) : [];
  const unit = ellipsizeIfWide(state.unit ? `in ${state.unit}` : 'no unit', M.unitFont, inner);
  const widest = Math.max(
    textWidth(band, M.bandFont, true) + 1.2 * band.length, // letter spacing of the band text
    textWidth(id, M.idFont, true),
    ...label.map((l) => textWidth(l, M.labelFont)),
    textWidth(unit, M.unitFont)
  );
  const width = Math.ceil(Math.min(M.tileMaxWidth, Math.max(M.tileMinWidth, widest + 2 * M.tilePad)));
  const height = M.bandHeight + 4 + M.idLine + label.length * M.labelLine + M.unitLine + M.tilePad;
  return { width, height, band, id, label, unit };
}

function ellipsizeIfWide(text: string, size: number, max: number, bold = false): string {
  return textWidth(text, size, bold) <= max ? text : ellipsize(text, size, max, bold);
}

export interface Chip {
  /** What it says: a driver's id, or `+N` for the drivers folded away. */
  text: string;
  kind: 'forcing' | 'parameter' | 'more';
  /** Driver ids it stands for (one, or the folded ones for `more`). */
  ids: string[];
  /** Offsets inside the label box. */
  x: number;
  y: number;
  width: number;
}

export interface FlowLabelContent {
  width: number;
  height: number;
  /** The flow id as written (shortened when very long). */
  text: string;
  chips: Chip[];
}

/**
 * The label of a flow: its id over rows of driver chips. Forcings (with a wave mark) and
 * parameters the rate reads directly get a chip each; parameters read only through derived
 * quantities, and whatever does not fit in the rows, fold into one `+N` chip. Every driver
 * is still named in the flow's details.
 */
export function flowLabel(flow: SchemeFlow, shape: LabelShape = M.labelShape.RIGHT): FlowLabelContent {
  const text = ellipsizeIfWide(flow.id, M.flowFont, shape.maxWidth, true);
  const isShown = (d: SchemeFlow['drivers'][number]) => d.kind === 'forcing' || d.direct;
  const shown = flow.drivers.filter(isShown);
  const folded = flow.drivers.filter((d) => !isShown(d)).map((d) => d.id);

  // Keep as many shown chips as fit in the rows together with the `+N` chip they leave.
  let chips: Chip[] | null = null;
  for (let keep = shown.length; chips === null; keep--) {
    const rest = [...shown.slice(keep).map((d) => d.id), ...folded];
    const wanted: Array<Pick<Chip, 'text' | 'kind' | 'ids'>> = shown
      .slice(0, keep)
      .map((d) => ({ text: d.id, kind: d.kind, ids: [d.id] }));
    if (rest.length > 0) wanted.push({ text: `+${rest.length}`, kind: 'more', ids: rest });
    chips = packChips(wanted, shape);
  }
  const rows = chips.length === 0 ? 0 : Math.max(...chips.map((c) => c.y)) / (M.chipHeight + M.chipGap) + 1;
  for (const c of chips) c.y += M.flowLine + 2;
  const width = Math.ceil(Math.max(textWidth(text, M.flowFont, true), ...chips.map((c) => c.x + c.width)));
  const height = M.flowLine + (rows ? 2 + rows * (M.chipHeight + M.chipGap) - M.chipGap : 0);
  return { width, height, text, chips };
}

function chipWidth(text: string, kind: Chip['kind']): number {
  return Math.ceil(textWidth(text, M.chipFont) + 2 * M.chipPad + (kind === 'forcing' ? M.waveWidth : 0));
}

/** Chips in rows no wider than the label (a lone chip may be wider), or null past the last row. */
function packChips(wanted: Array<Pick<Chip, 'text' | 'kind' | 'ids'>>, shape: LabelShape): Chip[] | null {
  const out: Chip[] = [];
  let row = 0;
  let x = 0;
  for (const c of wanted) {
    const width = chipWidth(c.text, c.kind);
    if (x > 0 && x + width > shape.maxWidth) {
      row += 1;
      x = 0;
    }
    if (row >= shape.rows) return null;
    out.push({ ...c, x, y: row * (M.chipHeight + M.chipGap), width });
    x += width + M.chipGap;
  }
  return out;
}
