import { useId, useState } from 'react';
import { localProjection } from '@shared/geometry';
import { planBoundsSchema, type PlanBounds, type SitePlan } from '@shared/schemas/excavations';
import { Button } from '@client/components/Button';
import { FormSummary, TextField } from '@client/components/Fields';
import { errorMessage } from '@client/lib/api';
import { useSitePlanChanges } from '../api/excavations';

interface PlanControlsProps {
  siteId: number;
  origin: { latitude: number; longitude: number };
  plan: SitePlan | null;
  canEdit: boolean;
  opacity: number;
  onOpacity: (v: number) => void;
}

/** Corners 100 m either side of the origin: a starting point to be replaced by the plan's own. */
function defaultBounds(origin: PlanControlsProps['origin']): PlanBounds {
  const p = localProjection([origin.longitude, origin.latitude]);
  const [west, south] = p.toWgs84([-100, -100]);
  const [east, north] = p.toWgs84([100, 100]);
  const r = (x: number) => Math.round(x * 1e6) / 1e6;
  return { south: r(south), west: r(west), north: r(north), east: r(east) };
}

const cornerFields = [
  ['south', 'South-west corner, latitude (°)'],
  ['west', 'South-west corner, longitude (°)'],
  ['north', 'North-east corner, latitude (°)'],
  ['east', 'North-east corner, longitude (°)'],
] as const;

/**
 * The site plan image (a PNG or JPEG drawing of the site) pinned to the map by its south-west and
 * north-east corners, drawn over the grid with an opacity of the person's choosing.
 */
export function PlanControls({ siteId, origin, plan, canEdit, opacity, onOpacity }: PlanControlsProps) {
  const { upload, change, remove } = useSitePlanChanges(siteId);
  const [bounds, setBounds] = useState<Record<keyof PlanBounds, string>>(() => {
    const b = plan?.bounds ?? defaultBounds(origin);
    return { south: String(b.south), west: String(b.west), north: String(b.north), east: String(b.east) };
  });
  const [file, setFile] = useState<File | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [summary, setSummary] = useState<string | null>(null);
  const fileId = useId();

  const parsedBounds = (): PlanBounds | null => {
    const r = planBoundsSchema.safeParse(Object.fromEntries(Object.entries(bounds).map(([k, v]) => [k, v === '' ? undefined : Number(v)])));
    if (r.success) return r.data;
    setErrors(Object.fromEntries(r.error.issues.map((i) => [String(i.path[0] ?? 'bounds'), i.message])));
    return null;
  };

  const run = async (action: () => Promise<unknown>) => {
    setSummary(null);
    setErrors({});
    try {
      await action();
    } catch (error) {
      setSummary(errorMessage(error));
      const fields = (error as { fields?: Record<string, string> }).fields;
      if (fields) setErrors(fields);
    }
  };

  return (
    <section className="flex flex-col gap-3" aria-labelledby={`${fileId}-h`}>
      <h2 id={`${fileId}-h`} className="text-lg font-semibold">
        Site plan image
      </h2>
      <FormSummary message={summary} />
      {plan ? (
        <>
          <p className="text-sm">{plan.name}</p>
          <label className="flex flex-col gap-1">
            <span className="font-semibold">Opacity: {Math.round(opacity * 100)} %</span>
            <input
              type="range"
              min={0}
              max={1}
              step={0.05}
              value={opacity}
              onChange={(e) => onOpacity(Number(e.target.value))}
              onPointerUp={() => canEdit && void run(() => change.mutateAsync({ opacity }))}
              onKeyUp={() => canEdit && void run(() => change.mutateAsync({ opacity }))}
            />
          </label>
        </>
      ) : (
        <p className="text-sm text-ink-soft">No plan image yet: the map shows a metric grid from the site origin.</p>
      )}
      {canEdit ? (
        <details className="rounded-md border border-rule px-3 py-2">
          <summary className="cursor-pointer font-semibold">{plan ? 'Move or replace the plan' : 'Pin a plan image'}</summary>
          <div className="mt-3 flex flex-col gap-3">
            <p className="text-sm text-ink-soft">
              Give the plan’s south-west and north-east corners as latitude and longitude, read from the drawing’s survey grid.
            </p>
            <div className="grid grid-cols-2 gap-3">
              {cornerFields.map(([k, label]) => (
                <TextField
                  key={k}
                  label={label}
                  type="number"
                  step="any"
                  inputMode="decimal"
                  value={bounds[k]}
                  error={errors[k] ?? (k === 'south' ? errors.bounds : undefined)}
                  onChange={(e) => setBounds({ ...bounds, [k]: e.target.value })}
                />
              ))}
            </div>
            <div className="flex flex-col gap-1">
              <label htmlFor={fileId} className="font-semibold">
                Plan image (PNG or JPEG, up to 10 MB)
              </label>
              <input id={fileId} type="file" accept="image/png,image/jpeg" onChange={(e) => setFile(e.target.files?.[0] ?? null)} />
              {errors.file ? <p className="text-sm font-semibold text-error-text">The file {errors.file}.</p> : null}
            </div>
            <div className="flex flex-wrap gap-3">
              <Button
                busy={upload.isPending}
                busyText="Uploading…"
                disabled={!file}
                onClick={() => {
                  const b = parsedBounds();
                  if (b && file) void run(() => upload.mutateAsync({ file, bounds: b, opacity }));
                }}
              >
                Upload and pin
              </Button>
              {plan ? (
                <>
                  <Button
                    variant="secondary"
                    busy={change.isPending}
                    onClick={() => {
                      const b = parsedBounds();
                      if (b) void run(() => change.mutateAsync({ bounds: b }));
                    }}
                  >
                    Move to these corners
                  </Button>
                  <Button variant="quiet" onClick={() => void run(() => remove.mutateAsync())}>
                    Take the plan off the map
                  </Button>
                </>
              ) : null}
            </div>
          </div>
        </details>
      ) : null}
    </section>
  );
}
