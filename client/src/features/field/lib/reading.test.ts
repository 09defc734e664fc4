import { describe, expect, it } from 'vitest';
import { localProjection } from '@shared/geometry';
import type { FieldExcavation } from '@shared/schemas/field';
import { metres, prepareZones, readFix, sideText, type Reading } from './reading';

// A 10 m × 4 m pit with its south-west corner at the site origin, and a 3 m standoff.
const origin = { latitude: 52.2, longitude: 0.12 };
const proj = localProjection([origin.longitude, origin.latitude]);
const ring = [
  [0, 0],
  [10, 0],
  [10, 4],
  [0, 4],
  [0, 0],
].map((p) => proj.toWgs84(p));
const square = { type: 'Polygon' as const, coordinates: [ring] };
const pit: FieldExcavation = {
  id: 1,
  reference: 'P1',
  name: 'Pump pit',
  kind: 'pit',
  state: 'open',
  depth: 4.5,
  supportLabel: 'Sheet piles',
  shape: { kind: 'pit', outline: square },
  outline: square,
  influenceZone: square,
  exclusionZone: square,
  standoff: 3,
  standoffBasis: 'set',
};
const at = (x: number, y: number, accuracy = 0.5) => {
  const [longitude, latitude] = proj.toWgs84([x, y]);
  return { latitude, longitude, accuracy };
};
function distanceOf(r: Reading): number {
  if (r.kind === 'none') throw new Error('no reading');
  return r.distance;
}

describe('reading of where I stand (plane geometry by hand, common practice, no published source)', () => {
  const zones = prepareZones({ origin, excavations: [pit] });

  it('is 2.0 m outside standing 5 m east of the east face', () => {
    const r = readFix(zones, at(15, 2));
    expect(r.kind).toBe('outside');
    expect(distanceOf(r)).toBeCloseTo(2, 6);
    expect(sideText(distanceOf(r))).toBe('2.0 m outside');
    // In US units: 2 m = 6.5617 ft (NIST SP 811 B.8: 1 ft = 0.3048 m), to 0.1 ft.
    expect(sideText(distanceOf(r), 'us')).toBe('6.6 ft outside');
    // A standoff never reads less than it is: 3 m = 9.8425 ft, rounded up.
    expect(metres(3, 'us', 'up')).toBe('9.9 ft');
    expect(metres(3, 'metric', 'up')).toBe('3.0 m');
  });

  it('is 0.8 m inside standing 2.2 m south of the south face', () => {
    const r = readFix(zones, at(5, -2.2));
    expect(r.kind).toBe('inside');
    expect(sideText(distanceOf(r))).toBe('0.8 m inside');
  });

  it('cannot decide when the accuracy is worse than the margin', () => {
    expect(readFix(zones, at(5, -2.2, 1)).kind).toBe('undecided');
    expect(readFix(zones, at(15, 2, 2.5)).kind).toBe('undecided');
    expect(readFix(zones, at(15, 2, 1.9)).kind).toBe('outside');
  });

  it('measures beyond a corner as the distance to the corner, less the standoff', () => {
    expect(distanceOf(readFix(zones, at(13, 8)))).toBeCloseTo(5 - 3, 6); // 3-4-5 triangle from the corner (10, 4)
  });

  it('takes the nearest of several zones', () => {
    const far = { ...pit, id: 2, reference: 'P2', standoff: 1 };
    const r = readFix(prepareZones({ origin, excavations: [far, pit] }), at(15, 2));
    expect(r.kind === 'none' ? null : r.excavation.reference).toBe('P1');
  });

  it('has nothing to say without a standoff', () => {
    expect(readFix(prepareZones({ origin, excavations: [{ ...pit, standoff: null }] }), at(1, 1)).kind).toBe('none');
  });
});
