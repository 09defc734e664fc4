import { describe, expect, it } from 'vitest';
import { elementLoad, footprintBounds, stockpilePressure } from './plant';

describe('plant arithmetic', () => {
  it('gives an element its share of the weight times the design factor over its area', () => {
    // 20 t × 9.81 m/s² (standard gravity 9.80665, rounded as in common practice) = 196.2 kN; half on a
    // 3 m × 0.6 m track, factor 1.5: 147.15 kN, 81.75 kPa (arithmetic). The figures pin the gravity used.
    const r = elementLoad(
      { operatingMass: 20, designFactor: 1.5 },
      { name: 't', kind: 'track', x: 0, y: 1, length: 3, width: 0.6, share: 0.5 },
    );
    expect(r.force).toBeCloseTo(147.15, 6);
    expect(r.pressure).toBeCloseTo(81.75, 6);
  });

  it('finds the plan extent of all elements', () => {
    // Two 3 m × 0.6 m tracks centred 1 m either side of the origin: x from -1.5 to 1.5, y from -1.3 to 1.3.
    const b = footprintBounds([
      { x: 0, y: 1, length: 3, width: 0.6 },
      { x: 0, y: -1, length: 3, width: 0.6 },
    ]);
    expect(b).toEqual({ minX: -1.5, maxX: 1.5, minY: -1.3, maxY: 1.3 });
  });

  it('takes a stockpile pressure as unit weight × height (19 kN/m³ × 2 m = 38 kPa)', () => {
    expect(stockpilePressure(19, 2)).toBe(38);
    expect(stockpilePressure(20, 1.5)).toBe(30);
  });
});
