import type { ProfilePoint } from '@shared/engineering';
import { ticks } from '@shared/permits/drawing';
import { figuresIn, inSystem, profileIn, type Figures } from '@shared/units';

const series = [
  { key: 'soil', label: 'Soil', colour: '#64748b', dash: '' },
  { key: 'water', label: 'Water', colour: '#2b6cb0', dash: '' },
  { key: 'surcharge', label: 'Surcharge from the loads', colour: '#47508f', dash: '' },
  { key: 'allowance', label: 'Allowance the support was designed for', colour: '#7c3aed', dash: '6 3' },
] as const;

/**
 * Lateral pressure against depth, to scale on both axes: depth downward from ground level (m or ft),
 * pressure across (kPa or psf), with the soil, water, surcharge and the allowance.
 */
export function PressureDiagram({
  profile: si,
  depth: depthSI,
  title,
  figures = figuresIn('metric'),
}: {
  profile: ProfilePoint[];
  depth: number;
  title: string;
  /** The reader's figures: the axes in their units. */
  figures?: Figures;
}) {
  const profile = profileIn(si, figures.system);
  const depth = inSystem('length', depthSI, figures.system);
  const [pUnit, zUnit] = [figures.unit('pressure'), figures.unit('length')];
  const W = 360;
  const H = 260;
  const pad = { l: 52, t: 34, r: 12, b: 12 };
  const maxP = Math.max(1, ...profile.map((p) => Math.max(p.soil, p.water, p.surcharge, p.allowance)));
  const px = ticks(0, maxP, 5);
  const dz = ticks(0, depth, 5);
  const sx = (W - pad.l - pad.r) / px[px.length - 1];
  const sy = (H - pad.t - pad.b) / dz[dz.length - 1];
  const X = (p: number) => pad.l + p * sx;
  const Y = (z: number) => pad.t + z * sy;
  const line = (k: (typeof series)[number]['key']) =>
    profile.map((p, i) => `${i ? 'L' : 'M'}${X(p[k]).toFixed(1)},${Y(p.z).toFixed(1)}`).join('');
  return (
    <figure className="flex flex-col gap-2">
      <svg
        viewBox={`0 0 ${W} ${H}`}
        className="w-full max-w-md"
        role="img"
        aria-label={`${title}: lateral pressure (${pUnit}) against depth (${zUnit}), depth downward`}
      >
        {px.map((v) => (
          <g key={`x${v}`}>
            <line x1={X(v)} x2={X(v)} y1={Y(0)} y2={Y(dz[dz.length - 1])} stroke="#e2ddd0" />
            <text x={X(v)} y={pad.t - 6} fontSize="10" textAnchor="middle" fill="#4c5a64">
              {v}
            </text>
          </g>
        ))}
        {dz.map((v) => (
          <g key={`z${v}`}>
            <line x1={X(0)} x2={X(px[px.length - 1])} y1={Y(v)} y2={Y(v)} stroke="#e2ddd0" />
            <text x={pad.l - 6} y={Y(v) + 3} fontSize="10" textAnchor="end" fill="#4c5a64">
              {v.toFixed(1)}
            </text>
          </g>
        ))}
        <text x={(pad.l + W - pad.r) / 2} y={10} fontSize="11" textAnchor="middle" fill="#1e2a33">
          pressure ({pUnit})
        </text>
        <text x={12} y={(pad.t + H) / 2} fontSize="11" textAnchor="middle" fill="#1e2a33" transform={`rotate(-90 12 ${(pad.t + H) / 2})`}>
          depth ({zUnit})
        </text>
        <line x1={X(0)} x2={X(0)} y1={Y(0)} y2={Y(depth)} stroke="#1e2a33" strokeWidth="1.5" />
        <line x1={X(0)} x2={X(px[px.length - 1])} y1={Y(depth)} y2={Y(depth)} stroke="#1e2a33" strokeDasharray="3 3" />
        {series.map((s) => (
          <path key={s.key} d={line(s.key)} fill="none" stroke={s.colour} strokeWidth="2" strokeDasharray={s.dash} />
        ))}
      </svg>
      <figcaption>
        <ul className="flex flex-wrap gap-x-4 text-sm">
          {series.map((s) => (
            <li key={s.key} className="flex items-center gap-1">
              <svg width="22" height="8" aria-hidden>
                <line x1="0" x2="22" y1="4" y2="4" stroke={s.colour} strokeWidth="2" strokeDasharray={s.dash} />
              </svg>
              {s.label}
            </li>
          ))}
          <li>Dashed black: formation level, {figures.length(depthSI)}</li>
        </ul>
      </figcaption>
    </figure>
  );
}
