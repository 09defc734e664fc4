import { useId } from 'react';
import { siteRoleSchema, type SiteRole } from '@shared/schemas/common';
import type { Person, Site } from '@shared/schemas/sites';
import { Button } from '@client/components/Button';
import { ConfirmAction } from '@client/components/ConfirmAction';
import { FormSummary } from '@client/components/Fields';
import { errorMessage } from '@client/lib/api';
import { useRemoveMembership, useSetMembership, useUpdatePerson } from '../api/people';
import { AddMembershipForm } from './AddMembershipForm';
import { roleOptions } from './InviteForm';

interface PersonCardProps {
  person: Person;
  sites: readonly Site[];
  /** The administrator looking at the list; they cannot deactivate or demote themselves here. */
  isMe: boolean;
}

function Tag({ children }: { children: string }) {
  return <span className="rounded-full border border-rule-strong px-3 py-0.5 text-sm font-semibold">{children}</span>;
}

export function PersonCard({ person, sites, isMe }: PersonCardProps) {
  const update = useUpdatePerson(person.id);
  const setMembership = useSetMembership(person.id);
  const removeMembership = useRemoveMembership(person.id);
  const failed = [update, setMembership, removeMembership].find((m) => m.isError);
  const headingId = `person-${person.id}`;

  return (
    <article
      aria-labelledby={headingId}
      className={`rounded-lg border border-rule bg-sheet p-5 shadow-sm ${person.active ? '' : 'border-dashed border-rule-strong'}`}
    >
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <h3 id={headingId} className="text-lg font-bold">
            {person.name}
            {isMe ? <span className="font-normal text-ink-soft"> (you)</span> : null}
          </h3>
          <p className="break-all text-ink-soft">{person.email}</p>
        </div>
        <div className="flex flex-wrap gap-2">
          {person.isAdmin ? <Tag>Administrator</Tag> : null}
          {person.active ? null : <Tag>Deactivated</Tag>}
        </div>
      </div>

      <div className="mt-3">
        <FormSummary message={failed ? errorMessage(failed.error) : null} />
      </div>

      <h4 className="mt-4 font-semibold">Sites and roles</h4>
      {person.memberships.length === 0 ? (
        <p className="text-ink-soft">Not on any site.</p>
      ) : (
        <ul className="mt-2 flex flex-col divide-y divide-rule">
          {person.memberships.map((m) => (
            <MembershipRow
              key={m.siteId}
              personName={person.name}
              membership={m}
              busy={setMembership.isPending || removeMembership.isPending}
              onChange={(role, canInspect) => setMembership.mutate({ siteId: m.siteId, role, canInspect })}
              onRemove={() => removeMembership.mutateAsync(m.siteId).catch(() => undefined)}
            />
          ))}
        </ul>
      )}

      <AddMembershipForm
        person={person}
        sites={sites.filter((s) => !person.memberships.some((m) => m.siteId === s.id))}
        onAdd={(values) => setMembership.mutateAsync(values)}
      />

      {isMe ? null : (
        <div className="mt-5 flex flex-wrap gap-3 border-t border-rule pt-4">
          {person.active ? (
            <ConfirmAction
              label="Deactivate…"
              ariaLabel={`Deactivate ${person.name}`}
              question={`Deactivate ${person.name}? They are signed out and can no longer sign in. Their records stay.`}
              confirmLabel="Yes, deactivate"
              cancelLabel="Keep active"
              busy={update.isPending}
              onConfirm={() => update.mutateAsync({ active: false }).catch(() => undefined)}
            />
          ) : (
            <Button variant="secondary" busy={update.isPending} busyText="Reactivating…" onClick={() => update.mutate({ active: true })}>
              Reactivate
            </Button>
          )}
          <ConfirmAction
            variant="quiet"
            label={person.isAdmin ? 'Remove administrator…' : 'Make administrator…'}
            ariaLabel={person.isAdmin ? `Remove administrator rights from ${person.name}` : `Make ${person.name} an administrator`}
            question={
              person.isAdmin
                ? `Take ${person.name}'s administrator rights away? Their roles on sites stay.`
                : `Make ${person.name} an administrator? They will manage people, invitations and every site.`
            }
            confirmLabel={person.isAdmin ? 'Yes, remove' : 'Yes, make administrator'}
            busy={update.isPending}
            onConfirm={() => update.mutateAsync({ isAdmin: !person.isAdmin }).catch(() => undefined)}
          />
        </div>
      )}
    </article>
  );
}

interface MembershipRowProps {
  personName: string;
  membership: Person['memberships'][number];
  busy: boolean;
  onChange: (role: SiteRole, canInspect: boolean) => void;
  onRemove: () => Promise<unknown>;
}

function MembershipRow({ personName, membership: m, busy, onChange, onRemove }: MembershipRowProps) {
  const roleId = useId();
  return (
    <li className="flex flex-wrap items-center gap-x-4 gap-y-2 py-3">
      <span className="min-w-40 flex-1 font-semibold">{m.siteName}</span>
      <label htmlFor={roleId} className="sr-only">
        Role of {personName} on {m.siteName}
      </label>
      <select
        id={roleId}
        className="min-h-11 rounded-md border border-rule-strong bg-sheet px-3"
        value={m.role}
        disabled={busy}
        onChange={(e) => onChange(siteRoleSchema.parse(e.target.value), m.canInspect)}
      >
        {roleOptions.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <label className="flex min-h-11 items-center gap-2">
        <input
          type="checkbox"
          className="size-6 accent-accent"
          checked={m.canInspect}
          disabled={busy}
          onChange={(e) => onChange(m.role, e.target.checked)}
        />
        Inspects excavations
      </label>
      <ConfirmAction
        variant="quiet"
        label="Take off site…"
        ariaLabel={`Take ${personName} off ${m.siteName}`}
        question={`Take ${personName} off ${m.siteName}? They lose their role there and no longer see the site.`}
        confirmLabel="Yes, take off"
        busy={busy}
        onConfirm={onRemove}
      />
    </li>
  );
}
