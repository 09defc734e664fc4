/**
 * GeoJSON geometry as Brink takes it (RFC 7946): positions are WGS84 [longitude, latitude] in
 * degrees; an altitude, if given, is dropped. One schema for every outline and line: excavations,
 * imports, and the loads of a permit.
 *
 * Latitude is limited to ±85° (decision): a site's origin already is (shared/schemas/sites.ts), every
 * point of a site lies within 5 km of it, and the map's Web Mercator projection ends at about
 * ±85.05°, so a point beyond could be neither drawn nor checked against its site.
 */
import { z } from 'zod';

const MAX_LATITUDE = 85;
/** The most positions one line or ring may hold as sent (before simplifying to the site tolerance). */
const MAX_RAW_POINTS = 500;

const listOf = (what: string) => `must be ${what}`;

/** A figure between `lo` and `hi`, named (`must be a latitude between -85 and 85`). */
const coordinate = (lo: number, hi: number, what: string) =>
  z
    .number({ error: `must be a number (${what})` })
    .min(lo, `must be a ${what} between ${lo} and ${hi}`)
    .max(hi, `must be a ${what} between ${lo} and ${hi}`);

export const longitudeSchema = coordinate(-180, 180, 'longitude');
export const latitudeSchema = coordinate(-MAX_LATITUDE, MAX_LATITUDE, 'latitude');

/** A position as Brink's own screens send it: exactly [longitude, latitude]. */
export const lngLatSchema = z.tuple([longitudeSchema, latitudeSchema]);

/** A GeoJSON position as files carry it: [longitude, latitude] (an altitude, if given, is dropped). */
export const positionSchema = z
  .array(z.number({ error: 'must be a number' }), { error: listOf('a position [longitude, latitude]') })
  .min(2, listOf('a position [longitude, latitude]'))
  .max(3, listOf('a position [longitude, latitude]'))
  .pipe(z.tuple([longitudeSchema, latitudeSchema]).rest(z.number()))
  .transform((p): [number, number] => [p[0], p[1]]);

/** Either position: the one that drops an altitude, or the exact pair. */
type Position = typeof positionSchema | typeof lngLatSchema;

/** A LineString of at least two positions; `tooFew` says what it is ("a trench centre line needs …"). */
export const lineStringOf = <P extends Position>(position: P, tooFew: string) =>
  z.object({
    type: z.literal('LineString'),
    coordinates: z
      .array(position, { error: listOf('a list of positions') })
      .min(2, tooFew)
      .max(MAX_RAW_POINTS, `must have at most ${MAX_RAW_POINTS} points`),
  });

const samePosition = (a: number[], b: number[]) => a[0] === b[0] && a[1] === b[1];

/** A Polygon of one closed ring, no holes; `tooFew` and `holes` say what it is ("a pit outline …"). */
export const polygonOf = <P extends Position>(position: P, tooFew: string, holes: string) =>
  z.object({
    type: z.literal('Polygon'),
    coordinates: z
      .array(
        z
          .array(position, { error: listOf('a ring of positions') })
          .min(4, tooFew)
          .max(MAX_RAW_POINTS, `must have at most ${MAX_RAW_POINTS} points`)
          .refine((ring: [number, number][]) => samePosition(ring[0], ring[ring.length - 1]), 'must end where it starts (a closed ring)'),
        { error: listOf('a list of rings') },
      )
      .min(1, 'must have an outline ring')
      .max(1, holes),
  });
