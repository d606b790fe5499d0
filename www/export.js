// Doublespar page: exports and the print sheet. Each view as SVG or PNG, the plots' data as CSV
// or JSON, the results and the set-up; every file is made in the page and handed over through a
// Blob URL and a temporary <a download>: nothing is sent anywhere. The print sheet (#print-setup)
// is a compact read-only summary of the set-up, shown only when printing.
//
// Contract: setupExport(state), called once by app.js after the views are found (`state` is the
// page's state, state.js: state.session makes the files of state.views.list),
// adds after each view's box a row of buttons with data-export="<view>:<svg|png|csv|json>" (data
// formats for the plots only) and answers them and the results' [data-export] buttons
// (results:json, results:csv, scenario:json) with files named doublespar-<what>.<format>; the
// outcome is said in #export-status. updatePrintSheet(scenario, kindNames) rewrites the sheet
// after every trace.

import { h } from './dom.js';
import { minus } from './format.js';
import { toFieldError } from './field-error.js';
import { circularPart } from './views.js';

const PLOT_VIEWS = ['walkoff-tilt', 'separation-wavelength', 'retardance-wavelength', 'split-wavelength', 'split-incidence', 'retardance-temperature', 'separation-temperature', 'transmission-wavelength', 'retardance-voltage'];
const VIEW_TITLES = {
  side: 'side view',
  end: 'end view',
  poincare: 'Poincaré sphere',
  'walkoff-tilt': 'walk-off against cut tilt plot',
  'separation-wavelength': 'separation against wavelength plot',
  'retardance-wavelength': 'retardance against wavelength plot',
  'split-wavelength': 'split angle against wavelength plot',
  'split-incidence': 'split angle against incidence plot',
  'retardance-temperature': 'retardance against temperature plot',
  'separation-temperature': 'separation against temperature plot',
  'transmission-wavelength': 'transmission against wavelength plot',
  'retardance-voltage': 'retardance against voltage plot',
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
 * scenario's own operating point marked "current" in the third column. A plot with a second
 * curve on its own axis (`s.second`, see withSecond) adds its values as a fourth column, on the
 * samples of the same x (empty where it has none, and on the current row). */
function seriesCsv(s) {
  const header = [withUnit(s.x_label, s.x_unit), withUnit(s.y_label, s.y_unit), 'point'];
  const second = s.second ? new Map(s.second.points) : null;
  if (second) header.push(withUnit(s.second.label, s.second.unit));
  const lines = [csvLine(header)];
  for (const [x, y] of s.points) lines.push(csvLine(second ? [x, y, 'sample', second.get(x)] : [x, y, 'sample']));
  if (s.current) lines.push(csvLine([s.current[0], s.current[1], 'current']));
  return lines.join('\r\n') + '\r\n';
}

/**
 * The series of a plot as exported: the core's series, and for the transmission plot its
 * dashed curve as `second` {label, unit, axis, about, points} (the output's S3/S0 from the
 * result's spectrum, on the plot's right-hand axis from −1 to 1).
 */
function withSecond(state, view, s) {
  const spectrum = view === 'transmission-wavelength' ? state.session.result()?.spectrum : null;
  if (!spectrum) return s;
  return {
    ...s,
    second: {
      label: 'S3/S0',
      unit: '',
      axis: [-1, 1],
      about: 'the output\'s circular part: +1 right-handed circular, −1 left-handed, 0 linear; left out where no power leaves',
      points: circularPart(spectrum),
    },
  };
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

function exportView(state, view, format) {
  const v = state.views.list.find((x) => x.name === view);
  if (!v) return;
  const drawn = v.canvas.dataset.view; // the side view's plane may have changed it
  const name = `doublespar-${drawn}.${format}`;
  if (format === 'svg') {
    const w = Math.max(1, Math.round(v.canvas.clientWidth));
    const hgt = Math.max(1, Math.round(v.canvas.clientHeight));
    download(name, new Blob([state.session.svg(drawn, w, hgt, false)], { type: 'image/svg+xml' }));
  } else if (format === 'png') {
    v.canvas.toBlob((blob) => {
      if (blob) download(name, blob);
      else exportStatus(`Could not make ${name}: the view has no picture yet.`, true);
    }, 'image/png');
  } else {
    const core = state.session.series(view);
    if (!core) {
      exportStatus(`The ${VIEW_TITLES[view] ?? view} has no data series.`, true);
      return;
    }
    const s = withSecond(state, view, core);
    if (format === 'csv') download(name, new Blob([seriesCsv(s)], { type: 'text/csv' }));
    else download(name, jsonBlob(s));
  }
}

function exportResults(state, what, format) {
  if (what === 'scenario') {
    download('doublespar-scenario.json', jsonBlob(JSON.parse(state.session.scenarioJson())));
  } else if (format === 'json') {
    download('doublespar-results.json', jsonBlob({
      scenario: JSON.parse(state.session.scenarioJson()),
      result: state.session.result(),
    }));
  } else {
    download('doublespar-results.csv', new Blob([resultsCsv(state.session.result())], { type: 'text/csv' }));
  }
}

function onExportClick(state, ev) {
  const btn = ev.target.closest('button[data-export]');
  if (!btn) return;
  const [what, format] = btn.dataset.export.split(':');
  try {
    if (what === 'results' || what === 'scenario') exportResults(state, what, format);
    else exportView(state, what, format);
  } catch (e) {
    const fe = toFieldError(e);
    if (!fe) throw e;
    exportStatus(`Could not export: ${fe.message}`, true);
  }
}

/**
 * Puts the export buttons after every view's box and answers their clicks (and those of the
 * results' buttons), from the page's state: state.session and state.views.list.
 */
export function setupExport(state) {
  for (const v of state.views.list) {
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
  document.getElementById('views').addEventListener('click', (ev) => onExportClick(state, ev));
  document.getElementById('results').addEventListener('click', (ev) => onExportClick(state, ev));
}

// The print sheet: a compact read-only summary of the set-up, shown only when printing.

function setupValue(v) {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return minus(String(v));
  if (typeof v !== 'object') return String(v);
  if (Array.isArray(v)) return v.map(setupValue).join(', ');
  return Object.entries(v).map(([k, x]) => `${k.replace(/_/g, ' ')} ${setupValue(x)}`).join(', ');
}

/** Writes #print-setup from a scenario (every default written out); `kindNames` names the kinds. */
export function updatePrintSheet(scenario, kindNames) {
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
    list.appendChild(h('li', {}, h('strong', { text: kindNames[kind] ?? String(kind) }), ` ${setupValue(rest)}`));
  }
  box.replaceChildren(top, h('h3', { text: 'Stack' }), list);
}

// The order sheet: the solved design (from the design panel) as one printed page of its own,
// what a shop needs to make the part. Shown only when printing, and only once a design is solved.

const SAFETY_LINE = 'Design guidance; defers to local laser-safety regulations and licensed practice.';

/** A number for the sheet: `n` significant digits, no trailing zeros, the typographic minus. */
function sheetNumber(v, n = 4) {
  if (typeof v !== 'number' || !Number.isFinite(v)) return '—';
  const a = Math.abs(v);
  const s = a !== 0 && (a >= 1e6 || a < 1e-4) ? v.toExponential(n - 1).replace(/\.?0+e/, 'e') : String(Number(v.toPrecision(n)));
  return minus(s);
}

const mm = (v, n = 4) => `${sheetNumber(v, n)} mm`;
const deg = (v, n = 4) => `${sheetNumber(v, n)}°`;
const nm = (v) => `${sheetNumber(v, 5)} nm`;

/** "from … to … nm" over a curve's first and last points, or the one wavelength it holds. */
function bandText(curve, wavelength) {
  if (Array.isArray(curve) && curve.length > 1) {
    const lo = curve[0][0];
    const hi = curve[curve.length - 1][0];
    if (hi > lo) return `${nm(lo)} to ${nm(hi)}`;
  }
  return `${nm(wavelength)} only (the request gave no band: the part is specified at this wavelength alone)`;
}

/**
 * What the sheet says of a material: its name and the source of its data; a formula with no
 * journal source (`verified` false in the catalogue) says "unverified data" beside its name.
 */
function materialRows(key, label, materialList) {
  const m = materialList.find((x) => x.key === key);
  if (!m) return [[label, key === 'custom' ? 'custom-index' : String(key)], ['Data source', 'custom indices given in the request (no dispersion, no source)']];
  const name = m.name.toLowerCase().includes(m.key) ? m.name : `${m.name} (${m.key})`;
  const unverified = m.verified === false ? '; unverified data: its formula has no journal source' : '';
  const kind = m.kind === 'biaxial' ? 'biaxial (n_x < n_y < n_z)' : `${m.sign} uniaxial`;
  return [[label, `${name}, ${kind}; data valid ${m.range_nm[0]}–${m.range_nm[1]} nm${unverified}`], ['Data source', m.citation]];
}

// The prism kinds share one frame (CONVENTIONS.md, version 2; src/design/splitter.rs,
// polarizer.rs): the pair's tilted face leans toward +x, so the first part is thin at +x, and an
// optic axis in the faces is named by its azimuth from x.

/**
 * An optic axis in words: in the faces (tilt 90°) or at its tilt, then along x (across the edge
 * of the tilted face), along y (parallel to it) or at its azimuth, with the azimuth as a number.
 */
function axisWords(axis) {
  const az = axis?.azimuth_deg;
  if (typeof az !== 'number') return 'axis not given';
  const inFace = axis.tilt_deg === 90 ? 'in the faces' : `at ${deg(axis.tilt_deg)} to the face normal`;
  const turn = ((az % 180) + 180) % 180;
  const where = turn === 0 ? 'along x, across the edge of the tilted face' : turn === 90 ? 'along y, parallel to the edge of the tilted face' : `at ${deg(az)} from x`;
  return `${inFace}, ${where} (azimuth ${deg(az)})`;
}

/** How two crystals meet: a cement of its index, optical contact, or a gap (air or of its index). */
function contactWords(contact, index) {
  if (contact === 'cement') return `cemented, cement of index ${sheetNumber(index)}`;
  if (contact === 'optical') return 'optical contact, no cement';
  return index === 1 || index === undefined ? 'air gap (index 1)' : `gap of index ${sheetNumber(index)}`;
}

/** The angular splitter: two wedges with crossed axes (src/design/splitter.rs). */
function splitterRows(d, r, materialList) {
  const [first, second] = d.scenario?.elements ?? [];
  const t = d.tolerances ?? {};
  const wl = d.scenario?.wavelength_nm ?? r.wavelength_nm;
  const rows = materialRows(first?.material ?? r.material, 'Material', materialList);
  rows.push(['Wedge angle', `${deg(d.wedge_angle_deg)} ± ${deg(t.wedge_deg, 3)} between the entrance face and the common face, the same in both wedges (the tolerance as one standard deviation)`]);
  rows.push(['Dimensions', `two wedges: ${(d.thickness_mm ?? []).map((v, i) => `wedge ${i + 1} ${mm(v)} thick at the axis`).join(', ')}; ${mm(d.edge_thickness_mm)} at the thin edge (+x for wedge 1)`]);
  rows.push(['Cut', `optic axes crossed, each ± ${deg(t.axis_deg, 3)} about the beam: wedge 1 ${axisWords(first?.axis)}; wedge 2 ${axisWords(second?.axis)}`]);
  rows.push(['Contact', contactWords(d.contact, second?.cement_index ?? r.cement_index)]);
  rows.push(['Clear aperture', `at least ${mm(d.clear_aperture_mm)} (round), all faces`]);
  const band = d.band?.split_angle_deg ?? [];
  const bandSplit = band.length > 1 ? `; split from ${deg(Math.min(...band))} to ${deg(Math.max(...band))} over the band` : '';
  rows.push(['Wavelength band', `${bandText(d.band?.wavelength_nm?.map((w) => [w]), wl)}${bandSplit}`]);
  const beams = (d.beams ?? []).map((b) => `beam ${b.label} (polarized along ${b.polarization}) deviated ${deg(b.deviation_deg)}`);
  rows.push(['Performance', `split ${deg(d.split_angle_deg)} at ${nm(wl)} and normal incidence: ${beams.join(', ')} (positive toward +x)`]);
  const mc = d.split_angle_spread ?? d.monte_carlo;
  const errors = `wedge angle ± ${deg(t.wedge_deg, 3)}, each axis ± ${deg(t.axis_deg, 3)}, incidence ± ${deg(t.incidence_deg, 3)} (standard deviations)`;
  rows.push(['Tolerances', mc && mc.n > 0
    ? `${errors}: over ${mc.n} samples the split is ${deg(mc.mean, 5)} ± ${deg(mc.std, 2)}, 5th to 95th percentile ${deg(mc.p5, 5)} to ${deg(mc.p95, 5)}`
    : `${errors}; the split over them was not computed (no Monte Carlo samples)`]);
  return rows;
}

/** The polarizing prism: one mode totally reflected at a gap (src/design/polarizer.rs). */
function polarizerRows(d, r, materialList) {
  const [first, second] = d.scenario?.elements ?? [];
  const [lower, upper] = d.half_field_deg ?? [];
  const [critReflected, critPassed] = d.critical_angles_deg ?? [];
  const rows = materialRows(first?.material ?? r.material, 'Material', materialList);
  rows.push(['Prism angle', `${deg(d.prism_angle_deg)} between the entrance face and the gap, the same in both prisms`]);
  rows.push(['Dimensions', `two prisms: ${(d.thickness_mm ?? []).map((v, i) => `prism ${i + 1} ${mm(v)} thick at the axis`).join(', ')}; ${mm(d.edge_thickness_mm)} at the thin edge (+x for prism 1)`]);
  rows.push(['Cut', `optic axis of both prisms ${axisWords(first?.axis)}`]);
  rows.push(['Gap', contactWords(second?.contact === 'cement' ? 'cement' : null, d.gap_index)]);
  rows.push(['Clear aperture', `at least ${mm(d.clear_aperture_mm)} (round), all faces`]);
  rows.push(['Wavelength', nm(d.scenario?.wavelength_nm ?? r.wavelength_nm)]);
  rows.push(['Field of view', `${deg(lower)} below and ${deg(upper)} above the normal, in the x–z plane (critical angles at the gap: ${deg(critReflected)} for the ${d.reflected_mode}-mode, ${deg(critPassed)} for the ${d.passed_mode}-mode)`]);
  rows.push(['Performance', `passes the ${d.passed_mode}-mode (${sheetNumber(d.normal?.passed, 3)} of its power at normal incidence, faces uncoated) and reflects the ${d.reflected_mode}-mode totally inside the field; just beyond the upper edge the extinction (leaked ÷ passed) is ${sheetNumber(d.upper_edge?.outside?.extinction, 3)}`]);
  return rows;
}

/** The tilt-tuned waveplate: a plate in a tilted mount (src/design/tilt.rs). */
function tiltRows(d, r, materialList) {
  const plate = d.scenario?.elements?.[0] ?? {};
  // A plate of custom principal indices names them; a catalogue crystal its data.
  const rows = plate.nz !== undefined
    ? [['Material', `custom biaxial crystal, n_x ${sheetNumber(plate.nx)}, n_y ${sheetNumber(plate.ny)}, n_z ${sheetNumber(plate.nz)}`], ['Data source', 'custom indices given in the request (no dispersion, no source)']]
    : materialRows(plate.material ?? r.material, 'Material', materialList);
  const made = typeof r.order_number === 'number' ? ` (order ${r.order_number}${typeof r.made_for_nm === 'number' ? ` at ${nm(r.made_for_nm)}` : ''})` : '';
  rows.push(['Dimensions', `plate ${mm(d.thickness_mm)} thick${made}`]);
  // A biaxial plate has no optic axis in its faces: its two in-face principal axes, the fast one
  // first; at normal incidence the f- and s-waves are polarized along them.
  rows.push(['Cut', d.cut
    ? `${d.cut}-cut: principal ${d.cut} along the face normal; fast axis principal ${d.fast_principal_axis} at ${deg(d.fast_axis_azimuth_deg)} from x, slow axis principal ${d.slow_principal_axis} at ${deg(d.axis_azimuth_deg)} (the f- and s-waves at normal incidence are polarized along them)`
    : `optic axis in the face, at ${deg(plate.axis?.azimuth_deg)} from x`]);
  rows.push(['Mount', `tilted by ${deg(d.tilt_deg)} in the plane at azimuth ${deg(plate.mount?.azimuth_deg)} from x; there the retardance changes by ${sheetNumber(d.sensitivity_waves_per_deg, 3)} waves per degree of tilt`]);
  rows.push(['Clear aperture', 'to suit the beam (the request sets none)']);
  rows.push(['Wavelength', nm(d.scenario?.wavelength_nm ?? r.wavelength_nm)]);
  rows.push(['Performance', `retardance ${sheetNumber(d.retardance_waves, 5)} waves at the tilt (the target ${sheetNumber(r.retardance_waves, 5)} plus ${d.order} whole waves), ${sheetNumber(d.normal_retardance_waves, 5)} waves untilted`]);
  return rows;
}

/** The quartz rotator: a c-cut plate of one hand (src/design/rotator.rs). */
function rotatorRows(d, materialList) {
  const rows = materialRows('quartz', 'Material', materialList);
  rows.push(['Optical activity', `${d.handedness}-handed crystal; rotatory power ${sheetNumber(d.rotatory_power_deg_per_mm, 5)}°/mm at ${nm(d.wavelength_nm)} (${d.rotatory_power_source})`]);
  rows.push(['Dimensions', `plate ${mm(d.thickness_mm, 5)} ± ${mm(d.thickness_tolerance_mm, 2)} thick (the tolerance moves the rotation by ${deg(d.rotation_tolerance_deg, 3)})`]);
  rows.push(['Cut', 'c-cut: optic axis along the face normal (0° to it)']);
  rows.push(['Clear aperture', 'to suit the beam (the request sets none)']);
  const band = d.band?.rotation_deg ?? [];
  const bandRot = band.length > 1 ? `; rotation from ${deg(Math.min(...band))} to ${deg(Math.max(...band))} over the band` : '';
  rows.push(['Wavelength band', `${bandText(d.band?.wavelength_nm?.map((w) => [w]), d.wavelength_nm)}${bandRot}`]);
  const k = d.half_turns_added;
  const turns = k ? ` (the request ${deg(d.requested_rotation_deg)} ${k > 0 ? 'plus' : 'minus'} ${Math.abs(k)} × 180°)` : '';
  const acceptance = d.acceptance_bound === 'at_least'
    ? `≥ ${deg(d.acceptance_deg, 3)} of incidence (no tolerance reached within the angles computed)`
    : `${deg(d.acceptance_deg, 3)} of incidence (set by the ${d.acceptance_limited_by === 'ellipticity' ? 'ellipticity' : 'rotation error'})`;
  rows.push(['Performance', `rotation ${deg(d.rotation_deg, 6)} from x toward y at ${nm(d.wavelength_nm)}${turns}, dθ/dλ ${sheetNumber(d.dispersion_deg_per_nm, 3)}°/nm; acceptance ${acceptance} for rotation within ${deg(d.rotation_tolerance_deg, 3)} and ellipticity within ${deg(d.ellipticity_tolerance_deg, 3)}`]);
  return rows;
}

/**
 * How the plates of `plates` are cut, in words: a biaxial plate (`cut`, its own or the design's
 * one `cut`) along its principal axis with its slow axis at its azimuth, a uniaxial one with its
 * optic axis in the face at its azimuth.
 */
function plateCuts(plates, cut) {
  return plates.map((p, i) => {
    const c = p.cut ?? cut;
    return c
      ? `plate ${i + 1} ${c}-cut (principal ${c} along the face normal), slow axis at ${deg(p.axis_azimuth_deg)}`
      : `plate ${i + 1} optic axis in the face at ${deg(p.axis_azimuth_deg)}`;
  }).join('; ');
}

/** The sheet's rows [term, text] for a solved design of each kind. */
function orderRows(shown, materialList) {
  const { design: d, request: r, kindName } = shown;
  const part = `${kindName.charAt(0).toUpperCase()}${kindName.slice(1)}${shown.complete ? '' : ' (nominal design; the tolerance run did not finish)'}`;
  const rows = [['Part', part]];
  if (d.kind === 'displacer') {
    const t = d.tolerances ?? {};
    rows.push(...materialRows(d.material, 'Material', materialList));
    rows.push(['Dimensions', `length ${mm(d.length_mm)} ± ${mm(t.thickness_mm, 3)} along the beam (the tolerance as one standard deviation)`]);
    rows.push(['Cut', d.plane
      // A biaxial plate: the plane's second principal axis stands where a uniaxial optic axis does.
      ? `principal ${d.plane[1]} at ${deg(d.cut_tilt_deg)} ± ${deg(t.tilt_deg, 3)} to the face normal, in the ${d.plane} principal plane, which holds the displacement (in-plane ray toward ${d.displacement_direction})`
      : `optic axis at ${deg(d.cut_tilt_deg)} ± ${deg(t.tilt_deg, 3)} to the face normal, in the plane that holds the displacement (e-ray toward ${d.displacement_direction})`]);
    rows.push(['Clear aperture', `at least ${mm(d.clear_aperture_mm)} (round), both faces`]);
    rows.push(['Wavelength band', bandText(d.band?.curve, d.wavelength_nm)]);
    rows.push(['Performance', `o/e separation ${mm(d.separation_mm)} at ${nm(d.wavelength_nm)}, e walk-off ${deg(d.walkoff_deg)}`]);
  } else if (d.kind === 'waveplate' || d.kind === 'achromat') {
    const plates = d.plates ?? [];
    if (d.kind === 'achromat') {
      plates.forEach((p, i) => rows.push(...materialRows(p.material, `Material, plate ${i + 1}`, materialList)));
    } else {
      rows.push(...materialRows(plates[0]?.material, 'Material', materialList));
    }
    const wl = d.wavelength_nm ?? r.wavelength_nm;
    // The thickness change that moves the retardance by the acceptance error: δL = δΓ·λ/|nₑ − nₒ|.
    const dn = Math.abs(d.birefringence ?? 0);
    const err = d.acceptance_error_waves;
    const tol = dn > 0 && typeof err === 'number' && typeof wl === 'number' ? (err * wl * 1e-6) / dn : null;
    const tolText = tol === null ? 'tolerance not computed for this part: check the retardance curve'
      : `± ${mm(tol, 2)}${plates.length > 1 ? ' on the difference of the two' : ''} (moves the retardance by ${sheetNumber(err, 2)} waves)`;
    rows.push(['Dimensions', `${plates.map((p, i) => `plate ${i + 1}: ${mm(p.thickness_mm)} thick`).join('; ')}; ${tolText}`]);
    rows.push(['Cut', d.cut
      ? `${d.cut}-cut: principal ${d.cut} along the face normal; ${plates.map((p, i) => `plate ${i + 1} slow axis at ${deg(p.axis_azimuth_deg)}`).join(', ')}${plates.length > 1 ? ' (crossed)' : ''}`
      : plates.some((p) => p.cut) ? plateCuts(plates)
        : `optic axis in the face (90° to the face normal); ${plates.map((p, i) => `plate ${i + 1} axis at ${deg(p.axis_azimuth_deg)}`).join(', ')}${plates.length > 1 ? ' (crossed)' : ''}`]);
    rows.push(['Clear aperture', 'to suit the beam (the request sets none)']);
    rows.push(['Wavelength band', bandText(d.wavelength_curve, wl)]);
    if (d.kind === 'waveplate') {
      // A bound (`acceptance_bound` "at_least") is written as one: the limit was not reached.
      const acceptance = d.acceptance_bound === 'at_least'
        ? `≥ ${deg(d.acceptance_deg, 3)} of incidence (the limit was not reached within the angles computed)`
        : `${deg(d.acceptance_deg, 3)} of incidence`;
      rows.push(['Performance', `retardance ${sheetNumber(d.retardance_waves, 5)} waves at ${nm(wl)}, ${d.order} order; acceptance ${acceptance}`]);
    } else {
      rows.push(['Performance', `largest departure from the target over the band ${sheetNumber(d.max_error_waves, 3)} waves`]);
    }
  } else if (d.kind === 'recombiner') {
    rows.push(...materialRows(r.material ?? 'custom', 'Material', materialList));
    const els = d.scenario?.elements ?? [];
    const first = els.find((e) => e.kind === 'crystal');
    const lenTol = Math.min(...(d.length_mismatch_to_break_mm ?? []).map(Math.abs).filter(Number.isFinite));
    const tiltTol = Math.min(...(d.tilt_mismatch_to_break_deg ?? []).map(Math.abs).filter(Number.isFinite));
    rows.push(['Dimensions', `two displacers, each ${mm(first?.thickness_mm ?? r.length_mm)} long, matched within ${mm(lenTol, 2)} (where the pair stops recombining)`]);
    rows.push(['Cut', `optic axis at ${deg(first?.axis?.tilt_deg)} to the face normal in both, matched within ${deg(tiltTol, 2)}`]);
    rows.push(['Clear aperture', 'to suit the beam and the displacement (the request sets none)']);
    rows.push(['Wavelength band', bandText(null, d.scenario?.wavelength_nm ?? r.wavelength_nm ?? 632.8)]);
    rows.push(['Performance', d.verdict ?? '']);
  } else if (d.kind === 'angular-splitter') {
    rows.push(...splitterRows(d, r, materialList));
  } else if (d.kind === 'prism-polarizer') {
    rows.push(...polarizerRows(d, r, materialList));
  } else if (d.kind === 'tilt-tuning') {
    rows.push(...tiltRows(d, r, materialList));
  } else if (d.kind === 'quartz-rotator') {
    rows.push(...rotatorRows(d, materialList));
  } else if (d.kind === 'birefringent-filter') {
    const plates = d.plates ?? [];
    rows.push(...materialRows(d.scenario?.elements?.[1]?.material ?? 'custom', 'Material', materialList));
    rows.push(['Dimensions', `${plates.map((p, i) => `plate ${i + 1}: ${mm(p.thickness_mm)}`).join('; ')} (as made at 20 °C)`]);
    rows.push(['Cut', `${d.cut ? `${d.cut}-cut: principal ${d.cut} along the face normal, slow axes in the faces at` : 'optic axes in the faces at'} ${plates.map((p) => deg(p.axis_azimuth_deg)).join(', ')}; polarizers at ${(d.polarizers_deg ?? []).map((v) => deg(v)).join(', ')}, in order (${d.layout})`]);
    rows.push(['Performance', `pass band ${sheetNumber(d.fwhm_nm, 4)} nm wide (FWHM) at ${nm(d.wavelength_nm)}; neighbouring peaks at ${(d.neighbour_peaks_nm ?? []).map((v) => (typeof v === 'number' ? nm(v) : 'none')).join(' and ')}`]);
  } else if (d.kind === 'broadband-retarder') {
    const plates = d.plates ?? [];
    plates.forEach((p, i) => rows.push(...materialRows(p.material, `Material, plate ${i + 1}`, materialList)));
    rows.push(['Dimensions', `${plates.map((p, i) => `plate ${i + 1}: ${mm(p.thickness_mm)}`).join('; ')} (as made at 20 °C), stacked in this order`]);
    rows.push(['Cut', plates.some((p) => p.cut) ? plateCuts(plates) : `optic axes in the faces at ${plates.map((p) => deg(p.axis_azimuth_deg)).join(', ')}`]);
    const dep = d.departures ?? {};
    rows.push(['Performance', `retardance ${sheetNumber(d.target_retardance_waves, 4)} waves within ±${sheetNumber(dep.retardance_waves, 3)} waves and fast axis within ±${sheetNumber(dep.fast_axis_deg, 3)}° from ${nm(d.band_nm?.[0])} to ${nm(d.band_nm?.[1])}`]);
  } else if (d.kind === 'lc-voltage') {
    const cell = d.scenario?.elements?.[0] ?? {};
    rows.push(['Cell', `${cell.lc ?? ''} nematic, ${sheetNumber(cell.thickness_um, 4)} µm gap, rubbing at ${deg(cell.rubbing_azimuth_deg)}, twist ${deg(cell.twist_deg)}, pretilt ${deg(cell.pretilt_deg)}`]);
    rows.push(['Performance', `${sheetNumber(d.retardance_waves, 5)} waves at ${nm(d.wavelength_nm)} at ${sheetNumber(d.voltage_v, 5)} V RMS (threshold ${sheetNumber(d.threshold_voltage_v, 4)} V)`]);
    if (d.range) rows.push(['Range', `a ${sheetNumber(d.range.thickness_um, 4)} µm cell spans ${sheetNumber(d.range.range_waves[0], 4)} to ${sheetNumber(d.range.range_waves[1], 4)} waves`]);
  } else if (d.kind === 'athermal-waveplate') {
    const plates = d.plates ?? [];
    plates.forEach((p, i) => rows.push(...materialRows(p.material, `Material, plate ${i + 1}`, materialList)));
    rows.push(['Dimensions', `${plates.map((p, i) => `plate ${i + 1}: ${mm(p.thickness_mm)} thick`).join('; ')} (as made at 20 °C)`]);
    rows.push(['Cut', plates.some((p) => p.cut) ? plateCuts(plates) : `optic axis in the face (90° to the face normal); ${plates.map((p, i) => `plate ${i + 1} axis at ${deg(p.axis_azimuth_deg)}`).join(', ')}`]);
    const [lo, hi] = d.temperature?.band_c ?? [];
    rows.push(['Performance', `retardance ${sheetNumber(d.retardance_waves, 5)} waves at ${nm(d.wavelength_nm)}; within ±${sheetNumber(d.acceptance_error_waves, 2)} waves from ${sheetNumber(lo, 4)} to ${sheetNumber(hi, 4)} °C`]);
  }
  // A part designed for another temperature than the one it is made at says so.
  const t0 = d.temperature?.design_temperature_c;
  if (typeof t0 === 'number' && t0 !== 20) rows.push(['Temperature', `designed to work at ${sheetNumber(t0, 4)} °C; dimensions as made at 20 °C`]);
  // The design's warnings and the shop's notes, in the panel's words (lists of text).
  if (shown.warnings?.length) rows.push(['Warnings', shown.warnings]);
  if (shown.notes?.length) rows.push(['Shop notes', shown.notes]);
  return rows;
}

/**
 * Writes #order-sheet from the design shown in the design panel ({kindName, request, design,
 * complete, warnings, notes}; the last two lists of text in the panel's words), or empties it
 * (null). The materials' catalogue comes from the page's state (state.materialList).
 */
export function updateOrderSheet(state, shown) {
  const box = document.getElementById('order-sheet');
  if (!box) return;
  if (!shown) {
    box.replaceChildren();
    box.removeAttribute('data-ready');
    return;
  }
  const list = h('dl', { className: 'order-list' });
  for (const [term, text] of orderRows(shown, state.materialList)) {
    const dd = Array.isArray(text) ? h('dd', {}, h('ul', {}, ...text.map((t) => h('li', { text: t })))) : h('dd', { text });
    list.appendChild(h('div', { 'data-order': term }, h('dt', { text: term }), dd));
  }
  box.replaceChildren(
    h('h2', { text: `Order sheet: ${shown.kindName}` }),
    h('p', { className: 'small', text: 'From the design panel of Doublespar: what to order, with the tolerances the design assumed.' }),
    list,
    h('p', { className: 'order-safety', text: SAFETY_LINE }),
  );
  box.setAttribute('data-ready', 'true');
}
