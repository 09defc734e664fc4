import { useId, useMemo, useState, type ReactNode } from 'react';
import { Link, useParams } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import {
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type SortingState,
} from '@tanstack/react-table';
import {
  excavationStates,
  IMPORT_MODE_LABEL,
  importModeLabels,
  importModes,
  kindLabels,
  stateLabels,
  supportLabels,
  type Excavation,
  type ImportMode,
  type ImportReport,
  importAnswer,
} from '@shared/schemas/excavations';
import { Button } from '@client/components/Button';
import { Caution } from '@client/components/Caution';
import { FormSummary, SelectField } from '@client/components/Fields';
import { Page } from '@client/components/Page';
import { LoadError, Loading, Notice } from '@client/components/Status';
import { ApiError, errorMessage, sendForm } from '@client/lib/api';
import { excavationKeys, useExcavations } from '@client/lib/excavations';
import { useFigures } from '@client/lib/units';
import type { Figures } from '@shared/units';
import { fieldLabel } from '@client/lib/fieldLabels';
import { fieldSentence } from '@client/lib/sentences';
import { parseId, roleOnSite, useMe, useMySites } from '@client/lib/session';
import { registerCsv } from '../csv';
import { useInspectionStates } from '@client/lib/inspectionStates';
import { InspectionStateBadge } from '@client/components/InspectionStateBadge';
import type { InspectionState } from '@shared/schemas/inspections';
import { deviceTimeZone, formatSiteTime } from '@shared/time/shifts';

/** A register row with its inspection state this shift (open excavations only). */
type ExcavationWithInspection = Excavation & { inspection?: InspectionState };

/** A figure the excavation may not have (no width for a pit, no groundwater found) reads as a dash. */
const orDash = (v: number | null | undefined, show: (v: number) => string) => (v === null || v === undefined ? '—' : show(v));

/** The register's columns, figures in the person's units and times on the site's clock. */
const registerColumns = (figures: Figures, timeZone: string): ColumnDef<ExcavationWithInspection>[] => [
  { accessorKey: 'reference', header: 'Reference' },
  { accessorKey: 'name', header: 'Name' },
  { accessorKey: 'kind', header: 'Kind', cell: (c) => kindLabels[c.row.original.kind] },
  { accessorKey: 'state', header: 'State', cell: (c) => stateLabels[c.row.original.state], filterFn: 'equalsString' },
  {
    id: 'inspection',
    header: 'Inspection this shift',
    accessorFn: (e) => e.inspection ?? '',
    cell: (c) => {
      const state = c.row.original.inspection;
      return state ? <InspectionStateBadge state={state} /> : '—';
    },
  },
  { accessorKey: 'depth', header: 'Depth', cell: (c) => figures.length(c.row.original.depth), meta: { numeric: true } },
  {
    accessorKey: 'width',
    header: 'Width',
    cell: (c) => orDash(c.row.original.width, figures.length),
    meta: { numeric: true },
    sortUndefined: 'last',
  },
  { accessorKey: 'supportType', header: 'Support', cell: (c) => supportLabels[c.row.original.supportType], filterFn: 'equalsString' },
  {
    accessorKey: 'designSurcharge',
    header: 'Allowance',
    cell: (c) => figures.pressure(c.row.original.designSurcharge),
    meta: { numeric: true },
  },
  {
    accessorKey: 'ratedPressure',
    header: 'Rated pressure',
    cell: (c) => orDash(c.row.original.ratedPressure, figures.pressure),
    meta: { numeric: true },
  },
  {
    accessorKey: 'groundwaterDepth',
    header: 'Groundwater',
    cell: (c) => orDash(c.row.original.groundwaterDepth, figures.length),
    meta: { numeric: true },
  },
  { accessorKey: 'designReference', header: 'Design reference' },
  { accessorKey: 'updatedAt', header: 'Last changed', cell: (c) => formatSiteTime(c.row.original.updatedAt, timeZone) },
];

function download(name: string, text: string, type: string) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

const slug = (s: string) =>
  s
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-|-$/g, '') || 'site';

/**
 * The excavation register of a site: every excavation in a table to sort and filter, out as CSV or
 * GeoJSON, and in from GeoJSON (checked whole: one refused feature stops the import).
 */
export function RegisterPage() {
  const siteId = parseId(useParams().siteId)!;
  const me = useMe().data;
  const site = useMySites().data?.find((s) => s.id === siteId);
  const q = useExcavations(siteId);
  const inspections = useInspectionStates(siteId);
  const withInspection = useMemo<ExcavationWithInspection[]>(() => {
    const byId = new Map((inspections.data?.excavations ?? []).map((x) => [x.excavationId, x.state]));
    return (q.data ?? []).map((e) => ({ ...e, inspection: byId.get(e.id) }));
  }, [q.data, inspections.data]);
  const [sorting, setSorting] = useState<SortingState>([{ id: 'reference', desc: false }]);
  const [globalFilter, setGlobalFilter] = useState('');
  const [state, setState] = useState('');
  const [support, setSupport] = useState('');
  const filterId = useId();
  const role = me ? roleOnSite(me, siteId) : null;
  const canEdit = Boolean(me?.isAdmin || role === 'supervisor' || role === 'coordinator');

  const columnFilters = useMemo(
    () => [...(state ? [{ id: 'state', value: state }] : []), ...(support ? [{ id: 'supportType', value: support }] : [])],
    [state, support],
  );
  const figures = useFigures();
  const timeZone = site?.timezone ?? deviceTimeZone();
  const columns = useMemo(() => registerColumns(figures, timeZone), [figures, timeZone]);
  const table = useReactTable({
    data: withInspection,
    columns,
    state: { sorting, globalFilter, columnFilters },
    onSortingChange: setSorting,
    onGlobalFilterChange: setGlobalFilter,
    globalFilterFn: 'includesString',
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });

  if (q.isPending || !site) return <Loading what="Loading the register" />;
  if (q.isError) return <LoadError error={q.error} retry={() => q.refetch()} />;
  const rows = table.getRowModel().rows;

  return (
    <Page
      title="Excavation register"
      documentTitle={`Register: ${site.name}`}
      intro={`${site.name}: every trench and pit, with its support and ground. Click a reference to see it on the map.`}
      actions={
        <>
          <Button
            variant="secondary"
            onClick={() =>
              download(
                `${slug(site.name)}-excavation-register.csv`,
                registerCsv(
                  rows.map((r) => r.original),
                  figures,
                ),
                'text/csv;charset=utf-8',
              )
            }
          >
            Download CSV ({rows.length})
          </Button>
          <a
            className="inline-flex min-h-11 items-center rounded-md border border-accent bg-sheet px-4 font-semibold text-accent no-underline hover:bg-accent-wash"
            href={`/api/sites/${siteId}/excavations.geojson`}
            download
          >
            Download GeoJSON (all)
          </a>
        </>
      }
    >
      <div className="flex flex-wrap items-end gap-4" role="search" aria-label="Filter the register">
        <div className="flex flex-col gap-1">
          <label htmlFor={filterId} className="font-semibold">
            Find
          </label>
          <input
            id={filterId}
            type="search"
            className="min-h-11 rounded-md border border-rule-strong bg-sheet px-3"
            placeholder="Reference, name, design reference…"
            value={globalFilter}
            onChange={(e) => setGlobalFilter(e.target.value)}
          />
        </div>
        <SelectField
          label="State"
          emptyLabel="Any state"
          options={excavationStates.map((s) => ({ value: s, label: stateLabels[s] }))}
          value={state}
          onChange={(e) => setState(e.target.value)}
        />
        <SelectField
          label="Support"
          emptyLabel="Any support"
          options={Object.entries(supportLabels).map(([value, label]) => ({ value, label }))}
          value={support}
          onChange={(e) => setSupport(e.target.value)}
        />
        <p className="pb-2 text-ink-soft" role="status">
          {rows.length} of {q.data.length} shown
        </p>
      </div>

      <div className="overflow-x-auto rounded-md border border-rule bg-sheet">
        <table className="min-w-full text-sm">
          <thead className="border-b border-rule-strong">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sorted = h.column.getIsSorted();
                  const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none'}
                      className={`px-3 py-2 ${numeric ? 'text-right' : 'text-left'}`}
                    >
                      <button
                        type="button"
                        className="inline-flex min-h-9 items-center gap-1 font-semibold"
                        onClick={h.column.getToggleSortingHandler()}
                      >
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        <span aria-hidden="true" className="text-ink-soft">
                          {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                        </span>
                      </button>
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} className="border-b border-rule last:border-0">
                {r.getVisibleCells().map((c) => {
                  const numeric = (c.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                  return (
                    <td key={c.id} className={`px-3 py-2 ${numeric ? 'text-right tabular-nums' : ''}`}>
                      {c.column.id === 'reference' ? (
                        <>
                          <Link to={`/sites/${siteId}/map?excavation=${r.original.id}`}>{r.original.reference}</Link>
                          {role === 'supervisor' && r.original.state === 'open' ? (
                            <Link
                              className="ml-2 whitespace-nowrap text-sm"
                              to={`/sites/${siteId}/permits/new?excavation=${r.original.id}`}
                              aria-label={`Ask for a permit beside ${r.original.reference}`}
                            >
                              Ask for a permit
                            </Link>
                          ) : null}
                        </>
                      ) : (
                        flexRender(c.column.columnDef.cell, c.getContext())
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
            {rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length} className="px-3 py-4 text-ink-soft">
                  {q.data.length
                    ? 'No excavation matches these filters.'
                    : 'No excavations yet. Draw them on the site map, or import a GeoJSON file.'}
                </td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
      <Caution />
      {canEdit ? <ImportPanel siteId={siteId} /> : null}
    </Page>
  );
}

const modeLabels = importModeLabels;

function ImportPanel({ siteId }: { siteId: number }) {
  const qc = useQueryClient();
  const fileId = useId();
  const [file, setFile] = useState<File | null>(null);
  const [mode, setMode] = useState<ImportMode>('add');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [report, setReport] = useState<{ ok: boolean; report: ImportReport } | null>(null);

  const run = async () => {
    if (!file) return;
    setBusy(true);
    setError(null);
    setReport(null);
    try {
      const form = new FormData();
      form.append('mode', mode);
      form.append('file', file);
      const r = await sendForm<typeof importAnswer>(`/api/sites/${siteId}/excavations/import`, form);
      setReport({ ok: true, report: r.report });
      await qc.invalidateQueries({ queryKey: excavationKeys.site(siteId) });
    } catch (e) {
      // A refused import answers its report beside the error: which features, and why.
      const refused = e instanceof ApiError ? importAnswer.safeParse(e.body) : null;
      if (refused?.success) setReport({ ok: false, report: refused.data.report });
      const fileReason = e instanceof ApiError ? e.fields.file : undefined;
      setError(errorMessage(e) + (fileReason ? ` The file ${fileReason}.` : ''));
    } finally {
      setBusy(false);
    }
  };

  return (
    <section className="flex flex-col gap-3 rounded-lg border border-rule bg-sheet p-5" aria-labelledby={`${fileId}-h`}>
      <h2 id={`${fileId}-h`} className="text-xl font-bold">
        Import from GeoJSON
      </h2>
      <p className="max-w-prose text-ink-soft">
        A FeatureCollection in WGS84 like the one this page downloads: a LineString per trench (its centre line, with a width), a Polygon
        per pit, and the register’s fields as properties. Every feature is checked; if any is refused, nothing is imported and the report
        says why.
      </p>
      <div className="flex flex-col gap-1">
        <label htmlFor={fileId} className="font-semibold">
          GeoJSON file
        </label>
        <input
          id={fileId}
          type="file"
          accept=".geojson,.json,application/geo+json,application/json"
          onChange={(e) => setFile(e.target.files?.[0] ?? null)}
        />
      </div>
      <SelectField
        label={IMPORT_MODE_LABEL}
        options={importModes.map((m) => ({ value: m, label: modeLabels[m] }))}
        value={mode}
        onChange={(e) => setMode(e.target.value as ImportMode)}
      />
      <div>
        <Button onClick={run} disabled={!file} busy={busy} busyText="Importing…">
          Import
        </Button>
      </div>
      <FormSummary message={error} />
      {report ? <ImportReportView {...report} /> : null}
    </section>
  );
}

function ImportReportView({ ok, report }: { ok: boolean; report: ImportReport }) {
  return (
    <div className="flex flex-col gap-3" aria-label="Import report">
      {ok ? <Notice>{`Imported ${report.imported.length} excavation${report.imported.length === 1 ? '' : 's'}.`}</Notice> : null}
      <ReportTable
        caption="Imported"
        last="Done"
        rows={report.imported.map((i) => ({
          index: i.index,
          reference: i.reference,
          detail: i.action === 'created' ? 'Added' : 'Replaced',
        }))}
      />
      <ReportTable
        caption="Refused (nothing was imported)"
        refused
        last="Why"
        rows={report.refused.map((r) => ({
          index: r.index,
          reference: r.reference,
          detail: (
            <ul>
              {Object.entries(r.reasons).map(([k, v]) => (
                <li key={k}>{fieldSentence(fieldLabel(k), v)}</li>
              ))}
            </ul>
          ),
        }))}
      />
    </div>
  );
}

function ReportTable({
  caption,
  last,
  rows,
  refused = false,
}: {
  caption: string;
  last: string;
  refused?: boolean;
  rows: { index: number; reference: string | null; detail: ReactNode }[];
}) {
  if (rows.length === 0) return null;
  return (
    <table className="text-sm">
      <caption className={`text-left font-semibold ${refused ? 'text-error-text' : ''}`}>{caption}</caption>
      <thead>
        <tr>
          <th scope="col" className="pr-4 text-left">
            Feature
          </th>
          <th scope="col" className="pr-4 text-left">
            Reference
          </th>
          <th scope="col" className="text-left">
            {last}
          </th>
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.index} className="align-top">
            <td className="pr-4">{r.index + 1}</td>
            <td className="pr-4">{r.reference ?? '—'}</td>
            <td>{r.detail}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
