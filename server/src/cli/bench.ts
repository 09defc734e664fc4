/**
 * `npm run bench`: medians over repeated runs of the calculation, printed beside the targets of
 * issue 3: one check with 10 loads (H = 3 m, step 0.05 m) ≤ 50 µs; one standoff solve ≤ 2 ms; a whole
 * site of 200 excavations and 500 placed loads (geometry, the cumulative check of every excavation
 * and the standoff of every load within an influence zone) ≤ 1 s. Prints figures; asserts nothing.
 */
import type { Polygon } from 'geojson';
import { cpus, loadavg } from 'node:os';
import { median } from './stats';
import { runCheck, solveStandoff, type CheckRequest, type Load, type Method, type PlacedLoad } from '@shared/engineering';
import {
  boundsGap,
  boundsOf,
  GeometryError,
  influenceZone,
  localProjection,
  measureLoad,
  prepareExcavation,
  type ExcavationShape,
  type FootprintShape,
  type LonLat,
  type XY,
} from '@shared/geometry';

interface Timing {
  /** Median wall-clock seconds per call. */
  wall: number;
  /** Median processor seconds per call (this process only: not counting time other programs ran). */
  cpu: number;
}

/** Medians per call over `rounds` timed batches of `batch` calls each. */
function time(fn: () => unknown, batch: number, rounds: number): Timing {
  for (let i = 0; i < batch; i++) fn(); // warm up
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < rounds; r++) {
    const c0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    for (let i = 0; i < batch; i++) fn();
    wall.push(Number(process.hrtime.bigint() - t0) / 1e9 / batch);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1e6 / batch);
  }
  return { wall: median(wall), cpu: median(cpu) };
}

function fmt(seconds: number): string {
  if (seconds < 1e-3) return `${(seconds * 1e6).toFixed(1)} µs`;
  if (seconds < 1) return `${(seconds * 1e3).toFixed(2)} ms`;
  return `${seconds.toFixed(2)} s`;
}

function row(label: string, t: Timing, target: number | null, note = ''): void {
  const verdict = target === null ? '(no target)' : t.wall <= target ? 'meets' : 'MISSES';
  const goal = target === null ? '' : `target ≤ ${fmt(target)}`;
  console.log(`${label.padEnd(64)} ${fmt(t.wall).padStart(10)}  (cpu ${fmt(t.cpu).padStart(9)})  ${goal.padEnd(17)} ${verdict}`);
  if (note) console.log(`${''.padEnd(66)}${note}`);
}

/** Deterministic pseudo-random numbers (a linear congruential generator). */
function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

function baseRequest(method: Method, loads: Load[], depth = 3): CheckRequest {
  return {
    excavation: {
      depth,
      groundwaterDepth: 2,
      designSurcharge: 10,
      ratedPressure: 60,
      pressureState: 'active',
      wallFriction: 0,
      restraint: 'unyielding',
    },
    soil: [
      { top: 0, unitWeight: 18, frictionAngle: 32, cohesion: 0 },
      { top: 1.2, unitWeight: 19, saturatedUnitWeight: 20, frictionAngle: 28, cohesion: 2 },
    ],
    method,
    minimumClearance: 0.6,
    step: 0.05,
    loads,
  };
}

function tenLoads(): Load[] {
  return [
    { id: 'traffic', kind: 'blanket', pressure: 5 },
    { id: 'footing', kind: 'strip', pressure: 60, width: 1, offset: 1.1 },
    { id: 'wall', kind: 'line', force: 15, offset: 2.3 },
    { id: 'mat', kind: 'area', pressure: 40, width: 2, length: 3, offset: 0.7 },
    { id: 'outrigger', kind: 'point', force: 120, offset: 1.6, padWidth: 0.6, padLength: 0.6 },
    { id: 'spoil', kind: 'strip', pressure: 30, width: 2.5, offset: 0.9 },
    { id: 'wheel', kind: 'point', force: 40, offset: 0.8 },
    { id: 'fence', kind: 'line', force: 3, offset: 0.65 },
    { id: 'stack', kind: 'area', pressure: 20, width: 1.2, length: 1.2, offset: 2.7 },
    { id: 'road', kind: 'strip', pressure: 15, width: 4, offset: 3.2 },
  ];
}

interface Site {
  origin: LonLat;
  excavations: { shape: ExcavationShape; depth: number }[];
  footprints: { shape: FootprintShape; magnitude: number }[];
}

/** 200 excavations on a 20 × 10 grid 30 m apart (trenches and pits at random angles), 500 loads near them. */
function makeSite(seed: number): Site {
  const rand = rng(seed);
  const origin: LonLat = [-1.25, 52.5];
  const proj = localProjection(origin);
  const ll = (p: XY) => proj.toWgs84(p);
  const rot = (p: XY, c: XY, t: number): XY => [
    c[0] + p[0] * Math.cos(t) - p[1] * Math.sin(t),
    c[1] + p[0] * Math.sin(t) + p[1] * Math.cos(t),
  ];
  const rectangle = (c: XY, w: number, h: number, t: number): Polygon => {
    const pts = (
      [
        [-w / 2, -h / 2],
        [w / 2, -h / 2],
        [w / 2, h / 2],
        [-w / 2, h / 2],
      ] as XY[]
    ).map((p) => ll(rot(p, c, t)));
    return { type: 'Polygon', coordinates: [[...pts, pts[0]]] };
  };
  const excavations: Site['excavations'] = [];
  // Each excavation's frame: centre, angle, half length along and half width across.
  const frames: { c: XY; t: number; along: number; across: number }[] = [];
  for (let i = 0; i < 200; i++) {
    const c: XY = [(i % 20) * 30, Math.floor(i / 20) * 30];
    const t = rand() * Math.PI;
    const depth = 1.5 + rand() * 2.5;
    if (i % 2 === 0) {
      const half = 4 + rand() * 6;
      const width = 0.8 + rand() * 0.7;
      frames.push({ c, t, along: half, across: width / 2 });
      excavations.push({
        depth,
        shape: {
          kind: 'trench',
          width,
          centreLine: { type: 'LineString', coordinates: [ll(rot([-half, 0], c, t)), ll(rot([half, 0], c, t))] },
        },
      });
    } else {
      const w = 4 + rand() * 4;
      const h = 3 + rand() * 3;
      frames.push({ c, t, along: w / 2, across: h / 2 });
      excavations.push({ depth, shape: { kind: 'pit', outline: rectangle(c, w, h, t) } });
    }
  }
  const footprints: Site['footprints'] = [];
  for (let j = 0; j < 500; j++) {
    // Beside a random excavation, 0.3 m to 4.3 m out from its long side (most within its influence zone).
    const f = frames[Math.floor(rand() * frames.length)];
    const side = rand() < 0.5 ? -1 : 1;
    const p = rot([(rand() - 0.5) * 2 * f.along, side * (f.across + 0.3 + rand() * 4)], f.c, f.t);
    if (j % 3 === 0) {
      footprints.push({
        magnitude: 50 + rand() * 150,
        shape: { kind: 'point', position: { type: 'Point', coordinates: ll(p) }, padWidth: 0.6, padLength: 0.6 },
      });
    } else {
      footprints.push({
        magnitude: 10 + rand() * 50,
        shape: { kind: 'polygon', footprint: rectangle(p, 0.5 + rand() * 2, 0.5 + rand() * 2, rand() * Math.PI) },
      });
    }
  }
  return { origin, excavations, footprints };
}

interface SiteRun {
  placed: number;
  rejected: number;
  checks: number;
  standoffs: number;
  failing: number;
}

/** Everything from GeoJSON to the answers: the work a live site view does. */
function runSite(site: Site, method: Method, zones: boolean): SiteRun {
  const proj = localProjection(site.origin);
  const ex = site.excavations.map((e) => ({ ...e, outline: prepareExcavation(e.shape, proj) }));
  const feet = site.footprints.map((f) => {
    const pts: XY[] =
      f.shape.kind === 'point'
        ? [proj.toLocal(f.shape.position.coordinates)]
        : f.shape.footprint.coordinates[0].map((c) => proj.toLocal(c));
    return { ...f, bounds: boundsOf(pts) };
  });
  const run: SiteRun = { placed: 0, rejected: 0, checks: 0, standoffs: 0, failing: 0 };
  const rejected = new Set<number>();
  const perExcavation: Load[][] = ex.map(() => []);
  ex.forEach((e, i) => {
    feet.forEach((f, j) => {
      if (boundsGap(e.outline.bounds, f.bounds) >= e.depth) return;
      try {
        const p = measureLoad(e.outline, f.shape, proj);
        if (p.offset >= e.depth) return; // outside the influence zone
        const load: PlacedLoad =
          f.shape.kind === 'point'
            ? { id: `L${j}`, kind: 'point', force: f.magnitude, offset: p.offset, padWidth: p.width, padLength: p.length }
            : { id: `L${j}`, kind: 'area', pressure: f.magnitude, width: p.width, length: p.length, offset: p.offset };
        perExcavation[i].push(load);
      } catch (err) {
        if (!(err instanceof GeometryError)) throw err;
        rejected.add(j);
      }
    });
  });
  ex.forEach((e, i) => {
    const loads: Load[] = [{ id: 'traffic', kind: 'blanket', pressure: 5 }, ...perExcavation[i]];
    const r = runCheck(baseRequest(method, loads, Math.round(e.depth * 100) / 100));
    if (zones) influenceZone(e.outline, e.depth, proj);
    run.checks++;
    run.placed += perExcavation[i].length;
    run.standoffs += perExcavation[i].length;
    if (!r.passes) run.failing++;
  });
  run.rejected = rejected.size;
  return run;
}

function calcBench(): void {
  const load = loadavg()
    .map((x) => x.toFixed(1))
    .join(' ');
  console.log(`Brink calculation benchmark — Node ${process.version}, ${cpus().length} cores, load average ${load}`);
  console.log('Medians over repeated runs: wall-clock time per call (judged against the target), processor time beside it.\n');
  for (const method of ['dispersion-45', 'elastic'] as const) {
    const req = baseRequest(method, tenLoads());
    row(
      `one check, 10 loads, H = 3 m, step 0.05 m (${method})`,
      time(() => runCheck(req, { standoffs: false }), 200, 51),
      50e-6,
      'profile, forces, moments, utilisation',
    );
  }
  for (const method of ['dispersion-45', 'elastic'] as const) {
    const req = baseRequest(method, [{ id: 'traffic', kind: 'blanket', pressure: 5 }]);
    const loads: PlacedLoad[] = tenLoads().filter((l): l is PlacedLoad => l.kind !== 'blanket');
    let k = 0;
    const s = time(() => solveStandoff(req, loads[k++ % loads.length]), 50, 31);
    row(`one standoff solve, H = 3 m, rated pressure set (${method})`, s, 2e-3, 'median over the nine placed kinds above');
  }
  const site = makeSite(7);
  for (const method of ['dispersion-45', 'elastic'] as const) {
    let last: SiteRun | undefined;
    const s = time(() => (last = runSite(site, method, false)), 1, 7);
    const r = last as SiteRun;
    row(
      `whole site, 200 excavations, 500 loads (${method})`,
      s,
      1,
      `geometry from GeoJSON, ${r.placed} loads in influence zones, ${r.standoffs} standoffs, ${r.rejected} footprints rejected as overlapping, ${r.failing} of ${r.checks} checks failing`,
    );
  }
  const withZones = time(() => runSite(site, 'dispersion-45', true), 1, 5);
  row(
    'whole site as above plus its 200 influence-zone outlines (dispersion-45)',
    withZones,
    1,
    'the GeoJSON zone polygons for the map as well',
  );
}

/**
 * Parts: `calc` (above), `api` (benchApi.ts) and `web` (benchWeb.ts); all three by default, or name
 * them: `npm run bench -- api web`. The api and web parts need the throw-away database and the
 * build that docker-less-scripts/bench.sh makes (`npm run bench` runs it). `large` (benchLarge.ts,
 * only when named) reads the seed:large data set that bench.sh makes (or LARGE_DATABASE_URL names).
 * `drag` (only when named): the web part's drag measurement alone, BRINK_BENCH_DRAGS drags (default 5).
 */
async function main(): Promise<void> {
  const asked = process.argv.slice(2).filter((a) => !a.startsWith('-'));
  const parts = asked.length ? asked : ['calc', 'api', 'web'];
  if (parts.includes('calc')) calcBench();
  if (parts.includes('api')) await (await import('./benchApi')).runApiBench();
  if (parts.includes('web')) await (await import('./benchWeb')).runWebBench();
  if (parts.includes('drag')) await (await import('./benchWeb')).runDragBench();
  if (parts.includes('large')) await (await import('./benchLarge')).runLargeBench();
  console.log(
    `\nload average at the end: ${loadavg()
      .map((x) => x.toFixed(1))
      .join(' ')} (other programs on this machine skew the times; the ratios less)`,
  );
}

await main();
