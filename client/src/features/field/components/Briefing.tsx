import { useState } from 'react';
import type { FieldPermit } from '@shared/schemas/field';
import { Button } from '@client/components/Button';
import { refusalSummary } from '@client/lib/fieldLabels';
import { newIdempotencyKey } from '@client/lib/random';
import { addToOutbox, discardItem } from '../offline/outbox';
import { clock, whenText } from '../lib/format';
import { useFieldPerson } from './FieldGate';
import { useFieldOutbox } from './FieldLayout';

/**
 * Confirming the briefing: one press records who and when on the phone at once, and the outbox sends
 * it (now, or when the signal returns). The permit goes live only when every named operator has.
 */
export function Briefing({ permit }: { permit: FieldPermit }) {
  const person = useFieldPerson();
  const { items, send } = useFieldOutbox();
  const [failed, setFailed] = useState<string | null>(null);
  const mine = items.find((i) => i.kind === 'briefing' && i.permitId === permit.id);
  const others = permit.operators.filter((o) => o.id !== person.id);

  let body;
  if (!permit.named) {
    body = <p>This permit does not name you as an operator. Only the operators it names confirm its briefing.</p>;
  } else if (permit.myBriefedAt) {
    body = (
      <p className="text-xl font-semibold" data-testid="briefing-state">
        You confirmed the briefing {whenText(permit.myBriefedAt)}.
      </p>
    );
  } else if (mine) {
    body = (
      <div data-testid="briefing-state">
        <p className="text-xl font-semibold">Briefing recorded on this phone at {clock(mine.createdAt)}.</p>
        {mine.state === 'refused' ? (
          <p role="alert" className="font-semibold text-error-text">
            Brink did not record it: {refusalSummary({ message: mine.problem ?? '', fields: mine.fields ?? {} })}
          </p>
        ) : (
          <p>{mine.problem ?? 'Sending…'}</p>
        )}
        {mine.state === 'refused' ? (
          <Button variant="secondary" className="mt-2 min-h-12" onClick={() => void discardItem(mine.key)}>
            Discard it, to confirm the briefing again
          </Button>
        ) : null}
      </div>
    );
  } else if (permit.briefingDue) {
    body = (
      <>
        <p>
          Press this once the supervisor has briefed you on this permit: the exclusion zone, the standoff and the conditions below. Brink
          records your name and the time.
        </p>
        <Button
          className="min-h-16 w-full text-xl"
          onClick={async () => {
            setFailed(null);
            try {
              await addToOutbox(newIdempotencyKey(), person.id, permit, { kind: 'briefing', revision: permit.revision });
              send();
            } catch {
              setFailed('This phone could not record it (its storage is full or blocked). Try again, or tell the supervisor.');
            }
          }}
        >
          I have been briefed on {permit.number}
        </Button>
        {failed ? (
          <p role="alert" className="font-semibold text-error-text">
            {failed}
          </p>
        ) : null}
      </>
    );
  } else {
    body = <p>The briefing comes after the permit is approved.</p>;
  }

  return (
    <section aria-labelledby="briefing-title" className="flex flex-col gap-3 rounded-md border-2 border-ink bg-sheet p-4">
      <h2 id="briefing-title" className="text-2xl font-bold">
        Briefing
      </h2>
      {body}
      {others.length ? (
        <ul className="text-lg">
          {others.map((o) => (
            <li key={o.id}>
              {o.name}: {o.briefedAt ? `confirmed ${whenText(o.briefedAt)}` : 'not confirmed yet'}
            </li>
          ))}
        </ul>
      ) : null}
      {permit.status === 'approved' ? (
        <p className="text-lg">The permit goes live when its window opens and every named operator has confirmed.</p>
      ) : null}
    </section>
  );
}
