import L from 'leaflet';
import { localProjection, type LocalProjection } from '@shared/geometry';
import { FOOT } from '@shared/units';

/** Grid spacings (m) the offline base chooses from: the smallest whose lines stand at least MIN_GAP px apart. */
const GRID_STEPS = [0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500, 1000, 2000] as const;
const MIN_GAP = 36;

/** The grid step (m) for a scale of `pxPerMetre`, and how often lines are labelled (every `labelEvery`-th). */
export function gridStep(pxPerMetre: number): { step: number; labelEvery: number } {
  const step = GRID_STEPS.find((s) => s * pxPerMetre >= MIN_GAP) ?? GRID_STEPS[GRID_STEPS.length - 1];
  return { step, labelEvery: step * pxPerMetre >= 90 ? 1 : step * pxPerMetre >= 45 ? 2 : 5 };
}

/** "120 m", "1.5 km", "0.5 m" (or "200 ft"): a grid coordinate in words with its unit. */
export function gridLabel(value: number, unit: GridUnit = 'm'): string {
  const a = Math.abs(value);
  if (unit === 'ft') return `${a.toLocaleString('en-US', { maximumFractionDigits: 1 })} ft`;
  const text = a >= 1000 ? `${+(a / 1000).toFixed(2)} km` : `${+a.toFixed(1)} m`;
  return text;
}

/** The grid's unit: metres, or feet for a person in US units (1 ft = 0.3048 m). */
type GridUnit = 'm' | 'ft';

/** Ground distance (m) that one screen pixel covers at the map's centre. */
export function metresPerPixel(map: L.Map): number {
  const size = map.getSize();
  const y = size.y / 2;
  const a = map.containerPointToLatLng([size.x / 2 - 50, y]);
  const b = map.containerPointToLatLng([size.x / 2 + 50, y]);
  return a.distanceTo(b) / 100;
}

/**
 * The offline base: a grid of lines every few metres east and north of the site origin, labelled
 * with their distance from it, drawn on a canvas behind everything else. Nothing is fetched. The
 * grid step follows the zoom so that lines stay readable from about 1:200 to 1:5000.
 */
export class MetricGridLayer extends L.Layer {
  private canvas: HTMLCanvasElement | null = null;
  private readonly proj: LocalProjection;
  private frame = 0;

  constructor(
    origin: { latitude: number; longitude: number },
    private readonly unit: GridUnit = 'm',
  ) {
    super();
    this.proj = localProjection([origin.longitude, origin.latitude]);
  }

  override onAdd(map: L.Map): this {
    const canvas = L.DomUtil.create('canvas', 'brink-metric-grid', map.getContainer());
    canvas.setAttribute('aria-hidden', 'true');
    Object.assign(canvas.style, { position: 'absolute', left: '0', top: '0', zIndex: '100', pointerEvents: 'none' });
    this.canvas = canvas;
    map.on('move zoom resize viewreset zoomend', this.schedule, this);
    this.draw();
    return this;
  }

  override onRemove(map: L.Map): this {
    map.off('move zoom resize viewreset zoomend', this.schedule, this);
    cancelAnimationFrame(this.frame);
    this.canvas?.remove();
    this.canvas = null;
    return this;
  }

  private schedule(): void {
    cancelAnimationFrame(this.frame);
    this.frame = requestAnimationFrame(() => this.draw());
  }

  private draw(): void {
    const map = this._map;
    const canvas = this.canvas;
    if (!map || !canvas) return;
    const size = map.getSize();
    const ratio = window.devicePixelRatio || 1;
    canvas.width = Math.round(size.x * ratio);
    canvas.height = Math.round(size.y * ratio);
    canvas.style.width = `${size.x}px`;
    canvas.style.height = `${size.y}px`;
    const ctx = canvas.getContext('2d');
    if (!ctx) return;
    ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
    ctx.clearRect(0, 0, size.x, size.y);

    // Screen position of a site-local point (m east, m north of the origin).
    const toScreen = (x: number, y: number) => {
      const [lon, lat] = this.proj.toWgs84([x, y]);
      return map.latLngToContainerPoint([lat, lon]);
    };
    const toLocal = (px: number, py: number) => {
      const ll = map.containerPointToLatLng([px, py]);
      return this.proj.toLocal([ll.lng, ll.lat]);
    };
    const [x0, y1] = toLocal(0, 0);
    const [x1, y0] = toLocal(size.x, size.y);
    // Steps of a round number of metres, or of feet (the lines stand at k·step units of `unitM` metres).
    const unitM = this.unit === 'ft' ? FOOT : 1;
    const { step: stepUnits, labelEvery } = gridStep(unitM / metresPerPixel(map));
    const step = stepUnits * unitM;
    const yMid = (y0 + y1) / 2;
    const xMid = (x0 + x1) / 2;

    ctx.font = '12px "Source Sans 3", sans-serif';
    ctx.textBaseline = 'top';
    // One family of lines per axis: vertical lines at x = k·step (labelled E/W along the top),
    // horizontal lines at y = k·step (labelled N/S down the left side).
    const axes = [
      {
        from: x0,
        to: x1,
        at: (v: number) => Math.round(toScreen(v, yMid).x) + 0.5,
        line: (p: number) => [p, 0, p, size.y],
        label: (p: number) => [p + 3, 4],
        dirs: ['E', 'W'],
      },
      {
        from: y0,
        to: y1,
        at: (v: number) => Math.round(toScreen(xMid, v).y) + 0.5,
        line: (p: number) => [0, p, size.x, p],
        label: (p: number) => [4, p + 3],
        dirs: ['N', 'S'],
      },
    ] as const;
    for (const [n, axis] of axes.entries()) {
      for (let k = Math.ceil(axis.from / step); k * step <= axis.to; k++) {
        const v = k * step;
        const p = axis.at(v);
        ctx.strokeStyle = k === 0 ? 'rgba(30,42,51,0.75)' : k % 5 === 0 ? 'rgba(30,42,51,0.32)' : 'rgba(30,42,51,0.14)';
        ctx.lineWidth = k === 0 ? 1.5 : 1;
        const [ax, ay, bx, by] = axis.line(p);
        ctx.beginPath();
        ctx.moveTo(ax, ay);
        ctx.lineTo(bx, by);
        ctx.stroke();
        // The origin's own label is written once, on the vertical line.
        if (k % labelEvery === 0 && !(k === 0 && n === 1)) {
          const [lx, ly] = axis.label(p);
          ctx.fillStyle = 'rgba(30,42,51,0.8)';
          ctx.fillText(k === 0 ? '0' : `${gridLabel(k * stepUnits, this.unit)} ${v > 0 ? axis.dirs[0] : axis.dirs[1]}`, lx, ly);
        }
      }
    }
    const o = toScreen(0, 0);
    ctx.fillStyle = 'rgba(30,42,51,0.9)';
    ctx.fillText('Site origin', o.x + 5, o.y + 5);
  }
}
