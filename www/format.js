// Doublespar page: numbers as the user types them and as the page shows them, for all of the
// page's modules.
//
// Contract: `readNumber(raw)` gives a finite number, or the raw text so that the core names the
// field in its type error (a typographic minus reads as '-'); `minus(s)` writes a leading '-' as
// the typographic minus; `fixed(v, digits, floor)` fixed decimals, values below `floor` in
// magnitude shown as 0; `significant(v, n)` n significant digits, plain in the usual range and
// a×10ⁿ outside it; `fmt` the result formats by kind of quantity ('—' for null); `unitWord(unit)`
// the spoken name of a unit symbol, for aria-labels.

const MINUS = '\u2212';
const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

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

function plainNumber(v, digits) {
  let s = v.toFixed(digits);
  if (/^-0(?:\.0*)?$/.test(s)) s = s.slice(1);
  return minus(s);
}

/** Fixed decimals; values below `floor` in magnitude are shown as 0. */
export function fixed(v, digits, floor = 0) {
  if (v === null || v === undefined) return '—';
  if (typeof v !== 'number') return String(v);
  if (!Number.isFinite(v)) return String(v);
  return plainNumber(Math.abs(v) < floor ? 0 : v, digits);
}

/** Significant digits with plain notation in the usual range and a×10ⁿ outside it. */
export function significant(v, n) {
  if (v === null || v === undefined) return '—';
  if (typeof v !== 'number' || !Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-4 && a < 1e7) {
    const digits = Math.max(0, n - 1 - Math.floor(Math.log10(a)));
    return plainNumber(v, Math.min(digits, 12));
  }
  const [m, e] = v.toExponential(n - 1).split('e');
  return `${minus(m)}×10${superscript(e)}`;
}

const SUPERSCRIPTS = { '-': '⁻', '+': '', 0: '⁰', 1: '¹', 2: '²', 3: '³', 4: '⁴', 5: '⁵', 6: '⁶', 7: '⁷', 8: '⁸', 9: '⁹' };
function superscript(s) {
  return [...s].map((c) => SUPERSCRIPTS[c] ?? c).join('');
}

export const fmt = {
  index: (v) => fixed(v, 6),
  deg: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4, 5e-13)}°`),
  ellipseDeg: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 2, 5e-13)}°`),
  mm: (v) => {
    if (v === null || v === undefined) return '—';
    if (Math.abs(v) < 1e-9) return '0 mm';
    if (Math.abs(v) >= 1e-3) return `${fixed(v, 4)} mm`;
    return `${significant(v, 3)} mm`;
  },
  power: (v) => {
    if (v === null || v === undefined) return '—';
    if (Math.abs(v) < 1e-15) return '0';
    if (Math.abs(v) >= 1e-3) return fixed(v, 4);
    return significant(v, 3);
  },
  rad: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4, 5e-13)} rad`),
  waves: (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4, 5e-13)} waves`),
  dop: (v) => fixed(v, 4, 5e-13),
  text: (v) => (v === null || v === undefined ? '—' : String(v)),
  labels: (v) => (Array.isArray(v) ? v.map((x) => x || '(no crystal)').join(' + ') : String(v)),
};

export function unitWord(unit) {
  return { '°': 'degrees', nm: 'nanometres', mm: 'millimetres', waves: 'waves' }[unit] ?? unit;
}
