/**
 * Text widths without a DOM, so that tile and label sizes can be fixed before the layout
 * runs (in the page and in Node tests alike). The tables are the advance widths, in em, of
 * DejaVu Sans and DejaVu Sans Bold for the printable ASCII characters (32 to 126), measured
 * with a canvas; DejaVu is the widest face in the page's font stack, so text set in any of
 * the others fits the boxes sized here. Other characters count as 0.7 em.
 */

// prettier-ignore
const REGULAR = [0.32,0.4,0.46,0.84,0.64,0.95,0.78,0.27,0.39,0.39,0.5,0.84,0.32,0.36,0.32,0.34,0.64,0.64,0.64,0.64,0.64,0.64,0.64,0.64,0.64,0.64,0.34,0.34,0.84,0.84,0.84,0.53,1,0.68,0.69,0.7,0.77,0.63,0.58,0.77,0.75,0.29,0.29,0.66,0.56,0.86,0.75,0.79,0.6,0.79,0.69,0.63,0.61,0.73,0.68,0.99,0.69,0.61,0.69,0.39,0.34,0.39,0.84,0.5,0.5,0.61,0.63,0.55,0.63,0.62,0.35,0.63,0.63,0.28,0.28,0.58,0.28,0.97,0.63,0.61,0.63,0.63,0.41,0.52,0.39,0.63,0.59,0.82,0.59,0.59,0.52,0.64,0.34,0.64,0.84];
// prettier-ignore
const BOLD = [0.35,0.46,0.52,0.84,0.7,1,0.87,0.31,0.46,0.46,0.52,0.84,0.38,0.42,0.38,0.37,0.7,0.7,0.7,0.7,0.7,0.7,0.7,0.7,0.7,0.7,0.4,0.4,0.84,0.84,0.84,0.58,1,0.77,0.76,0.73,0.83,0.68,0.68,0.82,0.84,0.37,0.37,0.77,0.64,1,0.84,0.85,0.73,0.85,0.77,0.72,0.68,0.81,0.77,1.1,0.77,0.72,0.73,0.46,0.37,0.46,0.84,0.5,0.5,0.67,0.72,0.59,0.72,0.68,0.44,0.72,0.71,0.34,0.34,0.67,0.34,1.04,0.71,0.69,0.72,0.72,0.49,0.6,0.48,0.71,0.65,0.92,0.65,0.65,0.58,0.71,0.37,0.71,0.84];

const OTHER = 0.7;

/** The font stack every scheme text is set in (the page's own, written out for exports). */
export const SCHEME_FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'DejaVu Sans', sans-serif";

/** Width in px of `text` set at `size` px, regular or bold. */
export function textWidth(text: string, size: number, bold = false): number {
  const table = bold ? BOLD : REGULAR;
  let em = 0;
  for (const ch of text) {
    const code = ch.codePointAt(0)!;
    em += code >= 32 && code <= 126 ? table[code - 32] : OTHER;
  }
  return em * size;
}

/**
 * Breaks `text` into lines no wider than `maxWidth` at spaces, at most `maxLines` of them;
 * a longer text ends its last line with an ellipsis. A single word wider than the box is
 * cut with an ellipsis too. Returns at least one line (possibly empty).
 */
export function wrapText(text: string, size: number, maxWidth: number, maxLines = 2, bold = false): string[] {
  const words = text.trim().split(/\s+/).filter(Boolean);
  const lines: string[] = [];
  let line = '';
  let i = 0;
  for (; i < words.length; i++) {
    const next = line ? `${line} ${words[i]}` : words[i];
    if (textWidth(next, size, bold) <= maxWidth) {
      line = next;
      continue;
    }
    if (line) {
      lines.push(line);
      if (lines.length === maxLines) break;
    }
    line = words[i];
  }
  if (lines.length < maxLines) {
    lines.push(line);
    i = words.length;
  }
  const cut = i < words.length;
  return lines.map((l, k) => {
    const last = k === lines.length - 1;
    if (textWidth(l, size, bold) > maxWidth || (last && cut)) return ellipsize(l, size, maxWidth, bold);
    return l;
  });
}

/** `text` shortened with a trailing ellipsis until it fits `maxWidth`. */
export function ellipsize(text: string, size: number, maxWidth: number, bold = false): string {
  const chars = Array.from(text);
  while (chars.length > 0 && textWidth(chars.join('') + '…', size, bold) > maxWidth) chars.pop();
  return chars.join('').trimEnd() + '…';
}
