/**
 * Digests of documents: SHA-256 over canonical JSON (RFC 8785, JSON Canonicalization
 * Scheme), written `sha256:<hex>`. The same document always gives the same digest,
 * whatever the order of its keys.
 */
import canonicalize from 'canonicalize';
import { sha256Hex } from './sha256';

export function canonicalJson(doc: unknown): string {
  const s = canonicalize(doc);
  if (s === undefined) throw new Error('document cannot be written as canonical JSON');
  return s;
}

export function digestOf(doc: unknown): string {
  return `sha256:${sha256Hex(canonicalJson(doc))}`;
}
