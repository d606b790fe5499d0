// Doublespar page: the convergent-light views, `conoscope` (the set-up's transmission over a 30°
// cone) and `acceptance` (the first crystal's retardance error over it). Each is a map of
// 256 × 256 directions, every one an exact plane-wave solution, too
// much for the page's main thread: the page's module does not carry that computation. A worker on
// the design build of the core (core-worker.js, design-worker.js: its `convergent` message)
// computes the maps; the page hands each to its session (session.setConvergent, with
// the map or the error and the field it names), which draws the view as any other (and
// exports it as SVG).
//
// When: only while the views' disclosure is open (views.js asks through needConvergent when it
// draws an open view whose map the session lacks; tracing a new scenario clears the session's
// maps). One request is in flight at a time; edits meanwhile mark it stale, and when its last
// answer arrives the newest scenario is asked for. An answer is used only if the session still
// shows the scenario it was computed for (compared as the session's own JSON text), so a newer
// edit always wins. While a map is computed the view keeps its last picture (or, the first time,
// its rings and a note), the figure is aria-busy and a status line says so.
//
// White light: with the switch #conoscope-white on, each request also asks for the conoscopic
// figure in white light (the request's white_pixels, WHITE_PIXELS per side: every direction at
// the colour tables' 81 wavelengths), which the worker sends last; it is drawn as one ImageData on
// its own canvas, with the core's note of the sampling below it. The figure is 81 times a map's
// work, so its rows are shared among WHITE_PARTS workers (as many as the machine has cores, at
// most 4): the views' worker computes the first part after its maps, and helper workers (started
// with the first white-light request and kept) the others; the parts are put together by the
// core's rule (part k of n: rows ⌊side·k/n⌋ to ⌊side·(k+1)/n⌋) and drawn when all have arrived.
//
// Contract: views.js sets state.convergent.drawByName(name) (redraws one view) and calls
// lacksConvergent and needConvergent; the test hook reads state.convergent's busy and ms (for
// each view, ms from posting the last request to the view drawn).

import { setAttr, setText } from './dom.js';
import { startCoreWorker } from './core-worker.js';

const PIXELS = 256;
const WHITE_PIXELS = 256;
const VIEWS = ['conoscope', 'acceptance'];
const WHITE_PARTS = Math.min(4, Math.max(1, navigator.hardwareConcurrency || 1));

const whiteOn = () => document.getElementById('conoscope-white')?.checked === true;

/** Wires the white-light switch, once: on, it shows the figure, asking for it if lacking. */
function wireWhite(state) {
  const c = state.convergent;
  const box = document.getElementById('conoscope-white');
  if (c.whiteWired || !box) return;
  c.whiteWired = true;
  box.addEventListener('change', () => {
    document.getElementById('conoscope-white-box').hidden = !box.checked;
    if (!box.checked || c.have.has(`white ${state.session.scenarioJson()}`)) return;
    if (c.busy) c.again = true;
    else needConvergent(state);
  });
}

/**
 * Draws the workers' white-light figure from its parts (each `{colour}` or `{error}`, in order:
 * RGBA bytes of the whole figure with only the part's rows drawn) and its note, or the first
 * part's error.
 */
function drawWhite(parts) {
  const note = document.getElementById('conoscope-white-note');
  const bad = parts.find((p) => !p.colour);
  if (bad) {
    setText(note, `White light not drawn: ${bad.error?.message} (${bad.error?.field}).`);
    return;
  }
  const { pixels } = parts[0].colour;
  const rgba = new Uint8ClampedArray(pixels * pixels * 4);
  parts.forEach(({ colour }, k) => {
    const [from, to] = [k, k + 1].map((i) => Math.floor((pixels * i) / parts.length) * pixels * 4);
    rgba.set(colour.rgba.subarray(from, to), from);
  });
  const canvas = document.getElementById('conoscope-white-canvas');
  canvas.width = canvas.height = pixels;
  canvas.getContext('2d').putImageData(new ImageData(rgba, pixels, pixels), 0, 0);
  setText(note, `White light: ${parts[0].colour.note}.`);
}

/**
 * Whether `name` is a view the worker computes whose map the session lacks (tracing a scenario
 * clears the session's maps: a map is the session's while it shows the text it was computed for).
 */
export function lacksConvergent(state, name) {
  return VIEWS.includes(name) && !state.convergent.have.has(`${name} ${state.session.scenarioJson()}`);
}

function setBusy(busy, text) {
  const figure = document.getElementById('conoscope-open').closest('figure');
  setAttr(figure, 'aria-busy', String(busy));
  setText(document.getElementById('convergent-status'), text);
}

/** Ends the workers (new ones start with the next request) and says why. */
function failed(c, why) {
  c.worker?.terminate();
  c.helpers?.forEach((w) => w.terminate());
  c.worker = c.busy = null;
  c.helpers = [];
  setBusy(false, `Convergent light could not be computed: ${why}`);
}

/** Whether `w` is one of the convergent views' current workers. */
const ours = (c, w) => w === c.worker || (c.helpers ?? []).includes(w);

function startWorker(state) {
  const c = state.convergent;
  const w = startCoreWorker();
  w.onmessage = (ev) => ours(c, w) && onAnswer(state, ev.data);
  w.onerror = (ev) => {
    ev.preventDefault();
    if (ours(c, w)) failed(c, ev.message || 'the worker stopped');
  };
  return w;
}

/**
 * Asks the worker for the maps of the session's scenario, unless a request is in flight (then it
 * is asked for when that one ends, if the scenario changed) or the disclosure is closed.
 */
export function needConvergent(state) {
  const c = state.convergent;
  if (!document.getElementById('conoscope-open').open) return;
  wireWhite(state);
  const text = state.session.scenarioJson();
  if (c.busy) {
    c.again ||= c.busy.text !== text;
    return;
  }
  const white = whiteOn() ? WHITE_PIXELS : 0;
  const parts = white ? WHITE_PARTS : 1;
  let w;
  try {
    w = c.worker ??= startWorker(state);
    c.helpers ??= [];
    while (c.helpers.length < parts - 1) c.helpers.push(startWorker(state));
  } catch (e) {
    failed(c, e?.message ?? e);
    return;
  }
  c.have.clear();
  c.nextId += 1;
  // Each worker asked sends one answer marked `last`; the white-light parts gather in `white`.
  c.busy = { id: c.nextId, text, posted: performance.now(), waiting: parts, parts, white: white ? [] : null };
  c.again = false;
  // A set-up with a liquid-crystal cell is computed at fewer directions (the core's cap): the
  // status names what was computed once the maps arrive.
  c.pixels = 0;
  setBusy(true, `Computing up to ${PIXELS} × ${PIXELS} directions in the background…`);
  const ask = { type: 'convergent', id: c.nextId, scenario: text, pixels: PIXELS, white_pixels: white };
  w.postMessage({ ...ask, views: VIEWS, white_part: [0, parts] });
  for (let k = 1; k < parts; k += 1) c.helpers[k - 1].postMessage({ ...ask, views: [], white_part: [k, parts] });
}

function onAnswer(state, msg) {
  const c = state.convergent;
  const { busy } = c;
  // A worker that could not load the core answers nothing more: without this, the request
  // would wait for it for ever.
  if (msg?.type === 'failed') {
    failed(c, msg.message);
    return;
  }
  if (msg?.type !== 'convergent' || msg.id !== busy?.id) return;
  const current = state.session.scenarioJson() === busy.text;
  if (msg.view === 'white') {
    busy.white[msg.part >>> 0] = msg;
    const parts = [...busy.white];
    if (current && parts.length === busy.parts && parts.every(Boolean)) {
      drawWhite(parts);
      c.have.add(`white ${busy.text}`);
      c.ms.white = performance.now() - busy.posted;
    }
  } else if (current) {
    const { map = {}, error = {} } = msg;
    try {
      state.session.setConvergent(msg.view, map.pixels ?? 0, map.values ?? [], map.min, map.max, error.field ?? '', error.message ?? '');
    } catch (e) {
      failed(c, e?.message ?? e);
      return;
    }
    c.pixels = Math.max(c.pixels, map.pixels ?? 0);
    c.have.add(`${msg.view} ${busy.text}`);
    c.drawByName(msg.view);
    c.ms[msg.view] = performance.now() - busy.posted;
  }
  if (msg.internal) failed(c, msg.error.message);
  else if (msg.last && --busy.waiting === 0) {
    c.busy = null;
    if (c.again || !current) needConvergent(state);
    const n = c.pixels || PIXELS;
    // Fewer directions than asked: the core's cap for a set-up with a liquid-crystal cell.
    const why = n < PIXELS ? ' (fewer for a liquid-crystal cell, which is solved again at every direction)' : '';
    if (!c.busy) setBusy(false, current ? `${n} × ${n} directions computed in ${Math.round(performance.now() - busy.posted)} ms${why}.` : '');
  }
}
