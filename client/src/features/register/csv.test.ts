import { describe, expect, it } from 'vitest';
import type { Excavation } from '@shared/schemas/excavations';
import { toCsv } from '@shared/csv';
import { figuresIn } from '@shared/units';
import { registerCsv, soilSummary } from './csv';

describe('CSV (RFC 4180)', () => {
  it('quotes fields with commas, quotes and line breaks, and ends rows with CRLF', () => {
    expect(
      toCsv([
        ['a', 'b'],
        ['x, y', 'say "hi"'],
        ['two\nlines', 3.5],
      ]),
    ).toBe('a,b\r\n"x, y","say ""hi"""\r\n"two\nlines",3.5\r\n');
  });

  it('keeps text from running as a spreadsheet formula, but writes negative numbers as numbers', () => {
    expect(toCsv([['v'], ['=HYPERLINK("x")'], ['@SUM(A1)'], [-2.5], [null]])).toBe(
      'v\r\n"\'=HYPERLINK(""x"")"\r\n\'@SUM(A1)\r\n-2.5\r\n\r\n',
    );
  });
});

describe('register CSV', () => {
  const e = {
    id: 1,
    siteId: 1,
    reference: 'TR-07',
    name: 'Drain, phase 2',
    kind: 'trench',
    geometry: {
      type: 'LineString',
      coordinates: [
        [0, 0],
        [0, 0.001],
      ],
    },
    width: 1.2,
    depth: 2.4,
    state: 'open',
    supportType: 'hydraulic-frames',
    designSurcharge: 10,
    ratedPressure: null,
    restraint: 'unyielding',
    pressureState: 'active',
    wallFriction: 0,
    soil: [
      { top: 0, unitWeight: 18, frictionAngle: 27, cohesion: 0 },
      { top: 0.5, unitWeight: 19.5, saturatedUnitWeight: 20, undrainedShearStrength: 50, cohesion: 0 },
    ],
    groundwaterDepth: null,
    designReference: 'TW-112 rev B',
    notes: '',
    version: 3,
    drawing: null,
    outline: null,
    influenceZone: null,
    createdAt: '2026-03-01T08:00:00.000Z',
    updatedAt: '2026-03-02T07:30:00.000Z',
  } satisfies Excavation;

  const metric = figuresIn('metric');
  const us = figuresIn('us');

  it('summarises the soil layers in one cell', () => {
    expect(soilSummary(e.soil, metric)).toBe('0 m: γ 18, φ′ 27°; 0.5 m: γ 19.5, γsat 20, cu 50 kPa');
  });

  it('writes a header and one row per excavation with labels and units', () => {
    const lines = registerCsv([e], metric).split('\r\n');
    expect(lines[0]).toMatch(
      /^Reference,Name,Kind,State,Inspection this shift,Depth \(m\),Width \(m\),Support,Design surcharge allowance \(kPa\),Rated pressure \(kPa\),Restraint,Groundwater depth \(m\),Soil layers \(m; γ in kN\/m³\),/,
    );
    expect(lines[1]).toBe(
      'TR-07,"Drain, phase 2",Trench,Open,,2.4,1.2,Hydraulic frames,10,,unyielding,,"0 m: γ 18, φ′ 27°; 0.5 m: γ 19.5, γsat 20, cu 50 kPa",TW-112 rev B,,,2026-03-02T07:30:00.000Z',
    );
    expect(lines).toHaveLength(3);
  });

  it('has the inspection column the table has, in words', () => {
    const [, row] = registerCsv([{ ...e, inspection: 'overdue' }], metric).split('\r\n');
    expect(row).toContain(',Trench,Open,Inspection overdue,2.4,');
  });

  it('in US customary units: feet, psf and pcf, the unit in each column head (NIST SP 811, B.8: 1 ft = 0.3048 m, 1 psf = 0.047880259 kPa, 1 pcf = 0.15708746 kN/m³)', () => {
    const [head, row] = registerCsv([e], us).split('\r\n');
    expect(head).toMatch(
      /,Depth \(ft\),Width \(ft\),Support,Design surcharge allowance \(psf\),Rated pressure \(psf\),Restraint,Groundwater depth \(ft\),Soil layers \(ft; γ in pcf\),/,
    );
    // 2.4 m = 7.874 ft → 7.9; 1.2 m = 3.937 ft → 3.9; 10 kPa = 208.85 psf → 209; soil: 0.5 m = 1.640 ft → 1.6,
    // 18 kN/m³ = 114.59 pcf → 115, 19.5 → 124.13 → 124, 20 → 127.32 → 127, cu 50 kPa = 1,044.27 psf → 1044.
    expect(row).toBe(
      'TR-07,"Drain, phase 2",Trench,Open,,7.9,3.9,Hydraulic frames,209,,unyielding,,"0 ft: γ 115, φ′ 27°; 1.6 ft: γ 124, γsat 127, cu 1044 psf",TW-112 rev B,,,2026-03-02T07:30:00.000Z',
    );
  });
});
