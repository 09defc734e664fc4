import PDFDocument from 'pdfkit';
import { checklist, outcomeLabels, reasonLabels, type Inspection } from '@shared/schemas/inspections';
import { formatSiteTime, isoWeekRange, shiftsBetween } from '@shared/time/shifts';
import { figuresIn } from '@shared/units';
import type { Deps } from '../deps';
import { badRequest } from '../http';
import { failedItems, loadInspections, siteClock } from './inspections';
import { t } from './permits/pdf';
import { unitsOf } from './units';

/** Printed on every page of the report. */
const DUTY =
  'Excavations are inspected by a competent person at the start of every shift, after any event likely to have affected their ' +
  'strength or stability, and after any accidental fall of material (UK: CDM 2015 regulation 22 and Schedule 3; US: OSHA 29 CFR 1926.651(k)).';

// Colours: slate text, and the ISO 3864 safety colours for verdicts only.
const INK = '#1e293b';
const MUTED = '#475569';
const RULE = '#cbd5e1';
const RED = '#b91c1c';
const GREEN = '#15803d';
const YELLOW_INK = '#854d0e';

const THUMB_W = 96;
const THUMB_H = 72;

interface ShiftGroup {
  start: Date;
  name: string;
  inspections: Inspection[];
}

/**
 * The weekly inspection report of a site (ISO week on the site's calendar): for each excavation
 * that is open or was inspected that week, each shift with who inspected, when, why, the outcome,
 * failed checks and the photos as thumbnails; shifts of an open excavation with no inspection say
 * so. Figures in the units of `readerId` (their own, else the site's). Returns the PDF bytes.
 */
export async function weeklyReportPdf(
  deps: Pick<Deps, 'db' | 'config' | 'files' | 'now'>,
  siteId: number,
  week: string,
  readerId: number | null = null,
): Promise<Buffer> {
  const now = deps.now();
  const F = figuresIn(await unitsOf(deps.db, readerId, siteId));
  const clock = await siteClock(deps.db, siteId, now);
  const tz = clock.timeZone;
  const range = isoWeekRange(week, tz);
  if (!range) throw badRequest(`There is no week ${week}.`, { week: 'is not a week of that year' });

  const inspections = (await loadInspections(deps.db, { siteId, from: range.from, to: range.to })).reverse();
  const inspectedIds = [...new Set(inspections.map((i) => i.excavationId))];
  let q = deps.db
    .selectFrom('excavations')
    .select(['id', 'reference', 'name', 'state', 'depth', 'support_type', 'created_at'])
    .where('site_id', '=', siteId)
    .orderBy('reference');
  q = inspectedIds.length
    ? q.where((eb) => eb.or([eb('state', '=', 'open'), eb('id', 'in', inspectedIds)]))
    : q.where('state', '=', 'open');
  const excavations = await q.execute();
  const shiftsSoFar = shiftsBetween(clock.shifts, tz, range.from, new Date(Math.min(range.to.getTime(), now.getTime())));
  const uploads = await photoFiles(deps, inspections);

  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: 48, bottom: 64, left: 48, right: 48 },
    bufferPages: true,
    info: { Title: `Excavation inspections, ${clock.siteName}, ${week}`, Author: 'Brink', Subject: 'Weekly excavation inspection report' },
  });
  const done = collect(doc);
  const width = doc.page.width - doc.page.margins.left - doc.page.margins.right;
  const left = doc.page.margins.left;
  const bottom = () => doc.page.height - doc.page.margins.bottom;
  const ensure = (h: number) => {
    if (doc.y + h > bottom()) doc.addPage();
  };

  doc.fillColor(INK).font('Helvetica-Bold').fontSize(18).text('Excavation inspections');
  doc
    .font('Helvetica')
    .fontSize(12)
    .text(t(`${clock.siteName}  |  week ${week}: Monday ${range.monday} to Sunday ${range.sunday}`));
  doc
    .fontSize(9)
    .fillColor(MUTED)
    .text(
      t(
        `Times on the site's clock (${tz}). Shifts: ${clock.shifts.map((s) => `${s.name} from ${s.start}`).join(', ')}. Printed ${formatSiteTime(now, tz)}.`,
      ),
    );
  doc.moveDown(0.4).text(DUTY);
  doc.moveDown(0.4).fillColor(YELLOW_INK).text(F.caution);
  doc.moveDown(0.8);

  if (!excavations.length) doc.fillColor(INK).fontSize(11).text('No excavation was open or inspected this week.');

  for (const e of excavations) {
    const own = inspections.filter((i) => i.excavationId === e.id);
    ensure(90);
    doc
      .moveTo(left, doc.y)
      .lineTo(left + width, doc.y)
      .strokeColor(RULE)
      .lineWidth(1)
      .stroke();
    doc.moveDown(0.4);
    doc
      .fillColor(INK)
      .font('Helvetica-Bold')
      .fontSize(13)
      .text(t(`${e.reference}  ${e.name}`));
    doc
      .font('Helvetica')
      .fontSize(9)
      .fillColor(MUTED)
      .text(`${e.state}, ${F.length(e.depth)} deep, support: ${e.support_type.replace(/-/g, ' ')}`);
    doc.moveDown(0.3);

    for (const g of groupByShift(
      own,
      e.state === 'open' ? shiftsSoFar.filter((s) => s.end.getTime() > new Date(e.created_at).getTime()) : [],
    )) {
      ensure(40);
      doc
        .fillColor(INK)
        .font('Helvetica-Bold')
        .fontSize(10)
        .text(t(`${g.name}, from ${formatSiteTime(g.start, tz)}`));
      doc.font('Helvetica').fontSize(9);
      if (!g.inspections.length) {
        doc.fillColor(RED).text('No inspection recorded in this shift.', { indent: 12 });
        doc.moveDown(0.3);
        continue;
      }
      for (const i of g.inspections) {
        ensure(46);
        doc
          .fillColor(INK)
          .text(
            t(
              `${formatSiteTime(new Date(i.inspectedAt), tz)}  ${i.inspector.name}  (${reasonLabels[i.reason]}${i.reasonDetail ? `: ${i.reasonDetail}` : ''})`,
            ),
            { indent: 12 },
          );
        doc
          .font('Helvetica-Bold')
          .fillColor(i.outcome === 'safe' ? GREEN : RED)
          .text(outcomeLabels[i.outcome], { indent: 12, continued: !!i.remarks });
        if (i.remarks)
          doc
            .font('Helvetica')
            .fillColor(INK)
            .text(t(`  ${i.remarks}`));
        doc.font('Helvetica').fillColor(INK);
        const failed = failedItems(i.checklist);
        if (failed.length) doc.text(t(`Failed: ${failed.map((f) => `${f.label} (${f.note})`).join('; ')}`), { indent: 12 });
        const na = checklist.filter((c) => i.checklist[c.key]?.answer === 'na').map((c) => c.label);
        if (na.length) doc.fillColor(MUTED).text(`Not applicable: ${na.join(', ')}`, { indent: 12 });
        if (i.suspendedPermits.length)
          doc.fillColor(INK).text(`Permits suspended: ${i.suspendedPermits.map((p) => p.reference).join(', ')}`, { indent: 12 });
        if (i.photos.length) {
          ensure(THUMB_H + 8);
          let x = left + 12;
          const y = doc.y + 2;
          for (const p of i.photos) {
            if (x + THUMB_W > left + width) break;
            const bytes = uploads.get(p.id);
            if (bytes) {
              try {
                doc.image(bytes, x, y, { fit: [THUMB_W, THUMB_H], align: 'center', valign: 'center' });
              } catch {
                doc
                  .fontSize(7)
                  .fillColor(MUTED)
                  .text('(photo unreadable)', x, y + THUMB_H / 2, { width: THUMB_W, align: 'center' });
              }
            } else {
              doc
                .fontSize(7)
                .fillColor(MUTED)
                .text('(photo missing)', x, y + THUMB_H / 2, { width: THUMB_W, align: 'center' });
            }
            doc.rect(x, y, THUMB_W, THUMB_H).strokeColor(RULE).lineWidth(0.5).stroke();
            x += THUMB_W + 6;
          }
          if (i.photos.length * (THUMB_W + 6) > width - 12) {
            doc
              .fontSize(7)
              .fillColor(MUTED)
              .text(`(${i.photos.length} photos; the first ones shown)`, left + 12, y + THUMB_H + 2);
          }
          doc.x = left;
          doc.y = y + THUMB_H + 12;
          doc.fontSize(9);
        }
        doc.moveDown(0.3);
      }
    }
    doc.moveDown(0.5);
  }

  // Footer on every page: the caution and the page number.
  const pages = doc.bufferedPageRange();
  for (let p = 0; p < pages.count; p++) {
    doc.switchToPage(pages.start + p);
    const y = doc.page.height - doc.page.margins.bottom + 16;
    doc.page.margins.bottom = 0; // writing in the bottom margin must not start a new page
    doc.font('Helvetica').fontSize(7).fillColor(MUTED);
    doc.text(`${F.caution}  Page ${p + 1} of ${pages.count}.`, left, y, { width, lineBreak: true, height: 30 });
  }
  doc.end();
  return done;
}

/** Inspections grouped by the shift they were recorded in, with the expected shifts that have none. */
function groupByShift(list: Inspection[], expected: { start: Date; name: string }[]): ShiftGroup[] {
  const groups = new Map<number, ShiftGroup>();
  for (const s of expected) groups.set(s.start.getTime(), { start: s.start, name: s.name, inspections: [] });
  for (const i of list) {
    const start = new Date(i.shift.start);
    const g = groups.get(start.getTime()) ?? { start, name: i.shift.name, inspections: [] };
    g.inspections.push(i);
    groups.set(start.getTime(), g);
  }
  return [...groups.values()].sort((a, b) => a.start.getTime() - b.start.getTime());
}

async function photoFiles(deps: Pick<Deps, 'db' | 'files'>, list: Inspection[]): Promise<Map<number, Buffer>> {
  const ids = list.flatMap((i) => i.photos.map((p) => p.id));
  const out = new Map<number, Buffer>();
  if (!ids.length) return out;
  const rows = await deps.db.selectFrom('uploads').select(['id', 'storage_key']).where('id', 'in', ids).execute();
  for (const r of rows) {
    try {
      out.set(r.id, await deps.files.read(r.storage_key));
    } catch {
      // a file gone from the store prints as "(photo missing)"
    }
  }
  return out;
}

function collect(doc: PDFKit.PDFDocument): Promise<Buffer> {
  const chunks: Buffer[] = [];
  return new Promise((resolve, reject) => {
    doc.on('data', (c: Buffer) => chunks.push(c));
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
}
