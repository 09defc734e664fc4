import { createContext, useContext, useEffect, useState, type ReactNode } from 'react';
import { Navigate, useLocation } from 'react-router-dom';
import { isApiError } from '@client/lib/api';
import { useMe } from '@client/lib/session';
import { forgetPersonalCopies } from '../offline/serviceWorker';
import { savedPerson, savePerson, type SavedPerson } from '../offline/store';

interface FieldPerson extends SavedPerson {
  /** True when the server could not be asked and the person comes from this phone's copy. */
  fromPhone: boolean;
}

const PersonContext = createContext<FieldPerson | null>(null);

export function useFieldPerson(): FieldPerson {
  const p = useContext(PersonContext);
  if (!p) throw new Error('useFieldPerson outside FieldGate');
  return p;
}

/**
 * Who is using the field view. With signal: the signed-in person (kept on the phone). With no signal:
 * the person last signed in on this phone, so their permits still open. Signed out: the sign-in page,
 * and the phone forgets the last person's copies (their outbox stays, to be sent when they sign in).
 */
const SLOW_SIGNAL_MS = 4000;

export function FieldGate({ children, fallback }: { children: ReactNode; fallback: (message: string) => ReactNode }) {
  const me = useMe();
  const location = useLocation();
  const [saved, setSaved] = useState<SavedPerson | null | undefined>(undefined);
  // With one bar of signal the question "who is signed in?" can hang for minutes: after a few
  // seconds the person saved on this phone is used, and the answer still replaces it when it comes.
  const [slow, setSlow] = useState(false);
  useEffect(() => {
    if (!me.isPending) return;
    const timer = setTimeout(() => setSlow(true), SLOW_SIGNAL_MS);
    return () => clearTimeout(timer);
  }, [me.isPending]);

  useEffect(() => {
    savedPerson()
      .then(setSaved)
      .catch(() => setSaved(null));
  }, []);

  useEffect(() => {
    const person = me.data;
    if (person) {
      const another = saved && saved.id !== person.id;
      void (async () => {
        if (another) await forgetPersonalCopies();
        await savePerson(person);
      })().catch(() => undefined);
    } else if (person === null) {
      void forgetPersonalCopies();
    }
  }, [me.data, saved]);

  if (me.data)
    return (
      <PersonContext.Provider
        value={{ id: me.data.id, name: me.data.name, email: me.data.email, organisationName: me.data.organisation.name, fromPhone: false }}
      >
        {children}
      </PersonContext.Provider>
    );
  if (me.data === null) {
    const here = location.pathname + location.search;
    return <Navigate to={`/sign-in?next=${encodeURIComponent(here)}`} replace />;
  }
  const noSignal =
    (me.isError && !isApiError(me.error, 401)) || (me.isPending && (slow || (typeof navigator !== 'undefined' && !navigator.onLine)));
  if (noSignal && saved) return <PersonContext.Provider value={{ ...saved, fromPhone: true }}>{children}</PersonContext.Provider>;
  if (me.isError && saved === null) {
    return fallback(
      'There is no signal, and this phone has no saved copy yet. Open Brink once with signal and sign in; your permits are then kept here.',
    );
  }
  return fallback('Checking who is signed in…');
}
