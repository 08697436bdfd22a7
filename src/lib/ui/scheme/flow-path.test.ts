import { describe, expect, it } from 'vitest';
import { arrowShape, headHalfWidth, headLength, polygonPoints, roundedPath } from './flow-path';

describe('arrowShape(points, width)', () => {
  it('puts the tip on the last point, pointing along the last segment', () => {
    const { head } = arrowShape([{ x: 0, y: 0 }, { x: 0, y: 100 }, { x: 50, y: 100 }], 2);
    expect(head[0]).toEqual({ x: 50, y: 100 });
    const hl = headLength(2);
    const hw = headHalfWidth(2);
    expect(head.slice(1).map((p) => p.x)).toEqual([50 - hl, 50 - hl]);
    expect(head.slice(1).map((p) => p.y).sort((a, b) => a - b)).toEqual([100 - hw, 100 + hw]);
  });

  it('grows the head with the stroke so a wide arrow keeps its point', () => {
    expect(headLength(9)).toBeGreaterThan(headLength(1));
    expect(2 * headHalfWidth(9)).toBeGreaterThan(9);
  });

  it('stops the shaft inside the head', () => {
    const { d } = arrowShape([{ x: 0, y: 0 }, { x: 100, y: 0 }], 4);
    const end = d.split(' ').at(-1)!.slice(1).split(',').map(Number);
    expect(end[0]).toBeGreaterThan(100 - headLength(4));
    expect(end[0]).toBeLessThan(100);
  });

  it('shortens the head on a very short last segment', () => {
    const { head } = arrowShape([{ x: 0, y: 0 }, { x: 4, y: 0 }], 9);
    expect(head[1].x).toBeGreaterThanOrEqual(0);
  });

  it('refuses a route of one point', () => {
    expect(() => arrowShape([{ x: 0, y: 0 }], 1)).toThrow(/two points/);
  });
});

describe('roundedPath(points, radius)', () => {
  it('runs from the first point to the last with a curve at each bend', () => {
    const d = roundedPath([{ x: 0, y: 0 }, { x: 0, y: 50 }, { x: 50, y: 50 }], 7);
    expect(d).toBe('M0,0 L0,43 Q0,50 7,50 L50,50');
  });
  it('shrinks the curve where a segment is short, and draws straight corners below half a pixel', () => {
    expect(roundedPath([{ x: 0, y: 0 }, { x: 0, y: 4 }, { x: 10, y: 4 }], 7)).toBe('M0,0 L0,2 Q0,4 2,4 L10,4');
    expect(roundedPath([{ x: 0, y: 0 }, { x: 0, y: 0.5 }, { x: 10, y: 0.5 }], 7)).toBe('M0,0 L0,0.5 L10,0.5');
  });
  it('writes the polygon of a head as SVG points', () => {
    expect(polygonPoints([{ x: 1, y: 2 }, { x: 3, y: 4 }])).toBe('1,2 3,4');
  });
});
