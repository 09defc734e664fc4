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
 * [F, M] of max(g(z), h(z)) over a..b where g and h are both linear (given by their end values):
 * split where they cross, then each part is linear.
 */
export function maxOfLinearForceMoment(
  a: number,
  b: number,
  ga: number,
  gb: number,
  ha: number,
  hb: number,
  H: number,
): [number, number] {
  const da = ga - ha;
  const db = gb - hb;
  if ((da >= 0 && db >= 0) || (da <= 0 && db <= 0)) {
    return da + db >= 0 ? linearForceMoment(a, b, ga, gb, H) : linearForceMoment(a, b, ha, hb, H);
  }
  const t = da / (da - db);
  const c = a + t * (b - a);
  const pc = ga + t * (gb - ga);
  const first = linearForceMoment(a, c, Math.max(ga, ha), pc, H);
  const second = linearForceMoment(c, b, pc, Math.max(gb, hb), H);
  return [first[0] + second[0], first[1] + second[1]];
}
