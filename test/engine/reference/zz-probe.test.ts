import { it } from 'vitest';
import { simulate } from '../../../src/lib/engine';
import { sqrtDrain, scenario, robertson, waterSediment, TIGHT, loadExample, chain } from './fixtures';
it('probe', () => {
  const out: string[] = [];
  for (const method of ['odex', 'auto', 'stiff'] as const) {
    const m = sqrtDrain({ load: 0, k: 0.5, X0: 1 });
    const run = simulate(m, scenario(m, { end: 100, solver: { method, rtol: 1e-6, atol: 1e-9, maxStep: 100, maxSteps: 100000 } }));
    out.push(method + ' ' + run.status + ' ' + JSON.stringify(run.error) + ' ' + JSON.stringify(run.solver) + ' nseries ' + run.series.X.length + ' ' + run.series.X.slice(0, 6).join(',') + ' warn ' + JSON.stringify(run.warnings));
  }
  const r = robertson();
  const rr = simulate(r, scenario(r, { end: '2037-12-14', outputStep: 10, solver: { method: 'auto', rtol: 1e-8, atol: 1e-14, maxStep: 1000, maxSteps: 100000 } }));
  out.push('rob ' + JSON.stringify(rr.solver) + JSON.stringify(rr.closure) + ' ' + [rr.series.y1[4], rr.series.y2[4], rr.series.y3[4], rr.series.y1[400], rr.series.y2[400]].join(' '));
  const w = waterSediment(0, 0);
  const wr = simulate(w, scenario(w, { end: '2047-01-01', solver: TIGHT }));
  out.push('ws ' + JSON.stringify(wr.closure) + ' ' + JSON.stringify(wr.budget[0]) + ' ' + JSON.stringify(wr.budget[wr.budget.length - 1]) + ' ' + wr.series.W[7305] + ' ' + wr.series.S[7305]);
  const n = loadExample('closed-npzd.model.json');
  const nr = simulate(n, scenario(n, { end: '2037-01-01' }));
  out.push('npzd ' + JSON.stringify(nr.closure) + JSON.stringify(nr.solver) + JSON.stringify(nr.warnings) + ' PHY range ' + Math.min(...nr.series.PHY) + ' ' + Math.max(...nr.series.PHY));
  const c = chain(1, 0.5, 0.2);
  const cr = simulate(c, scenario(c, { end: 5, outputStep: 0.5, solver: { rtol: 1e-10, atol: 1e-14, maxStep: 0.5 } }));
  out.push('chain ' + JSON.stringify(cr.closure) + ' ' + cr.series.C[10] + JSON.stringify(cr.budget));
  const o = loadExample('one-box.model.json');
  const or = simulate(o);
  out.push('onebox ' + JSON.stringify(or.closure) + ' ' + or.series.TP.at(-1) + ' ' + or.times.length + JSON.stringify(or.warnings) + JSON.stringify(or.solver));
  console.log(out.join('\n'));
});
