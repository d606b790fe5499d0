// The two-wedge splitter's 10^5 whole traces in WebAssembly in headless Chromium, the engine the
// page's design worker runs in, for scripts/bench.sh to set beside the native figures, the same
// work under Node (scripts/bench/wasm_sweep.mjs) and numpy (scripts/bench/splitter_numpy.py).
// The page is loaded from a local server; in it the design worker's build (www/pkg-design, the
// module the worker loads) is imported and its benchSplitter run on
// scripts/bench/two-wedge-splitter.json, the workload of src/optics/workload.rs: in blocks of
// incidences side by side (the lanes, 'trace') and one incidence at a time ('each'). Each is
// warmed up once, then timed; the median is reported with the least and the checksum, which
// must equal Node's and the native one. Prints one JSON line.
// Usage: node scripts/bench/browser_splitter.mjs [--runs N]   (needs www/pkg, www/pkg-design and
// playwright-core in tests/e2e, as scripts/bench-web.mjs does)
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { startServer, launchBrowser, ROOT } from '../../tests/e2e/support.mjs';

const args = process.argv.slice(2);
const runs = args.includes('--runs') ? Math.max(3, Number(args[args.indexOf('--runs') + 1]) | 0) : 11;
const splitter = readFileSync(join(ROOT, 'scripts', 'bench', 'two-wedge-splitter.json'), 'utf8');

const server = await startServer();
const browser = await launchBrowser();
try {
  const page = await browser.newPage();
  await page.goto(`${server.origin}/`);
  const result = await page.evaluate(
    async ({ doc, runs }) => {
      const glue = await import('/pkg-design/doublespar.js');
      await glue.default({ module_or_path: '/pkg-design/doublespar_bg.wasm' });
      const timed = (mode, times) => {
        glue.benchSplitter(doc, 100_000, mode);
        const ts = [];
        let value;
        for (let i = 0; i < times; i++) {
          const t = performance.now();
          value = glue.benchSplitter(doc, 100_000, mode);
          ts.push(performance.now() - t);
        }
        ts.sort((a, b) => a - b);
        return { median: ts[Math.floor(times / 2)], least: ts[0], value };
      };
      return { trace: timed('trace', runs), each: timed('each', Math.max(3, runs >> 1)) };
    },
    { doc: splitter, runs },
  );
  console.log(JSON.stringify({
    bench: 'doublespar-wasm-chromium',
    chromium: browser.version(),
    runs,
    splitter_trace_1e5_ms: result.trace.median,
    splitter_trace_least_1e5_ms: result.trace.least,
    splitter_trace_checksum: result.trace.value,
    splitter_trace_each_1e5_ms: result.each.median,
    splitter_trace_each_checksum: result.each.value,
  }));
} finally {
  await browser.close();
  await server.close();
}
