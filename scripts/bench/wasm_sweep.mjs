// The core's benchmarks in WebAssembly under Node (the design module's build), for
// scripts/bench.sh to set beside the native figures: the dense 10^6-point walk-off sweep, and
// the two-wedge splitter's 10^5 whole traces (by the planned trace in blocks of incidences side
// by side, by the same one incidence at a time, and by the general tracer for comparison) and
// 10^5 split angles (scripts/bench/
// two-wedge-splitter.json, the workload of src/optics/workload.rs). Prints one JSON line.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { performance } from 'node:perf_hooks';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const glue = await import(join(root, 'www', 'pkg-design', 'doublespar.js'));
glue.initSync({ module: readFileSync(join(root, 'www', 'pkg-design', 'doublespar_bg.wasm')) });
const runs = [];
let sum = 0;
for (let i = 0; i < 9; i++) {
  const t = performance.now();
  sum = glue.benchWalkoffSweep(1_000_000);
  runs.push(performance.now() - t);
}
runs.sort((a, b) => a - b);

/** Median time of `times` runs of `f`, in ms, and its last value, after one run not timed: the
 * engine first runs a function by its baseline compiler and tiers it up in the background, and a
 * loop already running keeps its code, so a first long call is timed at the baseline's speed. */
function median(times, f) {
  const ts = [];
  let value = f();
  for (let i = 0; i < times; i++) {
    const t = performance.now();
    value = f();
    ts.push(performance.now() - t);
  }
  ts.sort((a, b) => a - b);
  return [ts[Math.floor(times / 2)], value];
}
const splitter = readFileSync(join(root, 'scripts', 'bench', 'two-wedge-splitter.json'), 'utf8');
const [traceMs, traceSum] = median(5, () => glue.benchSplitter(splitter, 100_000, 'trace'));
const [eachMs, eachSum] = median(5, () => glue.benchSplitter(splitter, 100_000, 'each'));
const [generalMs, generalSum] = median(3, () => glue.benchSplitter(splitter, 100_000, 'general'));
const [splitMs, splitSum] = median(7, () => glue.benchSplitter(splitter, 100_000, 'split'));
console.log(JSON.stringify({
  bench: 'doublespar-wasm',
  node: process.version,
  walkoff_sweep_1e6_ms: runs[4],
  walkoff_sweep_checksum: sum,
  splitter_trace_1e5_ms: traceMs,
  splitter_trace_checksum: traceSum,
  splitter_trace_each_1e5_ms: eachMs,
  splitter_trace_each_checksum: eachSum,
  splitter_general_trace_1e5_ms: generalMs,
  splitter_general_trace_checksum: generalSum,
  splitter_split_1e5_ms: splitMs,
  splitter_split_checksum: splitSum,
}));
