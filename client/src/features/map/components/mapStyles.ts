import type { PathOptions } from 'leaflet';
import type { ExcavationState } from '@shared/schemas/excavations';
import type { InspectionState } from '@shared/schemas/inspections';

/**
 * How excavations look on the map. Red, yellow and green are kept for safety zones and verdicts
 * (ISO 3864): the influence zone is warning yellow; excavations themselves are drawn in slate and
 * grey, told apart by line and fill: open = solid dark with a dark fill (a hole), planned = dashed
 * with no fill (not dug yet), backfilled = dotted grey (gone).
 */
export const stateStyles: Record<ExcavationState, PathOptions> = {
  open: { color: '#1e2a33', weight: 2.5, fillColor: '#3a4650', fillOpacity: 0.55, dashArray: undefined },
  planned: { color: '#1e2a33', weight: 2, fillColor: '#1e2a33', fillOpacity: 0.06, dashArray: '8 6' },
  backfilled: { color: '#8a8f93', weight: 2, fillColor: '#8a8f93', fillOpacity: 0.18, dashArray: '2 5' },
};

/**
 * An open excavation's inspection state over its own look (the one use of red on the map): found
 * not safe = solid red, work stopped until a later inspection is safe; inspection overdue = a heavy
 * red dashed edge. Inspected and due keep the plain open look.
 */
export const inspectionStyles: Partial<Record<InspectionState, PathOptions>> = {
  unsafe: { color: '#c1121f', weight: 3.5, fillColor: '#c1121f', fillOpacity: 0.6, dashArray: undefined },
  overdue: { color: '#c1121f', weight: 3.5, dashArray: '10 6' },
};

/** The selected excavation: the app's accent, heavier. */
export const selectedStyle: PathOptions = { color: '#47508f', weight: 4 };

/** The shape being drawn or changed, before it is saved. */
export const draftStyle: PathOptions = { color: '#47508f', weight: 3, fillColor: '#47508f', fillOpacity: 0.2, dashArray: '4 4' };

/** Influence zone: ISO 3864 warning yellow, with a dark dashed edge so it reads on a light ground. */
export const influenceStyle: PathOptions = { color: '#1e2a33', weight: 1, dashArray: '6 4', fillColor: '#f4c20d', fillOpacity: 0.42 };

export const legendItems: { label: string; style: PathOptions }[] = [
  { label: 'Open excavation', style: stateStyles.open },
  { label: 'Planned', style: stateStyles.planned },
  { label: 'Backfilled', style: stateStyles.backfilled },
  { label: 'Influence zone (within depth H of the edge)', style: influenceStyle },
  { label: 'Found not safe: work stopped', style: { ...stateStyles.open, ...inspectionStyles.unsafe } },
  { label: 'Inspection overdue this shift', style: { ...stateStyles.open, ...inspectionStyles.overdue } },
];
