import { z } from 'zod';
import {
  DEFAULT_DESIGN_SURCHARGE,
  excavationInputSchema,
  type Excavation,
  type ExcavationGeometry,
  type ExcavationInput,
  type ExcavationKind,
  type ExcavationState,
} from '@shared/schemas/excavations';

/** One soil layer as the form holds it: every box, and whether the layer is drained or undrained. */
export interface SoilRow {
  top: number | null;
  unitWeight: number | null;
  saturatedUnitWeight: number | null;
  model: 'drained' | 'undrained';
  frictionAngle: number | null;
  cohesion: number | null;
  undrainedShearStrength: number | null;
}

export interface ExcavationFormValues {
  reference: string;
  name: string;
  kind: ExcavationKind;
  geometry: ExcavationGeometry | null;
  width: number | null;
  depth: number | null;
  state: ExcavationState;
  supportType: ExcavationInput['supportType'] | '';
  designSurcharge: number | null;
  ratedPressure: number | null;
  restraint: 'unyielding' | 'yielding';
  pressureState: 'active' | 'at-rest';
  wallFriction: number | null;
  soil: SoilRow[];
  groundwaterDepth: number | null;
  designReference: string;
  notes: string;
}

/** An empty box is null; anything else a number (NaN for text that is not one, which the schema names). */
export const numberOrNull = (v: unknown): number | null => (v === '' || v === null || v === undefined ? null : Number(v));

const present = <T>(v: T | null): T | undefined => (v === null ? undefined : v);

/** The form's values as the API's input: layers keep only the strength fields of their model. */
export function toInput(v: ExcavationFormValues): Record<string, unknown> {
  return {
    reference: v.reference,
    name: v.name,
    kind: v.kind,
    geometry: v.geometry,
    width: v.kind === 'trench' ? v.width : null,
    depth: present(v.depth),
    state: v.state,
    supportType: v.supportType === '' ? undefined : v.supportType,
    designSurcharge: present(v.designSurcharge),
    ratedPressure: v.ratedPressure,
    restraint: v.restraint,
    pressureState: v.pressureState,
    wallFriction: v.wallFriction ?? 0,
    soil: v.soil.map((l) => ({
      top: present(l.top),
      unitWeight: present(l.unitWeight),
      ...(l.saturatedUnitWeight === null ? {} : { saturatedUnitWeight: l.saturatedUnitWeight }),
      ...(l.model === 'drained'
        ? { frictionAngle: present(l.frictionAngle), cohesion: l.cohesion ?? 0 }
        : { undrainedShearStrength: present(l.undrainedShearStrength) }),
    })),
    groundwaterDepth: v.groundwaterDepth,
    designReference: v.designReference,
    notes: v.notes,
  };
}

/** The shared schema, read from the form's shape: its field paths (soil[0].top) match the form's names (soil.0.top). */
export const excavationFormSchema = z.preprocess((v: ExcavationFormValues) => toInput(v), excavationInputSchema);

function rowOf(l: Excavation['soil'][number]): SoilRow {
  return {
    top: l.top,
    unitWeight: l.unitWeight,
    saturatedUnitWeight: l.saturatedUnitWeight ?? null,
    model: l.undrainedShearStrength !== undefined ? 'undrained' : 'drained',
    frictionAngle: l.frictionAngle ?? null,
    cohesion: l.cohesion ?? null,
    undrainedShearStrength: l.undrainedShearStrength ?? null,
  };
}

export const emptyRow = (top: number | null = 0): SoilRow => ({
  top,
  unitWeight: null,
  saturatedUnitWeight: null,
  model: 'drained',
  frictionAngle: null,
  cohesion: 0,
  undrainedShearStrength: null,
});

export function valuesOf(e: Excavation): ExcavationFormValues {
  return {
    reference: e.reference,
    name: e.name,
    kind: e.kind,
    geometry: e.geometry,
    width: e.width,
    depth: e.depth,
    state: e.state,
    supportType: e.supportType,
    designSurcharge: e.designSurcharge,
    ratedPressure: e.ratedPressure,
    restraint: e.restraint,
    pressureState: e.pressureState,
    wallFriction: e.wallFriction,
    soil: e.soil.map(rowOf),
    groundwaterDepth: e.groundwaterDepth,
    designReference: e.designReference,
    notes: e.notes,
  };
}

/** The next free reference of a kind: TR-03 after TR-01 and TR-02, PIT-01 for the first pit. */
export function nextReference(kind: ExcavationKind, taken: string[]): string {
  const prefix = kind === 'trench' ? 'TR' : 'PIT';
  const re = new RegExp(`^${prefix}-(\\d+)$`, 'i');
  const n = taken.reduce((max, r) => Math.max(max, Number(re.exec(r)?.[1] ?? 0)), 0) + 1;
  return `${prefix}-${String(n).padStart(2, '0')}`;
}

/**
 * A new excavation drawn on the map. Its soil is copied from the site's most recently changed
 * excavation when there is one (named in `soilFrom`, so the form can ask for it to be checked).
 */
export function newValues(
  kind: ExcavationKind,
  geometry: ExcavationGeometry,
  existing: Excavation[],
): { values: ExcavationFormValues; soilFrom: string | null } {
  const latest = [...existing].sort((a, b) => b.updatedAt.localeCompare(a.updatedAt))[0];
  return {
    soilFrom: latest?.reference ?? null,
    values: {
      reference: nextReference(
        kind,
        existing.map((e) => e.reference),
      ),
      name: '',
      kind,
      geometry,
      width: kind === 'trench' ? 1 : null,
      depth: null,
      state: 'open',
      supportType: '',
      designSurcharge: DEFAULT_DESIGN_SURCHARGE,
      ratedPressure: null,
      restraint: 'unyielding',
      pressureState: 'active',
      wallFriction: 0,
      soil: latest ? latest.soil.map(rowOf) : [emptyRow()],
      groundwaterDepth: latest?.groundwaterDepth ?? null,
      designReference: '',
      notes: '',
    },
  };
}
