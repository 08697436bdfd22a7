import { describe, expect, it } from 'vitest';
import { RUN_PALETTE } from '../chart-config';
import { EXTRA_ZONE_COLOURS, ZONE_COLOURS, zoneColours } from './zone-palette';
import { SCHEME_INK } from './scheme-ink';

function rgb(hex: string): [number, number, number] {
  const n = Number.parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}
/** Hue in degrees (HSL), or null for a grey. */
function hue(hex: string): number | null {
  const [r, g, b] = rgb(hex).map((v) => v / 255);
  const max = Math.max(r, g, b);
  const min = Math.min(r, g, b);
  const d = max - min;
  if (d < 0.02) return null;
  const h = max === r ? ((g - b) / d) % 6 : max === g ? (b - r) / d + 2 : (r - g) / d + 4;
  return (h * 60 + 360) % 360;
}
/** WCAG 2 contrast ratio. */
function contrast(a: string, b: string): number {
  const lum = (hex: string) => {
    const [r, g, b2] = rgb(hex).map((v) => {
      const c = v / 255;
      return c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
    });
    return 0.2126 * r + 0.7152 * g + 0.0722 * b2;
  };
  const [x, y] = [lum(a), lum(b)].sort((p, q) => q - p);
  return (x + 0.05) / (y + 0.05);
}
const hueGap = (a: number, b: number) => Math.min(Math.abs(a - b), 360 - Math.abs(a - b));

const all = [...Object.values(ZONE_COLOURS), ...EXTRA_ZONE_COLOURS];
const runHues = RUN_PALETTE.map(hue).filter((h): h is number => h !== null);

describe('zone colours', () => {
  it('reuse no hue of the run palette (at least 12° away from each)', () => {
    for (const c of all)
      for (const shade of [c.band, c.edge]) {
        const h = hue(shade);
        if (h === null) continue;
        for (const r of runHues) expect(hueGap(h, r), `${shade} vs run hue ${r.toFixed(0)}`).toBeGreaterThanOrEqual(12);
      }
  });

  it('keep the ink readable on every band and ground, and every border visible on white', () => {
    for (const c of all) {
      expect(contrast(SCHEME_INK.text, c.band)).toBeGreaterThanOrEqual(4.5);
      expect(contrast(SCHEME_INK.text, c.wash)).toBeGreaterThanOrEqual(4.5);
      expect(contrast(c.edge, '#ffffff')).toBeGreaterThanOrEqual(3);
    }
  });

  it('give the named zones hues of their own', () => {
    const named = ['water', 'sediment', 'plants', 'biota'].map((k) => hue(ZONE_COLOURS[k].band)!);
    for (let i = 0; i < named.length; i++) for (let j = i + 1; j < named.length; j++) expect(hueGap(named[i], named[j])).toBeGreaterThan(30);
  });
});

describe('zoneColours(keys)', () => {
  it('takes the named colours for known zones and the extra ones in turn for the others', () => {
    const c = zoneColours(['water', 'littoral', 'benthos', 'water', '']);
    expect(c.water).toBe(ZONE_COLOURS.water);
    expect(c.littoral).toBe(EXTRA_ZONE_COLOURS[0]);
    expect(c.benthos).toBe(EXTRA_ZONE_COLOURS[1]);
    expect(c['']).toBe(ZONE_COLOURS['']);
  });
  it('repeats the extra colours when there are more zones than colours, and takes `constructor` as a plain word', () => {
    const keys = ['constructor', ...Array.from({ length: EXTRA_ZONE_COLOURS.length }, (_, i) => `z${i}`)];
    const c = zoneColours(keys);
    expect(c.constructor).toBe(EXTRA_ZONE_COLOURS[0]);
    expect(c[`z${EXTRA_ZONE_COLOURS.length - 1}`]).toBe(EXTRA_ZONE_COLOURS[0]);
  });
});
