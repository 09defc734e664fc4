import { useEffect } from 'react';
import { CircleMarker, useMap, useMapEvents } from 'react-leaflet';
import { BaseMap } from '@client/components/map/BaseMap';

interface OriginMapProps {
  latitude: number;
  longitude: number;
  onPick: (latitude: number, longitude: number) => void;
}

const fallbackCentre: [number, number] = [52.2, 0.12];

function valid(lat: number, lng: number) {
  return Number.isFinite(lat) && Number.isFinite(lng) && Math.abs(lat) <= 85 && Math.abs(lng) <= 180;
}

/** Six decimals of a degree is about 0.1 m: finer than a site origin needs. */
const round6 = (x: number) => Math.round(x * 1e6) / 1e6;

function ClickToPick({ onPick }: Pick<OriginMapProps, 'onPick'>) {
  useMapEvents({ click: (e) => onPick(round6(e.latlng.lat), round6(e.latlng.lng)) });
  return null;
}

/** Keeps the typed origin in view when the boxes change. */
function FollowOrigin({ centre }: { centre: [number, number] | null }) {
  const map = useMap();
  const lat = centre?.[0];
  const lng = centre?.[1];
  useEffect(() => {
    if (lat === undefined || lng === undefined) return;
    if (!map.getBounds().pad(-0.2).contains([lat, lng])) map.panTo([lat, lng]);
  }, [map, lat, lng]);
  return null;
}

/**
 * A small map for placing a site's origin on the shared base map (metric grid counted from the
 * origin as typed, scale bar, north arrow); a click sets the origin. The latitude and longitude boxes stay the way to give it exactly.
 */
export function OriginMap({ latitude, longitude, onPick }: OriginMapProps) {
  const origin: [number, number] | null = valid(latitude, longitude) ? [latitude, longitude] : null;
  return (
    <div className="overflow-hidden rounded-md border border-rule-strong">
      <BaseMap
        origin={origin ? { latitude: origin[0], longitude: origin[1] } : { latitude: fallbackCentre[0], longitude: fallbackCentre[1] }}
        zoom={17}
        className="h-72 w-full"
        scrollWheelZoom={false}
        ariaLabel="Map: click to set the site origin"
      >
        <ClickToPick onPick={onPick} />
        <FollowOrigin centre={origin} />
        {origin ? <CircleMarker center={origin} radius={8} pathOptions={{ color: '#47508f', weight: 3, fillOpacity: 0.3 }} /> : null}
      </BaseMap>
    </div>
  );
}
