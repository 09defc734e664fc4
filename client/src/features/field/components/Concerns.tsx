import { Button } from '@client/components/Button';
import { discardItem, type ConcernItem } from '../offline/outbox';
import { concernRefusal, type CorrectingProps } from '../lib/concernFields';
import { whenText } from '../lib/format';
import { useFieldOutbox } from './FieldLayout';

/** Concerns on this permit: those still on the phone (waiting or not accepted) first, then those the server has. */
export function Concerns({ permit, correcting, onCorrect }: CorrectingProps) {
  const { items, send } = useFieldOutbox();
  const mine = items.filter((i): i is ConcernItem => i.kind === 'concern' && i.permitId === permit.id);
  if (!mine.length && !permit.concerns.length) return null;
  return (
    <section aria-labelledby="concerns-title" className="flex flex-col gap-3">
      <h2 id="concerns-title" className="text-2xl font-bold">
        Concerns reported
      </h2>
      <ul className="flex flex-col gap-3">
        {mine.map((c) => (
          <li key={c.key} className="rounded-md border-2 border-dashed border-ink bg-sheet p-3" data-testid="concern-on-phone">
            <p className="font-bold">
              {c.state === 'refused' ? 'Not sent: Brink did not accept it' : 'On this phone, waiting to send'} · {c.excavationReference}
            </p>
            <p className="whitespace-pre-wrap">{c.note}</p>
            <p className="text-lg">
              Made {whenText(c.createdAt)}
              {c.photos.length ? `, ${c.photos.length} photo${c.photos.length > 1 ? 's' : ''}` : ''}.{' '}
              {c.state === 'refused' ? '' : (c.problem ?? '')}
            </p>
            {c.state === 'refused' && c.key === correcting ? (
              <div className="mt-2 flex flex-wrap gap-3">
                <p className="basis-full text-lg font-semibold">It is back in the form above, to correct and send again.</p>
                <Button variant="secondary" className="min-h-12" onClick={() => void discardItem(c.key).then(() => onCorrect(null))}>
                  Discard this concern
                </Button>
              </div>
            ) : c.state === 'refused' ? (
              <div className="mt-2 flex flex-wrap gap-3">
                <p className="basis-full text-lg font-semibold text-error-text">{concernRefusal(c, false)}</p>
                <Button variant="secondary" className="min-h-12" onClick={() => onCorrect(c.key)}>
                  Correct it in the form
                </Button>
                <Button variant="secondary" className="min-h-12" onClick={() => void discardItem(c.key)}>
                  Discard this concern
                </Button>
              </div>
            ) : (
              <Button variant="secondary" className="mt-2 min-h-12" onClick={send}>
                Try sending now
              </Button>
            )}
          </li>
        ))}
        {[...permit.concerns].reverse().map((c) => (
          <li key={c.id} className="rounded-md border-2 border-rule-strong bg-sheet p-3" data-testid="concern-sent">
            <p className="font-bold">
              {c.excavationReference} · {c.reporter.name}, {whenText(c.createdAt)}
            </p>
            <p className="whitespace-pre-wrap">{c.note}</p>
            {c.photoIds.length ? (
              <div className="mt-2 flex flex-wrap gap-2">
                {c.photoIds.map((id, i) => (
                  <a key={id} href={`/api/uploads/${id}`} className="inline-flex min-h-12 items-center" target="_blank" rel="noreferrer">
                    Photo {i + 1}
                  </a>
                ))}
              </div>
            ) : null}
          </li>
        ))}
      </ul>
    </section>
  );
}
