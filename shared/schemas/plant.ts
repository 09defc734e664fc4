/**
 * The plant library: machines with their operating mass and the rectangles they bear on (tracks,
 * outrigger pads, wheels or wheel groups), each with its share of the machine's weight.
 *
 * Units: tonnes (operating mass), metres (element centres and sizes, relative to the machine's
 * origin: x forward, y to the left), kN, kPa, kN/m³.
 */
import { z } from 'zod';
import { oneOf } from './messages';
import { readStored, type Stored } from './stored';

/** Standard gravity (m/s²): tonnes × G = kN. */
export const G = 9.81;

export const plantElementKinds = ['track', 'pad', 'wheel'] as const;
export type PlantElementKind = (typeof plantElementKinds)[number];
export const plantElementKindLabels: Record<PlantElementKind, string> = {
  track: 'Track',
  pad: 'Outrigger pad',
  wheel: 'Wheel or wheel group',
};

export const plantCategories = ['excavator', 'crane', 'truck', 'dumper', 'telehandler', 'roller', 'other'] as const;
export type PlantCategory = (typeof plantCategories)[number];
export const plantCategoryLabels: Record<PlantCategory, string> = {
  excavator: 'Excavator',
  crane: 'Mobile crane',
  truck: 'Lorry or wagon',
  dumper: 'Dumper',
  telehandler: 'Telehandler',
  roller: 'Roller',
  other: 'Other',
};

/** How far the shares of all elements may add up away from 1. */
const SHARE_TOLERANCE = 0.005;

const finite = (what: string) => z.number({ error: (iss) => (iss.input === undefined ? 'is required' : `must be a number (${what})`) });

export const plantElementSchema = z.object({
  name: z.string().trim().min(1, 'is required').max(60, 'must be at most 60 characters'),
  kind: z.enum(plantElementKinds, { error: oneOf(plantElementKindLabels) }),
  x: finite('m').min(-30, 'must be between -30 and 30 m').max(30, 'must be between -30 and 30 m'),
  y: finite('m').min(-30, 'must be between -30 and 30 m').max(30, 'must be between -30 and 30 m'),
  length: finite('m').gt(0, 'must be greater than 0 m').max(20, 'must be at most 20 m'),
  width: finite('m').gt(0, 'must be greater than 0 m').max(20, 'must be at most 20 m'),
  share: finite('a fraction of the weight').gt(0, 'must be greater than 0').max(1, 'must be at most 1'),
});
export type PlantElement = z.infer<typeof plantElementSchema>;
/** A machine's elements as stored (plant_items.elements). */
export const storedElements = (json: Stored<PlantElement[]>): PlantElement[] =>
  readStored('list of plant elements', z.array(plantElementSchema), json);

const plantFields = {
  name: z.string().trim().min(1, 'is required').max(120, 'must be at most 120 characters'),
  category: z.enum(plantCategories, { error: oneOf(plantCategoryLabels) }),
  operatingMass: finite('t').gt(0, 'must be greater than 0 t').max(1000, 'must be at most 1000 t'),
  elements: z.array(plantElementSchema).min(1, 'must list at least one bearing element').max(32, 'must list at most 32 elements'),
  designFactor: finite('a factor').min(1, 'must be at least 1').max(3, 'must be at most 3').default(1),
  notes: z.string().max(2000, 'must be at most 2000 characters').default(''),
};

function checkElements(item: { elements: PlantElement[] }, ctx: z.RefinementCtx): void {
  const total = item.elements.reduce((s, e) => s + e.share, 0);
  if (Math.abs(total - 1) > SHARE_TOLERANCE) {
    ctx.addIssue({ code: 'custom', path: ['elements'], message: `the shares must add up to 1 (they add up to ${total.toFixed(3)})` });
  }
  const names = item.elements.map((e) => e.name.toLowerCase());
  names.forEach((n, i) => {
    if (names.indexOf(n) !== i)
      ctx.addIssue({ code: 'custom', path: ['elements', i, 'name'], message: `repeats the name of element ${names.indexOf(n) + 1}` });
  });
}

/** A new machine (POST /api/plant) and the form. */
export const plantItemSchema = z.object(plantFields).superRefine(checkElements);
export type PlantItemInput = z.input<typeof plantItemSchema>;
export type PlantItemValues = z.output<typeof plantItemSchema>;

/** A change (PATCH /api/plant/:id): the whole item again with the version it was read at. */
export const plantItemUpdateSchema = z
  .object({ ...plantFields, version: z.number().int().positive('must be the version you read') })
  .superRefine(checkElements);

/** A machine as the API answers it (without the form's cross-field rules: the library keeps what was saved). */
export const plantItemAnswer = z.object({ ...plantFields, id: z.number().int(), version: z.number().int(), updatedAt: z.iso.datetime() });
export type PlantItem = z.output<typeof plantItemAnswer>;
export const plantLibraryAnswer = z.object({ plant: z.array(plantItemAnswer) });
export const onePlantItemAnswer = z.object({ item: plantItemAnswer });

/** Load on one element (kN) and its mean bearing pressure (kPa), the design factor included. */
export function elementLoad(
  item: Pick<PlantItemValues, 'operatingMass' | 'designFactor'>,
  e: PlantElement,
): { force: number; pressure: number } {
  const force = item.operatingMass * G * e.share * item.designFactor;
  return { force, pressure: force / (e.length * e.width) };
}

/** The machine's plan extent (m) over all its elements: for drawings and scale bars. */
export function footprintBounds(elements: Pick<PlantElement, 'x' | 'y' | 'length' | 'width'>[]): {
  minX: number;
  maxX: number;
  minY: number;
  maxY: number;
} {
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (const e of elements) {
    minX = Math.min(minX, e.x - e.length / 2);
    maxX = Math.max(maxX, e.x + e.length / 2);
    minY = Math.min(minY, e.y - e.width / 2);
    maxY = Math.max(maxY, e.y + e.width / 2);
  }
  return { minX, maxX, minY, maxY };
}

/**
 * A stockpile's pressure on the ground: unit weight × height (kPa), e.g. 19 kN/m³ × 2 m = 38 kPa.
 * Typical unit weights are offered as starting points; the material's own figure prevails.
 */
export function stockpilePressure(unitWeight: number, height: number): number {
  return unitWeight * height;
}

export const stockpileMaterials = [
  { name: 'Topsoil', unitWeight: 16 },
  { name: 'Clay spoil', unitWeight: 19 },
  { name: 'Sand and gravel', unitWeight: 20 },
  { name: 'Crushed stone (type 1 sub-base)', unitWeight: 21 },
  { name: 'Ready-mixed concrete (wet)', unitWeight: 24 },
] as const;
