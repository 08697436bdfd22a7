import { gunzipSync, gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { GzipError, gunzipText, gzipText, isGzip } from './gzip';

describe('bundle compression (gzip, RFC 1952)', () => {
  it('gzipText → gunzipText gives the text back, accents and all', async () => {
    const text = JSON.stringify({ lake: 'Wendmoor, Æbelø, 3 µg/L', n: [1, 2, 3] }).repeat(200);
    const z = await gzipText(text);
    expect(isGzip(z)).toBe(true);
    expect(z.length).toBeLessThan(text.length / 5);
    expect(await gunzipText(z)).toBe(text);
  });

  it("reads what Node's zlib writes and the other way round (the command line's bundles)", async () => {
    const text = 'bundle text ✓';
    expect(await gunzipText(new Uint8Array(gzipSync(Buffer.from(text))))).toBe(text);
    expect(gunzipSync(await gzipText(text)).toString('utf8')).toBe(text);
  });

  it('refuses plain JSON as not_gzip, a cut-off file as damaged, and a file inflating past the limit as too_large', async () => {
    await expect(gunzipText(new TextEncoder().encode('{"format":"x"}'))).rejects.toMatchObject({ code: 'not_gzip' });
    const z = await gzipText('x'.repeat(100_000));
    await expect(gunzipText(z.subarray(0, Math.floor(z.length / 2)))).rejects.toMatchObject({ code: 'damaged' });
    // 10 MB of zeros compress to about 10 kB: a small file, refused at a 1 MB limit
    const bomb = new Uint8Array(gzipSync(Buffer.alloc(10_000_000)));
    expect(bomb.length).toBeLessThan(20_000);
    await expect(gunzipText(bomb, 1_000_000)).rejects.toBeInstanceOf(GzipError);
    await expect(gunzipText(bomb, 1_000_000)).rejects.toMatchObject({ code: 'too_large' });
  });

  it('refuses bytes that are not UTF-8 text', async () => {
    const z = new Uint8Array(gzipSync(Buffer.from([0xff, 0xfe, 0xfd])));
    await expect(gunzipText(z)).rejects.toMatchObject({ code: 'damaged' });
  });
});
