/** Small helpers the library's stores share. */
import { digestOf } from '$lib/engine/document/digest';
import type { Problem } from '$lib/engine/document/types';

export function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** The digest of a working copy, or null when it cannot be written as JSON at all. */
export function digestOrNull(doc: unknown): string | null {
  try {
    return digestOf(doc);
  } catch {
    return null;
  }
}

/** `base` if nothing uses it, else `base` + `sep` + 2, 3, … (`x_copy`, `x_copy2`; `lake`, `lake_2`). */
export function firstFree(base: string, taken: ReadonlySet<string>, sep = ''): string {
  if (!taken.has(base)) return base;
  for (let n = 2; ; n++) if (!taken.has(`${base}${sep}${n}`)) return `${base}${sep}${n}`;
}

/** The errors of a refused document in one line: `path (id): message; …`. */
export function problemsLine(problems: readonly Problem[]): string {
  return problems
    .filter((p) => p.severity === 'error')
    .map((p) => `${p.path || '(document)'}${p.id ? ` (${p.id})` : ''}: ${p.message}`)
    .join('; ');
}
