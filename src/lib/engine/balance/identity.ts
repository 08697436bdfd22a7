/**
 * The whole-system identity, checked numerically: Σ m(x)·dx/dt over conserved states must
 * equal imports − exports at any state, because every internal flow leaves one state and
 * arrives, converted through the sizes, in another. Compilation evaluates it at several
 * random positive states (seeded, so runs are reproducible) and records the worst
 * relative difference; anything above round-off is an engine defect.
 */
import type { BoundModel, CompiledModel } from '../compile/compile-model';

/** Mulberry32, a small seeded generator (T. Ettinger, public domain; common practice). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface IdentityCheck {
  /** Largest |Σ m dx/dt − (imports − exports)| / Σ |terms| over the samples. */
  worst: number;
  samples: number;
}

export function checkIdentity(compiled: CompiledModel, bound: BoundModel, samples = 5, seed = 20270101): IdentityCheck {
  const rnd = mulberry32(seed);
  const y = new Float64Array(compiled.dim);
  const dy = new Float64Array(compiled.dim);
  const init = compiled.analysis.states.map((s) => Math.abs(s.initial) || 1);
  let worst = 0;
  for (let k = 0; k < samples; k++) {
    for (let i = 0; i < compiled.nStates; i++) y[i] = init[i] * (0.2 + 2 * rnd());
    const t = 365 * rnd();
    bound.rhs(t, y, dy);
    let lhs = 0;
    let scale = 0;
    for (let i = 0; i < compiled.nStates; i++) {
      if (!compiled.conserved[i]) continue;
      const v = bound.m[i] * dy[i];
      lhs += v;
      scale += Math.abs(v);
    }
    const rhs = dy[compiled.importIndex] - dy[compiled.exportIndex];
    scale += Math.abs(dy[compiled.importIndex]) + Math.abs(dy[compiled.exportIndex]);
    if (!Number.isFinite(lhs) || !Number.isFinite(rhs)) continue;
    const rel = scale === 0 ? 0 : Math.abs(lhs - rhs) / scale;
    worst = Math.max(worst, rel);
  }
  return { worst, samples };
}
