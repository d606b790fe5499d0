// The conoscopic figure in WebAssembly under Node, for scripts/bench.sh to set beside the native
// figure (cargo bench --bench conoscope): a 256 × 256 map of scripts/bench/conoscope.json over a
// 30° cone, in the design worker's build (opt-level 3), by the function the page's worker calls
// (convergentMap; its checksum is the sum of the values inside the cone), and, for the page's own
// build (size-tuned), the time to build the `conoscope` view's scene from such a map handed to
// the session (session.setConvergent + session.scene), the page's share of the work; and the
// white-light figure (convergentWhite) at 128 and 256 per side, and at 256 shared as the page
// shares it between two workers (two worker threads here, each loading the module, each drawing
// half the rows; timed from asking to both halves back, the modules loaded beforehand); and general
// crystals, each direction's modes from the 4×4 system (a KTP plate with its axes turned and the
// quartz plate with its optical activity, as benches/conoscope.rs has them), asked for at 256 per
// side and in white light at 128, so drawn at the core's caps (the side is the square root of
// the map's length). Medians of 9 runs (3 in white light); prints one JSON line. With the
// argument `general`, the general crystals alone.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { Worker } from 'node:worker_threads';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const doc = readFileSync(join(root, 'scripts', 'bench', 'conoscope.json'), 'utf8');

/** Median time of `runs` runs of `f` (9 unless given), in ms, and its last value. */
function median(f, runs = 9) {
  const ts = [];
  let value;
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    value = f();
    ts.push(performance.now() - t);
  }
  ts.sort((a, b) => a - b);
  return [ts[runs >> 1], value];
}

const load = async (dir) => {
  const glue = await import(join(root, 'www', dir, 'doublespar.js'));
  glue.initSync({ module: readFileSync(join(root, 'www', dir, 'doublespar_bg.wasm')) });
  return glue;
};
const worker = await load('pkg-design');

/** The general crystals' figures in the worker's build: fields of the JSON line. */
function generalCrystals() {
  const ktp = JSON.stringify({
    version: 2, wavelength_nm: 1064, beam: { polarization: { kind: 'linear', azimuth_deg: 0 } },
    elements: [{ kind: 'crystal', material: 'ktp', thickness_mm: 0.2, axes: { tilt_deg: 30, azimuth_deg: 20, roll_deg: 15 } },
      { kind: 'polarizer', transmission_axis_deg: 90 }],
  });
  const active = doc.replace('"optical_activity": false, ', '');
  const out = {};
  for (const [name, d] of [['ktp', ktp], ['active_quartz', active]]) {
    const [ms, map] = median(() => worker.convergentMap(d, 'conoscope', 256));
    const side = Math.round(Math.sqrt(map.length));
    out[`${name}_conoscope_${side}_worker_build_ms`] = ms;
    const [msAcc] = median(() => worker.convergentMap(d, 'acceptance', 256));
    out[`${name}_acceptance_${side}_worker_build_ms`] = msAcc;
    const [msWhite, rgba] = median(() => worker.convergentWhite(d, 128, 0, 1), 3);
    out[`${name}_white_${Math.round(Math.sqrt(rgba.length / 4))}_worker_build_ms`] = msWhite;
  }
  return out;
}
if (process.argv.includes('general')) {
  console.log(JSON.stringify({ bench: 'doublespar-wasm-conoscope-general', node: process.version, ...generalCrystals() }));
  process.exit(0);
}
const [ms256, values] = median(() => worker.convergentMap(doc, 'conoscope', 256));
let sum = 0;
let min = Infinity;
let max = -Infinity;
for (const v of values) {
  if (Number.isNaN(v)) continue;
  sum += v;
  min = Math.min(min, v);
  max = Math.max(max, v);
}
const cell = readFileSync(join(root, 'examples', 'twisted-nematic-cell.json'), 'utf8');
const [msCell48] = median(() => worker.convergentMap(cell, 'conoscope', 48));
const [msCell192, cellValues] = median(() => worker.convergentMap(cell, 'conoscope', 192), 3);
const [msWhite128] = median(() => worker.convergentWhite(doc, 128, 0, 1), 3);
const [msWhite256] = median(() => worker.convergentWhite(doc, 256, 0, 1), 3);
// The page's split: part k of 2 in each of two threads.
const threadCode = `
  const { parentPort, workerData } = require('node:worker_threads');
  const { readFileSync } = require('node:fs');
  import(workerData.glue).then((glue) => {
    glue.initSync({ module: readFileSync(workerData.wasm) });
    parentPort.on('message', ({ part, parts }) => {
      const rgba = glue.convergentWhite(workerData.doc, 256, part, parts);
      parentPort.postMessage(rgba.length);
    });
    parentPort.postMessage('ready');
  });`;
const threads = [0, 1].map(() => new Worker(threadCode, {
  eval: true,
  workerData: { doc, glue: join(root, 'www', 'pkg-design', 'doublespar.js'), wasm: join(root, 'www', 'pkg-design', 'doublespar_bg.wasm') },
}));
const answer = (w) => new Promise((resolve) => w.once('message', resolve));
await Promise.all(threads.map(answer));
const msWhiteTwo = [];
for (let i = 0; i < 3; i++) {
  const t = performance.now();
  const done = threads.map(answer);
  threads.forEach((w, part) => w.postMessage({ part, parts: 2 }));
  await Promise.all(done);
  msWhiteTwo.push(performance.now() - t);
}
msWhiteTwo.sort((a, b) => a - b);
await Promise.all(threads.map((w) => w.terminate()));
const page = await load('pkg');
const session = new page.Session();
session.updateJson(doc);
const [msScene] = median(() => {
  session.setConvergent('conoscope', 256, values, min, max, '', '');
  return session.scene('conoscope');
});
console.log(JSON.stringify({
  bench: 'doublespar-wasm-conoscope',
  node: process.version,
  conoscope_256_worker_build_ms: ms256,
  conoscope_checksum: sum,
  conoscope_scene_256_page_build_ms: msScene,
  cell_conoscope_48_worker_build_ms: msCell48,
  cell_conoscope_192_worker_build_ms: msCell192,
  cell_conoscope_192_values: cellValues.length,
  white_conoscope_128_worker_build_ms: msWhite128,
  white_conoscope_256_worker_build_ms: msWhite256,
  white_conoscope_256_two_threads_ms: msWhiteTwo[1],
  ...generalCrystals(),
}));
