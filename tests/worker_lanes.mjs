// The design worker's WebAssembly lanes, checked under Node (run by scripts/test.sh after
// scripts/build-web.sh). In that build (128-bit SIMD) the planned trace's lane kernel does its
// arithmetic, comparisons and choices as explicit f64x2 pairs (src/optics/planned_trace.rs,
// module `pairs`), code that no native test compiles. Three checks over the two-wedge splitter's
// workload (scripts/bench/two-wedge-splitter.json, src/optics/workload.rs):
// - the lanes take every sample to its end: none is given back to be traced one by one and none
//   is declined by the plan, as tests/planned_trace.rs asserts natively for the same workload
//   (a lane kernel that computed wrong numbers would send its lanes back, and the checksum
//   alone, made good by the one-by-one trace, would not show it);
// - an invariant: the lanes' checksum (four incidences side by side, by pairs) equals, to the bit,
//   the same incidences traced one at a time (one lane, no pairs), because IEEE 754 rounds each
//   operation alike whether it is done alone or in a pair, and the sum runs in the same order;
// - an independent method: the general face-by-face tracer, which builds no plan and no lanes,
//   gives the same checksum to 1e-12 relative.
// Sample counts 1, 3, 1,000 and 20,000 cover a part-filled block and many full ones.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const glue = await import(join(root, 'www', 'pkg-design', 'doublespar.js'));
glue.initSync({ module: readFileSync(join(root, 'www', 'pkg-design', 'doublespar_bg.wasm')) });
const splitter = readFileSync(join(root, 'scripts', 'bench', 'two-wedge-splitter.json'), 'utf8');

let failed = 0;
for (const n of [1, 3, 1000, 20000]) {
  const lanes = glue.benchSplitter(splitter, n, 'trace');
  const each = glue.benchSplitter(splitter, n, 'each');
  const general = glue.benchSplitter(splitter, n, 'general');
  const alone = glue.benchSplitter(splitter, n, 'alone');
  const declined = glue.benchSplitter(splitter, n, 'declined');
  const rel = Math.abs(lanes - general) / Math.abs(general);
  const ok = alone === 0 && declined === 0 && Number.isFinite(lanes) && lanes !== 0 && Object.is(lanes, each) && rel <= 1e-12;
  if (!ok) failed += 1;
  console.log(`${ok ? 'ok' : 'FAILED'}: ${n} samples: ${alone} given back by the lanes, ${declined} declined; checksum in lanes ${lanes}, one by one ${each}, general tracer ${general} (relative ${rel.toExponential(1)})`);
}
console.log(`${4 - failed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
