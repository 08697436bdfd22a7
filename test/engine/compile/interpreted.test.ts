/**
 * The closure path (no generated code, for a Content-Security-Policy that refuses eval)
 * computes the same right-hand side, rates, derived values and forcings as the generated
 * code, on every shipped example, and with a measure that modulates a parameter.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { compileModel, checkIdentity, type ModelDoc } from '../../../src/lib/engine';
import { mulberry32 } from '../../../src/lib/engine/balance/identity';

const dir = 'static/examples';
const models = readdirSync(dir).filter((f) => f.endsWith('.model.json'));

function close(a: Float64Array, b: Float64Array) {
  for (let i = 0; i < a.length; i++) {
    const scale = Math.max(Math.abs(a[i]), Math.abs(b[i]), 1e-300);
    expect(Math.abs(a[i] - b[i]) / scale, `component ${i}`).toBeLessThan(1e-12);
  }
}

describe.each(models)('compileModel(%s, { interpreted: true })', (file) => {
  const model = JSON.parse(readFileSync(`${dir}/${file}`, 'utf8')) as ModelDoc;
  const p = model.parameters[model.parameters.length - 1];
  const mod = { scale: (t: number) => 1 + 0.001 * t, offset: () => 0 };
  const gen = compileModel(model, { dynamic: [p.id] });
  const int = compileModel(model, { dynamic: [p.id], interpreted: true });
  const bg = gen.bind({}, [mod]);
  const bi = int.bind({}, [mod]);

  it('is the closure path, and the generated one is not', () => {
    expect(int.mode).toBe('interpreted');
    expect(gen.mode).toBe('generated');
  });

  it('gives the same mass factors, right-hand side, rates, derived values and forcings at random states', () => {
    close(bg.m, bi.m);
    const rnd = mulberry32(7);
    for (let k = 0; k < 5; k++) {
      const y = new Float64Array(gen.dim);
      model.states.forEach((s, i) => (y[i] = (Math.abs(s.initial) || 1) * (0.5 + rnd())));
      const t = 400 * rnd();
      const [a, b] = [new Float64Array(gen.dim), new Float64Array(gen.dim)];
      bg.rhs(t, y, a);
      bi.rhs(t, y, b);
      close(a, b);
      const [ra, rb] = [new Float64Array(gen.nFlows), new Float64Array(gen.nFlows)];
      bg.rates(t, y, ra);
      bi.rates(t, y, rb);
      close(ra, rb);
      const [da, db] = [new Float64Array(gen.derivedIds.length), new Float64Array(gen.derivedIds.length)];
      bg.derived(t, y, da);
      bi.derived(t, y, db);
      close(da, db);
      const [fa, fb] = [new Float64Array(gen.forcingIds.length), new Float64Array(gen.forcingIds.length)];
      bg.forcings(t, fa);
      bi.forcings(t, fb);
      close(fa, fb);
    }
  });

  it('keeps the whole-system identity to round-off', () => {
    expect(checkIdentity(int, bi).worst).toBeLessThan(1e-12);
    expect(int.jacobianFactory()).toBeNull();
  });
});
