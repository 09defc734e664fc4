import { stateLabels, type InspectionState } from '@shared/schemas/inspections';

/**
 * The inspection state of an open excavation in words, on its safety colour (ISO 3864): green
 * inspected this shift, yellow due, red overdue (no work until inspected), solid red not safe.
 */
const looks: Record<InspectionState, string> = {
  ok: 'border-safety-green bg-safety-green text-white',
  due: 'border-safety-yellow bg-safety-yellow text-ink',
  overdue: 'border-safety-red bg-sheet text-safety-red',
  unsafe: 'border-safety-red bg-safety-red text-white',
};

export function InspectionStateBadge({ state }: { state: InspectionState }) {
  return (
    <span
      className={`inline-flex items-center rounded-md border-2 px-2 py-0.5 text-sm font-bold ${looks[state]}`}
      data-inspection-state={state}
    >
      {stateLabels[state]}
    </span>
  );
}
