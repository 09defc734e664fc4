/** The map's key, in words beside each colour. */
export function MapKey({ hasFix }: { hasFix: boolean }) {
  const swatch = (fill: string, border: string, dashed = false) => (
    <span
      aria-hidden="true"
      className="inline-block size-6 shrink-0 rounded-sm border-2"
      style={{ background: fill, borderColor: border, borderStyle: dashed ? 'dashed' : 'solid' }}
    />
  );
  return (
    <ul className="grid grid-cols-1 gap-2 text-lg sm:grid-cols-2">
      <li className="flex items-center gap-3">{swatch('rgba(193,18,31,0.6)', '#c1121f')}Exclusion zone: no part of the load inside</li>
      <li className="flex items-center gap-3">
        {swatch('rgba(244,194,13,0.55)', '#1e2a33', true)}Influence zone (within the depth of the edge)
      </li>
      <li className="flex items-center gap-3">{swatch('#3a4650', '#1e2a33')}Excavation</li>
      <li className="flex items-center gap-3">{swatch('#fffdf8', '#1e2a33')}Permitted position of the load</li>
      {hasFix ? <li className="flex items-center gap-3">{swatch('#47508f', '#1e2a33')}You, with the phone’s accuracy circle</li> : null}
    </ul>
  );
}
