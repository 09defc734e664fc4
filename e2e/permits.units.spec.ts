import { devices, expect, test, type Page } from '@playwright/test';
import { localProjection, prepareExcavation, signedDistanceToZoneAt } from '@shared/geometry';
import type { FieldPermit } from '@shared/schemas/field';
import { demoPassword, signIn } from './helpers';

/** Sets the signed-in person's units through the API (null: follow the site again). */
async function setMyUnits(page: Page, units: 'us' | 'metric' | null) {
  const r = await page.request.patch('/api/auth/me', { data: { units }, headers: { Origin: new URL(page.url()).origin } });
  expect(r.ok()).toBe(true);
}

/** NIST SP 811 (2008) B.8: 1 ft = 0.3048 m exactly; 1 psf = 0.04788026 kPa (from the foot and the pound-force). */
const M_PER_FT = 0.3048;
const KPA_PER_PSF = 0.04788026;

/** A figure followed by a metric unit of length, pressure, force or unit weight on the page. */
const METRIC = /\d(\.\d+)? ?(m|kPa|kN|kN\/m|kN\/m³)(?![\w²³/·])/;

// A supervisor who works in US customary units places a machine and reads its standoff in feet; the
// same check read in metric agrees (1 ft = 0.3048 m exactly, NIST SP 811), the feet rounded up.
test('a US user places a load and reads the standoff in feet', async ({ page }) => {
  const siteId = await signIn(page, 'supervisor@demo.brink.test');
  const myUnits = async (label: string) => {
    await page.getByRole('button', { name: /Signed in as/ }).click();
    // The person's menu (the narrow-screen copy of it is hidden).
    const select = page.getByLabel('My units').filter({ visible: true });
    await select.selectOption({ label });
    await expect(select).toHaveValue(label.startsWith('US') ? 'us' : label === 'As the site' ? 'site' : 'metric');
    await page.keyboard.press('Escape');
  };
  try {
    await myUnits('US customary (ft, lbf, psf)');
    await page.goto(`/sites/${siteId}/permits/new`);
    await page.getByLabel('What the work is').fill('Excavator 21 t loading out beside the rising main trench');
    await page.getByLabel(/^TR-01 /).check();
    await page.getByLabel('Add a machine from the plant library').selectOption({ label: 'Excavator 21 t (46,300 lb)' });
    await expect(
      page.getByText(/Excavator 21 t is placed \d+\.\d ft from the edge of TR-01, just beyond its computed standoff of \d+\.\d ft/),
    ).toBeVisible();

    const live = page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) });
    const standoff = live.getByTestId('computed-standoff');
    await expect(standoff).toHaveText(/^\d+\.\d ft$/);
    const feet = Number((await standoff.textContent())!.replace(' ft', ''));
    await expect(live.getByText(/OSHA 29 CFR 1926 Subpart P/).first()).toBeVisible();

    // Typed in feet and inches: the machine moves half a foot east (6 in = 0.1524 m).
    const eastFt = page.getByLabel('East of the site origin (ft)');
    const eastBefore = Number(await eastFt.inputValue());
    await eastFt.fill(`${eastBefore} ft 6 in`);
    await eastFt.press('Enter');
    await expect(eastFt).toHaveValue((eastBefore + 0.5).toFixed(2));

    await myUnits('Metric (m, kN, kPa)');
    // The same place read in metres (1 ft = 0.3048 m exactly; the box shows 0.01 m).
    const eastM = Number(await page.getByLabel('East of the site origin (m)').inputValue());
    expect(Math.abs(eastM - (eastBefore + 0.5) * 0.3048)).toBeLessThan(0.006);
    await expect(standoff).toHaveText(/^\d+\.\d\d m$/);
    const metres = Number((await standoff.textContent())!.replace(' m', ''));
    expect(metres).toBeGreaterThan(0);
    // Feet rounded up to 0.1 ft: never less than the metric standoff, and at most 0.1 ft (0.03 m) more.
    expect(feet * 0.3048).toBeGreaterThanOrEqual(metres - 1e-9);
    expect(feet * 0.3048 - metres).toBeLessThan(0.1 * 0.3048 + 0.005);
  } finally {
    // The demo supervisor follows the site again, as the other specs expect.
    const reset = await page.request.patch('/api/auth/me', { data: { units: null }, headers: { Origin: new URL(page.url()).origin } });
    expect(reset.ok()).toBe(true);
  }
});

// The whole job in feet and pounds: a coordinator draws a trench (depth in feet and inches, surcharge
// in psf, soil in pcf), a supervisor asks for a permit with the 21 t excavator (its mass in lb) and a
// stockpile typed in pcf, a coordinator approves with a standoff in feet, the operator reads the
// exclusion zone in feet on the phone and confirms the briefing, the supervisor records the shift's
// inspection and hands the area back. Conversions: NIST SP 811 (2008) B.8, 1 ft = 0.3048 m,
// 1 in = 0.0254 m, 1 psf = 0.04788026 kPa, 1 pcf = 0.1570875 kN/m³, 1 lb = 0.45359237 kg (all exact or
// derived exactly from the foot and the pound).
test('a US team does the whole job in feet and pounds', async ({ page, browser }) => {
  test.setTimeout(180_000);
  const coordinatorContext = await browser.newContext();
  const coordinator = await coordinatorContext.newPage();
  // The phone may read its position (set below, where the operator stands).
  const phoneContext = await browser.newContext({
    ...devices['Pixel 7'],
    permissions: ['geolocation'],
    geolocation: { latitude: 0, longitude: 0, accuracy: 1 },
  });
  const phone = await phoneContext.newPage();
  const people: Page[] = [];
  let drawn: { siteId: number; id: number } | null = null;
  try {
    // The coordinator, in US units, draws a trench on the site map.
    const siteId = await signIn(coordinator, 'coordinator@demo.brink.test');
    people.push(coordinator);
    await setMyUnits(coordinator, 'us');
    await coordinator.goto(`/sites/${siteId}/map`);
    await expect(coordinator.getByRole('heading', { name: 'Site map' })).toBeVisible();
    const map = coordinator.getByTestId('site-map');
    await expect(map.locator('path.brink-excavation').filter({ visible: true }).first()).toBeVisible();
    await coordinator.getByRole('button', { name: 'Draw a trench' }).click();
    await expect(coordinator.getByText('Click the map at each point of the trench’s centre line')).toBeVisible();
    const box = (await map.boundingBox())!;
    await coordinator.mouse.click(box.x + box.width * 0.2, box.y + box.height * 0.3);
    await coordinator.mouse.click(box.x + box.width * 0.35, box.y + box.height * 0.3);
    await coordinator.getByRole('button', { name: 'Finish' }).click();
    const form = coordinator.getByRole('form', { name: 'New excavation' });
    await expect(form).toBeVisible();
    const reference = `US-${Date.now().toString(36).toUpperCase()}`;
    await form.getByLabel('Reference', { exact: true }).fill(reference);
    await form.getByLabel('Name', { exact: true }).fill('Storm sewer trench, feet and pounds');
    // 7 ft 4 in = 2.2352 m; 3 ft = 0.9144 m; 250 psf = 11.970 kPa; 120 pcf = 18.850 kN/m³.
    await form.getByLabel('Width (ft)').fill('3 ft');
    await form.getByLabel('Depth H (ft)').fill('7 ft 4 in');
    await form.getByLabel('Support', { exact: true }).selectOption({ label: 'Trench box' });
    await form.getByLabel('Design surcharge allowance (psf)').fill('250');
    await form.getByLabel('Layer 1 unit weight γ (pcf)').fill('120 pcf');
    await form.getByRole('button', { name: 'Save excavation' }).click();
    await expect(coordinator.getByText(`${reference} saved.`)).toBeVisible();
    const list = (await (await coordinator.request.get(`/api/sites/${siteId}/excavations`)).json()).excavations as {
      id: number;
      reference: string;
      depth: number;
      width: number;
      designSurcharge: number;
      soil: { unitWeight: number }[];
    }[];
    const trench = list.find((e) => e.reference === reference)!;
    drawn = { siteId, id: trench.id };
    expect(trench.depth).toBeCloseTo((7 + 4 / 12) * 0.3048, 6);
    expect(trench.width).toBeCloseTo(3 * 0.3048, 6);
    expect(trench.designSurcharge).toBeCloseTo(250 * 0.04788026, 4);
    expect(trench.soil[0].unitWeight).toBeCloseTo(120 * 0.1570875, 4);
    // The site map's tooltip, from the stored SI figures: depth 2.2352 m / 0.3048 = 7.333 ft, shown
    // to 0.1 ft; surcharge 11.970 kPa / 0.04788026 = 250 psf, shown to 1 psf (NIST SP 811 B.8).
    // (Its form closed: while it is open the trench is drawn as the shape being changed.)
    await coordinator.getByRole('complementary', { name: 'Excavation details' }).getByRole('button', { name: 'Close' }).click();
    const outline = map.locator(`path.brink-excavation-${trench.id}`);
    await expect(outline).toBeVisible();
    await outline.dispatchEvent('mouseover', undefined, { timeout: 10_000 });
    const tip = coordinator.locator('.leaflet-tooltip').filter({ hasText: reference });
    await expect(tip).toContainText(`Depth ${(trench.depth / M_PER_FT).toFixed(1)} ft`);
    await expect(tip).toContainText(`Surcharge allowance ${Math.round(trench.designSurcharge / KPA_PER_PSF)} psf`);
    await expect(tip).toContainText('Depth 7.3 ft');
    await expect(tip).not.toContainText(METRIC);
    // The register reads it back in feet: 7.333 ft to 0.1 ft.
    await coordinator.goto(`/sites/${siteId}/register`);
    const row = coordinator.getByRole('row').filter({ hasText: reference });
    await expect(row).toContainText('7.3 ft');
    await expect(row).not.toContainText(METRIC);

    // The supervisor, in US units, asks for a permit beside it.
    await signIn(page, 'supervisor@demo.brink.test');
    people.push(page);
    await setMyUnits(page, 'us');
    await page.goto(`/sites/${siteId}/permits/new`);
    await page.getByLabel('What the work is').fill('Excavator 21 t loading out beside the storm sewer trench');
    // The window opens now (the browser's local time, as the box reads it), so the permit goes live once briefed.
    const opens = await page.evaluate(() => {
      const d = new Date(Date.now() - 60_000);
      const pad = (n: number) => String(n).padStart(2, '0');
      return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
    });
    await page.getByLabel('Window opens').fill(opens);
    await page.getByLabel(`${reference} Storm sewer trench, feet and pounds (7.3 ft deep)`).check();
    // 21 t = 46,297 lb, shown to 100 lb.
    await page.getByLabel('Add a machine from the plant library').selectOption({ label: 'Excavator 21 t (46,300 lb)' });
    await expect(page.getByText(new RegExp(`Excavator 21 t is placed \\d+\\.\\d ft from the edge of ${reference}`))).toBeVisible();
    await page.getByLabel('Owen Petts (demo operator)').check();
    // A stockpile of spoil typed in pcf and feet: 120 pcf × 4 ft = 480 psf.
    await page.getByLabel('Ad hoc load').selectOption('stockpile');
    await page.getByRole('button', { name: 'Add load' }).click();
    const pile = page.getByRole('group', { name: 'Load Stockpile' });
    await pile.getByLabel('Unit weight (pcf)').fill('120 pcf');
    await pile.getByLabel('Unit weight (pcf)').press('Tab');
    await pile.getByLabel('Height (ft)').fill('4 ft');
    await pile.getByLabel('Height (ft)').press('Tab');
    await expect(pile.getByText('Presses 480 psf')).toBeVisible();
    const live = page.locator('section', { has: page.getByRole('heading', { name: 'Live check' }) });
    await expect(live.getByTestId('computed-standoff')).toHaveText(/^\d+\.\d ft$/);
    await expect(live.getByText('worked out when you let go')).toHaveCount(0);
    await expect(live).not.toContainText(METRIC);
    await page.getByRole('button', { name: 'Send for review' }).click();
    await expect(page).toHaveURL(/\/permits\/\d+$/);
    const permitId = Number(page.url().match(/\/permits\/(\d+)$/)![1]);
    await expect(page.locator('[data-status="submitted"]')).toBeVisible();
    const number = (await page.getByRole('heading', { level: 1 }).textContent())!.replace('Permit ', '').trim();

    // The coordinator approves with a standoff typed in feet, a foot beyond the computed one.
    await coordinator.goto(`/permits/${permitId}`);
    await expect(coordinator.getByRole('heading', { name: 'Calculation sheet' })).toBeVisible();
    await expect(coordinator.getByRole('img', { name: /lateral pressure \(psf\) against depth \(ft\)/ }).first()).toBeVisible();
    // The plan's tooltip on the stockpile, from the stored SI load: unit weight × height in kPa, read
    // in psf (1 psf = 0.04788026 kPa, NIST SP 811 B.8): 18.850 kN/m³ × 1.2192 m = 22.98 kPa = 480 psf.
    const stored = (await (await coordinator.request.get(`/api/permits/${permitId}`)).json()) as {
      permit: { current: { loads: { kind: string; unitWeight?: number; height?: number }[] } };
    };
    const spoil = stored.permit.current.loads.find((l) => l.kind === 'stockpile')!;
    const pilePsf = Math.round((spoil.unitWeight! * spoil.height!) / KPA_PER_PSF);
    expect(pilePsf).toBe(480);
    await coordinator.locator('path.brink-load-stockpile').first().dispatchEvent('mouseover', undefined, { timeout: 10_000 });
    const pileTip = coordinator.locator('.leaflet-tooltip').filter({ hasText: 'Stockpile' });
    await expect(pileTip).toContainText(`${pilePsf} psf`);
    await expect(pileTip).not.toContainText(METRIC);
    const computed = coordinator.getByTestId('computed-standoff').first();
    await expect(computed).toHaveText(/^\d+\.\d ft$/);
    const computedFt = Math.max(
      ...(await coordinator.getByTestId('computed-standoff').allTextContents()).map((t) => Number(t.replace(' ft', ''))),
    );
    await coordinator.getByRole('button', { name: 'Approve', exact: true }).click();
    const approve = coordinator.getByRole('form', { name: 'Approve' });
    await approve.getByLabel('Approve with a standoff').check();
    const standoffFt = Math.ceil(computedFt) + 1;
    await approve.getByLabel('Standoff from the excavation edge (ft)').fill(`${standoffFt} ft`);
    await approve.getByLabel('Password', { exact: true }).fill(demoPassword);
    await approve.getByRole('button', { name: 'Approve' }).click();
    await expect(coordinator.getByRole('heading', { name: 'Decision: Approved' })).toBeVisible();
    await expect(coordinator.getByTestId('decision-standoff')).toHaveText(
      `Standoff: keep every load at least ${standoffFt.toFixed(1)} ft from the excavation edge.`,
    );
    await expect(coordinator.getByText(/OSHA 29 CFR 1926 Subpart P/).first()).toBeVisible();

    // The operator, in US units, reads the exclusion zone in feet on the phone and confirms the briefing.
    const r = await phone.request.post('/api/auth/sign-in', {
      data: { email: 'operator@demo.brink.test', password: demoPassword },
      headers: { Origin: new URL(page.url()).origin },
    });
    expect(r.status()).toBe(200);
    await phone.goto('/field');
    people.push(phone);
    await setMyUnits(phone, 'us');
    await phone.goto(`/field/permits/${permitId}`);
    await expect(phone.getByRole('heading', { name: `Permit ${number}` })).toBeVisible();
    await expect(phone.getByText(`Keep every part of the load at least ${standoffFt.toFixed(1)} ft from`).first()).toBeVisible();
    await expect(phone.getByText(/OSHA 29 CFR 1926 Subpart P/).first()).toBeVisible();
    await expect(phone.locator('main')).not.toContainText(METRIC);
    await phone.getByRole('button', { name: `I have been briefed on ${number}` }).click();
    // The phone sends the briefing from its outbox: the permit goes live when it arrives.
    await expect
      .poll(
        async () => ((await (await page.request.get(`/api/permits/${permitId}`)).json()) as { permit: { status: string } }).permit.status,
      )
      .toBe('live');

    // Where the operator stands, read in feet on the phone: a point north of the trench's middle,
    // outside and then inside the exclusion zone. The expected distance is the shared geometry's, in
    // metres from the stored trench and standoff, divided by 0.3048 m per ft (NIST SP 811 B.8); the
    // screen shows 0.1 ft, so it may differ by half of that, plus the position's own rounding.
    const onPhone = ((await (await phone.request.get(`/api/field/permits/${permitId}`)).json()) as { permit: FieldPermit }).permit;
    const zone = onPhone.excavations.find((x) => x.reference === reference)!;
    expect(zone.shape.kind).toBe('trench');
    const proj = localProjection([onPhone.origin.longitude, onPhone.origin.latitude]);
    const prepared = prepareExcavation(zone.shape, proj);
    const [a, b] = (zone.shape as { centreLine: { coordinates: number[][] } }).centreLine.coordinates.map((c) => proj.toLocal(c));
    const edge = trench.width / 2 + zone.standoff!;
    const standNorthOfMiddle = async (north: number) => {
      const at = proj.toWgs84([(a[0] + b[0]) / 2, (a[1] + b[1]) / 2 + north]);
      await phoneContext.setGeolocation({ longitude: at[0], latitude: at[1], accuracy: 0.2 });
      return signedDistanceToZoneAt(prepared, at, zone.standoff!, proj) / M_PER_FT;
    };
    const shownFeet = async () => {
      const text = (await phone.getByTestId('reading-figure').textContent()) ?? '';
      const m = text.match(/^(\d+\.\d) ft (inside|outside)$/);
      expect(m, `reading "${text}"`).not.toBeNull();
      return Number(m![1]) * (m![2] === 'inside' ? -1 : 1);
    };
    const outsideFt = await standNorthOfMiddle(edge + 2.4);
    expect(outsideFt).toBeGreaterThan(7);
    await phone.getByRole('button', { name: 'Show where I am' }).click();
    await expect(phone.getByTestId('reading-figure')).toHaveText(/^\d+\.\d ft outside$/);
    await expect.poll(async () => Math.abs((await shownFeet()) - outsideFt)).toBeLessThanOrEqual(0.06);
    const panel = phone.locator('section', { has: phone.getByRole('heading', { name: 'Where you stand' }) });
    // The standoff the approval set (stored in metres) read back rounded up; the accuracy 0.2 m = 0.66 ft.
    const standoffUp = Math.ceil((zone.standoff! / M_PER_FT) * 10 - 1e-6) / 10;
    expect(standoffUp).toBe(standoffFt);
    await expect(panel).toContainText(`(${standoffUp.toFixed(1)} ft from its edge)`);
    await expect(panel).toContainText('Phone accuracy ±0.7 ft.');
    await expect(panel).not.toContainText(METRIC);
    const insideFt = await standNorthOfMiddle(edge - 0.9);
    expect(insideFt).toBeLessThan(-2);
    const inside = phone.getByRole('alert').filter({ hasText: 'You are inside the exclusion zone' });
    await expect(inside).toBeVisible();
    await expect.poll(async () => Math.abs((await shownFeet()) - insideFt)).toBeLessThanOrEqual(0.06);
    await expect(inside).toContainText(new RegExp(`\\d+\\.\\d ft inside · ${reference}`));
    await expect(inside).not.toContainText(METRIC);

    // The shift's inspection of the trench, by the supervisor: safe to work.
    await page.goto(`/sites/${siteId}`);
    const due = page.locator('section', { has: page.getByRole('heading', { name: 'Excavations due for inspection' }) });
    await due.getByRole('link', { name: `Inspect ${reference}` }).click();
    const answer = async (group: string, choice: string) =>
      page.getByRole('group', { name: group, exact: true }).getByText(choice, { exact: true }).click();
    await answer('Why', 'Start of shift');
    for (const item of [
      'Sides and faces',
      'Edges and stored material',
      'Access and egress',
      'Barriers and covers',
      'Loads nearby',
      'Support members',
      'Water',
    ])
      await answer(item, 'Pass');
    await answer('Atmosphere', 'Not applicable');
    await answer('Outcome', 'Safe to work');
    await page.getByRole('button', { name: 'Record the inspection' }).click();
    await expect(page.getByText(/Inspection recorded: safe/)).toBeVisible();
    await expect(page.locator('main')).not.toContainText(METRIC);

    // The hand-back, and the permit page still in feet.
    await page.goto(`/permits/${permitId}`);
    await page.getByRole('button', { name: 'Hand back', exact: true }).click();
    await page.getByRole('form', { name: 'Hand back' }).getByRole('button', { name: 'Hand back' }).click();
    await expect(page.getByText('Handed back: the permit is closed.')).toBeVisible();
    await expect(page.locator('[data-status="handed_back"]').first()).toBeVisible();
    await expect(page.getByText(`approved it with a standoff of ${standoffFt.toFixed(1)} ft`)).toBeVisible();
    await expect(page.locator('main')).not.toContainText(METRIC);
  } finally {
    // The demo people follow the site again, as the other specs expect; the trench is backfilled so
    // that no later run's loads reach it.
    for (const p of people) await setMyUnits(p, null);
    if (drawn) {
      const url = `/api/sites/${drawn.siteId}/excavations/${drawn.id}`;
      const all = (await (await coordinator.request.get(`/api/sites/${drawn.siteId}/excavations`)).json()) as {
        excavations: { id: number; version: number }[];
      };
      const excavation = all.excavations.find((e) => e.id === drawn!.id)!;
      const done = await coordinator.request.patch(url, {
        data: { state: 'backfilled', version: excavation.version },
        headers: { Origin: new URL(coordinator.url()).origin },
      });
      expect(done.ok()).toBe(true);
    }
    await coordinatorContext.close();
    await phoneContext.close();
  }
});
