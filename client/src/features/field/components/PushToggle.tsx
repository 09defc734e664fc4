import { useEffect, useId, useState } from 'react';
import { ApiError } from '@client/lib/api';
import { serverSummary } from '@client/lib/fieldLabels';
import { pushState, turnPushOff, turnPushOn, type PushState } from '../offline/push';

const why: Partial<Record<PushState, string>> = {
  unsupported:
    'This browser cannot show Brink’s notifications. Add Brink to the home screen from a browser that can (Chrome, Edge, Firefox, Safari on iOS 16.4 or later).',
  'no-worker':
    'Notifications need the installed phone view: open Brink at its https address (or on this computer at localhost) and reload once.',
  blocked: 'Notifications from Brink are blocked on this phone. Allow them in the browser’s site settings, then turn them on here.',
};

/**
 * Why turning notifications on or off failed, and what to do: Brink's refusal in the words of the
 * one label mapping (`serverSummary`), or the browser's push service not answering.
 */
function pushProblem(err: unknown, on: boolean): string {
  const lead = `Notifications were not turned ${on ? 'on' : 'off'}.`;
  if (err instanceof ApiError && err.status !== 0) {
    const what = err.fields.endpoint
      ? 'Use Chrome, Edge, Firefox or Safari, whose push services Brink sends to, or tell the supervisor.'
      : 'Try again in a moment.';
    return `${lead} ${serverSummary(err)} ${what}`;
  }
  if (err instanceof ApiError) return `${lead} ${err.message}`;
  // PushManager.subscribe failed: the browser's own push service refused or could not be reached.
  return `${lead} This phone’s browser could not reach its push service. Check the signal and try again.`;
}

/**
 * "Tell me on this phone": a switch per device. On, Brink sends a notification here when a permit
 * that names me goes live, is suspended, is resumed or lapses (and, for a supervisor, when a concern
 * is raised on their permit); it opens the permit.
 */
export function PushToggle() {
  const [state, setState] = useState<PushState | 'loading'>('loading');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const errorId = useId();
  useEffect(() => {
    let live = true;
    pushState()
      .then((s) => live && setState(s))
      .catch(() => live && setState('off'));
    return () => {
      live = false;
    };
  }, []);
  if (state === 'loading') return null;
  const change = async (on: boolean) => {
    setBusy(true);
    setError(null);
    try {
      setState(on ? await turnPushOn() : await turnPushOff());
    } catch (err) {
      setError(pushProblem(err, on));
    } finally {
      setBusy(false);
    }
  };
  const usable = state === 'on' || state === 'off' || state === 'blocked';
  return (
    <div className="mt-3">
      <label className="flex min-h-12 items-center gap-3 font-semibold">
        <input
          type="checkbox"
          className="h-6 w-6"
          checked={state === 'on'}
          aria-describedby={error ? errorId : undefined}
          disabled={!usable || busy}
          onChange={(e) => void change(e.target.checked)}
        />
        Notifications on this phone
      </label>
      <p className="text-base" role="status">
        {state === 'on'
          ? 'On: this phone is told when a permit that names you goes live, is suspended, is resumed or lapses.'
          : (why[state] ?? 'Off: turn on to be told at once when a permit that names you changes.')}
      </p>
      {error ? (
        <p id={errorId} className="text-base font-semibold text-error-text" role="alert">
          {error}
        </p>
      ) : null}
    </div>
  );
}
