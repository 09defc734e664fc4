import { Link } from 'react-router-dom';
import { attentionWarnings, bandsWords, failsBeyondPassing, type CheckRequest } from '@shared/engineering';
import { statusLabels, type ExcavationCheck, type PermitCheck } from '@shared/schemas/permits';
import { Caution } from '@client/components/Caution';
import { useFigures } from '@client/lib/units';
import type { Figures } from '@shared/units';
import { PressureDiagram } from './PressureDiagram';
import { VerdictBadge, VerdictRule } from './Verdict';

/** A standoff in the person's units, rounded up (docs/calculation.md, "Units"). */
const standoffText = (f: Figures, x: number | null) => (x === null ? 'none within 3H' : f.length(x, { rounding: 'up' }));
/** Said in place of a standoff while a load is being dragged (the search runs when it is let go). */
const PENDING = 'worked out when you let go';

/** The calculation sheet of one excavation: inputs, method, diagram, forces, utilisation, standoffs, other permits, warnings. */
function ExcavationSheet({
  ex,
  full = true,
  standoffsPending = false,
}: {
  ex: ExcavationCheck;
  full?: boolean;
  standoffsPending?: boolean;
}) {
  const f = useFigures();
  const so = (x: number | null) => (standoffsPending ? PENDING : standoffText(f, x));
  const len = (x: number) => f.length(x);
  const kN = (x: number) => f.lineForce(x);
  const r = ex.result;
  const req = ex.request as CheckRequest;
  const e = req.excavation;
  const attention = attentionWarnings(r.warnings);
  const others = r.warnings.filter((w) => !attention.includes(w));
  return (
    <section className="flex flex-col gap-3 rounded-md border border-rule p-4" aria-label={`Check beside ${ex.reference}`}>
      <h3 className="text-lg font-semibold">
        {ex.reference} {ex.name}
        {ex.named === false ? (
          <span className="ml-2 text-base font-normal">(not named on the permit; a load stands within its influence zone)</span>
        ) : null}
      </h3>
      <VerdictBadge verdict={ex.verdict} utilisation={r.utilisation} />
      {attention.length ? (
        <div role="note" className="rounded-md border-2 border-[#b45309] p-3" data-testid={`attention-${ex.excavationId}`}>
          <h4 className="font-semibold">Read before signing</h4>
          <ul className="list-disc pl-5 text-sm">
            {attention.map((w) => (
              <li key={w}>{f.words(w)}</li>
            ))}
          </ul>
        </div>
      ) : null}
      <p>
        Standoff for this permit's loads: <strong data-testid={`standoff-${ex.excavationId}`}>{so(ex.standoff)}</strong>
      </p>
      <table className="text-sm">
        <caption className="text-left font-semibold">Each load</caption>
        <thead>
          <tr className="text-left">
            <th>Load</th>
            <th>Clear distance now</th>
            <th>Standoff</th>
            <th>Fails at</th>
          </tr>
        </thead>
        <tbody>
          {ex.loadStandoffs.map((l) => {
            const bands = l.failingBands ?? [];
            return (
              <tr key={l.loadId}>
                <td>{l.label}</td>
                <td>{len(l.offset)}</td>
                <td>{so(l.standoff)}</td>
                <td>
                  {standoffsPending ? PENDING : bands.length ? f.words(bandsWords(bands)) : 'nowhere from the minimum clearance to 3H'}
                  {failsBeyondPassing(bands, req.minimumClearance) ? ' (passes in between: farther is not always safer)' : ''}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      {ex.counted.length ? (
        <p>
          Counted with {ex.counted.length === 1 ? 'another permit' : 'other permits'} beside {ex.reference} in an overlapping window:{' '}
          {ex.counted.map((c, i) => (
            <span key={c.id}>
              {i ? ', ' : ''}
              <Link to={`/permits/${c.id}`}>{c.number}</Link> ({statusLabels[c.status]})
            </span>
          ))}
          .
        </p>
      ) : (
        <p>No other approved or live permit stands beside {ex.reference} in this window.</p>
      )}
      {full ? (
        <>
          <h4 className="font-semibold">Inputs</h4>
          <ul className="text-sm">
            <li>
              Depth {len(e.depth)}; design surcharge {f.pressure(e.designSurcharge)}; rated pressure{' '}
              {e.ratedPressure === null ? 'none' : f.pressure(e.ratedPressure)}
            </li>
            <li>
              Earth pressure {e.pressureState}, wall friction {e.wallFriction}°, support {e.restraint}; groundwater{' '}
              {e.groundwaterDepth === null ? 'none' : len(e.groundwaterDepth)}
            </li>
            {req.soil.map((l, i) => (
              <li key={i}>
                Soil from {len(l.top)}: {f.unitWeight(l.unitWeight)}
                {l.frictionAngle !== undefined
                  ? `, φ′ ${l.frictionAngle}°, c′ ${f.pressure(l.cohesion ?? 0)}`
                  : `, cu ${f.pressure(l.undrainedShearStrength ?? 0)}`}
              </li>
            ))}
            <li>Coefficients: {r.coefficients.map((c) => `K = ${c.K.toFixed(3)} from ${len(c.top)}`).join('; ')}</li>
          </ul>
          <h4 className="font-semibold">Method</h4>
          <p className="text-sm">
            {r.method === 'elastic'
              ? 'Elastic solutions (Boussinesq-based, as given in NAVFAC DM-7.02); area loads analysed as strips of their width.'
              : '45° load spread: each load presses on the support in the band of depths its spread reaches.'}{' '}
            Minimum clearance {f.length(req.minimumClearance, { rounding: 'up' })}.
          </p>
          {r.profile ? (
            <PressureDiagram profile={r.profile} depth={ex.depth} title={`Pressure beside ${ex.reference}`} figures={f} />
          ) : null}
          <h4 className="font-semibold">Forces and moments (per {f.system === 'us' ? 'foot' : 'metre'} run of support)</h4>
          <ul className="text-sm">
            <li>
              Soil {kN(r.forces.soil)}, water {kN(r.forces.water)}
            </li>
            <li>
              Surcharge {kN(r.forces.surcharge)} against the allowance {kN(r.forces.allowance)}
            </li>
            <li>
              Moment about formation: surcharge {f.moment(r.moments.surcharge)} against the allowance {f.moment(r.moments.allowance)}
            </li>
            <li>
              Utilisation {r.utilisation === null ? 'no allowance' : r.utilisation.toFixed(2)} ({r.governing ?? '—'} governs); largest
              pressure {f.pressure(r.maxTotalPressure)}
            </li>
          </ul>
          <table className="text-sm">
            <caption className="text-left font-semibold">Loads in the check</caption>
            <thead>
              <tr className="text-left">
                <th>Permit</th>
                <th>Load</th>
                <th>Kind</th>
                <th>Offset</th>
                <th>Force</th>
              </tr>
            </thead>
            <tbody>
              {ex.loads.map((l) => (
                <tr key={l.engineId}>
                  <td>{l.own ? 'this' : l.permitNumber}</td>
                  <td>
                    {l.label}
                    {l.element ? ` – ${l.element}` : ''}
                  </td>
                  <td>{l.kind}</td>
                  <td>{len(l.offset)}</td>
                  <td>{kN(l.force)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      ) : null}
      {others.length ? (
        <div>
          <h4 className="font-semibold">Warnings</h4>
          <ul className="list-disc pl-5 text-sm">
            {others.map((w) => (
              <li key={w}>{f.words(w)}</li>
            ))}
          </ul>
        </div>
      ) : null}
    </section>
  );
}

/** The whole check of a permit: the overall verdict, the colour rule, each excavation's sheet and the caution. */
export function CheckSheets({
  check,
  full = true,
  standoffsPending = false,
}: {
  check: PermitCheck;
  full?: boolean;
  standoffsPending?: boolean;
}) {
  const f = useFigures();
  return (
    <div className="flex flex-col gap-4" data-testid="check">
      <p className="flex flex-wrap items-center gap-3">
        <VerdictBadge verdict={check.verdict} utilisation={check.utilisation} />
        <span>
          Computed standoff:{' '}
          <strong data-testid="computed-standoff">{standoffsPending ? PENDING : standoffText(f, check.computedStandoff)}</strong>
        </span>
      </p>
      <VerdictRule />
      {check.outsideInfluence.length ? (
        <p className="text-sm">Outside every influence zone (no effect on the support): {check.outsideInfluence.join(', ')}.</p>
      ) : null}
      {check.excavations.map((ex) => (
        <ExcavationSheet key={ex.excavationId} ex={ex} full={full} standoffsPending={standoffsPending} />
      ))}
      <Caution />
    </div>
  );
}
