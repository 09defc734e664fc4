import { describe, expect, it } from 'vitest';
import { sixRequest } from '../engineering/test-fixtures';
import { parseCalcRequest } from './calc';

const six = (): Record<string, any> => JSON.parse(JSON.stringify(sixRequest()));

function errors(mutate: (r: any) => void): string[] {
  const r = six();
  mutate(r);
  const p = parseCalcRequest(r);
  return p.ok ? [] : p.errors;
}

describe('calc request schema (docs/calculation.md, "Refusals")', () => {
  it('accepts the example request and fills the defaults (docs/calculation.md, "Command line")', () => {
    const p = parseCalcRequest({
      excavation: { depth: 3, designSurcharge: 10 },
      soil: [{ top: 0, unitWeight: 19, frictionAngle: 30 }],
      method: 'elastic',
      loads: [],
    });
    expect(p.ok && p.value).toMatchObject({
      excavation: { groundwaterDepth: null, ratedPressure: null, pressureState: 'active', wallFriction: 0, restraint: 'unyielding' },
      minimumClearance: 0.6,
      step: 0.05,
    });
    expect(parseCalcRequest(six()).ok).toBe(true);
  });

  it.each<[string, (r: any) => void, string]>([
    ['NaN', (r) => (r.excavation.depth = NaN), 'excavation.depth: must be a finite number'],
    ['Infinity', (r) => (r.loads[0].pressure = Infinity), 'loads[0].pressure: must be a finite number'],
    ['a number as text', (r) => (r.soil[0].unitWeight = '19'), 'soil[0].unitWeight: must be a number, not the text "19"'],
    ['negative offset', (r) => (r.loads[0].offset = -0.1), 'loads[0].offset: must be at least 0 m'],
    ['zero width', (r) => (r.loads[0].width = 0), 'loads[0].width: must be greater than 0 m'],
    [
      'shallowest layer below ground',
      (r) => (r.soil[0].top = 0.5),
      'soil[0].top: the shallowest layer must start at ground level (top 0 m)',
    ],
    ['negative layer top', (r) => r.soil.push({ top: -1, unitWeight: 18, frictionAngle: 30 }), 'soil[1].top: must be at least 0 m'],
    [
      'repeated layer top',
      (r) => r.soil.push({ top: 0, unitWeight: 18, frictionAngle: 30 }),
      'soil[1].top: repeats the top of soil[0] (0 m)',
    ],
    ['negative wall friction', (r) => (r.excavation.wallFriction = -5), 'excavation.wallFriction: must be at least 0°'],
    ['a step out of range', (r) => (r.step = 2), 'step: must be at most 0.5 m'],
    [
      'both drained and undrained',
      (r) => (r.soil[0].undrainedShearStrength = 30),
      'soil[0].undrainedShearStrength: give either frictionAngle (drained) or undrainedShearStrength (undrained), not both',
    ],
    ['a misspelt field', (r) => (r.soil[0].saturatedUnitweight = 20), 'soil[0].saturatedUnitweight: is not a known field'],
    ['repeated load ids', (r) => r.loads.push({ ...r.loads[0] }), 'loads[1].id: repeats the id of loads[0] ("footing")'],
    [
      'an unknown method',
      (r) => (r.method = 'finite-element'),
      'method: must be one of dispersion-45, elastic (got the text "finite-element")',
    ],
  ])('rejects %s, naming the field', (_what, mutate, message) => {
    expect(errors(mutate)).toContain(message);
  });

  // Every bound of docs/calculation.md, "Refusals", one by one at just beyond it.
  const clay = { top: 0, unitWeight: 18, undrainedShearStrength: 40 };
  it.each<[string, (r: any) => void, string]>([
    ['depth beyond 50 m', (r) => (r.excavation.depth = 50.01), 'excavation.depth: must be at most 50 m'],
    ['groundwater beyond 1,000 m', (r) => (r.excavation.groundwaterDepth = 1000.5), 'excavation.groundwaterDepth: must be at most 1,000 m'],
    ['negative groundwater depth', (r) => (r.excavation.groundwaterDepth = -0.5), 'excavation.groundwaterDepth: must be at least 0 m'],
    [
      'design surcharge beyond 10,000 kPa',
      (r) => (r.excavation.designSurcharge = 10001),
      'excavation.designSurcharge: must be at most 10,000 kPa',
    ],
    [
      'rated pressure beyond 10,000 kPa',
      (r) => (r.excavation.ratedPressure = 1e308),
      'excavation.ratedPressure: must be at most 10,000 kPa',
    ],
    ['zero rated pressure', (r) => (r.excavation.ratedPressure = 0), 'excavation.ratedPressure: must be greater than 0 kPa'],
    ['wall friction beyond 60°', (r) => (r.excavation.wallFriction = 61), 'excavation.wallFriction: must be at most 60°'],
    [
      'a layer top beyond 1,000 m',
      (r) => r.soil.push({ top: 1001, unitWeight: 18, frictionAngle: 30 }),
      'soil[1].top: must be at most 1,000 m',
    ],
    ['unit weight 0', (r) => (r.soil[0].unitWeight = 0), 'soil[0].unitWeight: must be greater than 0 kN/m³'],
    ['unit weight beyond 30 kN/m³', (r) => (r.soil[0].unitWeight = 31), 'soil[0].unitWeight: must be at most 30 kN/m³'],
    [
      'saturated unit weight below γw',
      (r) => (r.soil[0].saturatedUnitWeight = 9.8),
      'soil[0].saturatedUnitWeight: must be at least the unit weight of water, 9.81 kN/m³ (a lighter soil would have negative effective stress)',
    ],
    [
      'saturated unit weight beyond 30 kN/m³',
      (r) => (r.soil[0].saturatedUnitWeight = 30.5),
      'soil[0].saturatedUnitWeight: must be at most 30 kN/m³',
    ],
    [
      'a light layer below the water table without a saturated unit weight',
      (r) => {
        r.soil = [{ top: 0, unitWeight: 9, frictionAngle: 30 }];
        r.excavation.groundwaterDepth = 1;
      },
      'soil[0].saturatedUnitWeight: is required for a layer below the water table whose unitWeight (9 kN/m³) is below that of water, 9.81 kN/m³',
    ],
    ['cohesion beyond 10,000 kPa', (r) => (r.soil[0].cohesion = 10001), 'soil[0].cohesion: must be at most 10,000 kPa'],
    ['negative cohesion', (r) => (r.soil[0].cohesion = -1), 'soil[0].cohesion: must be at least 0 kPa'],
    [
      'cohesion on an undrained layer',
      (r) => (r.soil = [{ ...clay, cohesion: 10 }]),
      'soil[0].cohesion: does not apply to an undrained layer (its strength is undrainedShearStrength): leave it out',
    ],
    [
      'cu beyond 10,000 kPa',
      (r) => (r.soil = [{ ...clay, undrainedShearStrength: 10001 }]),
      'soil[0].undrainedShearStrength: must be at most 10,000 kPa',
    ],
    [
      'at rest with an undrained layer',
      (r) => {
        r.soil.push({ ...clay, top: 1.5 });
        r.excavation.pressureState = 'at-rest';
      },
      'soil[1].undrainedShearStrength: soil[1] (from 1.5 m) is undrained: at rest needs φ′ (frictionAngle) for every layer; give its drained strength or check it as active',
    ],
    ['a 1e308 kPa strip', (r) => (r.loads[0].pressure = 1e308), 'loads[0].pressure: must be at most 10,000 kPa'],
    ['a strip wider than 1,000 m', (r) => (r.loads[0].width = 1e6), 'loads[0].width: must be at most 1,000 m'],
    ['an offset beyond 1,000 m', (r) => (r.loads[0].offset = 1e308), 'loads[0].offset: must be at most 1,000 m'],
    [
      'a blanket beyond 10,000 kPa',
      (r) => r.loads.push({ id: 'b', kind: 'blanket', pressure: 20000 }),
      'loads[1].pressure: must be at most 10,000 kPa',
    ],
    [
      'a line load beyond 100,000 kN/m',
      (r) => r.loads.push({ id: 'l', kind: 'line', force: 100001, offset: 1 }),
      'loads[1].force: must be at most 100,000 kN/m',
    ],
    [
      'a point load beyond 100,000 kN',
      (r) => r.loads.push({ id: 'p', kind: 'point', force: 1e308, offset: 1 }),
      'loads[1].force: must be at most 100,000 kN',
    ],
    [
      'a pad beyond 1,000 m',
      (r) => r.loads.push({ id: 'p', kind: 'point', force: 10, offset: 1, padWidth: 1001 }),
      'loads[1].padWidth: must be at most 1,000 m',
    ],
    [
      'an area longer than 1,000 m',
      (r) => r.loads.push({ id: 'a', kind: 'area', pressure: 10, width: 1, length: 1001, offset: 1 }),
      'loads[1].length: must be at most 1,000 m',
    ],
    [
      'a negative force',
      (r) => r.loads.push({ id: 'l', kind: 'line', force: -5, offset: 1 }),
      'loads[1].force: must be greater than 0 kN/m',
    ],
    ['minimum clearance beyond 10 m', (r) => (r.minimumClearance = 10.5), 'minimumClearance: must be at most 10 m'],
    ['a step below 0.005 m', (r) => (r.step = 0.001), 'step: must be at least 0.005 m'],
    ['negative infinity', (r) => (r.excavation.designSurcharge = -Infinity), 'excavation.designSurcharge: must be a finite number'],
  ])('refuses %s, naming the field', (_what, mutate, message) => {
    expect(errors(mutate)).toContain(message);
  });

  it('accepts every bound itself', () => {
    expect(
      errors((r) => {
        r.excavation.depth = 50;
        r.excavation.designSurcharge = 10000;
        r.soil[0].saturatedUnitWeight = 9.81;
        r.soil[0].unitWeight = 30;
        r.loads = [
          { id: 'l', kind: 'line', force: 100000, offset: 1000 },
          { id: 'p', kind: 'point', force: 100000, offset: 0, padWidth: 1000, padLength: 1000 },
        ];
      }),
    ).toEqual([]);
  });

  it('drops a cohesion of 0 on an undrained layer (records saved before the rule carry it) and keeps c′ on a drained one', () => {
    const p = parseCalcRequest({
      ...six(),
      soil: [
        { ...clay, cohesion: 0 },
        { top: 1, unitWeight: 19, frictionAngle: 30 },
      ],
    });
    expect(p.ok).toBe(true);
    if (p.ok) {
      expect(p.value.soil[0]).not.toHaveProperty('cohesion');
      expect(p.value.soil[1].cohesion).toBe(0);
    }
  });

  it('an undrained layer needs no friction angle and is exempt from δ ≤ φ′', () => {
    expect(
      errors((r) => {
        r.soil = [{ top: 0, unitWeight: 18, undrainedShearStrength: 40 }];
        r.excavation.wallFriction = 15;
      }),
    ).toEqual([]);
  });
});
