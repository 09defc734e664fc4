/**
 * `elastic`: lateral pressure from surface loads by Boussinesq-based solutions; docs/calculation.md, "Elastic solutions".
 *
 * Units: q in kPa, Q in kN/m, P in kN; offsets and depths in m; pressures in kPa; forces in kN/m;
 * moments about formation in kN·m/m. r is the restraint factor: 2 for an unyielding support (the
 * mirror-image doubling), 1 for a yielding one.
 *
 * - Strip of width B at offset d (Poulos & Davis 1974, Elastic Solutions for Soil and Rock
 *   Mechanics; NAVFAC DM-7.02, 1986): θ1 = atan(d/z), θ2 = atan((d+B)/z), β = θ2 − θ1,
 *   α = θ1 + β/2, Δσh = r·(q/π)·(β − sin β·cos 2α). Written here without trigonometry but one
 *   arctangent: sin β·cos 2α = (sin 2θ2 − sin 2θ1)/2 and sin 2θ = 2xz/(x² + z²).
 *   Its force over 0..H in closed form is r·(q/π)·H·(atan((d+B)/H) − atan(d/H)), which for r = 2
 *   is Jarquio's (1981) resultant as given in Das, Principles of Foundation Engineering; the
 *   moment is the closed-form integral of the same expression.
 * - Line load Q (Terzaghi 1954, as given in NAVFAC DM-7.02), m = d/H, n = z/H:
 *   m ≤ 0.4: Δσh = (Q/H)·0.20·n/(0.16 + n²)²; m > 0.4: Δσh = (Q/H)·1.28·m²·n/(m² + n²)²; times r/2.
 * - Point load P (after Gerber 1929 and Spangler 1938, as given in NAVFAC DM-7.02), section through
 *   the load: m ≤ 0.4: Δσh = (P/H²)·0.28·n²/(0.16 + n²)³; m > 0.4: Δσh = (P/H²)·1.77·m²·n²/(m² + n²)³;
 *   times r/2. Both NAVFAC forms are integrated over 0..H in closed form.
 */
import type { Restraint } from './types';
import { accumulateEach, NO_EDGES, type SurchargeEffect } from './surcharge';

export function restraintFactor(restraint: Restraint): number {
  return restraint === 'unyielding' ? 2 : 1;
}

/** Strip pressure Δσh (kPa) at depth z; at z = 0 it takes the limit from below the surface. */
export function elasticStripPressure(q: number, offset: number, width: number, z: number, r: number): number {
  const x1 = offset;
  const x2 = offset + width;
  if (z <= 0) return x1 === 0 ? (r * q) / 2 : 0;
  const z2 = z * z;
  const beta = Math.atan2(width * z, z2 + x1 * x2);
  const s = (x2 * z) / (x2 * x2 + z2) - (x1 * z) / (x1 * x1 + z2);
  return ((r * q) / Math.PI) * (beta - s);
}

/** Antiderivative in x of ∫0..H z·(line-load pressure at offset x) dz, per unit q·r/π. */
function stripFirstMomentPrimitive(x: number, H: number): number {
  return ((x * x) / 2) * Math.atan2(H, x) - (H / 2) * (x - H * Math.atan2(x, H));
}

class StripEffect implements SurchargeEffect {
  readonly force: number;
  readonly moment: number;
  readonly top = 0;
  readonly edges = NO_EDGES;
  constructor(
    private readonly q: number,
    private readonly offset: number,
    private readonly width: number,
    readonly bottom: number,
    private readonly r: number,
  ) {
    const H = bottom;
    const c = (r * q) / Math.PI;
    const x2 = offset + width;
    this.force = c * H * (Math.atan2(x2, H) - Math.atan2(offset, H));
    const firstMoment = c * (stripFirstMomentPrimitive(x2, H) - stripFirstMomentPrimitive(offset, H));
    this.moment = H * this.force - firstMoment;
  }
  pressureAt(z: number): number {
    return elasticStripPressure(this.q, this.offset, this.width, z, this.r);
  }
  accumulate(z: ArrayLike<number>, layer: ArrayLike<number>, out: Float64Array): void {
    accumulateEach(this, z, layer, out);
  }
}

export function elasticStrip(q: number, offset: number, width: number, H: number, r: number): SurchargeEffect {
  return new StripEffect(q, offset, width, H, r);
}

/**
 * The two NAVFAC forms share one shape: Δσh = (r/2)·(F/H^h)·c·n^k/(a + n²)^j with c, a = 0.20 or
 * 0.28, 0.16 when m ≤ 0.4 and c = cFar·m², a = m² beyond; the line load has h = 1, k = 1, j = 2 and
 * the point load h = 2, k = 2, j = 3.
 */
interface NavfacForm {
  near: number;
  far: number;
  h: 1 | 2;
  k: 1 | 2;
  j: 2 | 3;
}
const LINE_FORM: NavfacForm = { near: 0.2, far: 1.28, h: 1, k: 1, j: 2 };
const POINT_FORM: NavfacForm = { near: 0.28, far: 1.77, h: 2, k: 2, j: 3 };

function navfacCoefficients(form: NavfacForm, m: number): [c: number, a: number] {
  return m <= 0.4 ? [form.near, 0.16] : [form.far * m * m, m * m];
}

/** Effect with force (r/2)·F·c·∫f dn / H^(h−1) and moment (r/2)·F·c·∫f·(1 − n) dn · H^(2−h). */
class NavfacEffect implements SurchargeEffect {
  readonly force: number;
  readonly moment: number;
  readonly top = 0;
  readonly edges = NO_EDGES;
  private readonly scale: number;
  private readonly a: number;
  constructor(
    private readonly form: NavfacForm,
    F: number,
    offset: number,
    readonly bottom: number,
    r: number,
    integrals: (a: number) => [number, number],
  ) {
    const H = bottom;
    const [c, a] = navfacCoefficients(form, offset / H);
    const [i0, i1] = integrals(a);
    const k = (r / 2) * F * c;
    this.force = (k * i0) / H ** (form.h - 1);
    this.moment = k * (i0 - i1) * H ** (2 - form.h);
    this.scale = k / H ** form.h;
    this.a = a;
  }
  pressureAt(z: number): number {
    const n = z / this.bottom;
    const den = this.a + n * n;
    return this.form.k === 1 ? (this.scale * n) / (den * den) : (this.scale * n * n) / (den * den * den);
  }
  accumulate(z: ArrayLike<number>, layer: ArrayLike<number>, out: Float64Array): void {
    accumulateEach(this, z, layer, out);
  }
}

function navfacEffect(
  form: NavfacForm,
  F: number,
  offset: number,
  H: number,
  r: number,
  integrals: (a: number) => [number, number],
): SurchargeEffect {
  return new NavfacEffect(form, F, offset, H, r, integrals);
}

/** ∫0..1 n/(a+n²)² dn and ∫0..1 n²/(a+n²)² dn. */
function lineIntegrals(a: number): [number, number] {
  const sa = Math.sqrt(a);
  return [0.5 * (1 / a - 1 / (a + 1)), Math.atan(1 / sa) / (2 * sa) - 1 / (2 * (a + 1))];
}

/** ∫0..1 n²/(a+n²)³ dn and ∫0..1 n³/(a+n²)³ dn, via I_k = ∫0..1 (a + n²)^-k dn and its reduction formula. */
function pointIntegrals(a: number): [number, number] {
  const sa = Math.sqrt(a);
  const I1 = Math.atan(1 / sa) / sa;
  const I2 = 1 / (2 * a * (a + 1)) + I1 / (2 * a);
  const I3 = 1 / (4 * a * (a + 1) * (a + 1)) + (3 / (4 * a)) * I2;
  const k3 = 0.5 * (1 / a - 1 / (a + 1) - (a / 2) * (1 / (a * a) - 1 / ((a + 1) * (a + 1))));
  return [I2 - a * I3, k3];
}

export function navfacLine(Q: number, offset: number, H: number, r: number): SurchargeEffect {
  return navfacEffect(LINE_FORM, Q, offset, H, r, lineIntegrals);
}

export function navfacPoint(P: number, offset: number, H: number, r: number): SurchargeEffect {
  return navfacEffect(POINT_FORM, P, offset, H, r, pointIntegrals);
}
