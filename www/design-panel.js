// Doublespar design panel ("what must I buy"): section#design of the page. Its own controls,
// each with data-design-field = the path of a design-request field (DEVELOPERS.md, "Design
// requests") and an error element [data-design-error-for] beside it. Solve posts the request to a
// module worker (design-worker.js, which loads pkg-design/); a displacer's Monte Carlo run
// arrives in chunks with progress (any kind's would be shown alike), and Cancel terminates the
// worker (a new one starts). The kinds: displacer, waveplate, achromat, recombiner and the prism
// kinds angular-splitter, prism-polarizer, tilt-tuning, the quartz-rotator, the
// athermal-waveplate, the birefringent-filter, the broadband-retarder and the liquid-crystal
// cell's lc-voltage (DEVELOPERS.md, "Design requests"); every kind has a temperature field
// (`temperature_c`, sent when it is not 20 °C) and a Temperature card of the design's changes per
// kelvin. Results
// are text with data-quantity="design.<path into the design JSON>" and data-value =
// String(value) (a bound, "≥ 10°", also data-bound); the design's warnings and shop notes are
// lists in the panel's words (.design-advice, role=status); the curves are drawn with the core's
// drawSeries / drawHistogram.
//
// Contract: one export, setupDesign(state, links), called once by app.js after the core has
// loaded. It receives the page's state (state.js; the panel's own part is state.design) and what
// it may do to the page (see there), and returns the test hooks designRequest(state) (the request the fields say) and designShown() (a copy
// of the design on screen, or null), and setDesignInputs(state, request) and designLinkError(err) for
// the design part of a shared link (the fields' request travels in the link once it differs
// from the panel's defaults: links.onDesignInputs(text)). The solved design is also the
// print's order sheet (export.js, updateOrderSheet). section#design[data-state] is idle, solving, running, done,
// error or cancelled; #design-use loads the shown part into the set-up (state.design.links.applyScenario).

import { h, setText, uid } from './dom.js';
import { minus, significant } from './format.js';
import { Field, FieldErrors, errorSlot, toFieldError } from './field-error.js';
import { updateOrderSheet } from './export.js';
import { NEMATICS, materialName } from './state.js';
import { achromatResults, adviceLists, adviceOf, athermalResults, basisLine, broadbandResults, displacerResults, filterResults, lcResults, mcKey, polarizerResults, recombinerResults, rotatorResults, splitterResults, temperatureCard, tiltResults, trimmed, waveplateResults, worstPlane } from './design-results.js';
import { startCoreWorker } from './core-worker.js';

const DESIGN_KINDS = [
  ['displacer', 'beam displacer'],
  ['waveplate', 'waveplate'],
  ['achromat', 'achromatic waveplate pair'],
  ['recombiner', 'recombiner check'],
  ['angular-splitter', 'angular splitter'],
  ['prism-polarizer', 'polarizing prism'],
  ['tilt-tuning', 'tilt-tuned waveplate'],
  ['quartz-rotator', 'quartz rotator'],
  ['athermal-waveplate', 'athermal waveplate pair'],
  ['birefringent-filter', 'birefringent filter'],
  ['broadband-retarder', 'broadband retarder'],
  ['lc-voltage', 'liquid-crystal cell voltage'],
];
// The material a kind starts from, until the user picks one (common choices for each part).
const DESIGN_MATERIALS = { displacer: 'calcite', waveplate: 'quartz', recombiner: 'calcite', 'angular-splitter': 'calcite', 'prism-polarizer': 'calcite', 'tilt-tuning': 'quartz', 'birefringent-filter': 'quartz', 'broadband-retarder': 'quartz' };
// The tolerances each kind's request has (the rows of the one tolerances group it shows).
const TOLERANCES = { displacer: ['tilt_deg', 'incidence_deg', 'thickness_mm', 'wavelength_nm'], 'angular-splitter': ['wedge_deg', 'axis_deg', 'incidence_deg'] };

// The attributes of the panel's fields (DEVELOPERS.md, "Design panel").
const NAMES = { field: 'data-design-field', error: 'data-design-error-for', id: 'd' };

/** A design-request field (field-error.js) at `path`, with a unit column so that the fields line up. */
function addField(state, path, spec) {
  const f = new Field({ unitColumn: true, ...spec }, NAMES);
  f.setPath(path);
  state.design.fields[path] = f;
  return f;
}

/** A titled group of fields with its own error slot (for errors that name the whole group). */
function fieldGroup(title, errorPath, children, { pair = false, hint } = {}) {
  const tid = uid('dg');
  const body = pair ? h('div', { className: 'pair-grid' }, ...children) : null;
  const hintEl = h('p', { className: 'hint', hidden: !hint, text: hint ?? '' });
  const box = h(
    'div',
    { className: 'subgroup', role: 'group', 'aria-labelledby': tid },
    h('p', { className: 'subgroup-title', id: tid, text: title }),
    ...(pair ? [body] : children),
    hintEl,
    errorSlot(errorPath, NAMES),
  );
  box.hintEl = hintEl;
  return box;
}

function setGroupHint(box, text) {
  setText(box.hintEl, text ?? '');
  if (box.hintEl.hidden !== !text) box.hintEl.hidden = !text;
}

// The kinds whose solver takes a biaxial crystal (src/contract/request/principal.rs): a
// waveplate, a tilt-tuned plate and the plates of a birefringent filter or a broadband retarder
// cut along a principal axis, a displacer cut in a principal plane, and either plate of a
// two-crystal pair, each with its own cut (`first.cut`, `second.cut`) and, like the single
// plate, custom principal indices of its own (`first.nx` …). The other kinds' lists hide the
// biaxial crystals (a chosen one stays, and the core names the field).
const BIAXIAL_KINDS = new Set(['waveplate', 'tilt-tuning', 'displacer', 'birefringent-filter', 'broadband-retarder']);
const PAIR_KINDS = new Set(['achromat', 'athermal-waveplate']);
// The kinds whose plates are cut along a principal axis (the select `cut`).
const CUT_KINDS = new Set(['waveplate', 'tilt-tuning', 'birefringent-filter', 'broadband-retarder']);

/** The select of a biaxial plate's cut, the principal axis along the beam (empty: the core's default). */
function cutField(state, path, spoken) {
  return addField(state, path, {
    label: 'Principal axis along the beam', spoken, kind: 'select',
    options: [['', 'largest birefringence'], ['x', 'x'], ['y', 'y'], ['z', 'z']],
    hint: 'The plate\'s faces are normal to this principal axis; its slower in-face axis lies at azimuth 0.',
  });
}
const isBiaxial = (state, key) => key === 'principal' || state.materialList.some((m) => m.key === key && m.kind === 'biaxial');

/**
 * Material select (catalogue, custom indices, custom principal indices) with its n_o / n_e and
 * n_x / n_y / n_z fields, for one prefix ('' for the part's one crystal, `first.` or `second.`
 * for a pair's plate, which also has its own cut).
 */
function mediumFields(state, prefix, fallback, whose) {
  // The page's name of each material, which marks a formula without a journal source
  // ("unverified data").
  const options = state.materialList.map((m) => [m.key, materialName(state, m.key)]);
  options.push(['custom', 'custom indices']);
  options.push(['principal', 'custom principal indices (biaxial)']);
  const of = whose ? ` of the ${whose}` : '';
  const material = addField(state, `${prefix}material`, { label: 'Material', spoken: `Material${whose ? of : ' of the part'}`, kind: 'select', options });
  const key = state.materialList.some((m) => m.key === fallback) ? fallback : (state.materialList[0]?.key ?? 'custom');
  material.input.value = key;
  const no = addField(state, `${prefix}no`, { label: 'nₒ, ordinary index', spoken: `Ordinary index${whose ? of : ' of the part'}`, value: 1.6584, step: 0.001 });
  const ne = addField(state, `${prefix}ne`, { label: 'nₑ, extraordinary index', spoken: `Extraordinary index${whose ? of : ' of the part'}`, value: 1.4864, step: 0.001 });
  const custom = h('div', { className: 'subgroup custom-indices' }, no.row, ne.row);
  // A biaxial crystal by its three principal indices (n_x < n_y < n_z by convention, not required).
  const start = { nx: 1.74, ny: 1.75, nz: 1.83 };
  const principal = h('div', { className: 'subgroup custom-indices' }, ...['nx', 'ny', 'nz'].map((k) =>
    addField(state, `${prefix}${k}`, { label: `n${k[1]}, principal index`, spoken: `Principal index n ${k[1]}${whose ? of : ' of the part'}`, value: start[k], step: 0.001 }).row));
  if (prefix) {
    const cut = cutField(state, `${prefix}cut`, `Cut of the ${whose}`);
    return { material, custom, principal, nodes: [material.row, custom, principal, cut.row] };
  }
  return { material, custom, principal, nodes: [material.row, custom, principal] };
}

function buildDesignFields(state) {
  const kind = addField(state, 'kind', { label: 'Part', kind: 'select', options: DESIGN_KINDS });
  kind.row.classList.add('design-kind');
  const order = addField(state, 'order', {
    label: 'Order',
    kind: 'select',
    options: [['zero', 'zero order'], ['multiple', 'multiple order'], ['compound', 'compound zero order']],
  });
  const orderNumber = addField(state, 'order_number', { label: 'Order number m', value: 1, step: 1, hint: 'm whole waves more than the target.' });
  const base = addField(state, 'base_mm', { label: 'Thinner plate', unit: 'mm', value: 1, hint: 'Two plates with crossed axes; their difference is the zero-order plate.' });

  const medium = mediumFields(state, '', 'calcite');
  const wl = addField(state, 'wavelength_nm', { label: 'Wavelength', spoken: 'Wavelength of the part', unit: 'nm', value: 632.8 });
  const band = fieldGroup('Band (optional)', 'band_nm', [
    addField(state, 'band_nm[0]', { label: 'From', spoken: 'Band from', unit: 'nm', placeholder: 'default' }).row,
    addField(state, 'band_nm[1]', { label: 'to', spoken: 'Band to', unit: 'nm', placeholder: 'default' }).row,
  ], { pair: true });
  const separation = addField(state, 'separation_mm', { label: 'Separation of the beams', unit: 'mm', value: 1 });
  const beam = addField(state, 'beam_diameter_mm', { label: 'Beam diameter (1/e²)', unit: 'mm', value: 1 });
  const principalCut = cutField(state, 'cut', 'Cut of the biaxial plate');
  const plane = addField(state, 'plane', {
    label: 'Principal plane', spoken: 'Principal plane of the displacer', kind: 'select',
    options: [['', 'largest walk-off'], ['xy', 'x y'], ['xz', 'x z'], ['yz', 'y z']],
    hint: 'The plane that holds the face normal; the cut tilt is measured from its second axis.',
  });
  const cut = addField(state, 'cut_tilt_deg', { label: 'Cut tilt', spoken: 'Cut tilt of the part', unit: '°', placeholder: 'auto' });
  const aperture = addField(state, 'aperture_factor', {
    label: 'Aperture factor',
    value: 2,
    step: 0.1,
    hint: 'Clear aperture = separation + factor × beam diameter.',
  });
  const tolerances = fieldGroup('Tolerances, one standard deviation each', 'tolerances', [
    addField(state, 'tolerances.wedge_deg', { label: 'Wedge angle', spoken: 'Wedge angle error, standard deviation', unit: '°', value: 0.05 }).row,
    addField(state, 'tolerances.axis_deg', { label: 'Optic axis about the beam', spoken: 'Optic axis error, standard deviation', unit: '°', value: 0.5 }).row,
    addField(state, 'tolerances.tilt_deg', { label: 'Cut tilt', spoken: 'Cut tilt error, standard deviation', unit: '°', value: 0.1 }).row,
    addField(state, 'tolerances.incidence_deg', { label: 'Incidence', spoken: 'Incidence error, standard deviation', unit: '°', value: 0.1 }).row,
    addField(state, 'tolerances.thickness_mm', { label: 'Length', spoken: 'Length error, standard deviation', unit: 'mm', value: 0.05 }).row,
    addField(state, 'tolerances.wavelength_nm', { label: 'Wavelength', spoken: 'Wavelength error, standard deviation', unit: 'nm', value: 0.5 }).row,
  ]);
  const samples = addField(state, 'samples', { label: 'Monte Carlo samples', value: state.design.limits.default_samples, step: 1000 });
  const seed = addField(state, 'seed', { label: 'Random seed', value: 1, step: 1 });

  const retardance = addField(state, 'retardance_waves', { label: 'Retardance', spoken: 'Retardance of the part', unit: 'waves', value: 0.25, hint: '0.25 for a quarter-wave plate, 0.5 for a half-wave plate.' });
  const maxInc = addField(state, 'max_incidence_deg', { label: 'Largest incidence', unit: '°', value: 10 });
  const accErr = addField(state, 'acceptance_error_waves', {
    label: 'Acceptance error',
    unit: 'waves',
    value: state.design.limits.default_acceptance_error_waves,
    hint: 'The acceptance angle is where the retardance has moved this far from its value at normal incidence.',
  });

  const first = mediumFields(state, 'first.', 'quartz', 'first plate');
  const second = mediumFields(state, 'second.', 'mgf2', 'second plate');
  const firstBox = fieldGroup('First plate', 'first', first.nodes);
  const secondBox = fieldGroup('Second plate', 'second', second.nodes);
  const wavelengths = fieldGroup('Design wavelengths', 'wavelengths_nm', [
    addField(state, 'wavelengths_nm[0]', { label: 'λ₁', spoken: 'First design wavelength', unit: 'nm', value: 500 }).row,
    addField(state, 'wavelengths_nm[1]', { label: 'λ₂', spoken: 'Second design wavelength', unit: 'nm', value: 900 }).row,
  ], { pair: true, hint: 'The pair has exactly the target retardance at both.' });

  const length = addField(state, 'length_mm', { label: 'Length of each displacer', unit: 'mm', value: 10 });
  const middle = addField(state, 'middle', {
    label: 'Between the displacers',
    kind: 'select',
    options: [['half-wave', 'half-wave plate at 45°'], ['rotator', 'rotator']],
  });
  const rotator = addField(state, 'rotator_deg', { label: 'Rotation', spoken: 'Rotation between the displacers', unit: '°', value: 90 });
  const lengthMis = addField(state, 'length_mismatch_mm', { label: 'Length mismatch', unit: 'mm', value: 0, hint: 'Second displacer minus the first.' });
  const tiltMis = addField(state, 'tilt_mismatch_deg', { label: 'Cut mismatch', unit: '°', value: 0, hint: 'Second displacer minus the first.' });

  // The prism kinds (starting values: the core's defaults, src/contract/request/, and a start
  // where the core has none).
  const split = addField(state, 'split_angle_deg', { label: 'Split angle between the beams', unit: '°', value: 10 });
  const clear = addField(state, 'aperture_mm', { label: 'Clear aperture', spoken: 'Clear aperture of the part', unit: 'mm', value: 10 });
  const cement = addField(state, 'cement_index', { label: 'Cement index', spoken: 'Cement index of the part', placeholder: 'none', step: 0.01 });
  const size = addField(state, 'size', { label: 'Plate given by', kind: 'select', options: [['thickness', 'its thickness'], ['order', 'its order at a wavelength']] });
  const thickness = addField(state, 'thickness_mm', { label: 'Plate thickness', spoken: 'Thickness of the plate to tilt', unit: 'mm', value: 0.5 });
  const madeFor = addField(state, 'made_for_nm', { label: 'Made for', spoken: 'Wavelength the plate was made for', unit: 'nm', placeholder: 'the wavelength' });
  const axisAz = addField(state, 'axis_azimuth_deg', { label: 'Optic axis azimuth', unit: '°', value: 0, hint: 'In the faces, from x toward y; a biaxial plate\'s slower in-face axis.' });
  // Across the axis (90° from it) the retardance grows with the tilt; along it, it falls.
  const tiltAz = addField(state, 'tilt_azimuth_deg', {
    label: 'Plane of the tilt', spoken: 'Azimuth of the tilt plane', unit: '°', value: 90,
    hint: 'Azimuth of the plane in which the mount tilts, from x toward y: across the optic axis the retardance grows with the tilt, along it the retardance falls.',
  });
  const maxTilt = addField(state, 'max_tilt_deg', { label: 'Largest mount tilt', unit: '°', value: 30 });

  // The quartz rotator (starting values: the core's defaults, src/contract/request/rotator.rs).
  const rotation = addField(state, 'rotation_deg', {
    label: 'Rotation', spoken: 'Rotation of the part', unit: '°', value: 90,
    hint: 'From x toward y: positive is a left-handed plate, negative a right-handed one.',
  });
  const hand = addField(state, 'handedness', {
    label: 'Hand of the quartz', kind: 'select',
    options: [['', 'the rotation\'s own'], ['right', 'right-handed'], ['left', 'left-handed']],
    hint: 'A forced hand reaches the rotation modulo 180°, the same for every polarization.',
  });
  const minThick = addField(state, 'min_thickness_mm', { label: 'Thinnest plate', unit: 'mm', placeholder: 'none', hint: 'Half turns of 180° are added to reach it.' });
  const rotTol = addField(state, 'rotation_tolerance_deg', { label: 'Rotation tolerance', unit: '°', value: state.design.limits.rotator_rotation_tolerance_deg });
  const ellTol = addField(state, 'ellipticity_tolerance_deg', {
    label: 'Ellipticity tolerance', unit: '°', value: state.design.limits.rotator_ellipticity_tolerance_deg,
    hint: 'The acceptance is the incidence at which a linear input leaves beyond either tolerance.',
  });

  // The birefringent filter and the broadband retarder (starting values: the core's defaults,
  // src/contract/request/filter.rs and broadband.rs, and a start where the core has none).
  const layout = addField(state, 'layout', {
    label: 'Layout', spoken: 'Layout of the filter', kind: 'select',
    options: [['stage-doubling', 'stage-doubling: plates d, 2d, 4d …'], ['folded', 'folded: equal plates at ±45°/N']],
    hint: 'Stage-doubling: every plate behind a polarizer parallel to the first. Folded: between crossed polarizers.',
  });
  const stages = addField(state, 'stages', { label: 'Plates', spoken: 'Number of plates of the filter', value: 4, step: 1, hint: '1 to 8 stage-doubling, 2 to 10 folded.' });
  const bandwidth = addField(state, 'bandwidth_nm', { label: 'Pass band (FWHM)', spoken: 'Width of the pass band', unit: 'nm', value: 1 });
  const plateCount = addField(state, 'plates', { label: 'Plates', spoken: 'Number of plates of the retarder', value: 3, step: 1, hint: '2 to 7 plates.' });
  // Two crystals: the plates alternate, the first crystal first (the request's `materials`, one
  // catalogue key per plate; other orders are asked in a JSON request).
  const alternate = addField(state, 'materials', {
    label: 'Alternate with', spoken: 'Second crystal of the retarder, alternating plate by plate', kind: 'select',
    options: [['', 'no second crystal'], ...state.materialList.map((m) => [m.key, materialName(state, m.key)])],
    hint: 'Plates 1, 3, 5 … of the first crystal, 2, 4 … of this one, a biaxial one at its cut of largest birefringence; catalogue crystals only.',
  });
  const fastAxis = addField(state, 'fast_axis_deg', { label: 'Fast axis', spoken: 'Fast axis of the retarder', unit: '°', value: 0 });
  const maxThick = addField(state, 'max_thickness_mm', { label: 'Thickest plate', spoken: 'Thickest plate searched', unit: 'mm', placeholder: 'two full waves' });
  const generations = addField(state, 'generations', { label: 'Search generations', value: 1000, step: 100, hint: '10 to 5000; the search is deterministic for its seed. Five plates or more usually need several thousand.' });

  // Every kind: the temperature the part works at (the core's default 20 °C, range −200 to 500).
  const temperature = addField(state, 'temperature_c', {
    label: 'Temperature', spoken: 'Temperature the part works at', unit: '°C', value: 20,
    hint: 'The part is designed to work at this temperature; its thicknesses are given as made at 20 °C.',
  });

  // Every kind: the basis of the request's wavelengths, in the set-up's words (written only for air).
  const basis = addField(state, 'wavelength_in', {
    label: 'Wavelength measured in', spoken: 'Wavelength of the part measured in', kind: 'select',
    options: [['vacuum', 'vacuum'], ['air', 'standard air']],
    hint: 'Air wavelengths are converted to vacuum by the standard-air index (Ciddor 1996).',
  });

  const fieldsBox = document.getElementById('design-fields');
  fieldsBox.replaceChildren(kind.row, h('div', { className: 'fields', id: 'design-kind-fields' }));
  state.design.layout.displacer = [...medium.nodes, plane.row, wl.row, separation.row, beam.row, cut.row, aperture.row, band, tolerances, samples.row, seed.row];
  state.design.layout.waveplate = [order.row, orderNumber.row, base.row, ...medium.nodes, principalCut.row, wl.row, retardance.row, band, maxInc.row, accErr.row];
  state.design.layout.achromat = [firstBox, secondBox, retardance.row, wavelengths, band];
  state.design.layout.recombiner = [...medium.nodes, wl.row, length.row, cut.row, beam.row, middle.row, rotator.row, lengthMis.row, tiltMis.row];
  state.design.layout['angular-splitter'] = [...medium.nodes, wl.row, split.row, clear.row, cement.row, band, tolerances, samples.row, seed.row];
  state.design.layout['prism-polarizer'] = [...medium.nodes, wl.row, cement.row, clear.row];
  state.design.layout['quartz-rotator'] = [rotation.row, wl.row, band, hand.row, minThick.row, rotTol.row, ellTol.row, maxInc.row];
  state.design.layout['tilt-tuning'] = [...medium.nodes, principalCut.row, wl.row, retardance.row, size.row, thickness.row, orderNumber.row, madeFor.row, axisAz.row, tiltAz.row, maxTilt.row];
  state.design.layout['athermal-waveplate'] = [firstBox, secondBox, retardance.row, wl.row, accErr.row];
  state.design.layout['birefringent-filter'] = [...medium.nodes, principalCut.row, layout.row, stages.row, wl.row, bandwidth.row, band];
  state.design.layout['broadband-retarder'] = [...medium.nodes, principalCut.row, alternate.row, plateCount.row, retardance.row, fastAxis.row, band, maxThick.row, generations.row, seed.row];
  // The wavelength's basis, then the temperature, beside the wavelength as in the set-up (after
  // the design wavelengths of a pair; a broadband retarder's only wavelengths are its band).
  for (const nodes of Object.values(state.design.layout)) {
    const at = nodes.findIndex((n) => n === wl.row || n === wavelengths);
    nodes.splice((at < 0 ? nodes.indexOf(band) : at) + 1, 0, basis.row);
    nodes.splice(at < 0 ? nodes.length : at + 2, 0, temperature.row);
  }
  // The cell's voltage (src/contract/request/lc.rs). A catalogued nematic's constants move with
  // the temperature through its order parameter (refused at the clearing point, warned away from
  // the data). Custom constants are asked in a JSON request.
  const cellThickness = addField(state, 'thickness_um', { label: 'Cell gap', spoken: 'Thickness of the nematic layer', unit: 'µm', value: 5 });
  const nematic = addField(state, 'lc', { label: 'Nematic', spoken: 'Nematic of the cell', kind: 'select', options: NEMATICS, hint: 'Custom constants are asked in a JSON request ("lc": {…}).' });
  const rubbing = addField(state, 'rubbing_azimuth_deg', { label: 'Rubbing azimuth', spoken: 'Director azimuth at the entrance', unit: '°', value: 45 });
  const twist = addField(state, 'twist_deg', { label: 'Twist', spoken: 'Twist of the cell', unit: '°', value: 0 });
  const pretilt = addField(state, 'pretilt_deg', { label: 'Pretilt', spoken: 'Pretilt of the cell', unit: '°', value: 2 });
  const maxVolt = addField(state, 'max_voltage_v', { label: 'Highest voltage', spoken: 'Highest voltage searched', unit: 'V', value: 20 });
  const range = fieldGroup('Retardance range (optional)', 'retardance_range_waves', [
    addField(state, 'retardance_range_waves[0]', { label: 'From', spoken: 'Retardance range from', unit: 'waves', placeholder: 'none' }).row,
    addField(state, 'retardance_range_waves[1]', { label: 'to', spoken: 'Retardance range to', unit: 'waves', placeholder: 'none' }).row,
  ], { pair: true, hint: 'The thinnest cell of this construction that spans it.' });
  state.design.layout['lc-voltage'] = [cellThickness.row, nematic.row, rubbing.row, twist.row, pretilt.row, wl.row, basis.row, temperature.row, retardance.row, maxVolt.row, range];

  const cutHint = 'Optic axis from the face normal; empty: the cut of largest walk-off, where a cut error matters least.';
  const lim = state.design.limits;
  const most = (n) => n.toLocaleString('en-US').replace(/,/g, ' ');
  state.design.hints.displacer = {
    band: 'Empty: the design wavelength alone.', cut_tilt_deg: cutHint, tolerances: 'The incidence error lies in the walk-off plane.',
    samples: `At most ${most(lim.max_samples)}; 0 skips the tolerance run.`, start: { samples: lim.default_samples },
  };
  state.design.hints['angular-splitter'] = {
    band: 'Empty: ±10 % around the design wavelength.', cement_index: 'Empty: the wedges are optically contacted.',
    tolerances: 'Each wedge\'s axis errs on its own; the incidence error lies in the plane of the split.',
    samples: `At most ${most(lim.splitter_max_samples)}; 0 skips the tolerance run. Each sample follows both beams through the splitter exactly.`, start: { samples: lim.splitter_default_samples },
  };
  state.design.hints['prism-polarizer'] = { cement_index: 'Empty: an air gap.' };
  const accHint = 'The acceptance angle is where the retardance has moved this far from its value at normal incidence.';
  state.design.hints.waveplate = { band: 'Empty: ±20 % around the design wavelength.', acceptance_error_waves: accHint };
  state.design.hints['athermal-waveplate'] = {
    acceptance_error_waves: 'The temperature band is where the retardance stays within this error of its value at the design temperature.',
  };
  state.design.hints['quartz-rotator'] = { band: 'Empty: ±10 % around the design wavelength.' };
  state.design.hints['birefringent-filter'] = { band: 'Of the transmission curve; empty: out to the neighbouring peaks.' };
  state.design.hints['broadband-retarder'] = { band: 'Required: the band over which the retardance must hold.' };
  state.design.hints.achromat = { band: 'Empty: from 0.8 × λ₁ to 1.2 × λ₂.' };
  state.design.hints.recombiner = { cut_tilt_deg: `Of both displacers. ${cutHint}` };
  state.design.bandBox = band;
  state.design.tolBox = tolerances;
  state.design.mediumBoxes = [['', medium.custom, medium.principal], ['first.', first.custom, first.principal], ['second.', second.custom, second.principal]];
}

/** Shows the fields of the chosen kind, in its order, and the ones its selects call for. */
function layoutDesignFields(state) {
  const kind = state.design.fields.kind.value;
  const nodes = state.design.layout[kind] ?? state.design.layout.displacer;
  const box = document.getElementById('design-kind-fields');
  const current = [...box.children];
  if (current.length !== nodes.length || current.some((n, i) => n !== nodes[i])) {
    const focused = document.activeElement;
    box.replaceChildren(...nodes);
    if (focused && focused !== document.activeElement && box.contains(focused)) focused.focus();
  }
  const material = state.design.fields.material;
  const start = DESIGN_MATERIALS[kind];
  if (!material.touched && start && material.input.value !== start && state.materialList.some((m) => m.key === start)) {
    material.input.value = start;
  }
  const hints = state.design.hints[kind] ?? {};
  // A kind's starting values, for the fields the user has not touched (and nothing else set).
  for (const [p, v] of Object.entries(hints.start ?? {})) {
    if (!state.design.fields[p].touched) state.design.fields[p].input.value = String(v);
  }
  setGroupHint(state.design.bandBox, hints.band);
  setGroupHint(state.design.tolBox, hints.tolerances);
  for (const p of ['cut_tilt_deg', 'samples', 'cement_index', 'acceptance_error_waves']) state.design.fields[p].setHint(hints[p]);
  const tols = TOLERANCES[kind] ?? [];
  for (const k of new Set(Object.values(TOLERANCES).flat())) {
    const row = state.design.fields[`tolerances.${k}`].row;
    if (row.hidden !== !tols.includes(k)) row.hidden = !tols.includes(k);
  }
  for (const [prefix, custom, principal] of state.design.mediumBoxes) {
    const key = state.design.fields[`${prefix}material`].value;
    const hide = key !== 'custom';
    if (custom.hidden !== hide) custom.hidden = hide;
    if (principal.hidden !== (key !== 'principal')) principal.hidden = key !== 'principal';
    // A formula without a journal source says so beside its select, where a narrow select
    // would cut the "(unverified data)" of its option text.
    const unverified = state.materialList.some((m) => m.key === key && m.verified === false);
    state.design.fields[`${prefix}material`].setHint(unverified ? 'Unverified data: its dispersion formula has no journal source.' : null);
  }
  // Biaxial crystals where the kind takes them, with the cut or plane that orients them.
  const mainKey = state.design.fields.material.value;
  for (const [prefix] of state.design.mediumBoxes) {
    const select = state.design.fields[`${prefix}material`].input;
    const takes = prefix ? PAIR_KINDS.has(kind) : BIAXIAL_KINDS.has(kind);
    for (const o of select.options) {
      const hide = !takes && isBiaxial(state, o.value) && o.value !== select.value;
      if (o.hidden !== hide) o.hidden = hide;
    }
    // A pair's plate shows its own cut while its crystal is biaxial.
    const plateCut = prefix && state.design.fields[`${prefix}cut`].row;
    if (plateCut && plateCut.hidden !== !isBiaxial(state, select.value)) plateCut.hidden = !isBiaxial(state, select.value);
  }
  const biaxial = isBiaxial(state, mainKey);
  state.design.fields.cut.row.hidden = !(biaxial && CUT_KINDS.has(kind));
  state.design.fields.plane.row.hidden = !(biaxial && kind === 'displacer');
  const order = state.design.fields.order.value;
  const byOrder = state.design.fields.size.value === 'order';
  state.design.fields.order_number.row.hidden = kind === 'tilt-tuning' ? !byOrder : order !== 'multiple';
  state.design.fields.made_for_nm.row.hidden = !byOrder;
  state.design.fields.thickness_mm.row.hidden = byOrder;
  state.design.fields.base_mm.row.hidden = order !== 'compound';
  state.design.fields.rotator_deg.row.hidden = state.design.fields.middle.value !== 'rotator';
}

/** The design request the panel's fields say (numbers, or text as typed where it is no number). */
function designRequest(state) {
  const kind = state.design.fields.kind.value;
  const req = { kind };
  const put = (path) => {
    const f = state.design.fields[path];
    if (!f.blank) req[path] = f.value;
  };
  const medium = (prefix) => {
    const out = {};
    const m = state.design.fields[`${prefix}material`].value;
    if (m === 'custom' || m === 'principal') {
      for (const k of m === 'custom' ? ['no', 'ne'] : ['nx', 'ny', 'nz']) {
        const f = state.design.fields[`${prefix}${k}`];
        if (!f.blank) out[k] = f.value;
      }
    } else {
      out.material = m;
    }
    // A biaxial plate sends its cut when one is chosen and shown (empty: the core's default):
    // a pair's plate its own, the single-crystal kinds that cut their plates the panel's.
    const cut = state.design.fields[`${prefix}cut`];
    if (!cut.row.hidden && cut.value) out.cut = cut.value;
    return out;
  };
  const pair = (name) => {
    const a = state.design.fields[`${name}[0]`];
    const b = state.design.fields[`${name}[1]`];
    if (a.blank && b.blank) return;
    req[name] = [a.blank ? a.input.value : a.value, b.blank ? b.input.value : b.value];
  };
  // The kind's tolerances, then its Monte Carlo run.
  const tolerances = () => {
    const tol = {};
    for (const k of TOLERANCES[kind]) {
      const f = state.design.fields[`tolerances.${k}`];
      if (!f.blank) tol[k] = f.value;
    }
    if (Object.keys(tol).length) req.tolerances = tol;
    put('samples');
    put('seed');
  };
  if (kind === 'displacer') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    pair('band_nm');
    put('separation_mm');
    put('beam_diameter_mm');
    put('cut_tilt_deg');
    put('aperture_factor');
    if (!state.design.fields.plane.row.hidden && state.design.fields.plane.value) put('plane');
    tolerances();
  } else if (kind === 'angular-splitter') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('split_angle_deg');
    put('aperture_mm');
    put('cement_index');
    pair('band_nm');
    tolerances();
  } else if (kind === 'prism-polarizer') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('cement_index');
    put('aperture_mm');
  } else if (kind === 'tilt-tuning') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('retardance_waves');
    if (state.design.fields.size.value === 'order') {
      put('order_number');
      put('made_for_nm');
    } else {
      put('thickness_mm');
    }
    put('axis_azimuth_deg');
    put('tilt_azimuth_deg');
    put('max_tilt_deg');
  } else if (kind === 'quartz-rotator') {
    put('rotation_deg');
    put('wavelength_nm');
    pair('band_nm');
    if (state.design.fields.handedness.value) put('handedness');
    put('min_thickness_mm');
    put('rotation_tolerance_deg');
    put('ellipticity_tolerance_deg');
    put('max_incidence_deg');
  } else if (kind === 'waveplate') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('retardance_waves');
    req.order = state.design.fields.order.value;
    if (req.order === 'multiple') put('order_number');
    if (req.order === 'compound') put('base_mm');
    pair('band_nm');
    put('max_incidence_deg');
    put('acceptance_error_waves');
  } else if (kind === 'athermal-waveplate' || kind === 'achromat') {
    // Two plates: the retardance at two wavelengths, or held against temperature at one.
    req.first = medium('first.');
    req.second = medium('second.');
    put('retardance_waves');
    if (kind === 'achromat') {
      pair('wavelengths_nm');
      pair('band_nm');
    } else {
      put('wavelength_nm');
      put('acceptance_error_waves');
    }
  } else if (kind === 'birefringent-filter') {
    Object.assign(req, medium(''));
    req.layout = state.design.fields.layout.value;
    put('stages');
    put('wavelength_nm');
    put('bandwidth_nm');
    pair('band_nm');
  } else if (kind === 'broadband-retarder') {
    // Two crystals alternate when a second is chosen and the plate count is one the core takes;
    // otherwise the request names the plates, so that the core's error lands on that field. The
    // first crystal is its catalogue key, or its own entry where it has more to say (custom
    // indices, a chosen cut): {"nx": …, "cut": …}.
    const second = state.design.fields.materials.value;
    const n = state.design.fields.plates;
    if (second && !n.blank && Number.isInteger(n.value) && n.value >= 2 && n.value <= 7) {
      const own = medium('');
      const first = Object.keys(own).length === 1 && typeof own.material === 'string' ? own.material : own;
      req.materials = Array.from({ length: n.value }, (_, i) => (i % 2 ? second : first));
    } else {
      Object.assign(req, medium(''));
      put('plates');
    }
    put('retardance_waves');
    put('fast_axis_deg');
    pair('band_nm');
    put('max_thickness_mm');
    put('generations');
    put('seed');
  } else if (kind === 'lc-voltage') {
    put('thickness_um');
    req.lc = state.design.fields.lc.value;
    put('rubbing_azimuth_deg');
    put('twist_deg');
    put('pretilt_deg');
    put('wavelength_nm');
    put('retardance_waves');
    put('max_voltage_v');
    pair('retardance_range_waves');
  } else if (kind === 'recombiner') {
    Object.assign(req, medium(''));
    put('wavelength_nm');
    put('length_mm');
    put('cut_tilt_deg');
    put('beam_diameter_mm');
    req.middle = state.design.fields.middle.value;
    if (req.middle === 'rotator') put('rotator_deg');
    put('length_mismatch_mm');
    put('tilt_mismatch_deg');
  }
  // The core's default is 20 °C: a request states another temperature (or text that is none).
  const t = state.design.fields.temperature_c;
  if (!t.blank && t.value !== 20) req.temperature_c = t.value;
  // Vacuum is the core's default: a request states air alone, as the set-up's document does.
  if (state.design.fields.wavelength_in.value === 'air') req.wavelength_in = 'air';
  return req;
}

// --- errors beside the design fields (the same walk-up rule as the set-up's) -----------------

// Names of request fields that have no control of their own (an error about a whole group).
const GROUP_LABELS = {
  '': 'Design request',
  band_nm: 'Band',
  tolerances: 'Tolerances',
  first: 'First plate',
  second: 'Second plate',
  wavelengths_nm: 'Design wavelengths',
  retardance_range_waves: 'Retardance range',
  kind: 'Part',
};

/** A request field as the panel labels it ("Band to", "Material of the first plate"). */
function labelFor(state, path) {
  return state.design.errors.label(path);
}

// --- plots -------------------------------------------------------------------------------------

function seriesJson(s) {
  return JSON.stringify(s);
}

function designPlot(name, { caption, label, draw, wide = false, small = false }) {
  const canvas = h('canvas', { 'data-design-plot': name, role: 'img', 'aria-label': label });
  const box = h('div', { className: 'canvas-box' }, canvas);
  const plot = { name, canvas, box, draw, small };
  plot.figure = h(
    'figure',
    { className: `view design-plot${wide ? ' wide' : ''}${small ? ' small' : ''}` },
    box,
    caption ? h('figcaption', { text: caption }) : null,
  );
  return plot;
}

function plotsFor(state, kind, d, request, run) {
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
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Separation against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'separation', y_unit: 'mm',
        points: c, current: [d.wavelength_nm, d.separation_mm],
        note: one ? 'design wavelength only' : `${c.length} wavelengths`,
      }), dark),
    });
    const plots = [band];
    if (d.monte_carlo || run) plots.push(histogramPlot(state, d.monte_carlo, run, 'separation', 'mm', d.separation_mm, 'the plate with all four errors'));
    return plots;
  }
  if (kind === 'waveplate') {
    const c = d.wavelength_curve;
    const worst = worstPlane(d);
    const err = typeof request.acceptance_error_waves === 'number' ? request.acceptance_error_waves : state.design.limits.default_acceptance_error_waves;
    const plots = [designPlot('retardance-wavelength', {
      wide: true,
      label: c.length
        ? `Retardance against wavelength, ${trimmed(c[0][0], 2)} to ${trimmed(c[c.length - 1][0], 2)} nm: from ${g(c[0][1])} to ${g(c[c.length - 1][1])} waves; ${g(d.retardance_waves)} waves at ${trimmed(request.wavelength_nm ?? 632.8, 3)} nm.`
        : 'Retardance against wavelength: no point of the band could be evaluated.',
      caption: 'At normal incidence; crossed plates count negative.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
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
        draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
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
    return [designPlot('retardance-wavelength', {
      wide: true,
      label: `Retardance of the pair against wavelength${c.length ? `, ${trimmed(c[0][0], 2)} to ${trimmed(c[c.length - 1][0], 2)} nm` : ''}: ${g(a[1])} waves at ${trimmed(a[0], 3)} nm and ${g(b[1])} waves at ${trimmed(b[0], 3)} nm, the two design points (both marked); largest departure from the target over the band ${g(d.max_error_waves, 3)} waves.`,
      caption: 'Both design wavelengths are marked (a label is left out where two would overlap); their values are in the Retardance card.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Retardance of the pair against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'retardance', y_unit: 'waves',
        points: c, current: null, markers: [a, b], note: 'design points marked',
      }), dark),
    })];
  }
  if (kind === 'angular-splitter') {
    const b = d.band;
    const pts = b.wavelength_nm.map((x, i) => [x, b.split_angle_deg[i]]);
    const wl = d.scenario.wavelength_nm;
    const plots = [designPlot('split-wavelength', {
      wide: true,
      label: `Split angle against wavelength, ${trimmed(pts[0][0], 2)} to ${trimmed(pts[pts.length - 1][0], 2)} nm: from ${g(pts[0][1])}° to ${g(pts[pts.length - 1][1])}°; ${g(d.split_angle_deg)}° at ${trimmed(wl, 3)} nm.`,
      caption: 'The designed splitter over the band; the design wavelength is marked.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Split angle against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'split angle', y_unit: '°',
        points: pts, current: [wl, d.split_angle_deg], note: `${pts.length} wavelengths`,
      }), dark),
    })];
    const mc = d[mcKey(d)];
    if (mc || run) plots.push(histogramPlot(state, mc, run, 'split angle', '°', d.split_angle_deg, 'the splitter with its wedge, axis and incidence errors'));
    return plots;
  }
  if (kind === 'prism-polarizer') {
    const c = d.curve;
    const edges = [d.lower_edge, d.upper_edge];
    return ['passed', 'leaked'].map((what) => {
      const pts = c.incidence_deg.map((x, i) => [x, c[what][i]]);
      const top = Math.max(...pts.map((q) => q[1]));
      return designPlot(`${what}-incidence`, {
        wide: true,
        label: `Power ${what} against incidence, ${g(pts[0][0])}° to ${g(pts[pts.length - 1][0])}°: at most ${g(top)}; the field's edges at ${g(edges[0].incidence_deg)}° and ${g(edges[1].incidence_deg)}° are marked.`,
        caption: what === 'passed' ? 'Light polarized along the passed mode; the edges of the field are marked.' : 'Light polarized along the reflected mode: zero inside the field.',
        draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
          title: `Power ${what} against incidence`,
          x_label: 'incidence', x_unit: '°', y_label: `power ${what}`, y_unit: 'fraction',
          points: pts, current: null, markers: edges.map((e) => [e.incidence_deg, e.inside[what]]), note: 'edges marked',
        }), dark),
      });
    });
  }
  if (kind === 'quartz-rotator') return rotatorPlots(state, d);
  if (kind === 'athermal-waveplate') {
    const c = d.temperature_curve;
    const t0 = d.temperature.design_temperature_c;
    const [lo, hi] = d.temperature.band_c;
    return [designPlot('retardance-temperature', {
      wide: true,
      label: `Retardance of the pair against temperature, ${trimmed(c[0][0], 1)} to ${trimmed(c[c.length - 1][0], 1)} °C: ${g(d.retardance_waves)} waves at ${trimmed(t0, 2)} °C, where it does not change to first order; within ±${d.acceptance_error_waves} waves from ${g(lo)} to ${g(hi)} °C.`,
      caption: 'At the design wavelength and normal incidence; the design temperature is marked.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Retardance against temperature',
        x_label: 'temperature', x_unit: '°C', y_label: 'retardance', y_unit: 'waves',
        points: c, current: [t0, d.retardance_waves], note: 'athermal pair',
      }), dark),
    })];
  }
  if (kind === 'birefringent-filter') {
    const c = d.curve;
    const [short, long] = d.neighbour_peaks_nm;
    return [designPlot('transmission-wavelength', {
      wide: true,
      label: `Transmission of the filter against wavelength, ${trimmed(c[0][0], 2)} to ${trimmed(c[c.length - 1][0], 2)} nm: ${g(d.peak_transmission)} at the centre ${trimmed(d.wavelength_nm, 3)} nm (marked), pass band ${g(d.fwhm_nm)} nm wide${short ? `; neighbouring peaks at ${g(short, 5)}` : ''}${long ? ` and ${g(long, 5)} nm` : ''}.`,
      caption: 'Light polarized along the first polarizer, every point a whole trace of the filter.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Transmission against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'transmission', y_unit: 'fraction',
        points: c, current: [d.wavelength_nm, d.peak_transmission], note: `${d.layout}, ${d.plates.length} plates`,
      }), dark),
    })];
  }
  if (kind === 'broadband-retarder') {
    const c = d.curve;
    const ret = c.map((q) => [q.wavelength_nm, q.retardance_waves]);
    const axis = c.map((q) => [q.wavelength_nm, q.fast_axis_deg]);
    const [lo, hi] = d.band_nm;
    return [designPlot('retardance-wavelength', {
      wide: true,
      label: `Retardance of the stack against wavelength, ${trimmed(lo, 2)} to ${trimmed(hi, 2)} nm: within ±${g(d.departures.retardance_waves, 3)} waves of the target ${d.target_retardance_waves}; a single zero-order plate departs by ${g(d.single_plate.departures.retardance_waves, 3)} waves.`,
      caption: 'The equivalent retarder of the stack at normal incidence.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Retardance against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'retardance', y_unit: 'waves',
        points: ret, current: null, note: `${d.plates.length} plates`,
      }), dark),
    }), designPlot('fast-axis-wavelength', {
      small: true,
      label: `Fast axis of the stack against wavelength: within ±${g(d.departures.fast_axis_deg, 3)}° of the target ${d.target_fast_axis_deg}°.`,
      caption: `Drift within ±${g(d.departures.fast_axis_deg, 3)}°.`,
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Fast axis against wavelength',
        x_label: 'wavelength', x_unit: 'nm', y_label: 'fast axis', y_unit: '°',
        points: axis, current: null, note: 'equivalent retarder',
      }), dark),
    })];
  }
  if (kind === 'lc-voltage') {
    const c = d.curve;
    return [designPlot('retardance-voltage', {
      wide: true,
      label: `Retardance of the cell against voltage, 0 to ${trimmed(c[c.length - 1][0], 2)} V: ${g(d.retardance_span_waves[0])} waves at 0 V, ${g(d.retardance_span_waves[1])} waves at ${trimmed(c[c.length - 1][0], 2)} V; ${g(d.requested_retardance_waves)} waves at ${g(d.voltage_v)} V (marked), threshold ${g(d.threshold_voltage_v)} V.`,
      caption: 'At normal incidence; the voltage that gives the target is marked.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Retardance against voltage',
        x_label: 'voltage', x_unit: 'V', y_label: 'retardance', y_unit: 'waves',
        points: c, current: [d.voltage_v, d.retardance_waves], note: `threshold ${g(d.threshold_voltage_v)} V`,
      }), dark),
    })];
  }
  if (kind === 'tilt-tuning') {
    const c = d.curve;
    const pts = c.tilt_deg.map((x, i) => [x, c.retardance_waves[i]]);
    return [designPlot('retardance-tilt', {
      wide: true,
      label: `Retardance against mount tilt, 0 to ${trimmed(pts[pts.length - 1][0], 2)}°: ${g(d.normal_retardance_waves)} waves untilted, ${g(pts[pts.length - 1][1])} waves at ${trimmed(pts[pts.length - 1][0], 2)}°; ${g(d.retardance_waves)} waves at the tilt ${g(d.tilt_deg)}° (marked).`,
      caption: 'The plate in its mount; the tilt that reaches the target is marked.',
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: 'Retardance against mount tilt',
        x_label: 'mount tilt', x_unit: '°', y_label: 'retardance', y_unit: 'waves',
        points: pts, current: [d.tilt_deg, d.retardance_waves], note: `order ${d.order}`,
      }), dark),
    })];
  }
  return [];
}

/**
 * The quartz rotator's plots: its rotation over the band (the design wavelength marked), and the
 * worst ellipticity and rotation error of a linear input against incidence, the acceptance
 * marked where a tolerance is reached (src/design/rotator.rs).
 */
function rotatorPlots(state, d) {
  const g = (v, n = 4) => significant(v, n);
  const b = d.band;
  const pts = b.wavelength_nm.map((x, i) => [x, b.rotation_deg[i]]);
  const last = pts.length - 1;
  const plots = [designPlot('rotation-wavelength', {
    wide: true,
    label: `Rotation against wavelength, ${trimmed(pts[0][0], 2)} to ${trimmed(pts[last][0], 2)} nm: from ${g(pts[0][1])}° to ${g(pts[last][1])}°; ${g(d.rotation_deg)}° at ${trimmed(d.wavelength_nm, 3)} nm (marked).`,
    caption: 'The designed plate over the band, at normal incidence; positive from x toward y.',
    draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
      title: 'Rotation against wavelength',
      x_label: 'wavelength', x_unit: 'nm', y_label: 'rotation', y_unit: '°',
      points: pts, current: [d.wavelength_nm, d.rotation_deg], note: `${d.handedness}-handed, ${g(d.thickness_mm)} mm`,
    }), dark),
  })];
  const c = d.acceptance_curve;
  const found = d.acceptance_bound === 'found';
  const end = c.incidence_deg[c.incidence_deg.length - 1];
  for (const [name, key, tol, what] of [
    ['ellipticity-incidence', 'ellipticity_deg', d.ellipticity_tolerance_deg, 'ellipticity'],
    ['rotation-error-incidence', 'rotation_error_deg', d.rotation_tolerance_deg, 'rotation error'],
  ]) {
    const q = c.incidence_deg.map((x, i) => [x, c[key][i]]);
    const limits = found && d.acceptance_limited_by === (key === 'ellipticity_deg' ? 'ellipticity' : 'rotation');
    plots.push(designPlot(name, {
      small: true,
      label: `Worst ${what} of a linear input against angle of incidence, 0 to ${trimmed(end, 3)}°: ${g(q[q.length - 1][1])}° at ${trimmed(end, 3)}°; tolerance ${g(tol)}°${found ? `; acceptance ${g(d.acceptance_deg)}°${limits ? `, where the ${what} reaches its tolerance (marked)` : ''}` : `; within the tolerances up to ${trimmed(end, 3)}°`}.`,
      caption: limits ? `Acceptance ${g(d.acceptance_deg)}° (±${g(tol)}°).` : `Tolerance ±${g(tol)}°.`,
      draw: (p, dark) => state.core.drawSeries(p.canvas, seriesJson({
        title: `${what.charAt(0).toUpperCase()}${what.slice(1)}, worst input`,
        x_label: 'incidence', x_unit: '°', y_label: what, y_unit: '°',
        points: q, current: limits ? [d.acceptance_deg, tol] : null, note: `tolerance ${g(tol)}°`,
      }), dark),
    }));
  }
  return plots;
}

/** The histogram of a Monte Carlo summary `mc` (or the state of its run), the nominal value marked. */
function histogramPlot(state, mc, run, what, unit, nominal, traced) {
  const g = (v, n) => significant(v, n);
  const title = mc ? `${what.charAt(0).toUpperCase()}${what.slice(1)} over the tolerances` : run && run.cancelled ? 'Monte Carlo run cancelled' : 'Monte Carlo run in progress';
  const u = unit === '°' ? '°' : ` ${unit}`;
  return designPlot('tolerance-histogram', {
    wide: true,
    label: mc
      ? `Histogram of the ${what} over ${mc.n} Monte Carlo samples: mean ${g(mc.mean, 6)}${u}, standard deviation ${g(mc.std, 3)}${u}, 5th to 95th percentile ${g(mc.p5, 6)} to ${g(mc.p95, 6)}${u}; the nominal design gives ${g(nominal, 6)}${u}.`
      : `${title}: no samples yet.`,
    caption: `Every sample traces ${traced} drawn at once; the nominal ${what} is marked.`,
    draw: (p, dark) => state.core.drawHistogram(p.canvas, JSON.stringify(mc ?? { n: 0 }), title, what, unit, nominal, dark),
  });
}

function designWavelength(request) {
  return typeof request.wavelength_nm === 'number' ? request.wavelength_nm : 632.8;
}

function drawDesignPlot(state, p) {
  try {
    p.draw(p, state.darkQuery.matches);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    state.design.errors.show({ field: '', message: `Could not draw the plot ${p.name}: ${fe.message}` });
  }
}

function redrawDesign(state) {
  for (const p of state.design.plots) drawDesignPlot(state, p);
}

// The results of each kind: (state, design, run, request) -> [headline, ...cards].
const RESULTS = {
  displacer: displacerResults, waveplate: waveplateResults, achromat: achromatResults, recombiner: recombinerResults,
  'angular-splitter': splitterResults, 'prism-polarizer': polarizerResults, 'tilt-tuning': tiltResults,
  'quartz-rotator': rotatorResults, 'athermal-waveplate': athermalResults,
  'birefringent-filter': filterResults, 'broadband-retarder': broadbandResults, 'lc-voltage': lcResults,
};

/** Writes the shown design: its results as text, then its plots. */
function renderDesign(state) {
  const s = state.design.shown;
  const results = document.getElementById('design-results');
  const cardBox = document.getElementById('design-cards');
  const plotBox = document.getElementById('design-plots');
  const rowBox = document.getElementById('design-plots-row');
  if (!s) {
    results.replaceChildren();
    cardBox.replaceChildren();
    plotBox.replaceChildren();
    rowBox.replaceChildren();
    state.design.plots = [];
    document.getElementById('design-empty').hidden = false;
    updateOrderSheet(state, null);
    return;
  }
  document.getElementById('design-empty').hidden = true;
  const d = s.design;
  const kind = d.kind;
  const parts = (RESULTS[kind] ?? recombinerResults)(state, d, s.run, s.request);
  const name = DESIGN_KINDS.find(([k]) => k === kind)?.[1] ?? kind;
  const head = h('h3', { className: 'design-for', text: `${name.charAt(0).toUpperCase()}${name.slice(1)}${s.complete ? '' : ': nominal design, tolerance run not finished'}` });
  const advice = adviceOf(state, d);
  results.replaceChildren(...[head, adviceLists(advice), parts[0], basisLine(d)].filter(Boolean));
  cardBox.replaceChildren(...parts.slice(1), temperatureCard(d));

  for (const p of state.design.plots) state.design.resize.unobserve(p.box);
  state.design.plots = plotsFor(state, kind, d, s.request, s.run);
  plotBox.replaceChildren(...state.design.plots.filter((p) => !p.small).map((p) => p.figure));
  rowBox.replaceChildren(...state.design.plots.filter((p) => p.small).map((p) => p.figure));
  for (const p of state.design.plots) {
    drawDesignPlot(state, p);
    state.design.resize.observe(p.box);
  }
  document.getElementById('design-use').disabled = false;
  updateDesignStale(state);
  const kindName = DESIGN_KINDS.find(([k]) => k === kind)?.[1] ?? kind;
  const words = (list) => list.map((a) => a.text);
  updateOrderSheet(state, { kindName, request: s.request, design: d, complete: s.complete, warnings: words(advice.warnings), notes: words(advice.notes) });
}

// --- the design part of a shared link --------------------------------------------------------

/** Tells the page the request the fields say, for the link ('' while it is the default one). */
function notifyDesignInputs(state) {
  if (!state.design.links.onDesignInputs) return;
  const text = JSON.stringify(designRequest(state));
  state.design.links.onDesignInputs(text === state.design.defaultRequestText ? '' : text);
}

/** A request's fields by path (`tolerances.tilt_deg`, `band_nm[1]`), leaves only. */
function requestLeaves(obj, prefix = '', out = []) {
  for (const [k, v] of Object.entries(obj)) {
    const path = prefix ? `${prefix}.${k}` : k;
    if (Array.isArray(v)) v.forEach((x, i) => out.push([`${path}[${i}]`, x]));
    else if (v && typeof v === 'object') requestLeaves(v, path, out);
    else out.push([path, v]);
  }
  return out;
}

/**
 * A broadband retarder's `materials` as the panel's fields say them: a list that alternates two
 * crystals, the second a catalogue key, becomes the first crystal's own fields (`material`, or
 * `nx` … with `cut`), the select `materials` (the second) and `plates` (the list's length), as
 * designRequest builds it. Any other list the panel cannot hold is left out, with a problem on
 * `materials`.
 */
function panelMaterials(req) {
  if (req.kind !== 'broadband-retarder' || !Array.isArray(req.materials)) return { req, problems: [] };
  const { materials, ...rest } = req;
  const [first, second] = materials;
  const same = (a, b) => JSON.stringify(a) === JSON.stringify(b);
  const own = typeof first === 'string' ? { material: first } : first;
  if (materials.length < 2 || typeof second !== 'string' || !own || typeof own !== 'object' || Array.isArray(own)
    || !materials.every((m, i) => same(m, i % 2 ? second : first))) {
    return { req: rest, problems: [{ field: 'materials', message: 'the panel alternates two crystals, the second a catalogue key; this list of plates was left out: ask it in a JSON request' }] };
  }
  return { req: { ...rest, ...own, materials: second, plates: materials.length }, problems: [] };
}

/**
 * Fills the fields from a design request (the design part of a link). A field the panel does not
 * have, or a value it cannot hold, is named beside its field (or in the panel's general slot)
 * and left out; every other field is filled.
 */
function setDesignInputs(state, linked) {
  state.design.errors.clear();
  if (!linked || typeof linked !== 'object' || Array.isArray(linked)) {
    state.design.errors.show({ field: '', message: 'The design part of this link is not a JSON object; the design fields were kept.' });
    return;
  }
  const { req, problems } = panelMaterials(linked);
  const leaves = requestLeaves(req);
  // The kind first: it decides which fields show; custom indices choose the custom material.
  leaves.sort(([a], [b]) => (b === 'kind') - (a === 'kind'));
  for (const [path, v] of leaves) {
    const f = state.design.fields[path];
    if (!f) {
      problems.push({ field: path, message: 'the design panel has no such field; it was left out of the link\'s request' });
      continue;
    }
    if (f.kind === 'select') {
      if (![...f.input.options].some((o) => o.value === String(v))) {
        problems.push({ field: path, message: `“${String(v).slice(0, 40)}” is not one of its choices; it was left as it was` });
        continue;
      }
      f.input.value = String(v);
      f.touched = true;
      if (path === 'kind') layoutDesignFields(state);
    } else if (typeof v === 'number' && Number.isFinite(v)) {
      f.input.value = String(v);
      f.touched = true;
      const m = /^(.*?)(no|ne|nx|ny|nz)$/.exec(path);
      if (m && state.design.fields[`${m[1]}material`] && !leaves.some(([p]) => p === `${m[1]}material`)) {
        state.design.fields[`${m[1]}material`].input.value = ['no', 'ne'].includes(m[2]) ? 'custom' : 'principal';
        state.design.fields[`${m[1]}material`].touched = true;
      }
    } else {
      problems.push({ field: path, message: 'the link gives no number here; the field was left as it was' });
    }
  }
  // A tilt-tuned plate given by its order says so in the select that shows its fields.
  if (req.kind === 'tilt-tuning') state.design.fields.size.input.value = 'order_number' in req ? 'order' : 'thickness';
  layoutDesignFields(state);
  for (const p of problems) state.design.errors.add(p);
  notifyDesignInputs(state);
}

// --- the worker ----------------------------------------------------------------------------

function setDesignState(panelState) {
  const panel = document.getElementById('design');
  if (panel.dataset.state !== panelState) panel.dataset.state = panelState;
  const running = panelState === 'solving' || panelState === 'running';
  const cancel = document.getElementById('design-cancel');
  if (!running && document.activeElement === cancel) document.getElementById('design-solve').focus();
  cancel.disabled = !running;
  // The results are being replaced while a run goes on (the status line, in the form, still speaks).
  document.getElementById('design-output').setAttribute('aria-busy', running ? 'true' : 'false');
}

function setStatus(text) {
  setText(document.getElementById('design-status'), text);
}

function startDesignWorker(state) {
  let w;
  try {
    w = startCoreWorker();
  } catch (e) {
    designFailed(state, `The design worker could not start: ${e && e.message ? e.message : e}`);
    return;
  }
  state.design.worker = w;
  w.onmessage = (ev) => {
    if (w === state.design.worker) onDesignMessage(state, ev.data);
  };
  w.onerror = (ev) => {
    ev.preventDefault();
    if (w !== state.design.worker) return;
    designFailed(state, `The design worker stopped: ${ev.message || 'its script or the design core could not be loaded'}.`);
  };
  w.onmessageerror = () => {
    if (w === state.design.worker) designFailed(state, 'The design worker sent a message the page could not read.');
  };
}

function stopDesignWorker(state) {
  if (state.design.worker) state.design.worker.terminate();
  state.design.worker = null;
}

function designFailed(state, message) {
  stopDesignWorker(state);
  const a = state.design.active;
  state.design.active = null;
  if (a && a.nominal && state.design.shown && state.design.shown.run) {
    state.design.shown.run.cancelled = true;
    renderDesign(state);
  } else {
    document.getElementById('design-run').hidden = true;
  }
  state.design.errors.show({ field: '', message: `${message} Press Solve to try again.` });
  setDesignState('error');
  setStatus('Not solved.');
}

function showProgress(done, total) {
  const bar = document.getElementById('design-progress');
  if (bar.max !== total) bar.max = total;
  bar.value = done;
  setText(document.getElementById('design-progress-text'), `${done} of ${total} samples`);
}

function onDesignMessage(state, msg) {
  if (!msg || typeof msg !== 'object') return;
  if (msg.type === 'ready') return;
  if (msg.type === 'failed') {
    designFailed(state, msg.message);
    return;
  }
  const a = state.design.active;
  if (!a || msg.id !== a.id) return;
  if (msg.type === 'nominal') {
    a.nominal = msg.design;
    const total = msg.total;
    a.total = total;
    state.design.shown = { request: a.request, design: msg.design, complete: false, run: { done: 0, total, cancelled: false } };
    document.getElementById('design-run').hidden = false;
    showProgress(0, total);
    setDesignState('running');
    setStatus('Nominal design shown; the tolerance run goes on in the background.');
    state.design.errors.clear();
    renderDesign(state);
  } else if (msg.type === 'progress') {
    a.done = msg.done;
    a.total = msg.total;
    if (state.design.shown && state.design.shown.run) state.design.shown.run.done = msg.done;
    showProgress(msg.done, msg.total);
    const st = document.getElementById('design-mc-state');
    if (st) setText(st, `Running: ${msg.done} of ${msg.total} samples.`);
  } else if (msg.type === 'done') {
    const ms = performance.now() - a.t0;
    state.design.active = null;
    state.design.lastMs = ms;
    state.design.shown = { request: a.request, design: msg.design, complete: true, run: null };
    if (!a.nominal) document.getElementById('design-run').hidden = true;
    state.design.errors.clear();
    setDesignState('done');
    const mc = msg.design[mcKey(msg.design)];
    setStatus(mc ? `Solved, with ${mc.n} Monte Carlo samples, in ${Math.round(ms)} ms.` : `Solved in ${Math.round(ms)} ms.`);
    renderDesign(state);
  } else if (msg.type === 'error') {
    state.design.active = null;
    if (a.nominal && state.design.shown && state.design.shown.run) {
      state.design.shown.run.cancelled = true;
      renderDesign(state);
    }
    if (msg.internal) {
      // The core may be in a bad state after an internal error: start afresh.
      stopDesignWorker(state);
      startDesignWorker(state);
    }
    document.getElementById('design-run').hidden = true;
    const err = panelError(a.request, msg.error);
    state.design.errors.show(err);
    setDesignState('error');
    setStatus(`Not solved: ${err.field ? state.design.errors.summary(err) : 'see the message above'}.`);
    updateDesignStale(state, true);
  }
}

/**
 * A core error about the request the panel built, on the panel's own field: a broadband
 * retarder's alternating plates carry the first crystal's fields in `materials[0]`,
 * `materials[2]` …, which the panel shows as the part's own (`materials[2].nz` → `nz`,
 * `materials[0]` → `material`), and the second crystal as the "Alternate with" select
 * (`materials[1]` → `materials`). Every other error is the core's as it is.
 */
function panelError(request, err) {
  if (request?.kind !== 'broadband-retarder' || !Array.isArray(request.materials)) return err;
  const m = /^materials\[(\d+)\](?:\.(.+))?$/.exec(err.field ?? '');
  if (!m) return err;
  return { ...err, field: Number(m[1]) % 2 ? 'materials' : (m[2] ?? 'material') };
}

// What an empty band or pair of wavelengths means, by kind (see state.design.hints), for a one-sided one.
const BAND_DEFAULT_WORDS = {
  displacer: 'the design wavelength alone',
  waveplate: '±20 % around the design wavelength',
  'angular-splitter': '±10 % around the design wavelength',
  'quartz-rotator': '±10 % around the design wavelength',
  achromat: '0.8 × λ₁ to 1.2 × λ₂',
};

/**
 * A pair of fields (a band, two design wavelengths) with one end given and the other empty
 * explains itself: an error on the empty end saying what to do, or null.
 */
function oneSidedPair(state) {
  const kind = state.design.fields.kind.value;
  const pairs = kind === 'achromat' ? ['wavelengths_nm', 'band_nm'] : ['band_nm'];
  for (const name of pairs) {
    if (!(state.design.layout[kind] ?? []).some((n) => n.contains(state.design.fields[`${name}[0]`].row))) continue;
    const blank = [0, 1].map((i) => state.design.fields[`${name}[${i}]`].blank);
    if (blank[0] === blank[1]) continue;
    const empty = blank[0] ? 0 : 1;
    const end = empty === 0 ? 'lower' : 'upper';
    const message = name === 'band_nm'
      ? `give the ${end} end of the band too, or leave both ends empty for ${BAND_DEFAULT_WORDS[kind] ?? 'the default'}`
      : 'give both design wavelengths';
    return { field: `${name}[${empty}]`, message };
  }
  return null;
}

function solveDesign(state) {
  const oneSided = oneSidedPair(state);
  if (oneSided) {
    if (state.design.active) cancelDesign(state);
    state.design.errors.show(oneSided);
    setDesignState('error');
    setStatus(`Not solved: ${labelFor(state, oneSided.field)} is empty.`);
    updateDesignStale(state, true);
    return;
  }
  const request = designRequest(state);
  if (state.design.active) stopDesignWorker(state); // a new request replaces the one under way
  if (!state.design.worker) startDesignWorker(state);
  if (!state.design.worker) return;
  state.design.errors.clear();
  const id = state.design.nextId;
  state.design.nextId += 1;
  state.design.active = { id, request, t0: performance.now(), nominal: null, done: 0, total: 0 };
  setDesignState('solving');
  setStatus('Solving…');
  state.design.worker.postMessage({ type: 'solve', id, request });
}

function cancelDesign(state) {
  const a = state.design.active;
  if (!a) return;
  stopDesignWorker(state);
  startDesignWorker(state);
  state.design.active = null;
  if (a.nominal && state.design.shown && state.design.shown.run) {
    state.design.shown.run.cancelled = true;
    state.design.shown.run.done = a.done;
    setDesignState('cancelled');
    setStatus(`Cancelled after ${a.done} of ${a.total} samples; the nominal design stays.`);
    renderDesign(state);
  } else {
    setDesignState(state.design.shown ? 'done' : 'idle');
    setStatus('Cancelled.');
  }
  document.getElementById('design-solve').focus();
}

function useDesign(state) {
  const s = state.design.shown;
  if (!s) return;
  try {
    const kindName = DESIGN_KINDS.find(([k]) => k === s.design.kind)?.[1] ?? s.design.kind;
    state.design.links.applyScenario(structuredClone(s.design.scenario), { kind: 'design', name: kindName });
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    state.design.errors.show({ field: '', message: `The part could not be loaded into the set-up: ${fe.field ? `${fe.field}: ` : ''}${fe.message}` });
    return;
  }
  state.design.links.flushFragment();
  setStatus('The designed part is now the set-up: the views and results above show it.');
  document.getElementById('views').focus();
}

/** Says so when the fields no longer match the design shown (or the last request failed). */
function updateDesignStale(state, failed = false) {
  const note = document.getElementById('design-stale');
  const s = state.design.shown;
  let text = '';
  if (s && failed) {
    text = 'Not solved: the results below are for the last request that solved.';
  } else if (s && !state.design.active && JSON.stringify(designRequest(state)) !== JSON.stringify(s.request)) {
    text = 'The fields have changed since this design was solved: press Solve to update it.';
  }
  setText(note, text);
  if (note.hidden !== !text) note.hidden = !text;
}

/**
 * Builds the panel in section#design and starts its worker. `state` is the page's state
 * (state.js): the panel reads its core (drawSeries, drawHistogram, designLimits), materials and
 * colour scheme, and keeps its own part in state.design; every function of the panel that
 * needs it takes it as its first parameter. `links` is what the panel may do to
 * the page: `applyScenario(obj, origin)` (loads a scenario into the set-up as a step of its
 * history; throws {field, message}), `flushFragment()` (writes the address now) and
 * `onDesignInputs(text)` (the fields' request as JSON for the link, '' while it is the default).
 * Returns the test hooks `designRequest(state)` and `designShown()`, and `setDesignInputs(state, request)`
 * and `designLinkError(err)` for the design part of a link.
 */
export function setupDesign(state, links) {
  state.design.links = links;
  state.design.limits = state.core.designLimits();
  state.design.errors = new FieldErrors({
    root: document.getElementById('design'),
    names: NAMES,
    labelOf: (p) => state.design.fields[p]?.spoken,
    groups: GROUP_LABELS,
  });
  buildDesignFields(state);
  layoutDesignFields(state);
  const form = document.getElementById('design-form');
  form.addEventListener('submit', (ev) => {
    ev.preventDefault();
    solveDesign(state);
  });
  const onEdit = (ev) => {
    const f = ev.target instanceof HTMLElement ? ev.target.dataset.designField : undefined;
    if (f === undefined) return;
    if (state.design.fields[f]) state.design.fields[f].touched = true;
    if (ev.target.tagName === 'SELECT') layoutDesignFields(state);
    if (!state.design.errors.shown) updateDesignStale(state);
    notifyDesignInputs(state);
  };
  form.addEventListener('input', onEdit);
  form.addEventListener('change', onEdit);
  document.getElementById('design-cancel').addEventListener('click', () => cancelDesign(state));
  document.getElementById('design-use').addEventListener('click', () => useDesign(state));
  state.design.resize = new ResizeObserver((entries) => {
    const todo = new Set();
    for (const e of entries) {
      const p = state.design.plots.find((x) => x.box === e.target);
      if (p) todo.add(p);
    }
    requestAnimationFrame(() => {
      for (const p of todo) if (state.design.plots.includes(p)) drawDesignPlot(state, p);
    });
  });
  state.darkQuery.addEventListener('change', () => redrawDesign(state));
  startDesignWorker(state);
  state.design.defaultRequestText = JSON.stringify(designRequest(state));
  return {
    setDesignInputs: (req) => setDesignInputs(state, req),
    designLinkError: (err) => state.design.errors.show(err),
    designRequest: () => designRequest(state),
    designShown: () => (state.design.shown ? structuredClone({ request: state.design.shown.request, design: state.design.shown.design, complete: state.design.shown.complete }) : null),
  };
}
