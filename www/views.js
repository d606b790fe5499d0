// Doublespar page: the views, the eight canvas[data-view] drawn by the core (side, end, Poincaré
// sphere, three plots of the first crystal and two of the whole set-up's split angle), with a text alternative in each aria-label and the plots' captions
// (.plot-caption) saying which crystal they show. A view that cannot be drawn says so in
// #view-error and keeps its last picture. For printing (the sheet goes on paper) the views are
// drawn in the light palette. The side view has a plane chooser (select[data-side-plane]):
// x–z, y–z or along the first crystal's walk-off; its canvas's data-view then names the view
// drawn (side, side-yz, side-walkoff), and its caption follows. Numbers follow format.js (the
// core's rules): one length unit per description, chosen from its largest length; no azimuth
// for circular light; "no power" below NO_POWER.
//
// Contract: setupViews(state) once, after the core has loaded (`state` is the page's state,
// state.js: this module keeps its part in state.views, draws with state.session and describes
// state.result); it returns the list of views ({name, canvas, box}). Then drawViews(state) draws
// them all, describeViews(state) writes their descriptions, and redraw(state) does both.

import { h, setAttr, setText } from './dom.js';
import { NO_POWER, fixed, fmt, lengthIn, lengthUnitFor, lengthUnitForValues, showsAzimuth } from './format.js';
import { toFieldError } from './field-error.js';
import { materialName } from './state.js';
import { modeLetters } from './results.js';
import { lacksConvergent, needConvergent } from './convergent.js';


// The side view's planes: view name, the chooser's words, the plane in the text alternative and
// the figure's caption.
const SIDE_PLANES = [
  ['side', 'x–z', 'x–z plane', 'Light travels along +z, to the right; x is up and y points out of the page. Each crystal shows its optic axis.'],
  ['side-yz', 'y–z', 'y–z plane', 'Light travels along +z, to the right; y is up and x points into the page. Each crystal shows its optic axis.'],
  ['side-walkoff', 'along the walk-off', 'plane of the first crystal\'s walk-off', 'Light travels along +z, to the right; up is the first crystal\'s e-ray walk-off direction, named in the title. Each crystal shows its optic axis.'],
];

function drawnName(v) {
  return v.name === 'side' ? v.canvas.dataset.view : v.name;
}

/** Whether a view sits in a closed disclosure (the conoscopic figure): it is drawn when opened. */
function folded(v) {
  return v.canvas.closest('details:not([open])') !== null;
}

function drawView(state, v) {
  const { errors } = state.views;
  if (folded(v)) return;
  if (lacksConvergent(state, v.name)) {
    // Its map is computed in the background; until it arrives the last picture stays.
    needConvergent(state);
    if (v.drawnOnce) return;
  }
  v.drawnOnce = true;
  try {
    state.session.draw(drawnName(v), v.canvas, state.darkQuery.matches && !state.views.printDark);
    if (v.failed) {
      v.failed = false;
      errors.delete(v.name);
      showViewErrors(errors);
    }
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    v.failed = true;
    errors.set(v.name, fe.message);
    showViewErrors(errors);
  }
}

function showViewErrors(errors) {
  const el = document.getElementById('view-error');
  const text = [...errors].map(([k, m]) => `${k}: ${m}`).join(' · ');
  el.textContent = text ? `Could not draw ${text}` : '';
  el.hidden = !text;
}

/** Draws every view synchronously (their descriptions are left as they are). */
export function drawViews(state) {
  for (const v of state.views.list) drawView(state, v);
}

/** Redraws every view synchronously, and describes them again. */
export function redraw(state) {
  drawViews(state);
  describeViews(state);
}

/** Redraws, at the next frame, the views whose boxes were resized. */
function onResize(state, entries) {
  const own = state.views;
  for (const e of entries) {
    const v = own.list.find((x) => x.box === e.target);
    if (v) own.dirty.add(v);
  }
  if (!own.resizeFrame) {
    own.resizeFrame = requestAnimationFrame(() => {
      own.resizeFrame = 0;
      const todo = own.dirty;
      own.dirty = new Set();
      for (const v of todo) drawView(state, v);
    });
  }
}

function num(v, digits) {
  return fixed(v, digits, 5e-13);
}

/** A wavelength as entered: up to three decimals, no trailing zeros (400, 632.8). */
function nm(v) {
  return num(v, 3).replace(/\.?0+$/, '');
}

/**
 * The output's circular part against wavelength, from a result's spectrum: [nm, S3/S0] at every
 * wavelength that was traced and leaves power (above NO_POWER), the transmission plot's dashed
 * curve (the core's view::spectrum_plot::circular_vs_wavelength) and the plot's exported column.
 */
export function circularPart(spectrum) {
  return spectrum.wavelength_nm
    .map((l, i) => [l, spectrum.stokes[i]])
    .filter(([, s]) => s && s[0] > NO_POWER)
    .map(([l, s]) => [l, s[3] / s[0]]);
}

/** A length alone in its sentence, in its own unit. */
function lengthText(v) {
  return v === null || v === undefined ? '—' : lengthIn(v, lengthUnitFor(v), 3);
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
  if (!showsAzimuth(e.ellipticity_deg)) return `${e.handedness}-handed circular`;
  return `${e.handedness}-handed elliptical, azimuth ${num(e.azimuth_deg, 1)}°, ellipticity ${num(e.ellipticity_deg, 1)}°`;
}

function listed(items, limit, describe) {
  const shown = items.slice(0, limit).map(describe);
  if (items.length > limit) shown.push(`and ${items.length - limit} more`);
  return shown.join('; ');
}

/** Writes each view's aria-label and the plots' captions from the page's current result. */
export function describeViews(state) {
  const { result: r, scenario: shownScenario } = state;
  if (!r) return;
  const views = state.views.list;
  const describeMaterial = (key) => (key === 'custom' ? 'custom indices' : materialName(state, key));
  const crystals = [];
  r.elements.forEach((e, i) => { if (e.kind === 'crystal') crystals.push(i); });
  const texts = {};
  const spots = r.spots;
  const sideView = views.find((v) => v.name === 'side');
  const plane = (SIDE_PLANES.find((p) => sideView && p[0] === drawnName(sideView)) ?? SIDE_PLANES[0])[2];
  const sideHead = `Side view (${plane}, light travelling along +z)`;
  // Past four rays a spot is named by its first two and a count, as the views name it.
  const rayList = (s) => (s.rays.length > 4 ? `${s.rays[0]} + ${s.rays[1]} + … ${s.rays.length} rays` : s.rays.join(' + '));
  const spotName = (s, k) => (s.rays.length === 1 ? `ray ${s.rays[0] || '(no crystal)'}` : `spot ${k + 1} (${rayList(s)})`);

  if (r.rays.length === 0) {
    texts.side = `${sideHead}: no ray leaves the stack.`;
  } else if (crystals.length === 0) {
    texts.side = `${sideHead}: ${r.elements.length} ideal element${r.elements.length === 1 ? '' : 's'} and no crystal; the beam passes undivided.`;
  } else if (crystals.length === 1) {
    const c = r.elements[crystals[0]];
    const [a, b] = modeLetters(c);
    texts.side = c.separation_mm === null
      ? `${sideHead}: one ${materialName(state, c.material)} plate; one of its modes is evanescent, so the beam is not split.`
      : `${sideHead}: ${b}-ray displaced ${lengthText(c.separation_mm)} from the ${a}-ray by the ${materialName(state, c.material)} plate (element ${crystals[0] + 1}), ${b} walk-off ${num(c[b].walkoff_deg, 3)}°.`;
  } else {
    texts.side = `${sideHead}: ${r.rays.length} rays through ${crystals.length} crystals leave in ${spots.length} spot${spots.length === 1 ? '' : 's'}${spots.length > 1 ? `, at most ${lengthText(maxSpotDistance(spots))} apart` : ''}.`;
  }

  // One unit for every position of the end view's description.
  const endUnit = lengthUnitForValues(spots.slice(0, 6).flatMap((s) => s.position_mm));
  const at = (mm) => lengthIn(Math.abs(mm) < 1e-9 ? 0 : mm, endUnit, 4).split(' ')[0];
  texts.end = spots.length === 0
    ? 'End view, looking back toward the source: no light leaves the stack.'
    : `End view, looking back toward the source (x to the right, y up): ${spots.length} spot${spots.length === 1 ? '' : 's'}. ${listed(spots, 6, (s, k) => `${spotName(s, k)} at (${at(s.position_mm[0])}, ${at(s.position_mm[1])}) ${endUnit.symbol}, ${fmt.power(s.power) === 'no power' ? 'no power' : `power ${fmt.power(s.power)}`}, ${ellipseWords(s.ellipse)}`)}.`;

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
    const sc = shownScenario?.elements?.[i];
    const tilt = (sc?.axes ?? sc?.axis)?.tilt_deg;
    const [, b] = modeLetters(c);
    const walk = c[b].walkoff_deg === null ? `the ${b}-mode is evanescent` : `${b} walk-off ${num(c[b].walkoff_deg, 3)}°`;
    texts['walkoff-tilt'] = c.max_walkoff_deg === undefined
      ? `Walk-off against cut tilt for ${which}: ${walk}; the plot covers uniaxial crystals.`
      : `Walk-off against cut tilt for ${which}: ${walk} at the present tilt${typeof tilt === 'number' ? ` of ${num(tilt, 2)}°` : ''}; at normal incidence the largest walk-off, ${num(c.max_walkoff_deg, 3)}°, comes at a cut of ${num(c.max_walkoff_cut_deg, 2)}°.`;
    texts['separation-wavelength'] = `Separation against wavelength for ${which}: ${c.separation_mm === null ? 'no separation (a mode is evanescent)' : lengthText(c.separation_mm)} at ${num(r.wavelength_nm, 1)} nm.`;
    texts['retardance-wavelength'] = `Retardance against wavelength for ${which}: ${c.retardance_waves === null ? 'undefined (a mode is evanescent)' : `${num(c.retardance_waves, 3)} waves`} at ${num(r.wavelength_nm, 1)} nm.`;
  }
  // The whole set-up's split: the largest angle between output rays that carry power. Rays that
  // share a direction exactly count once (a stack of plane-parallel plates sends thousands of rays
  // along a handful of directions), and the largest angle is the arccosine of the smallest dot
  // product, since the arccosine falls as its argument rises: one arccosine, not one a pair.
  const distinct = new Map();
  for (const ray of r.rays) {
    if (ray.power >= 1e-12) distinct.set(ray.direction.join(','), ray.direction);
  }
  const dirs = [...distinct.values()];
  let leastDot = 1;
  for (let a = 0; a < dirs.length; a += 1) {
    for (let b = a + 1; b < dirs.length; b += 1) {
      leastDot = Math.min(leastDot, dirs[a][0] * dirs[b][0] + dirs[a][1] * dirs[b][1] + dirs[a][2] * dirs[b][2]);
    }
  }
  const split = Math.acos(Math.max(-1, leastDot)) * 180 / Math.PI;
  const splitWords = `${num(split, 4)}° between the output beams at ${num(r.wavelength_nm, 1)} nm`;
  texts['split-wavelength'] = `Split angle of the whole set-up against wavelength: ${splitWords}.`;
  texts['split-incidence'] = `Split angle of the whole set-up against the angle of incidence: ${splitWords}.`;
  const temperature = shownScenario?.temperature_c ?? 20;
  if (crystals.length === 0) {
    texts['retardance-temperature'] = 'Retardance against temperature: no crystal in the stack, nothing to plot.';
    texts['separation-temperature'] = 'Separation against temperature: no crystal in the stack, nothing to plot.';
  } else {
    const c = r.elements[crystals[0]];
    const which = `element ${crystals[0] + 1} (${describeMaterial(c.material)})`;
    texts['retardance-temperature'] = `Retardance against temperature for ${which}: ${c.retardance_waves === null ? 'undefined (a mode is evanescent)' : `${num(c.retardance_waves, 3)} waves`} at ${num(temperature, 1)} °C.`;
    texts['separation-temperature'] = `Separation against temperature for ${which}: ${c.separation_mm === null ? 'no separation (a mode is evanescent)' : lengthText(c.separation_mm)} at ${num(temperature, 1)} °C.`;
  }
  const cell = r.elements.find((e) => e.kind === 'lc_cell');
  texts['retardance-voltage'] = cell
    ? `Retardance of the first liquid-crystal cell against voltage: ${num(cell.retardance_waves, 4)} waves at the set voltage; threshold ${num(cell.threshold_voltage_v, 3)} V.`
    : 'Retardance against voltage: no liquid-crystal cell in the stack; add one with + LC cell.';
  const spectrum = r.spectrum;
  if (!spectrum) {
    texts['transmission-wavelength'] = 'Transmission against wavelength: no spectrum asked for; turn on Spectrum below the stack.';
  } else {
    const traced = spectrum.transmission.filter((t) => t !== null);
    const low = Math.min(...traced);
    const high = Math.max(...traced);
    const n = spectrum.wavelength_nm.length;
    texts['transmission-wavelength'] = traced.length === 0
      ? `Transmission against wavelength: none of the ${n} wavelengths could be traced.`
      : `Transmission of the whole set-up from ${nm(spectrum.wavelength_nm[0])} to ${nm(spectrum.wavelength_nm[n - 1])} nm, ${n} points: between ${num(low, 3)} and ${num(high, 3)}.`;
    const s3 = circularPart(spectrum).map((p) => p[1]);
    if (s3.length > 0) texts['transmission-wavelength'] += ` Dashed, on the right-hand axis from −1 to 1: the output's circular part S3/S0 (+1 right-handed, −1 left), between ${num(Math.min(...s3), 3)} and ${num(Math.max(...s3), 3)}.`;
    const w = spectrum.white_light;
    if (w) texts['transmission-wavelength'] += ` In white light (D65) it shows ${w.srgb}${w.chromaticity ? `, chromaticity x ${num(w.chromaticity[0], 3)}, y ${num(w.chromaticity[1], 3)}` : ''}, luminous transmittance ${num(w.xyz[1], 3)}.`;
  }
  texts.conoscope = 'Conoscopic figure: the whole set-up\'s transmission over a 30° cone of incidence directions, 256 × 256, each an exact plane-wave solution computed in the background, black 0 and white 1; dark crosses (isogyres) and rings (isochromes) show where light is extinguished. Also as the draw command\'s view conoscope.';
  texts.acceptance = crystals.length === 0
    ? 'Acceptance of the first crystal: no crystal in the stack, nothing to draw.'
    : `Acceptance of element ${crystals[0] + 1} (${describeMaterial(r.elements[crystals[0]].material)}): its retardance minus its retardance at normal incidence, in waves, over a 30° cone of incidence directions, darkest where it is least. Also as the draw command's view acceptance.`;
  for (const v of views) {
    if (texts[v.name]) setAttr(v.canvas, 'aria-label', texts[v.name]);
  }
  const plotNote = crystals.length === 0
    ? 'No crystal in the stack: nothing to plot.'
    : `Element ${crystals[0] + 1}, ${describeMaterial(r.elements[crystals[0]].material)}: the first crystal of the stack.`;
  for (const el of document.querySelectorAll('.plot-caption')) setText(el, plotNote);
}

// Printing: the sheet (export.js) goes on paper, so the views are drawn in the light palette.

function beforePrint(state) {
  // The sheet is printed on paper: draw the views with the light palette.
  state.views.printDark = state.darkQuery.matches;
  if (state.views.printDark) redraw(state);
}
function afterPrint(state) {
  if (state.views.printDark) {
    state.views.printDark = false;
    redraw(state);
  }
}

/** Puts the side view's plane chooser above its canvas (planes the core knows only). */
function addPlaneChooser(state, v) {
  const planes = SIDE_PLANES.filter((p) => state.viewList.includes(p[0]));
  if (planes.length < 2) return;
  const select = h('select', { 'data-side-plane': '', 'aria-label': 'Side view plane' },
    ...planes.map(([value, words]) => h('option', { value, text: words })));
  const chooser = h('label', { className: 'plane-chooser' }, 'Plane ', select);
  v.box.parentElement.insertBefore(chooser, v.box);
  select.addEventListener('change', () => {
    const plane = planes.find((p) => p[0] === select.value) ?? planes[0];
    setAttr(v.canvas, 'data-view', plane[0]);
    const caption = v.box.parentElement.querySelector('figcaption');
    if (caption) setText(caption, plane[3]);
    drawView(state, v);
    describeViews(state);
  });
}

/**
 * Finds the views (canvas[data-view] naming one of state.viewList) into state.views.list,
 * redraws each when its box is resized, all of them when the colour scheme changes
 * (state.darkQuery) and around printing, and returns their list. state.session draws them;
 * their descriptions tell state.result and state.scenario (the last that traced).
 */
export function setupViews(state) {
  const ro = new ResizeObserver((entries) => onResize(state, entries));
  for (const canvas of document.querySelectorAll('canvas[data-view]')) {
    const name = canvas.dataset.view;
    if (!state.viewList.includes(name)) continue;
    const v = { name, canvas, box: canvas.parentElement, failed: false };
    state.views.list.push(v);
    ro.observe(v.box);
    if (name === 'side') addPlaneChooser(state, v);
    canvas.closest('details')?.addEventListener('toggle', () => drawView(state, v));
  }
  state.convergent.drawByName = (name) => {
    for (const v of state.views.list) if (v.name === name) drawView(state, v);
  };
  state.darkQuery.addEventListener('change', () => redraw(state));
  window.addEventListener('beforeprint', () => beforePrint(state));
  window.addEventListener('afterprint', () => afterPrint(state));
  return state.views.list;
}
