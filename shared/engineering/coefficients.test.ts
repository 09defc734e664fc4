import { describe, expect, it } from 'vitest';
import { coulombHorizontalK, coulombKa, drainedK, jakyK0, rankineKa } from './coefficients';

describe('earth pressure coefficients', () => {
  // Rankine Ka = tan²(45° − φ′/2), table of Craig's Soil Mechanics (any soil mechanics text).
  it.each([
    [20, 0.4903],
    [25, 0.4059],
    [30, 0.3333],
    [35, 0.271],
    [40, 0.2174],
  ])('Rankine Ka for φ′ = %i° is %f (Craig, Soil Mechanics)', (phi, ka) => {
    expect(rankineKa(phi)).toBeCloseTo(ka, 4);
  });

  it('Coulomb φ′ = 30°, δ = 20°: Ka = 0.2973, horizontal K = 0.2794 (Das, Principles of Foundation Engineering; from memory)', () => {
    expect(coulombKa(30, 20)).toBeCloseTo(0.2973, 4);
    expect(coulombHorizontalK(30, 20)).toBeCloseTo(0.2794, 4);
  });

  it('Coulomb with δ = 0 reduces to Rankine for a vertical wall and level ground (Das; standard result)', () => {
    for (const phi of [20, 28, 36, 45]) expect(coulombKa(phi, 0)).toBeCloseTo(rankineKa(phi), 12);
  });

  it('Jaky K0 = 1 − sin φ′: 0.5 at 30° (Jaky 1944)', () => {
    expect(jakyK0(30)).toBeCloseTo(0.5, 12);
  });

  it('wall friction enters once: active δ > 0 gives Ka·cos δ, at-rest ignores δ (docs/calculation.md, "Soil and water"; common practice)', () => {
    expect(drainedK(30, 'active', 20)).toBeCloseTo(0.2794, 4);
    expect(drainedK(30, 'active', 0)).toBeCloseTo(0.3333, 4);
    expect(drainedK(30, 'at-rest', 20)).toBeCloseTo(0.5, 12);
  });
});
