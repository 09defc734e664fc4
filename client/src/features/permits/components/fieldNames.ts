import { errorMessage, type ApiError } from '@client/lib/api';
import { fieldSentence } from '@client/lib/forms';

/** The words a person sees for the fields the permit API names (`loads[0].pressure` → "Load 1, pressure"). */
const labels: Record<string, string> = {
  siteId: 'Site',
  kind: 'Kind of permit',
  description: 'What the work is',
  windowStart: 'Window opens',
  windowEnd: 'Window closes',
  excavationIds: 'Excavations',
  operatorIds: 'Operators',
  method: 'Method',
  loads: 'Loads',
  reason: 'Reason',
  standoff: 'Standoff',
  password: 'Password',
  conditions: 'Conditions',
  version: 'Version',
  dig: 'Dig details',
  file: 'File',
};

export function permitFieldLabel(key: string): string {
  const load = key.match(/^loads\[(\d+)\](?:\.(.+))?$/);
  if (load) return `Load ${Number(load[1]) + 1}${load[2] ? `, ${load[2].replace(/([A-Z])/g, ' $1').toLowerCase()}` : ''}`;
  const dig = key.match(/^dig\.servicesChecks\.(\w+)/);
  if (dig) return `Buried-services check (${dig[1].replace(/([A-Z])/g, ' $1').toLowerCase()})`;
  return labels[key] ?? key;
}

/** The summary of a refused permit request: the server's message, then each field in words. */
export function permitErrorSummary(e: unknown): string {
  const api = e as ApiError;
  if (!api || typeof api !== 'object' || !('fields' in api)) return errorMessage(e);
  return [api.message, ...Object.entries(api.fields ?? {}).map(([k, v]) => fieldSentence(permitFieldLabel(k), v))].join(' ');
}
