import { cleanup, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { fakePersonIn, renderAt } from '@client/test/render';
import { useCurrentSite } from './currentSite';
import { useFigures, useUnits } from './units';

// The rule (docs/calculation.md, "Units"): the person's own choice, else the open site's default,
// else metric. Every figure on a page reads it from the one UnitsScope above it.
function Shows() {
  const units = useUnits();
  const f = useFigures();
  const { site } = useCurrentSite();
  return (
    <>
      <p data-testid="units">{`${units}: ${f.length(2)}`}</p>
      <p>{site ? `open: ${site.name}` : 'no site yet'}</p>
    </>
  );
}

const usSite = { id: 4, name: 'Invented Yard', latitude: 52, longitude: -1, timezone: 'America/Chicago', units: 'us' };

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
  vi.restoreAllMocks();
});

describe('UnitsScope', () => {
  it("gives the open site's default when the person chose none", async () => {
    fakePersonIn(null, [usSite]);
    renderAt(<Shows />, '/sites/4/map');
    expect(await screen.findByText('open: Invented Yard')).toBeTruthy();
    // 2 m is 6.56 ft (the international foot, 0.3048 m exactly).
    expect(screen.getByTestId('units').textContent).toBe('us: 6.6 ft');
  });

  it("gives the person's own choice over the site's default", async () => {
    fakePersonIn('metric', [usSite]);
    renderAt(<Shows />, '/sites/4/map');
    // The site (a US one) is open before the figure is read.
    expect(await screen.findByText('open: Invented Yard')).toBeTruthy();
    expect(screen.getByTestId('units').textContent).toBe('metric: 2.00 m');
  });

  it('refuses to guess outside a scope, in words', () => {
    vi.spyOn(console, 'error').mockImplementation(() => {});
    expect(() => render(<Shows />)).toThrow('useUnits and useFigures need a UnitsScope above them');
  });
});
