/**
 * Shift arithmetic in a site's own time zone, daylight saving included, with the built-in Intl API
 * only (no time-zone package). Times of day are wall-clock "HH:MM" strings as people on site say
 * them; instants are JavaScript Dates (UTC underneath).
 *
 * A site works one or more shifts a day. A shift runs from its start until the next shift's start
 * (the first shift of the next day after the last of the day), so at any instant exactly one shift
 * is current.
 */

export interface ShiftDef {
  name: string;
  /** Wall-clock start, "HH:MM" (24-hour). */
  start: string;
}

export interface ShiftSpan {
  name: string;
  /** The instant the shift started. */
  start: Date;
  /** The instant the next shift starts. */
  end: Date;
  /** The site's calendar date of the start, "YYYY-MM-DD". */
  date: string;
}

/** One day shift at 07:00: what a site works until someone sets its shifts. */
export const DEFAULT_SHIFTS: readonly ShiftDef[] = [{ name: 'Day shift', start: '07:00' }];

interface WallClock {
  year: number;
  month: number;
  day: number;
  hour: number;
  minute: number;
  second: number;
}

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: 'numeric',
      minute: 'numeric',
      second: 'numeric',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** What a wall clock in `timeZone` reads at the instant `at`. */
export function wallClock(at: Date, timeZone: string): WallClock {
  const parts: Record<string, number> = {};
  for (const p of formatter(timeZone).formatToParts(at)) if (p.type !== 'literal') parts[p.type] = Number(p.value);
  return { year: parts.year, month: parts.month, day: parts.day, hour: parts.hour % 24, minute: parts.minute, second: parts.second };
}

/** The zone's offset from UTC at the instant `at`, in minutes (east positive: London in summer +60). */
export function offsetMinutes(at: Date, timeZone: string): number {
  const w = wallClock(at, timeZone);
  const asUtc = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
  return Math.round((asUtc - Math.floor(at.getTime() / 1000) * 1000) / 60_000);
}

/**
 * The instant at which the wall clock in `timeZone` reads the given date and time.
 * - A time that occurs twice (clocks go back) gives the first of the two.
 * - A time that does not occur (clocks go forward) gives the instant it would be had the clocks
 *   not changed yet, i.e. as far past the jump as the time was past its start (01:30 on the
 *   London spring-forward day is 02:30 BST).
 */
export function zonedInstant(year: number, month: number, day: number, hour: number, minute: number, timeZone: string): Date {
  const local = Date.UTC(year, month - 1, day, hour, minute);
  const before = offsetMinutes(new Date(local - 36 * 3600_000), timeZone);
  const after = offsetMinutes(new Date(local + 36 * 3600_000), timeZone);
  const matches = [...new Set([before, after])]
    .map((o) => local - o * 60_000)
    .filter((t) => {
      const w = wallClock(new Date(t), timeZone);
      return w.year === year && w.month === month && w.day === day && w.hour === hour && w.minute === minute;
    });
  if (matches.length) return new Date(Math.min(...matches));
  return new Date(local - before * 60_000);
}

/** "HH:MM" → minutes after midnight; throws on anything else. */
function parseTimeOfDay(s: string): number {
  const m = /^([01]\d|2[0-3]):([0-5]\d)$/.exec(s);
  if (!m) throw new Error(`not a time of day: ${s}`);
  return Number(m[1]) * 60 + Number(m[2]);
}

/** The calendar date `days` after the given one. */
function addDays(y: number, m: number, d: number, days: number): { year: number; month: number; day: number } {
  const t = new Date(Date.UTC(y, m - 1, d + days));
  return { year: t.getUTCFullYear(), month: t.getUTCMonth() + 1, day: t.getUTCDate() };
}

const pad = (n: number, w = 2) => String(n).padStart(w, '0');
const isoDate = (y: number, m: number, d: number) => `${pad(y, 4)}-${pad(m)}-${pad(d)}`;

function sorted(shifts: readonly ShiftDef[]): ShiftDef[] {
  const list = shifts.length ? [...shifts] : [...DEFAULT_SHIFTS];
  return list.sort((a, b) => parseTimeOfDay(a.start) - parseTimeOfDay(b.start));
}

/** Every shift start on the site's calendar dates from `first` for `days` days, in order. */
function startsOnDays(shifts: readonly ShiftDef[], timeZone: string, first: { year: number; month: number; day: number }, days: number) {
  const defs = sorted(shifts);
  const out: { name: string; start: Date; date: string }[] = [];
  for (let k = 0; k < days; k++) {
    const d = addDays(first.year, first.month, first.day, k);
    for (const s of defs) {
      const mins = parseTimeOfDay(s.start);
      out.push({
        name: s.name,
        start: zonedInstant(d.year, d.month, d.day, Math.floor(mins / 60), mins % 60, timeZone),
        date: isoDate(d.year, d.month, d.day),
      });
    }
  }
  return out;
}

/** The shift current at the instant `at` (the latest start at or before it) and when it ends. */
export function currentShift(shifts: readonly ShiftDef[], timeZone: string, at: Date): ShiftSpan {
  const w = wallClock(at, timeZone);
  const starts = startsOnDays(shifts, timeZone, addDays(w.year, w.month, w.day, -2), 5);
  let i = starts.length - 1;
  while (i > 0 && starts[i].start.getTime() > at.getTime()) i--;
  return { ...starts[i], end: starts[i + 1].start };
}

/** The shifts that start in [from, to), in order. */
export function shiftsBetween(shifts: readonly ShiftDef[], timeZone: string, from: Date, to: Date): ShiftSpan[] {
  const w = wallClock(from, timeZone);
  const days = Math.ceil((to.getTime() - from.getTime()) / 86_400_000) + 3;
  const starts = startsOnDays(shifts, timeZone, addDays(w.year, w.month, w.day, -1), days);
  const out: ShiftSpan[] = [];
  for (let i = 0; i + 1 < starts.length; i++) {
    const s = starts[i];
    if (s.start.getTime() >= from.getTime() && s.start.getTime() < to.getTime()) out.push({ ...s, end: starts[i + 1].start });
  }
  return out;
}

/** The ISO 8601 week ("2026-W14") that the calendar date falls in. */
export function isoWeekOfDate(year: number, month: number, day: number): string {
  const t = new Date(Date.UTC(year, month - 1, day));
  const weekday = (t.getUTCDay() + 6) % 7; // Monday 0
  t.setUTCDate(t.getUTCDate() - weekday + 3); // the Thursday of the same week decides the year
  const weekYear = t.getUTCFullYear();
  const firstThursday = new Date(Date.UTC(weekYear, 0, 4));
  firstThursday.setUTCDate(firstThursday.getUTCDate() - ((firstThursday.getUTCDay() + 6) % 7) + 3);
  const week = 1 + Math.round((t.getTime() - firstThursday.getTime()) / (7 * 86_400_000));
  return `${weekYear}-W${pad(week)}`;
}

/** The ISO week that the instant falls in on the site's calendar. */
export function isoWeekAt(at: Date, timeZone: string): string {
  const w = wallClock(at, timeZone);
  return isoWeekOfDate(w.year, w.month, w.day);
}

export const isoWeekPattern = /^(\d{4})-W(\d{2})$/;

/**
 * The instants bounding an ISO week on the site's calendar: Monday 00:00 local to the next
 * Monday 00:00 local (167, 168 or 169 hours long around daylight saving changes). Null when the
 * week does not exist (e.g. W53 of a 52-week year).
 */
export function isoWeekRange(week: string, timeZone: string): { from: Date; to: Date; monday: string; sunday: string } | null {
  const m = isoWeekPattern.exec(week);
  if (!m) return null;
  const year = Number(m[1]);
  const n = Number(m[2]);
  if (n < 1 || n > 53) return null;
  const jan4 = new Date(Date.UTC(year, 0, 4));
  const monday1 = addDays(year, 1, 4, -((jan4.getUTCDay() + 6) % 7));
  const monday = addDays(monday1.year, monday1.month, monday1.day, (n - 1) * 7);
  if (isoWeekOfDate(monday.year, monday.month, monday.day) !== week) return null;
  const next = addDays(monday.year, monday.month, monday.day, 7);
  const sunday = addDays(monday.year, monday.month, monday.day, 6);
  return {
    from: zonedInstant(monday.year, monday.month, monday.day, 0, 0, timeZone),
    to: zonedInstant(next.year, next.month, next.day, 0, 0, timeZone),
    monday: isoDate(monday.year, monday.month, monday.day),
    sunday: isoDate(sunday.year, sunday.month, sunday.day),
  };
}

const siteFormatters = new Map<string, Intl.DateTimeFormat>();

/**
 * The one way Brink shows a time to people: "Mon, 30 Mar 2026, 07:00" on the site's clock (24 h), on
 * screens, in e-mails, CSV and the PDFs. `zone: true` adds the zone's name, for text read away from
 * the site (e-mails, the printed permit): "Mon, 30 Mar 2026, 07:00 (Europe/London)". `clock: true`
 * gives the clock alone, for a time on a day already named: "07:00". A value that is not a time comes
 * back as it is.
 */
export function formatSiteTime(
  at: Date | string,
  timeZone: string,
  opts: { seconds?: boolean; zone?: boolean; clock?: boolean } = {},
): string {
  const date = typeof at === 'string' ? new Date(at) : at;
  if (Number.isNaN(date.getTime())) return String(at);
  const key = `${timeZone}|${opts.seconds ? 's' : ''}|${opts.clock ? 'c' : ''}`;
  let f = siteFormatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      ...(opts.clock ? {} : { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' }),
      hour: '2-digit',
      minute: '2-digit',
      ...(opts.seconds ? { second: '2-digit' } : {}),
      hourCycle: 'h23',
    });
    siteFormatters.set(key, f);
  }
  const text = f.format(date);
  return opts.zone ? `${text} (${timeZone})` : text;
}

/** The time zone of the device showing the page (for times that belong to no one site). */
export function deviceTimeZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
}

/** "2026-03-30 07:00" on the site's clock (sortable, for CSV). */
export function siteTimestamp(at: Date, timeZone: string): string {
  const w = wallClock(at, timeZone);
  return `${isoDate(w.year, w.month, w.day)} ${pad(w.hour)}:${pad(w.minute)}`;
}
