/**
 * Chart pictures for download (DOM only): a chart's PNG with a title above and a key of
 * its lines below, drawn on a canvas of its own, so the file says what it shows without
 * the page around it.
 */
export interface PictureKeyItem {
  label: string;
  colour: string;
  dash: readonly number[];
}

export interface PictureText {
  title: string;
  /** Lines drawn in the key, one a row. */
  items: PictureKeyItem[];
  /** Small print under the key (window, target, source). */
  note?: string;
}

const FONT = 'system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif';

function loadImage(url: string): Promise<HTMLImageElement> {
  return new Promise((resolve, reject) => {
    const img = new Image();
    img.onload = () => resolve(img);
    img.onerror = () => reject(new Error('the chart picture could not be read'));
    img.src = url;
  });
}

/** The chart picture with its title, key and note, as a PNG data URL. */
export async function composeChartPicture(chartUrl: string, text: PictureText): Promise<string> {
  const img = await loadImage(chartUrl);
  // The chart's picture is at the screen's pixel ratio; the text is drawn to match it.
  const scale = Math.max(1, Math.round(window.devicePixelRatio || 1));
  const pad = 12 * scale;
  const row = 18 * scale;
  const width = img.width + 2 * pad;
  const height = pad + row * 1.4 + img.height + pad / 2 + row * text.items.length + (text.note ? row : 0) + pad;
  const canvas = document.createElement('canvas');
  canvas.width = width;
  canvas.height = Math.ceil(height);
  const ctx = canvas.getContext('2d');
  if (!ctx) return chartUrl;
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.fillStyle = '#1d2125';
  ctx.textBaseline = 'middle';
  ctx.font = `600 ${14 * scale}px ${FONT}`;
  let y = pad + row * 0.6;
  ctx.fillText(text.title, pad, y);
  y += row * 0.8;
  ctx.drawImage(img, pad, y);
  y += img.height + pad / 2;
  ctx.font = `${12 * scale}px ${FONT}`;
  for (const item of text.items) {
    const cy = y + row / 2;
    ctx.save();
    ctx.strokeStyle = item.colour;
    ctx.lineWidth = 2.5 * scale;
    ctx.setLineDash(item.dash.map((d) => d * scale));
    ctx.beginPath();
    ctx.moveTo(pad, cy);
    ctx.lineTo(pad + 34 * scale, cy);
    ctx.stroke();
    ctx.restore();
    ctx.fillStyle = '#1d2125';
    ctx.fillText(item.label, pad + 42 * scale, cy);
    y += row;
  }
  if (text.note) {
    ctx.fillStyle = '#50575e';
    ctx.fillText(text.note, pad, y + row / 2);
  }
  return canvas.toDataURL('image/png');
}

/** Hands a data URL (a chart's PNG) to the browser as a file download. */
export function downloadDataUrl(fileName: string, dataUrl: string): void {
  const a = document.createElement('a');
  a.href = dataUrl;
  a.download = fileName.replace(/[^A-Za-z0-9_.-]+/g, '_');
  a.style.display = 'none';
  document.body.append(a);
  a.click();
  a.remove();
}
