import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { useDocumentTitle } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { parseId } from '@client/lib/session';
import { useFieldPermit } from '../api/permits';
import { Briefing } from '../components/Briefing';
import { ConcernForm } from '../components/ConcernForm';
import { Concerns } from '../components/Concerns';
import { Conditions } from '../components/Conditions';
import { useFieldPerson } from '../components/FieldGate';
import { LastUpdated, StaleCopyBanner } from '../components/LastUpdated';
import { WhereAmI } from '../components/WhereAmI';
import { ZoneMap } from '../components/LazyZoneMap';
import { MapKey } from '../components/MapKey';
import { useNow } from '../hooks/useOnline';
import { possiblyOutOfDate } from '../lib/copy';
import type { Fix } from '../lib/reading';
import { windowText } from '../lib/format';

const stopped: Record<string, string> = {
  suspended: 'Suspended: stop work under this permit now and keep clear of the excavation.',
  handed_back: 'Handed back: no more work under this permit.',
  lapsed: 'Its window has closed: no more work under this permit.',
  withdrawn: 'Withdrawn: no work under this permit.',
  declined: 'Declined: no work under this permit.',
};

/** One permit on the phone: its state, where I stand against the zone, the map, standoff and conditions, briefing and concerns. */
export function FieldPermitPage() {
  const permitId = parseId(useParams().permitId) ?? 0;
  const person = useFieldPerson();
  const { query, shown, lastTry } = useFieldPermit(person.id, permitId);
  useNow(); // re-render as the copy ages
  const [fix, setFix] = useState<Fix | null>(null);
  /** A refused concern put back in the form to be corrected (its key in the outbox). */
  const [correcting, setCorrecting] = useState<string | null>(null);
  const permit = shown?.answer.permit;
  useDocumentTitle(permit ? `Permit ${permit.number}` : 'Permit');

  if (!shown || !permit) {
    return query.isError ? <LoadError error={query.error} retry={() => void query.refetch()} /> : <Loading what="Loading the permit" />;
  }
  return (
    <div className="flex flex-col gap-6">
      <p>
        <Link to="/field" className="inline-flex min-h-12 items-center">
          ← My permits
        </Link>
      </p>
      <header className="flex flex-col gap-1">
        <h1 className="text-3xl font-bold">
          Permit {permit.number} <span className="whitespace-nowrap rounded border-2 border-ink px-2 text-2xl">{permit.statusLabel}</span>
        </h1>
        {permit.description ? <p className="text-xl">{permit.description}</p> : null}
        <p className="text-xl font-semibold">{windowText(permit.windowStart, permit.windowEnd)}</p>
        <p>{permit.siteName}</p>
      </header>
      {possiblyOutOfDate(shown, [permit.status], Date.now()) ? <StaleCopyBanner asOf={shown.answer.asOf} what="permit" /> : null}
      {stopped[permit.status] ? (
        <p
          role="alert"
          className={`rounded-md border-4 p-4 text-2xl font-bold ${permit.status === 'suspended' ? 'border-safety-red bg-safety-red text-white' : 'border-ink bg-sheet'}`}
        >
          {stopped[permit.status]}
        </p>
      ) : null}
      <LastUpdated shown={shown} lastTry={lastTry} refreshing={query.isFetching} onRefresh={() => void query.refetch()} />
      <Briefing permit={permit} />
      <WhereAmI permit={permit} onFix={setFix} />
      <section aria-label="Map of the permit, north up" className="flex flex-col gap-3">
        <ZoneMap permit={permit} fix={fix} />
        <MapKey hasFix={Boolean(fix)} />
      </section>
      <Conditions permit={permit} />
      <ConcernForm permit={permit} correcting={correcting} onCorrect={setCorrecting} />
      <Concerns permit={permit} correcting={correcting} onCorrect={setCorrecting} />
    </div>
  );
}
