import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { fakePersonIn, renderAt } from '@client/test/render';
import { PlantForm } from './PlantForm';

// An invented 21 t tracked machine on two tracks 4.2 m long, 0.6 m wide, 2.4 m apart.
const initial = {
  name: 'Tracked excavator 21 t',
  category: 'excavator' as const,
  operatingMass: 21,
  designFactor: 1,
  notes: '',
  elements: [
    { name: 'Left track', kind: 'track' as const, x: 0, y: 1.2, length: 4.2, width: 0.6, share: 0.5 },
    { name: 'Right track', kind: 'track' as const, x: 0, y: -1.2, length: 4.2, width: 0.6, share: 0.5 },
  ],
};

describe('a machine of the library, for a person in US customary units', () => {
  it('reads and takes its mass in pounds and its tracks in feet, and keeps tonnes and metres (NIST SP 811 B.8: 1 lb = 0.45359237 kg, 1 ft = 0.3048 m)', async () => {
    fakePersonIn('us');
    const onSave = vi.fn(async () => undefined);
    renderAt(<PlantForm initial={initial} saveLabel="Save machine" onSave={onSave} onCancel={() => undefined} />);
    const mass = (await screen.findByLabelText('Operating mass (lb)')) as HTMLInputElement;
    expect(Number(mass.value)).toBeCloseTo(46297.1, 1); // 21 t ÷ 0.00045359237 t/lb
    expect((screen.getByLabelText('Element 1 Length along x (ft)') as HTMLInputElement).value).toBe('13.7795'); // 4.2 m
    fireEvent.change(mass, { target: { value: '50,000 lb' } });
    fireEvent.change(screen.getByLabelText('Element 2 Width along y (ft)'), { target: { value: '2 ft' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save machine' }));
    await waitFor(() => expect(onSave).toHaveBeenCalledTimes(1));
    const saved = (onSave.mock.calls[0] as unknown[])[0] as typeof initial;
    expect(saved.operatingMass).toBeCloseTo(22.6796185, 7); // 50,000 × 0.00045359237 t
    expect(saved.elements[1].width).toBeCloseTo(0.6096, 12);
    expect(saved.elements[0].length).toBeCloseTo(4.2, 4); // untouched: the saved figure, not the rounded text
  });

  it('says a limit in pounds, by the field’s label', async () => {
    fakePersonIn('us');
    const onSave = vi.fn(async () => undefined);
    renderAt(<PlantForm initial={initial} saveLabel="Save machine" onSave={onSave} onCancel={() => undefined} />);
    fireEvent.change(await screen.findByLabelText('Operating mass (lb)'), { target: { value: '3,000,000' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save machine' }));
    expect((await screen.findByText(/must be at most/)).textContent).toBe('Operating mass (lb) must be at most 2,204,622 lb.');
    expect(onSave).not.toHaveBeenCalled();
  });
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});
