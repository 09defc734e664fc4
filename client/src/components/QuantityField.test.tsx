import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { fakePersonIn, renderAt } from '@client/test/render';
import { QuantityField } from './QuantityField';
import '@client/lib/forms';

// Factors: NIST SP 811 (2008), Appendix B.8: 1 ft = 0.3048 m and 1 in = 0.0254 m exactly;
// 1 lbf = 4.4482216152605 N, so 1 psf = 47.880 258 98 Pa.
// The limit is worded as the shared calculation schema words its own ("must be at most 50 m").
const schema = z.object({
  depth: z.number().positive().max(30, 'must be at most 30 m').nullable(),
  surcharge: z.number().min(0).nullable(),
});
type Values = { depth: number | null; surcharge: number | null };

function Form({ onSave, initial }: { onSave: (v: z.output<typeof schema>) => void; initial: Values }) {
  const { control, handleSubmit } = useForm<Values, unknown, z.output<typeof schema>>({
    resolver: zodResolver(schema),
    defaultValues: initial,
  });
  return (
    <form onSubmit={handleSubmit(onSave)} noValidate>
      <QuantityField control={control} name="depth" quantity="length" label="Depth H" />
      <QuantityField control={control} name="surcharge" quantity="pressure" label="Design surcharge allowance" />
      <button type="submit">Save</button>
    </form>
  );
}

describe('a figure typed in the person’s units and kept in SI', () => {
  it('shows a US person feet and psf, reads feet and inches, and saves metres and kPa', async () => {
    fakePersonIn('us');
    const onSave = vi.fn();
    renderAt(<Form onSave={onSave} initial={{ depth: 1.524, surcharge: 10 }} />);
    // 1.524 m = 5 ft exactly; 10 kPa = 208.85 psf.
    const depth = await screen.findByLabelText('Depth H (ft)');
    expect((depth as HTMLInputElement).value).toBe('5');
    expect((screen.getByLabelText('Design surcharge allowance (psf)') as HTMLInputElement).value).toBe('208.8543');
    fireEvent.change(depth, { target: { value: `8 ft 6 in` } });
    expect((depth as HTMLInputElement).value).toBe('8 ft 6 in'); // what was typed stays as typed
    fireEvent.change(screen.getByLabelText('Design surcharge allowance (psf)'), { target: { value: '1 ksf' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    await waitFor(() => expect(onSave).toHaveBeenCalledTimes(1));
    const saved = onSave.mock.calls[0][0] as Values;
    expect(saved.depth).toBeCloseTo(8.5 * 0.3048, 12); // 2.5908 m
    expect(saved.surcharge).toBeCloseTo(47.88025898, 6); // 1 ksf = 47.880 kPa
  });

  it('refuses what it cannot read, naming the field and giving an example, and keeps the text', async () => {
    fakePersonIn('us');
    const onSave = vi.fn();
    renderAt(<Form onSave={onSave} initial={{ depth: null, surcharge: null }} />);
    const depth = await screen.findByLabelText('Depth H (ft)');
    fireEvent.change(depth, { target: { value: 'deep' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(await screen.findByText(/^Depth H \(ft\) must be a number, with a unit if you like/)).toBeTruthy();
    expect((depth as HTMLInputElement).value).toBe('deep');
    expect(onSave).not.toHaveBeenCalled();
  });

  it('restates a limit written in SI in the person’s units, a greatest value rounded down (30 m = 98.425 ft, NIST SP 811: at most 98.42 ft)', async () => {
    fakePersonIn('us');
    renderAt(<Form onSave={vi.fn()} initial={{ depth: null, surcharge: null }} />);
    const depth = await screen.findByLabelText('Depth H (ft)');
    fireEvent.change(depth, { target: { value: '100' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    const message = await screen.findByText(/must be at most/);
    expect(message.textContent).toMatch(/^Depth H \(ft\) /);
    expect(message.textContent).toContain('at most 98.42 ft');
    expect(message.textContent).not.toMatch(/\bm\b/);
  });

  it('reads a metric person in metres, with centimetres accepted', async () => {
    fakePersonIn('metric');
    const onSave = vi.fn();
    renderAt(<Form onSave={onSave} initial={{ depth: 2, surcharge: null }} />);
    const depth = await screen.findByLabelText('Depth H (m)');
    expect((depth as HTMLInputElement).value).toBe('2');
    fireEvent.change(depth, { target: { value: '150 cm' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    await waitFor(() => expect(onSave).toHaveBeenCalledTimes(1));
    expect(onSave.mock.calls[0][0]).toEqual({ depth: 1.5, surcharge: null });
  });
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});
