import { describe, expect, it } from 'vitest';
import { lineStringSchema as trenchLine, polygonSchema as pitOutline } from './excavations';
import { lineStringSchema as loadLine, polygonSchema as loadOutline } from './permits';

const ring = (lat: number): [number, number][] => [
  [-1.048, lat],
  [-1.047, lat],
  [-1.047, lat + 0.0001],
  [-1.048, lat],
];
const reason = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  r.error?.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');

// One schema behind every outline and line: an excavation's and a load's refuse alike.
describe('GeoJSON outlines and lines, one schema for excavations and loads', () => {
  it('take latitudes to ±85° and refuse beyond, naming the position (Web Mercator ends at ±85.05°, common practice)', () => {
    for (const s of [pitOutline, loadOutline]) {
      expect(s.safeParse({ type: 'Polygon', coordinates: [ring(84.9)] }).success).toBe(true);
      expect(reason(s.safeParse({ type: 'Polygon', coordinates: [ring(85.5)] }))).toContain(
        'coordinates.0.0.1: must be a latitude between -85 and 85',
      );
    }
    for (const s of [trenchLine, loadLine]) {
      expect(
        reason(
          s.safeParse({
            type: 'LineString',
            coordinates: [
              [0, -86],
              [0, -85],
            ],
          }),
        ),
      ).toContain('must be a latitude between -85 and 85');
      expect(
        reason(
          s.safeParse({
            type: 'LineString',
            coordinates: [
              [181, 0],
              [0, 0],
            ],
          }),
        ),
      ).toContain('must be a longitude between -180 and 180');
    }
  });

  it('need a closed ring and at most 500 positions, in the same words', () => {
    const open = ring(52)
      .slice(0, 3)
      .concat([[-1.0485, 52]]);
    const long = Array.from({ length: 501 }, (_, i): [number, number] => [-1 + i * 1e-5, 52]);
    for (const s of [pitOutline, loadOutline]) {
      expect(reason(s.safeParse({ type: 'Polygon', coordinates: [open] }))).toContain('must end where it starts (a closed ring)');
    }
    for (const s of [trenchLine, loadLine]) {
      expect(reason(s.safeParse({ type: 'LineString', coordinates: long }))).toContain('must have at most 500 points');
    }
  });

  it('an imported excavation may carry an altitude, which is dropped; a load is placed by exactly two figures', () => {
    const withAltitude = trenchLine.parse({
      type: 'LineString',
      coordinates: [
        [-1.048, 52, 31.5],
        [-1.047, 52, 31.2],
      ],
    });
    expect(withAltitude.coordinates).toEqual([
      [-1.048, 52],
      [-1.047, 52],
    ]);
    expect(
      loadLine.safeParse({
        type: 'LineString',
        coordinates: [
          [-1.048, 52, 31.5],
          [-1.047, 52, 31.2],
        ],
      }).success,
    ).toBe(false);
  });
});
