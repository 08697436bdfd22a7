/**
 * A forcing table as a function of time (days since the model's time origin):
 * linear or step interpolation, held constant beyond its ends, or repeated every
 * `period` days (wrapping from the last point back to the first plus one period).
 */
export function tableFunction(
  t: readonly number[],
  v: readonly number[],
  step: boolean,
  period: number | undefined,
  scale: number
): (time: number) => number {
  const n = t.length;
  const vs = v.map((x) => x * scale);
  if (n === 1) return () => vs[0];
  const t0 = t[0];
  let last = 0;
  // Find i with t[i] <= x < t[i+1], starting from the last hit (times mostly advance).
  const locate = (x: number): number => {
    let i = last;
    if (x < t[i]) {
      while (i > 0 && x < t[i]) i--;
    } else {
      while (i < n - 1 && x >= t[i + 1]) i++;
    }
    last = i;
    return i;
  };
  const inside = (x: number): number => {
    const i = locate(x);
    if (i >= n - 1) return vs[n - 1];
    if (step) return vs[i];
    const w = (x - t[i]) / (t[i + 1] - t[i]);
    return vs[i] + w * (vs[i + 1] - vs[i]);
  };
  if (period === undefined) {
    return (x) => (x <= t0 ? vs[0] : x >= t[n - 1] ? vs[n - 1] : inside(x));
  }
  const tEnd = t0 + period;
  return (x) => {
    let u = (x - t0) % period;
    if (u < 0) u += period;
    u += t0;
    if (u < t[n - 1]) return inside(u);
    // Between the last point and the first point of the next period.
    if (step) return vs[n - 1];
    const w = (u - t[n - 1]) / (tEnd - t[n - 1]);
    return vs[n - 1] + w * (vs[0] - vs[n - 1]);
  };
}
