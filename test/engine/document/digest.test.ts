/**
 * sha256Hex(text) and digestOf(doc): SHA-256 over UTF-8 (FIPS 180-4), and document digests
 * over canonical JSON (RFC 8785), written `sha256:<hex>`.
 * Reference values: the FIPS 180-4 examples (NIST's published SHA-256 example computations
 * for "abc" and the 448-bit message; the empty-string digest is common practice), the
 * one-million-"a" message of FIPS 180-2 Appendix B.3 (from memory), and Node's
 * `crypto.createHash('sha256')` as a general-purpose reference implementation.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sha256Hex, utf8 } from '../../../src/lib/engine/document/sha256';
import { canonicalJson, digestOf } from '../../../src/lib/engine';

const nodeSha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

describe('sha256Hex(text) against published examples', () => {
  it.each([
    ['"abc" (FIPS 180-4 example, one block)', 'abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    [
      'the 448-bit message (FIPS 180-4 example, two blocks)',
      'abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq',
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1'
    ],
    ['the empty string (common practice)', '', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
    ['one million "a" (FIPS 180-2 Appendix B.3, from memory)', 'a'.repeat(1_000_000), 'cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0']
  ])('%s', (_what, text, hex) => {
    expect(sha256Hex(text)).toBe(hex);
  });
});

describe('sha256Hex(text) against node:crypto', () => {
  it.each([55, 56, 57, 63, 64, 65, 119, 120, 128])('a message of %i bytes (around the padding boundaries)', (n) => {
    const text = 'lake'.repeat(40).slice(0, n);
    expect(sha256Hex(text)).toBe(nodeSha256(text));
  });

  it.each([
    ['Latin letters with diacritics (2 bytes each)', 'Seegrund, Überlauf, Ålesund'],
    ['CJK characters (3 bytes each)', '湖の燐'],
    ['a character outside the BMP (4 bytes, a surrogate pair)', 'fish 🐟 count'],
    ['a lone high surrogate (becomes U+FFFD)', 'x\ud800y'],
    ['a lone low surrogate at the end (becomes U+FFFD)', 'x\udc00'],
    ['all of them together', 'Phosphor – ü 湖 🐟 \u0000 \u007f \u0080 \u07ff \u0800 \uffff']
  ])('multi-byte UTF-8: %s', (_what, text) => {
    expect(sha256Hex(text)).toBe(nodeSha256(text));
    expect(Buffer.from(utf8(text)).equals(Buffer.from(text, 'utf8'))).toBe(true);
  });
});

/** The same value with the keys of every object in reverse order. */
function reverseKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(reverseKeys);
  if (v && typeof v === 'object') {
    return Object.fromEntries(Object.entries(v).reverse().map(([k, x]) => [k, reverseKeys(x)]));
  }
  return v;
}

describe('digestOf(doc)', () => {
  const model = JSON.parse(readFileSync(new URL('../../../static/examples/closed-npzd.model.json', import.meta.url), 'utf8'));

  it('is sha256: followed by 64 hex digits, the SHA-256 of the canonical JSON', () => {
    const d = digestOf(model);
    expect(d).toMatch(/^sha256:[0-9a-f]{64}$/);
    expect(d).toBe(`sha256:${nodeSha256(canonicalJson(model))}`);
  });

  it('is independent of key order (RFC 8785 sorts keys)', () => {
    const reversed = reverseKeys(model);
    expect(JSON.stringify(reversed)).not.toBe(JSON.stringify(model));
    expect(digestOf(reversed)).toBe(digestOf(model));
    expect(digestOf({ a: 1, b: { c: 2, d: [3, 4] } })).toBe(digestOf({ b: { d: [3, 4], c: 2 }, a: 1 }));
  });

  it('differs when one value changes', () => {
    const changed = structuredClone(model);
    changed.parameters[0].value = 1800001;
    expect(digestOf(changed)).not.toBe(digestOf(model));
  });

  it('differs when list order changes (lists are ordered)', () => {
    expect(digestOf({ a: [1, 2] })).not.toBe(digestOf({ a: [2, 1] }));
  });

  it('canonicalJson writes the RFC 8785 Sect. 3.2.2 example as the RFC does (from memory)', () => {
    const input = JSON.parse(
      '{"numbers":[333333333.33333329,1E30,4.50,2e-3,0.000000000000000000000000001],' +
        '"string":"\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/","literals":[null,true,false]}'
    );
    expect(canonicalJson(input)).toBe(
      '{"literals":[null,true,false],"numbers":[333333333.3333333,1e+30,4.5,0.002,1e-27],"string":"€$\\u000f\\nA\'B\\"\\\\\\\\\\"/"}'
    );
  });
});
