// The dense 10^6-point walk-off sweep in WebAssembly under Node (the design module's build),
// for scripts/bench.sh to set beside the native one-thread figure. Prints one JSON line.
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
console.log(JSON.stringify({ bench: 'doublespar-wasm', node: process.version, walkoff_sweep_1e6_ms: runs[4], walkoff_sweep_checksum: sum }));
