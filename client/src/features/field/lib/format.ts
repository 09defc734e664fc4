/** Times as the phone shows them, in the phone's own time zone (it is on the site). */
const time = new Intl.DateTimeFormat('en-GB', { hour: '2-digit', minute: '2-digit' });
const day = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short' });

export function clock(iso: string | Date): string {
  return time.format(new Date(iso));
}

function sameDay(a: Date, b: Date): boolean {
  return a.getFullYear() === b.getFullYear() && a.getMonth() === b.getMonth() && a.getDate() === b.getDate();
}

/** "Today 07:00 to 17:00", "Wed 3 Dec 07:00 to Thu 4 Dec 17:00". */
export function windowText(start: string, end: string, now = new Date()): string {
  const s = new Date(start);
  const e = new Date(end);
  const dayOf = (d: Date) => (sameDay(d, now) ? 'Today' : day.format(d));
  return sameDay(s, e) ? `${dayOf(s)} ${clock(s)} to ${clock(e)}` : `${dayOf(s)} ${clock(s)} to ${dayOf(e)} ${clock(e)}`;
}

/** A past time as the phone says it: another day's date, else the clock with "just now" / "5 min ago" within two hours. */
function pastTime(iso: string, now: Date): { day: string | null; clock: string; ago: string | null } {
  const t = new Date(iso);
  const minutes = Math.round((now.getTime() - t.getTime()) / 60_000);
  if (!sameDay(t, now)) return { day: day.format(t), clock: clock(t), ago: null };
  return { day: null, clock: clock(t), ago: minutes < 1 ? 'just now' : minutes < 120 ? `${minutes} min ago` : null };
}

/** "at 10:42 (5 min ago)", "at Wed 3 Dec 10:42". */
export function whenText(iso: string, now = new Date()): string {
  const p = pastTime(iso, now);
  if (p.day) return `on ${p.day} at ${p.clock}`;
  return p.ago ? `at ${p.clock} (${p.ago})` : `at ${p.clock}`;
}

/** "10:42, just now", "10:42, 5 min ago", "10:42", "Wed 3 Dec 10:42": the time a kept copy dates from. */
export function stampText(iso: string, now = new Date()): string {
  const p = pastTime(iso, now);
  if (p.day) return `${p.day} ${p.clock}`;
  return p.ago ? `${p.clock}, ${p.ago}` : p.clock;
}

/** Does the permit's window touch today? */
export function isToday(start: string, end: string, now = new Date()): boolean {
  const dayStart = new Date(now.getFullYear(), now.getMonth(), now.getDate());
  const dayEnd = new Date(dayStart.getTime() + 24 * 3600_000);
  return new Date(start) < dayEnd && new Date(end) > dayStart;
}
