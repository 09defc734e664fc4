/**
 * The one mapping from the field paths the API names (`loads[0].unitWeight`, `features[2].supportType`,
 * `windowEnd`) to the words the forms label them with ("Load 1: Unit weight (kN/m³)", "Feature 3:
 * Support", "Window closes"). Every page shows server refusals through it (`fieldLabel`,
 * `serverSummary`), so no person reads an API path.
 */
import { ApiError, errorMessage } from './api';
import { fieldSentence } from './sentences';

/** Top-level fields, as the forms label them. */
const labels: Record<string, string> = {
  // permits
  siteId: 'Site',
  kind: 'Kind',
  description: 'What the work is',
  windowStart: 'Window opens',
  windowEnd: 'Window closes',
  excavationIds: 'Excavations beside the work',
  operatorIds: 'Operators to brief',
  method: 'Method',
  loads: 'Loads',
  reason: 'Reason',
  standoff: 'Standoff from the excavation edge (m)',
  password: 'Password',
  conditions: 'Conditions',
  version: 'Version',
  dig: 'Dig details',
  file: 'File',
  text: 'Comment',
  // excavations
  reference: 'Reference',
  name: 'Name',
  state: 'State',
  geometry: 'Shape on the map',
  width: 'Width (m)',
  depth: 'Depth H (m)',
  supportType: 'Support',
  designSurcharge: 'Design surcharge allowance (kPa)',
  ratedPressure: 'Rated pressure (kPa)',
  restraint: 'Restraint',
  pressureState: 'Earth pressure',
  wallFriction: 'Wall friction δ (°)',
  groundwaterDepth: 'Groundwater depth (m)',
  designReference: 'Design reference',
  notes: 'Notes',
  soil: 'Soil layers',
  mode: 'What to do with existing references',
  // people and sign-in
  email: 'E-mail',
  role: 'Role',
  remarks: 'Remarks',
  outcome: 'Outcome',
  inspectedAt: 'Time of the inspection',
  operatingMass: 'Operating mass (t)',
  designFactor: 'Design factor',
  category: 'Kind of machine',
  elements: 'Bearing elements',
  // the phone view
  endpoint: 'This phone’s push service',
  revision: 'The revision you were briefed on',
};

/** A placed load's fields, as its row on the placing page labels them. */
const loadLabels: Record<string, string> = {
  id: 'Name',
  label: 'Name',
  plantItemId: 'Machine',
  position: 'Position',
  outline: 'Position',
  path: 'Position',
  rotation: 'Facing (degrees from north)',
  unitWeight: 'Unit weight (kN/m³)',
  height: 'Height (m)',
  pressure: 'Pressure (kPa)',
  force: 'Force (kN/m)',
};

const digLabels: Record<string, string> = { depth: 'Depth (m)', supportMethod: 'Support method' };
const serviceLabels: Record<string, string> = { drawings: 'Record drawings', locatorScan: 'Cable-locator scan', trialHoles: 'Trial holes' };
const serviceFieldLabels: Record<string, string> = { state: 'State', by: 'Who did it', at: 'When', notes: 'Notes' };
const soilLabels: Record<string, string> = {
  top: 'top (m)',
  unitWeight: 'unit weight (kN/m³)',
  saturatedUnitWeight: 'saturated unit weight (kN/m³)',
  frictionAngle: 'friction angle (°)',
  cohesion: 'cohesion (kPa)',
  undrainedShear: 'undrained shear strength (kPa)',
  model: 'strength',
};

/** The words for a field path the API names; an unknown path is shown in words of its own name, never as code. */
export function fieldLabel(path: string): string {
  const load = path.match(/^loads\[(\d+)\](?:\.(\w+))?/);
  if (load) return `Load ${Number(load[1]) + 1}${load[2] ? `: ${loadLabels[load[2]] ?? words(load[2])}` : ''}`;
  const feature = path.match(/^features\[(\d+)\](?:\.(.+))?$/);
  if (feature) return `Feature ${Number(feature[1]) + 1}${feature[2] ? `: ${fieldLabel(feature[2])}` : ''}`;
  const service = path.match(/^dig\.servicesChecks\.(\w+)(?:\.(\w+))?/);
  if (service)
    return `${serviceLabels[service[1]] ?? words(service[1])}${service[2] ? `: ${serviceFieldLabels[service[2]] ?? words(service[2])}` : ''}`;
  const dig = path.match(/^dig\.(\w+)$/);
  if (dig) return digLabels[dig[1]] ?? words(dig[1]);
  const soil = path.match(/^soil[.[](\d+)\]?(?:\.(\w+))?$/);
  if (soil) return `Layer ${Number(soil[1]) + 1}${soil[2] ? ` ${soilLabels[soil[2]] ?? words(soil[2])}` : ''}`;
  const list = path.match(/^(\w+)\[(\d+)\]$/);
  if (list) return `${labels[list[1]] ?? words(list[1])}, item ${Number(list[2]) + 1}`;
  return labels[path] ?? words(path);
}

/** `unitWeight` → "Unit weight": a last resort, so a code never reaches the screen. */
function words(key: string): string {
  const s = key
    .replace(/\[(\d+)\]/g, ' $1')
    .replace(/[._]/g, ' ')
    .replace(/([a-z])([A-Z])/g, '$1 $2')
    .toLowerCase()
    .trim();
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/**
 * The sentence above a form after the server refused it, saying each thing once: the reasons of
 * fields the form shows stand next to those fields (`shown` says which), so the summary only says
 * to correct them; reasons for fields it does not show are spelt out here, by their labels.
 * Without field reasons, the server's own sentence.
 */
export function serverSummary(
  error: unknown,
  shown: (path: string) => boolean = () => false,
  label: (path: string) => string = fieldLabel,
): string {
  if (!(error instanceof ApiError)) return errorMessage(error);
  return refusalSummary(error, shown, label);
}

/**
 * `serverSummary` for a refusal kept as its sentence and field reasons (the phone's outbox keeps
 * them for an item the server refused while nobody was looking).
 */
export function refusalSummary(
  refusal: { message: string; fields: Record<string, string> },
  shown: (path: string) => boolean = () => false,
  label: (path: string) => string = fieldLabel,
): string {
  if (Object.keys(refusal.fields).length === 0) return refusal.message;
  return fieldsSummary(refusal.fields, shown, label);
}

/**
 * The summary sentence for field reasons, from the server or the form's own check of the shared
 * schema: "Correct the field marked below." for the fields shown with their reasons, and the
 * others spelt out by their labels.
 */
export function fieldsSummary(
  fields: Record<string, string>,
  shown: (path: string) => boolean = () => false,
  label: (path: string) => string = fieldLabel,
): string {
  const entries = Object.entries(fields);
  const unshown = entries.filter(([k]) => !shown(k)).map(([k, v]) => fieldSentence(label(k), v));
  const marked = entries.length - unshown.length;
  const lead = marked === 0 ? [] : [`Correct the ${marked === 1 ? 'field' : `${marked} fields`} marked below.`];
  return [...lead, ...unshown].join(' ');
}
