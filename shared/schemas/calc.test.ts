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

describe('calc request schema (engineering.md §1, §2, §6)', () => {
  it('accepts the §6 request and fills the defaults', () => {
    const p = parseCalcRequest({ excavation: { depth: 3, designSurcharge: 10 }, soil: [{ top: 0, unitWeight: 19, frictionAngle: 30 }], method: 'elastic', loads: [] });
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
    ['shallowest layer below ground', (r) => (r.soil[0].top = 0.5), 'soil[0].top: the shallowest layer must start at ground level (top 0 m)'],
    ['negative layer top', (r) => r.soil.push({ top: -1, unitWeight: 18, frictionAngle: 30 }), 'soil[1].top: must be at least 0 m'],
    ['repeated layer top', (r) => r.soil.push({ top: 0, unitWeight: 18, frictionAngle: 30 }), 'soil[1].top: repeats the top of soil[0] (0 m)'],
    ['negative wall friction', (r) => (r.excavation.wallFriction = -5), 'excavation.wallFriction: must be at least 0°'],
    ['a step out of range', (r) => (r.step = 2), 'step: must be at most 0.5 m'],
    ['both drained and undrained', (r) => (r.soil[0].undrainedShearStrength = 30), 'soil[0].undrainedShearStrength: give either frictionAngle (drained) or undrainedShearStrength (undrained), not both'],
    ['a misspelt field', (r) => (r.soil[0].saturatedUnitweight = 20), 'soil[0].saturatedUnitweight: is not a known field'],
    ['repeated load ids', (r) => r.loads.push({ ...r.loads[0] }), 'loads[1].id: repeats the id of loads[0] ("footing")'],
    ['an unknown method', (r) => (r.method = 'finite-element'), 'method: must be one of dispersion-45, elastic (got the text "finite-element")'],
  ])('rejects %s, naming the field', (_what, mutate, message) => {
    expect(errors(mutate)).toContain(message);
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
