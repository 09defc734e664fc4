/**
 * Exact integration of piecewise-linear pressure diagrams over depth.
 *
 * Units: depths in m, pressures in kPa, so a force F = ∫p dz is in kN/m and a moment about formation
 * M = ∫p·(H − z) dz in kN·m/m. On a piece where p is linear the trapezium gives F exactly and
 * Simpson's rule gives M exactly (p·(H − z) is quadratic). Elementary calculus; no other source.
 */

/** [F, M] of a pressure varying linearly from pa at depth a to pb at depth b, moments about depth H. */
export function linearForceMoment(a: number, b: number, pa: number, pb: number, H: number): [number, number] {
  const len = b - a;
  if (len <= 0) return [0, 0];
  const m = (a + b) / 2;
  const force = ((pa + pb) / 2) * len;
  const moment = (len / 6) * (pa * (H - a) + 2 * (pa + pb) * (H - m) + pb * (H - b));
  return [force, moment];
}

/** [F, M] of a uniform pressure p over a ≤ z ≤ b. */
export function uniformForceMoment(a: number, b: number, p: number, H: number): [number, number] {
  if (b <= a) return [0, 0];
  return [p * (b - a), (p * ((H - a) * (H - a) - (H - b) * (H - b))) / 2];
}

/**
 * [F, M, lastGoverns] of the largest of several linear functions over a..b (given by their values
 * pa[i] at a and pb[i] at b): split at every crossing, then the largest is one linear function on
 * each part. `lastGoverns` says whether the last function is strictly the largest on some part
 * (used to tell when a minimum pressure governs).
 */
export function maxOfLinesForceMoment(
  a: number,
  b: number,
  pa: readonly number[],
  pb: readonly number[],
  H: number,
): [number, number, boolean] {
  const n = pa.length;
  const cuts = [0, 1];
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const da = pa[i] - pa[j];
      const db = pb[i] - pb[j];
      if ((da > 0 && db < 0) || (da < 0 && db > 0)) cuts.push(da / (da - db));
    }
  }
  cuts.sort((x, y) => x - y);
  const at = (t: number) => {
    let best = -Infinity;
    for (let i = 0; i < n; i++) best = Math.max(best, pa[i] + t * (pb[i] - pa[i]));
    return best;
  };
  let F = 0;
  let M = 0;
  let lastGoverns = false;
  const len = b - a;
  for (let k = 0; k + 1 < cuts.length; k++) {
    const t0 = cuts[k];
    const t1 = cuts[k + 1];
    if (t1 <= t0) continue;
    const [f, m] = linearForceMoment(a + t0 * len, a + t1 * len, at(t0), at(t1), H);
    F += f;
    M += m;
    const tm = (t0 + t1) / 2;
    const last = pa[n - 1] + tm * (pb[n - 1] - pa[n - 1]);
    let others = -Infinity;
    for (let i = 0; i < n - 1; i++) others = Math.max(others, pa[i] + tm * (pb[i] - pa[i]));
    if (last > others + 1e-9 * (1 + Math.abs(others))) lastGoverns = true;
  }
  return [F, M, lastGoverns];
}
