// Doublespar design worker: solves design requests off the page's main thread, so that a long
// Monte Carlo tolerance run never blocks the page. A module worker (new Worker('design-worker.js',
// {type: 'module'})) that loads the design build of the core, ./pkg-design/doublespar.js (built
// by scripts/build-web.sh; it adds designJson and the DesignRun object to the page's exports).
//
// Protocol (every message carries the id of its request):
//   page -> worker  {type: 'solve', id, request}          request: a design request object
//   worker -> page  {type: 'ready'}                        once the core has loaded
//                   {type: 'nominal', id, design, total}   displacer with samples > 0: the design
//                                                          without its Monte Carlo summary, and
//                                                          the samples the run draws
//                   {type: 'progress', id, done, total, chunk, chunks}   after each chunk
//                   {type: 'done', id, design}             the complete design (for a displacer
//                                                          run: with monte_carlo filled in)
//                   {type: 'error', id, error: {field, message}, internal}
//                   {type: 'failed', message}              the core could not be loaded
//   page -> worker  {type: 'convergent', id, scenario, pixels, views, white_pixels, white_part}
//                   scenario: JSON text; views: some of 'conoscope', 'acceptance' (or none);
//                   white_pixels (optional, 0 or absent for none): also the conoscopic figure in
//                   white light at that many pixels per side (1 to 256), after the views;
//                   white_part (optional, [0, 1] when absent): [k, n], only the k-th of n
//                   parts of its rows, so that n workers share the figure
//   worker -> page  {type: 'convergent', id, view, last, map: {pixels, min, max, values}}
//                   or {type: 'convergent', id, view, last, error: {field, message}, internal}
//                   one per view, in the order asked, `last` on the last; values a Float64Array
//                   (transferred) row-major from the top row, NaN outside the cone
//   worker -> page  {type: 'convergent', id, view: 'white', part, last: true, colour: {pixels, rgba, note}}
//                   or {…, error: {field, message}}: the white-light figure (its part `part`),
//                   when white_pixels asked for it (the last answer then); rgba a Uint8Array
//                   (transferred) of pixels × pixels × 4 bytes for an ImageData, with only the
//                   part's rows drawn (the core's part_rows), transparent outside the cone
//                   (fewer pixels than asked for a set-up with a liquid-crystal cell: the core's
//                   cap); note: the illuminant, observer and wavelengths sampled
//
// A run is one DesignRun of the core: it reads and checks the request and solves the nominal
// design once, then draws the Monte Carlo chunks exactly as the core does in one go (each chunk
// from its own seeded generator; chunk size, defaults and limits are the core's), so its summary
// is the `monte_carlo` that designJson (and `doublespar design`) gives for the same request.
// Cancelling is the page's business: it terminates this worker.
//
// A convergent-light request computes the maps of the page's conoscope and acceptance views with
// the core's convergentMap (every direction of the cone an exact plane-wave solution), for the
// page to draw; the page keeps one request in flight and drops answers for a scenario it no longer
// shows.

import init, { DesignRun, convergentMap, convergentWhite, convergentWhiteNote } from './pkg-design/doublespar.js';

const queue = [];
let ready = false;

/** {field, message} from what the core threw; anything else is an internal error. */
function asFieldError(e) {
  if (e && typeof e === 'object' && !(e instanceof Error) && typeof e.message === 'string') {
    return { error: { field: typeof e.field === 'string' ? e.field : '', message: e.message }, internal: false };
  }
  const what = e && e.message ? e.message : String(e);
  return { error: { field: '', message: `internal error in the design core: ${what}` }, internal: true };
}

function solve(id, request) {
  const run = new DesignRun(JSON.stringify(request));
  try {
    const design = run.nominal();
    const total = run.samples;
    if (total === 0) {
      self.postMessage({ type: 'done', id, design });
      return;
    }
    self.postMessage({ type: 'nominal', id, design, total });
    const chunks = run.chunks;
    for (let k = 0; k < chunks; k += 1) {
      const done = run.chunk(k);
      self.postMessage({ type: 'progress', id, done, total, chunk: k + 1, chunks });
    }
    self.postMessage({ type: 'done', id, design: { ...design, monte_carlo: run.summary() } });
  } finally {
    run.free();
  }
}

function convergent(msg) {
  const views = Array.isArray(msg.views) ? msg.views : [];
  const white = msg.white_pixels >>> 0;
  views.forEach((view, k) => {
    const answer = { type: 'convergent', id: msg.id, view, last: k === views.length - 1 && !white };
    try {
      const values = convergentMap(String(msg.scenario), String(view), msg.pixels >>> 0);
      let min = Infinity;
      let max = -Infinity;
      for (const v of values) {
        if (v < min) min = v;
        if (v > max) max = v;
      }
      // The core may compute fewer directions than asked (a set-up with a liquid-crystal cell):
      // the map's side is that of its values.
      const pixels = Math.round(Math.sqrt(values.length));
      self.postMessage({ ...answer, map: { pixels, min, max, values } }, [values.buffer]);
    } catch (e) {
      self.postMessage({ ...answer, ...asFieldError(e) });
    }
  });
  if (!white) return;
  const [part, parts] = Array.isArray(msg.white_part) ? msg.white_part.map((v) => v >>> 0) : [0, 1];
  const answer = { type: 'convergent', id: msg.id, view: 'white', part, last: true };
  try {
    const rgba = convergentWhite(String(msg.scenario), white, part, parts);
    const pixels = Math.round(Math.sqrt(rgba.length / 4));
    self.postMessage({ ...answer, colour: { pixels, rgba, note: convergentWhiteNote(pixels) } }, [rgba.buffer]);
  } catch (e) {
    self.postMessage({ ...answer, ...asFieldError(e) });
  }
}

function handle(msg) {
  if (msg && msg.type === 'convergent') {
    convergent(msg);
    return;
  }
  if (!msg || msg.type !== 'solve') return;
  try {
    solve(msg.id, msg.request);
  } catch (e) {
    self.postMessage({ type: 'error', id: msg.id, ...asFieldError(e) });
  }
}

// The handler is installed before the core loads, so that no message is lost; requests wait.
self.onmessage = (ev) => {
  if (ready) handle(ev.data);
  else queue.push(ev.data);
};

init()
  .then(() => {
    ready = true;
    self.postMessage({ type: 'ready' });
    while (queue.length) handle(queue.shift());
  })
  .catch((e) => {
    self.postMessage({ type: 'failed', message: `the design core could not be loaded: ${e && e.message ? e.message : e}` });
  });
