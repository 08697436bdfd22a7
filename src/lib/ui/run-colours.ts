/**
 * One colour and one dash pattern per run, the same in every chart, table key and legend
 * of the comparison.
 *
 * The palette is Okabe & Ito's colour-blind-safe set (Okabe, M. & Ito, K. 2008, "Color
 * Universal Design (CUD): how to make figures and presentations that are friendly to
 * colorblind people", J*FLY web page; first published 2002): eight colours that readers
 * with any of the common colour-vision deficiencies can tell apart. Yellow comes last (it
 * is hard to see on white) and every run also gets its own dash pattern, so that no run
 * is told from another by colour alone (legends and tables name the run in words too).
 */

/** Okabe & Ito (2008), in the order runs take it. */
export const OKABE_ITO = Object.freeze([
  { name: 'blue', hex: '#0072B2' },
  { name: 'vermillion', hex: '#D55E00' },
  { name: 'bluish green', hex: '#009E73' },
  { name: 'reddish purple', hex: '#CC79A7' },
  { name: 'orange', hex: '#E69F00' },
  { name: 'sky blue', hex: '#56B4E9' },
  { name: 'black', hex: '#000000' },
  { name: 'yellow', hex: '#F0E442' }
]);

/** Dash patterns (Chart.js `borderDash`, px on, px off): solid first, then ever more broken. */
export const RUN_DASHES: ReadonlyArray<readonly number[]> = Object.freeze([
  [],
  [8, 4],
  [2, 3],
  [12, 3, 2, 3],
  [4, 4],
  [12, 6],
  [2, 6],
  [8, 3, 2, 3, 2, 3]
]);

export interface RunStyle {
  /** Hex colour. */
  colour: string;
  /** The colour's name, for words beside it. */
  colourName: string;
  dash: readonly number[];
  /** Position in the comparison, 0-based. */
  index: number;
}

/** The reference run's style: black, solid, so every other run reads against it. */
export const BASELINE_STYLE = Object.freeze({ colour: '#000000', colourName: 'black', dash: Object.freeze([]) as readonly number[] });

/**
 * The style of each run, by its position in `runIds` (the order of the selection), so a
 * run keeps its colour while the selection stays the same. Duplicates take the first
 * position. The baseline, when named, is black and solid; the others take the palette
 * without black, in order, each with its own dash. Past the palette, colours repeat with
 * the dash patterns shifted, so no two runs share both colour and dash.
 */
export function runStyles(runIds: readonly string[], baselineId: string | null = null): Map<string, RunStyle> {
  const out = new Map<string, RunStyle>();
  const palette = baselineId === null ? OKABE_ITO : OKABE_ITO.filter((c) => c.hex !== BASELINE_STYLE.colour);
  let i = 0;
  let index = 0;
  for (const id of runIds) {
    if (out.has(id)) continue;
    if (id === baselineId) {
      out.set(id, { ...BASELINE_STYLE, index: index++ });
      continue;
    }
    const c = palette[i % palette.length];
    const round = Math.floor(i / palette.length);
    // dash 0 (solid) belongs to the baseline when there is one
    const dashes = baselineId === null ? RUN_DASHES : RUN_DASHES.slice(1);
    out.set(id, { colour: c.hex, colourName: c.name, dash: dashes[(i + round) % dashes.length], index: index++ });
    i += 1;
  }
  return out;
}
