// Doublespar page: a stack card's custom dispersion formula (the crystal's `dispersion`), entered
// compactly: the validity range, and for the o and e axes the constant A, up to three Sellmeier
// terms (B, C) and the infrared term D of n² = A + Σ B λ²/(λ² − C) − D λ² (λ in µm, C in µm²).
// The values stay in the card while another material is chosen, so nothing entered is lost. A
// loaded formula the compact entry cannot show (x, y, z; poles; more terms) is kept and sent as
// loaded; members it does not show (fitted_in, citation) are carried along.
// Contract: the class's methods below (DEVELOPERS.md, "Custom dispersion on the page").

import { h, setAttr } from './dom.js';
import { Field, errorSlot } from './field-error.js';

const AXES = [['o', 'ordinary (o)'], ['e', 'extraordinary (e)']];
const TERMS = 3;
// A starting formula that traces at once: calcite's published coefficients (G. Ghosh, Opt.
// Commun. 163, 95 (1999)), as the catalogue holds them.
const START = {
  range_nm: [204, 2172],
  o: { a: 1.73358749, sellmeier: [[0.96464345, 0.0194325203], [1.82831454, 120]] },
  e: { a: 1.35859695, sellmeier: [[0.8242783, 0.0106689543], [0.14429128, 120]] },
};

/** Paths with no control of their own. */
export const FORMULA_GROUPS = {
  'elements[].dispersion': 'Dispersion formula',
  'elements[].dispersion.range_nm': 'Formula range',
  'elements[].dispersion.o': 'Formula for o',
  'elements[].dispersion.e': 'Formula for e',
  'elements[].dispersion.o.sellmeier': 'Sellmeier terms for o',
  'elements[].dispersion.e.sellmeier': 'Sellmeier terms for e',
};

const isObject = (v) => v !== null && typeof v === 'object' && !Array.isArray(v);
const only = (o, keys) => Object.keys(o).every((k) => keys.includes(k));

/** Whether the compact entry shows all of a loaded `dispersion` (its other members aside). */
function fits(d) {
  if (!isObject(d) || 'x' in d || 'y' in d || 'z' in d) return false;
  return AXES.every(([axis]) => {
    const f = d[axis];
    if (f === undefined) return true;
    if (!isObject(f) || !only(f, ['a', 'sellmeier', 'ir'])) return false;
    const s = f.sellmeier ?? [];
    return Array.isArray(s) && s.length <= TERMS && s.every((p) => Array.isArray(p) && p.length === 2);
  });
}

export class CardFormula {
  constructor() {
    const num = (key, label, spoken, unit = '') => new Field({ key, label, spoken, unit, step: 0.001 });
    this.lo = num('dispersion.range_nm[0]', 'From', 'Formula valid from', 'nm');
    this.hi = num('dispersion.range_nm[1]', 'to', 'Formula valid to', 'nm');
    this.axes = {};
    this.slots = { dispersion: errorSlot(null), 'dispersion.range_nm': errorSlot(null) };
    const groups = AXES.map(([axis, title]) => {
      const p = `dispersion.${axis}`;
      const a = num(`${p}.a`, 'A', `${axis}: A`);
      const terms = [];
      for (let i = 0; i < TERMS; i += 1) {
        terms.push([num(`${p}.sellmeier[${i}][0]`, `B${i + 1}`, `${axis}: B${i + 1}`), num(`${p}.sellmeier[${i}][1]`, `C${i + 1}`, `${axis}: C${i + 1}`, 'µm²')]);
      }
      const ir = num(`${p}.ir`, 'D', `${axis}: D, infrared term`, 'µm⁻²');
      this.axes[axis] = { a, terms, ir };
      this.slots[p] = errorSlot(null);
      this.slots[`${p}.sellmeier`] = errorSlot(null);
      return h('div', { className: 'subgroup formula-axis' },
        h('p', { className: 'subgroup-title', text: title }),
        h('div', { className: 'pair-grid' }, a.row, ir.row, ...terms.flat().map((f) => f.row)),
        this.slots[`${p}.sellmeier`], this.slots[p]);
    });
    this.fields = [this.lo, this.hi, ...Object.values(this.axes).flatMap((x) => [x.a, x.ir, ...x.terms.flat()])];
    this.entry = h('div', {},
      h('p', { className: 'hint', text: 'n² = A + Σ B λ²/(λ² − C) − D λ², λ in µm; blank terms are left out.' }),
      h('div', { className: 'pair-grid' }, this.lo.row, this.hi.row), this.slots['dispersion.range_nm'], ...groups);
    this.keptNote = h('p', { className: 'hint', text: 'The formula as loaded (principal axes x, y, z, poles or more terms than shown here) is kept and sent as it is.' });
    this.box = h('div', { className: 'subgroup custom-formula' }, this.entry, this.keptNote, this.slots.dispersion);
    this.load(START);
  }

  /** Whether the formula kept as loaded gives principal axes x, y, z. */
  isBiaxial() {
    return isObject(this.asLoaded) && ('x' in this.asLoaded || 'y' in this.asLoaded || 'z' in this.asLoaded);
  }

  /** The range as entered, for the material note. */
  range() {
    const r = this.asLoaded === null ? [this.lo.value, this.hi.value] : this.asLoaded.range_nm;
    return Array.isArray(r) ? r : [];
  }

  /** `p` is the card's path, `whose` "element 2". */
  setIndex(p, whose) {
    for (const f of this.fields) f.setPath(`${p}.${f.key}`, whose);
    for (const [rel, slot] of Object.entries(this.slots)) setAttr(slot, 'data-error-for', `${p}.${rel}`);
  }

  /** Loads a `dispersion` member, tolerating anything (a bad value stays, to be named). */
  load(d) {
    this.asLoaded = fits(d) ? null : d;
    this.extra = {};
    this.entry.hidden = this.asLoaded !== null;
    this.keptNote.hidden = this.asLoaded === null;
    if (this.asLoaded !== null) return;
    for (const [k, v] of Object.entries(d)) {
      if (!['range_nm', 'o', 'e'].includes(k)) this.extra[k] = v;
    }
    const range = Array.isArray(d.range_nm) ? d.range_nm : [d.range_nm, ''];
    this.lo.set(range[0] ?? '');
    this.hi.set(range[1] ?? '');
    for (const [axis] of AXES) {
      const f = d[axis] ?? {};
      const x = this.axes[axis];
      x.a.set(f.a ?? '');
      x.ir.set(f.ir ?? '');
      x.terms.forEach(([b, c], i) => {
        const pair = (f.sellmeier ?? [])[i] ?? ['', ''];
        b.set(pair[0]);
        c.set(pair[1]);
      });
    }
  }

  /** The `dispersion` member: blank trailing terms and a blank D left out, a blank A sent for
   * the core to name. */
  write() {
    if (this.asLoaded !== null) return this.asLoaded;
    const d = { range_nm: [this.lo.value, this.hi.value] };
    for (const [axis] of AXES) {
      const x = this.axes[axis];
      const f = { a: x.a.value };
      const used = x.terms.map(([b, c]) => !b.blank || !c.blank).lastIndexOf(true) + 1;
      if (used > 0) f.sellmeier = x.terms.slice(0, used).map(([b, c]) => [b.value, c.value]);
      if (!x.ir.blank) f.ir = x.ir.value;
      d[axis] = f;
    }
    return { ...d, ...this.extra };
  }
}
