/**
 * The words and the judgement of a re-check: when an excavation's check inputs change, each permit
 * that stands on it is checked again (with the machines frozen at its review) and judged against
 * what was approved. Pure, so it is tested on its own; the server applies the consequences
 * (server/src/services/permits/recheck.ts).
 *
 * Units: m, kPa, degrees.
 */
import { canonical, stateLabels, supportLabels, type CheckInputs } from '../schemas/excavations';
import type { PermitCheck, PermitDecision } from '../schemas/permits';

const m = (x: number) => `${x.toFixed(2)} m`;
const kPa = (x: number | null) => (x === null ? 'none' : `${Number(x.toFixed(1))} kPa`);

function listed(parts: string[]): string {
  return parts.length <= 1 ? (parts[0] ?? '') : `${parts.slice(0, -1).join(', ')} and ${parts[parts.length - 1]}`;
}

/** The changed check inputs, e.g. "TR-3 deepened from 2.5 m to 3.2 m and support changed from Trench box to Sheet piles". */
export function describeExcavationChange(reference: string, before: CheckInputs, after: CheckInputs): string {
  const parts: string[] = [];
  if (before.depth !== after.depth)
    parts.push(`${after.depth > before.depth ? 'deepened' : 'made shallower'} from ${m(before.depth)} to ${m(after.depth)}`);
  if (before.kind !== after.kind) parts.push(`changed from a ${before.kind} to a ${after.kind}`);
  else if (before.width !== null && after.width !== null && before.width !== after.width) {
    parts.push(`${after.width > before.width ? 'widened' : 'narrowed'} from ${m(before.width)} to ${m(after.width)}`);
  }
  if (canonical(before.geometry) !== canonical(after.geometry)) parts.push('redrawn on the plan');
  if (before.state !== after.state) parts.push(`set from ${stateLabels[before.state]} to ${stateLabels[after.state]}`);
  if (before.supportType !== after.supportType)
    parts.push(`support changed from ${supportLabels[before.supportType]} to ${supportLabels[after.supportType]}`);
  if (before.designSurcharge !== after.designSurcharge)
    parts.push(`design surcharge changed from ${kPa(before.designSurcharge)} to ${kPa(after.designSurcharge)}`);
  if (before.ratedPressure !== after.ratedPressure)
    parts.push(`rated pressure changed from ${kPa(before.ratedPressure)} to ${kPa(after.ratedPressure)}`);
  if (before.restraint !== after.restraint) parts.push(`restraint changed from ${before.restraint} to ${after.restraint}`);
  if (before.pressureState !== after.pressureState)
    parts.push(`pressure state changed from ${before.pressureState.replace('-', ' ')} to ${after.pressureState.replace('-', ' ')}`);
  if (before.wallFriction !== after.wallFriction)
    parts.push(`wall friction changed from ${before.wallFriction}° to ${after.wallFriction}°`);
  if (canonical(before.soil) !== canonical(after.soil)) parts.push('soil layers changed');
  if (before.groundwaterDepth !== after.groundwaterDepth) {
    const gw = (x: number | null) => (x === null ? 'none' : `${m(x)} down`);
    parts.push(`groundwater changed from ${gw(before.groundwaterDepth)} to ${gw(after.groundwaterDepth)}`);
  }
  return `${reference} ${parts.length ? listed(parts) : 'changed'}`;
}

interface RecheckJudgement {
  /** It now fails (and did not, or fails by more), its loads cannot be checked, or it needs more standoff than was approved. */
  worse: boolean;
  /** The new figures, e.g. "utilisation 1.31; computed standoff 2.40 m, approved 1.02 m". */
  figures: string;
}

/** The standoff an approval accepted (m): the one set, or the computed one when an approval went below it with a reason. */
function acceptedStandoff(d: PermitDecision): number | null {
  const approved = d.standoff ?? d.computedStandoff ?? null;
  const xs = [approved, d.computedStandoff ?? null].filter((x): x is number => x !== null);
  return xs.length ? Math.max(...xs) : null;
}

/**
 * Judges a permit's new check against its last stored one and its approval:
 * - worse when it now fails and passed before (or fails with a higher utilisation than the
 *   figures an approval with a reason stood on);
 * - worse when its computed standoff now exceeds the standoff the approval accepted (the one set,
 *   or the computed one when the coordinator went below it with a reason), or no standoff exists
 *   any more where one did;
 * - worse when a load can no longer be checked (it touches or overlaps the excavation: `refusal`).
 */
export function judgeRecheck(o: {
  check: PermitCheck | null;
  refusal?: string;
  previous: PermitCheck | null;
  decision: PermitDecision | null;
}): RecheckJudgement {
  if (!o.check) return { worse: true, figures: o.refusal ?? 'its loads can no longer be checked' };
  const c = o.check;
  const parts: string[] = [
    c.utilisation === null ? 'the support has no allowance for these loads' : `utilisation ${c.utilisation.toFixed(2)}`,
  ];
  const prev = o.previous;
  const rose = prev === null || prev.utilisation === null ? false : c.utilisation === null || c.utilisation > prev.utilisation + 0.005;
  let worse = !c.passes && (prev === null || prev.passes || rose);
  const approval = o.decision?.action === 'approve' ? o.decision : null;
  const computed = c.computedStandoff;
  const accepted = approval ? acceptedStandoff(approval) : null;
  const approvedWords = approval ? (approval.standoff ?? approval.computedStandoff ?? null) : null;
  if (approval) {
    const exceeds = computed === null ? approval.computedStandoff !== null : accepted !== null && computed > accepted + 0.001;
    worse ||= exceeds;
    const now = computed === null ? 'no standoff within 3H lets the support carry the loads' : `computed standoff ${m(computed)}`;
    const was = approvedWords === null ? 'none approved' : `${exceeds ? 'exceeds the approved' : 'approved'} ${m(approvedWords)}`;
    parts.push(`${now}${computed === null ? '' : exceeds && approvedWords !== null ? ` ${was}` : `, ${was}`}`);
  } else {
    parts.push(computed === null ? 'no standoff within 3H lets the support carry the loads' : `computed standoff ${m(computed)}`);
  }
  if (!c.passes) parts.push('the cumulative check fails');
  return { worse, figures: parts.join('; ') };
}
