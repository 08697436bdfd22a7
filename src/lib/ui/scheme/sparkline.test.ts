import { describe, expect, it } from 'vitest';
import { sparkPath, summarise } from './sparkline';

const box = { x: 10, y: 0, width: 100, height: 10 };

describe('summarise(values)', () => {
  it('gives the first, last, smallest and largest finite value', () => {
    expect(summarise([Number.NaN, 3, 1, 4, 1, 5, Number.NaN])).toEqual({ first: 3, last: 5, min: 1, max: 5 });
    expect(summarise([Number.NaN])).toBeNull();
    expect(summarise([])).toBeNull();
  });
});

describe('sparkPath(values, box, maxPoints)', () => {
  it('spans the box: the smallest value at the bottom, the largest at the top', () => {
    expect(sparkPath([0, 5, 10], box)).toBe('M10,10 L60,5 L110,0');
  });
  it('draws a flat series through the middle', () => {
    expect(sparkPath([2, 2, 2], box)).toBe('M10,5 L60,5 L110,5');
  });
  it('averages runs of outputs down to at most maxPoints points', () => {
    const d = sparkPath(Array.from({ length: 7300 }, (_, i) => Math.sin(i / 100)), box, 50);
    expect(d.split(' ')).toHaveLength(50);
  });
  it('breaks the line at non-finite values', () => {
    expect(sparkPath([0, Number.NaN, 10, 10], box)).toBe('M10,10 M76.67,0 L110,0');
  });
  it('draws nothing for fewer than two values or no finite ones', () => {
    expect(sparkPath([1], box)).toBe('');
    expect(sparkPath([Number.NaN, Number.NaN], box)).toBe('');
  });
});
