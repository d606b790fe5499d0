// Doublespar page: the results as text, in #element-results (a card per element), #ray-rows,
// #spot-rows, #summary and the warnings list. Every shown number carries data-quantity = its path
// into the result (DEVELOPERS.md, "Page contract") and data-value = String(value); the text is
// rounded, with its unit.
//
// Per ray also its deviation and screen position; per crystal its split angle; the rejected
// rays in #rejected-rows and, summed up, #rejected-note.
//
// Contract: setupResults(state) once, then renderResults(state, r) after every trace; `state` is
// the page's state (state.js), whose part `state.results` this module keeps. The rows
// are built again only when the result's shape changes (element kinds, ray labels, spot count,
// what is shown of the long tables); otherwise a cell's text and data-value are written only
// when its value changed. The ray and spot tables show ROW_LIMIT rows and a "show all" button
// (data-show-all="rays" or "spots"), whose click the page answers with toggleShowAll(state, which) and
// a new render.
//
// Numbers follow format.js (the core's rules): each table writes its positions in one length
// unit, chosen from its largest position (no "1.00 mm" beside "998 µm"); a ray or spot below
// NO_POWER reads "no power"; circular light shows no azimuth ("—", the title says why).

import { h } from './dom.js';
import { fixed, fmt, lengthIn, lengthUnitForValues, showsAzimuth, significant } from './format.js';
import { materialName } from './state.js';

const ROW_LIMIT = 64; // rows of the ray and spot tables shown before "show all" (6 crystals)
const RAY_COLUMNS = 11;


function positionsUnit(items, key) {
  const values = [];
  for (const x of items) values.push(x[key][0], x[key][1]);
  return lengthUnitForValues(values);
}

/** A position in the table's unit; below 1 pm (rounding of a zero) it is 0. */
function positionIn(units, table) {
  return (v) => (v === null || v === undefined ? '—' : lengthIn(Math.abs(v) < 1e-9 ? 0 : v, units[table], 5));
}

/** Whether the item `pick(r)` is circular light, whose azimuth means nothing. */
function circular(pick) {
  return (r) => !showsAzimuth(pick(r).ellipse.ellipticity_deg);
}

/**
 * The maker of result cells into `cells`: `cell(tag, path, get, format, attrs, keyOf)`, with
 * `get(r)` its value (data-value), `format(v, r)` its text. `keyOf(r)`, when given, names what
 * else the text depends on (a table's unit, whether the light is circular).
 */
function cellMaker(cells) {
  return (tag, path, get, format, attrs, keyOf) => {
    const el = h(tag, { 'data-quantity': path, ...(attrs ?? {}) });
    cells.push({ el, get, format, keyOf, last: undefined });
    return el;
  };
}

function shapeOf(r, showAll) {
  const parts = [
    // A crystal's rows depend on its letters and on whether it is optically active.
    // So do its dispersion-source rows (none for fixed indices; the spread only where two
    // sources hold the wavelength).
    r.elements.map((e) => `${e.kind}${e.f !== undefined ? ':fs' : ''}${e.rotatory_power_deg_per_mm !== undefined ? ':active' : ''}${e.source !== undefined ? ':source' : ''}${e.source_spread !== undefined ? ':spread' : ''}`).join(','),
    r.rays.map((x) => x.label).join(','),
    r.spots.length,
    (r.rejected ?? []).map((x) => `${x.label}@${x.element}`).join(','),
    showAll.rays,
    showAll.spots,
    r.air_wavelength_nm !== undefined,
    Boolean(r.spectrum?.white_light),
  ];
  return parts.join('|');
}

/** The white-light colour in words: sRGB, chromaticity and luminous transmittance. */
function whiteLightWords(w) {
  const where = w.chromaticity ? `x ${fixed(w.chromaticity[0], 4)}, y ${fixed(w.chromaticity[1], 4)}` : 'black';
  return `${w.srgb}${w.outside_srgb ? ' (outside sRGB)' : ''}, ${where}, luminous transmittance ${fixed(w.xyz[1], 4)}`;
}

/** A last table row saying how many rows are hidden, with a button to show them all. */
function moreRow(which, shown, total, colspan, showAll) {
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
function appendPolarizationCells(cell, tr, p, pick) {
  const isCircular = circular(pick);
  const azimuth = (v, r) => (isCircular(r) ? '—' : fmt.ellipseDeg(v));
  tr.appendChild(cell('td', `${p}.ellipse.azimuth_deg`, (x) => pick(x).ellipse.azimuth_deg, azimuth, {}, (r) => String(isCircular(r))));
  tr.appendChild(cell('td', `${p}.ellipse.ellipticity_deg`, (x) => pick(x).ellipse.ellipticity_deg, fmt.ellipseDeg));
  tr.appendChild(cell('td', `${p}.ellipse.handedness`, (x) => pick(x).ellipse.handedness, fmt.text, { className: 'word' }));
  tr.appendChild(cell('td', `${p}.degree_of_polarization`, (x) => pick(x).degree_of_polarization, fmt.dop));
}

/** How far a crystal's published sources disagree at the wavelength: the largest index spread
 * and the birefringence spread, with the sources compared; a dash with one source. */
function sourceSpread(v) {
  if (!v || !Array.isArray(v.indices)) return '—';
  const largest = Math.max(...v.indices);
  const which = v.indices.length === 3 ? 'nz − nx' : 'nₑ − nₒ';
  return `${significant(largest, 2)} in n, ${significant(v.birefringence, 2)} in ${which} (${v.sources.join(', ')})`;
}

/** A crystal report's two mode letters: ['f', 's'] for a biaxial crystal, ['o', 'e'] otherwise. */
export function modeLetters(e) {
  return e && e.f !== undefined ? ['f', 's'] : ['o', 'e'];
}

/** A spot's rays as labels; past four, the first two and a count (a spot may hold 4096 rays). */
const spotRays = (v) => fmt.labels(Array.isArray(v) && v.length > 4 ? [v[0], v[1], `… ${v.length} rays`] : v);

function buildResults(state, r) {
  const { showAll, units } = state.results;
  state.results.cells = [];
  const cell = cellMaker(state.results.cells);
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
      title.appendChild(cell('span', `${p}.material`, (x) => x.elements[i].material, (v) => (v === 'custom' ? 'crystal, custom indices' : `${materialName(state, v)} crystal`)));
      // A biaxial crystal's modes are f (fast) and s (slow), a uniaxial one's o and e.
      const [a, b] = modeLetters(e);
      if (a === 'f') {
        row('nx', `${p}.nx`, (x) => x.elements[i].nx, fmt.index);
        row('ny', `${p}.ny`, (x) => x.elements[i].ny, fmt.index);
        row('nz', `${p}.nz`, (x) => x.elements[i].nz, fmt.index);
        row('angle between the optic axes (2V)', `${p}.optic_axis_angle_deg`, (x) => x.elements[i].optic_axis_angle_deg, fmt.deg);
      } else {
        row('nₒ', `${p}.no`, (x) => x.elements[i].no, fmt.index);
        row('nₑ', `${p}.ne`, (x) => x.elements[i].ne, fmt.index);
      }
      if (e.rotatory_power_deg_per_mm !== undefined) {
        row('rotatory power along the axis', `${p}.rotatory_power_deg_per_mm`, (x) => x.elements[i].rotatory_power_deg_per_mm, (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4)}°/mm`));
      }
      if (e.source !== undefined) row('dispersion source', `${p}.source`, (x) => x.elements[i].source, fmt.text);
      if (e.source_spread !== undefined) {
        row('sources disagree by', `${p}.source_spread.birefringence`, (x) => x.elements[i].source_spread?.birefringence, (v, x) => sourceSpread(x.elements[i].source_spread));
      }
      row('thickness at temperature', `${p}.thickness_at_temperature_mm`, (x) => x.elements[i].thickness_at_temperature_mm, (v) => (v === null || v === undefined ? '—' : `${fixed(v, 6)} mm`));
      row(`${a}-wave index`, `${p}.${a}.index`, (x) => x.elements[i][a]?.index, fmt.index);
      row(`${b}-wave index`, `${p}.${b}.index`, (x) => x.elements[i][b]?.index, fmt.index);
      row(`${a} walk-off`, `${p}.${a}.walkoff_deg`, (x) => x.elements[i][a]?.walkoff_deg, fmt.deg);
      row(`${b} walk-off`, `${p}.${b}.walkoff_deg`, (x) => x.elements[i][b]?.walkoff_deg, fmt.deg);
      row(`${a}/${b} separation`, `${p}.separation_mm`, (x) => x.elements[i].separation_mm, fmt.mm);
      row('split angle', `${p}.split_angle_deg`, (x) => x.elements[i].split_angle_deg, fmt.deg);
      row('retardance', `${p}.retardance_rad`, (x) => x.elements[i].retardance_rad, fmt.rad);
      row('retardance', `${p}.retardance_waves`, (x) => x.elements[i].retardance_waves, fmt.waves);
      row(`${a} group index`, `${p}.${a}.group_index`, (x) => x.elements[i][a]?.group_index, fmt.index);
      row(`${b} group index`, `${p}.${b}.group_index`, (x) => x.elements[i][b]?.group_index, fmt.index);
      row(`group delay, ${b} after ${a}`, `${p}.group_delay_ps`, (x) => x.elements[i].group_delay_ps, fmt.delay);
      row('reflected power', `${p}.reflected_power`, (x) => x.elements[i].reflected_power, fmt.power);
      if (a === 'o') {
        row('largest walk-off', `${p}.max_walkoff_deg`, (x) => x.elements[i].max_walkoff_deg, fmt.deg);
        row('… at a cut of', `${p}.max_walkoff_cut_deg`, (x) => x.elements[i].max_walkoff_cut_deg, fmt.deg);
      }
      row(`${a} mode`, `${p}.${a}.status`, (x) => x.elements[i][a]?.status, fmt.text);
      row(`${b} mode`, `${p}.${b}.status`, (x) => x.elements[i][b]?.status, fmt.text);
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
    } else if (e.kind === 'lc_cell') {
      title.appendChild(document.createTextNode('liquid-crystal cell'));
      row('retardance', `${p}.retardance_waves`, (x) => x.elements[i].retardance_waves, fmt.waves);
      row('threshold voltage', `${p}.threshold_voltage_v`, (x) => x.elements[i].threshold_voltage_v, (v) => (v === null || v === undefined ? '—' : `${fixed(v, 4)} V`));
      row('mid-plane tilt', `${p}.director_profile.tilt_deg`, (x) => { const t = x.elements[i].director_profile.tilt_deg; return t[Math.floor(t.length / 2)]; }, fmt.deg);
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
    const rayUnit = () => units.rays.symbol;
    tr.appendChild(cell('td', `${p}.exit_position_mm.0`, (x) => x.rays[k].exit_position_mm[0], positionIn(units, 'rays'), {}, rayUnit));
    tr.appendChild(cell('td', `${p}.exit_position_mm.1`, (x) => x.rays[k].exit_position_mm[1], positionIn(units, 'rays'), {}, rayUnit));
    tr.appendChild(cell('td', `${p}.deviation_deg`, (x) => x.rays[k].deviation_deg, fmt.deg));
    const screenUnit = () => units.screen.symbol;
    tr.appendChild(cell('td', `${p}.screen_position_mm.0`, (x) => x.rays[k].screen_position_mm[0], positionIn(units, 'screen'), {}, screenUnit));
    tr.appendChild(cell('td', `${p}.screen_position_mm.1`, (x) => x.rays[k].screen_position_mm[1], positionIn(units, 'screen'), {}, screenUnit));
    appendPolarizationCells(cell, tr, p, (x) => x.rays[k]);
    rayRows.appendChild(tr);
  });
  if (r.rays.length === 0) {
    rayRows.appendChild(h('tr', {}, h('td', { colspan: RAY_COLUMNS, className: 'empty', text: 'No ray leaves the stack.' })));
  } else if (r.rays.length > ROW_LIMIT) {
    rayRows.appendChild(moreRow('rays', ROW_LIMIT, r.rays.length, RAY_COLUMNS, showAll));
  }
  document.getElementById('ray-rows').replaceChildren(rayRows);
  buildRejected(r, cell);

  const spotRows = document.createDocumentFragment();
  const spotCount = showAll.spots ? r.spots.length : Math.min(r.spots.length, ROW_LIMIT);
  r.spots.slice(0, spotCount).forEach((spot, k) => {
    const p = `spots[${k}]`;
    const tr = h('tr', {}, h('th', { scope: 'row', text: `${k + 1}` }));
    tr.appendChild(cell('td', `${p}.rays`, (x) => x.spots[k].rays, spotRays, { className: 'word' }));
    const spotUnit = () => units.spots.symbol;
    tr.appendChild(cell('td', `${p}.position_mm.0`, (x) => x.spots[k].position_mm[0], positionIn(units, 'spots'), {}, spotUnit));
    tr.appendChild(cell('td', `${p}.position_mm.1`, (x) => x.spots[k].position_mm[1], positionIn(units, 'spots'), {}, spotUnit));
    tr.appendChild(cell('td', `${p}.power`, (x) => x.spots[k].power, fmt.power));
    tr.appendChild(cell('td', `${p}.overlap`, (x) => x.spots[k].overlap, fmt.dop));
    appendPolarizationCells(cell, tr, p, (x) => x.spots[k]);
    spotRows.appendChild(tr);
  });
  if (r.spots.length === 0) {
    spotRows.appendChild(h('tr', {}, h('td', { colspan: 10, className: 'empty', text: 'No spot: no light leaves the stack.' })));
  } else if (r.spots.length > ROW_LIMIT) {
    spotRows.appendChild(moreRow('spots', ROW_LIMIT, r.spots.length, 10, showAll));
  }
  document.getElementById('spot-rows').replaceChildren(spotRows);

  const summary = document.getElementById('summary');
  summary.replaceChildren(
    h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Total power out' }), cell('span', 'total_power', (x) => x.total_power, fmt.power, { className: 'summary-value' })),
    h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Output rays' }), h('span', { className: 'summary-value', text: String(r.rays.length) })),
    h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Spots' }), h('span', { className: 'summary-value', text: String(r.spots.length) })),
  );
  // With a spectrum: the colour the set-up shows in white light, a swatch and its numbers.
  if (r.spectrum?.white_light) {
    summary.appendChild(h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'In white light (D65)' }),
      h('span', { className: 'swatch', id: 'white-light-swatch', 'aria-hidden': 'true' }),
      cell('span', 'spectrum.white_light.srgb', (x) => x.spectrum.white_light.srgb, (v, x) => whiteLightWords(x.spectrum.white_light), { className: 'summary-value' })));
  }
  // A wavelength given in air: the vacuum wavelength the trace used.
  if (r.air_wavelength_nm !== undefined) {
    summary.appendChild(h('p', { className: 'summary-item' }, h('span', { className: 'summary-label', text: 'Vacuum wavelength' }),
      cell('span', 'wavelength_nm', (x) => x.wavelength_nm, (v) => `${fixed(v, 4)} nm`, { className: 'summary-value' })));
  }
}

/** The rays that do not leave forward (`rejected`): a row each, and a sentence. */
function buildRejected(r, cell) {
  const list = r.rejected ?? [];
  const rows = document.createDocumentFragment();
  list.forEach((x, k) => {
    const p = `rejected[${k}]`;
    const tr = h('tr', {}, h('th', { scope: 'row', className: `ray-label${rayClass(x.label)}`, text: x.label || '(no crystal)' }));
    tr.appendChild(cell('td', `${p}.element`, (y) => y.rejected[k].element, (v) => `Element ${v + 1}`, { className: 'word' }));
    tr.appendChild(cell('td', `${p}.face`, (y) => y.rejected[k].face, (v) => `${v} face`, { className: 'word' }));
    tr.appendChild(cell('td', `${p}.reason`, (y) => y.rejected[k].reason, fmt.text, { className: 'word' }));
    tr.appendChild(cell('td', `${p}.power`, (y) => y.rejected[k].power, fmt.power));
    rows.appendChild(tr);
  });
  if (list.length === 0) {
    rows.appendChild(h('tr', {}, h('td', { colspan: 5, className: 'empty', text: 'None: every ray leaves forward.' })));
  }
  document.getElementById('rejected-rows').replaceChildren(rows);
}

/** Rejected power changes without a new shape. */
function rejectedNote(r) {
  const list = r.rejected ?? [];
  const lost = list.reduce((a, x) => a + x.power, 0);
  const text = list.length === 0 ? ''
    : `${list.length} ${list.length === 1 ? 'ray does' : 'rays do'} not leave forward, carrying ${fmt.power(lost)} of the input power in all.`;
  const note = document.getElementById('rejected-note');
  if (note.textContent !== text) note.textContent = text;
}

function rayClass(label) {
  const last = label.charAt(label.length - 1);
  return last === 'o' ? ' ray-o' : last === 'e' ? ' ray-e' : '';
}

/** Rewrites the results from result `r`; see the contract above. */
export function renderResults(state, r) {
  const own = state.results;
  const shape = shapeOf(r, own.showAll);
  if (shape !== own.shape) {
    buildResults(state, r);
    own.shape = shape;
  }
  own.units.rays = positionsUnit(r.rays, 'exit_position_mm');
  own.units.spots = positionsUnit(r.spots, 'position_mm');
  own.units.screen = positionsUnit(r.rays, 'screen_position_mm');
  for (const c of own.cells) {
    const v = c.get(r);
    const s = String(v);
    const key = c.keyOf ? `${s} ${c.keyOf(r)}` : s;
    if (key !== c.last) {
      c.last = key;
      c.el.setAttribute('data-value', s);
      const text = c.format(v, r);
      c.el.textContent = text;
      if (text === '—' && c.el.dataset.quantity.endsWith('.azimuth_deg')) c.el.title = 'circular light has no azimuth';
      else if (c.el.title) c.el.title = '';
    }
  }
  rejectedNote(r);
  const swatch = document.getElementById('white-light-swatch');
  if (swatch && r.spectrum?.white_light) swatch.style.background = r.spectrum.white_light.srgb;
  const w = r.warnings.join('\n');
  if (w !== own.warnings) {
    own.warnings = w;
    const list = document.getElementById('warning-list');
    list.replaceChildren(...r.warnings.map((t) => h('li', { text: t })));
    document.getElementById('no-warnings').hidden = r.warnings.length > 0;
    document.getElementById('warnings').classList.toggle('has-warnings', r.warnings.length > 0);
  }
}

/** Flips the ray or spot table (`which`: 'rays' or 'spots') between its first rows and all. */
export function toggleShowAll(state, which) {
  const { showAll } = state.results;
  showAll[which] = !showAll[which];
}

/** Once, before the first render: the tables' length units start from nothing shown. */
export function setupResults(state) {
  state.results.units = { rays: lengthUnitForValues([]), spots: lengthUnitForValues([]), screen: lengthUnitForValues([]) };
}
