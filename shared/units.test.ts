/**
 * Units at the edges (shared/units.ts). Every factor is checked against the value NIST Special
 * Publication 811 (2008), Appendix B.8 "Factors for units listed alphabetically", prints beside it:
 * seven significant figures, so each check is to a relative 5e-7 unless NIST marks it exact.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  FOOT,
  INCH,
  KIP,
  POUND_FORCE,
  formatLength,
  formatQuantity,
  fromSI,
  fromSystem,
  inSystem,
  inputText,
  localizeWords,
  parseQuantity,
  roundTo,
  toSI,
  unitLabel,
  type Quantity,
} from './units';

/** Equal to the published figure to its printed significant figures. */
function expectPublished(actual: number, published: number, figures = 7) {
  expect(Math.abs(actual - published) / Math.abs(published)).toBeLessThan(0.5 * 10 ** (1 - figures));
}

const parsed = (text: string, q: Quantity, system: 'metric' | 'us' = 'us') => {
  const r = parseQuantity(text, q, system);
  if (!r.ok) throw new Error(`${text}: ${r.reason}`);
  return r.value;
};

describe('factors (NIST SP 811, 2008, Appendix B.8)', () => {
  it('the foot and the inch are exact', () => {
    expect(FOOT).toBe(0.3048); // NIST SP 811 B.8: foot (ft) = 3.048 E-01 m, exact
    expect(INCH).toBe(0.0254); // NIST SP 811 B.8: inch (in) = 2.54 E-02 m, exact
    expect(toSI('length', 12, 'in')).toBeCloseTo(toSI('length', 1, 'ft'), 15);
  });

  it('pound-force and kip', () => {
    // NIST SP 811 B.8: pound-force (lbf) = 4.448 222 E+00 N; its derivation 0.45359237 kg × 9.80665 m/s²
    // (pound, avoirdupois, exact; standard acceleration of free fall, exact) gives 4.4482216152605 N.
    expectPublished(POUND_FORCE, 4.448222);
    expect(POUND_FORCE).toBeCloseTo(4.4482216152605, 13);
    // NIST SP 811 B.8: kip (1 kip = 1000 lbf) = 4.448 222 E+03 N.
    expectPublished(KIP, 4448.222);
    expectPublished(toSI('force', 1, 'kip'), 4.448222); // kN
    expectPublished(toSI('force', 1, 'lbf'), 4.448222e-3); // kN
  });

  it('pressures', () => {
    // NIST SP 811 B.8: pound-force per square foot (lbf/ft²) = 4.788 026 E+01 Pa.
    expectPublished(toSI('pressure', 1, 'psf') * 1000, 47.88026);
    // 1 ksf = 1000 lbf/ft² (NIST SP 811 B.8: kip = 1000 lbf), so 4.788 026 E+01 kPa.
    expectPublished(toSI('pressure', 1, 'ksf'), 47.88026);
    // NIST SP 811 B.8: pound-force per square inch (psi) = 6.894 757 E+00 kPa.
    expectPublished(toSI('pressure', 1, 'psi'), 6.894757);
  });

  it('line loads and unit weights', () => {
    // NIST SP 811 B.8: pound-force per foot (lbf/ft) = 1.459 390 E+01 N/m.
    expectPublished(toSI('lineForce', 1, 'lbf/ft') * 1000, 14.5939);
    expectPublished(toSI('lineForce', 1, 'kip/ft'), 14.5939); // kN/m
    // NIST SP 811 B.8: pound per cubic foot (lb/ft³) = 1.601 846 E+01 kg/m³, times the standard
    // acceleration of free fall 9.80665 m/s² (NIST SP 811 §8.2, exact): 157.0875 N/m³ = 0.1570875 kN/m³.
    expectPublished(toSI('unitWeight', 1, 'pcf'), (16.01846 * 9.80665) / 1000, 6);
    expect(toSI('unitWeight', 1, 'pcf')).toBeCloseTo(0.15708746, 8);
  });

  it('masses: the avoirdupois pound and the short ton are exact', () => {
    // NIST SP 811 B.8: pound (avoirdupois) = 0.453 592 37 kg (exact); ton, short (2000 lb) = 907.184 74 kg (exact).
    expect(toSI('mass', 1, 'lb')).toBe(0.00045359237);
    expect(toSI('mass', 1, 'short ton')).toBeCloseTo(0.90718474, 12);
    expect(toSI('mass', 1000, 'kg')).toBe(1);
  });

  it('moments per run of support', () => {
    // NIST SP 811 B.8: pound-force foot (lbf·ft) = 1.355 818 E+00 N·m; per foot of wall, ÷ 0.3048 m.
    expectPublished(toSI('moment', 1, 'lbf·ft/ft') * 1000, 1.355818 / 0.3048, 6);
  });

  it('converting there and back returns the figure', () => {
    const quantities: Quantity[] = ['length', 'pressure', 'force', 'lineForce', 'unitWeight', 'moment'];
    fc.assert(
      fc.property(fc.constantFrom(...quantities), fc.double({ min: 1e-6, max: 1e6, noNaN: true }), (q, si) => {
        expect(fromSystem(q, inSystem(q, si, 'us'), 'us')).toBeCloseTo(si, 9);
      }),
    );
  });
});

describe('facts of the trade in both systems', () => {
  it("OSHA's 2 ft is 0.61 m", () => {
    // OSHA 29 CFR 1926.651(j)(2): "at least 2 feet (.61 m) from the edge of excavations".
    expect(toSI('length', 2, 'ft')).toBeCloseTo(0.6096, 10);
    expect(formatLength(0.6096, 'metric')).toBe('0.61 m');
    expect(formatLength(0.6096, 'us')).toBe('2.0 ft');
    expect(formatLength(0.6096, 'us', { rounding: 'up' })).toBe('2.0 ft'); // exact: no creep to 2.1 ft
    expect(formatLength(0.6096, 'us', { feetInches: true, rounding: 'up' })).toBe('2 ft');
  });

  it('a 120 pcf soil is 18.85 kN/m³; 10 kPa is 209 psf', () => {
    // NIST SP 811 factors above: 120 × 0.1570875 = 18.850 kN/m³; 10 / 0.04788026 = 208.85 psf.
    expect(formatQuantity('unitWeight', toSI('unitWeight', 120, 'pcf'), 'metric')).toBe('18.9 kN/m³');
    expect(formatQuantity('pressure', 10, 'us')).toBe('209 psf');
  });
});

describe('formatting', () => {
  it('to sensible precision: 0.01 m, 0.1 ft or 1 in', () => {
    expect(formatLength(2.5, 'metric')).toBe('2.50 m');
    expect(formatLength(2.5, 'us')).toBe('8.2 ft'); // 2.5 / 0.3048 = 8.2021 ft (NIST SP 811 foot)
    expect(formatLength(2.5, 'us', { rounding: 'up' })).toBe('8.3 ft');
    expect(formatLength(2.55, 'us')).toBe('8.4 ft'); // 2.55 / 0.3048 = 8.3661 ft (NIST SP 811 foot)
    expect(formatLength(2.55, 'us', { rounding: 'down' })).toBe('8.3 ft'); // a standoff that falls short never reads as more
    expect(formatLength(2.5, 'us', { feetInches: true })).toBe('8 ft 2 in'); // 98.43 in
    expect(formatLength(2.5, 'us', { feetInches: true, rounding: 'up' })).toBe('8 ft 3 in');
    expect(formatLength(0.3, 'us', { feetInches: true })).toBe('1 ft'); // 11.81 in → 12 in = 1 ft
    expect(formatLength(0.2, 'us', { feetInches: true })).toBe('8 in'); // 7.87 in
  });

  it('a standoff rounded up never reads less than the distance (any length)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 30_000 }), (cm) => {
        const m = cm / 100;
        const ft = Number(formatLength(m, 'us', { rounding: 'up', bare: true }).replace(/,/g, ''));
        expect(ft * FOOT).toBeGreaterThanOrEqual(m - 1e-9);
      }),
    );
  });

  it('forces, pressures and unit weights', () => {
    expect(formatQuantity('pressure', 20, 'metric')).toBe('20.0 kPa');
    expect(formatQuantity('pressure', 20, 'us')).toBe('418 psf'); // 20 / 0.04788026 = 417.7
    expect(formatQuantity('force', 50, 'us')).toBe('11.24 kip'); // 50 / 4.448222 = 11.241
    expect(formatQuantity('lineForce', 20, 'us')).toBe('1,370 lbf/ft'); // 20 / 0.01459390 = 1370.4
    expect(formatQuantity('lineForce', 20, 'us', { bare: true })).toBe('1,370');
    // 21 t / 0.00045359237 t/lb = 46,297 lb, shown to the nearest 100 lb.
    expect(formatQuantity('mass', 21, 'us')).toBe('46,300 lb');
    expect(formatQuantity('mass', 21, 'metric')).toBe('21.0 t');
    expect(parsed('46,300 lb', 'mass')).toBeCloseTo(21.0013, 4);
    expect(parsed('23 tons', 'mass')).toBeCloseTo(20.865, 3); // 23 × 0.90718474 t
    // A weight in kip or lbf is the mass it weighs under standard gravity: 1 lbf is the weight of 1 lb
    // (NIST SP 811 B.8: pound-force = 0.45359237 kg × 9.80665 m/s², exact), so 46.3 kip = 46,300 lb.
    expect(parsed('46.3 kip', 'mass')).toBeCloseTo(21.0013, 4);
    expect(parsed('46,300 lbf', 'mass')).toBeCloseTo(parsed('46,300 lb', 'mass'), 12);
    expect(parsed('21', 'mass', 'metric')).toBe(21);
    expect(unitLabel('pressure', 'us')).toBe('psf');
    expect(unitLabel('length', 'metric')).toBe('m');
  });

  it('roundTo keeps exact steps and rounds up only when asked', () => {
    expect(roundTo(8.2021, 0.1)).toBe(8.2);
    expect(roundTo(8.2021, 0.1, 'up')).toBe(8.3);
    expect(roundTo(8.2, 0.1, 'up')).toBe(8.2);
    expect(roundTo(0.6096 / 0.3048, 0.1, 'up')).toBe(2);
  });

  it('inputText keeps enough figures to read back the saved value', () => {
    expect(inputText('length', 2.5, 'us')).toBe('8.2021');
    expect(inputText('length', 2.5, 'metric')).toBe('2.5');
    expect(inputText('length', null, 'us')).toBe('');
    expect(Math.abs(parsed(inputText('length', 2.5, 'us'), 'length') - 2.5)).toBeLessThan(0.0001);
  });
});

describe('parsing what people type, in either system', () => {
  it('lengths', () => {
    expect(parsed('2 ft 6 in', 'length')).toBeCloseTo(0.762, 12); // 30 × 0.0254 (NIST SP 811, exact)
    expect(parsed('2.5 ft', 'length')).toBeCloseTo(0.762, 12);
    expect(parsed('30 in', 'length')).toBeCloseTo(0.762, 12);
    expect(parsed(`2' 6"`, 'length')).toBeCloseTo(0.762, 12);
    expect(parsed(`2'-6"`, 'length')).toBeCloseTo(0.762, 12);
    expect(parsed('2ft6in', 'length')).toBeCloseTo(0.762, 12);
    expect(parsed('2 ft 6', 'length')).toBeCloseTo(0.762, 12);
    expect(parsed('2.5', 'length')).toBeCloseTo(0.762, 12); // a bare number is in the person's system
    expect(parsed('2.5', 'length', 'metric')).toBe(2.5);
    expect(parsed('2.5 m', 'length')).toBe(2.5); // metric typed by a US user still reads as metres
    expect(parsed('250 mm', 'length', 'metric')).toBeCloseTo(0.25, 12);
    expect(parsed('1 m 20 cm', 'length', 'metric')).toBeCloseTo(1.2, 12);
    expect(parsed('3 Feet', 'length')).toBeCloseTo(0.9144, 12);
  });

  it('pressures, forces, line loads and unit weights', () => {
    expect(parsed('500 psf', 'pressure')).toBeCloseTo(23.94013, 5); // 500 × 0.04788026 kPa (NIST SP 811)
    expect(parsed('0.5 ksf', 'pressure')).toBeCloseTo(23.94013, 5);
    expect(parsed('500', 'pressure')).toBeCloseTo(23.94013, 5);
    expect(parsed('20 kPa', 'pressure')).toBe(20);
    expect(parsed('10 kip', 'force')).toBeCloseTo(44.482216, 6); // 10 × 4.448222 kN (NIST SP 811)
    expect(parsed('2,000 lbf', 'force')).toBeCloseTo(8.896443, 6);
    expect(parsed('10', 'force')).toBeCloseTo(44.482216, 6);
    expect(parsed('45 kN', 'force', 'metric')).toBe(45);
    expect(parsed('2 kip/ft', 'lineForce')).toBeCloseTo(29.18781, 5); // 2 × 14.59390 kN/m (NIST SP 811)
    expect(parsed('500 lb/ft', 'lineForce')).toBeCloseTo(7.29695, 5);
    expect(parsed('30 kN/m', 'lineForce', 'us')).toBe(30);
    expect(parsed('120 pcf', 'unitWeight')).toBeCloseTo(18.8505, 4); // 120 × 0.1570875 (NIST SP 811 × gn)
    expect(parsed('19 kN/m3', 'unitWeight')).toBe(19);
    expect(parsed('19 kN/m³', 'unitWeight')).toBe(19);
  });

  it('refuses what it cannot read, saying why and how to write it', () => {
    const reasons = ['', 'two feet', '2 ft 6 in 3', '6 in 2 ft', '2 psf', '2,5 m', '1 ft ft', '2 kip 3 kip', '--2'].map((t) => {
      const r = parseQuantity(t, 'length', 'us');
      expect(r.ok, t).toBe(false);
      return r.ok ? '' : r.reason;
    });
    expect(reasons[0]).toBe('is required');
    expect(reasons[1]).toMatch(/2 ft 6 in/);
    expect(reasons[4]).toMatch(/unit Brink does not know here \("psf"\)/);
    const kpaAsForce = parseQuantity('20 kPa', 'force', 'metric');
    expect(kpaAsForce).toEqual({ ok: false, reason: expect.stringMatching(/10 kip/) });
  });

  it('fromSI and toSI are inverse', () => {
    expect(fromSI('pressure', toSI('pressure', 500, 'psf'), 'psf')).toBeCloseTo(500, 10);
  });
});

describe('sentences written in SI, read in US units', () => {
  it('states a limit on its safe side: least values up, greatest values down, so the figure shown is accepted when typed back', () => {
    // 0.3 m = 0.98425 ft and 6 m = 19.685 ft (NIST SP 811 B.8: 1 ft = 0.3048 m exactly).
    expect(localizeWords('must be between 0.3 and 6 m', 'us')).toBe('must be between 0.99 ft and 19.68 ft');
    expect(localizeWords('must be at least 0.3 m', 'us')).toBe('must be at least 0.99 ft');
    expect(localizeWords('must be at most 6 m', 'us')).toBe('must be at most 19.68 ft');
    expect(localizeWords('must be more than 0 and at most 20 m', 'us')).toBe('must be more than 0 and at most 65.61 ft'); // 65.617
    // 30 kN/m³ ÷ 0.1570875 kN/m³ per pcf = 190.98 pcf, at most 190 pcf.
    expect(localizeWords('must be at most 30 kN/m³', 'us')).toBe('must be at most 190 pcf');
    // A figure that is neither stays to the nearest: 2.5 m = 8.2021 ft.
    expect(localizeWords('the trench is 2.5 m deep', 'us')).toBe('the trench is 8.20 ft deep');
    // Kilometres in miles (NIST SP 811 B.8: mile = 1.609344 E+03 m, exact): a limit "within" rounds down.
    expect(localizeWords('must lie within 5 km of the site origin (a point is 6.2 km from it)', 'us')).toBe(
      'must lie within 3.10 mi of the site origin (a point is 3.85 mi from it)',
    ); // 5 / 1.609344 = 3.1069; 6.2 / 1.609344 = 3.8525
    expect(0.99 * 0.3048).toBeGreaterThanOrEqual(0.3);
    expect(19.68 * 0.3048).toBeLessThanOrEqual(6);
  });

  it('restates each figure with its unit (NIST SP 811 factors above)', () => {
    expect(localizeWords('load a: 0.5 m from the face is closer than the minimum clearance of 0.6096 m', 'us')).toBe(
      'load a: 1.64 ft from the face is closer than the minimum clearance of 2.00 ft',
    );
    expect(localizeWords('soil + water ≥ 5 kPa/m × depth', 'us')).toBe('soil + water ≥ 32 psf/ft × depth'); // 5 ÷ 0.04788026 × 0.3048 = 31.8
    expect(localizeWords('must be at most 10,000 kPa', 'us')).toBe('must be at most 208,854 psf');
    expect(localizeWords('water, 9.81 kN/m³', 'us')).toBe('water, 62 pcf'); // 9.81 ÷ 0.1570875 = 62.45
    // Greatest values round down: 100,000 kN/m ÷ 0.01459390 kN/m per lbf/ft = 6,852,176.6 → 6,852,176
    // (6,852,177 lbf/ft would be just over the limit); 100,000 kN ÷ 4.448222 kN/kip = 22,480.894.
    expect(localizeWords('at most 100,000 kN/m; a point at most 100,000 kN', 'us')).toBe(
      'at most 6,852,176 lbf/ft; a point at most 22,480.89 kip',
    );
    expect(localizeWords('φ′ 30°, 3 m deep', 'metric')).toBe('φ′ 30°, 3 m deep');
    // Already in US units: unchanged.
    expect(localizeWords('must be at least 9.9 ft, or give a reason (500 psf, 121 pcf)', 'us')).toBe(
      'must be at least 9.9 ft, or give a reason (500 psf, 121 pcf)',
    );
    expect(localizeWords('a 2 mm gap in 3 months', 'us')).toBe('a 2 mm gap in 3 months');
    // 1000 t ÷ 0.00045359237 t/lb = 2,204,622.6 lb (NIST SP 811 B.8: pound (avoirdupois)).
    expect(localizeWords('must be at most 1000 t', 'us')).toBe('must be at most 2,204,622 lb');
    expect(localizeWords('a 5 t limit, not a tonne of text at 3 tph', 'us')).toBe('a 11,023 lb limit, not a tonne of text at 3 tph');
  });
});
