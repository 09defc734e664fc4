import type L from 'leaflet';
import type {} from '@geoman-io/leaflet-geoman-free'; // its types only: the tools themselves load with DrawTools

/** Finishes the shape being drawn (as clicking its last point again would); false when it has too few points. */
export function finishDrawing(map: L.Map): boolean {
  const shape = map.pm.Draw.getActiveShape();
  // The drawing tool of each shape is a property of Draw that its types do not name.
  const instance = shape ? (Reflect.get(map.pm.Draw, shape) as { _finishShape?: () => void; _layer?: L.Polyline } | undefined) : undefined;
  const points = (instance?._layer?.getLatLngs() as L.LatLng[] | undefined)?.length ?? 0;
  if (!instance?._finishShape || points < (shape === 'Polygon' ? 3 : 2)) return false;
  instance._finishShape();
  return true;
}
