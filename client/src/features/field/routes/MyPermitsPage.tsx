import type { FieldPermit } from '@shared/schemas/field';
import { useDocumentTitle } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { useMyPermits } from '../api/permits';
import { useFieldPerson } from '../components/FieldGate';
import { useFieldOutbox } from '../components/FieldLayout';
import { LastUpdated, StaleCopyBanner } from '../components/LastUpdated';
import { PermitCard } from '../components/PermitCard';
import { useNow } from '../hooks/useOnline';
import { possiblyOutOfDate } from '../lib/copy';
import { isToday } from '../lib/format';

const closed = ['handed_back', 'lapsed'];

/** The permits that name me: today's first, then those to come, then those closed in the last hours. */
export function groupPermits(permits: FieldPermit[], now = new Date()) {
  const open = permits.filter((p) => !closed.includes(p.status));
  const today = open.filter((p) => isToday(p.windowStart, p.windowEnd, now));
  const later = open.filter((p) => !today.includes(p));
  return [
    { title: 'Today', permits: today },
    { title: 'Coming up', permits: later },
    { title: 'Closed', permits: permits.filter((p) => closed.includes(p.status)) },
  ].filter((g) => g.permits.length);
}

export function MyPermitsPage() {
  useDocumentTitle('My permits');
  const person = useFieldPerson();
  const { items } = useFieldOutbox();
  const { query, shown, lastTry } = useMyPermits(person.id);
  useNow(); // re-render as the copy ages
  const briefingWaiting = (id: number) => items.some((i) => i.kind === 'briefing' && i.permitId === id);
  return (
    <div className="flex flex-col gap-5">
      <h1 className="text-3xl font-bold">My permits</h1>
      <p>The permits that name you, {person.name}. Open one to see its zone, where you stand, and to confirm the briefing.</p>
      {person.organisationName ? <p className="text-ink-soft">Signed in for {person.organisationName}.</p> : null}
      {shown ? (
        <>
          {possiblyOutOfDate(
            shown,
            shown.answer.permits.map((p) => p.status),
            Date.now(),
          ) ? (
            <StaleCopyBanner asOf={shown.answer.asOf} what="list" />
          ) : null}
          <LastUpdated shown={shown} lastTry={lastTry} refreshing={query.isFetching} onRefresh={() => void query.refetch()} />
          {shown.answer.permits.length === 0 ? <p className="text-xl">No approved permit names you at the moment.</p> : null}
          {groupPermits(shown.answer.permits).map((g) => (
            <section key={g.title} aria-labelledby={`group-${g.title}`} className="flex flex-col gap-3">
              <h2 id={`group-${g.title}`} className="text-2xl font-bold">
                {g.title}
              </h2>
              <ul className="flex flex-col gap-3">
                {g.permits.map((p) => (
                  <li key={p.id}>
                    <PermitCard permit={p} briefingWaiting={briefingWaiting(p.id)} />
                  </li>
                ))}
              </ul>
            </section>
          ))}
        </>
      ) : query.isError ? (
        <LoadError error={query.error} retry={() => void query.refetch()} />
      ) : (
        <Loading what="Loading your permits" />
      )}
    </div>
  );
}
