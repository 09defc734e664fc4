import { useId, useState } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import {
  permitSearchMax,
  permitSorts,
  permitStatuses,
  permitViewLabels,
  permitViews,
  statusLabels,
  verdictOf,
  type PermitView,
} from '@shared/schemas/permits';
import { Button, ButtonLink, ShowMore } from '@client/components/Button';
import { SelectField, TextField } from '@client/components/Fields';
import { Page } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { parseId, roleOnSite, useMe } from '@client/lib/session';
import { useUrlSearch } from '@client/lib/urlSearch';
import { useExcavations, usePermitPages, useSite } from '../api/permits';
import { StatusLabel } from '../components/StatusLabel';
import { VerdictBadge } from '../components/Verdict';
import { fromLocalInput, when } from '../components/time';

const sortLabels: Record<(typeof permitSorts)[number], string> = {
  updated: 'Last changed',
  number: 'Number',
  windowStart: 'Window opens',
  windowEnd: 'Window closes',
  status: 'Status',
};

/** The site's permits: awaiting my review, my requests, live now, all; searched, filtered and sorted. */
export function PermitListPage() {
  const siteId = parseId(useParams().siteId) ?? 0;
  const me = useMe();
  const timeZone = useSite(siteId).data?.timezone;
  const role = me.data ? roleOnSite(me.data, siteId) : null;
  const [params] = useSearchParams();
  const view = (params.get('view') as PermitView) ?? (role === 'coordinator' ? 'review' : role === 'supervisor' ? 'mine' : 'all');
  const { q, search, setSearch } = useUrlSearch();
  const [status, setStatus] = useState('');
  const [excavationId, setExcavationId] = useState('');
  const [from, setFrom] = useState('');
  const [to, setTo] = useState('');
  const [sort, setSort] = useState<(typeof permitSorts)[number]>('updated');
  const [order, setOrder] = useState<'asc' | 'desc'>('desc');
  // On a phone the filters fold behind one button that says how many are on; wider, they all show.
  const [unfolded, setUnfolded] = useState(false);
  const filtersId = useId();
  const activeFilters = [status, excavationId, from, to].filter(Boolean).length;
  const excavations = useExcavations(siteId);
  const list = usePermitPages({
    siteId: String(siteId),
    view,
    q,
    status,
    excavationId,
    from: from ? fromLocalInput(from) : '',
    to: to ? fromLocalInput(to) : '',
    sort,
    order,
  });

  return (
    <Page
      title="Permits"
      intro="Every request to place a load beside an excavation or to dig, and where each stands."
      actions={
        role === 'supervisor' ? (
          <ButtonLink to={`/sites/${siteId}/permits/new`} variant="primary">
            Ask for a permit
          </ButtonLink>
        ) : null
      }
    >
      <nav aria-label="Permit lists" className="flex flex-wrap gap-2">
        {permitViews.map((v) => (
          <Link
            key={v}
            to={`?${new URLSearchParams({ view: v, ...(q ? { q } : {}) }).toString()}`}
            aria-current={v === view ? 'page' : undefined}
            className={`rounded-md px-3 py-2 font-semibold ${v === view ? 'bg-accent text-white no-underline' : ''}`}
          >
            {permitViewLabels[v]}
          </Link>
        ))}
      </nav>
      <form className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6" aria-label="Filters" onSubmit={(e) => e.preventDefault()}>
        <div className="sm:col-span-3 lg:col-span-6">
          <TextField
            label="Search"
            hint="A permit's reference, its work, an excavation it names or a machine on it."
            type="search"
            maxLength={permitSearchMax}
            value={search}
            onChange={(e) => setSearch(e.target.value)}
          />
        </div>
        <div className="sm:hidden">
          <Button
            variant="secondary"
            className="w-full"
            aria-expanded={unfolded}
            aria-controls={filtersId}
            onClick={() => setUnfolded((u) => !u)}
            data-testid="filters-toggle"
          >
            {unfolded ? 'Hide the filters' : 'Filters'}
            {activeFilters ? ` (${activeFilters} on)` : ''}
          </Button>
        </div>
        <div id={filtersId} className={unfolded ? 'contents' : 'hidden sm:contents'}>
          <SelectField
            label="Status"
            value={status}
            onChange={(e) => setStatus(e.target.value)}
            emptyLabel="Any"
            options={permitStatuses.map((s) => ({ value: s, label: statusLabels[s] }))}
          />
          <SelectField
            label="Excavation"
            value={excavationId}
            onChange={(e) => setExcavationId(e.target.value)}
            emptyLabel="Any"
            options={(excavations.data ?? []).map((e) => ({ value: e.id, label: e.reference }))}
          />
          <TextField label="Window from" type="datetime-local" value={from} onChange={(e) => setFrom(e.target.value)} />
          <TextField label="Window to" type="datetime-local" value={to} onChange={(e) => setTo(e.target.value)} />
          <SelectField
            label="Sort by"
            value={sort}
            onChange={(e) => setSort(e.target.value as typeof sort)}
            options={permitSorts.map((s) => ({ value: s, label: sortLabels[s] }))}
          />
          <SelectField
            label="Order"
            value={order}
            onChange={(e) => setOrder(e.target.value as typeof order)}
            options={[
              { value: 'desc', label: 'Newest / highest first' },
              { value: 'asc', label: 'Oldest / lowest first' },
            ]}
          />
        </div>
      </form>
      {list.isPending ? (
        <Loading what="Loading permits" />
      ) : list.isError ? (
        <LoadError error={list.error} retry={() => list.refetch()} />
      ) : list.data.length === 0 ? (
        <p>{q ? `No permits match “${q}”.` : 'No permits match.'}</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full border-collapse text-left">
            <thead>
              <tr className="border-b border-rule-strong">
                <th className="p-2">Permit</th>
                <th className="p-2">Status</th>
                <th className="p-2">Work</th>
                <th className="p-2">Window</th>
                <th className="p-2">Check</th>
                <th className="p-2">Requested by</th>
              </tr>
            </thead>
            <tbody>
              {list.data.map((p) => (
                <tr key={p.id} className="border-b border-rule">
                  <td className="p-2">
                    <Link to={`/permits/${p.id}`}>{p.number}</Link>
                    {p.revision > 1 ? ` (rev. ${p.revision})` : ''}
                  </td>
                  <td className="p-2">
                    <StatusLabel status={p.status} />
                  </td>
                  <td className="p-2">
                    {p.kind === 'dig' ? 'Dig: ' : ''}
                    {p.description}
                  </td>
                  <td className="p-2">
                    {when(p.windowStart, timeZone)} – {when(p.windowEnd, timeZone)}
                  </td>
                  <td className="p-2">
                    {p.passes === null ? '—' : <VerdictBadge verdict={verdictOf(p.utilisation, p.passes)} utilisation={p.utilisation} />}
                  </td>
                  <td className="p-2">{p.requestedBy.name}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <ShowMore pages={list} className="mt-3" label="Show more permits" busyText="Loading more permits…" />
        </div>
      )}
    </Page>
  );
}
