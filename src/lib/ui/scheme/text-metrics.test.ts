import { describe, expect, it } from 'vitest';
import { ellipsize, textWidth, wrapText } from './text-metrics';

describe('textWidth(text, size, bold)', () => {
  it('adds up the widths of the characters and scales with the size', () => {
    expect(textWidth('ab', 10)).toBeCloseTo(textWidth('a', 10) + textWidth('b', 10), 12);
    expect(textWidth('Chl', 20)).toBeCloseTo(2 * textWidth('Chl', 10), 12);
    expect(textWidth('', 12)).toBe(0);
  });
  it('is wider in bold and counts characters outside ASCII', () => {
    expect(textWidth('SEDinert', 12, true)).toBeGreaterThan(textWidth('SEDinert', 12));
    expect(textWidth('µ', 10)).toBeCloseTo(7, 12);
  });
});

describe('wrapText(text, size, maxWidth, maxLines)', () => {
  it('breaks at spaces into lines that fit', () => {
    const lines = wrapText('Benthivorous fish P living on the bottom', 12, 120, 5);
    expect(lines.length).toBeGreaterThan(1);
    for (const l of lines) expect(textWidth(l, 12)).toBeLessThanOrEqual(120);
    expect(lines.join(' ')).toBe('Benthivorous fish P living on the bottom');
  });
  it('ends the last allowed line with an ellipsis when text is left over', () => {
    const lines = wrapText('one two three four five six seven eight nine ten', 12, 60, 2);
    expect(lines).toHaveLength(2);
    expect(lines[1].endsWith('…')).toBe(true);
    for (const l of lines) expect(textWidth(l, 12)).toBeLessThanOrEqual(60);
  });
  it('cuts a single word wider than the box', () => {
    const [line] = wrapText('Supercalifragilisticexpialidocious', 12, 80, 2);
    expect(line.endsWith('…')).toBe(true);
    expect(textWidth(line, 12)).toBeLessThanOrEqual(80);
  });
  it('returns one empty line for empty text', () => {
    expect(wrapText('  ', 12, 80)).toEqual(['']);
  });
});

describe('ellipsize(text, size, maxWidth)', () => {
  it('shortens until the text and the ellipsis fit', () => {
    const s = ellipsize('a rather long label', 12, 50);
    expect(s.endsWith('…')).toBe(true);
    expect(textWidth(s, 12)).toBeLessThanOrEqual(50);
  });
});
