// Doublespar design results: what the design panel shows of a solved design, kind by kind: the
// number formats with their units, the result cards (label, request path, format), the headline
// sentence of each kind, its Monte Carlo summary and its warnings and shop notes. Pure functions
// of the design object and the page state; design-panel.js builds the fields, runs the worker and
// places what these return.

import { h } from './dom.js';
import { fixed, fmt, minus, significant } from './format.js';
import { Field } from './field-error.js';
import { materialName } from './state.js';

/** A non-breaking space, between a number and its unit. */
const NBSP = '\u00a0';

// --- number formats for the design's results ------------------------------------------------

/** A plain number with at most `digits` decimals and no trailing zeros. */
export function trimmed(v, digits) {
  let s = v.toFixed(digits);
  if (s.includes('.')) s = s.replace(/0+$/, '').replace(/\.$/, '');
  if (/^-0$/.test(s)) s = '0';
  return minus(s);
}

const formats = {
  text: (v) => String(v),
  yes: (v) => (v ? 'yes' : 'no'),
  index: (v) => fixed(v, 6),
  deg: (v) => `${fixed(v, 4, 5e-13)}°`,
  /** An angle to at most 4 decimals without trailing zeros ("≥ 10°" for a bound, not "10.0000°"). */
  angle: (v) => `${trimmed(v, 4)}°`,
  nm: (v) => `${trimmed(v, 3)}${NBSP}nm`,
  length: (v) => {
    const a = Math.abs(v);
    if (a >= 1) return `${fixed(v, 4)}${NBSP}mm`;
    if (a < 1e-12) return `0${NBSP}mm`;
    const mm = `${significant(v, 5)}${NBSP}mm`;
    return a < 0.1 ? `${mm} (${significant(v * 1000, 5)}${NBSP}µm)` : mm;
  },
  waves: (v) => `${fixed(v, 5, 5e-13)}${NBSP}waves`,
  celsius: (v) => `${trimmed(v, 2)}${NBSP}°C`,
  rad: (v) => `${fixed(v, 4, 5e-13)}${NBSP}rad`,
  count: (v) => String(v),
  delay: (v) => fmt.delay(v),
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
function valueAt(d, path) {
  let v = d;
  for (const k of path.split('.')) {
    if (v === null || v === undefined || typeof v !== 'object') return undefined;
    v = Array.isArray(v) ? v[Number(k)] : v[k];
  }
  return v;
}

/**
 * The bound flag of the result at `path`: its sibling `<name>_bound` (the name without its unit
 * suffix, so `acceptance_deg` -> `acceptance_bound`; DEVELOPERS.md, "Bounds"), or undefined.
 */
function boundOf(d, path) {
  // A temperature band's edges: `band_c.i` with its flag in `band_bound[i]`.
  const edge = /^(.*)\.band_c\.([01])$/.exec(path);
  if (edge) {
    const b = valueAt(d, `${edge[1]}.band_bound.${edge[2]}`);
    return typeof b === 'string' ? b : undefined;
  }
  const i = path.lastIndexOf('.');
  const name = path.slice(i + 1).replace(/_(deg|mm|nm|waves|rad)$/, '');
  const b = valueAt(d, `${path.slice(0, i + 1)}${name}_bound`);
  return typeof b === 'string' ? b : undefined;
}

/**
 * A result as text: data-quantity = design.<path>, data-value = String(value). A value that is
 * only a lower bound reads "≥ 10°" and carries data-bound (the flag, `at_least` or `found`).
 */
function dq(d, path, format, tag = 'span', attrs = {}) {
  const v = valueAt(d, path);
  if (v === undefined) return null;
  const bound = boundOf(d, path);
  // A lower edge that is only a bound reaches at least as low: "≤".
  const mark = /\.band_c\.0$/.test(path) ? '≤' : '≥';
  const text = v === null ? '—' : `${bound === 'at_least' ? `${mark}${NBSP}` : ''}${format(v)}`;
  return h(tag, { ...attrs, 'data-quantity': `design.${path}`, 'data-value': String(v), 'data-bound': bound, text });
}

/** A card of labelled results of design `d`. rows: [label, path, format] or [label, element] or null. */
function resultCard(d, title, rows, { note, className } = {}) {
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

/** "A calcite", "An alpha barium borate": a name with its indefinite article (by its first letter). */
function article(name, capital = true) {
  const a = /^[aeiou]/i.test(name) ? 'an' : 'a';
  return `${capital ? a.toUpperCase().slice(0, 1) + a.slice(1) : a} ${name}`;
}

function designMaterialName(state, key) {
  return key === 'custom' ? 'custom-index' : materialName(state, key);
}

// --- warnings and shop notes ----------------------------------------------------------------

/**
 * A warning or shop note of the design in the panel's words: the request field that begins a
 * warning (`band_nm[1]: `, `band_nm (default): `; DEVELOPERS.md, "Design requests") becomes the
 * label of that field ("Band to: …"). Returns {field, text}.
 */
function adviceText(state, raw) {
  const text = String(raw);
  const m = /^([A-Za-z_][\w.[\]]*)( \(default\))?: ([\s\S]*)$/.exec(text);
  if (!m) return { field: '', text: text.charAt(0).toUpperCase() + text.slice(1) };
  return { field: m[1], text: `${state.design.errors.label(m[1])}${m[2] ?? ''}: ${m[3]}` };
}

/** The design's warnings, shop notes and dispersion sources in readable words: {warnings, notes, sources}, each [{field, text}]. */
export function adviceOf(state, d) {
  const words = (list) => (Array.isArray(list) ? list.map((t) => adviceText(state, t)) : []);
  // The dispersion source of each catalogue crystal the part uses (`sources`), with its citation.
  const sources = (Array.isArray(d.sources) ? d.sources : [])
    .map((s) => ({ field: '', text: `${materialName(state, s.material)}: ${s.source} formula, ${s.citation}` }));
  return { warnings: words(d.warnings), notes: words(d.notes), sources };
}

/** The warnings, shop notes and sources as visible lists (role=status), or null when there are none. */
export function adviceLists(advice) {
  const box = (key, title, items, className) => (items.length
    ? h('div', { className, 'data-design-advice': key },
      h('h4', { text: title }),
      h('ul', {}, ...items.map((a) => h('li', { 'data-field': a.field, text: a.text }))))
    : null);
  const warnings = box('warnings', 'Warnings', advice.warnings, 'warnings has-warnings design-warnings');
  const notes = box('notes', 'Shop notes (guidance)', advice.notes, 'warnings design-notes');
  const sources = box('sources', 'Indices from', advice.sources ?? [], 'design-sources');
  return warnings || notes || sources ? h('div', { className: 'design-advice', role: 'status' }, warnings, notes, sources) : null;
}

// --- the wavelength basis --------------------------------------------------------------------

// A request field given in air, as the panel names it (the answer's `air_<name>` beside its
// vacuum `<name>`; src/contract/request/basis.rs).
const AIR_WORDS = {
  wavelength_nm: 'wavelength',
  band_nm: 'band',
  wavelengths_nm: 'design wavelengths',
  made_for_nm: 'made for',
  bandwidth_nm: 'pass band',
  'tolerances.wavelength_nm': 'wavelength error',
  // A filter's own widths (the core's ANSWER_WIDTHS, src/contract/request/basis.rs).
  fwhm_nm: 'pass band met',
  neighbour_orders_fwhm_nm: 'the next orders\' pass bands',
  centre_shift_nm_per_k: 'centre drift',
};
// Lists of two separate figures (not a range from one end to the other).
const AIR_LISTS = new Set(['neighbour_orders_fwhm_nm']);

/**
 * A design asked in air wavelengths: each value as given beside the vacuum value the design used
 * (every other wavelength of the results and curves is in vacuum), as the set-up's summary shows
 * a scenario's vacuum wavelength; null for a design in vacuum.
 */
export function basisLine(d) {
  if (d.wavelength_in !== 'air') return null;
  const vacuum = (unit) => (v) => `${significant(v, 7)}${NBSP}${unit}`;
  const airNames = (o, prefix) => Object.keys(o ?? {}).filter((k) => k.startsWith('air_') && k !== 'air_index').map((k) => `${prefix}${k}`);
  const line = h('p', { className: 'design-basis' }, 'In standard air');
  if (typeof d.air_index === 'number') line.append(' (index ', dq(d, 'air_index', (v) => fixed(v, 7)), ')');
  line.append(': ');
  airNames(d, '').concat(airNames(d.tolerances, 'tolerances.')).forEach((path, i) => {
    const name = path.replace('air_', '');
    // One value or a pair [a, b], each end shown as given and in vacuum.
    const ends = Array.isArray(valueAt(d, path)) ? ['.0', '.1'] : [''];
    const sep = AIR_LISTS.has(name) ? ' and ' : '–';
    const pair = (p, format) => ends.flatMap((e, k) => [k ? sep : '', dq(d, `${p}${e}`, format)]);
    // A drift of a wavelength per kelvin (`…_nm_per_k`) keeps its unit.
    const unit = name.endsWith('_per_k') ? 'nm/K' : 'nm';
    const given = unit === 'nm' ? formats.nm : formats.sig(unit, 4);
    line.append(...[i ? '; ' : '', `${AIR_WORDS[name] ?? name.replace(/_nm$/, '').replace(/[._]/g, ' ')} `, ...pair(path, given), ', in vacuum ', ...pair(name, vacuum(unit))].filter((x) => x !== null));
  });
  line.append('. The other wavelengths below are in vacuum.');
  return line;
}

// --- results by kind -------------------------------------------------------------------------

/** Rows of each mode's group index (`modes.o.group_index` …), in the trace's order: o, e or f, s. */
function groupIndexRows(d) {
  return ['o', 'e', 'f', 's'].filter((m) => d.modes?.[m] !== undefined)
    .map((m) => [`${m} group index`, `modes.${m}.group_index`, formats.index]);
}

export function displacerResults(state, d, run) {
  const s = d;
  const headline = h(
    'p',
    { className: 'design-headline' },
    `${article(designMaterialName(state, s.material))} plate `,
    dq(d, 'length_mm', formats.length, 'strong'),
    ' long, cut at ',
    dq(d, 'cut_tilt_deg', formats.deg, 'strong'),
    // A biaxial plate is cut in a principal plane, from the plane's second axis.
    d.plane ? ` (principal ${d.plane[1]} from the face normal, in the ${d.plane} plane), with a clear aperture of at least ` : ' (optic axis from the face normal), with a clear aperture of at least ',
    dq(d, 'clear_aperture_mm', formats.length, 'strong'),
    '.',
  );
  // A biaxial plate's in-plane index ellipse stands where a uniaxial one's nₒ and nₑ do.
  const biaxialRows = d.plane ? [
    ['principal plane', 'plane', formats.text],
    [`n${d.plane[0]} (in the plane)`, 'no', formats.index],
    [`n${d.plane[1]} (in the plane)`, 'ne', formats.index],
    ['index of the straight mode', 'straight_index', formats.index],
  ] : [['nₒ', 'no', formats.index], ['nₑ', 'ne', formats.index]];
  const cards = [
    resultCard(d, 'What to order', [
      ['material', 'material', (v) => designMaterialName(state, v)],
      ['length', 'length_mm', formats.length],
      ['cut tilt', 'cut_tilt_deg', formats.deg],
      ['clear aperture', 'clear_aperture_mm', formats.length],
    ], { note: dq(d, 'cut_note', formats.text, 'span', { className: 'cut-note' }), className: 'design-main' }),
    resultCard(d, 'Beams at the exit', [
      ['o/e separation', 'separation_mm', formats.length],
      ['e-ray displaced toward (axis at 0°)', 'displacement_direction', formats.text],
      ['e walk-off', 'walkoff_deg', formats.deg],
      ['crosstalk (overlap)', 'crosstalk', formats.sig('', 3)],
      ['separation / beam diameter', 'clearance_ratio', formats.sig('', 4)],
      ['clipped per beam', 'clipping_per_beam', formats.sig('', 3)],
      ['o–e exit phase', 'exit_phase_rad', formats.rad],
      ['… reduced to (−π, π]', 'exit_phase_mod_2pi_rad', formats.rad],
      ['group delay, e pulse after o pulse', 'group_delay_ps', formats.delay],
      ...groupIndexRows(d),
    ]),
    resultCard(d, 'Crystal', [
      ['wavelength', 'wavelength_nm', formats.nm],
      ...biaxialRows,
      ['cut of largest walk-off', 'max_walkoff_cut_deg', formats.deg],
      ['dρ/dθ at the cut', 'walkoff_slope', formats.sig('°/°', 3)],
    ]),
    resultCard(d, 'Over the band', [
      ['smallest separation', 'band.min_mm', formats.length],
      ['… at', 'band.min_at_nm', formats.nm],
      ['largest separation', 'band.max_mm', formats.length],
      ['… at', 'band.max_at_nm', formats.nm],
    ], { note: d.band.curve.length < 2 ? 'No band was given: the design wavelength alone.' : null }),
    resultCard(d, 'Sensitivity of the separation', [
      ['to cut tilt', 'sensitivities.tilt_mm_per_deg', formats.sig('mm/°', 4)],
      ['to incidence', 'sensitivities.incidence_mm_per_deg', formats.sig('mm/°', 4)],
      ['to length', 'sensitivities.thickness_mm_per_mm', formats.sig('mm/mm', 4)],
      ['to wavelength', 'sensitivities.wavelength_mm_per_nm', formats.sig('mm/nm', 4)],
      ['linearized spread (1σ)', 'sensitivities.linear_std_mm', formats.sig('mm', 4)],
    ], {
      note: ['For σ = ', dq(d, 'tolerances.tilt_deg', formats.sig('°', 3)), ' cut, ', dq(d, 'tolerances.incidence_deg', formats.sig('°', 3)),
        ' incidence, ', dq(d, 'tolerances.thickness_mm', formats.sig('mm', 3)), ' length, ', dq(d, 'tolerances.wavelength_nm', formats.sig('nm', 3)), ' wavelength.'],
    }),
    monteCarloCard(d, run, 'separation', formats.length, 'mm'),
  ];
  return [headline, ...cards];
}

/**
 * The Monte Carlo summary of `what` (the displacer's `monte_carlo`; the splitter's
 * `split_angle_spread`, or `monte_carlo` where a run in chunks gives it that name), or the state
 * of the run while there is none.
 */
function monteCarloCard(d, run, what, format, unit) {
  const key = mcKey(d);
  const title = `Monte Carlo: ${what}`;
  if (d[key]) {
    return resultCard(d, title, [
      ['samples', `${key}.n`, formats.count],
      ['mean', `${key}.mean`, format],
      ['standard deviation', `${key}.std`, formats.sig(unit, 4)],
      ['5th percentile', `${key}.p5`, format],
      ['95th percentile', `${key}.p95`, format],
      ['smallest', `${key}.min`, format],
      ['largest', `${key}.max`, format],
    ], { className: 'design-mc' });
  }
  let text = 'Not run (0 samples).';
  if (run && run.cancelled) text = `Cancelled after ${run.done} of ${run.total} samples.`;
  else if (run) text = 'Running…';
  return h('article', { className: 'result-card design-mc' }, h('h4', { text: title }), h('p', { className: 'muted', id: 'design-mc-state', text }));
}

/** Where a design holds its Monte Carlo summary. */
export function mcKey(d) {
  return d.kind === 'angular-splitter' && !d.monte_carlo ? 'split_angle_spread' : 'monte_carlo';
}

export function waveplateResults(state, d) {
  const plates = d.plates;
  const mat = designMaterialName(state, plates[0].material);
  const headline = h('p', { className: 'design-headline' });
  // A biaxial plate is cut along a principal axis, its slow in-face axis at the plate's azimuth.
  const cut = d.cut ? `${d.cut}-cut (light along principal ${d.cut})` : null;
  if (plates.length === 1) {
    headline.append(`One ${mat} plate `, dq(d, 'plates.0.thickness_mm', formats.length, 'strong'), cut ? ` thick, ${cut}` : ' thick, optic axis in the face',
      d.order === 'multiple' ? `, order ${d.order_number}` : ', zero order', '.');
  } else {
    headline.append(`Two ${mat} plates, `, dq(d, 'plates.0.thickness_mm', formats.length, 'strong'), ' and ',
      dq(d, 'plates.1.thickness_mm', formats.length, 'strong'), cut ? ` thick, ${cut}, slow axes crossed: a compound zero-order plate.` : ' thick, optic axes in the faces and crossed: a compound zero-order plate.');
  }
  const indexRows = d.cut ? [
    ['cut', 'cut', formats.text],
    ['n of the fast axis', 'no', formats.index],
    ['n of the slow axis', 'ne', formats.index],
    ['n slow − n fast', 'birefringence', formats.sig('', 6)],
  ] : [['nₒ', 'no', formats.index], ['nₑ', 'ne', formats.index], ['nₑ − nₒ', 'birefringence', formats.sig('', 6)]];
  const plateRows = [];
  plates.forEach((p, i) => {
    const n = plates.length > 1 ? ` ${i + 1}` : '';
    plateRows.push([`plate${n}: material`, `plates.${i}.material`, (v) => designMaterialName(state, v)]);
    plateRows.push([`plate${n}: thickness`, `plates.${i}.thickness_mm`, formats.length]);
    plateRows.push([`plate${n}: axis azimuth`, `plates.${i}.axis_azimuth_deg`, formats.deg]);
  });
  const worst = worstPlane(d);
  return [
    headline,
    resultCard(d, 'What to order', [
      ...plateRows,
      ['net retarding thickness', 'effective_thickness_mm', formats.length],
      ['order', 'order', formats.text],
      ['order number', 'order_number', formats.count],
    ], { className: 'design-main', note: d.cut ? dq(d, 'cut_note', formats.text, 'span', { className: 'cut-note' }) : 'Optic axis in the face (tilt 90°); azimuths from e1 toward e2.' }),
    resultCard(d, 'Retardance', [
      ['at the design wavelength', 'retardance_waves', formats.waves],
      ['fast axis', 'fast_axis', formats.text],
      ...indexRows,
      [d.cut ? 'group delay, slow pulse after fast' : 'group delay, axis pulse after across', 'group_delay_ps', formats.delay],
      ...groupIndexRows(d),
    ], { note: d.cut ? 'The slow axis lies at the plate\'s azimuth; the group delay is of the pulse polarized along it.' : 'Signed: positive when the optic axis is the slow axis; the group delay likewise, for the pulse polarized along it.' }),
    resultCard(d, 'Angle of incidence', [
      ['acceptance (worst plane)', 'acceptance_deg', formats.angle],
      ...d.angular.map((a, i) => [`plane at ${trimmed(a.plane_azimuth_deg, 2)}° to the axis`, `angular.${i}.acceptance_deg`, formats.angle]),
    ], {
      note: `Largest incidence up to which the retardance stays within the acceptance error of its value at normal incidence; the worst plane is at ${trimmed(worst.plane_azimuth_deg, 2)}° to the optic axis. “≥” marks a bound: the retardance had not left by the largest incidence computed.`,
    }),
  ];
}

export function worstPlane(d) {
  return d.angular.reduce((a, b) => (b.acceptance_deg < a.acceptance_deg ? b : a), d.angular[0]);
}

/** What lies in a pair's faces: optic axes, or principal axes once a plate is biaxial. */
const axesWord = (d) => (d.plates.some((p) => p.cut) ? 'axes' : 'optic axes');

/**
 * A pair of plates of two crystals (achromat, athermal pair): the headline naming both with their
 * thicknesses and axes (`tail` ends it), and the order card's rows (`thickness` labels each).
 */
function platePair(state, d, tail, thickness) {
  const p = d.plates;
  // A biaxial plate is cut along a principal axis, its slow in-face axis at the plate's azimuth.
  const axis = (q) => `${q.cut ? `${q.cut}-cut, slow ` : ''}axis ${q.axis_azimuth_deg === 90 ? 'crossed (90°)' : 'at 0°'}`;
  const headline = h(
    'p',
    { className: 'design-headline' },
    `${article(designMaterialName(state, p[0].material))} plate `,
    dq(d, 'plates.0.thickness_mm', formats.length, 'strong'),
    ` thick, ${axis(p[0])}, and ${article(designMaterialName(state, p[1].material), false)} plate `,
    dq(d, 'plates.1.thickness_mm', formats.length, 'strong'),
    ` thick, ${axis(p[1])}; ${tail}`,
  );
  return { headline, rows: plateRows(state, d, thickness) };
}

/** The order card's rows of every plate of `d.plates`: material, thickness (`thickness` labels it), axis. */
function plateRows(state, d, thickness) {
  return d.plates.flatMap((p, i) => [
    [`plate ${i + 1}: material`, `plates.${i}.material`, (v) => designMaterialName(state, v)],
    ...(p.cut ? [[`plate ${i + 1}: principal axis along the beam`, `plates.${i}.cut`, formats.text]] : []),
    [`plate ${i + 1}: ${thickness}`, `plates.${i}.thickness_mm`, formats.length],
    [`plate ${i + 1}: ${p.cut ? 'slow axis azimuth' : 'axis azimuth'}`, `plates.${i}.axis_azimuth_deg`, formats.deg],
  ]);
}

export function achromatResults(state, d) {
  const { headline, rows } = platePair(state, d, `${axesWord(d)} in the faces.`, 'thickness');
  return [
    headline,
    resultCard(d, 'What to order', rows, { className: 'design-main' }),
    resultCard(d, 'Retardance', [
      ['first design wavelength', 'at_design_wavelengths.0.0', formats.nm],
      ['… retardance there', 'at_design_wavelengths.0.1', formats.waves],
      ['second design wavelength', 'at_design_wavelengths.1.0', formats.nm],
      ['… retardance there', 'at_design_wavelengths.1.1', formats.waves],
      ['largest error over the band', 'max_error_waves', formats.waves],
    ]),
  ];
}

/**
 * The athermal waveplate pair (src/design/athermal.rs): its two plates (thicknesses as made at
 * 20 °C, a crossed second plate at 90°), the retardance at the design temperature, the curvature
 * left and the temperature band, against a zero-order plate of the first crystal alone.
 */
export function athermalResults(state, d) {
  const { headline, rows } = platePair(state, d, `${axesWord(d)} in the faces, thicknesses as made at 20${NBSP}°C.`, 'thickness at 20 °C');
  return [
    headline,
    resultCard(d, 'What to order', rows, { className: 'design-main' }),
    resultCard(d, 'Against temperature', [
      ['retardance at the design temperature', 'retardance_waves', formats.waves],
      ['change per kelvin', 'temperature.retardance_per_kelvin_waves', formats.sig('waves/K', 3)],
      ['curvature left, d²Γ/dT²', 'curvature_waves_per_k2', formats.sig('waves/K²')],
      ['band from', 'temperature.band_c.0', formats.celsius],
      ['band to', 'temperature.band_c.1', formats.celsius],
    ], { note: `The band keeps the retardance within ±${d.acceptance_error_waves} waves of its value at the design temperature; “≤”/“≥” mark the contract's limits, −200 and 500 °C, where the band may reach further.` }),
    resultCard(d, 'A zero-order plate alone', [
      ['material', 'single_plate.material', (v) => designMaterialName(state, v)],
      ['thickness', 'single_plate.thickness_mm', formats.length],
      ['change per kelvin', 'single_plate.temperature.retardance_per_kelvin_waves', formats.sig('waves/K', 3)],
      ['band from', 'single_plate.temperature.band_c.0', formats.celsius],
      ['band to', 'single_plate.temperature.band_c.1', formats.celsius],
    ], { note: 'For comparison: the first crystal alone, giving the same retardance.' }),
  ];
}

/** The words and unit of a change per kelvin from its name (`separation_um`: separation, µm). */
function perKelvinWords(key) {
  const units = [['_um', 'µm'], ['_mm', 'mm'], ['_deg', '°'], ['_waves', 'waves'], ['_rad', 'rad'], ['_nm', 'nm']];
  for (const [suffix, unit] of units) {
    if (key.endsWith(suffix)) return [key.slice(0, -suffix.length).replace(/_/g, ' '), unit];
  }
  return [key.replace(/_/g, ' '), ''];
}

/**
 * The design's Temperature card, for every kind: the temperature it is designed to work at, the
 * lengths there (`*_at_temperature_mm`) and each figure's change per kelvin
 * (`temperature.per_kelvin`; DEVELOPERS.md, "Design requests"), or null when the design has none.
 */
export function temperatureCard(d) {
  const t = d.temperature;
  if (!t || typeof t.design_temperature_c !== 'number') return null;
  const rows = [['designed for', 'temperature.design_temperature_c', formats.celsius]];
  if (t.design_temperature_c !== 20) {
    for (const k of Object.keys(d).filter((x) => x.endsWith('_at_temperature_mm'))) {
      const name = k.slice(0, -'_at_temperature_mm'.length).replace(/_/g, ' ');
      // A pair of prisms or wedges: one row each.
      if (Array.isArray(d[k])) d[k].forEach((_, i) => rows.push([`${name} ${i + 1} there`, `${k}.${i}`, formats.length]));
      else rows.push([`${name} there`, k, formats.length]);
    }
    (d.plates ?? []).forEach((_, i) => rows.push([`plate ${i + 1} thickness there`, `plates.${i}.thickness_at_temperature_mm`, formats.length]));
  }
  for (const k of Object.keys(t.per_kelvin ?? {})) {
    const [name, unit] = perKelvinWords(k);
    rows.push([`${name} per kelvin`, `temperature.per_kelvin.${k}`, formats.sig(`${unit}/K`)]);
  }
  return resultCard(d, 'Temperature', rows, {
    note: 'Lengths are given as made at 20 °C; the changes are central differences of the exact model over ±1 K.',
  });
}

export function recombinerResults(state, d) {
  const overlapOk = d.overlap >= state.design.limits.recombiner_min_overlap;
  const phaseOk = Math.abs(d.phase_difference_rad) <= state.design.limits.recombiner_max_phase_rad;
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
  const unreachable = (path) => Math.abs(valueAt(d, path)) > 90;
  const notes = [];
  if (unreachable('tilt_mismatch_to_break_deg.0') || unreachable('tilt_mismatch_to_break_deg.1')) {
    notes.push('A cut mismatch above 90° is a linear extrapolation beyond any real cut: at the cut of largest walk-off the residual grows only to second order in the mismatch, which the linear estimate does not see.');
  }
  return [
    headline,
    resultCard(d, 'Recombination', [
      ['one spot', 'recombined', formats.yes],
      ['overlap of the beams', 'overlap', formats.fraction],
      ['phase difference', 'phase_difference_rad', formats.rad],
      ['power in the spot', 'recombined_power', formats.power],
      ['power elsewhere', 'stray_power', formats.power],
    ], { className: 'design-main', note: 'It breaks when the overlap drops below 0.99 or the phase moves by more than π/10.' }),
    resultCard(d, 'Residual separation', [
      ['length', 'residual_separation_mm', formats.length],
      ['x', 'residual_vector_mm.0', formats.length],
      ['y', 'residual_vector_mm.1', formats.length],
    ]),
    resultCard(d, 'Sensitivity to a mismatch', [
      ['residual per length', 'length_sensitivity.0', formats.sig('mm/mm', 4)],
      ['phase per length', 'length_sensitivity.1', formats.sig('rad/mm', 4)],
      ['residual per cut', 'tilt_sensitivity.0', formats.sig('mm/°', 4)],
      ['phase per cut', 'tilt_sensitivity.1', formats.sig('rad/°', 4)],
    ]),
    resultCard(d, 'Mismatch that breaks it', [
      ['length, for the overlap', 'length_mismatch_to_break_mm.0', formats.sig('mm', 4)],
      ['length, for the phase', 'length_mismatch_to_break_mm.1', formats.sig('mm', 4)],
      ['cut, for the overlap', 'tilt_mismatch_to_break_deg.0', formats.sig('°', 4)],
      ['cut, for the phase', 'tilt_mismatch_to_break_deg.1', formats.sig('°', 4)],
    ], { note: notes.length ? notes : 'Linear estimates from the sensitivities.' }),
  ];
}

/** Index of the smallest (sign -1: largest) entry of a list. */
function extremeAt(list, sign = 1) {
  return list.reduce((best, v, i) => (sign * v < sign * list[best] ? i : best), 0);
}

/** The part's material as the design names it (its scenario's first element). */
function partMaterial(state, d) {
  return designMaterialName(state, d.scenario?.elements?.[0]?.material ?? 'custom');
}

/** The card of a curve over the band (`d.band.wavelength_nm` against `d.band[key]`, in
 * degrees): its ends and where `what` is smallest and largest. */
function bandCard(d, what, key) {
  const b = d.band;
  const [lo, hi] = [extremeAt(b[key]), extremeAt(b[key], -1)];
  const last = b.wavelength_nm.length - 1;
  return resultCard(d, 'Over the band', [
    ['from', 'band.wavelength_nm.0', formats.nm],
    ['to', `band.wavelength_nm.${last}`, formats.nm],
    [`smallest ${what}`, `band.${key}.${lo}`, formats.deg],
    ['… at', `band.wavelength_nm.${lo}`, formats.nm],
    [`largest ${what}`, `band.${key}.${hi}`, formats.deg],
    ['… at', `band.wavelength_nm.${hi}`, formats.nm],
  ]);
}

export function splitterResults(state, d, run) {
  const t = d.tolerances;
  return [
    h('p', { className: 'design-headline' },
      `Two ${partMaterial(state, d)} wedges with crossed optic axes, ${d.contact === 'cement' ? 'cemented' : 'optically contacted'}, each with a wedge angle of `,
      dq(d, 'wedge_angle_deg', formats.deg, 'strong'), ': the two beams leave ', dq(d, 'split_angle_deg', formats.deg, 'strong'), ' apart.'),
    resultCard(d, 'What to order', [
      ['wedge angle', 'wedge_angle_deg', formats.deg],
      ['wedge 1, on its axis', 'thickness_mm.0', formats.length],
      ['wedge 2, on its axis', 'thickness_mm.1', formats.length],
      ['thin edge', 'edge_thickness_mm', formats.length],
      ['clear aperture', 'clear_aperture_mm', formats.length],
      ['joined by', 'contact', (v) => (v === 'cement' ? 'cement' : 'optical contact')],
    ], { className: 'design-main', note: 'Optic axes in the faces, along x in the first wedge and along y in the second.' }),
    resultCard(d, 'Beams', [
      ['split angle', 'split_angle_deg', formats.deg],
      ['wedge by the small-angle rule', 'small_angle_wedge_deg', formats.deg],
      ...d.beams.flatMap((beam, i) => [
        [`beam ${beam.label} (along ${beam.polarization}): deviation`, `beams.${i}.deviation_deg`, formats.deg],
        [`beam ${beam.label}: power`, `beams.${i}.power`, formats.power],
      ]),
    ], { note: 'Deviations toward +x; the small-angle rule is 2·arcsin((nₑ − nₒ)·tan α).' }),
    bandCard(d, 'split', 'split_angle_deg'),
    resultCard(d, 'Tolerances (one standard deviation)', [
      ['wedge angle', 'tolerances.wedge_deg', formats.sig('°', 3)],
      ['optic axis about the beam', 'tolerances.axis_deg', formats.sig('°', 3)],
      ['incidence', 'tolerances.incidence_deg', formats.sig('°', 3)],
    ], { note: t.axis_deg > 0 ? 'The axis error is drawn for each wedge on its own.' : null }),
    monteCarloCard(d, run, 'split angle', formats.deg, '°'),
  ];
}

export function polarizerResults(state, d, run, request) {
  const gap = typeof request.cement_index === 'number' ? 'a thin cement layer' : 'a thin air gap';
  const edge = (side) => [
    [`${side} edge, traced`, `${side}_edge.incidence_deg`, formats.deg],
    ['… from the critical angle', `${side}_edge.closed_form_deg`, formats.deg],
    ['… just inside: passed', `${side}_edge.inside.passed`, formats.power],
    ['… just inside: leaked', `${side}_edge.inside.leaked`, formats.power],
    ['… just inside: extinction', `${side}_edge.inside.extinction`, formats.sig('', 3)],
    ['… just outside: extinction', `${side}_edge.outside.extinction`, formats.sig('', 3)],
  ];
  return [
    h('p', { className: 'design-headline' },
      `Two ${partMaterial(state, d)} prisms across ${gap}, prism angle `, dq(d, 'prism_angle_deg', formats.deg, 'strong'),
      `: the ${d.passed_mode}-ray passes from `, dq(d, 'half_field_deg.0', formats.deg, 'strong'), ' below to ',
      dq(d, 'half_field_deg.1', formats.deg, 'strong'), ` above the normal; the ${d.reflected_mode}-ray is reflected at the gap.`),
    resultCard(d, 'What to order', [
      ['prism angle', 'prism_angle_deg', formats.deg],
      ['prism 1, on its axis', 'thickness_mm.0', formats.length],
      ['prism 2, on its axis', 'thickness_mm.1', formats.length],
      ['thin edge', 'edge_thickness_mm', formats.length],
      ['clear aperture', 'clear_aperture_mm', formats.length],
      ['index of the gap', 'gap_index', formats.sig('', 6)],
    ], { className: 'design-main', note: 'The gap is tilted by the prism angle from the entrance face; optic axes in the faces along y.' }),
    resultCard(d, 'Field of view', [
      ['half-angle below the normal', 'half_field_deg.0', formats.deg],
      ['half-angle above the normal', 'half_field_deg.1', formats.deg],
      [`critical angle at the gap, ${d.reflected_mode}-ray`, 'critical_angles_deg.0', formats.deg],
      [`critical angle at the gap, ${d.passed_mode}-ray`, 'critical_angles_deg.1', formats.deg],
      ['at normal incidence: passed', 'normal.passed', formats.power],
      ['at normal incidence: extinction', 'normal.extinction', formats.sig('', 3)],
    ], { note: 'Incidence in the plane of the gap tilt.' }),
    resultCard(d, 'Transmission at the edges', [...edge('lower'), ...edge('upper')], {
      note: 'Uncoated faces, light polarized along each mode; extinction = leaked ÷ passed, “—” where nothing passes.',
    }),
  ];
}

export function tiltResults(state, d) {
  // A biaxial plate is cut along a principal axis and has no optic axis in its faces: its fast
  // in-face principal axis (the f-wave's polarization) at `fast_axis_azimuth_deg`, its slow one
  // at `axis_azimuth_deg`.
  const axisRows = d.cut ? [
    ['cut', 'cut', formats.text],
    [`fast axis, principal ${d.fast_principal_axis} (azimuth in the faces)`, 'fast_axis_azimuth_deg', formats.deg],
    [`slow axis, principal ${d.slow_principal_axis} (azimuth in the faces)`, 'axis_azimuth_deg', formats.deg],
  ] : [['optic axis azimuth (in the faces)', 'scenario.elements.0.axis.azimuth_deg', formats.deg]];
  const sign = d.cut
    ? { note: `Positive when the s-wave, polarized along principal ${d.slow_principal_axis}, lags the f-wave along principal ${d.fast_principal_axis} (as untilted).` }
    : {};
  return [
    h('p', { className: 'design-headline' },
      `Tilt the ${partMaterial(state, d)} plate, `, dq(d, 'thickness_mm', formats.length, 'strong'),
      d.cut ? ` thick, ${d.cut}-cut (light along principal ${d.cut}; fast axis principal ${d.fast_principal_axis}), by ` : ' thick, by ',
      dq(d, 'tilt_deg', formats.deg, 'strong'), ' in its mount: its retardance goes from ',
      dq(d, 'normal_retardance_waves', formats.waves, 'strong'), ' untilted to ', dq(d, 'retardance_waves', formats.waves, 'strong'), '.'),
    resultCard(d, 'What to order and set', [
      ['plate thickness', 'thickness_mm', formats.length],
      ...axisRows,
      ['mount tilt', 'tilt_deg', formats.deg],
      ['plane of the tilt', 'scenario.elements.0.mount.azimuth_deg', formats.deg],
    ], { className: 'design-main', note: d.cut ? ['Azimuths from x toward y. ', dq(d, 'cut_note', formats.text, 'span', { className: 'cut-note' })] : 'Azimuths from x toward y.' }),
    resultCard(d, 'Retardance', [
      ['at the tilt', 'retardance_waves', formats.waves],
      ['whole waves beyond the target', 'order', formats.count],
      ['untilted', 'normal_retardance_waves', formats.waves],
      ['per degree of tilt', 'sensitivity_waves_per_deg', formats.sig('waves/°', 4)],
    ], sign),
  ];
}

/** The quartz rotator: a c-cut quartz plate of one hand (src/design/rotator.rs). */
export function rotatorResults(state, d) {
  const turns = d.half_turns_added !== 0;
  return [
    h('p', { className: 'design-headline' },
      `A ${d.handedness}-handed c-cut quartz plate `, dq(d, 'thickness_mm', formats.length, 'strong'), ' thick turns linear light by ',
      dq(d, 'rotation_deg', formats.deg, 'strong'), ' at ', dq(d, 'wavelength_nm', formats.nm, 'strong'), '; it stays within the tolerances up to ',
      dq(d, 'acceptance_deg', formats.angle, 'strong'), ' of incidence.'),
    resultCard(d, 'What to order', [
      ['crystal', 'handedness', (v) => `${v}-handed quartz`],
      ['thickness', 'thickness_mm', formats.length],
      ['thickness tolerance (±)', 'thickness_tolerance_mm', formats.sig('mm', 3)],
    ], { className: 'design-main', note: 'c-cut: the optic axis along the face normal.' }),
    resultCard(d, 'Rotation', [
      ['requested', 'requested_rotation_deg', formats.deg],
      ['of the plate', 'rotation_deg', formats.deg],
      turns ? ['half turns added', 'half_turns_added', formats.count] : null,
      ['by the exact trace', 'traced_rotation_deg', formats.deg],
      ['rotatory power', 'rotatory_power_deg_per_mm', formats.sig('°/mm', 5)],
      ['dθ/dλ', 'dispersion_deg_per_nm', formats.sig('°/nm', 4)],
    ], { note: 'From x toward y. The rotatory power is from the catalogue\'s cited formula (g11 = 0, stated); dθ/dT (Temperature card) carries its measured change with temperature and the plate\'s expansion.' }),
    bandCard(d, 'rotation', 'rotation_deg'),
    resultCard(d, 'Acceptance', [
      ['angle of incidence', 'acceptance_deg', formats.angle],
      ['set by', 'acceptance_limited_by', (v) => (v === 'ellipticity' ? 'the ellipticity' : 'the rotation error')],
      ['rotation tolerance', 'rotation_tolerance_deg', formats.sig('°', 3)],
      ['ellipticity tolerance', 'ellipticity_tolerance_deg', formats.sig('°', 3)],
    ], { note: 'Every linear input, any plane of incidence, by the exact trace: off the axis the plate turns birefringent within a degree or so.' }),
  ];
}

/**
 * The birefringent filter (src/design/filter.rs): its plates and polarizers, the pass band met
 * against the one asked, the neighbouring peaks and the centre's drift with temperature.
 */
export function filterResults(state, d) {
  const p = d.plates;
  // A biaxial crystal's plates are all cut along one principal axis, the slow in-face axis at
  // each plate's azimuth.
  const cut = d.cut ? ` ${d.cut}-cut (light along principal ${d.cut})` : '';
  const headline = h(
    'p',
    { className: 'design-headline' },
    `${p.length} ${designMaterialName(state, d.scenario.elements[1]?.material ?? 'custom')} plates,${cut ? `${cut},` : ''} the thinnest `,
    dq(d, 'plates.0.thickness_mm', formats.length, 'strong'),
    d.layout === 'folded' ? ' each, between crossed polarizers; pass band ' : ' and each next one twice as thick, each behind a polarizer parallel to the first; pass band ',
    dq(d, 'fwhm_nm', formats.nm, 'strong'),
    ' wide.',
  );
  const rows = p.map((_, i) => [`plate ${i + 1}`, `plates.${i}.thickness_mm`, formats.length]);
  p.forEach((_, i) => rows.push([`plate ${i + 1}: ${d.cut ? 'slow axis azimuth' : 'axis azimuth'}`, `plates.${i}.axis_azimuth_deg`, formats.deg]));
  const biaxialRows = d.cut ? [
    ['principal axis along the beam', 'cut', formats.text],
    ...['x', 'y', 'z'].map((a, k) => [`n${a}`, `principal_indices.${k}`, formats.index]),
  ] : [];
  return [
    headline,
    resultCard(d, 'What to order', [...biaxialRows, ...rows, ['crystal in all', 'total_thickness_mm', formats.length]], {
      className: 'design-main',
      note: d.cut ? [dq(d, 'cut_note', formats.text, 'span', { className: 'cut-note' }), ' The polarizers are in the order sheet.'] : 'Optic axes in the faces; the polarizers are in the order sheet.',
    }),
    resultCard(d, 'Pass band', [
      ['centre', 'wavelength_nm', formats.nm],
      ['width met (FWHM)', 'fwhm_nm', formats.nm],
      ['width asked', 'bandwidth_nm', formats.nm],
      ['thinnest plate\'s order', 'order', formats.count],
      ['peak transmission', 'peak_transmission', formats.fraction],
      ['next peak, shorter', 'neighbour_peaks_nm.0', formats.nm],
      ['next peak, longer', 'neighbour_peaks_nm.1', formats.nm],
      ['next order down: width', 'neighbour_orders_fwhm_nm.0', formats.nm],
      ['next order up: width', 'neighbour_orders_fwhm_nm.1', formats.nm],
      ['centre drift', 'centre_shift_nm_per_k', formats.sig('nm/K', 3)],
    ], { note: 'Orders are whole, so the width met is the nearest the filter can give; peak transmission of light along the first polarizer.' }),
  ];
}

/**
 * The broadband retarder (src/design/broadband.rs): its plates, the worst departures over the
 * band beside the classic design and a single plate, and how the search ran.
 */
export function broadbandResults(state, d) {
  const p = d.plates;
  const headline = h(
    'p',
    { className: 'design-headline' },
    `${p.length} plates whose stack holds ${trimmed(d.target_retardance_waves, 4)} waves within `,
    dq(d, 'departures.retardance_waves', formats.sig('waves', 3), 'strong'),
    ` from ${trimmed(d.band_nm[0], 2)} to ${trimmed(d.band_nm[1], 2)}${NBSP}nm.`,
  );
  const rows = plateRows(state, d, 'thickness');
  const departures = (path) => [
    ['retardance within ±', `${path}.retardance_waves`, formats.sig('waves', 3)],
    ['fast axis within ±', `${path}.fast_axis_deg`, formats.sig('°', 3)],
    ['rotation up to', `${path}.rotation_deg`, formats.sig('°', 3)],
  ];
  const cards = [
    headline,
    resultCard(d, 'What to order', rows, { className: 'design-main', note: `Plates stacked in this order, ${axesWord(d)} in the faces${d.plates.some((q) => q.cut) ? ' (a biaxial plate\'s slow axis at its azimuth)' : ''}.` }),
    resultCard(d, 'Over the band', departures('departures'), { note: 'The stack as one equivalent retarder; a half-wave target reports no rotation (a rotation and a turn of the axis are then the same).' }),
  ];
  if (d.classic) cards.push(resultCard(d, 'The classic design', departures('classic.departures'), { note: d.classic.name }));
  cards.push(resultCard(d, 'A single zero-order plate', departures('single_plate.departures')));
  cards.push(resultCard(d, 'Search', [
    ['method', 'search.method', formats.text],
    ['candidates', 'search.population', formats.count],
    ['generations', 'search.generations', formats.count],
    ['seed', 'search.seed', formats.count],
  ]));
  return cards;
}

/**
 * The liquid-crystal cell's voltage (src/design/lc.rs): the RMS voltage that gives the target
 * retardance, the slope there, the threshold and the span from 0 V to the highest voltage, and
 * the thinnest cell spanning a retardance range when one was asked.
 */
export function lcResults(state, d) {
  const headline = h(
    'p',
    { className: 'design-headline' },
    'Drive the cell at ',
    dq(d, 'voltage_v', formats.sig('V RMS', 5), 'strong'),
    ` for ${trimmed(d.requested_retardance_waves, 4)} waves at ${trimmed(d.wavelength_nm, 2)}${NBSP}nm.`,
  );
  const cards = [
    headline,
    resultCard(d, 'At the voltage', [
      ['voltage (RMS)', 'voltage_v', formats.sig('V', 6)],
      ['retardance there', 'retardance_waves', formats.waves],
      ['slope', 'slope_waves_per_v', formats.sig('waves/V', 4)],
      ['threshold', 'threshold_voltage_v', formats.sig('V', 4)],
      ['at 0 V', 'retardance_span_waves.0', formats.waves],
      ['at the highest voltage', 'retardance_span_waves.1', formats.waves],
    ], { className: 'design-main', note: 'Retardance at normal incidence, (1/λ)∫(n_eff − n_o)dz over the solved director.' }),
  ];
  if (d.range) {
    cards.push(resultCard(d, 'A cell for the range', [
      ['range from', 'range.range_waves.0', formats.waves],
      ['range to', 'range.range_waves.1', formats.waves],
      ['thinnest cell gap', 'range.thickness_um', formats.sig('µm', 5)],
      ['it spans', 'range.spans_range', formats.yes],
    ], { note: 'Same nematic, rubbing, twist and pretilt; at a fixed voltage the retardance scales with the gap.' }));
  }
  return cards;
}
