// Doublespar page: exports and the print sheet. Each view as SVG or PNG, the plots' data as CSV
// or JSON, the results and the set-up; every file is made in the page and handed over through a
// Blob URL and a temporary <a download>: nothing is sent anywhere. The print sheet (#print-setup)
// is a compact read-only summary of the set-up, shown only when printing.
//
// Contract: setupExport({session, views}), called once by app.js after the views are found,
// adds after each view's box a row of buttons with data-export="<view>:<svg|png|csv|json>" (data
// formats for the plots only) and answers them and the results' [data-export] buttons
// (results:json, results:csv, scenario:json) with files named doublespar-<what>.<format>; the
// outcome is said in #export-status. updatePrintSheet(scenario, kindNames) rewrites the sheet
// after every trace.

import { h } from './dom.js';
import { minus } from './format.js';
import { toFieldError } from './field-error.js';

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
let exportSource = null; // {session, views}: what the page shows (setupExport)

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
  const v = exportSource.views.find((x) => x.name === view);
  if (!v) return;
  const drawn = v.canvas.dataset.view; // the side view's plane may have changed it
  const name = `doublespar-${drawn}.${format}`;
  if (format === 'svg') {
    const w = Math.max(1, Math.round(v.canvas.clientWidth));
    const hgt = Math.max(1, Math.round(v.canvas.clientHeight));
    download(name, new Blob([exportSource.session.svg(drawn, w, hgt, false)], { type: 'image/svg+xml' }));
  } else if (format === 'png') {
    v.canvas.toBlob((blob) => {
      if (blob) download(name, blob);
      else exportStatus(`Could not make ${name}: the view has no picture yet.`, true);
    }, 'image/png');
  } else {
    const s = exportSource.session.series(view);
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
    download('doublespar-scenario.json', jsonBlob(JSON.parse(exportSource.session.scenarioJson())));
  } else if (format === 'json') {
    download('doublespar-results.json', jsonBlob({
      scenario: JSON.parse(exportSource.session.scenarioJson()),
      result: exportSource.session.result(),
    }));
  } else {
    download('doublespar-results.csv', new Blob([resultsCsv(exportSource.session.result())], { type: 'text/csv' }));
  }
}

function onExportClick(ev) {
  const btn = ev.target.closest('button[data-export]');
  if (!btn || !exportSource) return;
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

/**
 * Puts the export buttons after every view's box and answers their clicks (and those of the
 * results' buttons). `session` is the page's Session, `views` its list of {name, canvas, box}.
 */
export function setupExport({ session, views }) {
  exportSource = { session, views };
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
