import { describe, expect, it } from 'vitest';
import { render } from '@testing-library/react';
import { scaleBarLength } from '@shared/permits/drawing';
import { figuresIn } from '@shared/units';
import { Footprint } from './Footprint';

describe('footprint drawing', () => {
  it('picks a scale bar of 1, 2 or 5 × 10ⁿ m near a quarter of the width', () => {
    expect(scaleBarLength(3.9)).toBe(1);
    expect(scaleBarLength(7.8)).toBe(2);
    expect(scaleBarLength(18)).toBe(5);
  });

  it('draws every element to one scale: a 3 m track is twice as long as a 1.5 m pad is wide', () => {
    const { container } = render(
      <Footprint
        name="test"
        elements={[
          { name: 'Track', kind: 'track', x: 0, y: 1, length: 3, width: 0.6, share: 0.5 },
          { name: 'Pad', kind: 'pad', x: 0, y: -1, length: 1.5, width: 1.5, share: 0.5 },
        ]}
      />,
    );
    const rects = [...container.querySelectorAll('rect')].filter((r) => r.querySelector('title'));
    expect(rects).toHaveLength(2);
    const [track, pad] = rects.map((r) => ({ w: Number(r.getAttribute('width')), h: Number(r.getAttribute('height')) }));
    expect(track.w / pad.h).toBeCloseTo(2, 6);
    expect(track.w / track.h).toBeCloseTo(5, 6);
    expect(container.textContent).toContain(' m');
  });

  it('draws the scale bar in feet for a person in US units, a round number of feet', () => {
    const { container } = render(
      <Footprint
        name="test"
        figures={figuresIn('us')}
        elements={[{ name: 'Track', kind: 'track', x: 0, y: 0, length: 3.05, width: 0.6, share: 1 }]}
      />,
    );
    // 3.05 m = 10.007 ft wide (NIST SP 811 B.8: 1 ft = 0.3048 m): a bar of a round number of feet, 5 ft
    // (scaleBarLength of the width in feet), drawn 5 × 0.3048 m long.
    const labels = [...container.querySelectorAll('text')].map((x) => x.textContent);
    expect(labels).toContain('5 ft');
    const bar = [...container.querySelectorAll('rect')].filter((r) => !r.querySelector('title')).slice(-2);
    const barWidth = bar.reduce((sum, r) => sum + Number(r.getAttribute('width')), 0);
    const track = Number(container.querySelector('rect title')!.parentElement!.getAttribute('width'));
    expect(barWidth / track).toBeCloseTo((5 * 0.3048) / 3.05, 6);
    expect(container.querySelector('title')!.textContent).toBe('Track: 10.0 ft × 2.0 ft, 100.0 % of the weight');
    expect(container.textContent).not.toMatch(/\d m\b/);
  });
});
