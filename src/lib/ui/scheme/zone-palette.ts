/**
 * The zones' colours: light tints for a tile's band and a zone's ground, a darker shade of
 * the same hue for borders. None reuses a hue of the run palette (Okabe & Ito: vermillion
 * 24°, orange 41°, yellow 56°, bluish green 164°, blue and sky blue 202°, reddish purple
 * 327°), so a zone is never mistaken for a run. Text on every tint is the page's ink, far
 * above 4.5:1; every border is above 3:1 on white. A zone's name is always written beside
 * its colour, so the colour never carries the meaning alone.
 */

export interface ZoneColours {
  /** Fill of a tile's band (hue in degrees noted beside each). */
  band: string;
  /** Tile border and zone outline. */
  edge: string;
  /** Ground of the zone's group. */
  wash: string;
}

/** Colours of the zone words the documents name, and of states without a zone. */
export const ZONE_COLOURS: Readonly<Record<string, ZoneColours>> = Object.freeze({
  water: { band: '#c8cef0', edge: '#4b58a8', wash: '#f3f4fc' }, // periwinkle, 231°
  sediment: { band: '#d3dbb0', edge: '#677536', wash: '#f7f8f0' }, // olive, 71–73°
  plants: { band: '#bfe3bf', edge: '#3d7a3d', wash: '#f2f9f2' }, // leaf green, 120°
  biota: { band: '#dccbee', edge: '#6e4a96', wash: '#f8f4fc' }, // violet, 269°
  '': { band: '#dcdcdc', edge: '#636363', wash: '#f6f6f6' } // neutral grey: no zone
});

/** Colours for the user's own zone words, taken in turn (then repeated; the name tells them apart). */
export const EXTRA_ZONE_COLOURS: readonly ZoneColours[] = Object.freeze([
  { band: '#c4e2e4', edge: '#2f6f73', wash: '#f1f8f8' }, // grey teal, 184°
  { band: '#f2ccd6', edge: '#93435a', wash: '#fcf3f5' }, // rose, 344°
  { band: '#d6d0ee', edge: '#524a8c', wash: '#f5f4fb' }, // slate violet, 250°
  { band: '#cfe6bb', edge: '#4f7a2e', wash: '#f4f9f0' } // moss, 93°
]);

/**
 * Colours for each zone key, in the order given: named zones get their own, the others
 * take EXTRA_ZONE_COLOURS in turn.
 */
export function zoneColours(keys: readonly string[]): Record<string, ZoneColours> {
  const out: Record<string, ZoneColours> = Object.create(null);
  let extra = 0;
  for (const key of keys) {
    if (key in out) continue;
    out[key] = Object.hasOwn(ZONE_COLOURS, key) ? ZONE_COLOURS[key] : EXTRA_ZONE_COLOURS[extra++ % EXTRA_ZONE_COLOURS.length];
  }
  return out;
}
