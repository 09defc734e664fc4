import type { Db } from '../database';
import type { PlantCategory, PlantElement } from '../../shared/schemas/plant';
import type { DemoContext } from './people';

/**
 * An invented plant library: typical machines of a groundworks site with made-up but physically
 * plausible figures (operating mass, track or tyre contact areas, outrigger spreads). No real
 * manufacturer or model is described. Origin at the machine's centre (slew centre for excavators
 * and cranes); x forward, y to the left; metres and tonnes.
 */
interface DemoPlant {
  name: string;
  category: PlantCategory;
  mass: number;
  elements: PlantElement[];
  designFactor?: number;
  notes: string;
}

/** Two tracks, each carrying half: ground contact length, shoe width, track gauge (centre to centre). */
function tracks(length: number, shoe: number, gauge: number): PlantElement[] {
  return [
    { name: 'Left track', kind: 'track', x: 0, y: gauge / 2, length, width: shoe, share: 0.5 },
    { name: 'Right track', kind: 'track', x: 0, y: -gauge / 2, length, width: shoe, share: 0.5 },
  ];
}

/** A pair of wheels (or wheel groups) on one axle at x, track width `track`, each with `share`. */
function axle(label: string, x: number, track: number, contactLength: number, contactWidth: number, share: number): PlantElement[] {
  return [
    { name: `${label}, left`, kind: 'wheel', x, y: track / 2, length: contactLength, width: contactWidth, share },
    { name: `${label}, right`, kind: 'wheel', x, y: -track / 2, length: contactLength, width: contactWidth, share },
  ];
}

const TRACK_NOTE =
  'Equal shares on both tracks: the machine standing level with the arm tucked in. Digging or lifting over one track loads it far more; raise its share or the design factor for that case.';

const demoPlant: DemoPlant[] = [
  { name: 'Mini excavator 1.5 t', category: 'excavator', mass: 1.5, elements: tracks(1.25, 0.23, 0.77), notes: TRACK_NOTE },
  { name: 'Midi excavator 5 t', category: 'excavator', mass: 5, elements: tracks(2.0, 0.4, 1.56), notes: TRACK_NOTE },
  { name: 'Excavator 8 t', category: 'excavator', mass: 8, elements: tracks(2.25, 0.45, 1.85), notes: TRACK_NOTE },
  { name: 'Excavator 14 t', category: 'excavator', mass: 14, elements: tracks(2.85, 0.6, 1.9), notes: TRACK_NOTE },
  { name: 'Excavator 21 t', category: 'excavator', mass: 21, elements: tracks(3.35, 0.6, 2.2), notes: TRACK_NOTE },
  { name: 'Excavator 30 t', category: 'excavator', mass: 30, elements: tracks(3.85, 0.6, 2.6), notes: TRACK_NOTE },
  {
    name: 'Mobile crane 45 t on outriggers',
    category: 'crane',
    mass: 45,
    elements: [
      { name: 'Front left pad', kind: 'pad', x: 3.6, y: 3.5, length: 1.2, width: 1.2, share: 0.25 },
      { name: 'Front right pad', kind: 'pad', x: 3.6, y: -3.5, length: 1.2, width: 1.2, share: 0.25 },
      { name: 'Rear left pad', kind: 'pad', x: -3.6, y: 3.5, length: 1.2, width: 1.2, share: 0.25 },
      { name: 'Rear right pad', kind: 'pad', x: -3.6, y: -3.5, length: 1.2, width: 1.2, share: 0.25 },
    ],
    notes:
      "Equal quarter shares are only the simple default (crane set up, nothing on the hook). A lift can put well over half of the crane and its load on one outrigger: take the worst outrigger reaction from the lift plan and set that pad's share and the design factor to match. Pads are 1.2 m square mats.",
  },
  {
    name: 'Concrete wagon, 4 axles, laden 32 t',
    category: 'truck',
    mass: 32,
    elements: [
      ...axle('First steer axle', 2.6, 2.0, 0.2, 0.3, 0.117),
      ...axle('Second steer axle', 1.25, 2.0, 0.2, 0.3, 0.117),
      ...axle('Front drive axle (twin tyres)', -2.1, 1.85, 0.2, 0.55, 0.133),
      ...axle('Rear drive axle (twin tyres)', -3.45, 1.85, 0.2, 0.55, 0.133),
    ],
    notes: 'Fully laden with 8 m³ of concrete. Each wheel group is its tyre contact patch; the steer axles carry about 47 % of the weight.',
  },
  {
    name: 'Forward-tip dumper 6 t, laden',
    category: 'dumper',
    mass: 10.5,
    elements: [...axle('Front axle', 1.0, 1.75, 0.3, 0.4, 0.325), ...axle('Rear axle', -1.0, 1.75, 0.3, 0.4, 0.175)],
    notes: 'A 6 t payload in the skip puts about two thirds of the weight on the front axle, the one nearest the edge when tipping.',
  },
  {
    name: 'Tracked carrier 3 t, laden',
    category: 'dumper',
    mass: 4.8,
    elements: tracks(1.45, 0.28, 1.05),
    notes: TRACK_NOTE,
  },
  {
    name: 'Telehandler 14 m, 3.5 t rated',
    category: 'telehandler',
    mass: 11.5,
    elements: [...axle('Front axle', 1.45, 1.9, 0.3, 0.4, 0.3), ...axle('Rear axle', -1.45, 1.9, 0.3, 0.4, 0.2)],
    notes:
      'Travelling with a load carried low. Lifting at reach moves nearly all the weight to the front axle: set the front shares to suit the load chart.',
  },
  {
    name: 'Single-drum roller 7 t',
    category: 'roller',
    mass: 7,
    elements: [
      { name: 'Drum', kind: 'wheel', x: 1.45, y: 0, length: 0.15, width: 1.68, share: 0.55 },
      ...axle('Rear axle', -1.45, 1.4, 0.25, 0.45, 0.225),
    ],
    designFactor: 1.3,
    notes:
      "Design factor 1.3 is an allowance for the vibrating drum; replace it with the roller's own dynamic force when known. Keep vibration off near supported excavations where you can.",
  },
];

/** The demo machines, in the library of the organisation `ctx` names. */
export async function seedPlant(db: Db, ctx: Pick<DemoContext, 'organisationId'>): Promise<void> {
  for (const p of demoPlant) {
    await db
      .insertInto('plant_items')
      .values({
        organisation_id: ctx.organisationId,
        name: p.name,
        category: p.category,
        operating_mass: p.mass,
        elements: JSON.stringify(p.elements),
        design_factor: p.designFactor ?? 1,
        notes: p.notes,
      })
      .execute();
  }
}
