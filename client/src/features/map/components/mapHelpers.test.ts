import { describe, expect, it } from 'vitest';
import { excavationInputSchema } from '@shared/schemas/excavations';
import { gridLabel, gridStep } from '@client/components/map/metricGrid';
import { emptyRow, nextReference, toInput, type ExcavationFormValues } from './excavationFormValues';

describe('offline grid', () => {
  // At 52.4° N a screen of 96 px per inch shows 1:200 at about 19 px per metre and 1:5000 at about 0.76 px per metre.
  it('keeps lines at least 36 px apart from 1:200 to 1:5000', () => {
    expect(gridStep(18.9)).toEqual({ step: 2, labelEvery: 5 }); // 37.8 px apart; a label every 10 m (189 px)
    expect(gridStep(0.756).step).toBe(50);
    for (const pxPerMetre of [18.9, 7.6, 3.8, 1.5, 0.756]) {
      const { step } = gridStep(pxPerMetre);
      expect(step * pxPerMetre).toBeGreaterThanOrEqual(36);
      expect(step * pxPerMetre).toBeLessThan(36 * 2.5 + 1);
    }
  });

  it('labels distances in metres, and in kilometres from 1 km', () => {
    expect(gridLabel(-40)).toBe('40 m');
    expect(gridLabel(0.5)).toBe('0.5 m');
    expect(gridLabel(1500)).toBe('1.5 km');
  });

  it('labels a grid in feet for a person in US units, with thousands grouped, never in miles', () => {
    expect(gridLabel(-50, 'ft')).toBe('50 ft');
    expect(gridLabel(5000, 'ft')).toBe('5,000 ft');
  });
});

describe('excavation form values', () => {
  const values: ExcavationFormValues = {
    reference: 'TR-09',
    name: 'Drain',
    kind: 'trench',
    geometry: {
      type: 'LineString',
      coordinates: [
        [-1.04833, 52.37124],
        [-1.04803, 52.37124],
      ],
    },
    width: 1.2,
    depth: 2.4,
    state: 'open',
    supportType: 'trench-box',
    designSurcharge: 10,
    ratedPressure: null,
    restraint: 'unyielding',
    pressureState: 'active',
    wallFriction: null,
    soil: [
      { ...emptyRow(0), unitWeight: 18, frictionAngle: 28, undrainedShearStrength: 99 },
      { ...emptyRow(0.8), unitWeight: 19.5, model: 'undrained', frictionAngle: 30, undrainedShearStrength: 50 },
    ],
    groundwaterDepth: null,
    designReference: '',
    notes: '',
  };

  it('sends only the strength fields of each layer’s model, and passes the shared schema', () => {
    const input = toInput(values);
    expect(input.soil).toEqual([
      { top: 0, unitWeight: 18, frictionAngle: 28, cohesion: 0 },
      { top: 0.8, unitWeight: 19.5, undrainedShearStrength: 50 },
    ]);
    expect(excavationInputSchema.safeParse(input).success).toBe(true);
  });

  it('names an empty depth and a missing support as the schema does', () => {
    const r = excavationInputSchema.safeParse(toInput({ ...values, depth: null, supportType: '' }));
    expect(r.success).toBe(false);
    expect(r.error!.issues.map((i) => i.path.join('.')).sort()).toEqual(['depth', 'supportType']);
  });

  it('suggests the next free reference of the kind', () => {
    expect(nextReference('trench', ['TR-01', 'TR-02', 'PIT-01', 'TR-x'])).toBe('TR-03');
    expect(nextReference('pit', ['TR-01'])).toBe('PIT-01');
  });
});
