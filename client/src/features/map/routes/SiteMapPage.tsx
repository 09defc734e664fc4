import { lazy, Suspense, useCallback, useEffect, useMemo, useRef, useState, type ReactNode } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import type L from 'leaflet';
import type { GeoJsonObject } from 'geojson';
import { excavationOutline, GeometryError, influenceZone, localProjection, type ExcavationShape } from '@shared/geometry';
import {
  designFields,
  stateLabels,
  supportLabels,
  type Excavation,
  type ExcavationGeometry,
  type ExcavationKind,
  type ExcavationState,
} from '@shared/schemas/excavations';
import { Button, ButtonLink } from '@client/components/Button';
import { useDocumentTitle } from '@client/components/Page';
import { LoadError, Loading, Notice } from '@client/components/Status';
import { useExcavations, useSitePlan } from '@client/lib/excavations';
import { useFigures } from '@client/lib/units';
import { parseId, roleOnSite, useMe, useMySites } from '@client/lib/session';
import { useInspectionStates } from '@client/lib/inspectionStates';
import { InspectionStateBadge } from '@client/components/InspectionStateBadge';
import type { InspectionState } from '@shared/schemas/inspections';
import { useDeleteExcavation, useDrawing, useSaveExcavation } from '../api/excavations';
import type { DrawShape } from '../components/DrawTools';
import { finishDrawing } from '../components/finishDrawing';
import { ExcavationForm } from '../components/ExcavationForm';
import { newValues, valuesOf, type ExcavationFormValues } from '../components/excavationFormValues';
import { ExcavationHistory } from '../components/ExcavationHistory';
import { legendItems } from '../components/mapStyles';
import { PlanControls } from '../components/PlanControls';
import { SiteMap } from '../components/SiteMap';

// The drawing tools (leaflet-geoman) load when someone first draws or edits a shape, not with the map.
const DrawTools = lazy(async () => ({ default: (await import('../components/DrawTools')).DrawTools }));

type Preview = {
  kind: ExcavationKind;
  geometry: ExcavationGeometry | null;
  width: number | null;
  depth: number | null;
  state: ExcavationState;
};

/** The outline and (for an open excavation with a depth) the influence zone of a shape not yet saved. */
function previewShapes(
  p: Preview | null,
  origin: { latitude: number; longitude: number },
): { outline: GeoJsonObject | null; zone: GeoJsonObject | null } | null {
  if (!p?.geometry) return null;
  const proj = localProjection([origin.longitude, origin.latitude]);
  const shape: ExcavationShape | null =
    p.kind === 'trench' && p.geometry.type === 'LineString'
      ? p.width && p.width > 0
        ? { kind: 'trench', centreLine: p.geometry, width: p.width }
        : null
      : p.geometry.type === 'Polygon'
        ? { kind: 'pit', outline: p.geometry }
        : null;
  if (!shape) return { outline: p.geometry, zone: null };
  try {
    const prepared = excavationOutline(shape, proj);
    const ring = prepared.ring.map((q) => proj.toWgs84(q));
    const outline = { type: 'Polygon', coordinates: [[...ring, ring[0]]] } as GeoJsonObject;
    const zone = p.state === 'open' && p.depth && p.depth > 0 ? (influenceZone(prepared, p.depth, proj) as GeoJsonObject) : null;
    return { outline, zone };
  } catch (e) {
    if (e instanceof GeometryError) return { outline: p.geometry, zone: null };
    throw e;
  }
}

interface Editing {
  /** The saved excavation being viewed or changed, or null for a new one. */
  excavation: Excavation | null;
  initial: ExcavationFormValues;
  soilFrom: string | null;
  geometry: ExcavationGeometry;
  /** A new key starts a new vertex edit on the map. */
  shapeKey: string | null;
  formKey: string;
}

/**
 * The site map: every excavation of the site by state, influence zones of the open ones, and a panel
 * to draw, describe and change them. Works with no internet (metric grid base), or on map tiles when
 * the server is given a tile address.
 */
const drawingHint = (shape: DrawShape) =>
  shape === 'trench'
    ? 'Click the map at each point of the trench’s centre line, then press Finish.'
    : 'Click the map at each corner of the pit, then press Finish.';

export function SiteMapPage() {
  const siteId = parseId(useParams().siteId)!;
  const [search, setSearch] = useSearchParams();
  const me = useMe().data;
  const site = useMySites().data?.find((s) => s.id === siteId);
  useDocumentTitle(site ? `Site map: ${site.name}` : 'Site map');
  const excavations = useExcavations(siteId);
  const plan = useSitePlan(siteId);
  const save = useSaveExcavation(siteId);
  const del = useDeleteExcavation(siteId);
  const drawingFile = useDrawing(siteId);
  const mapRef = useRef<L.Map | null>(null);

  const role = me ? roleOnSite(me, siteId) : null;
  const canEdit = Boolean(me?.isAdmin || role === 'supervisor' || role === 'coordinator');
  // The support's design data is the coordinator's; registering an excavation sets it, so drawing a new one is theirs too.
  const canEditDesign = Boolean(me?.isAdmin || role === 'coordinator');
  // Supervisors ask for permits: from an open excavation, the request names it.
  const askPermit = role === 'supervisor';
  const [drawing, setDrawing] = useState<DrawShape | null>(null);
  const [toolsReady, setToolsReady] = useState(false);
  const [editing, setEditing] = useState<Editing | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [opacity, setOpacity] = useState<number | null>(null);
  const [focus, setFocus] = useState<{ key: string; bounds: [[number, number], [number, number]] } | null>(null);
  const showOnMap = (e: Excavation) => setFocus({ key: `${e.id}-${Date.now()}`, bounds: boundsOf(e) });
  const list = useMemo(() => excavations.data ?? [], [excavations.data]);
  const inspections = useInspectionStates(siteId);
  const inspectionById = useMemo(
    () => Object.fromEntries((inspections.data?.excavations ?? []).map((x) => [x.excavationId, x.state])),
    [inspections.data],
  );

  const open = useCallback((e: Excavation) => {
    setDrawing(null);
    setNotice(null);
    setEditing({
      excavation: e,
      initial: valuesOf(e),
      soilFrom: null,
      geometry: e.geometry,
      shapeKey: null,
      formKey: `${e.id}-${e.version}`,
    });
  }, []);

  // /sites/1/map?excavation=5 opens that excavation (links from the register).
  const wanted = parseId(search.get('excavation') ?? undefined);
  useEffect(() => {
    if (!wanted || editing) return;
    const e = list.find((x) => x.id === wanted);
    if (e) {
      open(e);
      setFocus({ key: `${e.id}`, bounds: boundsOf(e) });
    }
  }, [wanted, list, editing, open]);

  const close = () => {
    setEditing(null);
    setPreview(null);
    if (search.has('excavation')) setSearch({}, { replace: true });
  };

  const startDrawing = (shape: DrawShape) => {
    setEditing(null);
    setPreview(null);
    setNotice(toolsReady ? drawingHint(shape) : 'Loading the drawing tools…');
    setDrawing(shape);
  };

  const onDrawn = useCallback(
    (geometry: ExcavationGeometry) => {
      const kind: ExcavationKind = geometry.type === 'LineString' ? 'trench' : 'pit';
      const { values, soilFrom } = newValues(kind, geometry, list);
      setDrawing(null);
      setNotice(null);
      setEditing({ excavation: null, initial: values, soilFrom, geometry, shapeKey: null, formKey: `new-${Date.now()}` });
    },
    [list],
  );

  const onEdited = useCallback((geometry: ExcavationGeometry) => setEditing((ed) => (ed ? { ...ed, geometry } : ed)), []);

  if (excavations.isPending || !site) return <Loading what="Loading the site map" />;
  if (excavations.isError) return <LoadError error={excavations.error} retry={() => excavations.refetch()} />;

  const planOpacity = opacity ?? plan.data?.opacity ?? 0.7;
  const openCount = list.filter((e) => e.state === 'open').length;

  return (
    <div className="flex flex-col gap-3">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-3xl font-bold leading-tight">Site map</h1>
          <p className="text-ink-soft">
            {site.name}: {list.length} excavation{list.length === 1 ? '' : 's'}, {openCount} open.{' '}
            <Link to={`/sites/${siteId}/register`}>Open the register</Link>
          </p>
        </div>
        {canEditDesign ? (
          <div className="flex flex-wrap gap-2" role="group" aria-label="Drawing">
            {drawing ? (
              <>
                <Button
                  disabled={!toolsReady}
                  onClick={() => {
                    if (mapRef.current && !finishDrawing(mapRef.current))
                      setNotice(drawing === 'trench' ? 'A trench needs at least two points.' : 'A pit needs at least three corners.');
                  }}
                >
                  Finish
                </Button>
                <Button
                  variant="secondary"
                  onClick={() => {
                    setDrawing(null);
                    setNotice(null);
                  }}
                >
                  Cancel drawing
                </Button>
              </>
            ) : (
              <>
                <Button variant="secondary" onClick={() => startDrawing('trench')}>
                  Draw a trench
                </Button>
                <Button variant="secondary" onClick={() => startDrawing('pit')}>
                  Draw a pit
                </Button>
              </>
            )}
          </div>
        ) : null}
      </header>
      <Notice>{notice}</Notice>

      <div className="grid gap-4 lg:h-[calc(100dvh-16rem)] lg:min-h-[30rem] lg:grid-cols-[minmax(0,1fr)_27rem]">
        <div className="h-[70dvh] min-h-80 overflow-hidden rounded-md border border-rule-strong lg:h-full" data-testid="site-map">
          <SiteMap
            mapRef={mapRef}
            origin={site}
            excavations={list}
            selectedId={editing?.excavation?.id ?? null}
            hiddenId={editing?.excavation && (editing.shapeKey || preview) ? editing.excavation.id : null}
            onSelect={(id) => {
              if (drawing) return;
              const e = list.find((x) => x.id === id);
              if (e) open(e);
            }}
            plan={plan.data ?? null}
            planOpacity={planOpacity}
            draft={editing ? previewShapes(preview, site) : null}
            focus={focus}
            inspection={inspectionById}
          >
            {canEdit && (toolsReady || drawing || editing?.shapeKey) ? (
              <Suspense fallback={null}>
                <DrawTools
                  drawing={drawing}
                  onDrawn={onDrawn}
                  editing={editing?.shapeKey ? { key: editing.shapeKey, geometry: editing.geometry } : null}
                  onEdited={onEdited}
                  onReady={() => {
                    setToolsReady(true);
                    if (drawing) setNotice(drawingHint(drawing));
                  }}
                />
              </Suspense>
            ) : null}
          </SiteMap>
        </div>

        <aside
          className="flex flex-col gap-5 overflow-y-auto rounded-md border border-rule bg-sheet p-4 lg:h-full"
          aria-label="Excavation details"
        >
          {editing ? (
            <>
              {askPermit && editing.excavation?.state === 'open' ? (
                <ButtonLink
                  to={`/sites/${siteId}/permits/new?excavation=${editing.excavation.id}`}
                  variant="primary"
                  className="self-start"
                >
                  Ask for a permit beside {editing.excavation.reference}
                </ButtonLink>
              ) : null}
              <ExcavationForm
                key={editing.formKey}
                excavation={editing.excavation}
                initial={editing.initial}
                soilFrom={editing.soilFrom}
                canEdit={canEdit}
                canEditDesign={canEditDesign}
                geometry={editing.geometry}
                editingShape={Boolean(editing.shapeKey)}
                onEditShape={() => setEditing((ed) => (ed ? { ...ed, shapeKey: ed.shapeKey ? null : `shape-${Date.now()}` } : ed))}
                onPreview={setPreview}
                onSave={async (values, file) => {
                  // A supervisor's change leaves the design data out: the server refuses it from them (403).
                  const sent = canEditDesign
                    ? values
                    : (Object.fromEntries(
                        Object.entries(values).filter(([k]) => !(designFields as readonly string[]).includes(k)),
                      ) as typeof values);
                  const saved = await save.mutateAsync({
                    id: editing.excavation?.id ?? null,
                    version: editing.excavation?.version ?? 0,
                    values: sent,
                  });
                  let final = saved;
                  let extra = '';
                  if (file) {
                    try {
                      final = await drawingFile.mutateAsync({ id: saved.id, file });
                    } catch (error) {
                      extra = ` The drawing was not attached: ${(error as Error).message}`;
                    }
                  }
                  open(final);
                  setNotice(`${final.reference} saved.${extra}`);
                }}
                onDelete={async () => {
                  const ref = editing.excavation!.reference;
                  await del.mutateAsync(editing.excavation!.id);
                  close();
                  setNotice(`${ref} removed from the register.`);
                }}
                onRemoveDrawing={async () => {
                  const e = await drawingFile.mutateAsync({ id: editing.excavation!.id, file: null });
                  open(e);
                }}
                onClose={close}
              />
              {editing.excavation ? (
                <ExcavationHistory
                  siteId={siteId}
                  id={editing.excavation.id}
                  version={editing.excavation.version}
                  timeZone={site.timezone}
                />
              ) : null}
            </>
          ) : (
            <>
              <Legend />
              <ExcavationList
                list={list}
                inspection={inspectionById}
                onOpen={(e) => {
                  open(e);
                  showOnMap(e);
                }}
                askPermit={askPermit ? siteId : null}
              />
              <PlanControls
                siteId={siteId}
                origin={site}
                plan={plan.data ?? null}
                canEdit={canEdit}
                opacity={planOpacity}
                onOpacity={setOpacity}
              />
            </>
          )}
        </aside>
      </div>
    </div>
  );
}

/** Leaflet [[south, west], [north, east]] of an excavation's outline (or its drawn geometry). */
function boundsOf(e: Excavation): [[number, number], [number, number]] {
  const pts = e.outline ? e.outline.coordinates[0] : e.geometry.type === 'LineString' ? e.geometry.coordinates : e.geometry.coordinates[0];
  const lats = pts.map((p) => p[1]);
  const lons = pts.map((p) => p[0]);
  return [
    [Math.min(...lats), Math.min(...lons)],
    [Math.max(...lats), Math.max(...lons)],
  ];
}

function SideSection({ id, title, children }: { id: string; title: string; children: ReactNode }) {
  return (
    <section aria-labelledby={id}>
      <h2 id={id} className="mb-2 text-lg font-semibold">
        {title}
      </h2>
      {children}
    </section>
  );
}

function Legend() {
  return (
    <SideSection id="map-legend" title="Key">
      <ul className="flex flex-col gap-1 text-sm">
        {legendItems.map(({ label, style }) => (
          <li key={label} className="flex items-center gap-2">
            <svg width="36" height="18" aria-hidden="true">
              <rect
                x="2"
                y="2"
                width="32"
                height="14"
                fill={style.fillColor}
                fillOpacity={style.fillOpacity}
                stroke={style.color}
                strokeWidth={style.weight}
                strokeDasharray={style.dashArray as string | undefined}
              />
            </svg>
            {label}
          </li>
        ))}
      </ul>
      <p className="mt-2 text-sm text-ink-soft">
        Hover over or tap an excavation for its depth, support and allowance; click it to open its details.
      </p>
    </SideSection>
  );
}

function ExcavationList({
  list,
  onOpen,
  inspection,
  askPermit,
}: {
  list: Excavation[];
  onOpen: (e: Excavation) => void;
  inspection: Record<number, InspectionState>;
  askPermit: number | null;
}) {
  const figures = useFigures();
  if (list.length === 0) return <p className="text-ink-soft">No excavations on this site yet.</p>;
  return (
    <SideSection id="map-list" title="Excavations">
      <ul className="flex flex-col gap-1">
        {list.map((e) => (
          <li key={e.id}>
            <button type="button" className="w-full rounded-md px-2 py-2 text-left hover:bg-accent-wash" onClick={() => onOpen(e)}>
              <span className="font-semibold">{e.reference}</span> {e.name}
              {inspection[e.id] && inspection[e.id] !== 'ok' ? (
                <span className="block">
                  <InspectionStateBadge state={inspection[e.id]} />
                </span>
              ) : null}
              <span className="block text-sm text-ink-soft">
                {stateLabels[e.state]} · depth {figures.length(e.depth)} · {supportLabels[e.supportType]} · allowance{' '}
                {figures.pressure(e.designSurcharge)}
              </span>
            </button>
            {askPermit !== null && e.state === 'open' ? (
              <Link
                className="ml-2 text-sm"
                to={`/sites/${askPermit}/permits/new?excavation=${e.id}`}
                aria-label={`Ask for a permit beside ${e.reference}`}
              >
                Ask for a permit
              </Link>
            ) : null}
          </li>
        ))}
      </ul>
    </SideSection>
  );
}
