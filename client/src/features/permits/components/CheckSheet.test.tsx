import { screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { localProjection } from '@shared/geometry';
import { cumulativeCheck } from '@shared/permits/check';
import { sixExcavation } from '@shared/engineering/test-fixtures';
import { fakePersonIn, renderAt } from '@client/test/render';
import { CheckSheets } from './CheckSheet';

// A pit 5 m square and 3 m deep in sand with c′ 5 kPa, and a 15.2 kN/m line load 1 m from its north
// edge under the elastic method: worked example 4 of docs/calculation.md (standoff 1.24 m, failing at
// 1.21–1.23 m though it passes at 1 m) in ground where the 5 kPa/m minimum governs (example 3).
const origin: [number, number] = [-1.04833, 52.37124];
const proj = localProjection(origin);
const ll = (x: number, y: number) => proj.toWgs84([x, y]) as [number, number];

function check() {
  return cumulativeCheck({
    origin,
    method: 'elastic',
    minimumClearance: 0.6,
    permit: {
      id: null,
      number: 'P-T',
      windowStart: '2030-01-01T08:00:00Z',
      windowEnd: '2030-01-01T12:00:00Z',
      loads: [
        {
          id: 'wall',
          kind: 'line',
          label: 'Hoarding footing',
          path: { type: 'LineString', coordinates: [ll(-10, 6), ll(15, 6)] },
          force: 15.2,
        },
      ],
    },
    excavations: [
      {
        id: 1,
        reference: 'PIT-A',
        name: 'Pit A',
        shape: { kind: 'pit', outline: { type: 'Polygon', coordinates: [[ll(0, 0), ll(5, 0), ll(5, 5), ll(0, 5), ll(0, 0)]] } },
        excavation: sixExcavation(),
        soil: [{ top: 0, unitWeight: 19, frictionAngle: 30, cohesion: 5 }],
      },
    ],
    plant: new Map(),
    others: [],
    now: new Date('2030-01-01T07:00:00Z'),
  });
}

describe('the calculation sheet', () => {
  it('sets the minimum-pressure and not-monotonic warnings apart, and says where each load fails', () => {
    const c = check();
    expect(c.computedStandoff).toBe(1.24);
    renderAt(<CheckSheets check={c} />);
    const note = screen.getByTestId('attention-1');
    expect(within(note).getByRole('heading', { name: 'Read before signing' })).toBeTruthy();
    expect(note.textContent).toContain('the minimum equivalent fluid pressure governs');
    expect(note.textContent).toContain('moving it farther away is not always safer');
    // The "Each load" table: clear distance now, standoff, where it fails.
    const table = screen.getByRole('table', { name: 'Each load' });
    const row = within(table).getByRole('row', { name: /Hoarding footing/ });
    expect(row.textContent).toContain('1.24 m');
    expect(row.textContent).toMatch(/1\.23 m/);
    expect(row.textContent).toContain('passes in between: farther is not always safer');
  });

  it('reads in feet and pounds for a person who chose US customary units, the standoff rounded up (NIST SP 811: 1 ft = 0.3048 m)', async () => {
    fakePersonIn('us');
    const view = within(renderAt(<CheckSheets check={check()} />).container);
    // 1.24 m = 4.068 ft, shown 4.1 ft (rounded up); the OSHA rule in the caution.
    await view.findByText(/OSHA 29 CFR 1926 Subpart P/);
    expect(view.getByTestId('computed-standoff').textContent).toBe('4.1 ft');
    const row = within(view.getByRole('table', { name: 'Each load' })).getByRole('row', { name: /Hoarding footing/ });
    expect(row.textContent).toContain('4.1 ft');
    expect(row.textContent).not.toMatch(/\d m\b/);
    // The pressure diagram's axes in psf and ft; the pit is 3 m = 9.8425 ft deep (NIST SP 811 B.8).
    expect(view.getByRole('img', { name: /lateral pressure \(psf\) against depth \(ft\)/ })).toBeTruthy();
    expect(view.getByText('Dashed black: formation level, 9.8 ft')).toBeTruthy();
    expect(view.queryByText(/pressure \(kPa\)|depth \(m\)/)).toBeNull();
  });
});

afterEach(() => vi.unstubAllGlobals());
