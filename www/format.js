// Doublespar page: numbers as the user types them and as the page shows them, for all of the
// page's modules.
//
// The rules are those of the core's src/numfmt.rs (its header states them): both are tested
// against the same table of cases, tests/format/cases.json (here by tests/e2e/format.test.mjs),
// so that the page's text and the drawn views cannot drift apart. In short: at most
// MAX_DRAWN_CHARS characters per number (sign excluded), plain for decimal exponents −4 to 6,
// else m×10ⁿ; the typographic minus; one length unit per table or view, chosen from its largest
// value; "no power" below NO_POWER; no azimuth for circular light.
//
// Contract: `readNumber(raw)` gives a finite number, or the raw text so that the core names the
// field in its type error (a typographic minus reads as '-'); `minus(s)` writes a leading '-' as
// the typographic minus; `fixed(v, digits, floor)` fixed decimals, values below `floor` in
// magnitude shown as 0; `significant(v, n)` (also `sig`) n significant digits; `tick(v, step)`;
// `lengthUnitFor(maxMm)` → {symbol, perMm}; `lengthIn(mm, unit, n)`; `power(v, n)`;
// `showsAzimuth(chiDeg)`; `fmt` the result formats by kind of quantity ('—' for null);
// `unitWord(unit)` the spoken name of a unit symbol, for aria-labels.

const MINUS = '\u2212';
const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** The most characters a number may take, its sign excluded (as in src/numfmt.rs). */
export const MAX_DRAWN_CHARS = 8;
/** Below this power (fraction of the input) a ray or spot carries no power. */
export const NO_POWER = 1e-12;
/** |χ| within this of 45° reads as circular (two decimals): no azimuth is shown. */
export const CIRCULAR_WITHIN_DEG = 0.005;

/** A finite number, or the raw string so that the core names the field in a type error. */
export function readNumber(raw) {
  const t = raw.trim().replace(/\u2212/g, '-');
  if (NUMBER_RE.test(t)) {
    const v = Number(t);
    if (Number.isFinite(v)) return v;
  }
  return raw;
}

export function minus(s) {
  return s.charAt(0) === '-' ? MINUS + s.slice(1) : s;
}

function signed(negative, body) {
  return negative ? MINUS + body : body;
}

/** The digits of |v| rounded to n significant digits, and the exponent of the first. */
function digitsAndExponent(v, n) {
  const [m, e] = Math.abs(v).toExponential(n - 1).split('e');
  return [m.replace('.', ''), Number(e)];
}

function plainDigits(d, e) {
  if (e >= 0) {
    const intLen = e + 1;
    return d.length <= intLen ? d + '0'.repeat(intLen - d.length) : `${d.slice(0, intLen)}.${d.slice(intLen)}`;
  }
  return `0.${'0'.repeat(-e - 1)}${d}`;
}

const SUPERSCRIPTS = { '-': '⁻', 0: '⁰', 1: '¹', 2: '²', 3: '³', 4: '⁴', 5: '⁵', 6: '⁶', 7: '⁷', 8: '⁸', 9: '⁹' };
function superscript(e) {
  return [...String(e)].map((c) => SUPERSCRIPTS[c] ?? c).join('');
}

/** n significant digits, plain for exponents −4 to 6, else m×10ⁿ; at most MAX_DRAWN_CHARS. */
export function sig(v, n) {
  if (v === null || v === undefined) return '—';
  if (typeof v !== 'number') return String(v);
  if (Number.isNaN(v)) return 'NaN';
  if (!Number.isFinite(v)) return signed(v < 0, '∞');
  if (v === 0) return '0';
  n = Math.min(17, Math.max(1, Math.floor(n)));
  const [, e0] = digitsAndExponent(v, n);
  if (e0 >= -4 && e0 <= 6) {
    for (let k = n; k >= 1; k -= 1) {
      const [d, e] = digitsAndExponent(v, k);
      const p = plainDigits(d, e);
      if ([...p].length <= MAX_DRAWN_CHARS || k === 1) return signed(v < 0, p);
    }
  }
  for (let k = n; k >= 1; k -= 1) {
    const [d, e] = digitsAndExponent(v, k);
    const m = d.length > 1 ? `${d[0]}.${d.slice(1)}` : d;
    const s = `${m}×10${superscript(e)}`;
    if ([...s].length <= MAX_DRAWN_CHARS || k === 1) return signed(v < 0, s);
  }
  return '';
}

/** The same as sig (the older name, kept for the page's modules). */
export function significant(v, n) {
  return sig(v, n);
}

/** Fixed decimals; values below `floor` in magnitude are shown as 0; long ones go through sig. */
export function fixed(v, digits, floor = 0) {
  if (v === null || v === undefined) return '—';
  if (typeof v !== 'number') return String(v);
  if (!Number.isFinite(v) || Math.abs(v) >= 1e7) return sig(v, digits + 1);
  const x = Math.abs(v) < floor ? 0 : v;
  const s = x.toFixed(Math.min(digits, 12));
  const body = s.charAt(0) === '-' ? s.slice(1) : s;
  const negative = s.charAt(0) === '-' && /[1-9]/.test(body);
  if ([...body].length > MAX_DRAWN_CHARS) return sig(x, digits + 1);
  return signed(negative, body);
}

/** A tick label at v for ticks `step` apart: the digits the step needs, through sig. */
export function tick(v, step) {
  if (!(Number.isFinite(step) && step > 0) || !Number.isFinite(v)) return sig(v, 3);
  if (Math.abs(v) < 1e-9 * step) return '0';
  const top = Number(v.toExponential().split('e')[1]);
  const bottom = Math.floor(Math.log10(step) + 1e-9);
  const n = Math.min(17, Math.max(1, top - bottom + 1));
  return sig(v, n);
}

const LENGTH_UNITS = {
  nm: { symbol: 'nm', perMm: 1e6 },
  µm: { symbol: 'µm', perMm: 1e3 },
  mm: { symbol: 'mm', perMm: 1 },
  m: { symbol: 'm', perMm: 1e-3 },
};

/** The length unit in which the largest magnitude `maxMm` reads between 1 and 1000. */
export function lengthUnitFor(maxMm) {
  const a = Math.abs(maxMm);
  if (!Number.isFinite(a) || a === 0) return LENGTH_UNITS.mm;
  if (a < 0.9995e-3) return LENGTH_UNITS.nm;
  if (a < 0.9995) return LENGTH_UNITS['µm'];
  if (a < 999.5) return LENGTH_UNITS.mm;
  return LENGTH_UNITS.m;
}

/** The unit for the largest magnitude among `values` (mm for none). */
export function lengthUnitForValues(values) {
  let m = 0;
  for (const v of values) if (typeof v === 'number' && Number.isFinite(v)) m = Math.max(m, Math.abs(v));
  return lengthUnitFor(m);
}

/** A unit by its symbol ('nm', 'µm' or 'um', 'mm', 'm'). */
export function lengthUnit(symbol) {
  return LENGTH_UNITS[symbol === 'um' ? 'µm' : symbol];
}

/** A length given in mm, in `unit` with n significant digits: "0.998 mm". */
export function lengthIn(mm, unit, n) {
  if (mm === null || mm === undefined) return '—';
  return `${sig(mm * unit.perMm, n)} ${unit.symbol}`;
}

/** A power (fraction of the input), or "no power" below NO_POWER. */
export function power(v, n) {
  if (v === null || v === undefined) return '—';
  return Math.abs(v) < NO_POWER ? 'no power' : sig(v, n);
}

/** False for circular light (|χ| within CIRCULAR_WITHIN_DEG of 45°): it has no azimuth. */
export function showsAzimuth(chiDeg) {
  return !(45 - Math.abs(chiDeg) < CIRCULAR_WITHIN_DEG);
}

export const fmt = {
  index: (v) => fixed(v, 6),
  deg: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4, 5e-13)}°`),
  ellipseDeg: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 2, 5e-13)}°`),
  // A length alone in its place, in its own unit (5 digits); below 1 pm, the rounding of a zero.
  mm: (v) => {
    if (v === null || v === undefined) return '—';
    if (Math.abs(v) < 1e-9) return '0 mm';
    return lengthIn(v, lengthUnitFor(v), 5);
  },
  power: (v) => {
    if (v === null || v === undefined) return '—';
    if (Math.abs(v) < NO_POWER) return 'no power';
    if (Math.abs(v) >= 1e-3) return fixed(v, 4);
    return sig(v, 3);
  },
  rad: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4, 5e-13)} rad`),
  waves: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4, 5e-13)} waves`),
  dop: (v) => fixed(v, 4, 5e-13),
  // A group delay given in ps: in fs below 1 ps, 4 significant digits.
  delay: (v) => {
    if (v === null || v === undefined) return '—';
    return Math.abs(v) < 1 ? `${sig(v * 1000, 4)} fs` : `${sig(v, 4)} ps`;
  },
  text: (v) => (v === null || v === undefined ? '—' : String(v)),
  labels: (v) => (Array.isArray(v) ? v.map((x) => x || '(no crystal)').join(' + ') : String(v)),
};

export function unitWord(unit) {
  return { '°': 'degrees', nm: 'nanometres', mm: 'millimetres', waves: 'waves', ps: 'picoseconds', fs: 'femtoseconds', '°C': 'degrees Celsius' }[unit] ?? unit;
}
