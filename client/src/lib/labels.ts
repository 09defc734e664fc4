import type { surchargeMethods } from '@shared/schemas/sites';

/** How Brink names each way of spreading a surcharge onto the support. */
export const surchargeMethodLabels: Record<(typeof surchargeMethods)[number], string> = {
  'dispersion-45': 'Spread at 45° below the load',
  elastic: 'Elastic half-space (Boussinesq)',
};

const dateTime = new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short' });

/** "3 Mar 2026, 07:30" in the browser's time zone; the text given when it is not a date. */
export function formatDateTime(value: string): string {
  const date = new Date(value);
  return Number.isNaN(date.getTime()) ? value : dateTime.format(date);
}
