/**
 * Export of the scheme as one SVG file (the scheme, the readout strip beside it and the
 * legend below, each copied from the page with its styles written inline) or as a PNG at
 * twice the size. The arrangement and the file names are pure functions; the rest needs a
 * DOM (it runs in the page only).
 */

/** Gap between the parts of an export (px). */
export const EXPORT_GAP = 20;
/** Margin around an export (px). */
export const EXPORT_MARGIN = 16;
/** Pixel ratio of the PNG export. */
export const PNG_SCALE = 2;

/** `<modelId>-scheme.<ext>`, with anything but letters, digits, `_`, `-` and `.` turned into `_`. */
export function exportFileName(modelId: string, ext: 'svg' | 'png'): string {
  const safe = modelId.replace(/[^A-Za-z0-9_.-]/g, '_') || 'model';
  return `${safe}-scheme.${ext}`;
}

export interface Size {
  width: number;
  height: number;
}

export interface ExportArrangement {
  width: number;
  height: number;
  scheme: { x: number; y: number };
  readout: { x: number; y: number } | null;
  legend: { x: number; y: number } | null;
}

/** Where each part goes: the readout strip right of the scheme, the legend below both. */
export function arrangeExport(scheme: Size, readout: Size | null, legend: Size | null): ExportArrangement {
  const m = EXPORT_MARGIN;
  const top = { x: m, y: m };
  const readoutAt = readout ? { x: m + scheme.width + EXPORT_GAP, y: m } : null;
  const rowWidth = scheme.width + (readout ? EXPORT_GAP + readout.width : 0);
  const rowHeight = Math.max(scheme.height, readout?.height ?? 0);
  const legendAt = legend ? { x: m, y: m + rowHeight + EXPORT_GAP } : null;
  const width = Math.ceil(2 * m + Math.max(rowWidth, legend?.width ?? 0));
  const height = Math.ceil(2 * m + rowHeight + (legend ? EXPORT_GAP + legend.height : 0));
  return { width, height, scheme: top, readout: readoutAt, legend: legendAt };
}

const SVG_NS = 'http://www.w3.org/2000/svg';

/** Computed properties written inline on every copied element, so the file needs no stylesheet. */
const INLINE_PROPERTIES = [
  'fill',
  'fill-opacity',
  'stroke',
  'stroke-width',
  'stroke-opacity',
  'stroke-dasharray',
  'stroke-linecap',
  'stroke-linejoin',
  'opacity',
  'font-family',
  'font-size',
  'font-weight',
  'font-style',
  'letter-spacing'
] as const;

function copyWithStyles(live: Element): Element {
  const copy = live.cloneNode(true) as Element;
  const liveAll = [live, ...live.querySelectorAll('*')];
  const copyAll = [copy, ...copy.querySelectorAll('*')];
  liveAll.forEach((el, i) => {
    const target = copyAll[i];
    if (el.tagName.toLowerCase() === 'title') return;
    const cs = getComputedStyle(el);
    const style = INLINE_PROPERTIES.map((p) => `${p}:${cs.getPropertyValue(p)}`).join(';');
    target.setAttribute('style', style);
  });
  // What only the screen needs: focus marks, links, test and data hooks.
  for (const el of copy.querySelectorAll('[data-interactive]')) el.remove();
  for (const a of [...copy.querySelectorAll('a')]) {
    const g = copy.ownerDocument.createElementNS(SVG_NS, 'g');
    while (a.firstChild) g.appendChild(a.firstChild);
    a.replaceWith(g);
  }
  for (const el of [copy, ...copy.querySelectorAll('*')]) {
    for (const attr of [...el.attributes]) {
      if (attr.name.startsWith('data-') || attr.name === 'tabindex' || attr.name.startsWith('on')) el.removeAttribute(attr.name);
    }
  }
  return copy;
}

export interface ExportParts {
  scheme: SVGSVGElement;
  readout?: SVGSVGElement | null;
  legend?: SVGSVGElement | null;
  /** The file's <title>. */
  title: string;
}

function sizeOf(svg: SVGSVGElement): Size {
  const vb = svg.viewBox.baseVal;
  return { width: vb.width, height: vb.height };
}

/** The scheme, readout strip and legend as one standalone SVG document (text). */
export function serializeScheme(parts: ExportParts): string {
  const readout = parts.readout ?? null;
  const legend = parts.legend ?? null;
  const at = arrangeExport(sizeOf(parts.scheme), readout && sizeOf(readout), legend && sizeOf(legend));
  const doc = document.implementation.createDocument(SVG_NS, 'svg', null);
  const root = doc.documentElement;
  root.setAttribute('xmlns', SVG_NS);
  root.setAttribute('width', String(at.width));
  root.setAttribute('height', String(at.height));
  root.setAttribute('viewBox', `0 0 ${at.width} ${at.height}`);
  const title = doc.createElementNS(SVG_NS, 'title');
  title.textContent = parts.title;
  root.appendChild(title);
  const paper = doc.createElementNS(SVG_NS, 'rect');
  for (const [k, v] of Object.entries({ x: 0, y: 0, width: at.width, height: at.height, fill: '#ffffff' })) paper.setAttribute(k, String(v));
  root.appendChild(paper);
  const place = (svg: SVGSVGElement, pos: { x: number; y: number }) => {
    const copy = doc.importNode(copyWithStyles(svg), true) as Element;
    const size = sizeOf(svg);
    copy.setAttribute('x', String(pos.x));
    copy.setAttribute('y', String(pos.y));
    copy.setAttribute('width', String(size.width));
    copy.setAttribute('height', String(size.height));
    copy.removeAttribute('role');
    copy.removeAttribute('aria-label');
    copy.removeAttribute('aria-labelledby');
    root.appendChild(copy);
  };
  place(parts.scheme, at.scheme);
  if (readout && at.readout) place(readout, at.readout);
  if (legend && at.legend) place(legend, at.legend);
  return `<?xml version="1.0" encoding="UTF-8"?>\n${new XMLSerializer().serializeToString(doc)}`;
}

/** Draws an SVG document into a canvas at PNG_SCALE and returns the PNG. */
export async function svgToPng(svgText: string): Promise<Blob> {
  const m = /<svg[^>]*\swidth="([\d.]+)"[^>]*\sheight="([\d.]+)"/.exec(svgText);
  if (!m) throw new Error('the SVG has no width and height');
  const width = Number(m[1]);
  const height = Number(m[2]);
  const url = URL.createObjectURL(new Blob([svgText], { type: 'image/svg+xml' }));
  try {
    const img = new Image();
    img.decoding = 'sync';
    await new Promise<void>((resolve, reject) => {
      img.onload = () => resolve();
      img.onerror = () => reject(new Error('the browser could not draw the SVG'));
      img.src = url;
    });
    const canvas = document.createElement('canvas');
    canvas.width = Math.ceil(width * PNG_SCALE);
    canvas.height = Math.ceil(height * PNG_SCALE);
    const ctx = canvas.getContext('2d');
    if (!ctx) throw new Error('this browser offers no 2D canvas');
    ctx.scale(PNG_SCALE, PNG_SCALE);
    ctx.fillStyle = '#ffffff';
    ctx.fillRect(0, 0, width, height);
    ctx.drawImage(img, 0, 0, width, height);
    return await new Promise<Blob>((resolve, reject) =>
      canvas.toBlob((b) => (b ? resolve(b) : reject(new Error('the canvas could not be encoded as PNG'))), 'image/png')
    );
  } finally {
    URL.revokeObjectURL(url);
  }
}

/** Offers `blob` as a download named `fileName`. */
export function download(blob: Blob, fileName: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = fileName;
  a.rel = 'noopener';
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
