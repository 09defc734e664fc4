/**
 * Lateral earth pressure coefficients (dimensionless; angles in degrees).
 *
 * - Rankine active, smooth vertical wall, level ground: Ka = tan²(45° − φ′/2)
 *   (Rankine 1857; tabulated in Craig's Soil Mechanics).
 * - Coulomb active, vertical wall, level ground, wall friction δ:
 *   Ka = cos²φ′ / (cos δ · [1 + √(sin(φ′+δ)·sin φ′ / cos δ)]²) (Coulomb 1776; as given in Das,
 *   Principles of Foundation Engineering). The support sees its horizontal component K = Ka·cos δ.
 * - At rest: K0 = 1 − sin φ′ (Jaky 1944).
 *
 * The wall-friction benefit enters exactly once, here, through K; nothing downstream multiplies a
 * pressure by cos δ again (docs/calculation.md, "Soil and water").
 */
import type { PressureState } from './types';

const RAD = Math.PI / 180;

export function rankineKa(frictionAngle: number): number {
  const t = Math.tan((45 - frictionAngle / 2) * RAD);
  return t * t;
}

export function coulombKa(frictionAngle: number, wallFriction: number): number {
  const phi = frictionAngle * RAD;
  const delta = wallFriction * RAD;
  const root = Math.sqrt((Math.sin(phi + delta) * Math.sin(phi)) / Math.cos(delta));
  const c = Math.cos(phi);
  return (c * c) / (Math.cos(delta) * (1 + root) * (1 + root));
}

/** Horizontal component of Coulomb's active thrust coefficient: Ka·cos δ. */
export function coulombHorizontalK(frictionAngle: number, wallFriction: number): number {
  return coulombKa(frictionAngle, wallFriction) * Math.cos(wallFriction * RAD);
}

export function jakyK0(frictionAngle: number): number {
  return 1 - Math.sin(frictionAngle * RAD);
}

/** K of a drained layer for the excavation's pressure state; δ > 0 only changes the active case. */
export function drainedK(frictionAngle: number, state: PressureState, wallFriction: number): number {
  if (state === 'at-rest') return jakyK0(frictionAngle);
  return wallFriction > 0 ? coulombHorizontalK(frictionAngle, wallFriction) : rankineKa(frictionAngle);
}
