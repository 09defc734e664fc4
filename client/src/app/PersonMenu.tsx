import { useEffect, useId, useRef, useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { roleLabels } from '@shared/schemas/common';
import { Button } from '@client/components/Button';
import { useMailCatcherOn } from '@client/features/admin';
import { useSignOut } from '@client/features/auth';
import { useMe } from '@client/lib/session';
import { UnitsSettings } from './UnitsSettings';

/** Who is signed in, their roles, the caught-mail page on local set-ups, and signing out. */
export function PersonLinks({ onDone }: { onDone?: () => void }) {
  const me = useMe().data;
  const signOut = useSignOut();
  const navigate = useNavigate();
  const mailOn = useMailCatcherOn(Boolean(me?.isAdmin));
  if (!me) return null;
  return (
    <div className="flex flex-col gap-3">
      <div>
        <p className="font-semibold">{me.name}</p>
        <p className="break-all text-sm text-ink-soft">{me.email}</p>
        <p className="text-sm">
          <span className="text-ink-soft">Organisation: </span>
          {me.organisation.name}
        </p>
      </div>
      <ul className="flex flex-col gap-1 text-sm">
        {me.isAdmin ? <li>Administrator</li> : null}
        {me.memberships.map((m) => (
          <li key={m.siteId}>
            {roleLabels[m.role]}, {m.siteName}
            {m.canInspect ? ' (inspects)' : ''}
          </li>
        ))}
      </ul>
      <UnitsSettings />
      {mailOn ? (
        <Link to="/admin/mail" onClick={onDone} className="flex min-h-11 items-center">
          Caught mail
        </Link>
      ) : null}
      <Button
        variant="secondary"
        busy={signOut.isPending}
        busyText="Signing out…"
        onClick={() => signOut.mutate(undefined, { onSettled: () => void navigate('/sign-in', { replace: true }) })}
      >
        Sign out
      </Button>
    </div>
  );
}

/** The person's menu on wide screens: their name opens it. */
export function PersonMenu() {
  const me = useMe().data;
  const [open, setOpen] = useState(false);
  const panelId = useId();
  const root = useRef<HTMLDivElement>(null);

  useEffect(() => {
    if (!open) return;
    const close = (e: MouseEvent | KeyboardEvent) => {
      if (e instanceof KeyboardEvent ? e.key === 'Escape' : !root.current?.contains(e.target as Node)) setOpen(false);
    };
    document.addEventListener('mousedown', close);
    document.addEventListener('keydown', close);
    return () => {
      document.removeEventListener('mousedown', close);
      document.removeEventListener('keydown', close);
    };
  }, [open]);

  if (!me) return null;
  return (
    <div ref={root} className="relative">
      <Button variant="quiet" aria-expanded={open} aria-controls={panelId} onClick={() => setOpen((o) => !o)} className="max-w-56">
        <span className="flex min-w-0 flex-col items-start leading-tight">
          <span className="max-w-full truncate">
            <span className="sr-only">Signed in as </span>
            {me.name}
          </span>
          <span className="max-w-full truncate text-xs font-normal text-ink-soft">
            <span className="sr-only">, of </span>
            {me.organisation.name}
          </span>
        </span>
        <span aria-hidden="true">▾</span>
      </Button>
      <div id={panelId} hidden={!open} className="absolute right-0 z-[1100] mt-2 w-72 rounded-lg border border-rule bg-sheet p-4 shadow-lg">
        <PersonLinks onDone={() => setOpen(false)} />
      </div>
    </div>
  );
}
