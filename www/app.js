// Doublespar page: builds the controls, traces the scenario with the WebAssembly core on every
// edit, draws the six views and writes the results as text. No framework and no network access:
// the bindings module (pkg/doublespar.js, built by scripts/build-web.sh) is loaded here, and
// every other import is one of the page's own modules beside this file: the results as text
// (results.js), the views (views.js), the design panel (design-panel.js), the exports and print
// sheet (export.js), and the helpers they share (dom.js, format.js, field-error.js: one field
// and its error for both panels). This module creates the page's state (state.js, one object),
// starts the page (main) and wires the modules together, handing each that state.
//
// Data flow: controls -> scenario object -> session.updateJson(text) -> result -> results text,
// canvases, aria-labels, URL fragment. A rejected scenario shows its message beside the control
// named by the error's field path and leaves the last good picture and results in place.
//
// Contract: DEVELOPERS.md, "The page" (data-field, data-error-for, data-quantity, data-view, the
// fragment, the file chooser) and the test hook window.doublespar = {session, redraw(),
// applyScenario(obj), designRequest(), designShown(), convergent()}, set once the page is ready.

'use strict';

import { h, setAttr, setText, stepNumber, uid } from './dom.js';
import { readNumber } from './format.js';
import { Field, FieldErrors, SETUP_NAMES, errorSlot, toFieldError } from './field-error.js';
import { NEMATICS, createState, materialName } from './state.js';
import { CardGeometry, GEOMETRY_GROUPS } from './geometry.js';
import { CardFormula, FORMULA_GROUPS } from './formula.js';
import { setupDesign } from './design-panel.js';
import { setupExport, updatePrintSheet } from './export.js';
import { renderResults, setupResults, toggleShowAll } from './results.js';
import { describeViews, drawViews, redraw, setupViews } from './views.js';
import { SetupHistory } from './history.js';

const MAX_ELEMENTS = 64;
const MAX_CRYSTALS = 12;
const FRAGMENT_KEY = '#scenario=';
const DESIGN_KEY = 'design=';

// Defaults used when a new element is added or a loaded document leaves a field out.
const ELEMENT_DEFAULTS = {
  crystal: { material: 'calcite', thickness_mm: 10, tilt_deg: 45, azimuth_deg: 0, roll_deg: 0, no: 1.6584, ne: 1.4864, nx: 1.74, ny: 1.75, nz: 1.83 },
  retarder: { retardance_waves: 0.25, fast_axis_deg: 0 },
  polarizer: { transmission_axis_deg: 0 },
  rotator: { angle_deg: 45 },
  lc_cell: { thickness_um: 5, lc: '5cb', rubbing_azimuth_deg: 45, twist_deg: 0, pretilt_deg: 2, voltage_v: 0 },
};
// The choice beside the catalogue's nematics (state.js, NEMATICS) that keeps constants a loaded
// document gave.
const CUSTOM_LC = 'custom';
// A nematic's own constants (src/contract/lc_cell.rs): key, label, unit and the value they start
// from, 5CB's (the catalogue's, its indices near 589 nm).
const LC_CONSTANTS = [['ne', 'nₑ, along the director', '', 1.716], ['no', 'nₒ, across the director', '', 1.533], ['k11_pn', 'K11, splay', 'pN', 6.4], ['k22_pn', 'K22, twist', 'pN', 3], ['k33_pn', 'K33, bend', 'pN', 10], ['eps_parallel', 'ε∥, static, along', '', 19.7], ['eps_perpendicular', 'ε⊥, static, across', '', 6.7]];
// The material choice of a crystal given by its three principal indices.
const CUSTOM_PRINCIPAL = 'custom-principal';
// The material choice of a crystal given by its own dispersion formula (formula.js).
const CUSTOM_FORMULA = 'custom-formula';
const KIND_NAMES = { crystal: 'crystal plate', retarder: 'retarder', polarizer: 'polarizer', rotator: 'rotator', lc_cell: 'liquid-crystal cell' };

// The page's state, handed to the modules that need it (state.js).
const state = createState({ darkQuery: window.matchMedia('(prefers-color-scheme: dark)') });

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

const ANGLE = (min, max) => ({ min, max, step: 0.1 });

function addTop(container, path, field) {
  field.setPath(path);
  state.controls[path] = field;
  container.appendChild(field.row);
  return field;
}

function buildTopControls() {
  const light = document.getElementById('light-fields');
  addTop(light, 'wavelength_nm', new Field({ key: 'wavelength_nm', label: 'Wavelength', unit: 'nm' }));
  addTop(light, 'wavelength_in', new Field({ key: 'wavelength_in',
    label: 'Wavelength measured in',
    kind: 'select',
    options: [['vacuum', 'vacuum'], ['air', 'standard air']],
    hint: 'Air wavelengths are converted to vacuum by the standard-air index (Ciddor 1996).',
  }));
  addTop(light, 'temperature_c', new Field({ key: 'temperature_c', label: 'Temperature', unit: '°C', hint: 'Crystal and liquid-crystal indices, and crystal thicknesses, at this temperature; thicknesses are entered at 20 °C.' }));
  addTop(light, 'outside_index', new Field({ key: 'outside_index', label: 'Outside index', unit: '', step: 0.01, hint: 'Refractive index of the medium around and between the elements (1 to 5).' }));
  addTop(light, 'interface_losses', new Field({ key: 'interface_losses',
    label: 'Crystal faces',
    kind: 'select',
    options: [['ideal', 'ideal, no losses'], ['uncoated', 'uncoated, Fresnel']],
  }));
  addTop(light, 'beam.diameter_mm', new Field({ key: 'beam.diameter_mm', label: 'Beam diameter', unit: 'mm' }));
  const after = document.getElementById('screen-fields');
  addTop(after, 'screen_mm', new Field({ key: 'screen_mm', label: 'Screen distance', unit: 'mm' }));
  // The spectrum: off by default; its range is kept while it is off.
  addTop(after, 'spectrum', new Field({ key: 'spectrum', label: 'Spectrum', kind: 'select',
    options: [['off', 'off'], ['on', 'traced over a range']],
    hint: 'Transmission of the whole set-up against wavelength, each point a full trace.' }));
  addTop(after, 'spectrum.from_nm', new Field({ key: 'from_nm', label: 'Spectrum from', unit: 'nm' })).set(400);
  addTop(after, 'spectrum.to_nm', new Field({ key: 'to_nm', label: 'Spectrum to', unit: 'nm' })).set(800);
  addTop(after, 'spectrum.points', new Field({ key: 'points', label: 'Spectrum points', unit: '', step: 1, hint: '2 to 20 000 wavelengths, both ends included.' })).set(401);

  const inc = document.getElementById('incidence-fields');
  inc.appendChild(errorSlot('beam'));
  inc.appendChild(errorSlot('beam.incidence'));
  addTop(inc, 'beam.incidence.polar_deg', new Field({ key: 'polar_deg', label: 'Polar angle', unit: '°', slider: ANGLE(-89.9, 89.9) }));
  addTop(inc, 'beam.incidence.azimuth_deg', new Field({ key: 'azimuth_deg', label: 'Azimuth', spoken: 'Incidence azimuth', unit: '°', slider: ANGLE(-180, 180) }));

  const pol = document.getElementById('polarization-fields');
  pol.appendChild(errorSlot('beam.polarization'));
  addTop(pol, 'beam.polarization.kind', new Field({ key: 'kind',
    label: 'Kind',
    spoken: 'Kind of input polarization',
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
  const azimuth = addTop(pol, 'beam.polarization.azimuth_deg', new Field({ key: 'azimuth_deg',
    label: 'Azimuth', spoken: 'Polarization azimuth', unit: '°', slider: ANGLE(-180, 180),
  }));
  const ellipticity = addTop(pol, 'beam.polarization.ellipticity_deg', new Field({ key: 'ellipticity_deg',
    label: 'Ellipticity angle', unit: '°', slider: ANGLE(-45, 45), hint: 'χ with tan χ = ±b/a; positive is right-handed (S3 > 0).',
  }));
  const handed = addTop(pol, 'beam.polarization.handedness', new Field({ key: 'handedness',
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
    addTop(jgrid, `beam.polarization.jones[${a}][${b}]`, new Field({ key: '', label, step: 0.1 }));
  }
  jones.appendChild(errorSlot('beam.polarization.jones[0]'));
  jones.appendChild(errorSlot('beam.polarization.jones[1]'));
  jones.appendChild(errorSlot('beam.polarization.jones'));
  jones.appendChild(h('p', { className: 'hint', text: 'Scaled to unit power; e1 and e2 are x̂ and ŷ at normal incidence.' }));
  pol.appendChild(jones);

  const stokes = h('div', { className: 'subgroup', role: 'group', 'aria-labelledby': 'stokes-title' },
    h('p', { className: 'subgroup-title', id: 'stokes-title', text: 'Stokes vector' }));
  const sgrid = h('div', { className: 'pair-grid' });
  stokes.appendChild(sgrid);
  for (let i = 0; i < 4; i += 1) {
    addTop(sgrid, `beam.polarization.stokes[${i}]`, new Field({ key: '', label: `S${i}`, step: 0.1 }));
  }
  stokes.appendChild(errorSlot('beam.polarization.stokes'));
  stokes.appendChild(h('p', { className: 'hint', text: 'Partially polarized light is allowed: √(S1² + S2² + S3²) ≤ S0. Scaled to S0 = 1.' }));
  pol.appendChild(stokes);

  const unpolarizedNote = h('p', { className: 'hint', text: 'Unpolarized light: no further settings.' });
  pol.appendChild(unpolarizedNote);

  state.polarizationParts = {
    linear: [azimuth.row],
    circular: [handed.row],
    elliptical: [azimuth.row, ellipticity.row],
    jones: [jones],
    stokes: [stokes],
    unpolarized: [unpolarizedNote],
  };
  state.polarizationAll = [azimuth.row, ellipticity.row, handed.row, jones, stokes, unpolarizedNote];

  // Values for the kinds not shown, so that switching kind starts from something sensible.
  azimuth.set(45);
  ellipticity.set(20);
  handed.set('right');
  state.controls['beam.polarization.jones[0][0]'].set(1);
  state.controls['beam.polarization.jones[0][1]'].set(0);
  state.controls['beam.polarization.jones[1][0]'].set(0);
  state.controls['beam.polarization.jones[1][1]'].set(1);
  state.controls['beam.polarization.stokes[0]'].set(1);
  state.controls['beam.polarization.stokes[1]'].set(0.5);
  state.controls['beam.polarization.stokes[2]'].set(0);
  state.controls['beam.polarization.stokes[3]'].set(0);
}

/** Shows the spectrum's range while the spectrum is on. */
function showSpectrum() {
  const on = state.controls.spectrum.value === 'on';
  for (const p of ['spectrum.from_nm', 'spectrum.to_nm', 'spectrum.points']) {
    const row = state.controls[p].row;
    if (row.hidden !== !on) row.hidden = !on;
  }
}

function showPolarizationKind() {
  const kind = state.controls['beam.polarization.kind'].value;
  const shown = new Set(state.polarizationParts[kind] ?? []);
  for (const el of state.polarizationAll) {
    if (el.hidden !== !shown.has(el)) el.hidden = !shown.has(el);
  }
}

// ---------------------------------------------------------------------------------------------
// The stack: one card per element.

const stackList = () => document.getElementById('stack-list');


/** A dispersion source as the select names it: first author and year, "default" for the
 * catalogue's, "unverified" for a formula without a journal source. */
function sourceLabel(s) {
  const [who, year] = s.key === 'data-sheet' ? ['data-sheet formula', ''] : [s.key.replace(/-(\d{4})$/, ''), s.key.match(/\d{4}$/)?.[0] ?? ''];
  const name = `${who.charAt(0).toUpperCase()}${who.slice(1)}${year ? ` ${year}` : ''}`;
  const notes = [s.default ? 'default' : '', s.verified === false ? 'unverified' : ''].filter(Boolean).join(', ');
  return notes ? `${name} (${notes})` : name;
}

class Card {
  constructor(kind) {
    this.uid = uid('card');
    this.el = h('li', { className: 'card', id: this.uid });
    this.el.card = this;
    const fs = h('fieldset', { className: 'card-body' });
    this.legend = h('legend', { className: 'card-number' });
    fs.appendChild(this.legend);

    this.kindField = new Field({ key: 'kind',
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
    this.cardError = errorSlot(null);
    fs.appendChild(this.cardError);

    this.f = {};
    const f = this.f;
    f.gap = new Field({ key: 'gap_mm', label: 'Gap before', unit: 'mm' });

    // Crystal.
    const matOptions = state.materialList.map((m) => [m.key, materialName(state, m.key)]);
    matOptions.push(['custom', 'custom indices nₒ, nₑ']);
    matOptions.push([CUSTOM_PRINCIPAL, 'custom indices nx, ny, nz']);
    matOptions.push([CUSTOM_FORMULA, 'custom formula (Sellmeier)']);
    f.material = new Field({ key: 'material', label: 'Material', kind: 'select', options: matOptions });
    this.materialNote = h('p', { className: 'hint material-note' });
    f.material.row.insertBefore(this.materialNote, f.material.error);
    // The dispersion source: shown for a catalogue crystal with more than one published formula;
    // each material keeps the source last chosen for it.
    f.source = new Field({ key: 'source', label: 'Dispersion source', kind: 'select', options: [['', 'default']], hint: 'Published formula for the indices; the results say how far the sources disagree.' });
    this.sourceFor = {};
    this.sourceOptionsFor = undefined;
    f.no = new Field({ key: 'no', label: 'nₒ, ordinary index', unit: '', step: 0.001 });
    f.ne = new Field({ key: 'ne', label: 'nₑ, extraordinary index', unit: '', step: 0.001 });
    this.customBox = h('div', { className: 'subgroup custom-indices' }, f.no.row, f.ne.row);
    f.nx = new Field({ key: 'nx', label: 'nx, index along x', unit: '', step: 0.001 });
    f.ny = new Field({ key: 'ny', label: 'ny, index along y', unit: '', step: 0.001 });
    f.nz = new Field({ key: 'nz', label: 'nz, index along z', unit: '', step: 0.001 });
    this.principalBox = h('div', { className: 'subgroup custom-indices' }, f.nx.row, f.ny.row, f.nz.row);
    this.formula = new CardFormula();
    // Optical activity: shown for chiral crystals (quartz) only.
    f.handedness = new Field({ key: 'handedness', label: 'Handedness', kind: 'select', options: [['right', 'right-handed'], ['left', 'left-handed']] });
    f.activity = new Field({ key: 'optical_activity', label: 'Optical activity', kind: 'select', options: [['true', 'on'], ['false', 'off']], hint: 'Rotation along the optic axis, elliptical modes near it.' });
    this.chiralBox = h('div', { className: 'subgroup chirality' }, f.handedness.row, f.activity.row);
    f.thickness = new Field({ key: 'thickness_mm', label: 'Thickness', unit: 'mm' });
    f.tilt = new Field({ key: 'axis.tilt_deg', label: 'Axis tilt', unit: '°', slider: ANGLE(0, 180), hint: 'Cut angle: optic axis from the plate normal +z.' });
    f.azimuth = new Field({ key: 'axis.azimuth_deg', label: 'Axis azimuth', unit: '°', slider: ANGLE(-180, 180) });
    f.roll = new Field({ key: 'axes.roll_deg', label: 'Roll about z', unit: '°', slider: ANGLE(-180, 180), hint: 'Turns the x and y principal axes about the z axis.' });
    this.axisError = errorSlot(null);
    this.axisTitle = h('p', { className: 'subgroup-title', text: 'Optic axis' });
    const axisBox = h('div', { className: 'subgroup axis' }, this.axisTitle, f.tilt.row, f.azimuth.row, f.roll.row, this.axisError);
    this.groups = {
      crystal: h('div', { className: 'kind-fields' }, f.material.row, f.source.row, this.customBox, this.principalBox, this.formula.box, this.chiralBox, f.thickness.row, axisBox),
    };

    // Retarder.
    f.retardance = new Field({ key: 'retardance_waves', label: 'Retardance', unit: 'waves' });
    f.fast = new Field({ key: 'fast_axis_deg', label: 'Fast axis', unit: '°', slider: ANGLE(-180, 180) });
    this.groups.retarder = h('div', { className: 'kind-fields' }, f.retardance.row, f.fast.row);
    // Polarizer.
    f.transmission = new Field({ key: 'transmission_axis_deg', label: 'Transmission axis', unit: '°', slider: ANGLE(-180, 180) });
    this.groups.polarizer = h('div', { className: 'kind-fields' }, f.transmission.row);
    // Rotator.
    f.angle = new Field({ key: 'angle_deg', label: 'Rotation', unit: '°', slider: ANGLE(-180, 180), hint: 'From e1 toward e2.' });
    this.groups.rotator = h('div', { className: 'kind-fields' }, f.angle.row);
    // Liquid-crystal cell (src/contract/lc_cell.rs).
    f.cellThickness = new Field({ key: 'thickness_um', label: 'Cell gap', unit: 'µm' });
    f.lc = new Field({ key: 'lc', label: 'Liquid crystal', kind: 'select', options: [...NEMATICS, [CUSTOM_LC, 'custom constants']] });
    for (const [k, label, unit, v] of LC_CONSTANTS) {
      f[`lc_${k}`] = new Field({ key: `lc.${k}`, label, unit, step: 0.01 });
      f[`lc_${k}`].set(v);
    }
    this.lcBox = h('div', { className: 'subgroup custom-indices' }, ...LC_CONSTANTS.map(([k]) => f[`lc_${k}`].row));
    f.rubbing = new Field({ key: 'rubbing_azimuth_deg', label: 'Rubbing azimuth', unit: '°', slider: ANGLE(-180, 180), hint: 'Director azimuth at the entrance face.' });
    f.twist = new Field({ key: 'twist_deg', label: 'Twist', unit: '°', slider: ANGLE(-180, 180) });
    f.pretilt = new Field({ key: 'pretilt_deg', label: 'Pretilt', unit: '°', slider: ANGLE(0, 89) });
    f.voltage = new Field({ key: 'voltage_v', label: 'Voltage', unit: 'V', slider: { min: 0, max: 10, step: 0.01 }, hint: 'RMS across the cell.' });
    this.lcCustom = undefined;
    this.groups.lc_cell = h('div', { className: 'kind-fields' }, f.lc.row, this.lcBox, f.cellThickness.row, f.rubbing.row, f.twist.row, f.pretilt.row, f.voltage.row);

    // Version 2's geometry (geometry.js).
    this.geometry = new CardGeometry();

    fs.appendChild(f.gap.row);
    fs.appendChild(this.geometry.contactBox);
    for (const g of Object.values(this.groups)) fs.appendChild(g);
    fs.appendChild(this.geometry.details);
    this.el.appendChild(fs);

    const d = ELEMENT_DEFAULTS;
    f.gap.set(0);
    f.material.set(state.materialList.some((m) => m.key === d.crystal.material) ? d.crystal.material : (state.materialList[0]?.key ?? 'custom'));
    f.no.set(d.crystal.no);
    f.ne.set(d.crystal.ne);
    f.nx.set(d.crystal.nx);
    f.ny.set(d.crystal.ny);
    f.nz.set(d.crystal.nz);
    f.roll.set(d.crystal.roll_deg);
    f.handedness.set('right');
    f.activity.set('true');
    f.thickness.set(d.crystal.thickness_mm);
    f.tilt.set(d.crystal.tilt_deg);
    f.azimuth.set(d.crystal.azimuth_deg);
    f.retardance.set(d.retarder.retardance_waves);
    f.fast.set(d.retarder.fast_axis_deg);
    f.transmission.set(d.polarizer.transmission_axis_deg);
    f.angle.set(d.rotator.angle_deg);
    f.cellThickness.set(d.lc_cell.thickness_um);
    f.lc.set(d.lc_cell.lc);
    f.rubbing.set(d.lc_cell.rubbing_azimuth_deg);
    f.twist.set(d.lc_cell.twist_deg);
    f.pretilt.set(d.lc_cell.pretilt_deg);
    f.voltage.set(d.lc_cell.voltage_v);
    this.setKind(kind);
  }

  get kind() {
    return this.kindField.value;
  }

  setKind(kind) {
    this.kindField.set(kind);
    this.shownKind = this.kind;
    for (const [k, g] of Object.entries(this.groups)) {
      if (g.hidden !== (k !== this.kind)) g.hidden = k !== this.kind;
    }
    this.showMaterial();
    this.syncGeometry();
  }

  /** The user chose another kind: a crystal's geometry is kept aside (geometry.js). */
  changeKind(kind) {
    this.geometry.kindChanged(this.shownKind, kind);
    this.setKind(kind);
  }

  /** Which geometry rows show, and the geometry group's summary line. */
  syncGeometry() {
    this.geometry.sync(this.kind, this.index ?? 0);
  }

  showMaterial() {
    const key = this.f.material.value;
    const show = (el, on) => {
      if (el.hidden !== !on) el.hidden = !on;
    };
    show(this.customBox, key === 'custom');
    show(this.lcBox, this.f.lc.value === CUSTOM_LC);
    show(this.principalBox, key === CUSTOM_PRINCIPAL);
    show(this.formula.box, key === CUSTOM_FORMULA);
    const m = state.materialList.find((x) => x.key === key);
    show(this.chiralBox, m?.optically_active === true);
    this.syncSources(key, m);
    this.syncAxisForm();
    if (m) {
      const unverified = m.verified === false ? ' · unverified data: no journal source' : '';
      const kind = m.kind === 'biaxial' ? 'biaxial, nx < ny < nz' : `${m.sign} uniaxial${m.optically_active ? ', optically active' : ''}`;
      setText(this.materialNote, `${kind} · formula valid ${m.range_nm[0]}–${m.range_nm[1]} nm${unverified}`);
      setAttr(this.materialNote, 'title', m.citation);
      this.materialNote.hidden = false;
    } else if (key === CUSTOM_FORMULA) {
      const [lo, hi] = this.formula.range();
      setText(this.materialNote, `Your own dispersion formula · valid ${lo}–${hi} nm`);
      this.materialNote.removeAttribute('title');
      this.materialNote.hidden = false;
    } else if (key === 'custom' || key === CUSTOM_PRINCIPAL) {
      setText(this.materialNote, 'Fixed indices, no dispersion.');
      this.materialNote.removeAttribute('title');
      this.materialNote.hidden = false;
    } else {
      this.materialNote.hidden = true;
    }
  }

  /** The source select for material `key` (catalogue entry `m`): its sources as options, the
   * one last chosen for it kept; hidden with fewer than two sources. */
  syncSources(key, m) {
    const f = this.f;
    const sources = m?.sources ?? [];
    if (this.sourceOptionsFor !== key) {
      if (this.sourceOptionsFor !== undefined) this.sourceFor[this.sourceOptionsFor] = f.source.value;
      const keep = this.sourceFor[key] ?? '';
      f.source.input.replaceChildren(...sources.map((s) => h('option', { value: s.default ? '' : s.key, text: sourceLabel(s) })));
      f.source.set(keep);
      this.sourceOptionsFor = key;
    }
    const on = sources.length > 1 || (f.source.value !== '' && m !== undefined);
    if (f.source.row.hidden !== !on) f.source.row.hidden = !on;
  }

  setIndex(i, count) {
    this.index = i;
    const p = `elements[${i}]`;
    const n = i + 1;
    setText(this.legend, `Element ${n}`);
    this.kindField.setPath(`${p}.kind`, `element ${n}`);
    for (const field of Object.values(this.f)) field.setPath(`${p}.${field.key}`, `element ${n}`);
    this.geometry.setIndex(p, `element ${n}`);
    this.formula.setIndex(p, `element ${n}`);
    this.syncGeometry();
    setAttr(this.cardError, 'data-error-for', p);
    setAttr(this.axisError, 'data-error-for', `${p}.${this.axisForm()}`);
    setAttr(this.up, 'aria-label', `Move element ${n} up`);
    setAttr(this.down, 'aria-label', `Move element ${n} down`);
    setAttr(this.remove, 'aria-label', `Remove element ${n}`);
    setAttr(this.up, 'title', `Move element ${n} up`);
    setAttr(this.down, 'title', `Move element ${n} down`);
    setAttr(this.remove, 'title', `Remove element ${n}`);
    this.up.disabled = i === 0;
    this.down.disabled = i === count - 1;
  }

  /** Whether the crystal is given by its three principal axes (biaxial, or rolled). */
  isBiaxial() {
    const key = this.f.material.value;
    return key === CUSTOM_PRINCIPAL || (key === CUSTOM_FORMULA && this.formula.isBiaxial())
      || state.materialList.find((x) => x.key === key)?.kind === 'biaxial';
  }

  /** `axes` (with roll) for a biaxial crystal or a rolled one, else `axis`. */
  axisForm() {
    const roll = this.f.roll.value;
    return this.isBiaxial() || (typeof roll === 'number' ? roll !== 0 : !this.f.roll.blank) ? 'axes' : 'axis';
  }

  /** The orientation fields follow the form: their paths, the roll row and the group's title. */
  syncAxisForm() {
    const form = this.axisForm();
    const f = this.f;
    if (this.shownAxisForm === form) return;
    this.shownAxisForm = form;
    f.tilt.key = `${form}.tilt_deg`;
    f.azimuth.key = `${form}.azimuth_deg`;
    if (f.roll.row.hidden !== (form !== 'axes')) f.roll.row.hidden = form !== 'axes';
    setText(this.axisTitle, this.isBiaxial() ? 'Principal axes (z axis, then the roll about it)' : 'Optic axis');
    setText(f.tilt.labelEl, this.isBiaxial() ? 'z-axis tilt' : 'Axis tilt');
    setText(f.azimuth.labelEl, this.isBiaxial() ? 'z-axis azimuth' : 'Axis azimuth');
    if (this.index !== undefined) this.setIndex(this.index, state.cards.length);
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
      } else if (f.material.value === CUSTOM_PRINCIPAL) {
        o.nx = f.nx.value;
        o.ny = f.ny.value;
        o.nz = f.nz.value;
      } else if (f.material.value === CUSTOM_FORMULA) {
        o.dispersion = this.formula.write();
      } else {
        o.material = f.material.value;
        if (!f.source.row.hidden && f.source.value !== '') o.source = f.source.value;
      }
      if (!this.chiralBox.hidden) {
        o.handedness = f.handedness.value;
        o.optical_activity = f.activity.value === 'true' ? true : f.activity.value === 'false' ? false : f.activity.value;
      }
      o.thickness_mm = f.thickness.value;
      if (this.axisForm() === 'axes') {
        o.axes = { tilt_deg: f.tilt.value, azimuth_deg: f.azimuth.value, roll_deg: f.roll.value };
      } else {
        o.axis = { tilt_deg: f.tilt.value, azimuth_deg: f.azimuth.value };
      }
      this.geometry.write(o);
    } else if (kind === 'retarder') {
      o.retardance_waves = f.retardance.value;
      o.fast_axis_deg = f.fast.value;
    } else if (kind === 'polarizer') {
      o.transmission_axis_deg = f.transmission.value;
    } else if (kind === 'rotator') {
      o.angle_deg = f.angle.value;
    } else if (kind === 'lc_cell') {
      o.thickness_um = f.cellThickness.value;
      // Constants as the fields hold them, over any other key a loaded document gave (sent back
      // for the core to name).
      o.lc = f.lc.value === CUSTOM_LC ? { ...this.lcCustom, ...Object.fromEntries(LC_CONSTANTS.map(([k]) => [k, f[`lc_${k}`].value])) } : f.lc.value;
      o.rubbing_azimuth_deg = f.rubbing.value;
      o.twist_deg = f.twist.value;
      o.pretilt_deg = f.pretilt.value;
      o.voltage_v = f.voltage.value;
    }
    // An ideal element takes no placement: one it holds (loaded, for the core to name) is sent.
    if (kind !== 'crystal') this.geometry.write(o);
    o.gap_mm = f.gap.value;
    this.geometry.writeContact(o);
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
        this.sourceFor[String(obj.material)] = obj.source === undefined ? '' : obj.source;
        this.sourceOptionsFor = undefined;
      } else if (obj.no !== undefined || obj.ne !== undefined) {
        f.material.set('custom');
        f.no.set(obj.no);
        f.ne.set(obj.ne);
      } else if (obj.nx !== undefined || obj.ny !== undefined || obj.nz !== undefined) {
        f.material.set(CUSTOM_PRINCIPAL);
        f.nx.set(obj.nx);
        f.ny.set(obj.ny);
        f.nz.set(obj.nz);
      } else if (obj.dispersion !== undefined) {
        f.material.set(CUSTOM_FORMULA);
        this.formula.load(obj.dispersion);
      }
      f.handedness.set(obj.handedness ?? 'right');
      f.activity.set(obj.optical_activity === undefined ? 'true' : String(obj.optical_activity));
      f.thickness.set(obj.thickness_mm);
      const given = obj.axes ?? obj.axis;
      const axis = given && typeof given === 'object' ? given : {};
      f.tilt.set(axis.tilt_deg);
      f.azimuth.set(axis.azimuth_deg ?? 0);
      f.roll.set(axis.roll_deg ?? 0);
    } else if (kind === 'retarder') {
      f.retardance.set(obj.retardance_waves ?? d.retarder.retardance_waves);
      f.fast.set(obj.fast_axis_deg ?? 0);
    } else if (kind === 'polarizer') {
      f.transmission.set(obj.transmission_axis_deg ?? 0);
    } else if (kind === 'rotator') {
      f.angle.set(obj.angle_deg);
    } else if (kind === 'lc_cell') {
      const c = d.lc_cell;
      // Constants given in the document fill the custom fields (a missing one stays empty for
      // the core to name); any other key is kept and sent back.
      this.lcCustom = obj.lc && typeof obj.lc === 'object' ? obj.lc : undefined;
      f.lc.set(this.lcCustom !== undefined ? CUSTOM_LC : (obj.lc ?? c.lc));
      if (this.lcCustom !== undefined) for (const [k] of LC_CONSTANTS) f[`lc_${k}`].set(this.lcCustom[k]);
      f.cellThickness.set(obj.thickness_um);
      f.rubbing.set(obj.rubbing_azimuth_deg ?? 0);
      f.twist.set(obj.twist_deg ?? 0);
      f.pretilt.set(obj.pretilt_deg ?? c.pretilt_deg);
      f.voltage.set(obj.voltage_v ?? 0);
    }
    this.geometry.load(obj);
    this.setKind(kind);
  }
}

function renumberCards() {
  const n = state.cards.length;
  state.cards.forEach((c, i) => c.setIndex(i, n));
  const crystals = state.cards.filter((c) => c.kind === 'crystal').length;
  for (const b of document.querySelectorAll('[data-add]')) {
    b.disabled = n >= MAX_ELEMENTS || (b.dataset.add === 'crystal' && crystals >= MAX_CRYSTALS);
  }
}

function addCard(kind, obj) {
  const card = new Card(kind);
  if (obj) card.load(obj);
  state.cards.push(card);
  stackList().appendChild(card.el);
  return card;
}

/** Makes the cards match a list of element objects, reusing the cards already there. */
function loadCards(list) {
  const items = list.slice(0, MAX_ELEMENTS + 1);
  while (state.cards.length > items.length) state.cards.pop().el.remove();
  items.forEach((o, i) => {
    if (i < state.cards.length) state.cards[i].load(o);
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
  const i = state.cards.indexOf(card);
  const action = btn.dataset.action;
  if (action === 'up' && i > 0) {
    state.cards.splice(i, 1);
    state.cards.splice(i - 1, 0, card);
    stackList().insertBefore(card.el, state.cards[i].el);
    renumberCards();
    (card.up.disabled ? card.down : card.up).focus();
    announce(`Element ${i + 1} moved up to position ${i}.`);
  } else if (action === 'down' && i < state.cards.length - 1) {
    state.cards.splice(i, 1);
    state.cards.splice(i + 1, 0, card);
    stackList().insertBefore(card.el, state.cards[i + 2]?.el ?? null);
    renumberCards();
    (card.down.disabled ? card.up : card.down).focus();
    announce(`Element ${i + 1} moved down to position ${i + 2}.`);
  } else if (action === 'remove') {
    state.cards.splice(i, 1);
    card.el.remove();
    renumberCards();
    const next = state.cards[i] ?? state.cards[i - 1];
    if (next) next.remove.focus();
    else document.querySelector('[data-add="crystal"]').focus();
    announce(`Element ${i + 1} removed.`);
  } else {
    return;
  }
  state.pendingEdit = {};
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
  announce(`Element ${state.cards.length} added: ${KIND_NAMES[btn.dataset.add]}.`);
  state.pendingEdit = {};
  schedule();
}

// ---------------------------------------------------------------------------------------------
// Scenario <-> controls.

function buildScenario() {
  const v = (p) => state.controls[p].value;
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
  // Version 2, as the core writes every document back; a set-up whose geometry is at its
  // defaults holds the same fields as in version 1.
  const screen = v('screen_mm');
  const doc = {
    version: 2,
    wavelength_nm: v('wavelength_nm'),
    outside_index: v('outside_index'),
    interface_losses: v('interface_losses'),
    beam: {
      diameter_mm: v('beam.diameter_mm'),
      incidence: { polar_deg: v('beam.incidence.polar_deg'), azimuth_deg: v('beam.incidence.azimuth_deg') },
      polarization,
    },
    elements: state.cards.map((c) => c.build()),
  };
  if (screen !== 0) doc.screen_mm = screen;
  if (v('wavelength_in') !== 'vacuum') doc.wavelength_in = v('wavelength_in');
  // Written when not the default 20 °C, as the core writes it back.
  if (v('temperature_c') !== 20) doc.temperature_c = v('temperature_c');
  if (v('spectrum') === 'on') doc.spectrum = { from_nm: v('spectrum.from_nm'), to_nm: v('spectrum.to_nm'), points: v('spectrum.points') };
  return doc;
}

function member(o, k) {
  return o && typeof o === 'object' && !Array.isArray(o) ? o[k] : undefined;
}

/** Writes a scenario object into the controls; missing fields take the contract's defaults. */
function loadControls(s) {
  const set = (p, v) => state.controls[p].set(v);
  set('wavelength_nm', member(s, 'wavelength_nm') ?? 632.8);
  set('wavelength_in', member(s, 'wavelength_in') ?? 'vacuum');
  set('temperature_c', member(s, 'temperature_c') ?? 20);
  // A document without a spectrum turns it off and leaves the range as it was.
  const spectrum = member(s, 'spectrum');
  set('spectrum', spectrum === undefined ? 'off' : 'on');
  if (spectrum !== undefined) {
    set('spectrum.from_nm', member(spectrum, 'from_nm'));
    set('spectrum.to_nm', member(spectrum, 'to_nm'));
    set('spectrum.points', member(spectrum, 'points'));
  }
  showSpectrum();
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
  set('screen_mm', member(s, 'screen_mm') ?? 0);
  const els = member(s, 'elements');
  loadCards(Array.isArray(els) ? els : []);
}

// ---------------------------------------------------------------------------------------------
// Errors beside their controls.

// Names of fields that have no control of their own (an error about a whole group).
const GROUP_LABELS = {
  '': 'Set-up',
  version: 'Version',
  elements: 'Stack',
  beam: 'Beam',
  'beam.incidence': 'Incidence',
  'beam.polarization': 'Input polarization',
  'beam.polarization.jones': 'Jones vector',
  'beam.polarization.jones[0]': 'Jones vector, E1',
  'beam.polarization.jones[1]': 'Jones vector, E2',
  'beam.polarization.stokes': 'Stokes vector',
  'elements[].axis': 'Optic axis',
  'elements[].axes': 'Principal axes',
  ...GEOMETRY_GROUPS,
  ...FORMULA_GROUPS,
};

/** The set-up's error display (field-error.js): the controls' slots under form#controls. */
function setupErrors() {
  const root = document.getElementById('controls');
  const own = (p) => [...root.querySelectorAll('[data-field][data-label]')].find((el) => el.dataset.field === p)?.dataset.label;
  state.errors = new FieldErrors({ root, names: SETUP_NAMES, labelOf: own, groups: GROUP_LABELS });
}

/** The field at `path` as the page labels it: "Element 2 · Thickness", "Wavelength". */
function labelFor(path) {
  return state.errors.label(path);
}

/** Shows the core's error beside its control, and says above the views that they are not updated. */
function showFieldError(err) {
  state.errors.show(err);
  const stale = document.getElementById('stale-note');
  stale.textContent = `Not updated: ${state.errors.summary(err, 'the set-up')}. The views and results show the last set-up that traced.`;
  stale.hidden = false;
  document.body.classList.add('has-error');
}

function clearErrors() {
  if (!state.errors.shown) return;
  state.errors.clear();
  const stale = document.getElementById('stale-note');
  stale.hidden = true;
  stale.textContent = '';
  document.body.classList.remove('has-error');
}

// ---------------------------------------------------------------------------------------------
// Tracing.

function schedule() {
  if (state.framePending) return;
  state.framePending = true;
  requestAnimationFrame(() => {
    state.framePending = false;
    commit();
  });
}

function accept(result, text, scenarioObj, drawn = false) {
  state.result = result;
  state.scenario = scenarioObj;
  state.lastGoodText = text;
  if (!drawn) drawViews(state);
  clearErrors();
  clearFileError();
  renderResults(state, result);
  describeViews(state);
  updatePrintSheet(JSON.parse(state.session.scenarioJson()), KIND_NAMES);
}

/**
 * Hands a scenario's text to the core: {result} when it traces (the session then holds it), else
 * {error: {field, message}} (the session keeps its last good scenario). Anything else is a bug and
 * is rethrown.
 */
function traceText(text) {
  try {
    return { result: state.session.updateJson(text) };
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    return { error: fe };
  }
}

/** Traces what the controls say; on an error, shows it and keeps the last good state. */
function commit() {
  const edit = state.pendingEdit;
  const ends = state.pendingEnd;
  state.pendingEdit = null;
  state.pendingEnd = false;
  try {
    commitEdit(edit);
  } finally {
    // A run whose change event came first ends with this commit, whatever it recorded.
    if (ends && state.editGroup === edit) state.editGroup = null;
  }
}

/** The body of commit(): traces, shows and records `edit` (see commit). */
function commitEdit(edit) {
  const scenario = buildScenario();
  const text = JSON.stringify(scenario);
  if (text === state.lastAttempt) return;
  state.lastAttempt = text;
  const { result, error } = traceText(text);
  if (error) {
    showFieldError(error);
    return;
  }
  accept(result, text, scenario);
  recordEdit(edit);
}

/**
 * Loads a scenario object into the controls and traces it: the result, or throws {field, message}.
 * `origin` ({kind, name}, see originText) makes it a new step of the history, which Undo takes
 * back; without one (the set-up at start, a step of the history shown again) nothing is recorded.
 */
function applyScenario(obj, origin = { kind: 'script', name: '' }) {
  return loadScenario(obj, origin);
}

function loadScenario(obj, origin) {
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
  const { result, error } = traceText(text);
  if (error) {
    loadControls(obj);
    state.lastAttempt = JSON.stringify(buildScenario());
    showFieldError(error);
    throw error;
  }
  const normal = JSON.parse(state.session.scenarioJson());
  // Draw first, while the layout is still clean (the canvases read their size), then write the
  // controls and the results.
  state.result = result;
  state.scenario = normal;
  drawViews(state);
  loadControls(normal);
  const scenario = buildScenario();
  const built = JSON.stringify(scenario);
  state.lastAttempt = built;
  accept(result, built, scenario, true);
  if (origin) recordLoad(origin);
  return result;
}

// ---------------------------------------------------------------------------------------------
// The history of the set-up (history.js): Undo, Redo, Back, Forward, where it came from.

/** Where a set-up came from, in words: "the preset “…”", "the file x.json", … plus ", edited". */
function originText(origin, edited = false) {
  const name = origin && origin.name ? origin.name : '';
  const words = {
    demo: 'the demo',
    preset: `the preset “${name}”`,
    file: `the file ${name}`,
    link: 'a shared link',
    design: `the designed part${name ? ` (${name})` : ''}`,
    script: 'a set-up applied by a script',
  };
  const base = words[origin?.kind] ?? 'the set-up';
  return edited ? `${base}, edited` : base;
}

function currentEntry() {
  return state.history && state.history.current;
}

/** The fragment of an entry: `#scenario=<text>`, and `&design=<request>` when the panel was changed. */
function entryHref(entry) {
  const design = entry.design ? `&${DESIGN_KEY}${encodeURIComponent(entry.design)}` : '';
  return `${FRAGMENT_KEY}${encodeURIComponent(entry.text)}${design}`;
}

function showOrigin() {
  const e = currentEntry();
  const el = document.getElementById('setup-origin');
  if (!el || !e) return;
  setText(el, `Now showing ${originText(e.origin, e.edited)}.`);
  setAttr(el, 'data-origin', e.origin?.kind ?? '');
  setAttr(el, 'data-edited', e.edited ? 'true' : 'false');
}

function historyChanged() {
  const undo = document.getElementById('undo');
  const redo = document.getElementById('redo');
  if (undo) undo.disabled = !state.history.canUndo;
  if (redo) redo.disabled = !state.history.canRedo;
  showOrigin();
}

function historyStatus(text) {
  const el = document.getElementById('history-status');
  if (el) setText(el, text);
}

function clearFragmentError() {
  const fe = document.getElementById('fragment-error');
  if (!fe.hidden) {
    fe.hidden = true;
    fe.textContent = '';
  }
}

/**
 * After an edit traced: a new step, or the same step when it continues a run of edits to one
 * control (`key`, its path; an object for a structural change, which is always a step).
 */
function recordEdit(key) {
  const cur = currentEntry();
  clearFragmentError();
  if (!cur || cur.text === state.lastGoodText) return;
  const entry = { text: state.lastGoodText, origin: cur.origin, edited: true, design: state.designText };
  if (key && typeof key === 'string' && key === state.editGroup) {
    state.history.replace(entry);
  } else {
    state.history.push(entry);
    state.editGroup = typeof key === 'string' ? key : null;
    historyStatus('');
  }
}

/** After a load (preset, file, link, designed part): a step of its own, and what it replaced. */
function recordLoad(origin) {
  const cur = currentEntry();
  state.editGroup = null;
  state.pendingEdit = null;
  state.pendingEnd = false;
  clearFragmentError();
  const entry = { text: state.lastGoodText, origin, edited: false, design: state.designText };
  if (!cur) {
    state.history.start(entry);
    return;
  }
  state.history.push(entry);
  historyStatus(`Loaded ${originText(origin)}; it replaced ${originText(cur.origin, cur.edited)}. Undo brings that back.`);
}

/** Shows an entry of the history (Back, Forward, Undo, Redo) without recording anything. */
function restoreEntry(entry) {
  state.editGroup = null;
  state.pendingEdit = null;
  state.pendingEnd = false;
  if (entry.text !== state.lastGoodText) {
    let obj;
    try {
      obj = JSON.parse(entry.text);
      loadScenario(obj, null);
    } catch (e) {
      const fe = toFieldError(e);
      if (!fe && !(e instanceof SyntaxError)) throw e;
      historyStatus(`That step could not be shown again: ${fe ? fe.message : e.message}`);
      return;
    }
  }
  historyStatus(`Showing ${originText(entry.origin, entry.edited)}, step ${entry.index + 1}.`);
  if ((entry.design ?? '') !== state.designText) state.history.replace({ ...entry, design: state.designText }, { now: true });
}

function undo() {
  flushPendingEdit();
  if (!state.history.undo()) historyStatus('Nothing to undo.');
}

function redo() {
  flushPendingEdit();
  if (!state.history.redo()) historyStatus('Nothing to redo.');
}

/** An edit still waiting for its animation frame is committed first, so that Undo takes it back. */
function flushPendingEdit() {
  if (state.framePending) commit();
}

/**
 * Ctrl/Cmd+Z undoes, Ctrl/Cmd+Shift+Z and Ctrl+Y redo, everywhere but in a text field one can
 * type in: there the keys keep their usual meaning (the field's own text undo), and the Undo and
 * Redo buttons serve the set-up.
 */
function onHistoryKey(ev) {
  if (!(ev.ctrlKey || ev.metaKey) || ev.altKey) return;
  const key = ev.key.toLowerCase();
  const isUndo = key === 'z' && !ev.shiftKey;
  const isRedo = (key === 'z' && ev.shiftKey) || (key === 'y' && ev.ctrlKey && !ev.shiftKey);
  if (!isUndo && !isRedo) return;
  const t = ev.target;
  const typing = t instanceof HTMLElement && (t.isContentEditable || t.tagName === 'TEXTAREA'
    || (t.tagName === 'INPUT' && !t.readOnly && !['range', 'checkbox', 'radio', 'button', 'submit', 'file', 'color'].includes(t.type)));
  if (typing) return;
  ev.preventDefault();
  if (isUndo) undo();
  else redo();
}

/** The arrow keys in a number field step its value (dom.js); the edit then goes as typed. */
function onStepKey(ev) {
  stepNumber(ev);
}

/** The design panel's inputs changed: the link carries them (no new step: they are not the set-up). */
function onDesignInputs(text) {
  state.designText = text;
  const cur = currentEntry();
  if (cur && (cur.design ?? '') !== text) state.history.replace({ ...cur, design: text });
}

// ---------------------------------------------------------------------------------------------
// The URL fragment and the link.

function flushFragment() {
  state.history.flush();
}

/**
 * Reads the fragment: null when there is none, else {text, design} or {error}; `design` is the
 * design panel's part (`&design=`), as {text} or {error}, or null.
 */
function readFragment() {
  const hash = location.hash;
  if (!hash.startsWith(FRAGMENT_KEY)) return null;
  const [scenarioPart, ...rest] = hash.slice(FRAGMENT_KEY.length).split('&');
  let design = null;
  const designPart = rest.find((p) => p.startsWith(DESIGN_KEY));
  if (designPart !== undefined) {
    try {
      design = { text: decodeURIComponent(designPart.slice(DESIGN_KEY.length)) };
    } catch {
      design = { error: 'its text is not valid URI encoding' };
    }
  }
  try {
    return { text: decodeURIComponent(scenarioPart), design };
  } catch {
    return { error: 'its text is not valid URI encoding (the link may have been cut short or mangled)', design };
  }
}

/** The design part of a link into the design panel: a bad field is named there, the rest is kept. */
function loadDesignPart(design) {
  if (!design || !state.design.hooks) return;
  if (design.error) {
    state.design.hooks.designLinkError({ field: '', message: `The design part of this link could not be read: ${design.error}.` });
    return;
  }
  let obj;
  try {
    obj = JSON.parse(design.text);
  } catch (e) {
    state.design.hooks.designLinkError({ field: '', message: `The design part of this link is not valid JSON (${e.message}); the design fields were kept.` });
    return;
  }
  state.design.hooks.setDesignInputs(obj);
}

/** `Label (path): message`, the label as the page shows it; `document` when the core names no field. */
function fieldText(fe) {
  if (!fe.field) return `document: ${fe.message}`;
  return `${labelFor(fe.field)} (${fe.field}): ${fe.message}`;
}

/** On first load nothing is there to keep (`kept` false): the demo is shown instead. */
function showFragmentError(text, kept = false) {
  const el = document.getElementById('fragment-error');
  const outcome = kept ? '; the current set-up was kept' : ', so the demo is shown instead';
  el.textContent = `The set-up in this link could not be loaded${outcome}: ${text}`;
  el.hidden = false;
}

function loadDemo(origin = null) {
  loadScenario(JSON.parse(state.core.demoScenario()), origin);
}

/** The preset chooser lists the core's presets (the documents of examples/), the demo first. */
function fillPresets() {
  const select = document.getElementById('preset');
  select.replaceChildren(...state.presets.map((p) => h('option', { value: p.key, text: p.name })));
}

/**
 * Checks a scenario's text with the core before anything on the page changes: {obj} when it
 * traces (the session then holds it), else {error: {field, message}} (the session keeps the last
 * good scenario).
 */
function tryScenarioText(text) {
  const { error } = traceText(text);
  if (error) return { error };
  try {
    return { obj: JSON.parse(text) };
  } catch (e) {
    // Not expected (the core's JSON is the stricter), but the session must not stay ahead of
    // the page.
    if (state.lastGoodText !== null) state.session.updateJson(state.lastGoodText);
    return { error: { field: '', message: `not valid JSON (${e.message})` } };
  }
}

/**
 * Loads the scenario of the fragment. On first load (`previousHash` undefined) a bad fragment
 * shows its message and the demo; the bad link stays in the address bar until the user edits.
 * On a later change (`previousHash` is the hash before it) a good fragment is a step of the
 * history (the browser's entry for it is adopted), and a bad one keeps the set-up on screen and
 * puts the address back to the set-up's own fragment.
 */
function loadFromLocation(previousHash) {
  const first = previousHash === undefined;
  const kept = !first && state.lastGoodText !== null;
  const frag = readFragment();
  if (frag === null) {
    if (first) {
      loadDemo();
      state.history.start({ text: state.lastGoodText, origin: { kind: 'demo', name: '' }, edited: false, design: state.designText });
    } else {
      // The fragment was removed by hand: the set-up stays, and the address says it again.
      state.history.adopt({ ...currentEntry() });
    }
    return;
  }
  let problem = frag.error;
  if (!problem) {
    const tried = tryScenarioText(frag.text);
    if (tried.obj !== undefined) {
      clearFragmentError();
      const replaced = currentEntry();
      loadScenario(tried.obj, null);
      loadDesignPart(frag.design);
      const entry = { text: state.lastGoodText, origin: { kind: 'link', name: '' }, edited: false, design: state.designText };
      if (first) {
        state.history.start(entry);
      } else {
        state.history.adopt(entry);
        historyStatus(`Loaded ${originText(entry.origin)}; it replaced ${originText(replaced.origin, replaced.edited)}. Undo brings that back.`);
      }
      return;
    }
    problem = fieldText(tried.error);
  }
  if (!kept) {
    showFragmentError(problem);
    loadDemo();
    loadDesignPart(frag.design);
    state.history.start({ text: state.lastGoodText, origin: { kind: 'demo', name: '' }, edited: false, design: state.designText });
    return;
  }
  showFragmentError(problem, true);
  state.history.adopt({ ...currentEntry() });
}

// ---------------------------------------------------------------------------------------------
// Opening a scenario file: checked by the core before anything on the page changes.

const MAX_FILE_BYTES = 2 * 1024 * 1024;

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
  state.fileToken += 1;
  const token = state.fileToken;
  if (file.size > MAX_FILE_BYTES) {
    const mib = (file.size / (1024 * 1024)).toFixed(1);
    showFileError(file.name, `document: the file holds ${mib} MiB; a scenario file may be at most ${MAX_FILE_BYTES / (1024 * 1024)} MiB`);
    return;
  }
  let text;
  try {
    text = await file.text();
  } catch (e) {
    if (token === state.fileToken) showFileError(file.name, `document: the file could not be read (${e && e.message ? e.message : e})`);
    return;
  }
  // A later choice wins over a slow read of an earlier one.
  if (token !== state.fileToken) return;
  const tried = tryScenarioText(text);
  if (tried.error) {
    showFileError(file.name, fieldText(tried.error));
    return;
  }
  loadScenario(tried.obj, { kind: 'file', name: file.name });
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
  if (state.lastGoodText === null) return;
  const url = `${location.origin}${location.pathname}${location.search}${entryHref(currentEntry())}`;
  if (location.href !== url) history.replaceState(history.state, '', url);
  const status = document.getElementById('copy-status');
  const field = document.getElementById('link-text');
  field.value = url;
  const note = state.errors.shown ? ' (the last set-up that traced; the current input has an error)' : '';
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
// Wiring.

function onControlEvent(ev) {
  const t = ev.target;
  if (!(t instanceof HTMLElement) || !t.dataset.field) return;
  // A run of input events on one control is one step of the history; its change event (a
  // slider let go, a field left, a choice made) ends the run.
  state.pendingEdit = state.pendingEdit === null || state.pendingEdit === t.dataset.field ? t.dataset.field : {};
  // The change event may come before the commit that records the run's last input (a field
  // typed into and left at once): the commit then ends the run itself.
  if (ev.type === 'change') {
    if (state.editGroup === t.dataset.field) state.editGroup = null;
    if (state.pendingEdit === t.dataset.field) state.pendingEnd = true;
  }
  if (t.type === 'range' && t.num) {
    t.num.value = t.value;
  } else if (t.classList.contains('num') && t.range) {
    const v = readNumber(t.value);
    if (typeof v === 'number') t.range.value = String(v);
  }
  const field = t.dataset.field;
  if (field === 'beam.polarization.kind') showPolarizationKind();
  if (field === 'spectrum') showSpectrum();
  const card = t.closest('li.card')?.card;
  if (card) {
    if (field.endsWith('.kind')) {
      card.changeKind(t.value);
      renumberCards();
    } else if (field.endsWith('.material') || field.endsWith('.lc') || field.endsWith('.dispersion') || field.includes('.dispersion.range_nm')) {
      card.showMaterial();
    } else if (field.endsWith('.contact')) {
      card.geometry.contactChanged();
    }
    card.syncGeometry();
  }
  schedule();
}

async function main() {
  const loading = document.getElementById('loading');
  try {
    state.core = await import('./pkg/doublespar.js');
    await state.core.default();
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
  state.session = new state.core.Session();
  state.materialList = state.core.materials();
  state.viewList = state.core.viewNames();
  state.presets = state.core.presets();
  setupResults(state);
  fillPresets();
  setupErrors();

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
    const select = document.getElementById('preset');
    const preset = state.presets.find((p) => p.key === select.value);
    if (!preset) return;
    const doc = JSON.parse(preset.scenario);
    applyScenario(doc, preset.key === 'demo' ? { kind: 'demo', name: '' } : { kind: 'preset', name: preset.name });
    flushFragment();
  });
  window.addEventListener('hashchange', (ev) => {
    // Back and Forward through the page's own steps are handled by the history (popstate).
    if (SetupHistory.owns(history.state)) return;
    const frag = readFragment();
    if (frag && frag.text === state.lastGoodText) {
      if (frag.design && frag.design.text !== state.designText) loadDesignPart(frag.design);
      state.history.adopt({ ...currentEntry(), design: state.designText });
      return;
    }
    loadFromLocation(new URL(ev.oldURL).hash);
  });
  state.history = new SetupHistory({ href: entryHref, restore: restoreEntry, changed: historyChanged });
  document.getElementById('undo').addEventListener('click', undo);
  document.getElementById('redo').addEventListener('click', redo);
  document.addEventListener('keydown', onHistoryKey);
  document.addEventListener('keydown', onStepKey);
  setupFileOpen();

  document.getElementById('results').addEventListener('click', (ev) => {
    const btn = ev.target.closest('button[data-show-all]');
    if (!btn || !state.result) return;
    const which = btn.dataset.showAll;
    toggleShowAll(state, which);
    renderResults(state, state.result);
    document.querySelector(`button[data-show-all="${which}"]`)?.focus();
  });

  setupViews(state);
  setupExport(state);
  state.design.hooks = setupDesign(state, { applyScenario, flushFragment, onDesignInputs });
  loadFromLocation();
  loading.remove();
  document.body.classList.add('ready');
  window.doublespar = {
    session: state.session,
    redraw: () => redraw(state),
    applyScenario,
    designRequest: state.design.hooks.designRequest,
    designShown: state.design.hooks.designShown,
    convergent: () => ({ busy: state.convergent.busy !== null, ms: { ...state.convergent.ms } }),
  };
}

main();
