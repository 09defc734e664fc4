import { Button } from '@client/components/Button';
import type { Kept } from '../api/kept';
import { useNow } from '../hooks/useOnline';
import { provenance, type LastTry } from '../lib/copy';
import { clock, stampText, whenText } from '../lib/format';

/**
 * Where the shown answer came from and when it left the server: "Last updated …" for the server's
 * answer just now, "No signal: showing the copy kept on this phone (from …)" when it is a kept copy,
 * and, beside the refresh button, whether the last try reached the server.
 */
export function LastUpdated({
  shown,
  lastTry,
  refreshing,
  onRefresh,
}: {
  shown: Kept<{ asOf: string }>;
  lastTry: LastTry | null;
  refreshing: boolean;
  onRefresh: () => void;
}) {
  const now = useNow();
  const from = provenance(shown);
  const asOf = shown.answer.asOf;
  return (
    <div
      className={`flex flex-wrap items-center gap-3 rounded-md border-2 px-4 py-2 ${from === 'server' ? 'border-rule bg-sheet' : 'border-ink bg-sheet'}`}
    >
      <div className="flex flex-1 flex-col gap-1">
        <p data-testid="last-updated">
          {from === 'server' ? (
            <>Last updated {whenText(asOf, now)}.</>
          ) : (
            <>
              <strong>{from === 'asking' ? 'Waiting for the server' : 'No signal'}: showing the copy kept on this phone</strong> (from{' '}
              {stampText(asOf, now)}).
            </>
          )}
        </p>
        {lastTry ? (
          <p data-testid="last-try">
            Last try at {clock(new Date(lastTry.at))}: {lastTry.reached ? 'reached the server.' : 'no answer from the server.'}
          </p>
        ) : null}
      </div>
      <Button variant="secondary" className="min-h-12" busy={refreshing} busyText="Asking the server…" onClick={onRefresh}>
        Update now
      </Button>
    </div>
  );
}

/**
 * The banner the operator cannot miss: the copy shown is older than a few minutes (STALE_AFTER_MS)
 * and about a permit in force, so the permit may have been suspended, changed or closed since.
 */
export function StaleCopyBanner({ asOf, what }: { asOf: string; what: 'permit' | 'list' }) {
  const now = useNow();
  return (
    <div role="alert" data-testid="stale-copy" className="rounded-md border-4 border-ink bg-safety-yellow p-4 text-ink">
      <p className="text-2xl font-bold">Possibly out of date: this copy is from {stampText(asOf, now)}.</p>
      <p className="mt-1 text-xl">
        Brink has not reached the server since. {what === 'permit' ? 'This permit' : 'A permit here'} may have been suspended, changed or
        closed: check with your supervisor or the coordinator before you start or carry on work.
      </p>
    </div>
  );
}
