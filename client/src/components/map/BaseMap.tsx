import { useEffect, useState, type ReactNode, type Ref } from 'react';
import L from 'leaflet';
import { ImageOverlay, MapContainer, ScaleControl, TileLayer, useMap, useMapEvents, ZoomControl } from 'react-leaflet';
import 'leaflet/dist/leaflet.css';
import { useQuery } from '@tanstack/react-query';
import type { ConfigAnswer } from '@shared/schemas/system';
import type { SitePlan } from '@shared/schemas/excavations';
import { api } from '@client/lib/api';
import { MetricGridLayer, metresPerPixel } from './metricGrid';
import { useUnits } from '@client/lib/units';

/** Zoom range: about 1:200 (zoom 21 at 52° N) out to about 1:20 000. */
const MIN_ZOOM = 14;
const MAX_ZOOM = 22;
/** Tile servers rarely go past 19; Leaflet enlarges their last level beyond it. */
const MAX_NATIVE_TILE_ZOOM = 19;

/** Settings the browser needs: a map tile address when the site has internet. */
function useAppConfig() {
  return useQuery({
    queryKey: ['config'],
    queryFn: ({ signal }) => api.get<ConfigAnswer>('/api/config', signal),
    staleTime: Infinity,
  });
}

type PinnedPlan = Pick<SitePlan, 'uploadId' | 'bounds'>;

interface BaseMapProps {
  /** The site origin: the metric grid counts metres from here. */
  origin: { latitude: number; longitude: number };
  /** Where the map opens (default: the origin). */
  center?: [number, number];
  zoom?: number;
  /** Size of the map (Tailwind classes), e.g. 'h-72 w-full'; default: fill the parent. */
  className?: string;
  ariaLabel: string;
  /** The site plan image pinned by its corners, and its opacity. */
  plan?: PinnedPlan | null;
  planOpacity?: number;
  scrollWheelZoom?: boolean;
  mapRef?: Ref<L.Map | null>;
  children?: ReactNode;
}

function OfflineGrid({ origin, feet }: { origin: BaseMapProps['origin']; feet: boolean }) {
  const map = useMap();
  useEffect(() => {
    const layer = new MetricGridLayer(origin, feet ? 'ft' : 'm').addTo(map);
    return () => {
      layer.remove();
    };
  }, [map, origin.latitude, origin.longitude, feet]); // eslint-disable-line react-hooks/exhaustive-deps
  return null;
}

/** Keeps the ratio scale (1:n at 96 dpi) in step with the zoom. */
function ScaleRatio({ onChange }: { onChange: (n: number) => void }) {
  const map = useMapEvents({
    zoomend: () => onChange(ratioOf(map)),
    moveend: () => onChange(ratioOf(map)),
    resize: () => onChange(ratioOf(map)),
  });
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

/**
 * Every map in Brink stands on this: the offline metric grid counted from the site origin (or tiles
 * from the configured address when there is one, and nothing fetched from outside otherwise), the
 * pinned site plan, a metric scale bar, the 1:n ratio and a north arrow. Layers come in as children.
 */
export function BaseMap({
  origin,
  center,
  zoom = 18,
  className = 'h-full w-full',
  ariaLabel,
  plan,
  planOpacity = 0.7,
  scrollWheelZoom = true,
  mapRef,
  children,
}: BaseMapProps) {
  const [ratio, setRatio] = useState<number | null>(null);
  const config = useAppConfig();
  const units = useUnits();
  const tileUrl = config.data?.mapTileUrl ?? null;
  return (
    <div className={`relative ${className}`}>
      <MapContainer
        center={center ?? [origin.latitude, origin.longitude]}
        zoom={zoom}
        minZoom={MIN_ZOOM}
        maxZoom={MAX_ZOOM}
        zoomSnap={0.5}
        className="h-full w-full"
        attributionControl={Boolean(tileUrl)}
        zoomControl={false}
        scrollWheelZoom={scrollWheelZoom}
        aria-label={ariaLabel}
        ref={mapRef}
      >
        {tileUrl ? (
          <TileLayer
            url={tileUrl}
            attribution={config.data?.mapTileAttribution ?? ''}
            maxNativeZoom={MAX_NATIVE_TILE_ZOOM}
            maxZoom={MAX_ZOOM}
          />
        ) : (
          <OfflineGrid origin={origin} feet={units === 'us'} />
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
        {/* Keyed by the units: Leaflet's control does not change its options once on the map. */}
        <ScaleControl key={units} position="bottomleft" metric={units !== 'us'} imperial={units === 'us'} maxWidth={160} />
        <ZoomControl position="bottomright" zoomInTitle="Zoom in" zoomOutTitle="Zoom out" />
        <ScaleRatio onChange={setRatio} />
        {children}
      </MapContainer>
      <NorthArrow ratio={ratio} />
    </div>
  );
}
