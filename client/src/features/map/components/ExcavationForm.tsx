import { useEffect, useId, useState } from 'react';
import { useForm, type Path } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import {
  excavationFields,
  excavationStates,
  kindLabels,
  stateLabels,
  supportLabels,
  supportTypes,
  type Excavation,
  type ExcavationGeometry,
  type ExcavationInput,
  type ExcavationValues,
} from '@shared/schemas/excavations';
import { Button } from '@client/components/Button';
import { Caution } from '@client/components/Caution';
import { ConfirmAction } from '@client/components/ConfirmAction';
import { FormSummary, SelectField, TextField } from '@client/components/Fields';
import { QuantityField } from '@client/components/QuantityField';
import { applyServerErrors, maxLengths } from '@client/lib/forms';
import { useFigures } from '@client/lib/units';
import { excavationFormSchema, numberOrNull, type ExcavationFormValues } from './excavationFormValues';
import { SoilTable } from './SoilTable';

const max = maxLengths(excavationFields);

const stateOptions = excavationStates.map((s) => ({ value: s, label: stateLabels[s] }));
const supportOptions = supportTypes.map((s) => ({ value: s, label: supportLabels[s] }));

const labels: Partial<Record<Path<ExcavationFormValues>, string>> = {
  reference: 'Reference',
  name: 'Name',
  geometry: 'The shape',
  width: 'Width',
  depth: 'Depth',
  state: 'State',
  supportType: 'Support',
  designSurcharge: 'Design surcharge allowance',
  ratedPressure: 'Rated pressure',
  restraint: 'Restraint',
  pressureState: 'Earth pressure',
  wallFriction: 'Wall friction',
  groundwaterDepth: 'Groundwater depth',
  designReference: 'Design reference',
  notes: 'Notes',
  soil: 'Soil layers',
};
const shown = Object.keys(labels) as Path<ExcavationFormValues>[];

interface ExcavationFormProps {
  /** The saved excavation, or null for a new one. */
  excavation: Excavation | null;
  initial: ExcavationFormValues;
  /** The reference the soil was copied from, for a new excavation. */
  soilFrom: string | null;
  canEdit: boolean;
  /**
   * Whether the support's design data (support, surcharge, rated pressure, restraint, earth pressure,
   * wall friction, soil, groundwater, design reference) may be changed: coordinators and
   * administrators. Supervisors see them read-only and record what is on the ground.
   */
  canEditDesign: boolean;
  /** The shape on the map as it is now (drawn, or being changed). */
  geometry: ExcavationGeometry | null;
  editingShape: boolean;
  onEditShape: () => void;
  /** What the map should preview while the form changes. */
  onPreview: (v: {
    kind: ExcavationFormValues['kind'];
    geometry: ExcavationGeometry | null;
    width: number | null;
    depth: number | null;
    state: ExcavationFormValues['state'];
  }) => void;
  onSave: (values: ExcavationInput, drawing: File | null) => Promise<void>;
  onDelete: () => Promise<void>;
  onRemoveDrawing: () => Promise<void>;
  onClose: () => void;
}

/**
 * What an excavation is: reference and name, depth and state, what holds it up, the ground, the design
 * and the drawing. Checked with the shared schema before it is sent; the server's reasons land on the
 * same fields, and what was typed stays.
 */
export function ExcavationForm(props: ExcavationFormProps) {
  const {
    excavation,
    initial,
    soilFrom,
    canEdit,
    canEditDesign,
    geometry,
    editingShape,
    onEditShape,
    onPreview,
    onSave,
    onDelete,
    onRemoveDrawing,
    onClose,
  } = props;
  const [summary, setSummary] = useState<string | null>(null);
  const [drawing, setDrawing] = useState<File | null>(null);
  const fileId = useId();
  const { register, handleSubmit, setError, setValue, watch, control, formState } = useForm<
    ExcavationFormValues,
    unknown,
    ExcavationValues
  >({
    resolver: zodResolver(excavationFormSchema),
    defaultValues: initial,
  });
  const { errors } = formState;

  // The map's shape is part of the record.
  useEffect(() => {
    setValue('geometry', geometry, { shouldDirty: true });
  }, [geometry, setValue]);

  const kind = watch('kind');
  const width = watch('width');
  const depth = watch('depth');
  const state = watch('state');
  useEffect(() => {
    onPreview({
      kind,
      geometry,
      width: typeof width === 'number' && Number.isFinite(width) ? width : null,
      depth: typeof depth === 'number' && Number.isFinite(depth) ? depth : null,
      state,
    });
  }, [kind, geometry, width, depth, state, onPreview]);

  const submit = handleSubmit(
    async (values) => {
      setSummary(null);
      try {
        await onSave(values, drawing);
        setDrawing(null);
      } catch (error) {
        setSummary(applyServerErrors(error, setError, shown, labels));
      }
    },
    () => setSummary('Some details need correcting: see the fields marked below.'),
  );

  const num = { setValueAs: numberOrNull } as const;
  const figures = useFigures();
  const ro = !canEdit;
  const designRo = !canEdit || !canEditDesign;
  return (
    <form
      onSubmit={submit}
      noValidate
      className="flex flex-col gap-4"
      aria-label={excavation ? `Excavation ${excavation.reference}` : 'New excavation'}
    >
      <div className="flex items-start justify-between gap-3">
        <h2 className="text-xl font-bold">
          {excavation ? `${excavation.reference}: ${excavation.name}` : `New ${kindLabels[kind].toLowerCase()}`}
        </h2>
        <Button variant="quiet" onClick={onClose}>
          Close
        </Button>
      </div>
      <FormSummary message={summary} />
      {soilFrom && !excavation ? (
        <p className="rounded-md border border-rule-strong bg-paper px-3 py-2 text-sm">
          Soil layers and groundwater are copied from <strong>{soilFrom}</strong>. Check them against the ground investigation for this
          place.
        </p>
      ) : null}

      <fieldset className="flex flex-col gap-3" disabled={ro}>
        <div className="grid grid-cols-2 gap-3">
          <TextField label="Reference" maxLength={max.reference} error={errors.reference?.message} {...register('reference')} />
          <SelectField label="State" options={stateOptions} error={errors.state?.message} {...register('state')} />
        </div>
        <TextField
          label="Name"
          hint="What it is for, e.g. “Rising main, pump house to inlet chamber”"
          maxLength={max.name}
          error={errors.name?.message}
          {...register('name')}
        />
        <div className="flex flex-col gap-2">
          <p className="font-semibold">
            Shape: {kindLabels[kind]} {kind === 'trench' ? '(centre line and width)' : '(outline)'}
          </p>
          {errors.geometry?.message ? <p className="text-sm font-semibold text-error-text">The shape {errors.geometry.message}.</p> : null}
          {canEdit ? (
            <div>
              <Button variant="secondary" onClick={onEditShape} aria-pressed={editingShape}>
                {editingShape ? 'Drag the corner points on the map' : 'Change the shape'}
              </Button>
            </div>
          ) : null}
        </div>
        <div className="grid grid-cols-2 gap-3">
          {kind === 'trench' ? <QuantityField control={control} name="width" quantity="length" label="Width" /> : null}
          <QuantityField control={control} name="depth" quantity="length" label="Depth H" hint="Ground to formation level" />
        </div>
      </fieldset>

      {canEdit && !canEditDesign ? (
        <p className="rounded-md border border-rule-strong bg-paper px-3 py-2 text-sm">
          The support, the ground and the design reference are the coordinator&rsquo;s design data: shown here read-only. You record what is
          on the ground: the shape, the depth as dug, the state, the name and notes.
        </p>
      ) : null}

      <fieldset className="flex flex-col gap-3" disabled={designRo}>
        <legend className="mb-1 text-lg font-semibold">Support</legend>
        <SelectField
          label="Support"
          options={supportOptions}
          emptyLabel="Choose the support"
          error={errors.supportType?.message}
          {...register('supportType')}
        />
        <div className="grid grid-cols-2 gap-3">
          <QuantityField
            control={control}
            name="designSurcharge"
            quantity="pressure"
            label="Design surcharge allowance"
            hint={figures.words('What the support was designed for; 10 kPa is the usual site allowance')}
          />
          <QuantityField
            control={control}
            name="ratedPressure"
            quantity="pressure"
            label="Rated pressure"
            hint="Proprietary box or frame only; else empty"
          />
        </div>
        <SelectField
          label="Restraint"
          options={[
            { value: 'unyielding', label: 'Unyielding (propped, stiff)' },
            { value: 'yielding', label: 'Yielding (free to move)' },
          ]}
          error={errors.restraint?.message}
          {...register('restraint')}
        />
        <details className="rounded-md border border-rule px-3 py-2">
          <summary className="cursor-pointer font-semibold">Earth pressure and wall friction</summary>
          <div className="mt-3 grid grid-cols-2 gap-3">
            <SelectField
              label="Earth pressure"
              options={[
                { value: 'active', label: 'Active' },
                { value: 'at-rest', label: 'At rest' },
              ]}
              error={errors.pressureState?.message}
              {...register('pressureState')}
            />
            <TextField
              label="Wall friction δ (°)"
              type="number"
              step="any"
              min={0}
              inputMode="decimal"
              error={errors.wallFriction?.message}
              {...register('wallFriction', num)}
            />
          </div>
        </details>
      </fieldset>

      <fieldset className="flex flex-col gap-3" disabled={designRo}>
        <legend className="mb-1 text-lg font-semibold">Ground</legend>
        <SoilTable control={control} register={register} watch={watch} errors={errors} readOnly={designRo} />
        <QuantityField
          control={control}
          name="groundwaterDepth"
          quantity="length"
          label="Groundwater depth"
          hint="Below ground level; empty when none was found"
        />
      </fieldset>

      <fieldset className="flex flex-col gap-3" disabled={ro}>
        <legend className="mb-1 text-lg font-semibold">Design</legend>
        <TextField
          label="Design reference"
          hint="Drawing or calculation number and revision"
          readOnly={designRo}
          maxLength={max.designReference}
          error={errors.designReference?.message}
          {...register('designReference')}
        />
        <div className="flex flex-col gap-1">
          <label htmlFor={fileId} className="font-semibold">
            Design drawing (PDF, up to 20 MB)
          </label>
          {excavation?.drawing ? (
            <p className="flex flex-wrap items-center gap-3 text-sm">
              <a href={`/api/uploads/${excavation.drawing.id}`} target="_blank" rel="noreferrer">
                {excavation.drawing.name}
              </a>
              <span className="text-ink-soft">{(excavation.drawing.size / 1024 / 1024).toFixed(2)} MB</span>
              {canEdit ? (
                <Button variant="quiet" className="min-h-9" onClick={() => void onRemoveDrawing()}>
                  Remove the drawing
                </Button>
              ) : null}
            </p>
          ) : null}
          {canEdit ? (
            <input id={fileId} type="file" accept="application/pdf,.pdf" onChange={(e) => setDrawing(e.target.files?.[0] ?? null)} />
          ) : null}
          {drawing ? <p className="text-sm text-ink-soft">{drawing.name} is sent when you save.</p> : null}
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor={`${fileId}-notes`} className="font-semibold">
            Notes
          </label>
          <textarea
            id={`${fileId}-notes`}
            rows={3}
            className="rounded-md border border-rule-strong bg-sheet px-3 py-2"
            maxLength={max.notes}
            {...register('notes')}
          />
        </div>
      </fieldset>

      <Caution />
      {canEdit ? (
        <div className="flex flex-wrap gap-3">
          <Button type="submit" busy={formState.isSubmitting} busyText="Saving…">
            {excavation ? 'Save changes' : 'Save excavation'}
          </Button>
          {excavation ? (
            <ConfirmAction
              label="Remove from the register"
              question={`Remove ${excavation.reference} from the register? Its record stays in the audit log. If it has been filled in, set its state to Backfilled instead.`}
              confirmLabel="Remove it"
              onConfirm={onDelete}
            />
          ) : null}
        </div>
      ) : (
        <p className="text-sm text-ink-soft">Supervisors and coordinators change the register; you can read it.</p>
      )}
    </form>
  );
}
