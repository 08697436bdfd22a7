/** `id`, `aria-invalid` and `aria-describedby` of a control with these problems (and an optional hint). */
import type { Problem } from '$lib/engine/document/types';

export function controlAttrs(id: string, problems: readonly Pick<Problem, 'severity'>[] | undefined, hint?: string) {
  const list = problems ?? [];
  const described = [list.length > 0 ? `${id}-msg` : '', hint ?? ''].filter(Boolean).join(' ');
  return {
    id,
    'aria-invalid': list.some((p) => p.severity === 'error') ? ('true' as const) : undefined,
    'aria-describedby': described || undefined
  };
}
