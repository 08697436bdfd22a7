/**
 * Morris (1991) elementary effects with μ* (Campolongo, Cariboni & Saltelli 2007).
 * The g-function of Sobol' as used throughout Saltelli et al. (2008, Global Sensitivity
 * Analysis: The Primer, Wiley; form from memory):
 *   g(x) = Π_i (|4x_i − 2| + a_i)/(1 + a_i), x uniform on [0, 1]^k,
 * input i the more important the smaller a_i; a = 99 makes an input almost inert. Its
 * first-order variance shares are V_i ∝ 1/(3(1 + a_i)²) (same source, from memory),
 * computed below as the independent ranking.
 */
import { describe, expect, it } from 'vitest';
import { morris, morrisDesign } from '../../../src/lib/engine/uncertainty/morris';
import { mulberry32 } from '../../../src/lib/engine/balance/identity';

const a = [0, 1, 4.5, 9, 99, 99, 99, 99];
const g = (x: number[]) => x.reduce((prod, xi, i) => prod * ((Math.abs(4 * xi - 2) + a[i]) / (1 + a[i])), 1);

describe('Morris design', () => {
  it('moves each input once per trajectory by Δ = p/(2(p − 1)), on the p-level grid', () => {
    const k = 5;
    const p = 4;
    const delta = p / (2 * (p - 1));
    const { design, moved } = morrisDesign(k, 6, p, mulberry32(9));
    design.forEach((points, t) => {
      expect(points).toHaveLength(k + 1);
      expect([...moved[t]].sort()).toEqual([0, 1, 2, 3, 4]);
      for (const pt of points) for (const v of pt) expect(Math.abs(v * (p - 1) - Math.round(v * (p - 1)))).toBeLessThan(1e-12);
      for (let s = 0; s < k; s++) {
        const diff = points[s + 1].map((v, i) => v - points[s][i]);
        const changed = diff.map((d, i) => (Math.abs(d) > 1e-12 ? i : -1)).filter((i) => i >= 0);
        expect(changed).toEqual([moved[t][s]]);
        expect(Math.abs(diff[moved[t][s]])).toBeCloseTo(delta, 12);
      }
    });
  });
});

describe('Morris screening', () => {
  it('gives each coefficient of a linear function exactly, with σ = 0', () => {
    const c = [3, -2, 0, 0.5];
    const r = morris((x) => x.reduce((s, xi, i) => s + c[i] * xi, 0), 4, { trajectories: 5, levels: 4, seed: 1 });
    expect(r.evaluations).toBe(5 * 5);
    r.effects.forEach((e, i) => {
      expect(e.mu).toBeCloseTo(c[i], 12);
      expect(e.muStar).toBeCloseTo(Math.abs(c[i]), 12);
      expect(e.sigma).toBeLessThan(1e-12);
    });
  });

  it('on the g-function (a = 0, 1, 4.5, 9, 99×4) ranks x1, x2 on top and the four a = 99 inputs at the bottom', () => {
    const r = morris(g, 8, { trajectories: 20, levels: 4, seed: 2027 });
    const order = [...r.effects].sort((p, q) => q.muStar - p.muStar).map((e) => e.index);
    expect(order.slice(0, 2)).toEqual([0, 1]);
    expect([...order.slice(4)].sort()).toEqual([4, 5, 6, 7]);
    // the independent ranking by first-order variance share agrees on the top two and bottom four
    const share = a.map((ai) => 1 / (3 * (1 + ai) ** 2));
    const byShare = share.map((v, i) => [v, i] as const).sort((p, q) => q[0] - p[0]).map(([, i]) => i);
    expect(byShare.slice(0, 2)).toEqual(order.slice(0, 2));
    // x1 with a = 0 is strongly non-linear and interacting: σ is of the order of μ*
    expect(r.effects[0].sigma).toBeGreaterThan(0.1 * r.effects[0].muStar);
  });

  it('the same seed gives the same result, another seed another design', () => {
    const x = morris(g, 8, { trajectories: 10, seed: 5 });
    const y = morris(g, 8, { trajectories: 10, seed: 5 });
    const z = morris(g, 8, { trajectories: 10, seed: 6 });
    expect(y.effects).toEqual(x.effects);
    expect(z.design).not.toEqual(x.design);
  });

  it('refuses odd levels and fewer than 2 trajectories', () => {
    expect(() => morris(g, 8, { levels: 3 })).toThrow(/even/);
    expect(() => morris(g, 8, { trajectories: 1 })).toThrow(/2 trajectories/);
  });
});
