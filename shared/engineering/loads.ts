/**
 * Turns each of the five load kinds into its effect on the support under the chosen method
 * (docs/calculation.md, "Loads", "Load spread at 45°" and "Elastic solutions"), and names every simplification applied as a warning.
 *
 * Units: pressures in kPa, line forces in kN/m, point forces in kN, lengths in m.
 * Blanket loads give K(z)·q over 0..H in both methods. Sources: see dispersion.ts and elastic.ts.
 */
import { areaFactor, DEFAULT_PAD, dispersionBand, LINE_LOAD_WIDTH } from './dispersion';
import { elasticStrip, navfacLine, navfacPoint, restraintFactor } from './elastic';
import type { SoilModel } from './soil';
import { accumulateEach, NO_EDGES, type SurchargeEffect } from './surcharge';
import type { BlanketLoad, Load, Method, PlacedLoad, Restraint } from './types';

class BlanketEffect implements SurchargeEffect {
  readonly force: number;
  readonly moment: number;
  readonly top = 0;
  readonly bottom: number;
  readonly edges = NO_EDGES;
  constructor(
    private readonly model: SoilModel,
    private readonly pressure: number,
  ) {
    this.force = pressure * model.kForce;
    this.moment = pressure * model.kMoment;
    this.bottom = model.H;
  }
  pressureAt(_z: number, layer: number): number {
    return this.model.layers[layer].K * this.pressure;
  }
  accumulate(z: ArrayLike<number>, layer: ArrayLike<number>, out: Float64Array): void {
    accumulateEach(this, z, layer, out);
  }
}

export function blanketEffect(model: SoilModel, pressure: number): SurchargeEffect {
  return new BlanketEffect(model, pressure);
}

export interface MethodOptions {
  method: Method;
  restraint: Restraint;
}

/** Effect of a placed (non-blanket) load at a given offset (m), without warnings. */
export function placedEffect(model: SoilModel, opts: MethodOptions, load: PlacedLoad, offset: number): SurchargeEffect {
  const H = model.H;
  if (opts.method === 'dispersion-45') {
    switch (load.kind) {
      case 'strip':
        return dispersionBand(model, load.pressure, load.width, offset, 1);
      case 'line':
        return dispersionBand(model, load.force / LINE_LOAD_WIDTH, LINE_LOAD_WIDTH, offset, 1);
      case 'area':
        return dispersionBand(model, load.pressure, load.width, offset, areaFactor(load.length, offset));
      case 'point': {
        const B = load.padWidth ?? DEFAULT_PAD;
        const L = load.padLength ?? DEFAULT_PAD;
        return dispersionBand(model, load.force / (B * L), B, offset, areaFactor(L, offset));
      }
    }
  }
  const r = restraintFactor(opts.restraint);
  switch (load.kind) {
    case 'strip':
    case 'area':
      return elasticStrip(load.pressure, offset, load.width, H, r);
    case 'line':
      return navfacLine(load.force, offset, H, r);
    case 'point':
      return navfacPoint(load.force, offset, H, r);
  }
}

export function loadEffect(model: SoilModel, opts: MethodOptions, load: Load): SurchargeEffect {
  return load.kind === 'blanket' ? blanketEffect(model, load.pressure) : placedEffect(model, opts, load, load.offset);
}

export function isBlanket(load: Load): load is BlanketLoad {
  return load.kind === 'blanket';
}

/** Warnings for the simplifications the method applies to this load (not those depending on the result). */
export function loadWarnings(model: SoilModel, opts: MethodOptions, load: Load): string[] {
  const out: string[] = [];
  if (load.kind === 'blanket') return out;
  const H = model.H;
  if (opts.method === 'dispersion-45') {
    if (load.offset >= H) {
      out.push(
        `load ${load.id}: at ${load.offset} m from the face it is beyond the reach of a 45° spread to formation (H = ${H} m) and adds no pressure`,
      );
    }
    if (load.kind === 'line') out.push(`load ${load.id}: line load analysed as a strip ${LINE_LOAD_WIDTH} m wide`);
    if (load.kind === 'point') {
      if (load.padWidth === undefined || load.padLength === undefined) {
        out.push(
          `load ${load.id}: point load spread over a pad of ${load.padWidth ?? DEFAULT_PAD} m × ${load.padLength ?? DEFAULT_PAD} m (default pad side ${DEFAULT_PAD} m)`,
        );
      } else {
        out.push(`load ${load.id}: point load analysed as an area load on its pad`);
      }
    }
  } else {
    if (load.kind === 'area') {
      out.push(`load ${load.id}: area load analysed as a strip of the same width and unlimited length (conservative)`);
    }
    if (load.kind === 'point' && (load.padWidth !== undefined || load.padLength !== undefined)) {
      out.push(`load ${load.id}: the elastic point-load formula ignores the pad size`);
    }
  }
  return out;
}
