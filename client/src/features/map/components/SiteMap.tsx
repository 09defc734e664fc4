import { useEffect, useState, type ReactNode, type Ref } from 'react';
import L from 'leaflet';
import { GeoJSON, ImageOverlay, MapContainer, ScaleControl, TileLayer, Tooltip, useMap, useMapEvents, ZoomControl } from 'react-leaflet';
import 'leaflet/dist/leaflet.css';
import type { GeoJsonObject } from 'geojson';
import { stateLabels, supportLabels, type Excavation, type SitePlan } from '@shared/schemas/excavations';
import { fmt } from '@client/lib/excavations';
import { stateLabels as inspectionLabels, type InspectionState } from '@shared/schemas/inspections';
import { draftStyle, influenceStyle, inspectionStyles, selectedStyle, stateStyles } from './mapStyles';
import { MetricGridLayer, metresPerPixel } from './metricGrid';

/** Zoom range: about 1:200 (zoom 21 at 52° N) out to about 1:20 000. */
export const MIN_ZOOM = 14;
export const MAX_ZOOM = 22;
/** Tile servers rarely go past 19; Leaflet enlarges their last level beyond it. */
const MAX_NATIVE_TILE_ZOOM = 19;

interface SiteMapProps {
  origin: { latitude: number; longitude: number };
  excavations: Excavation[];
  selectedId: number | null;
  /** Excavations with these ids are drawn as the draft instead (being changed). */
  hiddenId?: number | null;
  onSelect: (id: number) => void;
  tileUrl: string | null;
  tileAttribution: string;
  plan: SitePlan | null;
  planOpacity: number;
  /** The outline and zone of the shape being drawn or changed (not saved yet). */
  draft: { outline: GeoJsonObject | null; zone: GeoJsonObject | null } | null;
  children?: ReactNode;
  /** Set to the Leaflet map once it exists (for fitting bounds, finishing a drawing). */
  mapRef?: Ref<L.Map | null>;
  /** Bring these bounds ([[south, west], [north, east]]) into view whenever the key changes. */
  focus?: { key: string; bounds: [[number, number], [number, number]] } | null;
  /** The inspection state of each open excavation this shift, by id (red when not safe or overdue). */
  inspection?: Record<number, InspectionState>;
}

function FocusOn({ focus }: { focus: SiteMapProps['focus'] }) {
  const map = useMap();
  const key = focus?.key;
  useEffect(() => {
    if (focus) map.fitBounds(focus.bounds, { maxZoom: 19, padding: [40, 40] });
  }, [map, key]); // eslint-disable-line react-hooks/exhaustive-deps
  return null;
}

function OfflineGrid({ origin }: { origin: SiteMapProps['origin'] }) {
  const map = useMap();
  useEffect(() => {
    const layer = new MetricGridLayer(origin).addTo(map);
    return () => {
      layer.remove();
    };
  }, [map, origin.latitude, origin.longitude]); // eslint-disable-line react-hooks/exhaustive-deps
  return null;
}

/** Keeps the ratio scale (1:n at 96 dpi) in step with the zoom. */
function ScaleRatio({ onChange }: { onChange: (n: number) => void }) {
  const map = useMapEvents({ zoomend: () => onChange(ratioOf(map)), moveend: () => onChange(ratioOf(map)), resize: () => onChange(ratioOf(map)) });
  useEffect(() => onChange(ratioOf(map)), [map, onChange]);
  return null;
}

/** Map scale as 1:n for a screen of 96 pixels per inch (0.0254 m). */
function ratioOf(map: L.Map): number {
  return metresPerPixel(map) / (0.0254 / 96);
}

function roundRatio(n: number): string {
  const p = 10 ** Math.max(0, Math.floor(Math.log10(n)) - 1);
  return `1:${(Math.round(n / p) * p).toLocaleString('en-GB')}`;
}

function NorthArrow({ ratio }: { ratio: number | null }) {
  return (
    <div className="pointer-events-none absolute right-3 top-3 z-[500] flex flex-col items-center rounded-md border border-rule-strong bg-sheet/90 px-2 py-1 text-ink shadow-sm">
      <svg width="28" height="40" viewBox="0 0 28 40" role="img" aria-label="North is up">
        <path d="M14 2 L24 34 L14 27 L4 34 Z" fill="#fffdf8" stroke="#1e2a33" strokeWidth="1.5" />
        <path d="M14 2 L14 27 L4 34 Z" fill="#1e2a33" />
      </svg>
      <span className="text-sm font-bold leading-none">N</span>
      {ratio ? <span className="mt-1 text-xs font-semibold">{roundRatio(ratio)}</span> : null}
    </div>
  );
}

function ExcavationShape({ e, selected, onSelect, inspection }: { e: Excavation; selected: boolean; onSelect: (id: number) => void; inspection?: InspectionState }) {
  if (!e.outline) return null;
  const style = {
    ...stateStyles[e.state],
    ...(inspection ? inspectionStyles[inspection] : {}),
    ...(selected ? selectedStyle : {}),
    className: `brink-excavation brink-state-${e.state} brink-excavation-${e.id}${inspection ? ` brink-inspection-${inspection}` : ''}`,
  };
  return (
    <GeoJSON
      key={`${e.id}-${e.version}-${selected}-${inspection ?? ''}`}
      data={e.outline}
      style={() => style}
      eventHandlers={{ click: () => onSelect(e.id) }}
    >
      <Tooltip sticky>
        <span className="block font-bold">
          {e.reference} · {stateLabels[e.state]}
        </span>
        <span className="block">{e.name}</span>
        {inspection ? <span className="block font-semibold">{inspectionLabels[inspection]}</span> : null}
        <span className="block">Depth {fmt.m(e.depth)}</span>
        <span className="block">{supportLabels[e.supportType]}</span>
        <span className="block">Surcharge allowance {fmt.kPa(e.designSurcharge)}</span>
      </Tooltip>
    </GeoJSON>
  );
}

/**
 * The site map: offline metric grid (or tiles from the configured address), the pinned site plan,
 * excavations by state, influence zones of open ones, scale bar, ratio and north arrow. Drawing
 * tools come in as children.
 */
export function SiteMap(props: SiteMapProps) {
  const { origin, excavations, selectedId, hiddenId, onSelect, tileUrl, tileAttribution, plan, planOpacity, draft, children, mapRef, focus, inspection } = props;
  const [ratio, setRatio] = useState<number | null>(null);
  const shown = excavations.filter((e) => e.id !== hiddenId);
  return (
    <div className="relative h-full w-full">
      <MapContainer
        center={[origin.latitude, origin.longitude]}
        zoom={18}
        minZoom={MIN_ZOOM}
        maxZoom={MAX_ZOOM}
        zoomSnap={0.5}
        className="h-full w-full"
        attributionControl={Boolean(tileUrl)}
        zoomControl={false}
        aria-label="Site map"
        ref={mapRef}
      >
        {tileUrl ? (
          <TileLayer url={tileUrl} attribution={tileAttribution} maxNativeZoom={MAX_NATIVE_TILE_ZOOM} maxZoom={MAX_ZOOM} />
        ) : (
          <OfflineGrid origin={origin} />
        )}
        {plan ? (
          <ImageOverlay
            url={`/api/uploads/${plan.uploadId}`}
            bounds={[
              [plan.bounds.south, plan.bounds.west],
              [plan.bounds.north, plan.bounds.east],
            ]}
            opacity={planOpacity}
          />
        ) : null}
        {shown
          .filter((e) => e.state === 'open' && e.influenceZone)
          .map((e) => (
            <GeoJSON key={`zone-${e.id}-${e.version}`} data={e.influenceZone!} style={() => ({ ...influenceStyle, className: `brink-influence-zone brink-zone-of-${e.id}` })} interactive={false} />
          ))}
        {draft?.zone ? <GeoJSON key={`draft-zone-${JSON.stringify(draft.zone)}`} data={draft.zone} style={() => influenceStyle} interactive={false} /> : null}
        {shown.map((e) => (
          <ExcavationShape key={e.id} e={e} selected={e.id === selectedId} onSelect={onSelect} inspection={inspection?.[e.id]} />
        ))}
        {draft?.outline ? <GeoJSON key={`draft-${JSON.stringify(draft.outline)}`} data={draft.outline} style={() => draftStyle} interactive={false} /> : null}
        <ScaleControl position="bottomleft" imperial={false} maxWidth={160} />
        <ZoomControl position="bottomright" zoomInTitle="Zoom in" zoomOutTitle="Zoom out" />
        <ScaleRatio onChange={setRatio} />
        <FocusOn focus={focus} />
        {children}
      </MapContainer>
      <NorthArrow ratio={ratio} />
    </div>
  );
}
