/**
 * The scheme's neutral colours (zones have their own, zone-palette.ts). Greys only, so no
 * mark can be confused with a run's colour; each is dark enough on white for its use
 * (text 4.5:1 and more, lines 3:1 and more).
 */
export const SCHEME_INK = Object.freeze({
  paper: '#ffffff',
  /** Inside the lake's frame. */
  lake: '#fbfcfc',
  frame: '#1d2125',
  text: '#1d2125',
  muted: '#4e5860',
  /** Arrows. */
  flow: '#55616a',
  /** The arrow or tile pointed at. */
  hot: '#000000',
  focus: '#1d2125',
  tile: '#ffffff',
  chip: '#f1f3f4',
  chipEdge: '#6f7a82'
});
