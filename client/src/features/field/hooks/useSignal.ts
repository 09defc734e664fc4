import { useSyncExternalStore } from 'react';
import type { LastTry } from '../lib/copy';
import { useOnline } from './useOnline';

/**
 * Whether the field view's last read reached the server: what the header's "Signal" / "No signal"
 * says. The browser's online flag counts only when it says offline (then there is surely no signal);
 * when it says online, the answers decide.
 */
let last: LastTry | null = null;
const listeners = new Set<() => void>();

export function reportTry(reached: boolean, at = Date.now()): void {
  last = { at, reached };
  listeners.forEach((l) => l());
}

function subscribe(listener: () => void) {
  listeners.add(listener);
  return () => listeners.delete(listener);
}

function useLastFieldTry(): LastTry | null {
  return useSyncExternalStore(
    subscribe,
    () => last,
    () => null,
  );
}

/** True when the browser says offline or the last read got no answer from the server. */
export function useNoSignal(): boolean {
  const online = useOnline();
  const lastTry = useLastFieldTry();
  return !online || lastTry?.reached === false;
}
