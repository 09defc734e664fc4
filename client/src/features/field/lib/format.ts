/** Times as the phone shows them, in the phone's own time zone (it is on the site). */
const time = new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit' });
const day = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short' });

export function clock(iso: string | Date): string {
  return time.format(new Date(iso));
}

export function sameDay(a: Date, b: Date): boolean {
  return a.getFullYear() === b.getFullYear() && a.getMonth() === b.getMonth() && a.getDate() === b.getDate();
}

/** "Today 07:00 to 17:00", "Wed 3 Dec 07:00 to Thu 4 Dec 17:00". */
export function windowText(start: string, end: string, now = new Date()): string {
  const s = new Date(start);
  const e = new Date(end);
  const dayOf = (d: Date) => (sameDay(d, now) ? 'Today' : day.format(d));
  return sameDay(s, e) ? `${dayOf(s)} ${clock(s)} to ${clock(e)}` : `${dayOf(s)} ${clock(s)} to ${dayOf(e)} ${clock(e)}`;
}

/** "at 10:42 (5 min ago)", "at Wed 3 Dec 10:42". */
export function whenText(iso: string, now = new Date()): string {
  const t = new Date(iso);
  const minutes = Math.round((now.getTime() - t.getTime()) / 60_000);
  if (!sameDay(t, now)) return `on ${day.format(t)} at ${clock(t)}`;
  if (minutes < 1) return `at ${clock(t)} (just now)`;
  if (minutes < 120) return `at ${clock(t)} (${minutes} min ago)`;
  return `at ${clock(t)}`;
}

/** Metres to 0.01, as Brink shows set figures. */
export function metres2(value: number): string {
  return `${value.toFixed(2)} m`;
}

/** Does the permit's window touch today? */
export function isToday(start: string, end: string, now = new Date()): boolean {
  const dayStart = new Date(now.getFullYear(), now.getMonth(), now.getDate());
  const dayEnd = new Date(dayStart.getTime() + 24 * 3600_000);
  return new Date(start) < dayEnd && new Date(end) > dayStart;
}
