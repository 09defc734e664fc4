import { useEffect, useRef } from 'react';
import L from 'leaflet';
import '@geoman-io/leaflet-geoman-free';
import '@geoman-io/leaflet-geoman-free/dist/leaflet-geoman.css';
import { useMap } from 'react-leaflet';
import type { LineString, Polygon } from 'geojson';
import type { ExcavationGeometry } from '@shared/schemas/excavations';

export type DrawShape = 'trench' | 'pit';

// leaflet-geoman's reInitLayer equips a map too (its `layer instanceof L.Map` branch); its typings name layers only.
declare module 'leaflet' {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace PM {
    function reInitLayer(layer: L.Map): void;
  }
}

const shapeOf = { trench: 'Line', pit: 'Polygon' } as const;
const editLine = { color: '#47508f', weight: 3 };

/** Positions of a GeoJSON geometry as Leaflet's [lat, lng]. */
function latLngsOf(g: ExcavationGeometry): L.LatLngExpression[] {
  const ring = g.type === 'LineString' ? g.coordinates : g.coordinates[0].slice(0, -1);
  return ring.map(([lon, lat]) => [lat, lon] as [number, number]);
}

/** GeoJSON of a drawn or edited layer, positions rounded to 1e-7° (about 1 cm). */
function geometryOfLayer(layer: { toGeoJSON(): unknown }): ExcavationGeometry {
  const g = (layer.toGeoJSON() as GeoJSON.Feature<LineString | Polygon>).geometry;
  const round = (p: number[]): [number, number] => [Math.round(p[0] * 1e7) / 1e7, Math.round(p[1] * 1e7) / 1e7];
  return g.type === 'LineString'
    ? { type: 'LineString', coordinates: g.coordinates.map(round) }
    : { type: 'Polygon', coordinates: g.coordinates.map((r) => r.map(round)) };
}

interface DrawToolsProps {
  /** Drawing a new shape of this kind, or null. */
  drawing: DrawShape | null;
  onDrawn: (geometry: ExcavationGeometry) => void;
  /** Editing the vertices of this geometry (a new key starts a new edit), or null. */
  editing: { key: string; geometry: ExcavationGeometry } | null;
  onEdited: (geometry: ExcavationGeometry) => void;
  /** Called once the tools are on the map (the page enables its drawing buttons then). */
  onReady?: () => void;
}

/**
 * Drawing and vertex editing with leaflet-geoman, driven by the page's own buttons: a trench is drawn
 * as its centre line (click each point, then press Finish or click the last point again), a pit as its
 * outline. Its own toolbar is not shown. The page loads this module (and leaflet-geoman with it) only
 * for people who may draw (see SiteMapPage).
 */
export function DrawTools({ drawing, onDrawn, editing, onEdited, onReady }: DrawToolsProps) {
  const map = useMap();
  const onDrawnRef = useRef(onDrawn);
  const onEditedRef = useRef(onEdited);
  onDrawnRef.current = onDrawn;
  onEditedRef.current = onEdited;
  const onReadyRef = useRef(onReady);
  onReadyRef.current = onReady;

  useEffect(() => {
    // leaflet-geoman equips maps made after it loads; this one was made before (the tools load on first use).
    if (!map.pm) L.PM.reInitLayer(map);
    map.pm.setGlobalOptions({ allowSelfIntersection: false, snappable: false, finishOnEnter: true } as L.PM.GlobalOptions);
    map.pm.setLang('en');
    onReadyRef.current?.();
  }, [map]);

  useEffect(() => {
    if (!drawing) return;
    const onCreate = (e: { layer: L.Layer }) => {
      const layer = e.layer as L.Polyline;
      const geometry = geometryOfLayer(layer);
      layer.remove();
      onDrawnRef.current(geometry);
    };
    map.on('pm:create', onCreate);
    map.pm.enableDraw(shapeOf[drawing], {
      templineStyle: editLine,
      hintlineStyle: { ...editLine, dashArray: '4 4' },
      pathOptions: editLine,
      tooltips: true,
    } as L.PM.DrawModeOptions);
    return () => {
      map.off('pm:create', onCreate);
      map.pm.disableDraw();
    };
  }, [map, drawing]);

  const editKey = editing?.key ?? null;
  const startGeometry = useRef<ExcavationGeometry | null>(null);
  startGeometry.current = editing?.geometry ?? null;
  useEffect(() => {
    const g = startGeometry.current;
    if (!editKey || !g) return;
    const layer: L.Polyline<GeoJSON.LineString | GeoJSON.MultiLineString | GeoJSON.Polygon | GeoJSON.MultiPolygon> =
      g.type === 'LineString' ? L.polyline(latLngsOf(g), editLine) : L.polygon(latLngsOf(g), editLine);
    layer.addTo(map);
    layer.pm.enable({ allowSelfIntersection: false, snappable: false } as L.PM.EditModeOptions);
    const changed = () => onEditedRef.current(geometryOfLayer(layer));
    layer.on('pm:edit', changed);
    return () => {
      layer.off('pm:edit', changed);
      layer.pm.disable();
      layer.remove();
    };
  }, [map, editKey]);

  return null;
}
