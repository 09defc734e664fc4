import { toCsv } from '@shared/csv';
import { kindLabels, stateLabels, supportLabels, type Excavation } from '@shared/schemas/excavations';
import { stateLabels as inspectionLabels, type InspectionState } from '@shared/schemas/inspections';

/** The soil layers in one line: "0 m: γ 18, φ′ 27°; 0.5 m: γ 19.5, cu 50 kPa". */
export function soilSummary(soil: Excavation['soil']): string {
  return soil
    .map((l) => {
      const parts = [`γ ${l.unitWeight}`];
      if (l.saturatedUnitWeight !== undefined) parts.push(`γsat ${l.saturatedUnitWeight}`);
      if (l.undrainedShearStrength !== undefined) parts.push(`cu ${l.undrainedShearStrength} kPa`);
      else parts.push(`φ′ ${l.frictionAngle}°`, ...(l.cohesion ? [`c′ ${l.cohesion} kPa`] : []));
      return `${l.top} m: ${parts.join(', ')}`;
    })
    .join('; ');
}

const registerCsvHeader = [
  'Reference',
  'Name',
  'Kind',
  'State',
  'Inspection this shift',
  'Depth (m)',
  'Width (m)',
  'Support',
  'Design surcharge allowance (kPa)',
  'Rated pressure (kPa)',
  'Restraint',
  'Groundwater depth (m)',
  'Soil layers',
  'Design reference',
  'Design drawing',
  'Notes',
  'Last changed',
];

/** The register's rows as CSV, in the order given (the table's sorted and filtered order), with the table's inspection column. */
export function registerCsv(list: (Excavation & { inspection?: InspectionState })[]): string {
  return toCsv([
    registerCsvHeader,
    ...list.map((e) => [
      e.reference,
      e.name,
      kindLabels[e.kind],
      stateLabels[e.state],
      e.inspection ? inspectionLabels[e.inspection] : null,
      e.depth,
      e.width,
      supportLabels[e.supportType],
      e.designSurcharge,
      e.ratedPressure,
      e.restraint,
      e.groundwaterDepth,
      soilSummary(e.soil),
      e.designReference,
      e.drawing?.name ?? null,
      e.notes,
      e.updatedAt,
    ]),
  ]);
}
