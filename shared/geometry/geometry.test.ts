import { booleanPointInPolygon, distance as turfDistance, point as turfPoint } from '@turf/turf';
import type { Polygon } from 'geojson';
import { describe, expect, it } from 'vitest';
import {
  GeometryError,
  influenceZone,
  exclusionZone,
  localProjection,
  measureLoad,
  placeFootprint,
  placePad,
  prepareExcavation,
  prepareRing,
  signedArea,
  signedDistanceToZone,
  signedDistanceToZoneAt,
  trenchRing,
  type ExcavationShape,
  type XY,
} from './index';

const proj = localProjection([-1.25, 52.5]);

function rotate(p: XY, deg: number, about: XY = [0, 0]): XY {
  const t = (deg * Math.PI) / 180;
  const x = p[0] - about[0];
  const y = p[1] - about[1];
  return [about[0] + x * Math.cos(t) - y * Math.sin(t), about[1] + x * Math.sin(t) + y * Math.cos(t)];
}
const rect = (x0: number, y0: number, x1: number, y1: number): XY[] => [
  [x0, y0],
  [x1, y0],
  [x1, y1],
  [x0, y1],
];
const pit = rect(0, 0, 10, 6);

/** A pit 10 m × 10 m with a 6 m × 6 m corner left out: an L, concave at (4, 4). */
const lShapedPit = () =>
  prepareRing(
    [
      [0, 0],
      [10, 0],
      [10, 4],
      [4, 4],
      [4, 10],
      [0, 10],
    ],
    'pit',
  );

describe('local projection (WGS84 radii of curvature; any geodesy text)', () => {
  it('round-trips and agrees with turf’s great-circle distance to 0.3 % over 200 m', () => {
    const p: XY = [120, -160];
    const ll = proj.toWgs84(p);
    expect(proj.toLocal(ll)[0]).toBeCloseTo(120, 9);
    expect(proj.toLocal(ll)[1]).toBeCloseTo(-160, 9);
    const km = turfDistance(turfPoint(proj.origin), turfPoint(ll), { units: 'kilometers' });
    expect(Math.abs(km * 1000 - 200) / 200).toBeLessThan(0.003);
  });
});

describe('offset, width and length (docs/calculation.md, "Loads"; hand-worked cases)', () => {
  it('a 2 m × 1 m pad 2 m from the long side of a 10 m × 6 m pit: offset 2, B 1, L 2', () => {
    const got = placeFootprint(prepareRing(pit, 'pit'), rect(4, 8, 6, 9));
    expect(got.offset).toBeCloseTo(2, 12);
    expect(got.width).toBeCloseTo(1, 12);
    expect(got.length).toBeCloseTo(2, 12);
  });

  it.each([30, 72.5, 135, 200])('the same case rotated by %f° gives the same answers', (deg) => {
    const got = placeFootprint(
      prepareRing(
        pit.map((p) => rotate(p, deg)),
        'pit',
      ),
      rect(4, 8, 6, 9).map((p) => rotate(p, deg)),
    );
    expect(got.offset).toBeCloseTo(2, 9);
    expect(got.width).toBeCloseTo(1, 9);
    expect(got.length).toBeCloseTo(2, 9);
  });

  it('a unit square turned 45° with its corner 1.5 m from the edge: offset 1.5, B = L = √2', () => {
    const c: XY = [5, 6 + 1.5 + Math.SQRT1_2];
    const foot = rect(-0.5, -0.5, 0.5, 0.5)
      .map((p) => rotate(p, 45))
      .map((p): XY => [p[0] + c[0], p[1] + c[1]]);
    const got = placeFootprint(prepareRing(pit, 'pit'), foot);
    expect(got.offset).toBeCloseTo(1.5, 9);
    expect(got.width).toBeCloseTo(Math.SQRT2, 9);
    expect(got.length).toBeCloseTo(Math.SQRT2, 9);
  });

  it('a footprint by a trench 1.2 m wide along a 60° centre line: offset 2 − 0.6 = 1.4, B 1, L 2', () => {
    const ring = trenchRing([rotate([0, 0], 60), rotate([20, 0], 60)], 1.2);
    const got = placeFootprint(
      prepareRing(ring, 'trench'),
      rect(5, 2, 7, 3).map((p) => rotate(p, 60)),
    );
    expect(got.offset).toBeCloseTo(1.4, 9);
    expect(got.width).toBeCloseTo(1, 9);
    expect(got.length).toBeCloseTo(2, 9);
  });

  it('beyond a corner the diagonal distance counts: offset √2 for a unit square 1 m out both ways', () => {
    const got = placeFootprint(prepareRing(pit, 'pit'), rect(11, 7, 12, 8));
    expect(got.offset).toBeCloseTo(Math.SQRT2, 9);
    expect(got.width).toBeCloseTo(1, 9);
    expect(got.length).toBeCloseTo(1, 9);
  });

  it('a point load on a 0.5 m × 0.8 m pad 3 m from the edge: offset 2.75, B 0.5, L 0.8', () => {
    const got = placePad(prepareRing(pit, 'pit'), [5, 9], 0.5, 0.8);
    expect(got).toMatchObject({ width: 0.5, length: 0.8 });
    expect(got.offset).toBeCloseTo(2.75, 12);
  });

  it('from GeoJSON: a footprint 3 m north of a trench, 1 m wide, measures 2.5 m to within a millimetre', () => {
    const ll = (p: readonly number[]) => proj.toWgs84(p);
    const trench = prepareExcavation(
      { kind: 'trench', centreLine: { type: 'LineString', coordinates: [ll([-10, 0]), ll([10, 0])] }, width: 1 },
      proj,
    );
    const foot: Polygon = { type: 'Polygon', coordinates: [[...rect(-1, 3, 1, 4), [-1, 3]].map(ll)] };
    const got = measureLoad(trench, { kind: 'polygon', footprint: foot }, proj);
    expect(got.offset).toBeCloseTo(2.5, 3);
    expect(got.width).toBeCloseTo(1, 3);
    expect(got.length).toBeCloseTo(2, 3);
    const pad = measureLoad(trench, { kind: 'point', position: { type: 'Point', coordinates: ll([0, 5]) } }, proj);
    expect(pad.offset).toBeCloseTo(4.5 - 0.15, 3);
  });
});

describe('overlap is rejected (docs/calculation.md, "Loads")', () => {
  const ex = prepareRing(pit, 'pit');
  it.each([
    ['crossing the edge', rect(4, 5, 6, 7)],
    ['touching the edge', rect(4, 6, 6, 7)],
    ['inside the pit', rect(4, 2, 6, 3)],
    ['around the whole pit', rect(-5, -5, 20, 20)],
  ])('a footprint %s', (_what, foot) => {
    expect(() => placeFootprint(ex, foot)).toThrow(GeometryError);
    expect(() => placeFootprint(ex, foot)).toThrow(/touches or overlaps the excavation/);
  });
  it('a pad reaching over the edge', () => {
    expect(() => placePad(ex, [5, 6.1], 0.3, 0.3)).toThrow(/touches or overlaps/);
    expect(() => placePad(ex, [5, 3], 0.3, 0.3)).toThrow(/touches or overlaps/);
  });
});

describe('trench outlines', () => {
  it('a 90° bend is mitred: 10 m + 10 m legs 2 m wide enclose 40 m² (hand calculation)', () => {
    const ring = trenchRing(
      [
        [0, 0],
        [10, 0],
        [10, 10],
      ],
      2,
    );
    expect(Math.abs(signedArea(ring))).toBeCloseTo(40, 6);
  });
  it('a bend sharper than 135° is refused', () => {
    expect(() =>
      trenchRing(
        [
          [0, 0],
          [10, 0],
          [0, 1],
        ],
        1,
      ),
    ).toThrow(/split it into separate trenches/);
  });
});

describe('zones (docs/calculation.md, "Standoff")', () => {
  const ex = prepareRing(pit, 'pit');
  const inside = (zone: ReturnType<typeof influenceZone>, p: XY) => booleanPointInPolygon(turfPoint(proj.toWgs84(p)), zone);
  const diag = (r: number): XY => [10 + r * Math.SQRT1_2, 6 + r * Math.SQRT1_2];

  it('the influence zone (H = 3 m) holds the ground within 3 m and not beyond', () => {
    const zone = influenceZone(ex, 3, proj);
    for (const p of [[5, 8.98], [5, 3], [-2.98, 3], diag(2.98), [12.9, 8.9 - 2.9]] as XY[]) expect(inside(zone, p)).toBe(true);
    for (const p of [[5, 9.05], [-3.05, 3], diag(3.05), [20, 20]] as XY[]) expect(inside(zone, p)).toBe(false);
  });

  it('the exclusion zone (standoff 2.5 m) holds the ground within 2.5 m and not beyond', () => {
    const zone = exclusionZone(ex, 2.5, proj);
    expect(inside(zone, [5, 8.48])).toBe(true);
    expect(inside(zone, diag(2.49))).toBe(true);
    expect(inside(zone, [5, 8.55])).toBe(false);
    expect(inside(zone, diag(2.55))).toBe(false);
  });

  it('near the equator the zone still holds every point within the distance (turf measures on a sphere)', () => {
    const eq = localProjection([30, 0.5]);
    const zone = influenceZone(ex, 3, eq);
    const at = (p: XY) => booleanPointInPolygon(turfPoint(eq.toWgs84(p)), zone);
    expect(at([5, 8.999])).toBe(true);
    expect(at([-2.999, 3])).toBe(true);
    expect(at(diag(2.999))).toBe(true);
    expect(at([5, 9.05])).toBe(false);
    const L = lShapedPit();
    const concave = influenceZone(L, 2, eq);
    expect(booleanPointInPolygon(turfPoint(eq.toWgs84([2, 11.999])), concave)).toBe(true);
    expect(booleanPointInPolygon(turfPoint(eq.toWgs84([2, 12.05])), concave)).toBe(false);
  });

  it('an L-shaped pit gets one zone that fills its inner corner', () => {
    const L = lShapedPit();
    const zone = influenceZone(L, 2, proj);
    expect(zone.type).toBe('Polygon');
    expect(inside(zone, [7, 7])).toBe(false); // 3 m from both inner edges
    expect(inside(zone, [5.9, 5.9])).toBe(true); // 1.9 m from the inner corner's edges
  });

  it('signed distance to a zone boundary: positive outside, negative inside', () => {
    expect(signedDistanceToZone(ex, [5, 8], 3)).toBeCloseTo(-1, 12);
    expect(signedDistanceToZone(ex, [5, 10], 3)).toBeCloseTo(1, 12);
    expect(signedDistanceToZone(ex, [5, 3], 3)).toBeCloseTo(-6, 12);
    expect(signedDistanceToZoneAt(ex, proj.toWgs84([5, 10]), 3, proj)).toBeCloseTo(1, 6);
  });
});

describe('prepared outlines are kept while the shape stays the same', () => {
  const ll = (p: readonly number[]) => proj.toWgs84(p);
  const trenchOf = (x: number): Extract<ExcavationShape, { kind: 'trench' }> => ({
    kind: 'trench',
    centreLine: { type: 'LineString', coordinates: [ll([-x, 0]), ll([x, 0])] },
    width: 1,
  });

  it('the same content (another object) answers the kept outline; a shape changed in place is prepared again', () => {
    const shape = trenchOf(10);
    const first = prepareExcavation(shape, proj);
    expect(prepareExcavation(trenchOf(10), proj)).toBe(first);
    expect(Object.isFrozen(first)).toBe(true);
    // 20 m long, 1 m wide (common practice, no published source: a rectangle's extent).
    expect(first.bounds).toMatchObject({ minX: expect.closeTo(-10, 3), maxX: expect.closeTo(10, 3) });
    shape.centreLine.coordinates[1] = ll([30, 0]);
    const moved = prepareExcavation(shape, proj);
    expect(moved).not.toBe(first);
    expect(moved.bounds.maxX).toBeCloseTo(30, 3);
  });

  it('another origin prepares it again, in its own site-local metres', () => {
    const shape = trenchOf(10);
    const here = prepareExcavation(shape, proj);
    const there = prepareExcavation(shape, localProjection(proj.toWgs84([100, 0])));
    expect(there).not.toBe(here);
    expect(there.bounds.minX).toBeCloseTo(-110, 2);
  });
});
