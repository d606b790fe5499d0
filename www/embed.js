// Doublespar views for documentation pages: the custom element <spar-figure>.
//
//   <script type="module" src="path/to/embed.js"></script>
//   <spar-figure views="side end" scenario='{"version": 1, …}'></spar-figure>
//   <spar-figure interactive>
//     <script type="application/json">{"version": 1, …}</script>
//   </spar-figure>
//
// Attributes:
//   scenario     the scenario as JSON text (traced again whenever it changes); without it, the
//                first <script type="application/json"> child (read once, when the core has
//                loaded); without either, the demo
//   views        view names separated by spaces or commas (default "side end"); any of viewNames()
//   interactive  adds sliders: the polarization azimuth, and the thickness and axis tilt of the
//                first crystal plate (when there is one)
//
// Each element has its own Session of the core (pkg/doublespar.js, next to this file, loaded
// once per page). It is sized by CSS (the views share its height; 16rem unless the page says
// otherwise) and redraws when resized. A bad scenario or view shows its message inside the
// element; the last good picture stays. Nothing is fetched but the core and format.js, from beside this file.
//
// For scripts (tests, pages that want the numbers): `el.result` (the last good result object),
// `el.scenario` (the current scenario with every default written out, an object), `el.session`,
// `el.ready` (a promise resolved after the first trace), and the attribute `data-state`
// ("loading", "ready" or "error"). The separation of the first crystal plate is shown with
// data-quantity="elements[i].separation_mm" and data-value, as on the page, its text written by
// the page's formatter (format.js, beside this file: the core's rules, tested against the same
// cases).
//
// Narrow figures (below STACK_BELOW_PX, e.g. a 240 px column) stack their views vertically, each
// at least 9rem high (the attribute data-stacked on the element says so); the core's label
// placement leaves out secondary labels in such small panels.
//
// The convergent-light views (conoscope, acceptance) are computed off the page's thread, by a
// worker of the element's own on design-worker.js (beside this file, with pkg-design/): one
// request at a time, the newest scenario asked for when it ends, an answer used only while the
// element still shows the scenario it was computed for; until then the view says it is computing.

import { lengthIn, lengthUnitFor } from './format.js';

const CORE_URL = new URL('./pkg/doublespar.js', import.meta.url).href;
// The convergent-light views are computed by a worker on the design build (design-worker.js and
// pkg-design/, beside this file), started when an element first shows one.
const WORKER_URL = new URL('./design-worker.js', import.meta.url).href;
const CONVERGENT = ['conoscope', 'acceptance'];
const CONVERGENT_PIXELS = 256;
const TAG = 'spar-figure';
const DEFAULT_VIEWS = ['side', 'end'];
const STACK_BELOW_PX = 480; // narrower figures stack their views

let corePromise = null;
function loadCore() {
  if (!corePromise) {
    corePromise = import(CORE_URL).then(async (m) => {
      await m.default();
      return m;
    });
  }
  return corePromise;
}

const darkQuery = window.matchMedia('(prefers-color-scheme: dark)');

const STYLE = `
:host { display: block; height: 16rem; font: 0.85rem/1.35 system-ui, sans-serif; color: CanvasText;
  border: 1px solid color-mix(in srgb, CanvasText 20%, transparent); border-radius: 6px; overflow: hidden;
  box-sizing: border-box; }
:host([hidden]) { display: none; }
.frame { display: flex; flex-direction: column; height: 100%; }
.views { flex: 1 1 auto; min-height: 0; display: grid; grid-auto-flow: column; grid-auto-columns: 1fr; gap: 1px;
  background: color-mix(in srgb, CanvasText 12%, transparent); }
.box { position: relative; min-width: 0; min-height: 0; background: Canvas; }
:host([data-stacked]) { height: auto !important; } /* over a page's own height: both views show whole */
:host([data-stacked]) .views { grid-auto-flow: row; grid-auto-columns: auto; grid-auto-rows: minmax(9rem, 1fr); }
canvas { position: absolute; inset: 0; width: 100%; height: 100%; display: block; }
.bar { display: flex; flex-wrap: wrap; gap: 0.25rem 1rem; align-items: center; padding: 0.3rem 0.6rem; }
.bar:empty { display: none; }
label { display: inline-flex; gap: 0.4rem; align-items: center; max-width: 100%; }
input[type=range] { width: 8rem; min-width: 3rem; flex: 0 1 8rem; } /* narrows before the readout is cut */
output { font-variant-numeric: tabular-nums; min-width: 4.5em; }
.readout { font-variant-numeric: tabular-nums; }
.error { margin: 0; padding: 0.3rem 0.6rem; color: #b00020; background: color-mix(in srgb, #b00020 10%, Canvas);
  overflow-wrap: anywhere; }
.error[hidden] { display: none; }
@media (prefers-color-scheme: dark) { .error { color: #ff8a80; } }
`;

let sheet = null;
/** One constructed sheet of STYLE, adopted by every figure's shadow root. */
function sharedSheet() {
  if (!sheet) {
    sheet = new CSSStyleSheet();
    sheet.replaceSync(STYLE);
  }
  return sheet;
}

function el(tag, props = {}, ...children) {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(props)) {
    if (k === 'className') node.className = v;
    else if (k === 'textContent') node.textContent = v;
    else node.setAttribute(k, v);
  }
  for (const c of children) node.append(c);
  return node;
}

function errorText(e) {
  if (e && typeof e === 'object' && typeof e.message === 'string') {
    return e.field ? `${e.field}: ${e.message}` : e.message;
  }
  return String(e);
}

class SparFigure extends HTMLElement {
  static get observedAttributes() {
    return ['scenario', 'views', 'interactive'];
  }

  constructor() {
    super();
    this._core = null;
    this._session = null;
    this._result = null;
    this._views = [];
    this._started = false;
    const root = this.attachShadow({ mode: 'open' });
    // A constructed sheet, not a <style> element: the page's CSP allows no inline style.
    root.adoptedStyleSheets = [sharedSheet()];
    this._error = el('p', { className: 'error', role: 'alert', part: 'error', hidden: '' });
    this._viewBox = el('div', { className: 'views', part: 'views' });
    this._bar = el('div', { className: 'bar', part: 'controls' });
    this._frame = el('div', { className: 'frame' }, this._error, this._viewBox, this._bar);
    root.append(this._frame);
    this._ro = new ResizeObserver((entries) => {
      for (const entry of entries) {
        if (entry.target === this) {
          this.toggleAttribute('data-stacked', entry.contentRect.width < STACK_BELOW_PX);
          continue;
        }
        const v = this._views.find((x) => x.box === entry.target);
        if (v) this._drawOne(v);
      }
    });
    this._onScheme = () => this._drawAll();
    let resolveReady;
    this.ready = new Promise((r) => {
      resolveReady = r;
    });
    this._resolveReady = resolveReady;
  }

  /** The last good result object (null before the first trace). */
  get result() {
    return this._result ? structuredClone(this._result) : null;
  }

  /** The current scenario, every default written out (null before the core has loaded). */
  get scenario() {
    return this._session ? JSON.parse(this._session.scenarioJson()) : null;
  }

  /** This element's own Session of the core. */
  get session() {
    return this._session;
  }

  connectedCallback() {
    darkQuery.addEventListener('change', this._onScheme);
    this._ro.observe(this);
    if (this._started) {
      for (const v of this._views) this._ro.observe(v.box);
      return;
    }
    this._started = true;
    this.setAttribute('data-state', 'loading');
    loadCore()
      .then((core) => {
        this._core = core;
        this._session = new core.Session();
        this._buildViews();
        this._apply();
        this._resolveReady();
      })
      .catch((e) => {
        this._showError(`The optics core could not be loaded (${e && e.message ? e.message : e}).`);
        this._resolveReady();
      });
  }

  disconnectedCallback() {
    darkQuery.removeEventListener('change', this._onScheme);
    this._ro.disconnect();
    if (this._worker) this._worker.terminate();
    this._worker = null;
    this._mapsText = null;
    this._mapsBusy = false;
  }

  /** Asks the worker for the convergent-light maps of the session's scenario (see the header). */
  _needMaps() {
    const text = this._session.scenarioJson();
    if (this._mapsText === text) return;
    if (this._mapsBusy) {
      this._mapsAgain = true;
      return;
    }
    if (!this._worker) {
      this._worker = new Worker(WORKER_URL, { type: 'module' });
      this._worker.onmessage = (ev) => this._onMap(ev.data);
      this._worker.onerror = (ev) => {
        ev.preventDefault();
        this._showError(`The convergent-light views could not be computed: ${ev.message || 'the worker stopped'}.`);
      };
    }
    this._mapsText = text;
    this._mapsBusy = true;
    this._mapsAgain = false;
    const views = this._views.map((v) => v.name).filter((n) => CONVERGENT.includes(n));
    this._worker.postMessage({ type: 'convergent', id: 0, scenario: text, pixels: CONVERGENT_PIXELS, views });
  }

  _onMap(msg) {
    if (msg?.type !== 'convergent' || !this._session) return;
    if (this._session.scenarioJson() === this._mapsText) {
      const { map = {}, error = {} } = msg;
      this._session.setConvergent(msg.view, map.pixels ?? 0, map.values ?? [], map.min, map.max, error.field ?? '', error.message ?? '');
      for (const v of this._views) if (v.name === msg.view) this._drawOne(v);
    }
    if (msg.last) {
      this._mapsBusy = false;
      if (this._mapsAgain) this._needMaps();
    }
  }

  attributeChangedCallback(name, oldValue, newValue) {
    if (!this._session || oldValue === newValue) return;
    if (name === 'views') this._buildViews();
    else if (name === 'scenario') this._apply();
    else if (name === 'interactive') this._buildControls();
  }

  /** The scenario text from the attribute, else the JSON child, else null (the demo). */
  _scenarioText() {
    if (this.hasAttribute('scenario')) return this.getAttribute('scenario');
    const child = this.querySelector(':scope > script[type="application/json"]');
    return child ? child.textContent : null;
  }

  _viewNames() {
    const text = this.getAttribute('views');
    const names = text === null || text.trim() === '' ? DEFAULT_VIEWS : text.trim().split(/[\s,]+/);
    const known = this._core.viewNames();
    const bad = names.filter((n) => !known.includes(n));
    return { names: names.filter((n) => known.includes(n)), bad, known };
  }

  _buildViews() {
    this._ro.disconnect();
    this._ro.observe(this);
    this._viewBox.replaceChildren();
    this._views = [];
    const { names, bad, known } = this._viewNames();
    this._viewError = bad.length ? `Unknown view ${bad.map((b) => `"${b}"`).join(', ')}; the views are ${known.join(', ')}.` : null;
    for (const name of names) {
      const canvas = el('canvas', { 'data-view': name, role: 'img', 'aria-label': `${name} view` });
      const box = el('div', { className: 'box' }, canvas);
      this._viewBox.append(box);
      const v = { name, canvas, box };
      this._views.push(v);
      this._ro.observe(box);
    }
    this._showError(this._viewError);
    if (this._result) this._drawAll();
  }

  /** Traces the scenario the element is given; on error keeps the last good one and says why. */
  _apply() {
    const text = this._scenarioText();
    try {
      this._result = text === null ? this._session.result() : this._session.updateJson(text);
      this._mapsText = null; // tracing clears the session's maps
      this._showError(this._viewError);
      this.setAttribute('data-state', this._viewError ? 'error' : 'ready');
    } catch (e) {
      // The last good picture (if any) stays; before the first good trace, nothing is drawn.
      this._showError(`The scenario is not valid. ${errorText(e)}`);
      this.setAttribute('data-state', 'error');
    }
    this._buildControls();
    this._showReadout();
    this._drawAll();
  }

  _showError(text) {
    this._error.textContent = text || '';
    this._error.hidden = !text;
  }

  _firstCrystal() {
    const sc = this.scenario;
    if (!sc || !Array.isArray(sc.elements)) return -1;
    return sc.elements.findIndex((e) => e.kind === 'crystal');
  }

  _buildControls() {
    this._bar.replaceChildren();
    this._readout = null;
    const sc = this._session ? this.scenario : null;
    if (!sc) return;
    const i = this._firstCrystal();
    if (i >= 0) {
      this._readout = el('span', { className: 'readout', 'data-quantity': `elements[${i}].separation_mm` });
    }
    if (this.hasAttribute('interactive')) {
      const pol = sc.beam && sc.beam.polarization;
      if (pol && pol.kind === 'linear' && typeof pol.azimuth_deg === 'number') {
        this._bar.append(this._slider('Polarization azimuth', 'beam.polarization.azimuth_deg', pol.azimuth_deg, -90, 90, 1, '°'));
      }
      if (i >= 0) {
        const c = sc.elements[i];
        const maxT = Math.max(20, Math.ceil(c.thickness_mm * 2));
        this._bar.append(this._slider('Thickness', `elements[${i}].thickness_mm`, c.thickness_mm, 0.1, maxT, 0.1, ' mm'));
        // `axes` (a biaxial or rolled crystal) or `axis`: the slider writes back the form it read.
        const form = c.axes ? 'axes' : 'axis';
        if (c[form] && typeof c[form].tilt_deg === 'number') {
          this._bar.append(this._slider('Axis tilt', `elements[${i}].${form}.tilt_deg`, c[form].tilt_deg, 0, 90, 0.5, '°'));
        }
      }
    }
    if (this._readout) this._bar.append(this._readout);
  }

  _slider(label, fieldPath, value, min, max, step, unit) {
    const input = el('input', { type: 'range', min: String(min), max: String(max), step: String(step), 'data-field': fieldPath });
    input.value = String(value);
    const out = el('output', { textContent: `${Number(value).toFixed(step < 1 ? 1 : 0)}${unit}` });
    input.addEventListener('input', () => {
      const v = Number(input.value);
      out.textContent = `${v.toFixed(step < 1 ? 1 : 0)}${unit}`;
      this._setField(fieldPath, v);
    });
    return el('label', {}, `${label} `, input, out);
  }

  /** Sets one field of the current scenario and traces it (the attribute is left alone). */
  _setField(fieldPath, value) {
    const sc = this.scenario;
    const parts = fieldPath.split('.').flatMap((p) => {
      const m = /^(\w+)\[(\d+)\]$/.exec(p);
      return m ? [m[1], Number(m[2])] : [p];
    });
    let o = sc;
    for (const p of parts.slice(0, -1)) o = o[p];
    o[parts[parts.length - 1]] = value;
    try {
      this._result = this._session.updateJson(JSON.stringify(sc));
      this._showError(this._viewError);
    } catch (e) {
      this._showError(`${errorText(e)}`);
    }
    this._showReadout();
    this._drawAll();
    this.dispatchEvent(new CustomEvent('spar-change', { detail: { field: fieldPath, value } }));
  }

  _showReadout() {
    if (!this._readout || !this._result) return;
    const i = Number(/\[(\d+)\]/.exec(this._readout.getAttribute('data-quantity'))[1]);
    const e = this._result.elements && this._result.elements[i];
    const sep = e && typeof e.separation_mm === 'number' ? e.separation_mm : null;
    this._readout.setAttribute('data-value', sep === null ? '' : String(sep));
    this._readout.textContent = sep === null ? '' : `o–e separation ${lengthIn(sep, lengthUnitFor(sep), 4)}`;
  }

  _drawAll() {
    for (const v of this._views) this._drawOne(v);
  }

  _drawOne(v) {
    if (!this._session || !this._result) return;
    if (v.canvas.clientWidth === 0 || v.canvas.clientHeight === 0) return;
    try {
      if (CONVERGENT.includes(v.name)) this._needMaps();
      this._session.draw(v.name, v.canvas, darkQuery.matches);
      v.canvas.setAttribute('aria-label', `${v.name} view of the stack`);
    } catch (e) {
      this._showError(`The ${v.name} view could not be drawn: ${errorText(e)}`);
    }
  }
}

if (!customElements.get(TAG)) customElements.define(TAG, SparFigure);

export { SparFigure, TAG };
