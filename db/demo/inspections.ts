import type { Db } from '../database';
import type { DemoContext } from './people';

// Demo inspections (invented): the demo site's day shift, and a few past inspections of its open
// excavations: routine safe ones, and one found not safe after overnight rain, then safe again
// once pumped out. Nothing is recorded for today's shift, so the demo shows excavations due.

type Answer = { answer: 'pass' | 'fail' | 'na'; note: string };
const keys = ['support', 'faces', 'water', 'edges', 'access', 'barriers', 'loads', 'atmosphere'] as const;

function answers(over: Partial<Record<(typeof keys)[number], Answer>> = {}): string {
  const all = Object.fromEntries(keys.map((k) => [k, { answer: k === 'atmosphere' ? 'na' : 'pass', note: '' }]));
  return JSON.stringify({ ...all, ...over });
}

/** The instant a London wall clock reads HH:MM, `daysAgo` days before today (demo data only). */
function londonTime(daysAgo: number, hour: number, minute: number): Date {
  const today = new Date();
  const noon = new Date(Date.UTC(today.getUTCFullYear(), today.getUTCMonth(), today.getUTCDate() - daysAgo, 12));
  const londonNoon = Number(
    new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hour: 'numeric', hourCycle: 'h23' }).format(noon),
  );
  const offsetHours = londonNoon - 12;
  return new Date(Date.UTC(noon.getUTCFullYear(), noon.getUTCMonth(), noon.getUTCDate(), hour - offsetHours, minute));
}

export async function seedInspections(db: Db, ctx: DemoContext): Promise<void> {
  await db.insertInto('site_shifts').values({ site_id: ctx.siteId, name: 'Day shift', start_time: '07:00' }).execute();
  const open = await db
    .selectFrom('excavations')
    .select(['id'])
    .where('site_id', '=', ctx.siteId)
    .where('state', '=', 'open')
    .orderBy('reference')
    .execute();
  if (!open.length) return;

  const record = (
    excavationId: number,
    daysAgo: number,
    h: number,
    m: number,
    f: {
      by: number;
      reason?: 'shift-start' | 'after-event' | 'after-fall';
      reasonDetail?: string;
      checklist?: string;
      outcome?: 'safe' | 'not-safe';
      remarks?: string;
    },
  ) => ({
    excavation_id: excavationId,
    site_id: ctx.siteId,
    inspector_id: f.by,
    inspected_at: londonTime(daysAgo, h, m),
    recorded_at: londonTime(daysAgo, h, m + 2),
    shift_name: 'Day shift',
    shift_start: londonTime(daysAgo, 7, 0),
    reason: f.reason ?? 'shift-start',
    reason_detail: f.reasonDetail ?? '',
    checklist: f.checklist ?? answers(),
    outcome: f.outcome ?? 'safe',
    remarks: f.remarks ?? '',
  });

  const { supervisor, coordinator } = ctx.people;
  const rows = [];
  for (const [i, e] of open.entries()) {
    rows.push(record(e.id, 3, 7, 10 + i * 6, { by: supervisor }));
    rows.push(record(e.id, 1, 7, 12 + i * 6, { by: supervisor }));
  }
  const wet = open[0];
  rows.push(
    record(wet.id, 2, 7, 8, {
      by: supervisor,
      checklist: answers({
        water: { answer: 'fail', note: 'About 300 mm of standing water at formation after overnight rain; the pump had tripped' },
        faces: { answer: 'fail', note: 'Soft, slumping ground below the bottom frame on the east side' },
      }),
      outcome: 'not-safe',
      remarks: 'Pump out, reset the pump and check the east face below the bottom frame before anyone goes in.',
    }),
    record(wet.id, 2, 10, 40, {
      by: coordinator,
      reason: 'after-event',
      reasonDetail: 'Pumped out and pump reset; east face trimmed and the bottom frame re-seated',
      outcome: 'safe',
      remarks: 'Dry at formation. Keep the pump on its float switch.',
    }),
  );
  await db.insertInto('inspections').values(rows).execute();
}
