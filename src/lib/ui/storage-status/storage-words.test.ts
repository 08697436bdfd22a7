import { describe, expect, it } from 'vitest';
import { formatBytes, storageSentence } from './storage-words';

describe('formatBytes', () => {
  it.each([
    [0, '0 bytes'],
    [1, '1 byte'],
    [999, '999 bytes'],
    [1000, '1 kB'],
    [1234, '1.2 kB'],
    [340_000, '340 kB'],
    [1_230_000, '1.2 MB'],
    [9_960_000, '10 MB'],
    [999_600, '1 MB'],
    [12_400_000_000, '12 GB'],
    [-1, 'an unknown amount'],
    [Number.NaN, 'an unknown amount']
  ])('%d bytes read as %s', (bytes, words) => {
    expect(formatBytes(bytes)).toBe(words);
  });
});

describe('storageSentence', () => {
  it('says what is used, what is left and that it is kept', () => {
    expect(storageSentence({ usage: 1_200_000, quota: 12_001_200_000, persisted: true })).toBe(
      'Stored on this computer: 1.2 MB of about 12 GB available; kept persistently.'
    );
  });
  it('warns when the browser may clear it', () => {
    expect(storageSentence({ usage: 1_200_000, quota: 12_001_200_000, persisted: false })).toBe(
      'Stored on this computer: 1.2 MB of about 12 GB available; may be cleared by the browser when space runs low.'
    );
  });
  it('says less when the browser says less', () => {
    expect(storageSentence({ usage: 5000 })).toBe(
      'Stored on this computer: 5 kB; the browser does not say whether it keeps it.'
    );
    expect(storageSentence({})).toBe(
      'Stored on this computer: the browser does not say how much; the browser does not say whether it keeps it.'
    );
  });
});
