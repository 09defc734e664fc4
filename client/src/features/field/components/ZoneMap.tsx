import { useEffect, useMemo } from 'react';
import L from 'leaflet';
import { Circle, CircleMarker, GeoJSON, useMap } from 'react-leaflet';
import { BaseMap } from '@client/components/map/BaseMap';
import type { FieldPermit } from '@shared/schemas/field';
import type { Fix } from '../lib/reading';

/**
 * The permit on a map, north up, to scale: influence zones in ISO 3864 warning yellow, exclusion
 * zones in prohibition red, the excavations dark, the permitted footprint outlined, and my position
 * with its accuracy circle, on the shared base map (the offline metric grid unless tiles are
 * configured, so it works with no signal).
 */
export const zoneStyles = {
  influence: { color: '#1e2a33', weight: 1, dashArray: '6 4', fillColor: '#f4c20d', fillOpacity: 0.35 },
  exclusion: { color: '#c1121f', weight: 3, fillColor: '#c1121f', fillOpacity: 0.6 },
  excavation: { color: '#1e2a33', weight: 2.5, fillColor: '#3a4650', fillOpacity: 0.7 },
  footprint: { color: '#1e2a33', weight: 3, fillColor: '#fffdf8', fillOpacity: 0.85 },
  accuracy: { color: '#1e2a33', weight: 2, dashArray: '4 4', fillColor: '#47508f', fillOpacity: 0.12 },
  me: { color: '#fffdf8', weight: 3, fillColor: '#47508f', fillOpacity: 1 },
} as const;

function boundsOf(permit: FieldPermit): L.LatLngBounds | null {
  const layer = L.geoJSON(permit.excavations.flatMap((e) => [e.influenceZone, ...(e.exclusionZone ? [e.exclusionZone] : [])]));
  permit.footprints.forEach((f) => layer.addData(f.geometry));
  const b = layer.getBounds();
  return b.isValid() ? b : null;
}

function Fit({ bounds }: { bounds: L.LatLngBounds | null }) {
  const map = useMap();
  useEffect(() => {
    if (bounds) map.fitBounds(bounds, { padding: [16, 16], maxZoom: 21 });
  }, [map, bounds]);
  return null;
}

export function ZoneMap({ permit, fix }: { permit: FieldPermit; fix: Fix | null }) {
  const bounds = useMemo(() => boundsOf(permit), [permit]);
  return (
    <div className="relative h-[55vh] min-h-72 overflow-hidden rounded-md border-2 border-ink">
      <BaseMap
        origin={permit.origin}
        center={[permit.centre.latitude, permit.centre.longitude]}
        zoom={19}
        ariaLabel={`Map of permit ${permit.number}: zones and the permitted position`}
      >
        <Fit bounds={bounds} />
        {permit.excavations.map((e) => (
          <GeoJSON key={`i-${e.id}`} data={e.influenceZone} style={() => zoneStyles.influence} interactive={false} />
        ))}
        {permit.excavations.map((e) =>
          e.exclusionZone ? (
            <GeoJSON key={`x-${e.id}`} data={e.exclusionZone} style={() => zoneStyles.exclusion} interactive={false} />
          ) : null,
        )}
        {permit.excavations.map((e) => (
          <GeoJSON key={`e-${e.id}`} data={e.outline} style={() => zoneStyles.excavation} interactive={false} />
        ))}
        {permit.footprints.map((f, i) => (
          <GeoJSON key={`f-${i}`} data={f.geometry} style={() => zoneStyles.footprint} interactive={false} />
        ))}
        {fix ? (
          <>
            <Circle
              center={[fix.latitude, fix.longitude]}
              radius={Math.max(fix.accuracy, 0.1)}
              pathOptions={zoneStyles.accuracy}
              interactive={false}
            />
            <CircleMarker center={[fix.latitude, fix.longitude]} radius={9} pathOptions={zoneStyles.me} interactive={false} />
          </>
        ) : null}
      </BaseMap>
    </div>
  );
}
