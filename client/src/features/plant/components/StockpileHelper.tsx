import { useState } from 'react';
import { stockpileMaterials, stockpilePressure } from '@shared/schemas/plant';
import { SelectField, TextField } from '@client/components/Fields';

/**
 * A stockpile presses on the ground with its unit weight times its height. The typical unit weights
 * offered are starting points; the material's own figure prevails.
 */
export function StockpileHelper() {
  const [material, setMaterial] = useState<string>(stockpileMaterials[1].name);
  const [unitWeight, setUnitWeight] = useState<string>(String(stockpileMaterials[1].unitWeight));
  const [height, setHeight] = useState('1.5');
  const g = Number(unitWeight);
  const h = Number(height);
  const valid = unitWeight !== '' && height !== '' && Number.isFinite(g) && Number.isFinite(h) && g > 0 && g <= 30 && h > 0 && h <= 20;
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
            ...stockpileMaterials.map((m) => ({ value: m.name, label: `${m.name} (about ${m.unitWeight} kN/m³)` })),
            { value: 'other', label: 'Other (type the unit weight)' },
          ]}
          value={material}
          onChange={(e) => {
            setMaterial(e.target.value);
            const m = stockpileMaterials.find((x) => x.name === e.target.value);
            if (m) setUnitWeight(String(m.unitWeight));
          }}
        />
        <TextField
          label="Unit weight γ (kN/m³)"
          type="number"
          step="0.5"
          min={1}
          max={30}
          inputMode="decimal"
          value={unitWeight}
          onChange={(e) => setUnitWeight(e.target.value)}
          error={unitWeight !== '' && !(g > 0 && g <= 30) ? 'must be more than 0 and at most 30 kN/m³' : undefined}
        />
        <TextField
          label="Height (m)"
          type="number"
          step="0.1"
          min={0}
          max={20}
          inputMode="decimal"
          value={height}
          onChange={(e) => setHeight(e.target.value)}
          error={height !== '' && !(h > 0 && h <= 20) ? 'must be more than 0 and at most 20 m' : undefined}
        />
      </div>
      <p className="text-lg" role="status" aria-live="polite">
        {valid ? (
          <>
            Pressure on the ground: <strong>{stockpilePressure(g, h).toFixed(1)} kPa</strong> ({g} kN/m³ × {h} m)
          </>
        ) : (
          'Give a unit weight and a height.'
        )}
      </p>
    </section>
  );
}
