/**
 * Units at the edges (docs/calculation.md, "Units"). The engine, the API and the database work in SI
 * (m, kN, kPa, kN/m, kN/m³); a person who works in US customary units reads and types feet and pounds,
 * and this module converts, formats and parses at the screen, the e-mail, the CSV, the printed permit
 * and the command line. Nothing else converts.
 *
 * Factors: NIST Special Publication 811 (2008 edition), Guide for the Use of the International System of
 * Units, Appendix B. The foot and the inch are exact by definition (1959 international yard and pound);
 * the pound-force is exact too, 0.45359237 kg × 9.80665 m/s² (standard acceleration of gravity), so
 * every factor below is derived from these three exactly, never rounded from a table.
 */

import { cautionFor } from './caution';
import type { ProfilePoint } from './engineering/types';

export const unitSystems = ['metric', 'us'] as const;
export type UnitSystem = (typeof unitSystems)[number];
export const unitSystemLabels: Record<UnitSystem, string> = {
  metric: 'Metric (m, kN, kPa)',
  us: 'US customary (ft, lbf, psf)',
};

/** 1 ft in metres, exact (NIST SP 811, B.8: foot). */
export const FOOT = 0.3048;
/** 1 in in metres, exact (NIST SP 811, B.8: inch). */
export const INCH = 0.0254;
/** 1 mi (statute mile, 5280 ft) in feet, for distances across a site's surroundings. */
const MILE = 5280;
/** 1 lbf in newtons, exact: 0.45359237 kg × 9.80665 m/s² (NIST SP 811, B.8: pound-force). */
export const POUND_FORCE = 0.45359237 * 9.80665;
/** 1 kip = 1000 lbf, in newtons (NIST SP 811, B.8: kip). */
export const KIP = 1000 * POUND_FORCE;
/** 1 lb (avoirdupois pound, a mass) in tonnes, exact (NIST SP 811, B.8: pound (avoirdupois)). */
const POUND_MASS_T = 0.45359237e-3;

/**
 * SI value of one of each unit, in Brink's SI units for the quantity (m, kPa, kN, kN/m, kN/m³, kN·m/m).
 */
const SI_PER = {
  length: { m: 1, mm: 0.001, cm: 0.01, ft: FOOT, in: INCH },
  pressure: {
    kPa: 1,
    psf: POUND_FORCE / FOOT ** 2 / 1000,
    ksf: KIP / FOOT ** 2 / 1000,
    psi: POUND_FORCE / INCH ** 2 / 1000,
  },
  force: { kN: 1, lbf: POUND_FORCE / 1000, kip: KIP / 1000 },
  lineForce: { 'kN/m': 1, 'lbf/ft': POUND_FORCE / FOOT / 1000, 'kip/ft': KIP / FOOT / 1000 },
  unitWeight: { 'kN/m³': 1, pcf: POUND_FORCE / FOOT ** 3 / 1000 },
  /** Moment per run of support: kN·m/m; lbf·ft/ft (= lbf). */
  moment: { 'kN·m/m': 1, 'lbf·ft/ft': POUND_FORCE / 1000, 'kip·ft/ft': KIP / 1000 },
  /**
   * A machine's operating mass, in tonnes; the short ton is 2000 lb (NIST SP 811, B.8: ton, short).
   * A weight typed in lbf or kip is the mass it weighs under standard gravity: 1 lbf ↔ 1 lb exactly
   * (the pound-force is defined so), 1 kip ↔ 1000 lb.
   */
  mass: { t: 1, kg: 0.001, lb: POUND_MASS_T, 'short ton': 2000 * POUND_MASS_T, kip: 1000 * POUND_MASS_T },
} as const;

export type Quantity = keyof typeof SI_PER;
type UnitOf<Q extends Quantity> = keyof (typeof SI_PER)[Q] & string;

/** The SI value of `value` given in `unit`. */
export function toSI<Q extends Quantity>(quantity: Q, value: number, unit: UnitOf<Q>): number {
  return value * (SI_PER[quantity] as Record<string, number>)[unit];
}

/** `si` (Brink's SI unit for the quantity) expressed in `unit`. */
export function fromSI<Q extends Quantity>(quantity: Q, si: number, unit: UnitOf<Q>): number {
  return si / (SI_PER[quantity] as Record<string, number>)[unit];
}

/** What each system shows, and to what precision (the last figure shown). */
const DISPLAY: Record<UnitSystem, { [Q in Quantity]: { unit: UnitOf<Q>; step: number } }> = {
  metric: {
    length: { unit: 'm', step: 0.01 },
    pressure: { unit: 'kPa', step: 0.1 },
    force: { unit: 'kN', step: 0.1 },
    lineForce: { unit: 'kN/m', step: 0.1 },
    unitWeight: { unit: 'kN/m³', step: 0.1 },
    moment: { unit: 'kN·m/m', step: 0.1 },
    mass: { unit: 't', step: 0.1 },
  },
  us: {
    length: { unit: 'ft', step: 0.1 },
    pressure: { unit: 'psf', step: 1 },
    force: { unit: 'kip', step: 0.01 },
    lineForce: { unit: 'lbf/ft', step: 1 },
    unitWeight: { unit: 'pcf', step: 1 },
    moment: { unit: 'lbf·ft/ft', step: 1 },
    mass: { unit: 'lb', step: 100 },
  },
};

/** The unit a system shows a quantity in (e.g. `ft`, `psf`), for labels and table heads. */
export function unitLabel(quantity: Quantity, system: UnitSystem): string {
  return DISPLAY[system][quantity].unit;
}

/** The value in the system's display unit, unrounded (for inputs and the command line). */
export function inSystem(quantity: Quantity, si: number, system: UnitSystem): number {
  return fromSI(quantity, si, DISPLAY[system][quantity].unit as never);
}

/** A pressure profile as a diagram in `system` draws it: depths in m or ft, pressures in kPa or psf. */
export function profileIn(profile: readonly ProfilePoint[], system: UnitSystem): ProfilePoint[] {
  const p = (kPa: number) => inSystem('pressure', kPa, system);
  return profile.map((x) => ({
    z: inSystem('length', x.z, system),
    soil: p(x.soil),
    water: p(x.water),
    surcharge: p(x.surcharge),
    total: p(x.total),
    allowance: p(x.allowance),
  }));
}

/** The SI value of a number given in the system's display unit. */
export function fromSystem(quantity: Quantity, value: number, system: UnitSystem): number {
  return toSI(quantity, value, DISPLAY[system][quantity].unit as never);
}

type Rounding = 'nearest' | 'up' | 'down';

function decimals(step: number): number {
  return step >= 1 ? 0 : Math.round(-Math.log10(step));
}

/**
 * `value` rounded to a multiple of `step`. `up` rounds away from the hazard: a standoff or a clearance
 * shown in feet must never read less than the distance the check asks for (8.2021 ft → 8.3 ft); `down`
 * states a figure that falls short of one rounded up (a refused standoff) without reaching it.
 * A tiny tolerance keeps exact conversions (2 ft = 0.6096 m) from creeping up a step.
 */
export function roundTo(value: number, step: number, rounding: Rounding = 'nearest'): number {
  const n = value / step;
  const k = rounding === 'up' ? Math.ceil(n - 1e-9) : rounding === 'down' ? Math.floor(n + 1e-9) : Math.round(n);
  return Number((k * step).toFixed(decimals(step)));
}

export interface FormatOptions {
  /** `up` for figures that keep people back (standoffs, clearances, zones); `down` for one that falls short of them. */
  rounding?: Rounding;
  /** US lengths as feet and whole inches (`8 ft 3 in`) instead of decimal feet. */
  feetInches?: boolean;
  /** Leave the unit off (a table whose head names it). */
  bare?: boolean;
}

/** One formatter per number of places, made once: `toLocaleString` with options builds a new one on every call. */
const formatters = new Map<number, Intl.NumberFormat>();
const grouped = (value: number, places: number) => {
  let f = formatters.get(places);
  if (!f) formatters.set(places, (f = new Intl.NumberFormat('en-US', { minimumFractionDigits: places, maximumFractionDigits: places })));
  return f.format(value);
};

/**
 * A figure as the person reads it: `2.50 m`, `8.3 ft`, `8 ft 3 in`, `20.0 kPa`, `418 psf`,
 * `11.24 kip`, `1,370 lbf/ft`, `121 pcf`. `si` is in Brink's SI unit for the quantity.
 */
export function formatQuantity(quantity: Quantity, si: number, system: UnitSystem, options: FormatOptions = {}): string {
  const { rounding = 'nearest', feetInches = false, bare = false } = options;
  if (system === 'us' && quantity === 'length' && feetInches) {
    const inches = roundTo(si / INCH, 1, rounding);
    const sign = inches < 0 ? '-' : '';
    const abs = Math.abs(inches);
    const ft = Math.floor(abs / 12);
    const inch = abs - ft * 12;
    if (ft === 0) return `${sign}${inch} in`;
    return inch === 0 ? `${sign}${ft} ft` : `${sign}${ft} ft ${inch} in`;
  }
  const { unit, step } = DISPLAY[system][quantity];
  const value = displayValue(quantity, si, system, rounding);
  const text = grouped(value === 0 ? 0 : value, decimals(step));
  return bare ? text : `${text} ${unit}`;
}

/** The figure `formatQuantity` shows, as a number (a CSV cell, whose column head names the unit): 2.5 m → 8.2 in US units. */
function displayValue(quantity: Quantity, si: number, system: UnitSystem, rounding: Rounding = 'nearest'): number {
  const { unit, step } = DISPLAY[system][quantity];
  return roundTo(fromSI(quantity, si, unit as never), step, rounding);
}

/** Lengths, the commonest case: `formatLength(2.5, 'us', { rounding: 'up' })` → `8.3 ft`. */
export function formatLength(metres: number, system: UnitSystem, options: FormatOptions = {}): string {
  return formatQuantity('length', metres, system, options);
}

export interface Figures {
  system: UnitSystem;
  /** A length in metres as the person reads it; `up` for standoffs, clearances and zones. */
  length: (m: number, options?: FormatOptions) => string;
  pressure: (kPa: number, options?: FormatOptions) => string;
  /** A point load (kN). */
  force: (kN: number, options?: FormatOptions) => string;
  /** A line load or a force per run of support (kN/m). */
  lineForce: (kNm: number, options?: FormatOptions) => string;
  unitWeight: (kNm3: number, options?: FormatOptions) => string;
  moment: (kNmm: number, options?: FormatOptions) => string;
  /** A machine's operating mass (t): `21.0 t`, `46,300 lb`. */
  mass: (t: number, options?: FormatOptions) => string;
  /** The unit shown for a quantity (`ft`, `psf`), for labels and table heads. */
  unit: (q: Quantity) => string;
  /** The figure shown, as a number in that unit (a CSV cell). */
  value: (q: Quantity, si: number, rounding?: Rounding) => number;
  /** A sentence written in SI (a warning, a refusal) restated in the person's units. */
  words: (text: string) => string;
  /** The caution in the person's units (US: names OSHA 29 CFR 1926 Subpart P). */
  caution: string;
}

/** Figures in a given system: the one formatter every screen, e-mail, CSV file and printed page uses at its edge. */
export function figuresIn(system: UnitSystem): Figures {
  const f = (q: Quantity) => (si: number, options?: FormatOptions) => formatQuantity(q, si, system, options);
  return {
    system,
    length: f('length'),
    pressure: f('pressure'),
    force: f('force'),
    lineForce: f('lineForce'),
    unitWeight: f('unitWeight'),
    moment: f('moment'),
    mass: f('mass'),
    unit: (q) => unitLabel(q, system),
    value: (q, si, rounding) => displayValue(q, si, system, rounding),
    words: (text) => localizeWords(text, system),
    caution: cautionFor(system),
  };
}

// ---------------------------------------------------------------------------------------------
// Parsing what people type

/** Spellings accepted for each unit, lower case, spaces removed. */
const SPELLINGS: { [Q in Quantity]: Record<string, UnitOf<Q>> } = {
  length: {
    m: 'm',
    metre: 'm',
    metres: 'm',
    meter: 'm',
    meters: 'm',
    mm: 'mm',
    cm: 'cm',
    ft: 'ft',
    foot: 'ft',
    feet: 'ft',
    "'": 'ft',
    '′': 'ft',
    in: 'in',
    inch: 'in',
    inches: 'in',
    '"': 'in',
    '″': 'in',
  },
  pressure: {
    kpa: 'kPa',
    'kn/m2': 'kPa',
    'kn/m²': 'kPa',
    psf: 'psf',
    'lb/ft2': 'psf',
    'lbf/ft2': 'psf',
    'lb/ft²': 'psf',
    'lbf/ft²': 'psf',
    ksf: 'ksf',
    'kip/ft2': 'ksf',
    'kip/ft²': 'ksf',
    psi: 'psi',
    'lb/in2': 'psi',
    'lbf/in2': 'psi',
  },
  force: { kn: 'kN', lbf: 'lbf', lb: 'lbf', lbs: 'lbf', kip: 'kip', kips: 'kip' },
  lineForce: {
    'kn/m': 'kN/m',
    'lbf/ft': 'lbf/ft',
    'lb/ft': 'lbf/ft',
    plf: 'lbf/ft',
    'kip/ft': 'kip/ft',
    'kips/ft': 'kip/ft',
    klf: 'kip/ft',
  },
  unitWeight: {
    'kn/m3': 'kN/m³',
    'kn/m³': 'kN/m³',
    pcf: 'pcf',
    'lb/ft3': 'pcf',
    'lbf/ft3': 'pcf',
    'lb/ft³': 'pcf',
    'lbf/ft³': 'pcf',
  },
  moment: { 'kn·m/m': 'kN·m/m', 'knm/m': 'kN·m/m', 'lbf·ft/ft': 'lbf·ft/ft', 'kip·ft/ft': 'kip·ft/ft' },
  mass: {
    t: 't',
    tonne: 't',
    tonnes: 't',
    kg: 'kg',
    lb: 'lb',
    lbs: 'lb',
    lbf: 'lb',
    kip: 'kip',
    kips: 'kip',
    ton: 'short ton',
    tons: 'short ton',
  },
};

const EXAMPLES: Record<Quantity, string> = {
  length: '2.5 m, 2 ft 6 in, 2.5 ft or 30 in',
  pressure: '20 kPa, 500 psf or 0.5 ksf',
  force: '45 kN, 10 kip or 2000 lbf',
  lineForce: '30 kN/m, 2 kip/ft or 500 lbf/ft',
  unitWeight: '19 kN/m³ or 120 pcf',
  moment: '15 kN·m/m or 3000 lbf·ft/ft',
  mass: '21 t, 46,300 lb, 46.3 kip or 23 tons',
};

type Parsed = { ok: true; value: number } | { ok: false; reason: string };

const TERM = new RegExp(
  String.raw`^([+-]?(?:\d{1,3}(?:,\d{3})+(?:\.\d+)?|\d+(?:\.\d+)?|\.\d+))\s*` +
    String.raw`([a-zA-Z²³'"′″·]+(?:\s*\/\s*[a-zA-Z]+[23²³]?)?)?`,
);

/**
 * Reads a figure typed in either system and returns it in Brink's SI unit for the quantity.
 * A bare number is in the person's system (`system`): feet, psf, kip, lbf/ft or pcf for US customary.
 * Lengths may add terms, largest first: `2 ft 6 in`, `2' 6"`, `2'-6"`, `2 ft 6`, `1 m 20 cm`.
 * Anything else is refused with the reason and an example (the form puts the field's label in front).
 */
export function parseQuantity(text: string, quantity: Quantity, system: UnitSystem): Parsed {
  const fail: Parsed = { ok: false, reason: `must be a number, with a unit if you like: ${EXAMPLES[quantity]}` };
  let rest = text.trim();
  if (rest === '') return { ok: false, reason: 'is required' };
  const spellings = SPELLINGS[quantity] as Record<string, string>;
  const size = SI_PER[quantity] as Record<string, number>;
  let total = 0;
  let lastUnit: string | null = null;
  while (rest !== '') {
    // `2'-6"`: a dash between feet and inches separates them; it is not a sign.
    if (lastUnit !== null) rest = rest.replace(/^-\s*/, '');
    const m = TERM.exec(rest);
    if (!m) return fail;
    const value = Number(m[1].replace(/,/g, ''));
    const spelt = (m[2] ?? '').replace(/\s+/g, '').toLowerCase();
    let unit: string;
    if (spelt === '') {
      if (lastUnit === 'ft' && quantity === 'length')
        unit = 'in'; // `2 ft 6`
      else if (lastUnit !== null) return fail;
      else unit = DISPLAY[system][quantity].unit;
    } else {
      const known = spellings[spelt];
      if (!known) return { ok: false, reason: `has a unit Brink does not know here ("${m[2]}"): write ${EXAMPLES[quantity]}` };
      unit = known;
    }
    // Only a length adds terms, each smaller than the one before (ft then in; m then cm or mm).
    if (lastUnit !== null && (quantity !== 'length' || !(size[unit] < size[lastUnit]))) return fail;
    total += toSI(quantity, value, unit as never);
    lastUnit = unit;
    rest = rest.slice(m[0].length).trim();
  }
  return Number.isFinite(total) ? { ok: true, value: total } : fail;
}

/**
 * The text an input starts with for a saved SI figure: plain digits in the system's display unit,
 * to a precision that reads back to the same SI figure within half the display step
 * (2.5 m → `8.2` ft shown, `8.202` kept so that saving unchanged does not move the load).
 */
export function inputText(quantity: Quantity, si: number | null | undefined, system: UnitSystem): string {
  if (si === null || si === undefined || !Number.isFinite(si)) return '';
  const value = inSystem(quantity, si, system);
  return String(Number(value.toFixed(4)));
}

/**
 * Which way a figure in a sentence is rounded, from the words before it, so that a limit restated in
 * other units is never on the wrong side of itself: a least value (`at least`, `more than`,
 * `minimum clearance of`, the first of `between … and …`) rounds up, a greatest (`at most`, `less than`,
 * `up to`, the second of `between … and …`) rounds down; typing back the figure shown is then accepted,
 * and a clearance never reads less than it is. Anything else rounds to the nearest.
 */
function limitRounding(before: string): Rounding {
  const b = before.slice(-60).toLowerCase();
  if (/between\s+\S+(?:\s+\S+)?\s+and\s*$/.test(b)) return 'down';
  if (/(?:at least|more than|no less than|minimum(?: clearance)? of|between|≥)\s*$/.test(b)) return 'up';
  if (/(?:at most|less than|no more than|up to|within|≤)\s*$/.test(b)) return 'down';
  return 'nearest';
}

/**
 * A sentence Brink wrote in SI (a warning, a refusal) as a person in `system` reads it: each figure
 * followed by m, kPa, kPa/m, kN, kN/m or kN/m³ is restated in US units (`1.20 m` → `3.94 ft`,
 * `5 kPa/m` → `32 psf/ft`), limits rounded on their safe side (`limitRounding`). Metric sentences come
 * back unchanged, and so does a sentence already in US units.
 */
export function localizeWords(text: string, system: UnitSystem): string {
  if (system === 'metric') return text;
  const NUM = String.raw`-?\d{1,3}(?:,\d{3})+(?:\.\d+)?|-?\d+(?:\.\d+)?`;
  const UNIT = String.raw`kPa\/m|kPa|kN\/m³|kN\/m|kN|km|m|t`;
  // `between 0.3 and 6 m`: the unit of the second figure is the first's too.
  const ranged = text.replace(
    new RegExp(String.raw`between (${NUM}) and (${NUM}) ?(${UNIT})(?![\w²³/·])`, 'g'),
    (_, a: string, b: string, unit: string) => `between ${a} ${unit} and ${b} ${unit}`,
  );
  return ranged.replace(
    new RegExp(String.raw`(${NUM}) ?(${UNIT})(?![\w²³/·])`, 'g'),
    (_, num: string, unit: string, at: number, whole: string) => {
      const v = Number(num.replace(/,/g, ''));
      const side = limitRounding(whole.slice(0, at));
      const us = (q: Quantity, step: number, places: number, label: string, scale = 1) =>
        `${grouped(roundTo(inSystem(q, v, 'us') * scale, step, side), places)} ${label}`;
      switch (unit) {
        case 'm':
          return us('length', 0.01, 2, 'ft');
        case 'kPa':
          return us('pressure', 1, 0, 'psf');
        case 'kPa/m':
          return us('pressure', 1, 0, 'psf/ft', FOOT);
        case 'kN':
          return us('force', 0.01, 2, 'kip');
        case 'kN/m':
          return us('lineForce', 1, 0, 'lbf/ft');
        case 't':
          return us('mass', 1, 0, 'lb');
        case 'km':
          // The statute mile, 5280 ft = 1609.344 m exactly (NIST SP 811, B.8: mile).
          return us('length', 0.01, 2, 'mi', 1000 / MILE);
        default:
          return us('unitWeight', 1, 0, 'pcf');
      }
    },
  );
}
