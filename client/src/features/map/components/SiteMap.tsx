import { useEffect, type ReactNode, type Ref } from 'react';
import L from 'leaflet';
import { GeoJSON, Tooltip, useMap } from 'react-leaflet';
import { BaseMap } from '@client/components/map/BaseMap';
import type { GeoJsonObject } from 'geojson';
import { stateLabels, supportLabels, type Excavation, type SitePlan } from '@shared/schemas/excavations';
import { useFigures } from '@client/lib/units';
import { stateLabels as inspectionLabels, type InspectionState } from '@shared/schemas/inspections';
import { draftStyle, influenceStyle, inspectionStyles, selectedStyle, stateStyles } from './mapStyles';

interface SiteMapProps {
  origin: { latitude: number; longitude: number };
  excavations: Excavation[];
  selectedId: number | null;
  /** Excavations with these ids are drawn as the draft instead (being changed). */
  hiddenId?: number | null;
  onSelect: (id: number) => void;
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

function ExcavationShape({
  e,
  selected,
  onSelect,
  inspection,
}: {
  e: Excavation;
  selected: boolean;
  onSelect: (id: number) => void;
  inspection?: InspectionState;
}) {
  const figures = useFigures();
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
        <span className="block">Depth {figures.length(e.depth)}</span>
        <span className="block">{supportLabels[e.supportType]}</span>
        <span className="block">Surcharge allowance {figures.pressure(e.designSurcharge)}</span>
      </Tooltip>
    </GeoJSON>
  );
}

/**
 * The site map on the shared base map: excavations by state and influence zones of open ones.
 * Drawing tools come in as children.
 */
export function SiteMap(props: SiteMapProps) {
  const { origin, excavations, selectedId, hiddenId, onSelect, plan, planOpacity, draft, children, mapRef, focus, inspection } = props;
  const shown = excavations.filter((e) => e.id !== hiddenId);
  return (
    <BaseMap origin={origin} ariaLabel="Site map" plan={plan} planOpacity={planOpacity} mapRef={mapRef}>
      {shown
        .filter((e) => e.state === 'open' && e.influenceZone)
        .map((e) => (
          <GeoJSON
            key={`zone-${e.id}-${e.version}`}
            data={e.influenceZone!}
            style={() => ({ ...influenceStyle, className: `brink-influence-zone brink-zone-of-${e.id}` })}
            interactive={false}
          />
        ))}
      {draft?.zone ? (
        <GeoJSON key={`draft-zone-${JSON.stringify(draft.zone)}`} data={draft.zone} style={() => influenceStyle} interactive={false} />
      ) : null}
      {shown.map((e) => (
        <ExcavationShape key={e.id} e={e} selected={e.id === selectedId} onSelect={onSelect} inspection={inspection?.[e.id]} />
      ))}
      {draft?.outline ? (
        <GeoJSON key={`draft-${JSON.stringify(draft.outline)}`} data={draft.outline} style={() => draftStyle} interactive={false} />
      ) : null}
      <FocusOn focus={focus} />
      {children}
    </BaseMap>
  );
}
