// Doublespar page: a stack card's custom dispersion formula (the crystal's `dispersion`), entered
// compactly: the validity range, the form (uniaxial: o and e; biaxial: principal axes x, y, z)
// and for each axis of the form the constant A, up to three Sellmeier terms (B, C) and the
// infrared term D of n² = A + Σ B λ²/(λ² − C) − D λ² (λ in µm, C in µm²), with the axis's
// temperature data (a constant dn/dT and the linear expansion along it, both optional). The values stay in the
// card while another material or the other form is chosen, so nothing entered is lost; a form
// chosen for the first time starts from the other's formulas (x and y from o, z from e; back, o
// from x and e from z), so that it traces at once. A loaded formula the compact entry cannot show
// (both forms at once; poles; more terms) is kept and sent as loaded; members it does not show
// (fitted_in, citation) are carried along.
// Contract: the class's methods below (DEVELOPERS.md, "Custom dispersion on the page").

import { h, setAttr } from './dom.js';
import { Field, errorSlot } from './field-error.js';

const FORMS = {
  uniaxial: [['o', 'ordinary (o)'], ['e', 'extraordinary (e)']],
  biaxial: [['x', 'principal axis x'], ['y', 'principal axis y'], ['z', 'principal axis z']],
};
const AXES = [...FORMS.uniaxial, ...FORMS.biaxial];
const NAMES = AXES.map(([axis]) => axis);
// Where a form chosen with all its fields blank takes its formulas from: axis -> other form's axis.
const START_FROM = { x: 'o', y: 'o', z: 'e', o: 'x', e: 'z' };
const TERMS = 3;
// Each axis's optional temperature data, 1/K: a constant dn/dT and the expansion along the axis.
const THERMAL = ['dn_dt_per_k', 'expansion_per_k'];
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
  ...Object.fromEntries(NAMES.flatMap((axis) => [
    [`elements[].dispersion.${axis}`, `Formula for ${axis}`],
    [`elements[].dispersion.${axis}.sellmeier`, `Sellmeier terms for ${axis}`],
  ])),
};

const isObject = (v) => v !== null && typeof v === 'object' && !Array.isArray(v);
const only = (o, keys) => Object.keys(o).every((k) => keys.includes(k));

/** The form a loaded `dispersion` gives: "biaxial" with any of x, y, z, else "uniaxial". */
const formOf = (d) => (['x', 'y', 'z'].some((k) => k in d) ? 'biaxial' : 'uniaxial');

/** Whether the compact entry shows all of a loaded `dispersion` (its other members aside). */
function fits(d) {
  if (!isObject(d)) return false;
  if (['o', 'e'].some((k) => k in d) && formOf(d) === 'biaxial') return false;
  return NAMES.every((axis) => {
    const f = d[axis];
    if (f === undefined) return true;
    if (!isObject(f) || !only(f, ['a', 'sellmeier', 'ir', ...THERMAL])) return false;
    const s = f.sellmeier ?? [];
    return Array.isArray(s) && s.length <= TERMS && s.every((p) => Array.isArray(p) && p.length === 2);
  });
}

export class CardFormula {
  constructor() {
    const num = (key, label, spoken, unit = '') => new Field({ key, label, spoken, unit, step: 0.001 });
    this.lo = num('dispersion.range_nm[0]', 'From', 'Formula valid from', 'nm');
    this.hi = num('dispersion.range_nm[1]', 'to', 'Formula valid to', 'nm');
    // The form is a choice of which members the `dispersion` object holds, so its control
    // carries the object's own path (its error slot takes the object's messages).
    this.form = new Field({ key: 'dispersion',
      label: 'Dispersion formula',
      kind: 'select',
      options: [['uniaxial', 'uniaxial: o and e'], ['biaxial', 'biaxial: x, y and z']],
      hint: 'Biaxial: one formula per principal axis; the orientation then takes a roll.' });
    for (const type of ['input', 'change']) this.form.input.addEventListener(type, () => this.showForm(true));
    this.axes = {};
    this.groups = {};
    this.slots = { dispersion: errorSlot(null), 'dispersion.range_nm': errorSlot(null) };
    for (const [axis, title] of AXES) {
      const p = `dispersion.${axis}`;
      const a = num(`${p}.a`, 'A', `${axis}: A`);
      const terms = [];
      for (let i = 0; i < TERMS; i += 1) {
        terms.push([num(`${p}.sellmeier[${i}][0]`, `B${i + 1}`, `${axis}: B${i + 1}`), num(`${p}.sellmeier[${i}][1]`, `C${i + 1}`, `${axis}: C${i + 1}`, 'µm²')]);
      }
      const ir = num(`${p}.ir`, 'D', `${axis}: D, infrared term`, 'µm⁻²');
      const dnDt = new Field({ key: `${p}.dn_dt_per_k`, label: 'dn/dT', spoken: `${axis}: dn/dT, per kelvin`, unit: '/K', step: 1e-6, placeholder: 'none' });
      const alpha = new Field({ key: `${p}.expansion_per_k`, label: 'Expansion', spoken: `${axis}: linear expansion along the axis, per kelvin`, unit: '/K', step: 1e-6, placeholder: 'none' });
      const thermal = { dn_dt_per_k: dnDt, expansion_per_k: alpha };
      this.axes[axis] = { a, terms, ir, thermal, fields: [a, ir, ...terms.flat(), dnDt, alpha] };
      this.slots[p] = errorSlot(null);
      this.slots[`${p}.sellmeier`] = errorSlot(null);
      this.groups[axis] = h('div', { className: 'subgroup formula-axis' },
        h('p', { className: 'subgroup-title', text: title }),
        h('div', { className: 'pair-grid' }, a.row, ir.row, ...terms.flat().map((f) => f.row), dnDt.row, alpha.row),
        this.slots[`${p}.sellmeier`], this.slots[p]);
    }
    this.fields = [this.lo, this.hi, this.form, ...Object.values(this.axes).flatMap((x) => x.fields)];
    this.entry = h('div', {},
      h('p', { className: 'hint', text: 'n² = A + Σ B λ²/(λ² − C) − D λ², λ in µm; blank terms are left out. dn/dT and the expansion along each axis move the crystal away from 20 °C; blank: none.' }),
      h('div', { className: 'pair-grid' }, this.lo.row, this.hi.row), this.slots['dispersion.range_nm'], this.form.row,
      ...Object.values(this.groups));
    this.keptNote = h('p', { className: 'hint', text: 'The formula as loaded (both o, e and x, y, z, poles or more terms than shown here) is kept and sent as it is.' });
    this.box = h('div', { className: 'subgroup custom-formula' }, this.entry, this.keptNote, this.slots.dispersion);
    this.load(START);
  }

  /** Whether the formula gives principal axes x, y, z (as entered, or as kept when loaded). */
  isBiaxial() {
    if (this.asLoaded === null) return this.form.value === 'biaxial';
    return isObject(this.asLoaded) && formOf(this.asLoaded) === 'biaxial';
  }

  /** The axes of the chosen form, e.g. ['o', 'e']. */
  shownAxes() {
    return (FORMS[this.form.value] ?? FORMS.uniaxial).map(([axis]) => axis);
  }

  /** Shows the chosen form's axes; chosen by the user (`start`) with all its fields blank, the
   * form starts from the other's formulas. */
  showForm(start = false) {
    const shown = this.shownAxes();
    if (start && shown.every((axis) => this.axes[axis].fields.every((f) => f.blank))) {
      for (const axis of shown) {
        const from = this.axes[START_FROM[axis]];
        this.axes[axis].fields.forEach((f, i) => f.set(from.fields[i].input.value));
      }
    }
    for (const [axis, g] of Object.entries(this.groups)) {
      const hide = !shown.includes(axis);
      if (g.hidden !== hide) g.hidden = hide;
    }
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

  /** Loads a `dispersion` member, tolerating anything (a bad value stays, to be named). The
   * fields of the form it does not give keep what they hold. */
  load(d) {
    this.asLoaded = fits(d) ? null : d;
    this.extra = {};
    this.entry.hidden = this.asLoaded !== null;
    this.keptNote.hidden = this.asLoaded === null;
    if (this.asLoaded !== null) return;
    for (const [k, v] of Object.entries(d)) {
      if (k !== 'range_nm' && !NAMES.includes(k)) this.extra[k] = v;
    }
    const range = Array.isArray(d.range_nm) ? d.range_nm : [d.range_nm, ''];
    this.lo.set(range[0] ?? '');
    this.hi.set(range[1] ?? '');
    this.form.set(formOf(d));
    for (const axis of this.shownAxes()) {
      const f = d[axis] ?? {};
      const x = this.axes[axis];
      x.a.set(f.a ?? '');
      x.ir.set(f.ir ?? '');
      x.terms.forEach(([b, c], i) => {
        const pair = (f.sellmeier ?? [])[i] ?? ['', ''];
        b.set(pair[0]);
        c.set(pair[1]);
      });
      for (const k of THERMAL) x.thermal[k].set(f[k] ?? '');
    }
    this.showForm();
  }

  /** The `dispersion` member in the chosen form: blank trailing terms and a blank D left out, a
   * blank A sent for the core to name. */
  write() {
    if (this.asLoaded !== null) return this.asLoaded;
    const d = { range_nm: [this.lo.value, this.hi.value] };
    for (const axis of this.shownAxes()) {
      const x = this.axes[axis];
      const f = { a: x.a.value };
      const used = x.terms.map(([b, c]) => !b.blank || !c.blank).lastIndexOf(true) + 1;
      if (used > 0) f.sellmeier = x.terms.slice(0, used).map(([b, c]) => [b.value, c.value]);
      if (!x.ir.blank) f.ir = x.ir.value;
      for (const k of THERMAL) if (!x.thermal[k].blank) f[k] = x.thermal[k].value;
      d[axis] = f;
    }
    return { ...d, ...this.extra };
  }
}
