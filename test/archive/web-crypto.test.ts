/**
 * The engine's own SHA-256 (FIPS 180-4, DEVELOPERS.md decision 10) agrees with Web Crypto's
 * `crypto.subtle.digest('SHA-256', …)` on the canonical JSON (RFC 8785) of real documents,
 * so a record digest can be checked with the browser's own implementation.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import canonicalize from 'canonicalize';
import { digestOf } from '../../src/lib/engine/document/digest';
import { sha256Hex } from '../../src/lib/engine/document/sha256';
import { recordDigest, runInputs } from '../../src/lib/archive/record';
import { simulate } from '../../src/lib/engine';

async function webCryptoHex(text: string): Promise<string> {
  const d = await crypto.subtle.digest('SHA-256', new TextEncoder().encode(text));
  return Array.from(new Uint8Array(d), (b) => b.toString(16).padStart(2, '0')).join('');
}

describe('own SHA-256 against Web Crypto', () => {
  it.each([[''], ['abc'], ['é µ ✓ 𝔓'], ['x'.repeat(1000)]].map(([s]) => ({ s, n: s.length })))('sha256Hex of a text of $n characters equals crypto.subtle', async ({ s }) => {
    expect(sha256Hex(s)).toBe(await webCryptoHex(s));
  });

  it('the digest of the demo model and of a run record equal Web Crypto over their canonical JSON', async () => {
    const model = JSON.parse(readFileSync('static/examples/demo-lake.model.json', 'utf8'));
    expect(digestOf(model)).toBe(`sha256:${await webCryptoHex(canonicalize(model)!)}`);
    const oneBox = JSON.parse(readFileSync('static/examples/one-box.model.json', 'utf8'));
    const run = simulate(oneBox, { format: 'lakeledger.scenario/1', id: 's', model: oneBox.id, period: { start: '2027-01-01', end: '2028-01-01' } });
    const inputs = runInputs(run);
    expect(digestOf(inputs)).toBe(`sha256:${await webCryptoHex(canonicalize(inputs)!)}`);
    expect(recordDigest(run)).toMatch(/^sha256:[0-9a-f]{64}$/);
  });
});
