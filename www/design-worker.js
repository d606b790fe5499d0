// Doublespar design worker: solves design requests off the page's main thread, so that a long
// Monte Carlo tolerance run never blocks the page. A module worker (new Worker('design-worker.js',
// {type: 'module'})) that loads the design build of the core, ./pkg-design/doublespar.js (built
// by scripts/build-web.sh; it adds designJson, displacerChunk and summarize to the page's exports).
//
// Protocol (every message carries the id of its request):
//   page -> worker  {type: 'solve', id, request}          request: a design request object
//   worker -> page  {type: 'ready'}                        once the core has loaded
//                   {type: 'nominal', id, design}          displacer with samples > 0: the design
//                                                          without its Monte Carlo summary
//                   {type: 'progress', id, done, total, chunk, chunks}   after each chunk
//                   {type: 'done', id, design}             the complete design (for a displacer
//                                                          run: with monte_carlo filled in)
//                   {type: 'error', id, error: {field, message}, internal}
//                   {type: 'failed', message}              the core could not be loaded
//
// A displacer run is chunked exactly as the core does it in one go (chunk k holds samples
// [k·10000, (k+1)·10000), each chunk from its own seeded generator), so the summary of the
// concatenated chunks is the `monte_carlo` that designJson (and `doublespar design`) gives for
// the same request. Cancelling is the page's business: it terminates this worker.

import init, { designJson, displacerChunk, summarize } from './pkg-design/doublespar.js';

// Defaults of the request fields the worker itself reads (DEVELOPERS.md, "Design requests").
const DEFAULT_SAMPLES = 100000;
const DEFAULT_BINS = 40;
const CHUNK = 10000; // src/design_displacer.rs, MC_CHUNK
// A chunk index past any request's last chunk: displacerChunk then only reads and checks the
// request (every field, `samples` included) and returns no samples.
const CHECK_ONLY_CHUNK = 0xffffffff;

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
  const text = JSON.stringify(request);
  const isRun = request && request.kind === 'displacer' && request.samples !== 0;
  if (!isRun) {
    self.postMessage({ type: 'done', id, design: designJson(text) });
    return;
  }
  // 1. The nominal design (every field but `samples` is checked here), shown at once.
  const nominal = designJson(JSON.stringify({ ...request, samples: 0 }));
  // 2. The whole request, `samples` included, as the core reads it.
  displacerChunk(text, CHECK_ONLY_CHUNK);
  // The core reads counts as whole numbers (it truncates).
  const total = Math.floor(request.samples === undefined ? DEFAULT_SAMPLES : request.samples);
  const bins = Math.floor(request.bins === undefined ? DEFAULT_BINS : request.bins);
  if (total <= 0) {
    self.postMessage({ type: 'done', id, design: nominal });
    return;
  }
  self.postMessage({ type: 'nominal', id, design: nominal });
  // 3. The chunks, with progress after each.
  const chunks = Math.ceil(total / CHUNK);
  const all = new Float64Array(total);
  let n = 0;
  for (let k = 0; k < chunks; k += 1) {
    const part = displacerChunk(text, k);
    all.set(part, n);
    n += part.length;
    self.postMessage({ type: 'progress', id, done: Math.min(total, (k + 1) * CHUNK), total, chunk: k + 1, chunks });
  }
  // 4. The summary of every sample (samples the model cannot evaluate are left out by the core).
  const summary = summarize(all.subarray(0, n), bins);
  self.postMessage({ type: 'done', id, design: { ...nominal, monte_carlo: summary } });
}

function handle(msg) {
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
