import { useState } from 'react';
import { stockpileMaterials, stockpilePressure } from '@shared/schemas/plant';
import { SelectField } from '@client/components/Fields';
import { QuantityBox } from '@client/components/QuantityField';
import { useFigures } from '@client/lib/units';

/**
 * A stockpile presses on the ground with its unit weight times its height. The typical unit weights
 * offered are starting points; the material's own figure prevails.
 */
export function StockpileHelper() {
  const figures = useFigures();
  const [material, setMaterial] = useState<string>(stockpileMaterials[1].name);
  const [unitWeight, setUnitWeight] = useState<number | null>(stockpileMaterials[1].unitWeight);
  const [height, setHeight] = useState<number | null>(1.5);
  const g = unitWeight ?? Number.NaN;
  const h = height ?? Number.NaN;
  const goodWeight = g > 0 && g <= 30;
  const goodHeight = h > 0 && h <= 20;
  return (
    <section className="flex flex-col gap-3 rounded-lg border border-rule bg-sheet p-5" aria-labelledby="stockpile-h">
      <h2 id="stockpile-h" className="text-xl font-bold">
        Stockpile
      </h2>
      <p className="max-w-prose text-ink-soft">
        Spoil, aggregate or materials in a heap: its pressure on the ground is its unit weight × its height. Use the result as an area load
        in a permit.
      </p>
      <div className="grid gap-3 sm:grid-cols-3">
        <SelectField
          label="Material"
          options={[
            ...stockpileMaterials.map((m) => ({ value: m.name, label: `${m.name} (about ${figures.unitWeight(m.unitWeight)})` })),
            { value: 'other', label: 'Other (type the unit weight)' },
          ]}
          value={material}
          onChange={(e) => {
            setMaterial(e.target.value);
            const m = stockpileMaterials.find((x) => x.name === e.target.value);
            if (m) setUnitWeight(m.unitWeight);
          }}
        />
        <QuantityBox
          label="Unit weight γ"
          quantity="unitWeight"
          value={unitWeight}
          onChange={setUnitWeight}
          error={unitWeight !== null && !goodWeight ? 'must be more than 0 and at most 30 kN/m³' : undefined}
        />
        <QuantityBox
          label="Height"
          quantity="length"
          value={height}
          onChange={setHeight}
          error={height !== null && !goodHeight ? 'must be more than 0 and at most 20 m' : undefined}
        />
      </div>
      <p className="text-lg" role="status" aria-live="polite">
        {goodWeight && goodHeight ? (
          <>
            Pressure on the ground: <strong>{figures.pressure(stockpilePressure(g, h))}</strong> ({figures.unitWeight(g)} ×{' '}
            {figures.length(h)})
          </>
        ) : (
          'Give a unit weight and a height.'
        )}
      </p>
    </section>
  );
}
