import type { ReactNode } from 'react';
import { Panel } from '@client/components/Page';

/** One role's part of the dashboard: its heading, then its panels side by side on wide screens. */
export function RoleSection({ title, intro, children }: { title: string; intro: string; children: ReactNode }) {
  const id = `role-${title.toLowerCase().replace(/[^a-z]+/g, '-')}`;
  return (
    <section aria-labelledby={id} className="flex flex-col gap-4">
      <div>
        <h2 id={id} className="text-2xl font-bold">
          {title}
        </h2>
        <p className="text-ink-soft">{intro}</p>
      </div>
      <div className="grid gap-4 md:grid-cols-2">{children}</div>
    </section>
  );
}

/** A panel whose list arrives with a later part of Brink; it says so rather than claiming "none". */
export function ComingPanel({ title, lists }: { title: string; lists: string }) {
  return (
    <Panel title={title} level={3}>
      <p>
        {lists} <span className="text-ink-soft">This list is not yet connected.</span>
      </p>
    </Panel>
  );
}
