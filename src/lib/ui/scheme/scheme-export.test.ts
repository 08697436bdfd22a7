import { describe, expect, it } from 'vitest';
import { arrangeExport, EXPORT_GAP, EXPORT_MARGIN, exportFileName } from './scheme-export';

describe('exportFileName(modelId, ext)', () => {
  it('is `<modelId>-scheme.<ext>`, with characters unsafe in file names replaced', () => {
    expect(exportFileName('demo_lake', 'svg')).toBe('demo_lake-scheme.svg');
    expect(exportFileName('demo_lake', 'png')).toBe('demo_lake-scheme.png');
    expect(exportFileName('a/b c', 'svg')).toBe('a_b_c-scheme.svg');
    expect(exportFileName('', 'svg')).toBe('model-scheme.svg');
  });
});

describe('arrangeExport(scheme, readout, legend)', () => {
  it('puts the readout strip right of the scheme and the legend below both', () => {
    const a = arrangeExport({ width: 1000, height: 800 }, { width: 244, height: 900 }, { width: 1100, height: 200 });
    const m = EXPORT_MARGIN;
    expect(a.scheme).toEqual({ x: m, y: m });
    expect(a.readout).toEqual({ x: m + 1000 + EXPORT_GAP, y: m });
    expect(a.legend).toEqual({ x: m, y: m + 900 + EXPORT_GAP });
    expect(a.width).toBe(2 * m + 1000 + EXPORT_GAP + 244);
    expect(a.height).toBe(2 * m + 900 + EXPORT_GAP + 200);
  });
  it('leaves out what is missing and widens for a legend wider than the row', () => {
    const a = arrangeExport({ width: 300, height: 200 }, null, { width: 600, height: 100 });
    expect(a.readout).toBeNull();
    expect(a.width).toBe(2 * EXPORT_MARGIN + 600);
    expect(arrangeExport({ width: 300, height: 200 }, null, null)).toMatchObject({ legend: null, height: 2 * EXPORT_MARGIN + 200 });
  });
});
