import { toCsv } from '@shared/csv';
import { kindLabels, stateLabels, supportLabels, type Excavation } from '@shared/schemas/excavations';
import { stateLabels as inspectionLabels, type InspectionState } from '@shared/schemas/inspections';
import type { Figures } from '@shared/units';

/** The soil layers in one line, in the reader's units: "0 m: γ 18, φ′ 27°; 0.5 m: γ 19.5, cu 50 kPa" (γ in kN/m³ or pcf). */
export function soilSummary(soil: Excavation['soil'], f: Figures): string {
  return soil
    .map((l) => {
      const parts = [`γ ${f.value('unitWeight', l.unitWeight)}`];
      if (l.saturatedUnitWeight !== undefined) parts.push(`γsat ${f.value('unitWeight', l.saturatedUnitWeight)}`);
      if (l.undrainedShearStrength !== undefined) parts.push(`cu ${f.value('pressure', l.undrainedShearStrength)} ${f.unit('pressure')}`);
      else parts.push(`φ′ ${l.frictionAngle}°`, ...(l.cohesion ? [`c′ ${f.value('pressure', l.cohesion)} ${f.unit('pressure')}`] : []));
      return `${f.value('length', l.top)} ${f.unit('length')}: ${parts.join(', ')}`;
    })
    .join('; ');
}

/** The head of the register's CSV: each figure's column names its unit in the reader's system. */
function registerCsvHeader(f: Figures): string[] {
  const [m, kPa] = [f.unit('length'), f.unit('pressure')];
  return [
    'Reference',
    'Name',
    'Kind',
    'State',
    'Inspection this shift',
    `Depth (${m})`,
    `Width (${m})`,
    'Support',
    `Design surcharge allowance (${kPa})`,
    `Rated pressure (${kPa})`,
    'Restraint',
    `Groundwater depth (${m})`,
    `Soil layers (${m}; γ in ${f.unit('unitWeight')})`,
    'Design reference',
    'Design drawing',
    'Notes',
    'Last changed',
  ];
}

/**
 * The register's rows as CSV, in the order given (the table's sorted and filtered order), with the
 * table's inspection column; figures in the reader's units, to the precision the screens show.
 */
export function registerCsv(list: (Excavation & { inspection?: InspectionState })[], f: Figures): string {
  const n = (q: 'length' | 'pressure', si: number | null | undefined) => (si == null ? null : f.value(q, si));
  return toCsv([
    registerCsvHeader(f),
    ...list.map((e) => [
      e.reference,
      e.name,
      kindLabels[e.kind],
      stateLabels[e.state],
      e.inspection ? inspectionLabels[e.inspection] : null,
      n('length', e.depth),
      n('length', e.width),
      supportLabels[e.supportType],
      n('pressure', e.designSurcharge),
      n('pressure', e.ratedPressure),
      e.restraint,
      n('length', e.groundwaterDepth),
      soilSummary(e.soil, f),
      e.designReference,
      e.drawing?.name ?? null,
      e.notes,
      e.updatedAt,
    ]),
  ]);
}
