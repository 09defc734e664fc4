import { memo, useEffect, useMemo, useRef, useState } from 'react';
import L from 'leaflet';
import { Marker, Polygon, Polyline, Tooltip, useMap } from 'react-leaflet';
import { BaseMap } from '@client/components/map/BaseMap';
import type { MultiPolygon, Polygon as GeoPolygon } from 'geojson';
import { exclusionZone, prepareExcavation, type LocalProjection, type XY } from '@shared/geometry';
import { checkExcavationOf, footprintsOf, type PlantForCheck } from '@shared/permits/check';
import type { Excavation } from '@shared/schemas/excavations';
import { loadName, type PermitCheck, type PlacedLoad, type Verdict } from '@shared/schemas/permits';
import { bandsWords, failsBeyondPassing, type CheckRequest } from '@shared/engineering';
import { verdictColours } from './Verdict';
import { bearingOf, centreOf, handleAt } from './placement';
import { useFigures } from '@client/lib/units';

type LatLngRings = [number, number][][];
const toLeaflet = (g: GeoPolygon | MultiPolygon): LatLngRings[] =>
  (g.type === 'Polygon' ? [g.coordinates] : g.coordinates).map((poly) =>
    poly.map((ring) => ring.map(([lng, lat]) => [lat, lng] as [number, number])),
  );

interface PlacementMapProps {
  proj: LocalProjection;
  excavations: Excavation[];
  loads: PlacedLoad[];
  plant: Map<number, PlantForCheck>;
  check: PermitCheck | null;
  /** The check's verdict, or null when the loads have not been checked (drawn in neutral slate, never green). */
  verdict: Verdict | null;
  /** Standoff drawn as the exclusion zone (m): the approved one, or the computed one. */
  standoff: number | null;
  editable: boolean;
  /** A drag of a load's Move or Turn handle begins (the editor keeps the loads as they were, for Undo). */
  onMoveStart?: () => void;
  /** Each position while a handle is dragged (many a frame: the page coalesces them) and where it is let go. */
  onMove?: (loadId: string, to: XY) => void;
  onRotate?: (loadId: string, bearing: number) => void;
  /** A Move or Turn handle is taken (true) or let go (false); `onMove`/`onRotate` has had the last position first. */
  onDragging?: (dragging: boolean) => void;
}

const makeIcon = (text: string, shape: 'move' | 'turn') =>
  L.divIcon({
    className: '',
    html: `<span class="flex size-9 items-center justify-center rounded-full border-2 border-white text-xs font-bold text-white shadow" style="background:${shape === 'move' ? '#1e2a33' : '#47508f'}">${text}</span>`,
    iconSize: [36, 36],
    iconAnchor: [18, 18],
  });
/** Made once: a new icon on every render would replace the handle under the pointer mid-drag. */
const moveIcon = makeIcon('Move', 'move');
const turnIcon = makeIcon('Turn', 'turn');

function FitOnce({ bounds }: { bounds: L.LatLngBounds | null }) {
  const map = useMap();
  useEffect(() => {
    if (bounds && bounds.isValid()) map.fitBounds(bounds.pad(0.15), { maxZoom: 19 });
    // only when the set of excavations changes
  }, [map, bounds?.toBBoxString()]); // eslint-disable-line react-hooks/exhaustive-deps
  return null;
}

/**
 * The placing map: excavations (grey), their influence zones (dashed), the exclusion zone at the
 * standoff (ISO 3864 red), each load's bearing footprints in the verdict colour, a handle to drag
 * each load and, for machines, a handle to turn them. Scale bar in metres; north is up.
 */
/** Orange: where a load fails beyond an offset where it passes (not red, which is the exclusion zone). */
const BAND_COLOUR = '#b45309';
// Styles made once: react-leaflet restyles a layer (and the browser repaints it) whenever its
// pathOptions object is a new one, which on a drag would be every frame.
const INFLUENCE_STYLE: L.PathOptions = { color: '#4c5a64', weight: 1, dashArray: '4 4', fill: false };
const ZONE_STYLE: L.PathOptions = { color: verdictColours.fails, weight: 2, fillColor: verdictColours.fails, fillOpacity: 0.12 };
const BAND_STYLE: L.PathOptions = { color: BAND_COLOUR, weight: 1, dashArray: '2 3', fillColor: BAND_COLOUR, fillOpacity: 0.35 };
const OUTLINE_STYLE: L.PathOptions = { color: '#1e2a33', weight: 2, fillColor: '#a8a29e', fillOpacity: 0.7 };

export function PlacementMap({
  proj,
  excavations,
  loads,
  plant,
  check,
  verdict,
  standoff,
  editable,
  onMoveStart,
  onMove,
  onRotate,
  onDragging,
}: PlacementMapProps) {
  const [zoom, setZoom] = useState<number | null>(null);
  // The editor's callbacks as they are now, read when a handle moves: a load's layers are drawn again
  // only when that load (or the verdict) changes, not each time the editor renders.
  const callbacks = useRef<Callbacks>({});
  callbacks.current = { onMoveStart, onMove, onRotate, onDragging };
  const figures = useFigures();
  const prepared = useMemo(
    () =>
      excavations.flatMap((e) => {
        try {
          return [{ e, outline: prepareExcavation(checkExcavationOf(e).shape, proj) }];
        } catch {
          return [];
        }
      }),
    [excavations, proj],
  );
  const zones = useMemo(
    () => (standoff && standoff > 0 ? prepared.map((p) => toLeaflet(exclusionZone(p.outline, standoff, proj))) : []),
    [prepared, standoff, proj],
  );
  // The failing bands of each load that fails farther out than where it passes: the ground between
  // the band's near and far offsets from the excavation outline (docs/calculation.md, "Standoff").
  const bands = useMemo(() => {
    const out: { key: string; positions: [number, number][][]; label: string }[] = [];
    for (const ex of check?.excavations ?? []) {
      const p = prepared.find((x) => x.e.id === ex.excavationId);
      if (!p) continue;
      const minimumClearance = (ex.request as CheckRequest).minimumClearance;
      for (const l of ex.loadStandoffs) {
        const fb = l.failingBands ?? [];
        if (!failsBeyondPassing(fb, minimumClearance)) continue;
        fb.forEach((b, i) => {
          // A band found only beside a break point is drawn 1 cm wide so it can be seen.
          const outer = toLeaflet(exclusionZone(p.outline, Math.max(b.to, b.from + 0.01), proj))[0];
          const inner = b.from > 0 ? toLeaflet(exclusionZone(p.outline, b.from, proj))[0][0] : null;
          out.push({
            key: `${ex.excavationId}-${l.loadId}-${i}`,
            positions: inner ? [...outer, inner] : outer,
            label: `${l.label} fails ${bandsWords([b])} from ${ex.reference}`,
          });
        });
      }
    }
    return out;
  }, [check, prepared, proj]);
  /** Each excavation's outline and influence zone as Leaflet takes them, made once per set of excavations. */
  const shapes = useMemo(
    () =>
      excavations.map((e) => ({
        e,
        outline: e.outline ? toLeaflet(e.outline) : null,
        influence: e.influenceZone ? toLeaflet(e.influenceZone) : null,
      })),
    [excavations],
  );
  const bounds = useMemo(() => {
    const pts = excavations.flatMap((e) => (e.outline ? e.outline.coordinates[0].map(([lng, lat]) => [lat, lng] as [number, number]) : []));
    return pts.length ? L.latLngBounds(pts) : null;
  }, [excavations]);
  const colour = verdict ? verdictColours[verdict] : '#4c5a64';
  const loadStyles = useMemo(
    (): LoadStyles => ({
      line: { color: colour, weight: 5 },
      area: { color: '#1e2a33', weight: 1, fillColor: colour, fillOpacity: 0.8 },
    }),
    [colour],
  );
  const origin: [number, number] = [proj.origin[1], proj.origin[0]];

  return (
    <div className="overflow-hidden rounded-md border border-rule-strong">
      <BaseMap
        origin={{ latitude: origin[0], longitude: origin[1] }}
        zoom={19}
        className="h-[28rem] w-full"
        ariaLabel="Map of the excavations and the loads of this permit"
      >
        <FitOnce bounds={bounds} />
        <ZoomWatch onZoom={setZoom} />
        {shapes.map(({ e, influence }) =>
          influence ? <Polygon key={`iz${e.id}`} positions={influence} pathOptions={INFLUENCE_STYLE} interactive={false} /> : null,
        )}
        {zones.map((z, i) => (
          <Polygon key={`ez${i}`} positions={z} pathOptions={ZONE_STYLE} interactive={false} />
        ))}
        {bands.map((b) => (
          <Polygon key={`fb${b.key}`} positions={b.positions} pathOptions={BAND_STYLE}>
            <Tooltip>{b.label}</Tooltip>
          </Polygon>
        ))}
        {shapes.map(({ e, outline }) =>
          outline ? (
            <Polygon key={`ex${e.id}`} positions={outline} pathOptions={OUTLINE_STYLE}>
              <Tooltip permanent direction="center">
                {e.reference}
              </Tooltip>
            </Polygon>
          ) : null,
        )}
        {loads.map((load) => (
          <LoadOnMap key={load.id} load={load} plant={plant} proj={proj} styles={loadStyles} editable={editable} callbacks={callbacks} />
        ))}
      </BaseMap>
      {editable && zoom !== null ? <ZoomHint loads={loads} plant={plant} proj={proj} zoom={zoom} /> : null}
      <p className="px-3 py-2 text-sm text-ink-soft">
        North is up. Grey: excavations; dashed: influence zones (within the depth of the edge); red band: exclusion zone
        {standoff ? ` (${figures.length(standoff, { rounding: 'up' })} from the edge)` : ''}.
        {bands.length
          ? ' Orange bands: offsets where a load fails although it passes nearer the edge — moving a load farther away is not always safer.'
          : ''}{' '}
        Loads are coloured by the verdict (slate until checked).{editable ? ' Drag “Move” to place a load, “Turn” to turn a machine.' : ''}
      </p>
    </div>
  );
}

type Callbacks = Pick<PlacementMapProps, 'onMoveStart' | 'onMove' | 'onRotate' | 'onDragging'>;
interface LoadStyles {
  line: L.PathOptions;
  area: L.PathOptions;
}

/**
 * One load on the map: its bearing footprints in the verdict colour, its Move handle and, for a
 * machine, its Turn handle. Drawn again only when its own props change: while one load is dragged,
 * the others (and the excavations) are left as they are, so the browser repaints only what moved.
 */
const LoadOnMap = memo(function LoadOnMap({
  load,
  plant,
  proj,
  styles,
  editable,
  callbacks,
}: {
  load: PlacedLoad;
  plant: Map<number, PlantForCheck>;
  proj: LocalProjection;
  styles: LoadStyles;
  editable: boolean;
  callbacks: { current: Callbacks };
}) {
  const figures = useFigures();
  /** A handle's drag: the editor keeps the loads for Undo, follows each move, and hears when it is let go. */
  const handleDrag = (to: (local: XY) => void): L.LeafletEventHandlerFnMap => {
    const at = (ev: L.LeafletEvent) => {
      const ll = (ev.target as L.Marker).getLatLng();
      to(proj.toLocal([ll.lng, ll.lat]));
    };
    return {
      dragstart: () => {
        callbacks.current.onMoveStart?.();
        callbacks.current.onDragging?.(true);
      },
      drag: at,
      dragend: (ev) => {
        at(ev);
        callbacks.current.onDragging?.(false);
      },
    };
  };
  let feet: ReturnType<typeof footprintsOf>;
  try {
    feet = footprintsOf(load, plant, proj);
  } catch {
    feet = [];
  }
  const c = centreOf(load, proj);
  const cLL = proj.toWgs84(c);
  const name = loadName(load, (id) => plant.get(id)?.name);
  const latLngs = (points: XY[]) =>
    points.map((p) => {
      const q = proj.toWgs84(p);
      return [q[1], q[0]] as [number, number];
    });
  return (
    <>
      {feet.map((f, i) =>
        f.kind === 'line' ? (
          <Polyline key={i} positions={latLngs(f.local)} className={`brink-load brink-load-${load.kind}`} pathOptions={styles.line} />
        ) : (
          <Polygon key={i} positions={latLngs(f.local)} className={`brink-load brink-load-${load.kind}`} pathOptions={styles.area}>
            <Tooltip>
              {f.label}
              {f.element ? ` – ${f.element}` : ''}:{' '}
              {f.kind === 'area' || f.kind === 'strip' ? figures.pressure(f.intensity) : figures.lineForce(f.intensity)}
            </Tooltip>
          </Polygon>
        ),
      )}
      {editable ? (
        <Marker
          position={[cLL[1], cLL[0]]}
          draggable
          title={`Move ${name}`}
          icon={moveIcon}
          // Above its Turn handle: zoomed out, the two overlap (8 m apart), and the load can still be
          // moved; the hint below the map says to zoom in to place it precisely.
          zIndexOffset={1000}
          eventHandlers={handleDrag((to) => callbacks.current.onMove?.(load.id, to))}
        />
      ) : null}
      {editable && load.kind === 'plant'
        ? (() => {
            const h = proj.toWgs84(handleAt(c, load.rotation));
            return (
              <Marker
                position={[h[1], h[0]]}
                draggable
                title={`Turn ${name}`}
                icon={turnIcon}
                eventHandlers={handleDrag((to) => callbacks.current.onRotate?.(load.id, bearingOf(c, to)))}
              />
            );
          })()
        : null}
    </>
  );
});

/** Reports the map's zoom level now and after each zoom. */
function ZoomWatch({ onZoom }: { onZoom: (zoom: number) => void }) {
  const map = useMap();
  useEffect(() => {
    const report = () => onZoom(map.getZoom());
    report();
    map.on('zoomend', report);
    return () => {
      map.off('zoomend', report);
    };
  }, [map, onZoom]);
  return null;
}

/** Below this many screen pixels across, a machine cannot be placed by eye to a few centimetres. */
const SMALL_ON_SCREEN_PX = 16;

/** Web Mercator metres per CSS pixel at a latitude and zoom (256-pixel tiles). */
function metresPerPixel(latitude: number, zoom: number): number {
  return (40075016.686 * Math.cos((latitude * Math.PI) / 180)) / 2 ** (zoom + 8);
}

/** "Zoom in" when the smallest machine on the plan is only a few pixels across at this zoom. */
function ZoomHint({
  loads,
  plant,
  proj,
  zoom,
}: {
  loads: PlacedLoad[];
  plant: Map<number, PlantForCheck>;
  proj: LocalProjection;
  zoom: number;
}) {
  let smallest = Infinity;
  let name = '';
  for (const l of loads) {
    if (l.kind !== 'plant') continue;
    const item = plant.get(l.plantItemId);
    if (!item) continue;
    const xs = item.elements.flatMap((e) => [e.y - e.width / 2, e.y + e.width / 2]);
    const across = Math.max(...xs) - Math.min(...xs);
    if (across < smallest) {
      smallest = across;
      name = l.label || item.name;
    }
  }
  if (!Number.isFinite(smallest)) return null;
  const px = smallest / metresPerPixel(proj.origin[1], zoom);
  if (px >= SMALL_ON_SCREEN_PX) return null;
  return (
    <p role="status" className="border-b border-rule bg-paper px-3 py-2 text-sm font-semibold" data-testid="zoom-hint">
      {name} is only {Math.max(1, Math.round(px))} pixels wide at this zoom: zoom in (the + button, or the mouse wheel) to place it
      precisely.
    </p>
  );
}
