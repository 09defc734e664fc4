import { createContext, useContext, useEffect, type ReactNode } from 'react';
import { Link, Outlet } from 'react-router-dom';
import { Caution } from '@client/components/Caution';
import { SkipLink } from '@client/components/SkipLink';
import { useOutbox, useOutboxSender } from '../hooks/useOutbox';
import { useNoSignal } from '../hooks/useSignal';
import type { OutboxItem } from '../offline/outbox';
import { FieldGate, useFieldPerson } from './FieldGate';
import { preloadZoneMap } from './LazyZoneMap';
import { PushToggle } from './PushToggle';
import '../field.css';

interface OutboxContextValue {
  items: OutboxItem[];
  /** Try sending now (after adding an item). */
  send: () => void;
}
const OutboxContext = createContext<OutboxContextValue>({ items: [], send: () => undefined });
export const useFieldOutbox = () => useContext(OutboxContext);

function Frame({ children, status, tools }: { children: ReactNode; status?: ReactNode; tools?: ReactNode }) {
  return (
    <div className="brink-field flex min-h-screen flex-col bg-paper text-lg text-ink">
      <SkipLink />
      <header className="bg-ink text-sheet">
        <div className="mx-auto flex max-w-3xl flex-wrap items-center gap-x-4 gap-y-1 px-4 py-2">
          <Link to="/field" className="flex min-h-12 items-center text-2xl font-bold text-sheet no-underline hover:text-sheet">
            Brink
          </Link>
          <span className="text-lg text-sheet/90">Phone view</span>
          {status}
        </div>
      </header>
      <main id="main" tabIndex={-1} className="mx-auto w-full max-w-3xl flex-1 px-4 py-5 focus:outline-none">
        {children}
      </main>
      <footer className="border-t border-rule bg-sheet">
        <div className="mx-auto max-w-3xl px-4 py-4 text-lg">
          {tools}
          <Caution className="!text-lg !text-ink" />
          <p className="mt-2">
            <Link to="/" className="inline-flex min-h-12 items-center">
              Open the full Brink pages
            </Link>
          </p>
        </div>
      </footer>
    </div>
  );
}

/** Signal and outbox, in words, in the header. */
function Connection({ waiting, refused }: { waiting: number; refused: number }) {
  const noSignal = useNoSignal();
  const person = useFieldPerson();
  return (
    <div className="ml-auto flex flex-col items-end text-lg leading-snug" role="status" aria-live="polite">
      <span className="font-semibold">
        {noSignal ? 'No signal' : 'Signal'}
        {person.fromPhone ? ' · saved copy' : ''}
      </span>
      {waiting ? <span>{waiting === 1 ? '1 item' : `${waiting} items`} waiting to send</span> : null}
      {refused ? <span className="font-semibold">{refused === 1 ? '1 item' : `${refused} items`} not accepted</span> : null}
    </div>
  );
}

/** Once the page has shown and the phone has a quiet moment, the map's code, unless already fetched (see LazyZoneMap.tsx). */
function usePreloadedMap() {
  useEffect(() => {
    const start = () => void preloadZoneMap().catch(() => undefined);
    if (typeof requestIdleCallback === 'function') {
      const id = requestIdleCallback(start, { timeout: 5000 });
      return () => cancelIdleCallback(id);
    }
    const id = setTimeout(start, 1000);
    return () => clearTimeout(id);
  }, []);
}

function Signed() {
  usePreloadedMap();
  const person = useFieldPerson();
  const items = useOutbox(person.id);
  const waiting = items.filter((i) => i.state === 'waiting').length;
  const refused = items.length - waiting;
  const send = useOutboxSender(person.id, waiting);
  return (
    <OutboxContext.Provider value={{ items, send }}>
      <Frame status={<Connection waiting={waiting} refused={refused} />} tools={<PushToggle />}>
        <Outlet />
      </Frame>
    </OutboxContext.Provider>
  );
}

/**
 * The phone view's frame: a dark bar with the name, signal and outbox in words, large type (18 px and
 * up), large touch targets, and the caution at the foot of every page.
 */
export function FieldLayout() {
  return (
    <FieldGate
      fallback={(message) => (
        <Frame>
          <p role="status">{message}</p>
        </Frame>
      )}
    >
      <Signed />
    </FieldGate>
  );
}
