import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import type { historyAnswer } from '@shared/schemas/excavations';
import { formatSiteTime } from '@shared/time/shifts';
import { api } from '@client/lib/api';
import { excavationKeys } from '@client/lib/excavations';
import { historyPath } from '../api/excavations';

const actionLabels: Record<string, string> = {
  created: 'Added',
  imported: 'Imported',
  updated: 'Changed',
  'depth-or-support-changed': 'Depth or support changed',
  'import-replaced': 'Replaced by an import',
  'drawing-attached': 'Drawing attached',
  'drawing-removed': 'Drawing removed',
};

const show = (v: unknown) => (v === null || v === undefined || v === '' ? 'none' : typeof v === 'object' ? 'changed' : String(v));

/** Who changed this excavation and when (on the site's clock), newest first. */
export function ExcavationHistory({ siteId, id, version, timeZone }: { siteId: number; id: number; version: number; timeZone: string }) {
  const q = useQuery({
    queryKey: [...excavationKeys.history(siteId, id), version],
    queryFn: ({ signal }) => api.get<z.output<typeof historyAnswer>>(historyPath(siteId, id), signal).then((r) => r.entries),
  });
  if (!q.data?.length) return null;
  return (
    <details className="rounded-md border border-rule px-3 py-2">
      <summary className="cursor-pointer font-semibold">History ({q.data.length})</summary>
      <ol className="mt-2 flex flex-col gap-2 text-sm">
        {q.data.map((h) => (
          <li key={h.id}>
            <span className="font-semibold">{actionLabels[h.action] ?? h.action}</span> by {h.by}, {formatSiteTime(h.at, timeZone)}
            {h.changes ? (
              <ul className="ml-4 list-disc text-ink-soft">
                {Object.entries(h.changes).map(([k, c]) => (
                  <li key={k}>
                    {k}: {show(c.from)} → {show(c.to)}
                  </li>
                ))}
              </ul>
            ) : null}
          </li>
        ))}
      </ol>
    </details>
  );
}
