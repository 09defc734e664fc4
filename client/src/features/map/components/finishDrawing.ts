import type L from 'leaflet';
import type {} from '@geoman-io/leaflet-geoman-free'; // its types only: the tools themselves load with DrawTools

/** Finishes the shape being drawn (as clicking its last point again would); false when it has too few points. */
export function finishDrawing(map: L.Map): boolean {
  const draw = map.pm.Draw as unknown as Record<string, { _finishShape?: () => void; _layer?: L.Polyline }>;
  const shape = map.pm.Draw.getActiveShape();
  const instance = shape ? draw[shape] : undefined;
  const points = (instance?._layer?.getLatLngs() as L.LatLng[] | undefined)?.length ?? 0;
  if (!instance?._finishShape || points < (shape === 'Polygon' ? 3 : 2)) return false;
  instance._finishShape();
  return true;
}
