// Doublespar page: builds the controls, traces the scenario with the WebAssembly core on every
// edit, draws the six views and writes the results as text. No framework and no network access:
// the bindings module (pkg/doublespar.js, built by scripts/build-web.sh) is loaded here, and
// every other import is one of the page's own modules beside this file: the helpers (dom.js,
// format.js, field-error.js).
//
// Data flow: controls -> scenario object -> session.updateJson(text) -> result -> results text,
// canvases, aria-labels, URL fragment. A rejected scenario shows its message beside the control
// named by the error's field path and leaves the last good picture and results in place.
//
// Contract: DEVELOPERS.md, "The page" (data-field, data-error-for, data-quantity, data-view, the
// fragment, the file chooser) and the test hook window.doublespar = {session, redraw(),
// applyScenario(obj), designRequest(), designShown()}, set once the page is ready.

'use strict';

import { h, setAttr, setText, uid } from './dom.js';
import { fixed, fmt, minus, readNumber, significant, unitWord } from './format.js';
import { parentPath, toFieldError } from './field-error.js';

const MAX_ELEMENTS = 64;
const MAX_CRYSTALS = 12;
const ROW_LIMIT = 64; // rows of the ray and spot tables shown before "show all" (6 crystals)
const FRAGMENT_KEY = '#scenario=';
const FRAGMENT_INTERVAL_MS = 250; // at most four address updates a second while dragging

// Starting points besides the built-in demo (the same documents as examples/*.json).
const PRESETS = {
  recombiner: {
    version: 1,
    wavelength_nm: 1064,
    beam: { diameter_mm: 0.5, polarization: { kind: 'linear', azimuth_deg: 30 } },
    elements: [
      { kind: 'crystal', material: 'yvo4', thickness_mm: 8, axis: { tilt_deg: 45, azimuth_deg: 0 } },
      { kind: 'retarder', retardance_waves: 0.5, fast_axis_deg: 45, gap_mm: 2 },
      { kind: 'crystal', material: 'yvo4', thickness_mm: 8, axis: { tilt_deg: 45, azimuth_deg: 0 }, gap_mm: 2 },
    ],
  },
  'quarter-wave': {
    version: 1,
    wavelength_nm: 532,
    interface_losses: 'uncoated',
    beam: {
      diameter_mm: 2,
      incidence: { polar_deg: 8, azimuth_deg: 20 },
      polarization: { kind: 'linear', azimuth_deg: 45 },
    },
    elements: [
      { kind: 'crystal', material: 'quartz', thickness_mm: 0.0166, axis: { tilt_deg: 90, azimuth_deg: 0 } },
    ],
  },
};

// Defaults used when a new element is added or a loaded document leaves a field out.
const ELEMENT_DEFAULTS = {
  crystal: { material: 'calcite', thickness_mm: 10, tilt_deg: 45, azimuth_deg: 0, no: 1.6584, ne: 1.4864 },
  retarder: { retardance_waves: 0.25, fast_axis_deg: 0 },
  polarizer: { transmission_axis_deg: 0 },
  rotator: { angle_deg: 45 },
};
const KIND_NAMES = { crystal: 'crystal plate', retarder: 'retarder', polarizer: 'polarizer', rotator: 'rotator' };

let core = null; // the bindings module
let session = null;
let materialList = [];
let viewList = [];
const darkQuery = window.matchMedia('(prefers-color-scheme: dark)');

// ---------------------------------------------------------------------------------------------
// Never silently dead: internal errors go to #panic.

function showPanic(text) {
  const el = document.getElementById('panic');
  if (!el) return;
  const line = String(text);
  if (!el.hidden && el.textContent) {
    if (el.textContent.includes(line) || el.childElementCount > 4) return;
    const extra = document.createElement('span');
    extra.className = 'panic-extra';
    extra.textContent = line;
    el.appendChild(extra);
  } else {
    el.textContent = line;
  }
  el.hidden = false;
}

window.addEventListener('error', (ev) => {
  const what = ev.error && ev.error.message ? ev.error.message : ev.message;
  showPanic(`The page hit an error and may not update any more: ${what}. Reload the page; the link keeps your set-up.`);
});
window.addEventListener('unhandledrejection', (ev) => {
  const r = ev.reason;
  const what = r && r.message ? r.message : String(r);
  showPanic(`The page hit an error and may not update any more: ${what}. Reload the page; the link keeps your set-up.`);
});

// ---------------------------------------------------------------------------------------------
// Controls. Every control carries data-field (its contract path); every field has an error
// element with data-error-for (the same path) beside it.

/** How a loaded value is written into a text control. */
function asInputText(v) {
  if (v === undefined || v === null) return '';
  if (typeof v === 'number') return String(v);
  if (typeof v === 'string') return v;
  try {
    return JSON.stringify(v);
  } catch {
    return String(v);
  }
}

/** Fields whose path depends on where they sit (stack cards), renamed on reorder. */
class Field {
  constructor(key, { label, unit, slider, hint, kind = 'number', options, wide = false }) {
    this.key = key; // path relative to its owner
    this.kind = kind;
    const id = uid('f');
    this.input = null;
    this.range = null;
    this.unitEl = null;
    this.labelEl = h('label', { for: id, text: label });
    this.error = h('p', { className: 'field-error', id: `${id}-err`, hidden: true, 'aria-live': 'polite' });
    const control = h('div', { className: 'control' });
    if (kind === 'select') {
      this.input = h('select', { id, 'aria-describedby': `${id}-err` });
      for (const [value, text] of options) this.input.appendChild(h('option', { value, text }));
      control.appendChild(this.input);
    } else {
      this.input = h('input', {
        id,
        type: 'text',
        className: 'num',
        inputmode: 'decimal',
        autocomplete: 'off',
        spellcheck: 'false',
        'aria-describedby': `${id}-err`,
      });
      control.appendChild(this.input);
      if (unit) {
        this.unitEl = h('span', { className: 'unit', text: unit, 'aria-hidden': 'true' });
        control.appendChild(this.unitEl);
        this.input.setAttribute('aria-label', `${label} (${unitWord(unit)})`);
      }
    }
    this.row = h('div', { className: `field${slider ? ' has-slider' : ''}${wide ? ' wide' : ''}` }, this.labelEl, control);
    if (slider) {
      const rid = `${id}-range`;
      this.rangeLabel = h('label', { for: rid, className: 'visually-hidden', text: `${label} slider` });
      this.range = h('input', {
        id: rid,
        type: 'range',
        min: slider.min,
        max: slider.max,
        step: slider.step ?? 0.1,
        'aria-describedby': `${id}-err`,
      });
      this.row.appendChild(h('div', { className: 'slider' }, this.rangeLabel, this.range));
      this.input.range = this.range;
      this.range.num = this.input;
    }
    if (hint) this.row.appendChild(h('p', { className: 'hint', text: hint }));
    this.row.appendChild(this.error);
    this.label = label;
  }

  setPath(path, labelPrefix) {
    setAttr(this.input, 'data-field', path);
    if (this.range) setAttr(this.range, 'data-field', path);
    setAttr(this.error, 'data-error-for', path);
    if (labelPrefix !== undefined) {
      const full = `${this.label}, ${labelPrefix}`;
      if (this.unitEl) setAttr(this.input, 'aria-label', `${full} (${unitWord(this.unitEl.textContent)})`);
      else setAttr(this.input, 'aria-label', full);
      if (this.range) setAttr(this.range, 'aria-label', `${full}, slider`);
    }
  }

  get value() {
    return this.kind === 'select' ? this.input.value : readNumber(this.input.value);
  }

  set(v) {
    if (this.kind === 'select') {
      const text = asInputText(v);
      for (const o of this.input.querySelectorAll('option[data-extra]')) {
        if (o.value !== text) o.remove();
      }
      if (![...this.input.options].some((o) => o.value === text)) {
        // Keep a value the list does not know, so that the core can name it.
        this.input.appendChild(h('option', { value: text, text: `${text} (unknown)`, 'data-extra': 'true' }));
      }
      if (this.input.value !== text) this.input.value = text;
    } else {
      const text = asInputText(v);
      if (this.input.value !== text) {
        this.input.value = text;
        this.syncRange();
      }
    }
  }

  syncRange() {
    if (!this.range) return;
    const v = readNumber(this.input.value);
    if (typeof v === 'number' && this.range.value !== String(v)) this.range.value = String(v);
  }
}

const ANGLE = (min, max) => ({ min, max, step: 0.1 });

// Top-level controls, keyed by their contract path.
const top = {};

function addTop(container, path, field) {
  field.setPath(path);
  top[path] = field;
  container.appendChild(field.row);
  return field;
}

function buildTopControls() {
  const light = document.getElementById('light-fields');
  addTop(light, 'wavelength_nm', new Field('wavelength_nm', { label: 'Wavelength', unit: 'nm' }));
  addTop(light, 'outside_index', new Field('outside_index', { label: 'Outside index', unit: '', hint: 'Refractive index of the medium around and between the elements (1 to 5).' }));
  addTop(light, 'interface_losses', new Field('interface_losses', {
    label: 'Crystal faces',
    kind: 'select',
    options: [['ideal', 'ideal, no losses'], ['uncoated', 'uncoated, Fresnel']],
  }));
  addTop(light, 'beam.diameter_mm', new Field('beam.diameter_mm', { label: 'Beam diameter', unit: 'mm' }));

  const inc = document.getElementById('incidence-fields');
  inc.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam', hidden: true }));
  inc.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam.incidence', hidden: true }));
  addTop(inc, 'beam.incidence.polar_deg', new Field('polar_deg', { label: 'Polar angle', unit: '°', slider: ANGLE(-89.9, 89.9) }));
  addTop(inc, 'beam.incidence.azimuth_deg', new Field('azimuth_deg', { label: 'Azimuth', unit: '°', slider: ANGLE(-180, 180) }));

  const pol = document.getElementById('polarization-fields');
  pol.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam.polarization', hidden: true }));
  addTop(pol, 'beam.polarization.kind', new Field('kind', {
    label: 'Kind',
    kind: 'select',
    options: [
      ['linear', 'linear'],
      ['circular', 'circular'],
      ['elliptical', 'elliptical'],
      ['jones', 'Jones vector'],
      ['stokes', 'Stokes vector'],
      ['unpolarized', 'unpolarized'],
    ],
  }));
  const azimuth = addTop(pol, 'beam.polarization.azimuth_deg', new Field('azimuth_deg', {
    label: 'Azimuth', unit: '°', slider: ANGLE(-180, 180),
  }));
  const ellipticity = addTop(pol, 'beam.polarization.ellipticity_deg', new Field('ellipticity_deg', {
    label: 'Ellipticity angle', unit: '°', slider: ANGLE(-45, 45), hint: 'χ with tan χ = ±b/a; positive is right-handed (S3 > 0).',
  }));
  const handed = addTop(pol, 'beam.polarization.handedness', new Field('handedness', {
    label: 'Handedness',
    kind: 'select',
    options: [['right', 'right-handed (S3 > 0)'], ['left', 'left-handed (S3 < 0)']],
  }));

  const jones = h('div', { className: 'subgroup', role: 'group', 'aria-labelledby': 'jones-title' },
    h('p', { className: 'subgroup-title', id: 'jones-title', text: 'Jones vector on (e1, e2)' }));
  const jgrid = h('div', { className: 'pair-grid' });
  jones.appendChild(jgrid);
  const jLabels = [['Re E1', 0, 0], ['Im E1', 0, 1], ['Re E2', 1, 0], ['Im E2', 1, 1]];
  for (const [label, a, b] of jLabels) {
    addTop(jgrid, `beam.polarization.jones[${a}][${b}]`, new Field('', { label }));
  }
  jones.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam.polarization.jones[0]', hidden: true }));
  jones.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam.polarization.jones[1]', hidden: true }));
  jones.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam.polarization.jones', hidden: true }));
  jones.appendChild(h('p', { className: 'hint', text: 'Scaled to unit power; e1 and e2 are x̂ and ŷ at normal incidence.' }));
  pol.appendChild(jones);

  const stokes = h('div', { className: 'subgroup', role: 'group', 'aria-labelledby': 'stokes-title' },
    h('p', { className: 'subgroup-title', id: 'stokes-title', text: 'Stokes vector' }));
  const sgrid = h('div', { className: 'pair-grid' });
  stokes.appendChild(sgrid);
  for (let i = 0; i < 4; i += 1) {
    addTop(sgrid, `beam.polarization.stokes[${i}]`, new Field('', { label: `S${i}` }));
  }
  stokes.appendChild(h('p', { className: 'field-error', 'data-error-for': 'beam.polarization.stokes', hidden: true }));
  stokes.appendChild(h('p', { className: 'hint', text: 'Partially polarized light is allowed: √(S1² + S2² + S3²) ≤ S0. Scaled to S0 = 1.' }));
  pol.appendChild(stokes);

  const unpolarizedNote = h('p', { className: 'hint', text: 'Unpolarized light: no further settings.' });
  pol.appendChild(unpolarizedNote);

  polarizationParts = {
    linear: [azimuth.row],
    circular: [handed.row],
    elliptical: [azimuth.row, ellipticity.row],
    jones: [jones],
    stokes: [stokes],
    unpolarized: [unpolarizedNote],
  };
  polarizationAll = [azimuth.row, ellipticity.row, handed.row, jones, stokes, unpolarizedNote];

  // Values for the kinds not shown, so that switching kind starts from something sensible.
  azimuth.set(45);
  ellipticity.set(20);
  handed.set('right');
  top['beam.polarization.jones[0][0]'].set(1);
  top['beam.polarization.jones[0][1]'].set(0);
  top['beam.polarization.jones[1][0]'].set(0);
  top['beam.polarization.jones[1][1]'].set(1);
  top['beam.polarization.stokes[0]'].set(1);
  top['beam.polarization.stokes[1]'].set(0.5);
  top['beam.polarization.stokes[2]'].set(0);
  top['beam.polarization.stokes[3]'].set(0);
}

let polarizationParts = {};
let polarizationAll = [];

function showPolarizationKind() {
  const kind = top['beam.polarization.kind'].value;
  const shown = new Set(polarizationParts[kind] ?? []);
  for (const el of polarizationAll) {
    if (el.hidden !== !shown.has(el)) el.hidden = !shown.has(el);
  }
}

// ---------------------------------------------------------------------------------------------
// The stack: one card per element.

const cards = [];
const stackList = () => document.getElementById('stack-list');

class Card {
  constructor(kind) {
    this.uid = uid('card');
    this.el = h('li', { className: 'card', id: this.uid });
    this.el.card = this;
    const fs = h('fieldset', { className: 'card-body' });
    this.legend = h('legend', { className: 'card-number' });
    fs.appendChild(this.legend);

    this.kindField = new Field('kind', {
      label: 'Kind',
      kind: 'select',
      options: Object.entries(KIND_NAMES).map(([k, v]) => [k, v]),
    });
    this.kindField.row.classList.add('kind-row');
    this.up = h('button', { type: 'button', className: 'icon', 'data-action': 'up', text: '↑' });
    this.down = h('button', { type: 'button', className: 'icon', 'data-action': 'down', text: '↓' });
    this.remove = h('button', { type: 'button', className: 'icon danger', 'data-action': 'remove', text: '✕' });
    const head = h('div', { className: 'card-head' }, this.kindField.row, h('div', { className: 'card-tools' }, this.up, this.down, this.remove));
    fs.appendChild(head);
    this.cardError = h('p', { className: 'field-error', hidden: true });
    fs.appendChild(this.cardError);

    this.f = {};
    const f = this.f;
    f.gap = new Field('gap_mm', { label: 'Gap before', unit: 'mm' });

    // Crystal.
    const matOptions = materialList.map((m) => [m.key, m.name === m.key ? m.key : `${m.name}`]);
    matOptions.push(['custom', 'custom indices']);
    f.material = new Field('material', { label: 'Material', kind: 'select', options: matOptions });
    this.materialNote = h('p', { className: 'hint material-note' });
    f.material.row.insertBefore(this.materialNote, f.material.error);
    f.no = new Field('no', { label: 'nₒ, ordinary index', unit: '' });
    f.ne = new Field('ne', { label: 'nₑ, extraordinary index', unit: '' });
    this.customBox = h('div', { className: 'subgroup custom-indices' }, f.no.row, f.ne.row);
    f.thickness = new Field('thickness_mm', { label: 'Thickness', unit: 'mm' });
    f.tilt = new Field('axis.tilt_deg', { label: 'Axis tilt', unit: '°', slider: ANGLE(0, 180), hint: 'Cut angle: optic axis from the plate normal +z.' });
    f.azimuth = new Field('axis.azimuth_deg', { label: 'Axis azimuth', unit: '°', slider: ANGLE(-180, 180) });
    this.axisError = h('p', { className: 'field-error', hidden: true });
    const axisBox = h('div', { className: 'subgroup axis' }, h('p', { className: 'subgroup-title', text: 'Optic axis' }), f.tilt.row, f.azimuth.row, this.axisError);
    this.groups = {
      crystal: h('div', { className: 'kind-fields' }, f.material.row, this.customBox, f.thickness.row, axisBox),
    };

    // Retarder.
    f.retardance = new Field('retardance_waves', { label: 'Retardance', unit: 'waves' });
    f.fast = new Field('fast_axis_deg', { label: 'Fast axis', unit: '°', slider: ANGLE(-180, 180) });
    this.groups.retarder = h('div', { className: 'kind-fields' }, f.retardance.row, f.fast.row);
    // Polarizer.
    f.transmission = new Field('transmission_axis_deg', { label: 'Transmission axis', unit: '°', slider: ANGLE(-180, 180) });
    this.groups.polarizer = h('div', { className: 'kind-fields' }, f.transmission.row);
    // Rotator.
    f.angle = new Field('angle_deg', { label: 'Rotation', unit: '°', slider: ANGLE(-180, 180), hint: 'From e1 toward e2.' });
    this.groups.rotator = h('div', { className: 'kind-fields' }, f.angle.row);

    fs.appendChild(f.gap.row);
    for (const g of Object.values(this.groups)) fs.appendChild(g);
    this.el.appendChild(fs);

    const d = ELEMENT_DEFAULTS;
    f.gap.set(0);
    f.material.set(materialList.some((m) => m.key === d.crystal.material) ? d.crystal.material : (materialList[0]?.key ?? 'custom'));
    f.no.set(d.crystal.no);
    f.ne.set(d.crystal.ne);
    f.thickness.set(d.crystal.thickness_mm);
    f.tilt.set(d.crystal.tilt_deg);
    f.azimuth.set(d.crystal.azimuth_deg);
    f.retardance.set(d.retarder.retardance_waves);
    f.fast.set(d.retarder.fast_axis_deg);
    f.transmission.set(d.polarizer.transmission_axis_deg);
    f.angle.set(d.rotator.angle_deg);
    this.setKind(kind);
  }

  get kind() {
    return this.kindField.value;
  }

  setKind(kind) {
    this.kindField.set(kind);
    for (const [k, g] of Object.entries(this.groups)) {
      if (g.hidden !== (k !== this.kind)) g.hidden = k !== this.kind;
    }
    this.showMaterial();
  }

  showMaterial() {
    const key = this.f.material.value;
    if (this.customBox.hidden !== (key !== 'custom')) this.customBox.hidden = key !== 'custom';
    const m = materialList.find((x) => x.key === key);
    if (m) {
      setText(this.materialNote, `${m.sign} uniaxial · formula valid ${m.range_nm[0]}–${m.range_nm[1]} nm`);
      setAttr(this.materialNote, 'title', m.citation);
      this.materialNote.hidden = false;
    } else if (key === 'custom') {
      setText(this.materialNote, 'Fixed indices, no dispersion.');
      this.materialNote.removeAttribute('title');
      this.materialNote.hidden = false;
    } else {
      this.materialNote.hidden = true;
    }
  }

  setIndex(i, count) {
    this.index = i;
    const p = `elements[${i}]`;
    const n = i + 1;
    setText(this.legend, `Element ${n}`);
    this.kindField.setPath(`${p}.kind`, `element ${n}`);
    for (const field of Object.values(this.f)) field.setPath(`${p}.${field.key}`, `element ${n}`);
    setAttr(this.cardError, 'data-error-for', p);
    setAttr(this.axisError, 'data-error-for', `${p}.axis`);
    setAttr(this.up, 'aria-label', `Move element ${n} up`);
    setAttr(this.down, 'aria-label', `Move element ${n} down`);
    setAttr(this.remove, 'aria-label', `Remove element ${n}`);
    setAttr(this.up, 'title', `Move element ${n} up`);
    setAttr(this.down, 'title', `Move element ${n} down`);
    setAttr(this.remove, 'title', `Remove element ${n}`);
    this.up.disabled = i === 0;
    this.down.disabled = i === count - 1;
  }

  /** The element as a contract object, in the order the contract writes it. */
  build() {
    const f = this.f;
    const kind = this.kind;
    const o = { kind };
    if (kind === 'crystal') {
      if (f.material.value === 'custom') {
        o.no = f.no.value;
        o.ne = f.ne.value;
      } else {
        o.material = f.material.value;
      }
      o.thickness_mm = f.thickness.value;
      o.axis = { tilt_deg: f.tilt.value, azimuth_deg: f.azimuth.value };
    } else if (kind === 'retarder') {
      o.retardance_waves = f.retardance.value;
      o.fast_axis_deg = f.fast.value;
    } else if (kind === 'polarizer') {
      o.transmission_axis_deg = f.transmission.value;
    } else if (kind === 'rotator') {
      o.angle_deg = f.angle.value;
    }
    o.gap_mm = f.gap.value;
    return o;
  }

  /** Loads an element object, tolerating anything (a bad value stays visible for its error). */
  load(o) {
    const obj = o && typeof o === 'object' && !Array.isArray(o) ? o : {};
    const kind = Object.prototype.hasOwnProperty.call(KIND_NAMES, obj.kind) ? obj.kind : 'crystal';
    const f = this.f;
    const d = ELEMENT_DEFAULTS;
    f.gap.set(obj.gap_mm ?? 0);
    if (kind === 'crystal') {
      if (obj.material !== undefined) {
        f.material.set(obj.material);
      } else if (obj.no !== undefined || obj.ne !== undefined) {
        f.material.set('custom');
        f.no.set(obj.no);
        f.ne.set(obj.ne);
      }
      f.thickness.set(obj.thickness_mm);
      const axis = obj.axis && typeof obj.axis === 'object' ? obj.axis : {};
      f.tilt.set(axis.tilt_deg);
      f.azimuth.set(axis.azimuth_deg ?? 0);
    } else if (kind === 'retarder') {
      f.retardance.set(obj.retardance_waves ?? d.retarder.retardance_waves);
      f.fast.set(obj.fast_axis_deg ?? 0);
    } else if (kind === 'polarizer') {
      f.transmission.set(obj.transmission_axis_deg ?? 0);
    } else if (kind === 'rotator') {
      f.angle.set(obj.angle_deg);
    }
    this.setKind(kind);
  }
}

function renumberCards() {
  const n = cards.length;
  cards.forEach((c, i) => c.setIndex(i, n));
  const crystals = cards.filter((c) => c.kind === 'crystal').length;
  for (const b of document.querySelectorAll('[data-add]')) {
    b.disabled = n >= MAX_ELEMENTS || (b.dataset.add === 'crystal' && crystals >= MAX_CRYSTALS);
  }
}

function addCard(kind, obj) {
  const card = new Card(kind);
  if (obj) card.load(obj);
  cards.push(card);
  stackList().appendChild(card.el);
  return card;
}

/** Makes the cards match a list of element objects, reusing the cards already there. */
function loadCards(list) {
  const items = list.slice(0, MAX_ELEMENTS + 1);
  while (cards.length > items.length) cards.pop().el.remove();
  items.forEach((o, i) => {
    if (i < cards.length) cards[i].load(o);
    else addCard('crystal', o);
  });
  renumberCards();
}

function announce(text) {
  const el = document.getElementById('stack-status');
  if (el) el.textContent = text;
}

function onStackClick(ev) {
  const btn = ev.target.closest('button[data-action]');
  if (!btn) return;
  const card = btn.closest('li.card')?.card;
  if (!card) return;
  const i = cards.indexOf(card);
  const action = btn.dataset.action;
  if (action === 'up' && i > 0) {
    cards.splice(i, 1);
    cards.splice(i - 1, 0, card);
    stackList().insertBefore(card.el, cards[i].el);
    renumberCards();
    (card.up.disabled ? card.down : card.up).focus();
    announce(`Element ${i + 1} moved up to position ${i}.`);
  } else if (action === 'down' && i < cards.length - 1) {
    cards.splice(i, 1);
    cards.splice(i + 1, 0, card);
    stackList().insertBefore(card.el, cards[i + 2]?.el ?? null);
    renumberCards();
    (card.down.disabled ? card.up : card.down).focus();
    announce(`Element ${i + 1} moved down to position ${i + 2}.`);
  } else if (action === 'remove') {
    cards.splice(i, 1);
    card.el.remove();
    renumberCards();
    const next = cards[i] ?? cards[i - 1];
    if (next) next.remove.focus();
    else document.querySelector('[data-add="crystal"]').focus();
    announce(`Element ${i + 1} removed.`);
  } else {
    return;
  }
  schedule();
}

function onAddClick(ev) {
  const btn = ev.target.closest('button[data-add]');
  if (!btn || btn.disabled) return;
  const card = addCard(btn.dataset.add);
  renumberCards();
  const first = card.el.querySelector('.kind-fields:not([hidden]) input, .kind-fields:not([hidden]) select') ?? card.kindField.input;
  first.focus();
  card.el.scrollIntoView({ block: 'nearest' });
  announce(`Element ${cards.length} added: ${KIND_NAMES[btn.dataset.add]}.`);
  schedule();
}

// ---------------------------------------------------------------------------------------------
// Scenario <-> controls.

function buildScenario() {
  const v = (p) => top[p].value;
  const kind = v('beam.polarization.kind');
  let polarization;
  switch (kind) {
    case 'linear':
      polarization = { kind, azimuth_deg: v('beam.polarization.azimuth_deg') };
      break;
    case 'circular':
      polarization = { kind, handedness: v('beam.polarization.handedness') };
      break;
    case 'elliptical':
      polarization = { kind, azimuth_deg: v('beam.polarization.azimuth_deg'), ellipticity_deg: v('beam.polarization.ellipticity_deg') };
      break;
    case 'jones':
      polarization = {
        kind,
        jones: [
          [v('beam.polarization.jones[0][0]'), v('beam.polarization.jones[0][1]')],
          [v('beam.polarization.jones[1][0]'), v('beam.polarization.jones[1][1]')],
        ],
      };
      break;
    case 'stokes':
      polarization = { kind, stokes: [0, 1, 2, 3].map((i) => v(`beam.polarization.stokes[${i}]`)) };
      break;
    default:
      polarization = { kind };
  }
  return {
    version: 1,
    wavelength_nm: v('wavelength_nm'),
    outside_index: v('outside_index'),
    interface_losses: v('interface_losses'),
    beam: {
      diameter_mm: v('beam.diameter_mm'),
      incidence: { polar_deg: v('beam.incidence.polar_deg'), azimuth_deg: v('beam.incidence.azimuth_deg') },
      polarization,
    },
    elements: cards.map((c) => c.build()),
  };
}

function member(o, k) {
  return o && typeof o === 'object' && !Array.isArray(o) ? o[k] : undefined;
}

/** Writes a scenario object into the controls; missing fields take the contract's defaults. */
function loadControls(s) {
  const set = (p, v) => top[p].set(v);
  set('wavelength_nm', member(s, 'wavelength_nm') ?? 632.8);
  set('outside_index', member(s, 'outside_index') ?? 1);
  set('interface_losses', member(s, 'interface_losses') ?? 'ideal');
  const beam = member(s, 'beam');
  set('beam.diameter_mm', member(beam, 'diameter_mm') ?? 1);
  const inc = member(beam, 'incidence');
  set('beam.incidence.polar_deg', member(inc, 'polar_deg') ?? 0);
  set('beam.incidence.azimuth_deg', member(inc, 'azimuth_deg') ?? 0);
  const pol = member(beam, 'polarization') ?? { kind: 'linear', azimuth_deg: 45 };
  const kind = member(pol, 'kind') ?? 'linear';
  set('beam.polarization.kind', kind);
  if (kind === 'linear' || kind === 'elliptical') set('beam.polarization.azimuth_deg', member(pol, 'azimuth_deg') ?? 0);
  if (kind === 'elliptical') set('beam.polarization.ellipticity_deg', member(pol, 'ellipticity_deg'));
  if (kind === 'circular') set('beam.polarization.handedness', member(pol, 'handedness'));
  if (kind === 'jones') {
    const j = member(pol, 'jones');
    for (const a of [0, 1]) {
      for (const b of [0, 1]) {
        const row = Array.isArray(j) ? j[a] : undefined;
        set(`beam.polarization.jones[${a}][${b}]`, Array.isArray(row) ? row[b] : undefined);
      }
    }
  }
  if (kind === 'stokes') {
    const st = member(pol, 'stokes');
    for (let i = 0; i < 4; i += 1) set(`beam.polarization.stokes[${i}]`, Array.isArray(st) ? st[i] : undefined);
  }
  showPolarizationKind();
  const els = member(s, 'elements');
  loadCards(Array.isArray(els) ? els : []);
}

// ---------------------------------------------------------------------------------------------
// Errors beside their controls.

let errorShown = false;

function visibleErrorTarget(path) {
  for (let p = path.replace(/\.$/, ''); p !== null; p = parentPath(p)) {
    for (const el of document.querySelectorAll(`[data-error-for="${CSS.escape(p)}"]`)) {
      if (el.id === 'scenario-error') continue;
      if (!el.parentElement || el.parentElement.closest('[hidden]')) continue;
      return el;
    }
  }
  return null;
}

function showFieldError(err) {
  clearErrors();
  errorShown = true;
  const field = err.field;
  const target = visibleErrorTarget(field);
  const general = document.getElementById('scenario-error');
  if (target) {
    target.textContent = err.message;
    target.hidden = false;
  } else {
    general.textContent = `${field ? `${field}: ` : ''}${err.message}`;
    general.hidden = false;
  }
  const stale = document.getElementById('stale-note');
  stale.textContent = `Not updated: ${field ? `the input at ${field} needs attention` : 'the set-up needs attention'}. The views and results show the last set-up that traced.`;
  stale.hidden = false;
  let marked = [...document.querySelectorAll(`[data-field="${CSS.escape(field)}"]`)];
  if (marked.length === 0 && /(jones|stokes)(\[\d\])?$/.test(field)) {
    marked = [...document.querySelectorAll('[data-field]')].filter((el) => el.dataset.field.startsWith(`${field}[`));
  }
  for (const el of marked) el.setAttribute('aria-invalid', 'true');
  document.body.classList.add('has-error');
}

function clearErrors() {
  if (!errorShown) return;
  errorShown = false;
  for (const el of document.querySelectorAll('[data-error-for]')) {
    if (!el.hidden) {
      el.hidden = true;
      el.textContent = '';
    }
  }
  for (const el of document.querySelectorAll('[aria-invalid="true"]')) el.removeAttribute('aria-invalid');
  const stale = document.getElementById('stale-note');
  stale.hidden = true;
  stale.textContent = '';
  document.body.classList.remove('has-error');
}

// ---------------------------------------------------------------------------------------------
// Results as text: data-quantity = path into the result, data-value = String(value).

let resultShape = null;
let cells = [];
const showAll = { rays: false, spots: false };

function cell(tag, path, get, format, attrs) {
  const el = h(tag, { 'data-quantity': path, ...(attrs ?? {}) });
  cells.push({ el, get, format, last: undefined });
  return el;
}

function shapeOf(r) {
  const parts = [
    r.elements.map((e) => e.kind).join(','),
    r.rays.map((x) => x.label).join(','),
    r.spots.length,
    showAll.rays,
    showAll.spots,
  ];
  return parts.join('|');
}

/** A last table row saying how many rows are hidden, with a button to show them all. */
function moreRow(which, shown, total, colspan) {
  const noun = which === 'rays' ? 'rays' : 'spots';
  const btn = h('button', {
    type: 'button',
    className: 'show-all',
    'data-show-all': which,
    text: showAll[which] ? `Show the first ${shown} only` : `Show all ${total} ${noun}`,
  });
  const note = showAll[which] ? `All ${total} ${noun} shown. ` : `${shown} of ${total} ${noun} shown. `;
  return h('tr', { className: 'more-row' }, h('td', { colspan, className: 'empty' }, note, btn));
}


/** The polarization columns shared by the ray and spot tables: ellipse azimuth, ellipticity,
 * handedness and degree of polarization of the item that `pick(result)` selects. */
function appendPolarizationCells(tr, p, pick) {
  tr.appendChild(cell('td', `${p}.ellipse.azimuth_deg`, (x) => pick(x).ellipse.azimuth_deg, fmt.ellipseDeg));
  tr.appendChild(cell('td', `${p}.ellipse.ellipticity_deg`, (x) => pick(x).ellipse.ellipticity_deg, fmt.ellipseDeg));
  tr.appendChild(cell('td', `${p}.ellipse.handedness`, (x) => pick(x).ellipse.handedness, fmt.text, { className: 'word' }));
  tr.appendChild(cell('td', `${p}.degree_of_polarization`, (x) => pick(x).degree_of_polarization, fmt.dop));
}

function buildResults(r) {
  cells = [];
  const elBox = document.getElementById('element-results');
  const frag = document.createDocumentFragment();
  r.elements.forEach((e, i) => {
    const p = `elements[${i}]`;
    const card = h('article', { className: `result-card result-${e.kind}` });
    const title = h('h4', {}, h('span', { className: 'result-index', text: `${i + 1}` }), ' ');
    const rows = h('dl', { className: 'quantities' });
    const row = (label, path, get, format) => {
      rows.appendChild(h('div', { className: 'q' }, h('dt', { text: label }), cell('dd', path, get, format)));
    };
    if (e.kind === 'crystal') {
      title.appendChild(cell('span', `${p}.material`, (x) => x.elements[i].material, (v) => (v === 'custom' ? 'crystal, custom indices' : `${materialName(v)} crystal`)));
      row('nₒ', `${p}.no`, (x) => x.elements[i].no, fmt.index);
      row('nₑ', `${p}.ne`, (x) => x.elements[i].ne, fmt.index);
      row('o-wave index', `${p}.o.index`, (x) => x.elements[i].o.index, fmt.index);
      row('e-wave index', `${p}.e.index`, (x) => x.elements[i].e.index, fmt.index);
      row('o walk-off', `${p}.o.walkoff_deg`, (x) => x.elements[i].o.walkoff_deg, fmt.deg);
      row('e walk-off', `${p}.e.walkoff_deg`, (x) => x.elements[i].e.walkoff_deg, fmt.deg);
      row('o/e separation', `${p}.separation_mm`, (x) => x.elements[i].separation_mm, fmt.mm);
      row('retardance', `${p}.retardance_rad`, (x) => x.elements[i].retardance_rad, fmt.rad);
      row('retardance', `${p}.retardance_waves`, (x) => x.elements[i].retardance_waves, fmt.waves);
      row('reflected power', `${p}.reflected_power`, (x) => x.elements[i].reflected_power, fmt.power);
      row('largest walk-off', `${p}.max_walkoff_deg`, (x) => x.elements[i].max_walkoff_deg, fmt.deg);
      row('… at a cut of', `${p}.max_walkoff_cut_deg`, (x) => x.elements[i].max_walkoff_cut_deg, fmt.deg);
      row('o mode', `${p}.o.status`, (x) => x.elements[i].o.status, fmt.text);
      row('e mode', `${p}.e.status`, (x) => x.elements[i].e.status, fmt.text);
    } else if (e.kind === 'retarder') {
      title.appendChild(document.createTextNode('retarder'));
      row('retardance', `${p}.retardance_rad`, (x) => x.elements[i].retardance_rad, fmt.rad);
      row('power in', `${p}.power_in`, (x) => x.elements[i].power_in, fmt.power);
    } else if (e.kind === 'polarizer') {
      title.appendChild(document.createTextNode('polarizer'));
      row('power in', `${p}.power_in`, (x) => x.elements[i].power_in, fmt.power);
      row('absorbed', `${p}.absorbed_power`, (x) => x.elements[i].absorbed_power, fmt.power);
    } else if (e.kind === 'rotator') {
      title.appendChild(document.createTextNode('rotator'));
      row('rotation', `${p}.angle_deg`, (x) => x.elements[i].angle_deg, fmt.deg);
      row('power in', `${p}.power_in`, (x) => x.elements[i].power_in, fmt.power);
    }
    card.insertBefore(title, null);
    card.appendChild(rows);
    frag.appendChild(card);
  });
  elBox.replaceChildren(frag);

  const rayRows = document.createDocumentFragment();
  const rayCount = showAll.rays ? r.rays.length : Math.min(r.rays.length, ROW_LIMIT);
  r.rays.slice(0, rayCount).forEach((ray, k) => {
    const p = `rays.${ray.label}`;
    const tr = h('tr', {}, h('th', { scope: 'row', className: `ray-label${rayClass(ray.label)}`, text: ray.label || '(no crystal)' }));
    tr.appendChild(cell('td', `${p}.power`, (x) => x.rays[k].power, fmt.power));
    tr.appendChild(cell('td', `${p}.exit_position_mm.0`, (x) => x.rays[k].exit_position_mm[0], fmt.mm));
    tr.appendChild(cell('td', `${p}.exit_position_mm.1`, (x) => x.rays[k].exit_position_mm[1], fmt.mm));
    appendPolarizationCells(tr, p, (x) => x.rays[k]);
    rayRows.appendChild(tr);
  });
  if (r.rays.length === 0) {
    rayRows.appendChild(h('tr', {}, h('td', { colspan: 8, className: 'empty', text: 'No ray leaves the stack.' })));
  } else if (r.rays.length > ROW_LIMIT) {
    rayRows.appendChild(moreRow('rays', ROW_LIMIT, r.rays.length, 8));
  }
  document.getElementById('ray-rows').replaceChildren(rayRows);

  const spotRows = document.createDocumentFragment();
  const spotCount = showAll.spots ? r.spots.length : Math.min(r.spots.length, ROW_LIMIT);
  r.spots.slice(0, spotCount).forEach((spot, k) => {
    const p = `spots[${k}]`;
    const tr = h('tr', {}, h('th', { scope: 'row', text: `${k + 1}` }));
    tr.appendChild(cell('td', `${p}.rays`, (x) => x.spots[k].rays, fmt.labels, { className: 'word' }));
    tr.appendChild(cell('td', `${p}.position_mm.0`, (x) => x.spots[k].position_mm[0], fmt.mm));
    tr.appendChild(cell('td', `${p}.position_mm.1`, (x) => x.spots[k].position_mm[1], fmt.mm));
    tr.appendChild(cell('td', `${p}.power`, (x) => x.spots[k].power, fmt.power));
    appendPolarizationCells(tr, p, (x) => x.spots[k]);
    spotRows.appendChild(tr);
  });
  if (r.spots.length === 0) {
    spotRows.appendChild(h('tr', {}, h('td', { colspan: 9, className: 'empty', text: 'No spot: no light leaves the stack.' })));
  } else if (r.spots.length > ROW_LIMIT) {
    spotRows.appendChild(moreRow('spots', ROW_LIMIT, r.spots.length, 9));
  }
  document.getElementById('spot-rows').replaceChildren(spotRows);

  const summary = document.getElementById('summary');
  summary.replaceChildren(
    h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Total power out' }), cell('span', 'total_power', (x) => x.total_power, fmt.power, { className: 'summary-value' })),
    h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Output rays' }), h('span', { className: 'summary-value', text: String(r.rays.length) })),
    h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Spots' }), h('span', { className: 'summary-value', text: String(r.spots.length) })),
  );
}

function rayClass(label) {
  const last = label.charAt(label.length - 1);
  return last === 'o' ? ' ray-o' : last === 'e' ? ' ray-e' : '';
}

function materialName(key) {
  const m = materialList.find((x) => x.key === key);
  return m ? m.name : key;
}

let lastWarnings = null;

function renderResults(r) {
  const shape = shapeOf(r);
  if (shape !== resultShape) {
    buildResults(r);
    resultShape = shape;
  }
  for (const c of cells) {
    const v = c.get(r);
    const s = String(v);
    if (s !== c.last) {
      c.last = s;
      c.el.setAttribute('data-value', s);
      c.el.textContent = c.format(v);
    }
  }
  const w = r.warnings.join('\n');
  if (w !== lastWarnings) {
    lastWarnings = w;
    const list = document.getElementById('warning-list');
    list.replaceChildren(...r.warnings.map((t) => h('li', { text: t })));
    document.getElementById('no-warnings').hidden = r.warnings.length > 0;
    document.getElementById('warnings').classList.toggle('has-warnings', r.warnings.length > 0);
  }
}

// ---------------------------------------------------------------------------------------------
// Views.

const views = [];
let lastResult = null;
let lastScenario = null;

function drawView(v) {
  try {
    session.draw(v.name, v.canvas, darkQuery.matches && !printDark);
    if (v.failed) {
      v.failed = false;
      viewErrors.delete(v.name);
      showViewErrors();
    }
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    v.failed = true;
    viewErrors.set(v.name, fe.message);
    showViewErrors();
  }
}

const viewErrors = new Map();
function showViewErrors() {
  const el = document.getElementById('view-error');
  const text = [...viewErrors].map(([k, m]) => `${k}: ${m}`).join(' · ');
  el.textContent = text ? `Could not draw ${text}` : '';
  el.hidden = !text;
}

/** Redraws every view synchronously. */
function redraw() {
  for (const v of views) drawView(v);
  describeViews();
}

let dirtyViews = new Set();
let resizeFrame = 0;
function onResize(entries) {
  for (const e of entries) {
    const v = views.find((x) => x.box === e.target);
    if (v) dirtyViews.add(v);
  }
  if (!resizeFrame) {
    resizeFrame = requestAnimationFrame(() => {
      resizeFrame = 0;
      const todo = dirtyViews;
      dirtyViews = new Set();
      for (const v of todo) drawView(v);
    });
  }
}

function num(v, digits) {
  return fixed(v, digits, 5e-13);
}

function lengthText(v) {
  return fmt.mm(v);
}

function maxSpotDistance(spots) {
  if (spots.length < 2) return 0;
  let best = 0;
  if (spots.length <= 64) {
    for (let i = 0; i < spots.length; i += 1) {
      for (let j = i + 1; j < spots.length; j += 1) {
        const a = spots[i].position_mm;
        const b = spots[j].position_mm;
        best = Math.max(best, Math.hypot(a[0] - b[0], a[1] - b[1]));
      }
    }
    return best;
  }
  let x0 = Infinity; let x1 = -Infinity; let y0 = Infinity; let y1 = -Infinity;
  for (const s of spots) {
    x0 = Math.min(x0, s.position_mm[0]); x1 = Math.max(x1, s.position_mm[0]);
    y0 = Math.min(y0, s.position_mm[1]); y1 = Math.max(y1, s.position_mm[1]);
  }
  return Math.hypot(x1 - x0, y1 - y0);
}

function ellipseWords(e) {
  if (e.handedness === 'unpolarized') return 'unpolarized';
  if (e.handedness === 'linear') return `linear at ${num(e.azimuth_deg, 1)}°`;
  if (Math.abs(Math.abs(e.ellipticity_deg) - 45) < 0.05) return `${e.handedness}-handed circular`;
  return `${e.handedness}-handed elliptical, azimuth ${num(e.azimuth_deg, 1)}°, ellipticity ${num(e.ellipticity_deg, 1)}°`;
}

function listed(items, limit, describe) {
  const shown = items.slice(0, limit).map(describe);
  if (items.length > limit) shown.push(`and ${items.length - limit} more`);
  return shown.join('; ');
}

function describeViews() {
  const r = lastResult;
  if (!r) return;
  const crystals = [];
  r.elements.forEach((e, i) => { if (e.kind === 'crystal') crystals.push(i); });
  const texts = {};
  const spots = r.spots;
  const spotName = (s, k) => (s.rays.length === 1 ? `ray ${s.rays[0] || '(no crystal)'}` : `spot ${k + 1} (${s.rays.join(' + ')})`);

  if (r.rays.length === 0) {
    texts.side = 'Side view (x–z plane, light travelling along +z): no ray leaves the stack.';
  } else if (crystals.length === 0) {
    texts.side = `Side view (x–z plane, light travelling along +z): ${r.elements.length} ideal element${r.elements.length === 1 ? '' : 's'} and no crystal; the beam passes undivided.`;
  } else if (crystals.length === 1) {
    const c = r.elements[crystals[0]];
    texts.side = c.separation_mm === null
      ? `Side view (x–z plane, light travelling along +z): one ${materialName(c.material)} plate; one of its modes is evanescent, so the beam is not split.`
      : `Side view (x–z plane, light travelling along +z): e-ray displaced ${lengthText(c.separation_mm)} from the o-ray by the ${materialName(c.material)} plate (element ${crystals[0] + 1}), e walk-off ${num(c.e.walkoff_deg, 3)}°.`;
  } else {
    texts.side = `Side view (x–z plane, light travelling along +z): ${r.rays.length} rays through ${crystals.length} crystals leave in ${spots.length} spot${spots.length === 1 ? '' : 's'}${spots.length > 1 ? `, at most ${lengthText(maxSpotDistance(spots))} apart` : ''}.`;
  }

  texts.end = spots.length === 0
    ? 'End view, looking back toward the source: no light leaves the stack.'
    : `End view, looking back toward the source (x to the right, y up): ${spots.length} spot${spots.length === 1 ? '' : 's'}. ${listed(spots, 6, (s, k) => `${spotName(s, k)} at (${num(s.position_mm[0], 3)}, ${num(s.position_mm[1], 3)}) mm, power ${fmt.power(s.power)}, ${ellipseWords(s.ellipse)}`)}.`;

  const norm = (st) => (st[0] > 0 ? [st[1] / st[0], st[2] / st[0], st[3] / st[0]] : [0, 0, 0]);
  const triple = (st) => `(${norm(st).map((x) => num(x, 3)).join(', ')})`;
  texts.poincare = `Poincaré sphere, (S1, S2, S3)/S0: input ${triple(r.input.stokes)}, ${ellipseWords(r.input.ellipse)}${spots.length ? `; ${listed(spots, 6, (s, k) => `${spotName(s, k)} ${triple(s.stokes)}`)}` : ''}.`;

  if (crystals.length === 0) {
    const none = 'no crystal in the stack, nothing to plot.';
    texts['walkoff-tilt'] = `Walk-off against cut tilt: ${none}`;
    texts['separation-wavelength'] = `Separation against wavelength: ${none}`;
    texts['retardance-wavelength'] = `Retardance against wavelength: ${none}`;
  } else {
    const i = crystals[0];
    const c = r.elements[i];
    const which = `element ${i + 1} (${describeMaterial(c.material)})`;
    const sc = lastScenario?.elements?.[i];
    const tilt = sc?.axis?.tilt_deg;
    const walk = c.e.walkoff_deg === null ? 'the e-mode is evanescent' : `e walk-off ${num(c.e.walkoff_deg, 3)}°`;
    texts['walkoff-tilt'] = `Walk-off against cut tilt for ${which}: ${walk} at the present tilt${typeof tilt === 'number' ? ` of ${num(tilt, 2)}°` : ''}; at normal incidence the largest walk-off, ${num(c.max_walkoff_deg, 3)}°, comes at a cut of ${num(c.max_walkoff_cut_deg, 2)}°.`;
    texts['separation-wavelength'] = `Separation against wavelength for ${which}: ${c.separation_mm === null ? 'no separation (a mode is evanescent)' : lengthText(c.separation_mm)} at ${num(r.wavelength_nm, 1)} nm.`;
    texts['retardance-wavelength'] = `Retardance against wavelength for ${which}: ${c.retardance_waves === null ? 'undefined (a mode is evanescent)' : `${num(c.retardance_waves, 3)} waves`} at ${num(r.wavelength_nm, 1)} nm.`;
  }
  for (const v of views) {
    if (texts[v.name]) setAttr(v.canvas, 'aria-label', texts[v.name]);
  }
  const plotNote = crystals.length === 0
    ? 'No crystal in the stack: nothing to plot.'
    : `Element ${crystals[0] + 1}, ${describeMaterial(r.elements[crystals[0]].material)}: the first crystal of the stack.`;
  for (const el of document.querySelectorAll('.plot-caption')) setText(el, plotNote);
}

function describeMaterial(key) {
  return key === 'custom' ? 'custom indices' : materialName(key);
}

// ---------------------------------------------------------------------------------------------
// Tracing.

let framePending = false;
let lastAttempt = null;
let lastGoodText = null;

function schedule() {
  if (framePending) return;
  framePending = true;
  requestAnimationFrame(() => {
    framePending = false;
    commit();
  });
}

function accept(result, text, scenarioObj, drawn = false) {
  lastResult = result;
  lastScenario = scenarioObj;
  lastGoodText = text;
  if (!drawn) for (const v of views) drawView(v);
  clearErrors();
  clearFileError();
  renderResults(result);
  describeViews();
  updatePrintSheet(JSON.parse(session.scenarioJson()));
}

/** Traces what the controls say; on an error, shows it and keeps the last good state. */
function commit() {
  const scenario = buildScenario();
  const text = JSON.stringify(scenario);
  if (text === lastAttempt) return;
  lastAttempt = text;
  let result;
  try {
    result = session.updateJson(text);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    showFieldError(fe);
    return;
  }
  accept(result, text, scenario);
  scheduleFragment();
}

/** Loads a scenario object into the controls and traces it: the result, or throws {field, message}. */
function applyScenario(obj) {
  return loadScenario(obj, true);
}

function loadScenario(obj, updateAddress) {
  let text;
  try {
    text = JSON.stringify(obj);
  } catch (e) {
    throw { field: '', message: `not a scenario object: ${e.message}` };
  }
  if (typeof text !== 'string' || obj === null || typeof obj !== 'object' || Array.isArray(obj)) {
    const err = { field: '', message: 'not a scenario object: expected a JSON object' };
    showFieldError(err);
    throw err;
  }
  let result;
  try {
    result = session.updateJson(text);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    loadControls(obj);
    lastAttempt = JSON.stringify(buildScenario());
    showFieldError(fe);
    throw fe;
  }
  const normal = JSON.parse(session.scenarioJson());
  // Draw first, while the layout is still clean (the canvases read their size), then write the
  // controls and the results.
  lastResult = result;
  lastScenario = normal;
  for (const v of views) drawView(v);
  loadControls(normal);
  const scenario = buildScenario();
  const built = JSON.stringify(scenario);
  lastAttempt = built;
  accept(result, built, scenario, true);
  if (updateAddress) scheduleFragment();
  return result;
}

// ---------------------------------------------------------------------------------------------
// The URL fragment and the link.

let fragmentTimer = 0;
let lastFragmentWrite = -Infinity;

function linkFor(text) {
  return `${location.origin}${location.pathname}${location.search}${FRAGMENT_KEY}${encodeURIComponent(text)}`;
}

function writeFragment() {
  fragmentTimer = 0;
  lastFragmentWrite = performance.now();
  if (lastGoodText === null) return;
  const hash = FRAGMENT_KEY + encodeURIComponent(lastGoodText);
  if (location.hash !== hash) {
    history.replaceState(history.state, '', `${location.pathname}${location.search}${hash}`);
  }
  const fe = document.getElementById('fragment-error');
  if (!fe.hidden) {
    fe.hidden = true;
    fe.textContent = '';
  }
}

/** Writes the fragment now, or (while edits come fast) once the interval has passed. */
function scheduleFragment() {
  if (fragmentTimer) return;
  const wait = FRAGMENT_INTERVAL_MS - (performance.now() - lastFragmentWrite);
  if (wait <= 0) writeFragment();
  else fragmentTimer = setTimeout(writeFragment, wait);
}

function flushFragment() {
  if (fragmentTimer) {
    clearTimeout(fragmentTimer);
    writeFragment();
  }
}

/** Reads the fragment: null when there is none, else {text} or {error}. */
function readFragment() {
  const hash = location.hash;
  if (!hash.startsWith(FRAGMENT_KEY)) return null;
  try {
    return { text: decodeURIComponent(hash.slice(FRAGMENT_KEY.length)) };
  } catch {
    return { error: 'its text is not valid URI encoding (the link may have been cut short or mangled)' };
  }
}

/** `field: message`, naming the whole document when the core gives no field. */
function fieldText(fe) {
  return `${fe.field || 'document'}: ${fe.message}`;
}

/** On first load nothing is there to keep (`kept` false): the demo is shown instead. */
function showFragmentError(text, kept = false) {
  const el = document.getElementById('fragment-error');
  const outcome = kept ? '; the current set-up was kept' : ', so the demo is shown instead';
  el.textContent = `The set-up in this link could not be loaded${outcome}: ${text}`;
  el.hidden = false;
}

function loadDemo() {
  loadScenario(JSON.parse(core.demoScenario()), false);
}

/**
 * Checks a scenario's text with the core before anything on the page changes: {obj} when it
 * traces (the session then holds it), else {error: {field, message}} (the session keeps the last
 * good scenario).
 */
function tryScenarioText(text) {
  try {
    session.updateJson(text);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    return { error: fe };
  }
  try {
    return { obj: JSON.parse(text) };
  } catch (e) {
    // Not expected (the core's JSON is the stricter), but the session must not stay ahead of
    // the page.
    if (lastGoodText !== null) session.updateJson(lastGoodText);
    return { error: { field: '', message: `not valid JSON (${e.message})` } };
  }
}

/**
 * Loads the scenario of the fragment. On first load (`previousHash` undefined) a bad fragment
 * shows its message and the demo; the bad link stays in the address bar until the user edits.
 * On a later change (`previousHash` is the hash before it) a bad fragment keeps the set-up on
 * screen and puts the address back: to `previousHash` when that was the set-up's own fragment or
 * none, else to the set-up's fragment.
 */
function loadFromLocation(previousHash) {
  const kept = previousHash !== undefined && lastGoodText !== null;
  const frag = readFragment();
  if (frag === null) {
    loadDemo();
    return;
  }
  let problem = frag.error;
  if (!problem) {
    const tried = tryScenarioText(frag.text);
    if (tried.obj !== undefined) {
      const el = document.getElementById('fragment-error');
      el.hidden = true;
      el.textContent = '';
      loadScenario(tried.obj, false);
      return;
    }
    problem = fieldText(tried.error);
  }
  if (!kept) {
    showFragmentError(problem);
    loadDemo();
    return;
  }
  // A fragment write still pending from an edit would clear the message that follows.
  flushFragment();
  showFragmentError(problem, true);
  const good = FRAGMENT_KEY + encodeURIComponent(lastGoodText);
  const back = previousHash === '' || previousHash === good ? previousHash : good;
  history.replaceState(history.state, '', `${location.pathname}${location.search}${back}`);
}

// ---------------------------------------------------------------------------------------------
// Opening a scenario file: checked by the core before anything on the page changes.

const MAX_FILE_BYTES = 2 * 1024 * 1024;
let fileToken = 0;

function showFileError(name, text) {
  const el = document.getElementById('file-error');
  el.textContent = `${name} could not be opened; the current set-up was kept: ${text}`;
  el.hidden = false;
}

function clearFileError() {
  const el = document.getElementById('file-error');
  if (!el.hidden) {
    el.hidden = true;
    el.textContent = '';
  }
}

async function openScenarioFile(file) {
  fileToken += 1;
  const token = fileToken;
  if (file.size > MAX_FILE_BYTES) {
    const mib = (file.size / (1024 * 1024)).toFixed(1);
    showFileError(file.name, `document: the file holds ${mib} MiB; a scenario file may be at most ${MAX_FILE_BYTES / (1024 * 1024)} MiB`);
    return;
  }
  let text;
  try {
    text = await file.text();
  } catch (e) {
    if (token === fileToken) showFileError(file.name, `document: the file could not be read (${e && e.message ? e.message : e})`);
    return;
  }
  // A later choice wins over a slow read of an earlier one.
  if (token !== fileToken) return;
  const tried = tryScenarioText(text);
  if (tried.error) {
    showFileError(file.name, fieldText(tried.error));
    return;
  }
  loadScenario(tried.obj, true);
  flushFragment();
  announce(`Opened ${file.name}.`);
}

function setupFileOpen() {
  const input = document.getElementById('scenario-file');
  document.getElementById('open-scenario').addEventListener('click', () => input.click());
  input.addEventListener('change', () => {
    const file = input.files && input.files[0];
    // Cleared, so that choosing the same file again (after fixing it) is a change too.
    input.value = '';
    if (file) openScenarioFile(file);
  });
}

async function copyLink() {
  flushFragment();
  if (lastGoodText === null) return;
  const url = linkFor(lastGoodText);
  if (location.href !== url) history.replaceState(history.state, '', url);
  const status = document.getElementById('copy-status');
  const field = document.getElementById('link-text');
  field.value = url;
  const note = errorShown ? ' (the last set-up that traced; the current input has an error)' : '';
  let copied = false;
  if (navigator.clipboard && window.isSecureContext) {
    try {
      await Promise.race([
        navigator.clipboard.writeText(url),
        new Promise((_, reject) => { setTimeout(() => reject(new Error('timeout')), 1500); }),
      ]);
      copied = true;
    } catch {
      copied = false;
    }
  }
  if (copied) {
    status.textContent = `Link copied${note}.`;
    return;
  }
  document.getElementById('link-row').hidden = false;
  field.focus();
  field.select();
  try {
    copied = document.execCommand('copy');
  } catch {
    copied = false;
  }
  status.textContent = copied ? `Link copied${note}.` : `Copy the selected link below${note}.`;
}

// ---------------------------------------------------------------------------------------------
// Design panel ("what must I buy"). Its own controls, each with data-design-field = the path of
// a design-request field (DEVELOPERS.md, "Design requests") and an error element
// [data-design-error-for] beside it. Solve posts the request to a module worker
// (design-worker.js, which loads pkg-design/); a displacer's Monte Carlo run arrives in chunks
// with progress. Results are text with data-quantity="design.<path into the design JSON>" and
// data-value = String(value); the curves are drawn with the page's drawSeries / drawHistogram.

const DESIGN_KINDS = [
  ['displacer', 'beam displacer'],
  ['waveplate', 'waveplate'],
  ['achromat', 'achromatic waveplate pair'],
  ['recombiner', 'recombiner check'],
];
// A recombiner "breaks" when the overlap drops below 99 % or the phase moves by more than π/10
// (DEVELOPERS.md, "Design requests"; src/design_recombiner.rs).
const RECOMBINER_MIN_OVERLAP = 0.99;
const RECOMBINER_MAX_PHASE_RAD = Math.PI / 10;
// Defaults of the request fields the page reads back to label its plots (DEVELOPERS.md).
const WAVEPLATE_DEFAULT_ACCEPTANCE_ERROR = 0.01;
const DESIGN_DEFAULT_SAMPLES = 100000;
// The material a kind starts from, until the user picks one (common choices for each part).
const DESIGN_MATERIALS = { displacer: 'calcite', waveplate: 'quartz', recombiner: 'calcite' };
const NBSP = '\u00a0';

const dfields = {}; // request path -> DesignField
const dlayout = {}; // kind -> [row or group element, …] in the order shown
const dhints = {}; // kind -> {path: hint text}
const design = {
  worker: null,
  nextId: 1,
  active: null, // {id, request, t0, nominal, done, total}
  shown: null, // {request, design, complete, run: {done, total, cancelled} | null}
  plots: [], // {name, canvas, box, draw(dark)}
  resize: null,
};

/** A design-request control: an input or select with its label, unit, hint and error slot. */
class DesignField {
  constructor(path, { label, spoken, unit, kind = 'number', options, value, placeholder, hint }) {
    this.path = path;
    this.kind = kind;
    this.label = label;
    const id = uid('d');
    this.labelEl = h('label', { for: id, text: label });
    this.error = h('p', {
      className: 'field-error',
      id: `${id}-err`,
      'data-design-error-for': path,
      hidden: true,
      'aria-live': 'polite',
    });
    this.hintEl = h('p', { className: 'hint', id: `${id}-hint`, hidden: !hint, text: hint ?? '' });
    const describedBy = `${id}-err ${id}-hint`;
    const control = h('div', { className: 'control' });
    if (kind === 'select') {
      this.input = h('select', { id, 'data-design-field': path, 'aria-describedby': describedBy });
      for (const [v, t] of options) this.input.appendChild(h('option', { value: v, text: t }));
      control.appendChild(this.input);
      if (spoken) this.input.setAttribute('aria-label', spoken);
    } else {
      this.input = h('input', {
        id,
        type: 'text',
        className: 'num',
        inputmode: 'decimal',
        autocomplete: 'off',
        spellcheck: 'false',
        placeholder,
        'data-design-field': path,
        'aria-describedby': describedBy,
      });
      control.appendChild(this.input);
      // Every number field has a unit column, so that the fields line up.
      control.appendChild(h('span', { className: 'unit', text: unit ?? '', 'aria-hidden': 'true' }));
      // The spoken name: the label (or a fuller one where the group gives the context), with its unit.
      const name = spoken ?? label;
      if (unit) this.input.setAttribute('aria-label', `${name} (${unitWord(unit)})`);
      else if (spoken) this.input.setAttribute('aria-label', spoken);
    }
    if (value !== undefined) this.input.value = String(value);
    this.row = h('div', { className: 'field' }, this.labelEl, control, this.hintEl, this.error);
  }

  get blank() {
    return this.kind !== 'select' && this.input.value.trim() === '';
  }

  /** A number, or the text as typed (so that the solver names the field in its message). */
  get value() {
    return this.kind === 'select' ? this.input.value : readNumber(this.input.value);
  }

  setHint(text) {
    setText(this.hintEl, text ?? '');
    if (this.hintEl.hidden !== !text) this.hintEl.hidden = !text;
  }
}

function dfield(path, spec) {
  const f = new DesignField(path, spec);
  dfields[path] = f;
  return f;
}

/** A titled group of fields with its own error slot (for errors that name the whole group). */
function designGroup(title, errorPath, children, { pair = false, hint } = {}) {
  const tid = uid('dg');
  const body = pair ? h('div', { className: 'pair-grid' }, ...children) : null;
  const hintEl = h('p', { className: 'hint', hidden: !hint, text: hint ?? '' });
  const box = h(
    'div',
    { className: 'subgroup', role: 'group', 'aria-labelledby': tid },
    h('p', { className: 'subgroup-title', id: tid, text: title }),
    ...(pair ? [body] : children),
    hintEl,
    h('p', { className: 'field-error', 'data-design-error-for': errorPath, hidden: true, 'aria-live': 'polite' }),
  );
  box.hintEl = hintEl;
  return box;
}

function setGroupHint(box, text) {
  setText(box.hintEl, text ?? '');
  if (box.hintEl.hidden !== !text) box.hintEl.hidden = !text;
}

/** Material select (catalogue and custom indices) with its n_o / n_e fields, for one prefix. */
function mediumFields(prefix, fallback, whose) {
  const options = materialList.map((m) => [m.key, m.name]);
  options.push(['custom', 'custom indices']);
  const of = whose ? ` of the ${whose}` : '';
  const material = dfield(`${prefix}material`, { label: 'Material', spoken: whose ? `Material${of}` : undefined, kind: 'select', options });
  const key = materialList.some((m) => m.key === fallback) ? fallback : (materialList[0]?.key ?? 'custom');
  material.input.value = key;
  const no = dfield(`${prefix}no`, { label: 'nₒ, ordinary index', spoken: `Ordinary index${of}`, value: 1.6584 });
  const ne = dfield(`${prefix}ne`, { label: 'nₑ, extraordinary index', spoken: `Extraordinary index${of}`, value: 1.4864 });
  const custom = h('div', { className: 'subgroup custom-indices' }, no.row, ne.row);
  return { material, custom, nodes: [material.row, custom] };
}

function buildDesignFields() {
  const kind = dfield('kind', { label: 'Part', kind: 'select', options: DESIGN_KINDS });
  kind.row.classList.add('design-kind');
  const order = dfield('order', {
    label: 'Order',
    kind: 'select',
    options: [['zero', 'zero order'], ['multiple', 'multiple order'], ['compound', 'compound zero order']],
  });
  const orderNumber = dfield('order_number', { label: 'Order number m', value: 1, hint: 'm whole waves more than the target.' });
  const base = dfield('base_mm', { label: 'Thinner plate', unit: 'mm', value: 1, hint: 'Two plates with crossed axes; their difference is the zero-order plate.' });

  const medium = mediumFields('', 'calcite');
  const wl = dfield('wavelength_nm', { label: 'Wavelength', unit: 'nm', value: 632.8 });
  const band = designGroup('Band (optional)', 'band_nm', [
    dfield('band_nm[0]', { label: 'From', spoken: 'Band from', unit: 'nm', placeholder: 'default' }).row,
    dfield('band_nm[1]', { label: 'to', spoken: 'Band to', unit: 'nm', placeholder: 'default' }).row,
  ], { pair: true });
  const separation = dfield('separation_mm', { label: 'Separation of the beams', unit: 'mm', value: 1 });
  const beam = dfield('beam_diameter_mm', { label: 'Beam diameter (1/e²)', unit: 'mm', value: 1 });
  const cut = dfield('cut_tilt_deg', { label: 'Cut tilt', unit: '°', placeholder: 'auto' });
  const aperture = dfield('aperture_factor', {
    label: 'Aperture factor',
    value: 2,
    hint: 'Clear aperture = separation + factor × beam diameter.',
  });
  const tolerances = designGroup('Tolerances, one standard deviation each', 'tolerances', [
    dfield('tolerances.tilt_deg', { label: 'Cut tilt', spoken: 'Cut tilt error, standard deviation', unit: '°', value: 0.1 }).row,
    dfield('tolerances.incidence_deg', { label: 'Incidence', spoken: 'Incidence error, standard deviation', unit: '°', value: 0.1 }).row,
    dfield('tolerances.thickness_mm', { label: 'Length', spoken: 'Length error, standard deviation', unit: 'mm', value: 0.05 }).row,
    dfield('tolerances.wavelength_nm', { label: 'Wavelength', spoken: 'Wavelength error, standard deviation', unit: 'nm', value: 0.5 }).row,
  ], { hint: 'The incidence error lies in the walk-off plane.' });
  const samples = dfield('samples', {
    label: 'Monte Carlo samples',
    value: DESIGN_DEFAULT_SAMPLES,
    hint: 'At most 1 000 000; 0 skips the tolerance run.',
  });
  const seed = dfield('seed', { label: 'Random seed', value: 1 });

  const retardance = dfield('retardance_waves', { label: 'Retardance', unit: 'waves', value: 0.25, hint: '0.25 for a quarter-wave plate, 0.5 for a half-wave plate.' });
  const maxInc = dfield('max_incidence_deg', { label: 'Largest incidence', unit: '°', value: 10 });
  const accErr = dfield('acceptance_error_waves', {
    label: 'Acceptance error',
    unit: 'waves',
    value: WAVEPLATE_DEFAULT_ACCEPTANCE_ERROR,
    hint: 'The acceptance angle is where the retardance has moved this far from its value at normal incidence.',
  });

  const first = mediumFields('first.', 'quartz', 'first plate');
  const second = mediumFields('second.', 'mgf2', 'second plate');
  const firstBox = designGroup('First plate', 'first', first.nodes);
  const secondBox = designGroup('Second plate', 'second', second.nodes);
  const wavelengths = designGroup('Design wavelengths', 'wavelengths_nm', [
    dfield('wavelengths_nm[0]', { label: 'λ₁', spoken: 'First design wavelength', unit: 'nm', value: 500 }).row,
    dfield('wavelengths_nm[1]', { label: 'λ₂', spoken: 'Second design wavelength', unit: 'nm', value: 900 }).row,
  ], { pair: true, hint: 'The pair has exactly the target retardance at both.' });

  const length = dfield('length_mm', { label: 'Length of each displacer', unit: 'mm', value: 10 });
  const middle = dfield('middle', {
    label: 'Between the displacers',
    kind: 'select',
    options: [['half-wave', 'half-wave plate at 45°'], ['rotator', 'rotator']],
  });
  const rotator = dfield('rotator_deg', { label: 'Rotation', unit: '°', value: 90 });
  const lengthMis = dfield('length_mismatch_mm', { label: 'Length mismatch', unit: 'mm', value: 0, hint: 'Second displacer minus the first.' });
  const tiltMis = dfield('tilt_mismatch_deg', { label: 'Cut mismatch', unit: '°', value: 0, hint: 'Second displacer minus the first.' });

  const fieldsBox = document.getElementById('design-fields');
  fieldsBox.replaceChildren(kind.row, h('div', { className: 'fields', id: 'design-kind-fields' }));
  dlayout.displacer = [...medium.nodes, wl.row, separation.row, beam.row, cut.row, aperture.row, band, tolerances, samples.row, seed.row];
  dlayout.waveplate = [order.row, orderNumber.row, base.row, ...medium.nodes, wl.row, retardance.row, band, maxInc.row, accErr.row];
  dlayout.achromat = [firstBox, secondBox, retardance.row, wavelengths, band];
  dlayout.recombiner = [...medium.nodes, wl.row, length.row, cut.row, beam.row, middle.row, rotator.row, lengthMis.row, tiltMis.row];

  const cutHint = 'Optic axis from the face normal; empty: the cut of largest walk-off, where a cut error matters least.';
  dhints.displacer = { band: 'Empty: the design wavelength alone.', cut_tilt_deg: cutHint };
  dhints.waveplate = { band: 'Empty: ±20 % around the design wavelength.' };
  dhints.achromat = { band: 'Empty: from 0.8 × λ₁ to 1.2 × λ₂.' };
  dhints.recombiner = { cut_tilt_deg: `Of both displacers. ${cutHint}` };
  design.bandBox = band;
  design.mediumBoxes = [['', medium.custom], ['first.', first.custom], ['second.', second.custom]];
}

/** Shows the fields of the chosen kind, in its order, and the ones its selects call for. */
function layoutDesignFields() {
  const kind = dfields.kind.value;
  const nodes = dlayout[kind] ?? dlayout.displacer;
  const box = document.getElementById('design-kind-fields');
  const current = [...box.children];
  if (current.length !== nodes.length || current.some((n, i) => n !== nodes[i])) {
    const focused = document.activeElement;
    box.replaceChildren(...nodes);
    if (focused && focused !== document.activeElement && box.contains(focused)) focused.focus();
  }
  const material = dfields.material;
  const start = DESIGN_MATERIALS[kind];
  if (!material.touched && start && material.input.value !== start && materialList.some((m) => m.key === start)) {
    material.input.value = start;
  }
  const hints = dhints[kind] ?? {};
  setGroupHint(design.bandBox, hints.band);
  dfields.cut_tilt_deg.setHint(hints.cut_tilt_deg);
  for (const [prefix, custom] of design.mediumBoxes) {
    const hide = dfields[`${prefix}material`].value !== 'custom';
    if (custom.hidden !== hide) custom.hidden = hide;
  }
  const order = dfields.order.value;
  dfields.order_number.row.hidden = order !== 'multiple';
  dfields.base_mm.row.hidden = order !== 'compound';
  dfields.rotator_deg.row.hidden = dfields.middle.value !== 'rotator';
}

/** The design request the panel's fields say (numbers, or text as typed where it is no number). */
function designRequest() {
  const kind = dfields.kind.value;
  const req = { kind };
  const put = (path) => {
    const f = dfields[path];
    if (!f.blank) req[path] = f.value;
  };
  const medium = (prefix) => {
    const out = {};
    const m = dfields[`${prefix}material`].value;
    if (m === 'custom') {
      for (const k of ['no', 'ne']) {
        const f = dfields[`${prefix}${k}`];
        if (!f.blank) out[k] = f.value;
      }
    } else {
      out.material = m;
    }
    return out;
  };
  const pair = (name) => {
    const a = dfields[`${name}[0]`];
    const b = dfields[`${name}[1]`];
    if (a.blank && b.blank) return;
    req[name] = [a.blank ? a.input.value : a.value, b.blank ? b.input.value : b.value];
  };
  if (kind === 'displacer') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    pair('band_nm');
    put('separation_mm');
    put('beam_diameter_mm');
    put('cut_tilt_deg');
    put('aperture_factor');
    const tol = {};
    for (const k of ['tilt_deg', 'incidence_deg', 'thickness_mm', 'wavelength_nm']) {
      const f = dfields[`tolerances.${k}`];
      if (!f.blank) tol[k] = f.value;
    }
    if (Object.keys(tol).length) req.tolerances = tol;
    put('samples');
    put('seed');
  } else if (kind === 'waveplate') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('retardance_waves');
    req.order = dfields.order.value;
    if (req.order === 'multiple') put('order_number');
    if (req.order === 'compound') put('base_mm');
    pair('band_nm');
    put('max_incidence_deg');
    put('acceptance_error_waves');
  } else if (kind === 'achromat') {
    req.first = medium('first.');
    req.second = medium('second.');
    put('retardance_waves');
    pair('wavelengths_nm');
    pair('band_nm');
  } else if (kind === 'recombiner') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('length_mm');
    put('cut_tilt_deg');
    put('beam_diameter_mm');
    req.middle = dfields.middle.value;
    if (req.middle === 'rotator') put('rotator_deg');
    put('length_mismatch_mm');
    put('tilt_mismatch_deg');
  }
  return req;
}

// --- errors beside the design fields (the same walk-up rule as the set-up's) -----------------

let designErrorShown = false;

function designErrorTarget(path) {
  const panel = document.getElementById('design');
  for (let p = path.replace(/\.$/, ''); p !== null; p = parentPath(p)) {
    for (const el of panel.querySelectorAll(`[data-design-error-for="${CSS.escape(p)}"]`)) {
      if (!el.parentElement || el.parentElement.closest('[hidden]')) continue;
      return el;
    }
  }
  return null;
}

function showDesignError(err) {
  clearDesignErrors();
  designErrorShown = true;
  const target = designErrorTarget(err.field);
  if (target) {
    target.textContent = target.id === 'design-error' && err.field ? `${err.field}: ${err.message}` : err.message;
    target.hidden = false;
  }
  const panel = document.getElementById('design');
  for (const el of panel.querySelectorAll('[data-design-field]')) {
    const p = el.dataset.designField;
    if (err.field && (p === err.field || p.startsWith(`${err.field}[`) || p.startsWith(`${err.field}.`))) {
      el.setAttribute('aria-invalid', 'true');
    }
  }
}

function clearDesignErrors() {
  if (!designErrorShown) return;
  designErrorShown = false;
  const panel = document.getElementById('design');
  for (const el of panel.querySelectorAll('[data-design-error-for]')) {
    if (!el.hidden) {
      el.hidden = true;
      el.textContent = '';
    }
  }
  for (const el of panel.querySelectorAll('[aria-invalid="true"]')) el.removeAttribute('aria-invalid');
}

// --- number formats for the design's results ------------------------------------------------

/** A plain number with at most `digits` decimals and no trailing zeros. */
function trimmed(v, digits) {
  let s = v.toFixed(digits);
  if (s.includes('.')) s = s.replace(/0+$/, '').replace(/\.$/, '');
  if (/^-0$/.test(s)) s = '0';
  return minus(s);
}

const dfmt = {
  text: (v) => String(v),
  yes: (v) => (v ? 'yes' : 'no'),
  index: (v) => fixed(v, 6),
  deg: (v) => `${fixed(v, 4, 5e-13)}°`,
  nm: (v) => `${trimmed(v, 3)}${NBSP}nm`,
  length: (v) => {
    const a = Math.abs(v);
    if (a >= 1) return `${fixed(v, 4)}${NBSP}mm`;
    if (a < 1e-12) return `0${NBSP}mm`;
    const mm = `${significant(v, 5)}${NBSP}mm`;
    return a < 0.1 ? `${mm} (${significant(v * 1000, 5)}${NBSP}µm)` : mm;
  },
  waves: (v) => `${fixed(v, 5, 5e-13)}${NBSP}waves`,
  rad: (v) => `${fixed(v, 4, 5e-13)}${NBSP}rad`,
  count: (v) => String(v),
  power: (v) => fmt.power(v),
  fraction: (v) => fixed(v, 8),
  /** Significant digits with a unit; "no limit" for the solver's "never" (f64::MAX). */
  sig: (unit, n = 4) => (v) => {
    if (Math.abs(v) >= 1e300) return 'no limit (zero sensitivity)';
    const sep = unit === '°' || unit === '' ? '' : NBSP;
    return `${significant(v, n)}${sep}${unit}`;
  },
};

/** The value at a dotted path ("band.min_mm", "plates.0.thickness_mm") of a design. */
function designValue(d, path) {
  let v = d;
  for (const k of path.split('.')) {
    if (v === null || v === undefined || typeof v !== 'object') return undefined;
    v = Array.isArray(v) ? v[Number(k)] : v[k];
  }
  return v;
}

/** A result as text: data-quantity = design.<path>, data-value = String(value). */
function dq(d, path, format, tag = 'span', attrs = {}) {
  const v = designValue(d, path);
  if (v === undefined) return null;
  return h(tag, { ...attrs, 'data-quantity': `design.${path}`, 'data-value': String(v), text: v === null ? '—' : format(v) });
}

/** A card of labelled results of design `d`. rows: [label, path, format] or [label, element] or null. */
function designCard(d, title, rows, { note, className } = {}) {
  const dl = h('dl', { className: 'quantities' });
  for (const r of rows) {
    if (!r) continue;
    const [label, a, format] = r;
    const dd = typeof a === 'string' ? dq(d, a, format, 'dd') : h('dd', {}, a);
    if (!dd) continue;
    dl.appendChild(h('div', { className: 'q' }, h('dt', { text: label }), dd));
  }
  return h(
    'article',
    { className: `result-card${className ? ` ${className}` : ''}` },
    h('h4', { text: title }),
    dl,
    note ? h('p', { className: 'hint card-note' }, ...[].concat(note)) : null,
  );
}

function designMaterialName(key) {
  return key === 'custom' ? 'custom-index' : materialName(key);
}

// --- results by kind -------------------------------------------------------------------------

function displacerResults(d, run) {
  const s = d;
  const headline = h(
    'p',
    { className: 'design-headline' },
    `A ${designMaterialName(s.material)} plate `,
    dq(d, 'length_mm', dfmt.length, 'strong'),
    ' long, cut at ',
    dq(d, 'cut_tilt_deg', dfmt.deg, 'strong'),
    ' (optic axis from the face normal), with a clear aperture of at least ',
    dq(d, 'clear_aperture_mm', dfmt.length, 'strong'),
    '.',
  );
  const cards = [
    designCard(d, 'What to order', [
      ['material', 'material', (v) => designMaterialName(v)],
      ['length', 'length_mm', dfmt.length],
      ['cut tilt', 'cut_tilt_deg', dfmt.deg],
      ['clear aperture', 'clear_aperture_mm', dfmt.length],
    ], { note: dq(d, 'cut_note', dfmt.text, 'span', { className: 'cut-note' }), className: 'design-main' }),
    designCard(d, 'Beams at the exit', [
      ['o/e separation', 'separation_mm', dfmt.length],
      ['e-ray displaced toward (axis at 0°)', 'displacement_direction', dfmt.text],
      ['e walk-off', 'walkoff_deg', dfmt.deg],
      ['crosstalk (overlap)', 'crosstalk', dfmt.sig('', 3)],
      ['separation / beam diameter', 'clearance_ratio', dfmt.sig('', 4)],
      ['clipped per beam', 'clipping_per_beam', dfmt.sig('', 3)],
      ['o–e exit phase', 'exit_phase_rad', dfmt.rad],
      ['… reduced to (−π, π]', 'exit_phase_mod_2pi_rad', dfmt.rad],
    ]),
    designCard(d, 'Crystal', [
      ['wavelength', 'wavelength_nm', dfmt.nm],
      ['nₒ', 'no', dfmt.index],
      ['nₑ', 'ne', dfmt.index],
      ['cut of largest walk-off', 'max_walkoff_cut_deg', dfmt.deg],
      ['dρ/dθ at the cut', 'walkoff_slope', dfmt.sig('°/°', 3)],
    ]),
    designCard(d, 'Over the band', [
      ['smallest separation', 'band.min_mm', dfmt.length],
      ['… at', 'band.min_at_nm', dfmt.nm],
      ['largest separation', 'band.max_mm', dfmt.length],
      ['… at', 'band.max_at_nm', dfmt.nm],
    ], { note: d.band.curve.length < 2 ? 'No band was given: the design wavelength alone.' : null }),
    designCard(d, 'Sensitivity of the separation', [
      ['to cut tilt', 'sensitivities.tilt_mm_per_deg', dfmt.sig('mm/°', 4)],
      ['to incidence', 'sensitivities.incidence_mm_per_deg', dfmt.sig('mm/°', 4)],
      ['to length', 'sensitivities.thickness_mm_per_mm', dfmt.sig('mm/mm', 4)],
      ['to wavelength', 'sensitivities.wavelength_mm_per_nm', dfmt.sig('mm/nm', 4)],
      ['linearized spread (1σ)', 'sensitivities.linear_std_mm', dfmt.sig('mm', 4)],
    ], {
      note: ['For σ = ', dq(d, 'tolerances.tilt_deg', dfmt.sig('°', 3)), ' cut, ', dq(d, 'tolerances.incidence_deg', dfmt.sig('°', 3)),
        ' incidence, ', dq(d, 'tolerances.thickness_mm', dfmt.sig('mm', 3)), ' length, ', dq(d, 'tolerances.wavelength_nm', dfmt.sig('nm', 3)), ' wavelength.'],
    }),
    monteCarloCard(d, run),
  ];
  return [headline, ...cards];
}

function monteCarloCard(d, run) {
  if (d.monte_carlo) {
    return designCard(d, 'Monte Carlo: separation', [
      ['samples', 'monte_carlo.n', dfmt.count],
      ['mean', 'monte_carlo.mean', dfmt.length],
      ['standard deviation', 'monte_carlo.std', dfmt.sig('mm', 4)],
      ['5th percentile', 'monte_carlo.p5', dfmt.length],
      ['95th percentile', 'monte_carlo.p95', dfmt.length],
      ['smallest', 'monte_carlo.min', dfmt.length],
      ['largest', 'monte_carlo.max', dfmt.length],
    ], { className: 'design-mc' });
  }
  let text = 'Not run (0 samples).';
  if (run && run.cancelled) text = `Cancelled after ${run.done} of ${run.total} samples.`;
  else if (run) text = 'Running…';
  return h(
    'article',
    { className: 'result-card design-mc' },
    h('h4', { text: 'Monte Carlo: separation' }),
    h('p', { className: 'muted', id: 'design-mc-state', text }),
  );
}

function waveplateResults(d) {
  const plates = d.plates;
  const mat = designMaterialName(plates[0].material);
  const headline = h('p', { className: 'design-headline' });
  if (plates.length === 1) {
    headline.append(`One ${mat} plate `, dq(d, 'plates.0.thickness_mm', dfmt.length, 'strong'), ' thick, optic axis in the face',
      d.order === 'multiple' ? `, order ${d.order_number}` : ', zero order', '.');
  } else {
    headline.append(`Two ${mat} plates, `, dq(d, 'plates.0.thickness_mm', dfmt.length, 'strong'), ' and ',
      dq(d, 'plates.1.thickness_mm', dfmt.length, 'strong'), ' thick, optic axes in the faces and crossed: a compound zero-order plate.');
  }
  const plateRows = [];
  plates.forEach((p, i) => {
    const n = plates.length > 1 ? ` ${i + 1}` : '';
    plateRows.push([`plate${n}: material`, `plates.${i}.material`, (v) => designMaterialName(v)]);
    plateRows.push([`plate${n}: thickness`, `plates.${i}.thickness_mm`, dfmt.length]);
    plateRows.push([`plate${n}: axis azimuth`, `plates.${i}.axis_azimuth_deg`, dfmt.deg]);
  });
  const worst = worstPlane(d);
  return [
    headline,
    designCard(d, 'What to order', [
      ...plateRows,
      ['net retarding thickness', 'effective_thickness_mm', dfmt.length],
      ['order', 'order', dfmt.text],
      ['order number', 'order_number', dfmt.count],
    ], { className: 'design-main', note: 'Optic axis in the face (tilt 90°); azimuths from e1 toward e2.' }),
    designCard(d, 'Retardance', [
      ['at the design wavelength', 'retardance_waves', dfmt.waves],
      ['fast axis', 'fast_axis', dfmt.text],
      ['nₒ', 'no', dfmt.index],
      ['nₑ', 'ne', dfmt.index],
      ['nₑ − nₒ', 'birefringence', dfmt.sig('', 6)],
    ], { note: 'Signed: positive when the optic axis is the slow axis.' }),
    designCard(d, 'Angle of incidence', [
      ['acceptance (worst plane)', 'acceptance_deg', dfmt.deg],
      ...d.angular.map((a, i) => [`plane at ${trimmed(a.plane_azimuth_deg, 2)}° to the axis`, `angular.${i}.acceptance_deg`, dfmt.deg]),
    ], {
      note: `Largest incidence up to which the retardance stays within the acceptance error of its value at normal incidence; the worst plane is at ${trimmed(worst.plane_azimuth_deg, 2)}° to the optic axis. A value at the end of the curve means it never leaves.`,
    }),
  ];
}

function worstPlane(d) {
  return d.angular.reduce((a, b) => (b.acceptance_deg < a.acceptance_deg ? b : a), d.angular[0]);
}

function achromatResults(d) {
  const p = d.plates;
  const axis = (q) => (q.axis_azimuth_deg === 90 ? 'axis crossed (90°)' : 'axis at 0°');
  const headline = h(
    'p',
    { className: 'design-headline' },
    `A ${designMaterialName(p[0].material)} plate `,
    dq(d, 'plates.0.thickness_mm', dfmt.length, 'strong'),
    ` thick, ${axis(p[0])}, and a ${designMaterialName(p[1].material)} plate `,
    dq(d, 'plates.1.thickness_mm', dfmt.length, 'strong'),
    ` thick, ${axis(p[1])}; optic axes in the faces.`,
  );
  const rows = [];
  p.forEach((q, i) => {
    rows.push([`plate ${i + 1}: material`, `plates.${i}.material`, (v) => designMaterialName(v)]);
    rows.push([`plate ${i + 1}: thickness`, `plates.${i}.thickness_mm`, dfmt.length]);
    rows.push([`plate ${i + 1}: axis azimuth`, `plates.${i}.axis_azimuth_deg`, dfmt.deg]);
  });
  return [
    headline,
    designCard(d, 'What to order', rows, { className: 'design-main' }),
    designCard(d, 'Retardance', [
      ['first design wavelength', 'at_design_wavelengths.0.0', dfmt.nm],
      ['… retardance there', 'at_design_wavelengths.0.1', dfmt.waves],
      ['second design wavelength', 'at_design_wavelengths.1.0', dfmt.nm],
      ['… retardance there', 'at_design_wavelengths.1.1', dfmt.waves],
      ['largest error over the band', 'max_error_waves', dfmt.waves],
    ]),
  ];
}

function recombinerResults(d) {
  const overlapOk = d.overlap >= RECOMBINER_MIN_OVERLAP;
  const phaseOk = Math.abs(d.phase_difference_rad) <= RECOMBINER_MAX_PHASE_RAD;
  const works = d.recombined && overlapOk && phaseOk;
  const why = [];
  if (!d.recombined) why.push('the two paths leave as separate spots');
  if (!overlapOk) why.push('the beams overlap by less than 0.99');
  if (!phaseOk) why.push('their phase differs by more than π/10');
  const headline = h(
    'p',
    { className: `design-headline ${works ? 'verdict-good' : 'verdict-bad'}` },
    works ? 'The pair recombines: one spot, overlap at least 0.99 and phase within π/10.' : `The pair does not recombine well: ${why.join(', ')}.`,
  );
  const unreachable = (path) => Math.abs(designValue(d, path)) > 90;
  const notes = [];
  if (unreachable('tilt_mismatch_to_break_deg.0') || unreachable('tilt_mismatch_to_break_deg.1')) {
    notes.push('A cut mismatch above 90° is a linear extrapolation beyond any real cut: at the cut of largest walk-off the residual grows only to second order in the mismatch, which the linear estimate does not see.');
  }
  return [
    headline,
    designCard(d, 'Recombination', [
      ['one spot', 'recombined', dfmt.yes],
      ['overlap of the beams', 'overlap', dfmt.fraction],
      ['phase difference', 'phase_difference_rad', dfmt.rad],
      ['power in the spot', 'recombined_power', dfmt.power],
      ['power elsewhere', 'stray_power', dfmt.power],
    ], { className: 'design-main', note: 'It breaks when the overlap drops below 0.99 or the phase moves by more than π/10.' }),
    designCard(d, 'Residual separation', [
      ['length', 'residual_separation_mm', dfmt.length],
      ['x', 'residual_vector_mm.0', dfmt.length],
      ['y', 'residual_vector_mm.1', dfmt.length],
    ]),
    designCard(d, 'Sensitivity to a mismatch', [
      ['residual per length', 'length_sensitivity.0', dfmt.sig('mm/mm', 4)],
      ['phase per length', 'length_sensitivity.1', dfmt.sig('rad/mm', 4)],
      ['residual per cut', 'tilt_sensitivity.0', dfmt.sig('mm/°', 4)],
      ['phase per cut', 'tilt_sensitivity.1', dfmt.sig('rad/°', 4)],
    ]),
    designCard(d, 'Mismatch that breaks it', [
      ['length, for the overlap', 'length_mismatch_to_break_mm.0', dfmt.sig('mm', 4)],
      ['length, for the phase', 'length_mismatch_to_break_mm.1', dfmt.sig('mm', 4)],
      ['cut, for the overlap', 'tilt_mismatch_to_break_deg.0', dfmt.sig('°', 4)],
      ['cut, for the phase', 'tilt_mismatch_to_break_deg.1', dfmt.sig('°', 4)],
    ], { note: notes.length ? notes : 'Linear estimates from the sensitivities.' }),
  ];
}

// --- plots -------------------------------------------------------------------------------------

function seriesJson(s) {
  return JSON.stringify(s);
}

/** Draws a series with two marked points: drawSeries marks one, so a second drawing with the
 *  other marked is laid over it wherever it differs from a drawing with neither. The two points
 *  lie on the curve and are added to it, so that all three drawings share their axes; a point
 *  outside the curve's span would change them, and then only the first is marked. */
function drawTwoMarkers(plot, series, a, b, dark) {
  const xs = series.points.map((p) => p[0]);
  const within = (p) => xs.length > 1 && p[0] >= Math.min(...xs) && p[0] <= Math.max(...xs);
  if (!within(a) || !within(b)) {
    core.drawSeries(plot.canvas, seriesJson({ ...series, current: a }), dark);
    return;
  }
  const points = [...series.points, a, b].sort((p, q) => p[0] - q[0]);
  const s = { ...series, points };
  core.drawSeries(plot.canvas, seriesJson({ ...s, current: a }), dark);
  const [pb, pc] = plot.probes;
  core.drawSeries(pb, seriesJson({ ...s, current: b }), dark);
  core.drawSeries(pc, seriesJson({ ...s, current: null }), dark);
  const { width, height } = plot.canvas;
  if (pb.width !== width || pb.height !== height || pc.width !== width || pc.height !== height) return;
  const ctx = plot.canvas.getContext('2d');
  const img = ctx.getImageData(0, 0, width, height);
  const db = pb.getContext('2d').getImageData(0, 0, width, height).data;
  const dc = pc.getContext('2d').getImageData(0, 0, width, height).data;
  const out = img.data;
  const n = width * height;
  const differs = (x, y, k) => x[k] !== y[k] || x[k + 1] !== y[k + 1] || x[k + 2] !== y[k + 2] || x[k + 3] !== y[k + 3];
  // What the second marker adds (its dot and its label), and the bounding boxes of both marks.
  const mb = new Uint8Array(n);
  const boxA = [width, height, -1, -1];
  const boxB = [width, height, -1, -1];
  const grow = (bx, x, y) => {
    bx[0] = Math.min(bx[0], x); bx[1] = Math.min(bx[1], y); bx[2] = Math.max(bx[2], x); bx[3] = Math.max(bx[3], y);
  };
  for (let i = 0; i < n; i += 1) {
    const x = i % width;
    const y = (i - x) / width;
    if (differs(db, dc, 4 * i)) {
      mb[i] = 1;
      grow(boxB, x, y);
    }
    if (differs(out, dc, 4 * i)) grow(boxA, x, y);
  }
  const dpr = width / Math.max(1, plot.canvas.clientWidth);
  const gap = 4 * dpr;
  const apart = boxA[2] < 0 || boxB[2] < 0 || boxB[0] > boxA[2] + gap || boxA[0] > boxB[2] + gap
    || boxB[1] > boxA[3] + gap || boxA[1] > boxB[3] + gap;
  let keep = () => true;
  if (!apart) {
    // The labels would overwrite each other: lay over only the second marker's dot, the one
    // place where the added pixels hold a solid square (a dot of 5 px radius holds 7 × 7 px).
    const side = Math.max(3, Math.floor(7 * dpr));
    let sx = 0;
    let sy = 0;
    let count = 0;
    for (let y = 0; y + side <= height; y += 1) {
      for (let x = 0; x + side <= width; x += 1) {
        let full = true;
        for (let v = 0; v < side && full; v += 1) {
          const row = (y + v) * width + x;
          for (let u = 0; u < side; u += 1) {
            if (!mb[row + u]) {
              full = false;
              break;
            }
          }
        }
        if (full) {
          sx += x + side / 2;
          sy += y + side / 2;
          count += 1;
        }
      }
    }
    if (count === 0) return;
    const cx = sx / count;
    const cy = sy / count;
    const r2 = (7.5 * dpr) ** 2;
    keep = (x, y) => (x - cx) ** 2 + (y - cy) ** 2 <= r2;
  }
  for (let i = 0; i < n; i += 1) {
    if (!mb[i]) continue;
    const x = i % width;
    if (!keep(x, (i - x) / width)) continue;
    const k = 4 * i;
    out[k] = db[k];
    out[k + 1] = db[k + 1];
    out[k + 2] = db[k + 2];
    out[k + 3] = db[k + 3];
  }
  ctx.putImageData(img, 0, 0);
}

function designPlot(name, { caption, label, draw, wide = false, small = false, probes = 0 }) {
  const canvas = h('canvas', { 'data-design-plot': name, role: 'img', 'aria-label': label });
  const box = h('div', { className: 'canvas-box' }, canvas);
  const plot = { name, canvas, box, draw, small, probes: [] };
  for (let i = 0; i < probes; i += 1) {
    const p = h('canvas', { className: 'probe', 'aria-hidden': 'true' });
    plot.probes.push(p);
    box.appendChild(p);
  }
  plot.figure = h(
    'figure',
    { className: `view design-plot${wide ? ' wide' : ''}${small ? ' small' : ''}` },
    box,
    caption ? h('figcaption', { text: caption }) : null,
  );
  return plot;
}

function plotsFor(kind, d, request, run) {
  const g = (v, n = 4) => significant(v, n);
  if (kind === 'displacer') {
    const c = d.band.curve;
    const one = c.length < 2;
    const band = designPlot('separation-wavelength', {
      wide: true,
      label: one
        ? `Separation against wavelength: ${g(d.separation_mm)} mm at the design wavelength ${trimmed(d.wavelength_nm, 3)} nm; no band was given.`
        : `Separation against wavelength, ${trimmed(c[0][0], 3)} to ${trimmed(c[c.length - 1][0], 3)} nm: from ${g(d.band.min_mm)} mm at ${trimmed(d.band.min_at_nm, 3)} nm to ${g(d.band.max_mm)} mm at ${trimmed(d.band.max_at_nm, 3)} nm; ${g(d.separation_mm)} mm at ${trimmed(d.wavelength_nm, 3)} nm.`,
      caption: one ? 'Give a band to see the separation over it.' : 'The designed plate over the band.',
      draw: (p, dark) => core.drawSeries(p.canvas, seriesJson({
        title: 'Separation against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'separation', y_unit: 'mm',
        points: c, current: [d.wavelength_nm, d.separation_mm],
        note: one ? 'design wavelength only' : `${c.length} wavelengths`,
      }), dark),
    });
    const plots = [band];
    if (d.monte_carlo || run) {
      const mc = d.monte_carlo;
      const title = mc ? 'Separation over the tolerances' : run && run.cancelled ? 'Monte Carlo run cancelled' : 'Monte Carlo run in progress';
      plots.push(designPlot('tolerance-histogram', {
        wide: true,
        label: mc
          ? `Histogram of the separation over ${mc.n} Monte Carlo samples: mean ${g(mc.mean, 6)} mm, standard deviation ${g(mc.std, 3)} mm, 5th to 95th percentile ${g(mc.p5, 6)} to ${g(mc.p95, 6)} mm; the nominal design gives ${g(d.separation_mm, 6)} mm.`
          : `${title}: no samples yet.`,
        caption: 'Every sample traces the plate with all four errors drawn at once; the nominal separation is marked.',
        draw: (p, dark) => core.drawHistogram(p.canvas, JSON.stringify(mc ?? { n: 0 }), title, 'separation', 'mm', d.separation_mm, dark),
      }));
    }
    return plots;
  }
  if (kind === 'waveplate') {
    const c = d.wavelength_curve;
    const worst = worstPlane(d);
    const err = typeof request.acceptance_error_waves === 'number' ? request.acceptance_error_waves : WAVEPLATE_DEFAULT_ACCEPTANCE_ERROR;
    const plots = [designPlot('retardance-wavelength', {
      wide: true,
      label: c.length
        ? `Retardance against wavelength, ${trimmed(c[0][0], 2)} to ${trimmed(c[c.length - 1][0], 2)} nm: from ${g(c[0][1])} to ${g(c[c.length - 1][1])} waves; ${g(d.retardance_waves)} waves at ${trimmed(request.wavelength_nm ?? 632.8, 3)} nm.`
        : 'Retardance against wavelength: no point of the band could be evaluated.',
      caption: 'At normal incidence; crossed plates count negative.',
      draw: (p, dark) => core.drawSeries(p.canvas, seriesJson({
        title: 'Retardance against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'retardance', y_unit: 'waves',
        points: c, current: [designWavelength(request), d.retardance_waves],
        note: `${d.order} order`,
      }), dark),
    })];
    d.angular.forEach((a) => {
      const pts = a.curve;
      const g0 = pts.length ? pts[0][1] : d.retardance_waves;
      const end = pts.length ? pts[pts.length - 1][0] : 0;
      const leaves = pts.length > 0 && a.acceptance_deg < end;
      // Where it leaves, the retardance is g0 ± the acceptance error (the solver bisects for it).
      let current = null;
      if (leaves) {
        const beyond = pts.find((q) => q[0] > a.acceptance_deg) ?? pts[pts.length - 1];
        current = [a.acceptance_deg, g0 + Math.sign(beyond[1] - g0) * err];
      }
      const az = trimmed(a.plane_azimuth_deg, 2);
      const isWorst = a === worst;
      const title = `Plane at ${az}° to the axis${isWorst ? ' (worst)' : ''}`;
      plots.push(designPlot(`retardance-angle-${az}`, {
        small: true,
        label: `Retardance against angle of incidence in the plane at ${az}° to the optic axis${isWorst ? ', the worst plane' : ''}: ${g(g0)} waves at normal incidence, ${pts.length ? g(pts[pts.length - 1][1]) : '—'} waves at ${trimmed(end, 2)}°; ${leaves ? `it moves by ${err} waves at ${g(a.acceptance_deg)}°` : `it stays within ${err} waves up to ${trimmed(end, 2)}°`}.`,
        caption: leaves ? `Acceptance ${g(a.acceptance_deg)}° (±${err} waves).` : `Within ±${err} waves up to ${trimmed(end, 2)}°.`,
        draw: (p, dark) => core.drawSeries(p.canvas, seriesJson({
          title, x_label: 'incidence', x_unit: '°', y_label: 'retardance', y_unit: 'waves',
          points: pts, current, note: `acceptance ${g(a.acceptance_deg)}°`,
        }), dark),
      }));
    });
    return plots;
  }
  if (kind === 'achromat') {
    const c = d.wavelength_curve;
    const [a, b] = d.at_design_wavelengths;
    const inBand = (p) => c.length > 1 && p[0] >= c[0][0] && p[0] <= c[c.length - 1][0];
    const bothInside = inBand(a) && inBand(b);
    return [designPlot('retardance-wavelength', {
      wide: true,
      probes: 2,
      label: `Retardance of the pair against wavelength${c.length ? `, ${trimmed(c[0][0], 2)} to ${trimmed(c[c.length - 1][0], 2)} nm` : ''}: ${g(a[1])} waves at ${trimmed(a[0], 3)} nm and ${g(b[1])} waves at ${trimmed(b[0], 3)} nm, the two design points (${bothInside ? 'both marked' : 'only the first is marked: the band does not hold both'}); largest departure from the target over the band ${g(d.max_error_waves, 3)} waves.`,
      caption: bothInside
        ? 'Both design wavelengths are marked (the second one unlabelled where the labels would overlap); their values are in the Retardance card.'
        : 'The band does not hold both design wavelengths: only the first is marked.',
      draw: (p, dark) => drawTwoMarkers(p, {
        title: 'Retardance of the pair against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'retardance', y_unit: 'waves',
        points: c, note: 'design points marked',
      }, a, b, dark),
    })];
  }
  return [];
}

function designWavelength(request) {
  return typeof request.wavelength_nm === 'number' ? request.wavelength_nm : 632.8;
}

function drawDesignPlot(p) {
  try {
    p.draw(p, darkQuery.matches);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    showDesignError({ field: '', message: `Could not draw the plot ${p.name}: ${fe.message}` });
  }
}

function redrawDesign() {
  for (const p of design.plots) drawDesignPlot(p);
}

/** Writes the shown design: its results as text, then its plots. */
function renderDesign() {
  const s = design.shown;
  const results = document.getElementById('design-results');
  const cardBox = document.getElementById('design-cards');
  const plotBox = document.getElementById('design-plots');
  const rowBox = document.getElementById('design-plots-row');
  if (!s) {
    results.replaceChildren();
    cardBox.replaceChildren();
    plotBox.replaceChildren();
    rowBox.replaceChildren();
    design.plots = [];
    document.getElementById('design-empty').hidden = false;
    return;
  }
  document.getElementById('design-empty').hidden = true;
  const d = s.design;
  const kind = d.kind;
  const parts = kind === 'displacer' ? displacerResults(d, s.run)
    : kind === 'waveplate' ? waveplateResults(d)
      : kind === 'achromat' ? achromatResults(d)
        : recombinerResults(d);
  const name = DESIGN_KINDS.find(([k]) => k === kind)?.[1] ?? kind;
  const head = h('h3', { className: 'design-for', text: `${name.charAt(0).toUpperCase()}${name.slice(1)}${s.complete ? '' : ': nominal design, tolerance run not finished'}` });
  results.replaceChildren(head, parts[0]);
  cardBox.replaceChildren(...parts.slice(1));

  for (const p of design.plots) design.resize.unobserve(p.box);
  design.plots = plotsFor(kind, d, s.request, s.run);
  plotBox.replaceChildren(...design.plots.filter((p) => !p.small).map((p) => p.figure));
  rowBox.replaceChildren(...design.plots.filter((p) => p.small).map((p) => p.figure));
  for (const p of design.plots) {
    drawDesignPlot(p);
    design.resize.observe(p.box);
  }
  document.getElementById('design-use').disabled = false;
  updateDesignStale();
}

// --- the worker ----------------------------------------------------------------------------

function setDesignState(state) {
  const panel = document.getElementById('design');
  if (panel.dataset.state !== state) panel.dataset.state = state;
  const running = state === 'solving' || state === 'running';
  const cancel = document.getElementById('design-cancel');
  if (!running && document.activeElement === cancel) document.getElementById('design-solve').focus();
  cancel.disabled = !running;
  // The results are being replaced while a run goes on (the status line, in the form, still speaks).
  document.getElementById('design-output').setAttribute('aria-busy', running ? 'true' : 'false');
}

function designStatus(text) {
  setText(document.getElementById('design-status'), text);
}

function startDesignWorker() {
  let w;
  try {
    w = new Worker('design-worker.js', { type: 'module' });
  } catch (e) {
    designFailed(`The design worker could not start: ${e && e.message ? e.message : e}`);
    return;
  }
  design.worker = w;
  w.onmessage = (ev) => {
    if (w === design.worker) onDesignMessage(ev.data);
  };
  w.onerror = (ev) => {
    ev.preventDefault();
    if (w !== design.worker) return;
    designFailed(`The design worker stopped: ${ev.message || 'its script or the design core could not be loaded'}.`);
  };
  w.onmessageerror = () => {
    if (w === design.worker) designFailed('The design worker sent a message the page could not read.');
  };
}

function stopDesignWorker() {
  if (design.worker) design.worker.terminate();
  design.worker = null;
}

function designFailed(message) {
  stopDesignWorker();
  const a = design.active;
  design.active = null;
  if (a && a.nominal && design.shown && design.shown.run) {
    design.shown.run.cancelled = true;
    renderDesign();
  } else {
    document.getElementById('design-run').hidden = true;
  }
  showDesignError({ field: '', message: `${message} Press Solve to try again.` });
  setDesignState('error');
  designStatus('Not solved.');
}

function showProgress(done, total) {
  const bar = document.getElementById('design-progress');
  if (bar.max !== total) bar.max = total;
  bar.value = done;
  setText(document.getElementById('design-progress-text'), `${done} of ${total} samples`);
}

function onDesignMessage(msg) {
  if (!msg || typeof msg !== 'object') return;
  if (msg.type === 'ready') return;
  if (msg.type === 'failed') {
    designFailed(msg.message);
    return;
  }
  const a = design.active;
  if (!a || msg.id !== a.id) return;
  if (msg.type === 'nominal') {
    a.nominal = msg.design;
    const total = Math.floor(typeof a.request.samples === 'number' ? a.request.samples : DESIGN_DEFAULT_SAMPLES);
    a.total = total;
    design.shown = { request: a.request, design: msg.design, complete: false, run: { done: 0, total, cancelled: false } };
    document.getElementById('design-run').hidden = false;
    showProgress(0, total);
    setDesignState('running');
    designStatus('Nominal design shown; the tolerance run goes on in the background.');
    clearDesignErrors();
    renderDesign();
  } else if (msg.type === 'progress') {
    a.done = msg.done;
    a.total = msg.total;
    if (design.shown && design.shown.run) design.shown.run.done = msg.done;
    showProgress(msg.done, msg.total);
    const st = document.getElementById('design-mc-state');
    if (st) setText(st, `Running: ${msg.done} of ${msg.total} samples.`);
  } else if (msg.type === 'done') {
    const ms = performance.now() - a.t0;
    design.active = null;
    design.lastMs = ms;
    design.shown = { request: a.request, design: msg.design, complete: true, run: null };
    if (!a.nominal) document.getElementById('design-run').hidden = true;
    clearDesignErrors();
    setDesignState('done');
    const mc = msg.design.monte_carlo;
    designStatus(mc ? `Solved, with ${mc.n} Monte Carlo samples, in ${Math.round(ms)} ms.` : `Solved in ${Math.round(ms)} ms.`);
    renderDesign();
  } else if (msg.type === 'error') {
    design.active = null;
    if (a.nominal && design.shown && design.shown.run) {
      design.shown.run.cancelled = true;
      renderDesign();
    }
    if (msg.internal) {
      // The core may be in a bad state after an internal error: start afresh.
      stopDesignWorker();
      startDesignWorker();
    }
    document.getElementById('design-run').hidden = true;
    showDesignError(msg.error);
    setDesignState('error');
    designStatus(`Not solved: ${msg.error.field ? `the field ${msg.error.field} needs attention` : 'see the message above'}.`);
    updateDesignStale(true);
  }
}

function solveDesign() {
  const request = designRequest();
  if (design.active) stopDesignWorker(); // a new request replaces the one under way
  if (!design.worker) startDesignWorker();
  if (!design.worker) return;
  clearDesignErrors();
  const id = design.nextId;
  design.nextId += 1;
  design.active = { id, request, t0: performance.now(), nominal: null, done: 0, total: 0 };
  setDesignState('solving');
  designStatus('Solving…');
  design.worker.postMessage({ type: 'solve', id, request });
}

function cancelDesign() {
  const a = design.active;
  if (!a) return;
  stopDesignWorker();
  startDesignWorker();
  design.active = null;
  if (a.nominal && design.shown && design.shown.run) {
    design.shown.run.cancelled = true;
    design.shown.run.done = a.done;
    setDesignState('cancelled');
    designStatus(`Cancelled after ${a.done} of ${a.total} samples; the nominal design stays.`);
    renderDesign();
  } else {
    setDesignState(design.shown ? 'done' : 'idle');
    designStatus('Cancelled.');
  }
  document.getElementById('design-solve').focus();
}

function useDesign() {
  const s = design.shown;
  if (!s) return;
  try {
    applyScenario(structuredClone(s.design.scenario));
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    showDesignError({ field: '', message: `The part could not be loaded into the set-up: ${fe.field ? `${fe.field}: ` : ''}${fe.message}` });
    return;
  }
  flushFragment();
  designStatus('The designed part is now the set-up: the views and results above show it.');
  document.getElementById('views').focus();
}

/** Says so when the fields no longer match the design shown (or the last request failed). */
function updateDesignStale(failed = false) {
  const note = document.getElementById('design-stale');
  const s = design.shown;
  let text = '';
  if (s && failed) {
    text = 'Not solved: the results below are for the last request that solved.';
  } else if (s && !design.active && JSON.stringify(designRequest()) !== JSON.stringify(s.request)) {
    text = 'The fields have changed since this design was solved: press Solve to update it.';
  }
  setText(note, text);
  if (note.hidden !== !text) note.hidden = !text;
}

function setupDesign() {
  buildDesignFields();
  layoutDesignFields();
  const form = document.getElementById('design-form');
  form.addEventListener('submit', (ev) => {
    ev.preventDefault();
    solveDesign();
  });
  const onEdit = (ev) => {
    const f = ev.target instanceof HTMLElement ? ev.target.dataset.designField : undefined;
    if (f === undefined) return;
    if (dfields[f]) dfields[f].touched = true;
    if (ev.target.tagName === 'SELECT') layoutDesignFields();
    if (!designErrorShown) updateDesignStale();
  };
  form.addEventListener('input', onEdit);
  form.addEventListener('change', onEdit);
  document.getElementById('design-cancel').addEventListener('click', cancelDesign);
  document.getElementById('design-use').addEventListener('click', useDesign);
  design.resize = new ResizeObserver((entries) => {
    const todo = new Set();
    for (const e of entries) {
      const p = design.plots.find((x) => x.box === e.target);
      if (p) todo.add(p);
    }
    requestAnimationFrame(() => {
      for (const p of todo) if (design.plots.includes(p)) drawDesignPlot(p);
    });
  });
  darkQuery.addEventListener('change', () => redrawDesign());
  startDesignWorker();
}

// ---------------------------------------------------------------------------------------------
// Wiring.

function onControlEvent(ev) {
  const t = ev.target;
  if (!(t instanceof HTMLElement) || !t.dataset.field) return;
  if (t.type === 'range' && t.num) {
    t.num.value = t.value;
  } else if (t.classList.contains('num') && t.range) {
    const v = readNumber(t.value);
    if (typeof v === 'number') t.range.value = String(v);
  }
  const field = t.dataset.field;
  if (field === 'beam.polarization.kind') showPolarizationKind();
  const card = t.closest('li.card')?.card;
  if (card) {
    if (field.endsWith('.kind')) {
      card.setKind(t.value);
      renumberCards();
    } else if (field.endsWith('.material')) {
      card.showMaterial();
    }
  }
  schedule();
}

// ---------------------------------------------------------------------------------------------
// Export: each view as SVG or PNG, the plots' data as CSV or JSON, the results and the set-up.
// Every file is made in the page and handed over through a Blob URL and a temporary
// <a download>: nothing is sent anywhere.

const PLOT_VIEWS = ['walkoff-tilt', 'separation-wavelength', 'retardance-wavelength'];
const VIEW_TITLES = {
  side: 'side view',
  end: 'end view',
  poincare: 'Poincaré sphere',
  'walkoff-tilt': 'walk-off against cut tilt plot',
  'separation-wavelength': 'separation against wavelength plot',
  'retardance-wavelength': 'retardance against wavelength plot',
};
const EXPORT_FORMATS = { svg: 'SVG', png: 'PNG', csv: 'CSV', json: 'JSON' };

function exportStatus(text, failed = false) {
  const el = document.getElementById('export-status');
  if (!el) return;
  el.textContent = text;
  el.classList.toggle('field-error', failed);
}

function download(filename, blob) {
  const url = URL.createObjectURL(blob);
  const a = h('a', { href: url, download: filename, hidden: true });
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
  exportStatus(`Saved ${filename}.`);
}

function csvField(v) {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function csvLine(fields) {
  return fields.map(csvField).join(',');
}

function withUnit(label, unit) {
  return unit ? `${label} (${unit})` : label;
}

/** A plot's data as CSV: a header naming the columns with units, the samples, then the
 * scenario's own operating point marked "current" in the third column. */
function seriesCsv(s) {
  const lines = [csvLine([withUnit(s.x_label, s.x_unit), withUnit(s.y_label, s.y_unit), 'point'])];
  for (const [x, y] of s.points) lines.push(csvLine([x, y, 'sample']));
  if (s.current) lines.push(csvLine([s.current[0], s.current[1], 'current']));
  return lines.join('\r\n') + '\r\n';
}

/** The results as CSV: one row per output ray, then one per crystal of the stack. */
function resultsCsv(r) {
  const lines = [csvLine(['label', 'power', 'exit_x_mm', 'exit_y_mm', 'S0', 'S1', 'S2', 'S3',
    'ellipse_azimuth_deg', 'ellipticity_deg', 'handedness'])];
  for (const ray of r.rays) {
    const st = ray.stokes ?? [];
    lines.push(csvLine([ray.label, ray.power, ray.exit_position_mm?.[0], ray.exit_position_mm?.[1],
      st[0], st[1], st[2], st[3], ray.ellipse?.azimuth_deg, ray.ellipse?.ellipticity_deg, ray.ellipse?.handedness]));
  }
  lines.push('');
  lines.push(csvLine(['element', 'material', 'no', 'ne', 'separation_mm', 'retardance_rad']));
  r.elements.forEach((e, i) => {
    if (e.kind !== 'crystal') return;
    lines.push(csvLine([i + 1, e.material, e.no, e.ne, e.separation_mm, e.retardance_rad]));
  });
  return lines.join('\r\n') + '\r\n';
}

function jsonBlob(value) {
  return new Blob([JSON.stringify(value, null, 2) + '\n'], { type: 'application/json' });
}

function exportView(view, format) {
  const v = views.find((x) => x.name === view);
  if (!v) return;
  const name = `doublespar-${view}.${format}`;
  if (format === 'svg') {
    const w = Math.max(1, Math.round(v.canvas.clientWidth));
    const hgt = Math.max(1, Math.round(v.canvas.clientHeight));
    download(name, new Blob([session.svg(view, w, hgt, false)], { type: 'image/svg+xml' }));
  } else if (format === 'png') {
    v.canvas.toBlob((blob) => {
      if (blob) download(name, blob);
      else exportStatus(`Could not make ${name}: the view has no picture yet.`, true);
    }, 'image/png');
  } else {
    const s = session.series(view);
    if (!s) {
      exportStatus(`The ${VIEW_TITLES[view] ?? view} has no data series.`, true);
      return;
    }
    if (format === 'csv') download(name, new Blob([seriesCsv(s)], { type: 'text/csv' }));
    else download(name, jsonBlob(s));
  }
}

function exportResults(what, format) {
  if (what === 'scenario') {
    download('doublespar-scenario.json', jsonBlob(JSON.parse(session.scenarioJson())));
  } else if (format === 'json') {
    download('doublespar-results.json', jsonBlob({
      scenario: JSON.parse(session.scenarioJson()),
      result: session.result(),
    }));
  } else {
    download('doublespar-results.csv', new Blob([resultsCsv(session.result())], { type: 'text/csv' }));
  }
}

function onExportClick(ev) {
  const btn = ev.target.closest('button[data-export]');
  if (!btn || !session) return;
  const [what, format] = btn.dataset.export.split(':');
  try {
    if (what === 'results' || what === 'scenario') exportResults(what, format);
    else exportView(what, format);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    exportStatus(`Could not export: ${fe.message}`, true);
  }
}

function setupExport() {
  for (const v of views) {
    const title = VIEW_TITLES[v.name] ?? v.name;
    const formats = PLOT_VIEWS.includes(v.name) ? ['svg', 'png', 'csv', 'json'] : ['svg', 'png'];
    const row = h('div', { className: 'export-row', role: 'group', 'aria-label': `Export the ${title}` },
      h('span', { className: 'export-label', 'aria-hidden': 'true', text: 'Export' }));
    for (const f of formats) {
      const data = f === 'csv' || f === 'json' ? ' data' : '';
      row.appendChild(h('button', {
        type: 'button',
        'data-export': `${v.name}:${f}`,
        'aria-label': `Download the ${title}${data} as ${EXPORT_FORMATS[f]}`,
        text: EXPORT_FORMATS[f],
      }));
    }
    v.box.after(row);
  }
  document.getElementById('views').addEventListener('click', onExportClick);
  document.getElementById('results').addEventListener('click', onExportClick);
}

// The print sheet: a compact read-only summary of the set-up, shown only when printing.

function setupValue(v) {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return minus(String(v));
  if (typeof v !== 'object') return String(v);
  if (Array.isArray(v)) return v.map(setupValue).join(', ');
  return Object.entries(v).map(([k, x]) => `${k.replace(/_/g, ' ')} ${setupValue(x)}`).join(', ');
}

function updatePrintSheet(scenario) {
  const box = document.getElementById('print-setup');
  if (!box || !scenario) return;
  const top = h('dl', { className: 'print-list' });
  for (const [k, v] of Object.entries(scenario)) {
    if (k === 'elements' || k === 'version') continue;
    if (v && typeof v === 'object' && !Array.isArray(v)) {
      for (const [k2, v2] of Object.entries(v)) {
        top.appendChild(h('div', {}, h('dt', { text: `${k} ${k2}`.replace(/_/g, ' ') }), h('dd', { text: setupValue(v2) })));
      }
    } else {
      top.appendChild(h('div', {}, h('dt', { text: k.replace(/_/g, ' ') }), h('dd', { text: setupValue(v) })));
    }
  }
  const list = h('ol', { className: 'print-elements' });
  for (const e of scenario.elements ?? []) {
    const { kind, ...rest } = e;
    list.appendChild(h('li', {}, h('strong', { text: KIND_NAMES[kind] ?? String(kind) }), ` ${setupValue(rest)}`));
  }
  box.replaceChildren(top, h('h3', { text: 'Stack' }), list);
}

// ---------------------------------------------------------------------------------------------
// Printing: the sheet goes on paper, so the views are drawn in the light palette.

let printDark = false;
function beforePrint() {
  // The sheet is printed on paper: draw the views with the light palette.
  printDark = darkQuery.matches;
  if (printDark) redraw();
}
function afterPrint() {
  if (printDark) {
    printDark = false;
    redraw();
  }
}

function setupViews() {
  const ro = new ResizeObserver(onResize);
  for (const canvas of document.querySelectorAll('canvas[data-view]')) {
    const name = canvas.dataset.view;
    if (!viewList.includes(name)) continue;
    const v = { name, canvas, box: canvas.parentElement, failed: false };
    views.push(v);
    ro.observe(v.box);
  }
  darkQuery.addEventListener('change', () => redraw());
}

async function main() {
  const loading = document.getElementById('loading');
  try {
    core = await import('./pkg/doublespar.js');
    await core.default();
  } catch (e) {
    const msg = `The optics core could not be loaded (${e && e.message ? e.message : e}). `
      + 'The page needs www/pkg/doublespar.js and doublespar_bg.wasm, built by scripts/build-web.sh, '
      + 'and a browser with WebAssembly.';
    loading.textContent = 'The controls are not available because the optics core did not load (see the message above).';
    loading.classList.add('field-error');
    showPanic(msg);
    for (const b of document.querySelectorAll('button, select')) b.disabled = true;
    return;
  }
  session = new core.Session();
  materialList = core.materials();
  viewList = core.viewNames();

  buildTopControls();
  const status = h('p', { id: 'stack-status', className: 'visually-hidden', role: 'status', 'aria-live': 'polite' });
  document.getElementById('stack').appendChild(status);

  const form = document.getElementById('controls');
  form.addEventListener('submit', (ev) => ev.preventDefault());
  form.addEventListener('input', onControlEvent);
  form.addEventListener('change', onControlEvent);
  stackList().addEventListener('click', onStackClick);
  document.querySelector('.add-row').addEventListener('click', onAddClick);
  document.getElementById('copy-link').addEventListener('click', () => { copyLink(); });
  document.getElementById('load-preset').addEventListener('click', () => {
    const key = document.getElementById('preset').value;
    const doc = key === 'demo' ? JSON.parse(core.demoScenario()) : structuredClone(PRESETS[key]);
    applyScenario(doc);
    flushFragment();
  });
  window.addEventListener('hashchange', (ev) => {
    if (lastGoodText !== null && location.hash === FRAGMENT_KEY + encodeURIComponent(lastGoodText)) return;
    loadFromLocation(new URL(ev.oldURL).hash);
  });
  setupFileOpen();

  document.getElementById('results').addEventListener('click', (ev) => {
    const btn = ev.target.closest('button[data-show-all]');
    if (!btn || !lastResult) return;
    const which = btn.dataset.showAll;
    showAll[which] = !showAll[which];
    renderResults(lastResult);
    document.querySelector(`button[data-show-all="${which}"]`)?.focus();
  });

  setupViews();
  setupExport();
  window.addEventListener('beforeprint', beforePrint);
  window.addEventListener('afterprint', afterPrint);
  loadFromLocation();
  loading.remove();
  setupDesign();
  document.body.classList.add('ready');
  window.doublespar = {
    session,
    redraw,
    applyScenario,
    designRequest,
    designShown: () => (design.shown ? structuredClone({ request: design.shown.request, design: design.shown.design, complete: design.shown.complete }) : null),
  };
}

main();
