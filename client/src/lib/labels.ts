import { deviceTimeZone, formatSiteTime } from '@shared/time/shifts';
import type { surchargeMethods } from '@shared/schemas/sites';

/** How Brink names each way of spreading a surcharge onto the support. */
export const surchargeMethodLabels: Record<(typeof surchargeMethods)[number], string> = {
  'dispersion-45': 'Spread at 45° below the load',
  elastic: 'Elastic half-space (Boussinesq)',
};

/** "Tue, 3 Mar 2026, 07:30" on the given clock (the device's when no site is known); the text given when it is not a date. */
export function formatDateTime(value: string, timeZone: string = deviceTimeZone()): string {
  return formatSiteTime(value, timeZone);
}
