import { Button } from '@client/components/Button';
import type { Source } from '../api/permits';
import { useNow, useOnline } from '../hooks/useOnline';
import { whenText } from '../lib/format';

/** When the shown copy left the server, and whether it is the phone's own copy. */
export function LastUpdated({ asOf, source, refreshing, onRefresh }: { asOf: string; source: Source; refreshing: boolean; onRefresh: () => void }) {
  const now = useNow();
  const online = useOnline();
  const kept = source === 'phone' || !online;
  return (
    <div className={`flex flex-wrap items-center gap-3 rounded-md border-2 px-4 py-2 ${kept ? 'border-ink bg-sheet' : 'border-rule bg-sheet'}`}>
      <p className="flex-1" data-testid="last-updated">
        {kept ? <strong>No signal: showing the copy kept on this phone. </strong> : null}
        Last updated {whenText(asOf, now)}.
      </p>
      <Button variant="secondary" className="min-h-12" busy={refreshing} busyText="Updating…" onClick={onRefresh}>
        Update now
      </Button>
    </div>
  );
}
