/**
 * `npm run calc` end to end (docs/calculation.md, "Command line"): worked example 1 gives its result; bad input exits 2,
 * names each wrong field on standard error and prints nothing on standard output.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { SIX_PROFILE_TOP, SIX_RESULT, sixRequest } from '@shared/engineering/test-fixtures';

const root = resolve(__dirname, '../../..');
const tsx = join(root, 'node_modules/.bin/tsx');
const dir = mkdtempSync(join(tmpdir(), 'brink-calc-'));

function calc(input: unknown, viaStdin = false, raw?: string) {
  const text = raw ?? JSON.stringify(input);
  const args = ['server/src/cli/calc.ts'];
  let stdin: string | undefined;
  if (viaStdin) {
    args.push('-');
    stdin = text;
  } else {
    const file = join(dir, `req-${Math.random().toString(36).slice(2)}.json`);
    writeFileSync(file, text);
    args.push(file);
  }
  const r = spawnSync(tsx, args, { cwd: root, input: stdin, encoding: 'utf8', timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The request of worked example 1 (docs/calculation.md), as plain JSON to mutate. */
const six = (): Record<string, any> => JSON.parse(JSON.stringify(sixRequest()));

function expectRejected(r: ReturnType<typeof calc>, fields: string[]) {
  expect(r.code).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.trim().split('\n');
  for (const f of fields)
    expect(
      lines.some((l) => l.startsWith(`${f}: `)),
      `${f} in:\n${r.stderr}`,
    ).toBe(true);
}

describe('npm run calc', { timeout: 60_000 }, () => {
  it('answers worked example 1 with its result (docs/calculation.md, "Command line" and worked example 1)', () => {
    const r = calc(six());
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout);
    expect(out).toMatchObject(SIX_RESULT);
    expect(out.profile[0]).toEqual(SIX_PROFILE_TOP);
    expect(out.profile).toHaveLength(61);
    expect(r.stdout).not.toMatch(/\d\.\d*0000000\d/); // no floating drift such as 0.15000000000000002
  });

  it('reads standard input and answers a list with a list, defaults filled in', () => {
    const minimal = {
      excavation: { depth: 3, designSurcharge: 10 },
      soil: [{ top: 0, unitWeight: 19, frictionAngle: 30 }],
      method: 'dispersion-45',
      loads: [],
    };
    const r = calc([six(), minimal], true);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out).toHaveLength(2);
    expect(out[1]).toMatchObject({ utilisation: 0, passes: true, forces: { soil: 28.5 } });
  });

  it('zero or negative depth', () => {
    const a = six();
    a.excavation.depth = 0;
    expectRejected(calc(a), ['excavation.depth']);
    a.excavation.depth = -2;
    const r = calc(a);
    expectRejected(r, ['excavation.depth']);
    expect(r.stderr).toMatch(/greater than 0/);
  });

  it('φ′ outside (0°, 60°] on a drained layer, and δ > φ′', () => {
    const a = six();
    a.soil = [
      { top: 0, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 0, cohesion: 0 },
      { top: 1, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 61, cohesion: 0 },
    ];
    const r = calc(a);
    expectRejected(r, ['soil[0].frictionAngle', 'soil[1].frictionAngle']);
    expect(r.stderr).toMatch(/greater than 0° and at most 60°/);
    const b = six();
    b.excavation.wallFriction = 31;
    expectRejected(calc(b), ['excavation.wallFriction']);
  });

  it('unknown load kind, missing fields, strings, NaN and an empty soil list, each named, in one go', () => {
    const a = six();
    a.loads = [
      { id: 'crane', kind: 'crane', force: 100, offset: 1 },
      { id: 'x', kind: 'strip', pressure: 'NaN', offset: 1 },
    ];
    a.soil = [];
    a.excavation.depth = '3';
    delete a.method;
    const r = calc(a);
    expectRejected(r, ['loads[0].kind', 'loads[1].pressure', 'loads[1].width', 'soil', 'excavation.depth', 'method']);
    expect(r.stderr).toMatch(/unknown load kind "crane"/);
    expect(r.stderr).toMatch(/loads\[1\]\.width: is required/);
    expect(r.stderr).toMatch(/soil: must list at least one layer/);
  });

  it('a bare NaN (not JSON) and a list with one bad request: exit 2, nothing on standard output', () => {
    const raw = calc(null, true, JSON.stringify(six()).replace('"depth":3', '"depth":NaN'));
    expect(raw.code).toBe(2);
    expect(raw.stdout).toBe('');
    expect(raw.stderr).toMatch(/not valid JSON/);
    const bad = six();
    bad.excavation.depth = -1;
    expectRejected(calc([six(), bad]), ['[1].excavation.depth']);
  });

  it('at rest in an undrained layer, a 1e308 kPa load and water-light soil: exit 2 naming each (docs/calculation.md, "Refusals")', () => {
    const atRest = six();
    atRest.excavation.pressureState = 'at-rest';
    atRest.soil = [{ top: 0, unitWeight: 18, undrainedShearStrength: 40 }];
    const huge = six();
    huge.loads[0].pressure = 1e308;
    const light = six();
    light.soil[0].saturatedUnitWeight = 9;
    const r = calc([atRest, huge, light]);
    expectRejected(r, ['[0].soil[0].undrainedShearStrength', '[1].loads[0].pressure', '[2].soil[0].saturatedUnitWeight']);
    expect(r.stderr).toMatch(/at rest needs φ′/);
  });

  describe('"units": "us" (docs/calculation.md, "Command line"; factors NIST SP 811, shared/units.ts)', () => {
    /** A US example worked by hand in feet and pounds (45° spread; common practice, no published source). */
    const usExample = () => ({
      units: 'us',
      excavation: { depth: 10, designSurcharge: 200 },
      soil: [{ top: 0, unitWeight: 120, frictionAngle: 30 }],
      method: 'dispersion-45',
      loads: [{ id: 'footing', kind: 'strip', pressure: 1000, width: 3, offset: 3 }],
    });

    it('a strip worked in feet and pounds: forces in lbf/ft, moments in lbf·ft/ft, the standoff in ft, the OSHA caution', () => {
      // H 10 ft, γ 120 pcf, φ′ 30° (K = 1/3, Craig), qd 200 psf; strip 1000 psf, B 3 ft at d 3 ft: band 3..6 ft
      // at 333.3 psf. Fs = 1000 lbf/ft, Ms = 1000 × (10 − 4.5) = 5500 lbf·ft/ft; Fa = K·qd·H = 666.7 lbf/ft,
      // Ma = K·qd·H²/2 = 3333.3 lbf·ft/ft; U = 5500/3333.3 = 1.65. Soil K·γ·H²/2 = 2000 lbf/ft. Standoff:
      // the band may cover at most 2 ft of the 10 ft, so d ≥ 8 ft; the engine's 0.01 m grid gives 2.44 m = 8.01 ft.
      const r = calc(usExample());
      expect(r.stderr).toBe('');
      expect(r.code).toBe(0);
      const out = JSON.parse(r.stdout);
      expect(out.units).toBe('us');
      expect(out.forces.soil).toBeCloseTo(2000, 0);
      expect(out.forces.surcharge).toBeCloseTo(1000, 0);
      expect(out.forces.allowance).toBeCloseTo(666.7, 0);
      expect(out.moments.surcharge).toBeCloseTo(5500, -1);
      expect(out.moments.allowance).toBeCloseTo(3333.3, 0);
      expect(out.utilisation).toBeCloseTo(1.65, 2);
      expect(out.passes).toBe(false);
      expect(out.loads[0]).toMatchObject({ id: 'footing', top: 3, bottom: 6, standoff: 8.01 });
      expect(out.loads[0].force).toBeCloseTo(1000, 0);
      expect(out.profile[0].allowance).toBeCloseTo(66.67, 1); // K·qd = 200/3 psf
      expect(out.profile.at(-1).z).toBe(10);
      expect(out.caution).toMatch(/OSHA 29 CFR 1926 Subpart P/);
    });

    it('worked example 1 restated in feet and pounds gives its result in feet and pounds (NIST SP 811 factors)', () => {
      const ft = (m: number) => m / 0.3048;
      const psf = (kPa: number) => (kPa * 1000) / 47.88026;
      const r = calc({
        units: 'us',
        excavation: { depth: ft(3), designSurcharge: psf(10) },
        soil: [{ top: 0, unitWeight: (19 * 1000) / 157.0875, frictionAngle: 30 }],
        method: 'dispersion-45',
        minimumClearance: ft(0.6),
        loads: [{ id: 'footing', kind: 'strip', pressure: psf(60), width: ft(1), offset: ft(1) }],
      });
      expect(r.code).toBe(0);
      const out = JSON.parse(r.stdout);
      // 20 kN/m = 1370.4 lbf/ft (÷ 0.01459390, NIST SP 811 lbf/ft); 28.5 kN/m = 1952.9 lbf/ft; 2.5 m = 8.2021 ft, shown 8.21 ft (rounded up).
      expect(out.forces.surcharge).toBeCloseTo(1370.4, 0);
      expect(out.forces.soil).toBeCloseTo(1952.9, 0);
      expect(out.utilisation).toBe(2);
      expect(out.loads[0].standoff).toBe(8.21);
    });

    it("the minimum clearance defaults to OSHA's 2 ft; a light load stands there", () => {
      const light = usExample();
      light.loads[0].pressure = 20;
      const out = JSON.parse(calc(light).stdout);
      expect(out.loads[0].standoff).toBe(2); // OSHA 29 CFR 1926.651(j)(2): 2 ft
    });

    it('refusals name their limits in feet and pounds; an unknown units is refused', () => {
      const deep = usExample();
      deep.excavation.depth = 200;
      const r = calc(deep);
      expectRejected(r, ['excavation.depth']);
      expect(r.stderr).toMatch(/at most 164\.04 ft/); // 50 m ÷ 0.3048 (NIST SP 811)
      const odd = { ...usExample(), units: 'imperial' };
      expectRejected(calc([six(), odd]), ['[1].units']);
      const metric = { ...six(), units: 'metric' };
      expect(JSON.parse(calc(metric).stdout)).toMatchObject(SIX_RESULT);
    });
  });
});
