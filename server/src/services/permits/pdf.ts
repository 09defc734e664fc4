import PDFDocument from 'pdfkit';
import QRCode from 'qrcode';
import { exclusionZone, localProjection, prepareExcavation, type XY } from '@shared/geometry';
import { footprintsOf } from '@shared/permits/check';
import { exclusionDistance, exclusionSentence } from '@shared/permits/exclusion';
import { niceStep, planScale, POINTS_PER_METRE_OF_PAPER, scaleBarLength, ticks } from '@shared/permits/drawing';
import {
  serviceCheckKeys,
  serviceCheckLabels,
  statusLabels,
  verdictRule,
  type ExcavationCheck,
  type PermitDetail,
  editableStatuses,
} from '@shared/schemas/permits';
import { attentionWarnings, bandsWords, failsBeyondPassing, type ProfilePoint } from '@shared/engineering';
import type { Deps } from '../../deps';
import { notFound } from '../../http';
import { figuresIn, FOOT, inSystem, profileIn, type Figures } from '@shared/units';
import { formatSiteTime } from '@shared/time/shifts';
import type { CheckExcavation } from '@shared/permits/check';
import { excavationsFor, plantFor } from './check';
import { loadDetail } from './read';
import { unitsOf } from '../units';

// The printed permit. pdfkit's built-in Helvetica (WinAnsi): text is written through `t()`, which
// spells out the few characters that font lacks.

const INK = '#1e293b';
const MUTED = '#475569';
const LINE = '#94a3b8';
const ACCENT = '#1d4e89';
const WATER = '#2b6cb0';
const ZONE = '#c62828'; // ISO 3864 red: the exclusion zone is a prohibition
const MARGIN = 48;

const replacements: [RegExp, string][] = [
  [/≤/g, '<='],
  [/≥/g, '>='],
  [/[′’‘]/g, "'"],
  [/[“”]/g, '"'],
  [/−/g, '-'],
  [/→/g, '->'],
  [/φ/g, 'phi'],
  [/δ/g, 'delta'],
  [/γ/g, 'gamma'],
  [/θ/g, 'theta'],
  [/σ/g, 'sigma'],
  [/Δ/g, 'delta '],
];
/** Text Helvetica can print. */
export function t(s: string): string {
  let out = s;
  for (const [re, r] of replacements) out = out.replace(re, r);
  return out.replace(/[^\x20-\x7e\u00a0-\u00ff\u2013\u2014\u2022\u2026]/g, '?');
}

/** A length, or `none`; `up` for standoffs and zones (never on the unsafe side). */
const lengthOr = (F: Figures, x: number | null | undefined, up = false) => (x == null ? 'none' : F.length(x, up ? { rounding: 'up' } : {}));

/**
 * The permit as a PDF (Buffer), with its number for the file name, in the units of `readerId` (their
 * own, else the site's). `compress: false` keeps the text readable (tests).
 */
export async function permitPdf(
  deps: Pick<Deps, 'db' | 'config'>,
  permitId: number,
  opts: { compress?: boolean; readerId?: number } = {},
): Promise<{ buffer: Buffer; number: string }> {
  const permit = await loadDetail(deps.db, permitId, { id: 0, role: null });
  if (!permit) throw notFound('That permit');
  const F = figuresIn(await unitsOf(deps.db, opts.readerId ?? null, permit.siteId));
  const m2 = (x: number | null | undefined) => lengthOr(F, x);
  const up = (x: number | null | undefined) => lengthOr(F, x, true);
  const site = await deps.db
    .selectFrom('sites')
    .select(['name', 'latitude', 'longitude', 'timezone', 'minimum_clearance'])
    .where('id', '=', permit.siteId)
    .executeTakeFirstOrThrow();
  const rev = permit.current;
  // Times on the site's clock; the window names the zone once.
  const when = (s: string | null) => (s ? formatSiteTime(s, site.timezone) : '-');
  const excavations = await excavationsFor(deps.db, permit.siteId, rev.excavationIds);
  // Each excavation's exclusion distance by the one rule the permit page and the phone use.
  const exclusions = excavations.flatMap((e) => {
    const x = exclusionDistance(rev, e.id, site.minimum_clearance, e.excavation.depth);
    return x ? [{ excavation: e, ...x }] : [];
  });
  const plant = await plantFor(deps.db, rev.loads, editableStatuses.includes(permit.status) ? null : rev.plantSnapshot);
  const qrUrl = `${deps.config.publicUrl}/field/permits/${permit.id}`;
  const qr = await QRCode.toBuffer(qrUrl, { type: 'png', margin: 1, width: 240, errorCorrectionLevel: 'M' });

  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN + 30, left: MARGIN, right: MARGIN },
    compress: opts.compress ?? true,
    bufferPages: true,
    info: { Title: `Permit ${permit.number}`, Subject: `Permit ${permit.number}, ${site.name}`, Creator: 'Brink' },
  });
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));
  const width = doc.page.width - 2 * MARGIN;

  // Header and QR code
  doc.image(qr, MARGIN + width - 90, MARGIN, { width: 90 });
  doc
    .font('Helvetica')
    .fontSize(9)
    .fillColor(MUTED)
    .text(t(`${site.name}`), MARGIN, MARGIN, { width: width - 100 });
  doc
    .font('Helvetica-Bold')
    .fontSize(20)
    .fillColor(INK)
    .text(t(`Permit ${permit.number}`), { width: width - 100 });
  doc
    .font('Helvetica')
    .fontSize(11)
    .text(
      t(
        `${permit.kind === 'load' ? 'Load beside an excavation' : 'Dig (open or extend an excavation)'} - revision ${permit.revision} - ${statusLabels[permit.status]}`,
      ),
      { width: width - 100 },
    );
  doc
    .fontSize(9)
    .fillColor(MUTED)
    .text(t(`Operator's view: ${qrUrl}`), { width: width - 100 });
  doc.moveDown(0.5);
  doc.fillColor(INK).fontSize(10);
  field(doc, 'Window', `${when(rev.windowStart)} to ${when(rev.windowEnd)} (${site.timezone} time)`);
  field(doc, 'Requested by', permit.requestedBy.name);
  field(doc, 'Excavations', excavations.map((e) => `${e.reference} ${e.name} (${m2(e.excavation.depth)} deep)`).join('; ') || 'none named');
  if (rev.description) field(doc, 'Work', rev.description);
  doc.y = Math.max(doc.y, MARGIN + 100);
  doc.moveDown(0.5);

  // Decision
  heading(doc, 'Decision');
  const d = rev.decision;
  if (!d) {
    doc.font('Helvetica').fontSize(10).text(t('No decision yet: this permit does not authorise any work.'));
  } else {
    const words = { approve: 'APPROVED', return: 'RETURNED FOR CHANGES', decline: 'DECLINED' }[d.action];
    doc
      .font('Helvetica-Bold')
      .fontSize(13)
      .fillColor(d.action === 'approve' ? INK : ZONE)
      .text(t(words));
    doc.fillColor(INK).font('Helvetica').fontSize(10);
    if (d.action === 'approve') {
      field(
        doc,
        'Standoff',
        d.standoff != null
          ? `Keep every load at least ${up(d.standoff)} from the excavation edge.`
          : 'Loads as placed on the plan (no standoff set).',
      );
      field(
        doc,
        'Computed standoff',
        d.computedStandoff === undefined
          ? 'not recorded with this decision'
          : d.computedStandoff === null
            ? 'none: no offset within 3H lets the support carry the loads'
            : up(d.computedStandoff),
      );
      if (exclusions.length) {
        doc.font('Helvetica-Bold').text(t('On the ground (the operator’s phone shows the same)'));
        doc.font('Helvetica');
        for (const x of exclusions) doc.text(t(exclusionSentence(x.excavation.reference, up(x.distance), x.basis)), { indent: 10 });
      }
      if (d.conditions.length) {
        doc.font('Helvetica-Bold').text('Conditions');
        doc.font('Helvetica');
        d.conditions.forEach((c, i) => doc.text(t(`${i + 1}. ${c}`), { indent: 10 }));
      } else field(doc, 'Conditions', 'none');
    }
    if (d.reason) field(doc, d.action === 'return' ? 'Comments' : 'Reason', d.reason);
    field(doc, 'Signature', d.signature);
  }
  doc.moveDown(0.5);

  // Plan
  heading(doc, 'Plan to scale');
  drawPlan(doc, F, permit, site, excavations, plant, new Map(exclusions.map((x) => [x.excavation.id, x.distance])));

  // Check per excavation
  const check = rev.check;
  for (const ex of check?.excavations ?? []) {
    doc.addPage();
    heading(doc, `Check beside ${ex.reference} ${ex.name}`);
    sheet(doc, F, ex, when);
    drawPressureDiagram(doc, F, ex.result.profile ?? [], ex.depth);
  }
  if (!check) {
    doc.moveDown();
    doc.font('Helvetica').fontSize(10).text(t('No check has been run on this revision.'));
  }

  // Dig checks, operators, trail
  if (doc.y > doc.page.height - 200) doc.addPage();
  else doc.moveDown();
  if (rev.dig) {
    heading(doc, 'Dig: buried services, depth and support');
    field(doc, 'Depth', m2(rev.dig.depth));
    field(doc, 'Support method', rev.dig.supportMethod);
    for (const k of serviceCheckKeys) {
      const c = rev.dig.servicesChecks[k];
      const state =
        c.state === 'done' ? `done by ${c.by} at ${when(c.at)}` : c.state === 'not-needed' ? `not needed: ${c.notes}` : 'NOT DONE';
      field(doc, serviceCheckLabels[k], state + (c.state === 'done' && c.notes ? ` (${c.notes})` : ''));
    }
    doc.moveDown(0.5);
  }
  heading(doc, 'Operators and briefing');
  if (!rev.operators.length) doc.font('Helvetica').fontSize(10).text('No operators are named.');
  for (const o of rev.operators) field(doc, o.name, o.briefedAt ? `briefed, confirmed at ${when(o.briefedAt)}` : 'not yet briefed');
  doc.moveDown(0.5);
  heading(doc, 'Signatures and times');
  for (const e of permit.events.filter((e) => e.toStatus || e.action === 'briefed')) {
    field(
      doc,
      when(e.at),
      `${e.actor.name}: ${e.action.replace('_', ' ')}${e.toStatus ? ` -> ${statusLabels[e.toStatus]}` : ''}${e.comment ? ` - "${e.comment}"` : ''}`,
    );
  }

  // The caution on every page
  const range = doc.bufferedPageRange();
  for (let i = range.start; i < range.start + range.count; i++) {
    doc.switchToPage(i);
    // The footer sits inside the bottom margin: lift the margin so pdfkit does not start a new page.
    doc.page.margins.bottom = 0;
    const y = doc.page.height - MARGIN - 24;
    doc
      .save()
      .moveTo(MARGIN, y - 4)
      .lineTo(MARGIN + width, y - 4)
      .lineWidth(0.5)
      .strokeColor(LINE)
      .stroke()
      .restore();
    doc
      .font('Helvetica')
      .fontSize(8)
      .fillColor(MUTED)
      .text(t(`Caution: ${F.caution}`), MARGIN, y, { width: width - 60, lineBreak: true, height: 30 });
    doc.text(`Page ${i - range.start + 1} of ${range.count}`, MARGIN + width - 55, y, { width: 55, align: 'right', lineBreak: false });
  }
  doc.end();
  return { buffer: await done, number: permit.number };
}

function heading(doc: PDFKit.PDFDocument, s: string): void {
  doc.font('Helvetica-Bold').fontSize(12).fillColor(ACCENT).text(t(s), MARGIN);
  doc.moveDown(0.2).fillColor(INK).font('Helvetica').fontSize(10);
}

function field(doc: PDFKit.PDFDocument, label: string, value: string): void {
  doc
    .font('Helvetica-Bold')
    .fontSize(10)
    .fillColor(INK)
    .text(t(`${label}: `), MARGIN, undefined, { continued: true });
  doc.font('Helvetica').text(t(value));
}

/** The calculation sheet's figures for one excavation. */
function sheet(doc: PDFKit.PDFDocument, F: Figures, ex: ExcavationCheck, when: (s: string | null) => string): void {
  const m2 = (x: number | null | undefined) => lengthOr(F, x);
  const r = ex.result;
  const req = ex.request;
  const e = req.excavation;
  field(doc, 'Method', r.method === 'elastic' ? 'Elastic (Boussinesq-based, NAVFAC DM-7.02)' : '45 degree load spread');
  field(
    doc,
    'Excavation',
    `depth ${m2(ex.depth)}; design surcharge ${F.pressure(Number(e.designSurcharge))}; rated pressure ${e.ratedPressure == null ? 'none' : F.pressure(Number(e.ratedPressure))}; ${e.pressureState}, wall friction ${e.wallFriction} deg, ${e.restraint}; groundwater ${e.groundwaterDepth == null ? 'none' : m2(Number(e.groundwaterDepth))}`,
  );
  field(
    doc,
    'Soil',
    req.soil
      .map(
        (l) =>
          `from ${m2(Number(l.top))}: ${F.unitWeight(Number(l.unitWeight))}${l.frictionAngle !== undefined ? `, phi' ${l.frictionAngle} deg, c' ${F.pressure(Number(l.cohesion ?? 0))}` : `, cu ${F.pressure(Number(l.undrainedShearStrength))}`}`,
      )
      .join('; '),
  );
  field(doc, 'Coefficients', r.coefficients.map((c) => `K = ${c.K.toFixed(3)} from ${m2(c.top)}`).join('; '));
  field(
    doc,
    'Forces',
    `soil ${F.lineForce(r.forces.soil)}, water ${F.lineForce(r.forces.water)}, surcharge ${F.lineForce(r.forces.surcharge)}, allowance ${F.lineForce(r.forces.allowance)}`,
  );
  field(doc, 'Moments about formation', `surcharge ${F.moment(r.moments.surcharge)}, allowance ${F.moment(r.moments.allowance)}`);
  field(
    doc,
    'Utilisation',
    `${r.utilisation == null ? 'no allowance' : r.utilisation.toFixed(2)} (${r.governing ?? '-'} governs) - ${r.passes ? 'passes' : 'FAILS'}`,
  );
  const attention = attentionWarnings(r.warnings);
  if (attention.length) {
    doc.moveDown(0.2).font('Helvetica-Bold').fontSize(10).fillColor(ZONE).text('Read before signing');
    doc.font('Helvetica').fontSize(9).fillColor(INK);
    for (const w of attention) doc.text(t(`- ${F.words(w)}`), { indent: 10 });
    for (const l of ex.loadStandoffs) {
      const bands = l.failingBands ?? [];
      if (failsBeyondPassing(bands, req.minimumClearance)) {
        doc.text(
          t(
            `- ${l.label} fails at ${F.words(bandsWords(bands))} from the edge (passing in between); its standoff is ${lengthOr(F, l.standoff, true)}.`,
          ),
          {
            indent: 10,
          },
        );
      }
    }
    doc.fontSize(10).moveDown(0.2);
  }
  doc.font('Helvetica').fontSize(8).fillColor(MUTED).text(t(verdictRule));
  doc.fillColor(INK).fontSize(10).moveDown(0.3);
  doc.font('Helvetica-Bold').text('Loads');
  doc.font('Helvetica').fontSize(9);
  for (const l of ex.loads) {
    doc.text(
      t(
        `${l.own ? '' : `[permit ${l.permitNumber}] `}${l.label}${l.element ? ` - ${l.element}` : ''}: ${l.kind}, offset ${m2(l.offset)}, force ${F.lineForce(l.force)}, standoff ${l.standoff == null ? 'none within 3H' : lengthOr(F, l.standoff, true)}`,
      ),
      { indent: 10 },
    );
  }
  doc.fontSize(10);
  field(
    doc,
    'Other permits counted',
    ex.counted.length
      ? ex.counted.map((c) => `${c.number} (${statusLabels[c.status]}, ${when(c.windowStart)} to ${when(c.windowEnd)})`).join('; ')
      : 'none',
  );
  const others = r.warnings.filter((w) => !attention.includes(w));
  if (others.length) field(doc, 'Warnings', others.map(F.words).join('; '));
  doc.moveDown(0.5);
}

/** The pressure diagram to scale: depth downward, soil, water, surcharge and allowance, units on both axes. */
function drawPressureDiagram(doc: PDFKit.PDFDocument, F: Figures, siProfile: ProfilePoint[], siH: number): void {
  if (siProfile.length < 2) return;
  // Drawn in the reader's units: the axes' ticks are round numbers of psf and ft, or kPa and m.
  const profile = profileIn(siProfile, F.system);
  const H = inSystem('length', siH, F.system);
  const boxW = 300;
  const boxH = 220;
  if (doc.y + boxH + 76 > doc.page.height - MARGIN - 40) doc.addPage();
  const x0 = MARGIN + 50;
  const y0 = doc.y + 36;
  const maxP = Math.max(1, ...profile.map((p) => Math.max(p.soil, p.water, p.surcharge, p.allowance)));
  const px = ticks(0, maxP, 5);
  const dz = ticks(0, H, 5);
  const sx = boxW / px[px.length - 1];
  const sy = boxH / dz[dz.length - 1];
  const X = (p: number) => x0 + p * sx;
  const Y = (z: number) => y0 + z * sy;
  doc
    .font('Helvetica-Bold')
    .fontSize(10)
    .fillColor(INK)
    .text('Pressure diagram (depth downward)', MARGIN, y0 - 36);
  doc.font('Helvetica').fontSize(8).fillColor(MUTED);
  for (const v of px) {
    doc
      .save()
      .moveTo(X(v), Y(0))
      .lineTo(X(v), Y(dz[dz.length - 1]))
      .lineWidth(0.3)
      .strokeColor('#e2e8f0')
      .stroke()
      .restore();
    doc.text(String(v), X(v) - 15, Y(0) - 10, { width: 30, align: 'center', lineBreak: false });
  }
  for (const v of dz) {
    doc
      .save()
      .moveTo(X(0), Y(v))
      .lineTo(X(px[px.length - 1]), Y(v))
      .lineWidth(0.3)
      .strokeColor('#e2e8f0')
      .stroke()
      .restore();
    doc.text(v.toFixed(1), x0 - 34, Y(v) - 4, { width: 30, align: 'right', lineBreak: false });
  }
  doc.text(`pressure (${F.unit('pressure')})`, x0 + boxW / 2 - 30, Y(0) - 20, { lineBreak: false });
  doc
    .save()
    .rotate(-90, { origin: [x0 - 42, y0 + boxH / 2] })
    .text(`depth (${F.unit('length')})`, x0 - 62, y0 + boxH / 2 - 4, { lineBreak: false })
    .restore();
  const series: { key: 'soil' | 'water' | 'surcharge' | 'allowance'; colour: string; dash?: number; label: string }[] = [
    { key: 'soil', colour: '#64748b', label: 'soil' },
    { key: 'water', colour: WATER, label: 'water' },
    { key: 'surcharge', colour: ACCENT, label: 'surcharge (loads)' },
    { key: 'allowance', colour: '#7c3aed', dash: 3, label: 'allowance (design surcharge)' },
  ];
  for (const s of series) {
    doc.save().lineWidth(1.4).strokeColor(s.colour);
    if (s.dash) doc.dash(s.dash, { space: 2 });
    profile.forEach((p, i) => (i === 0 ? doc.moveTo(X(p[s.key]), Y(p.z)) : doc.lineTo(X(p[s.key]), Y(p.z))));
    doc.stroke().restore();
  }
  doc.save().moveTo(X(0), Y(0)).lineTo(X(0), Y(H)).lineWidth(1).strokeColor(INK).stroke().restore();
  doc
    .save()
    .moveTo(X(0), Y(H))
    .lineTo(X(px[px.length - 1]), Y(H))
    .lineWidth(0.6)
    .dash(2, { space: 2 })
    .strokeColor(INK)
    .stroke()
    .restore();
  doc.fillColor(INK).text(`formation ${F.length(siH)}`, X(px[px.length - 1]) + 4, Y(H) - 4, { lineBreak: false });
  let ly = y0;
  for (const s of series) {
    doc.save().lineWidth(1.4).strokeColor(s.colour);
    if (s.dash) doc.dash(s.dash, { space: 2 });
    doc
      .moveTo(x0 + boxW + 20, ly + 4)
      .lineTo(x0 + boxW + 40, ly + 4)
      .stroke()
      .restore();
    doc.fillColor(INK).text(s.label, x0 + boxW + 44, ly, { lineBreak: false });
    ly += 12;
  }
  doc.x = MARGIN;
  doc.y = Y(dz[dz.length - 1]) + 16;
}

/** The plan to scale: excavations, the exclusion zone, the loads, a scale bar and a north arrow. */
function drawPlan(
  doc: PDFKit.PDFDocument,
  F: Figures,
  permit: PermitDetail,
  site: { latitude: number; longitude: number },
  excavations: CheckExcavation[],
  plant: Awaited<ReturnType<typeof plantFor>>,
  /** Each excavation's exclusion distance (m), by id; none before approval. */
  exclusions: ReadonlyMap<number, number>,
): void {
  const proj = localProjection([site.longitude, site.latitude]);
  const rings = excavations.flatMap((e) => {
    try {
      const prepared = prepareExcavation(e.shape, proj);
      return [{ ref: e.reference, ring: prepared.ring, prepared, standoff: exclusions.get(e.id) ?? 0 }];
    } catch {
      return [];
    }
  });
  const feet = permit.current.loads.flatMap((l) => {
    try {
      return footprintsOf(l, plant, proj);
    } catch {
      return [];
    }
  });
  const zones: XY[][][] = rings.flatMap((r) => {
    if (!(r.standoff > 0)) return [];
    const z = exclusionZone(r.prepared, r.standoff, proj);
    const polys = z.type === 'Polygon' ? [z.coordinates] : z.coordinates;
    return polys.map((poly) => poly.map((ring) => ring.map((c) => proj.toLocal(c))));
  });
  const zoneWords = rings.filter((r) => r.standoff > 0).map((r) => `${r.ref} ${lengthOr(F, r.standoff, true)}`);
  const pts: XY[] = [...rings.flatMap((r) => r.ring), ...feet.flatMap((f) => f.local), ...zones.flat(2)];
  const boxW = doc.page.width - 2 * MARGIN;
  const boxH = 260;
  if (doc.y + boxH + 30 > doc.page.height - MARGIN - 40) doc.addPage();
  const top = doc.y + 4;
  doc.save().rect(MARGIN, top, boxW, boxH).lineWidth(0.5).strokeColor(LINE).stroke().restore();
  if (pts.length === 0) {
    doc
      .font('Helvetica')
      .fontSize(10)
      .text('Nothing to draw: no excavation or load is placed.', MARGIN + 10, top + 10);
    doc.y = top + boxH + 10;
    return;
  }
  const minX = Math.min(...pts.map((p) => p[0]));
  const maxX = Math.max(...pts.map((p) => p[0]));
  const minY = Math.min(...pts.map((p) => p[1]));
  const maxY = Math.max(...pts.map((p) => p[1]));
  const n = planScale(maxX - minX + 4, maxY - minY + 4, boxW - 20, boxH - 50);
  const k = POINTS_PER_METRE_OF_PAPER / n;
  const cx = (minX + maxX) / 2;
  const cy = (minY + maxY) / 2;
  const P = (p: XY): [number, number] => [MARGIN + boxW / 2 + (p[0] - cx) * k, top + (boxH - 30) / 2 + 5 - (p[1] - cy) * k];
  const path = (ring: XY[]) => {
    ring.forEach((p, i) => (i === 0 ? doc.moveTo(...P(p)) : doc.lineTo(...P(p))));
    doc.closePath();
  };
  doc.save();
  doc.rect(MARGIN, top, boxW, boxH).clip();
  for (const poly of zones) {
    doc.save();
    path(poly[0]);
    doc.fillOpacity(0.12).fillAndStroke(ZONE, ZONE);
    doc.restore();
  }
  for (const r of rings) {
    doc.save();
    path(r.ring);
    doc.fillOpacity(0.6).lineWidth(1).fillAndStroke('#a8a29e', INK);
    doc.restore();
    const c = r.ring.reduce((a, p) => [a[0] + p[0] / r.ring.length, a[1] + p[1] / r.ring.length], [0, 0] as XY);
    doc
      .font('Helvetica-Bold')
      .fontSize(8)
      .fillColor(INK)
      .text(t(r.ref), P(c)[0] - 20, P(c)[1] - 4, { width: 40, align: 'center', lineBreak: false });
  }
  for (const f of feet) {
    doc.save();
    if (f.kind === 'line') {
      f.local.forEach((p, i) => (i === 0 ? doc.moveTo(...P(p)) : doc.lineTo(...P(p))));
      doc.lineWidth(2).strokeColor(ACCENT).stroke();
    } else {
      path(f.local);
      doc.fillOpacity(0.5).lineWidth(0.8).fillAndStroke(ACCENT, ACCENT);
    }
    doc.restore();
  }
  doc.restore();
  // scale bar (a round number of metres, or of feet) and north arrow
  const perUnit = F.system === 'us' ? k * FOOT : k; // points of paper per metre, or per foot
  const span = (boxW - 20) / perUnit;
  const bar = scaleBarLength(span / 2);
  const bx = MARGIN + 12;
  const by = top + boxH - 16;
  const half = niceStep(bar, 2);
  doc.save().lineWidth(0.8).strokeColor(INK);
  doc.rect(bx, by - 3, bar * perUnit, 4).stroke();
  doc.rect(bx, by - 3, half * perUnit, 4).fill(INK);
  doc.restore();
  doc.font('Helvetica').fontSize(8).fillColor(INK);
  doc.text('0', bx - 3, by + 3, { lineBreak: false });
  doc.text(`${bar} ${F.unit('length')}`, bx + bar * perUnit - 8, by + 3, { lineBreak: false });
  doc.text(`Scale 1:${n} on A4`, bx + bar * perUnit + 24, by - 2, { lineBreak: false });
  const nx = MARGIN + boxW - 24;
  const ny = top + 14;
  doc
    .save()
    .moveTo(nx, ny)
    .lineTo(nx - 6, ny + 18)
    .lineTo(nx, ny + 13)
    .lineTo(nx + 6, ny + 18)
    .closePath()
    .fill(INK)
    .restore();
  doc.text('N', nx - 3, ny + 20, { lineBreak: false });
  doc.font('Helvetica').fontSize(8).fillColor(MUTED);
  doc.text(
    t(
      `Grey: excavation. Blue: loads (tracks, pads, drawn loads). Red band: exclusion zone${zoneWords.length ? `, from the edge: ${zoneWords.join(', ')}` : ''}.`,
    ),
    MARGIN,
    top + boxH + 4,
    { width: boxW },
  );
  doc.fillColor(INK);
  doc.moveDown(0.5);
}
