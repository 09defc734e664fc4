import { scaleBarLength } from '@shared/permits/drawing';
import { figuresIn, FOOT, type Figures } from '@shared/units';
import { footprintBounds, plantElementKindLabels, type PlantElement, type PlantElementKind } from '@shared/schemas/plant';

const fills: Record<PlantElementKind, string> = { track: '#4c5a64', pad: '#8a7350', wheel: '#1e2a33' };

/**
 * The machine's bearing elements seen from above, to scale: x (forward) to the right, y (left) up,
 * the origin marked, with a scale bar in metres or feet and the front marked with an arrow.
 */
export function Footprint({
  elements,
  name,
  width = 360,
  height = 260,
  figures = figuresIn('metric'),
}: {
  elements: PlantElement[];
  name: string;
  width?: number;
  height?: number;
  /** The reader's figures (the sizes and the scale bar in metres or feet). */
  figures?: Figures;
}) {
  if (elements.length === 0) return null;
  const b = footprintBounds(elements);
  const minX = Math.min(b.minX, 0);
  const maxX = Math.max(b.maxX, 0);
  const minY = Math.min(b.minY, 0);
  const maxY = Math.max(b.maxY, 0);
  const margin = 28;
  const bottom = 44; // room for the scale bar
  const spanX = Math.max(maxX - minX, 0.5);
  const spanY = Math.max(maxY - minY, 0.5);
  const k = Math.min((width - 2 * margin) / spanX, (height - margin - bottom) / spanY);
  const ox = margin + (width - 2 * margin - spanX * k) / 2 - minX * k;
  const oy = margin + (height - margin - bottom - spanY * k) / 2 + maxY * k;
  const sx = (x: number) => ox + x * k;
  const sy = (y: number) => oy - y * k;
  // A round number of metres, or of feet, in the reader's units.
  const perUnit = figures.system === 'us' ? FOOT : 1;
  const barUnits = scaleBarLength(spanX / perUnit);
  const bar = barUnits * perUnit;
  const kinds = [...new Set(elements.map((e) => e.kind))];

  return (
    <figure className="flex flex-col gap-1">
      <svg
        width={width}
        height={height}
        viewBox={`0 0 ${width} ${height}`}
        role="img"
        aria-label={`Footprint of ${name}, to scale`}
        className="rounded border border-rule bg-sheet"
      >
        <line x1={sx(0) - 6} y1={sy(0)} x2={sx(0) + 6} y2={sy(0)} stroke="#47508f" strokeWidth={1.5} />
        <line x1={sx(0)} y1={sy(0) - 6} x2={sx(0)} y2={sy(0) + 6} stroke="#47508f" strokeWidth={1.5} />
        {elements.map((e, i) => (
          <g key={`${e.name}-${i}`}>
            <rect
              x={sx(e.x - e.length / 2)}
              y={sy(e.y + e.width / 2)}
              width={Math.max(e.length * k, 1)}
              height={Math.max(e.width * k, 1)}
              fill={fills[e.kind]}
              fillOpacity={0.85}
              stroke="#1e2a33"
              strokeWidth={0.75}
            >
              <title>{`${e.name}: ${figures.length(e.length)} × ${figures.length(e.width)}, ${(e.share * 100).toFixed(1)} % of the weight`}</title>
            </rect>
            <text x={sx(e.x)} y={sy(e.y) - Math.max((e.width * k) / 2, 1) - 3} textAnchor="middle" fontSize={11} fill="#1e2a33">
              {i + 1}
            </text>
          </g>
        ))}
        {/* Front arrow */}
        <g transform={`translate(${width - margin - 60}, ${margin - 14})`}>
          <line x1={0} y1={0} x2={44} y2={0} stroke="#1e2a33" strokeWidth={1.5} />
          <path d="M44 -5 L54 0 L44 5 Z" fill="#1e2a33" />
          <text x={0} y={-5} fontSize={11} fill="#1e2a33">
            Front (x)
          </text>
        </g>
        {/* Scale bar */}
        <g transform={`translate(${margin}, ${height - 22})`}>
          <rect x={0} y={0} width={(bar * k) / 2} height={6} fill="#1e2a33" />
          <rect x={(bar * k) / 2} y={0} width={(bar * k) / 2} height={6} fill="#fffdf8" stroke="#1e2a33" strokeWidth={1} />
          <text x={0} y={18} fontSize={11} fill="#1e2a33">
            0
          </text>
          <text x={bar * k} y={18} fontSize={11} fill="#1e2a33" textAnchor="middle">
            {barUnits} {figures.unit('length')}
          </text>
        </g>
        <text x={width - margin} y={height - 8} fontSize={11} fill="#4c5a64" textAnchor="end">
          + origin · y to the left is up
        </text>
      </svg>
      <figcaption className="flex flex-wrap gap-3 text-xs text-ink-soft">
        {kinds.map((kind) => (
          <span key={kind} className="inline-flex items-center gap-1">
            <span className="inline-block size-3 border border-ink" style={{ background: fills[kind] }} aria-hidden="true" />
            {plantElementKindLabels[kind]}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}
