/**
 * An arrow's drawing from its route: the shaft as an SVG path with rounded bends, ending
 * where the head begins, and the head as a triangle whose size grows with the stroke, so a
 * wide arrow keeps a visible point. Pure geometry, drawn identically on screen and in exports.
 */
import type { Point } from './layout-scheme';

/** Radius of a bend (px), shrunk where the segments around it are short. */
export const BEND_RADIUS = 7;

export interface ArrowShape {
  /** SVG path data of the shaft. */
  d: string;
  /** The head's three corners: tip, then the two back corners. */
  head: [Point, Point, Point];
}

/** Length of the head along the route for a stroke of `width` px. */
export function headLength(width: number): number {
  return 7 + 1.4 * width;
}

/** Half the width of the head's back for a stroke of `width` px. */
export function headHalfWidth(width: number): number {
  return 3.5 + 1.1 * width;
}

const round = (v: number) => Math.round(v * 100) / 100;

/** The shaft and head of an arrow along `points` (at least two) with stroke `width`. */
export function arrowShape(points: readonly Point[], width: number): ArrowShape {
  if (points.length < 2) throw new Error(`an arrow needs two points, got ${points.length}`);
  const tip = points[points.length - 1];
  const prev = points[points.length - 2];
  const len = Math.hypot(tip.x - prev.x, tip.y - prev.y) || 1;
  const ux = (tip.x - prev.x) / len;
  const uy = (tip.y - prev.y) / len;
  // The head may not be longer than the last segment leaves room for.
  const hl = Math.min(headLength(width), len * 0.9);
  const hw = headHalfWidth(width);
  const back = { x: tip.x - ux * hl, y: tip.y - uy * hl };
  const head: [Point, Point, Point] = [
    { x: round(tip.x), y: round(tip.y) },
    { x: round(back.x - uy * hw), y: round(back.y + ux * hw) },
    { x: round(back.x + uy * hw), y: round(back.y - ux * hw) }
  ];
  // The shaft (butt ends) stops inside the head, where the head is still wider than the stroke.
  const stop = 0.4 * hl;
  const shaft = [...points.slice(0, -1), { x: tip.x - ux * stop, y: tip.y - uy * stop }];
  return { d: roundedPath(shaft, BEND_RADIUS), head };
}

/** SVG path data through `points`, each inner corner rounded with radius up to `radius`. */
export function roundedPath(points: readonly Point[], radius: number): string {
  if (points.length === 0) return '';
  let d = `M${round(points[0].x)},${round(points[0].y)}`;
  for (let i = 1; i < points.length - 1; i++) {
    const a = points[i - 1];
    const b = points[i];
    const c = points[i + 1];
    const lin = Math.hypot(b.x - a.x, b.y - a.y);
    const lout = Math.hypot(c.x - b.x, c.y - b.y);
    const r = Math.min(radius, lin / 2, lout / 2);
    if (r < 0.5) {
      d += ` L${round(b.x)},${round(b.y)}`;
      continue;
    }
    const p1 = { x: b.x - ((b.x - a.x) / lin) * r, y: b.y - ((b.y - a.y) / lin) * r };
    const p2 = { x: b.x + ((c.x - b.x) / lout) * r, y: b.y + ((c.y - b.y) / lout) * r };
    d += ` L${round(p1.x)},${round(p1.y)} Q${round(b.x)},${round(b.y)} ${round(p2.x)},${round(p2.y)}`;
  }
  const last = points[points.length - 1];
  if (points.length > 1) d += ` L${round(last.x)},${round(last.y)}`;
  return d;
}

/** Polygon `points` attribute of a head. */
export function polygonPoints(head: readonly Point[]): string {
  return head.map((p) => `${p.x},${p.y}`).join(' ');
}
