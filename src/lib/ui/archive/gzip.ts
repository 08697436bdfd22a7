/**
 * Bundles travel gzip-compressed (RFC 1952), made and read with the browser's own
 * CompressionStream and DecompressionStream (Node's zlib on the command line writes and
 * reads the same bytes). Reading stops at a limit, so a small file that inflates to
 * gigabytes ("a zip bomb") is refused instead of filling the memory.
 */
import { MAX_JSON_CHARS } from '$lib/engine/document/json';

/** The two bytes every gzip member starts with (RFC 1952, section 2.3.1). */
export function isGzip(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
}

export async function gzipText(text: string): Promise<Uint8Array> {
  const stream = new Blob([text]).stream().pipeThrough(new CompressionStream('gzip'));
  return new Uint8Array(await new Response(stream).arrayBuffer());
}

export class GzipError extends Error {
  constructor(
    readonly code: 'not_gzip' | 'damaged' | 'too_large',
    message: string
  ) {
    super(message);
    this.name = 'GzipError';
  }
}

/** The text inside gzip bytes; at most `limit` bytes of it (default: the largest document). */
export async function gunzipText(bytes: Uint8Array, limit = MAX_JSON_CHARS): Promise<string> {
  if (!isGzip(bytes)) throw new GzipError('not_gzip', 'the file is not gzip-compressed (it does not start with the gzip signature 1f 8b)');
  const reader = new Blob([bytes as BlobPart]).stream().pipeThrough(new DecompressionStream('gzip')).getReader();
  const parts: Uint8Array[] = [];
  let size = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.length;
      if (size > limit) {
        await reader.cancel();
        throw new GzipError('too_large', `the file inflates to more than ${limit.toLocaleString('en')} bytes, more than any bundle; it was not read further`);
      }
      parts.push(value);
    }
  } catch (e) {
    if (e instanceof GzipError) throw e;
    throw new GzipError('damaged', `the compressed data is damaged or cut off (${(e as Error).message})`);
  }
  const all = new Uint8Array(size);
  let at = 0;
  for (const p of parts) {
    all.set(p, at);
    at += p.length;
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(all);
  } catch {
    throw new GzipError('damaged', 'the file inside is not UTF-8 text');
  }
}
