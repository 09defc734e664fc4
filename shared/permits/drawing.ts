/**
 * Helpers for drawings to scale, shared by the browser's diagrams (SVG) and the printed permit (PDF):
 * round tick steps, the scale of a plan, and a scale bar's length. Units as given (m, kPa).
 */

/** A round step (1, 2 or 5 × 10ⁿ) giving about `count` intervals over `span`. */
export function niceStep(span: number, count = 5): number {
  if (!(span > 0)) return 1;
  const raw = span / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
}

/** Ticks from 0 (or the first multiple of the step at or below `min`) to at least `max`. */
export function ticks(min: number, max: number, count = 5): number[] {
  const step = niceStep(max - min, count);
  const out: number[] = [];
  const start = Math.floor(min / step) * step;
  for (let v = start; v <= max + step * 1e-9; v += step) out.push(Math.round(v / step) * step);
  if (out[out.length - 1] < max - 1e-9) out.push(out[out.length - 1] + step);
  return out;
}

/** Printed plan scales, 1:n. */
const PLAN_SCALES = [50, 100, 200, 250, 500, 1000, 1250, 2000, 2500, 5000] as const;
export const POINTS_PER_METRE_OF_PAPER = 72 / 0.0254;

/** The largest printed scale (smallest n) at which `widthM` × `heightM` metres fit in a box of points. */
export function planScale(widthM: number, heightM: number, boxW: number, boxH: number): number {
  for (const n of PLAN_SCALES) {
    const k = POINTS_PER_METRE_OF_PAPER / n;
    if (widthM * k <= boxW && heightM * k <= boxH) return n;
  }
  return PLAN_SCALES[PLAN_SCALES.length - 1];
}

/** A scale bar's length in metres: a round number taking roughly a quarter of `spanM`. */
export function scaleBarLength(spanM: number): number {
  return niceStep(spanM, 4);
}
