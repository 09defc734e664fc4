import { deviceTimeZone, formatSiteTime } from '@shared/time/shifts';

/** An ISO time as the value of a datetime-local input (local time, minutes). */
export function toLocalInput(iso: string): string {
  const d = new Date(iso);
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A datetime-local input's value (local time) as ISO 8601 with the offset of UTC. */
export function fromLocalInput(value: string): string {
  return new Date(value).toISOString();
}

/** A time for reading, on the site's clock when it is known: "Mon, 3 Mar 2026, 07:00" (shared/time formatSiteTime). */
export function when(iso: string | null, timeZone: string = deviceTimeZone()): string {
  return iso ? formatSiteTime(iso, timeZone) : '—';
}
