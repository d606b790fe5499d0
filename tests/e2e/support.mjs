// Shared by the end-to-end tests and scripts/bench-web.mjs: a static file server for www/, the
// Chromium launch, one way to open a page and check what every test must hold, the command line
// as reference, the contract's result paths, pixel counts of canvases, and the page's downloads.
//
// Nothing here reaches the network: the server listens on 127.0.0.1 at a free port, and every
// page opened through openPage() has each request it makes logged and, unless it goes to that
// server, aborted. Every response carries the page's content security policy (CSP), and every
// violation of it that the page, a frame or a worker reports is logged.

import http from 'node:http';
import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';
import { before, after } from 'node:test';
import assert from 'node:assert/strict';

const here = path.dirname(fileURLToPath(import.meta.url));
export const ROOT = path.resolve(here, '..', '..');
// E2E_WWW serves another copy of the page (e.g. to check that the tests catch a planted bug).
export const WWW = process.env.E2E_WWW ? path.resolve(process.env.E2E_WWW) : path.join(ROOT, 'www');
export const CLI = path.join(ROOT, 'target', 'release', 'doublespar');
export const WASM = path.join(WWW, 'pkg', 'doublespar_bg.wasm');
export const ARTIFACTS = path.join(ROOT, 'target', 'e2e');

/**
 * The policy the page is deployed with (also in the <meta> of every page in www/): scripts and
 * everything else from the page's own origin only, wasm compiled from bytes, nothing inline.
 */
export const CSP = "default-src 'self'; script-src 'self' 'wasm-unsafe-eval'";

/** Chromium as installed by Debian (the CI installs it with apt-get). */
export const CHROMIUM = process.env.CHROMIUM || '/usr/bin/chromium';
export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--disable-quic',
  '--no-first-run',
];

const MIME = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.wasm': 'application/wasm',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.txt': 'text/plain; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
};

/**
 * Serves `root` on 127.0.0.1 at a free port. Resolves to {origin, close(), missing}: `missing`
 * lists every path answered with 404. The server is unref'd, so it never keeps node alive.
 */
export function startServer(root = WWW) {
  const missing = [];
  const server = http.createServer((req, res) => {
    let rel;
    try {
      rel = decodeURIComponent(new URL(req.url, 'http://x').pathname);
    } catch {
      res.writeHead(400).end();
      return;
    }
    if (rel.endsWith('/')) rel += 'index.html';
    const file = path.resolve(root, '.' + rel);
    if (!file.startsWith(root + path.sep) || (req.method !== 'GET' && req.method !== 'HEAD')) {
      res.writeHead(403).end();
      return;
    }
    fs.readFile(file, (err, body) => {
      if (err) {
        missing.push(rel);
        res.writeHead(404, { 'content-type': 'text/plain' }).end('not found');
        return;
      }
      res.writeHead(200, {
        'content-type': MIME[path.extname(file).toLowerCase()] || 'application/octet-stream',
        'content-length': body.length,
        'cache-control': 'no-store',
        'content-security-policy': CSP,
      });
      res.end(req.method === 'HEAD' ? undefined : body);
    });
  });
  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      server.unref();
      const { port } = server.address();
      resolve({
        origin: `http://127.0.0.1:${port}`,
        missing,
        close: () =>
          new Promise((done) => {
            server.closeAllConnections?.();
            server.close(() => done());
          }),
      });
    });
  });
}

/** playwright-core, from tests/e2e/node_modules (so that the benchmark can use it too). */
export function playwright() {
  const require = createRequire(path.join(here, 'package.json'));
  try {
    return require('playwright-core');
  } catch (e) {
    throw new Error(`playwright-core is not installed: run 'npm ci' in ${here} (${e.message})`);
  }
}

/** Headless Debian Chromium; playwright gives it a fresh temporary profile and removes it. */
export async function launchBrowser() {
  if (!fs.existsSync(CHROMIUM)) {
    throw new Error(`no Chromium at ${CHROMIUM}: apt-get install chromium (or set CHROMIUM)`);
  }
  const { chromium } = playwright();
  return chromium.launch({ executablePath: CHROMIUM, headless: true, args: CHROMIUM_ARGS });
}

/** Run in every document before its own scripts: reports each CSP violation to the test. */
function cspProbe() {
  document.addEventListener('securitypolicyviolation', (e) => {
    window.__dsReportCsp(`${e.violatedDirective} blocked ${e.blockedURI || '(inline)'} at ${e.sourceFile}:${e.lineNumber}`);
  });
}

/** Chromium's console message for a refused load, from a page or a worker. */
const CSP_CONSOLE = /Content Security Policy/i;

/**
 * A new context and page whose every request, console error, page error and CSP violation is
 * recorded in `log`: {requests: [url], foreign: [url], consoleErrors: [text], pageErrors: [text],
 * csp: [text], workers: [url]}. Requests to anything but `origin` are aborted (and listed in
 * `foreign`); `origin` null allows only file:, data: and blob: URLs. Under the CSP a worker's
 * refused request is never made, so it shows only as a console message: that is caught too.
 */
export async function openPage(browser, origin, options = {}) {
  const context = await browser.newContext({ colorScheme: 'light', ...options });
  const log = { requests: [], foreign: [], consoleErrors: [], pageErrors: [], csp: [], workers: [] };
  await context.exposeBinding('__dsReportCsp', (_source, text) => log.csp.push(String(text)));
  await context.addInitScript(cspProbe);
  const local = origin === null
    ? (url) => url.startsWith('file:')
    : (url) => url === origin || url.startsWith(origin + '/');
  // data: and blob: URLs are no request to any host.
  const inline = (url) => url.startsWith('data:') || url.startsWith('blob:');
  await context.route('**', (route) => {
    const url = route.request().url();
    if (local(url) || inline(url)) return route.continue();
    if (!log.foreign.includes(url)) log.foreign.push(url);
    return route.abort('blockedbyclient');
  });
  const page = await context.newPage();
  page.on('request', (req) => {
    const url = req.url();
    log.requests.push(url);
    if (!local(url) && !inline(url) && !log.foreign.includes(url)) log.foreign.push(url);
  });
  page.on('console', (msg) => {
    const loc = msg.location();
    const text = `${msg.text()} (${loc.url}:${loc.lineNumber})`;
    if (CSP_CONSOLE.test(msg.text())) log.csp.push(text);
    else if (msg.type() === 'error') log.consoleErrors.push(text);
  });
  page.on('pageerror', (err) => log.pageErrors.push(String(err && err.stack ? err.stack : err)));
  page.on('worker', (w) => log.workers.push(w.url()));
  return { context, page, log };
}

/**
 * What every page must hold at the end of a test: no uncaught page error, no console error, no
 * CSP violation, no request to another host and (with a server) no file missing on it since
 * `missingBefore`.
 */
export function expectClean(log, server = null, missingBefore = 0) {
  assert.deepEqual(log.pageErrors, [], 'uncaught errors in the page');
  assert.deepEqual(log.consoleErrors, [], 'console errors');
  assert.deepEqual(log.csp, [], 'content security policy violations');
  assert.deepEqual(log.foreign, [], 'requests to other hosts');
  if (server) assert.deepEqual(server.missing.slice(missingBefore), [], 'files the page asked for that www/ lacks');
}

/**
 * Registers before/after hooks that build what is missing, start the server and the browser, and
 * stop both; returns {server, browser}, filled in once `before` has run.
 */
export function useBrowser({ cli = true } = {}) {
  const env = { server: null, browser: null };
  before(
    async () => {
      ensureBuilt({ cli });
      fs.mkdirSync(ARTIFACTS, { recursive: true });
      env.server = await startServer();
      env.browser = await launchBrowser();
    },
    { timeout: 30 * 60 * 1000 },
  );
  after(async () => {
    await env.browser?.close();
    await env.server?.close();
  });
  return env;
}

/**
 * Opens `env.server`'s page at `address` (e.g. '/', '/#scenario=…', '/embed-example.html'),
 * waits for its first result unless `ready` is false, runs `body({page, log, context})`, then
 * checks that the panic banner (if the page has one) stays hidden and expectClean(). What the
 * page said is added to a failure's message: a page error is often the cause of a timeout.
 */
export async function withPage(env, address, body, { ready = true, ...options } = {}) {
  const { server, browser } = env;
  const missingBefore = server.missing.length;
  const { context, page, log } = await openPage(browser, server.origin, options);
  try {
    await page.goto(`${server.origin}${address}`, { waitUntil: 'load' });
    if (ready) await waitReady(page);
    await body({ page, log, context });
    const panic = await page.evaluate(() => {
      const el = document.getElementById('panic');
      return el && !el.hidden ? el.textContent : '';
    });
    assert.equal(panic, '', `the page reported an internal error: ${panic}`);
  } catch (e) {
    const said = [
      ...log.pageErrors.map((x) => `page error: ${x}`),
      ...log.consoleErrors.map((x) => `console error: ${x}`),
      ...log.csp.map((x) => `CSP: ${x}`),
    ];
    if (said.length && e instanceof Error) e.message += `\n  the page said:\n    ${said.join('\n    ')}`;
    throw e;
  } finally {
    await context.close();
  }
  assert.ok(log.requests.length > 0, 'the request log saw the page load');
  expectClean(log, server, missingBefore);
  return log;
}

/**
 * Run in the page (page.evaluate(canvasStats, {selector, host})): per canvas matching
 * `selector` (inside the shadow root of `host` when given), its data-view, data-design-plot,
 * aria-label and size, the pixels that differ from its commonest colour (the background), that
 * colour as 8 hex digits (RGBA) and a hash of every pixel.
 */
export function canvasStats({ selector = 'canvas[data-view]', host = null } = {}) {
  const root = host ? document.querySelector(host).shadowRoot : document;
  return [...root.querySelectorAll(selector)].map((c) => {
    const base = {
      view: c.getAttribute('data-view'),
      plot: c.getAttribute('data-design-plot'),
      label: c.getAttribute('aria-label'),
      w: c.width,
      h: c.height,
    };
    const ctx = c.width && c.height ? c.getContext('2d') : null;
    if (!ctx) return { ...base, total: 0, differing: 0, background: '', hash: 0 };
    const d = ctx.getImageData(0, 0, c.width, c.height).data;
    const counts = new Map();
    let hash = 2166136261;
    for (let i = 0; i < d.length; i += 4) {
      const k = ((d[i] << 24) | (d[i + 1] << 16) | (d[i + 2] << 8) | d[i + 3]) >>> 0;
      counts.set(k, (counts.get(k) || 0) + 1);
      hash = Math.imul(hash ^ k, 16777619) >>> 0;
    }
    let bg = 0;
    let bgCount = 0;
    for (const [k, n] of counts) if (n > bgCount) [bg, bgCount] = [k, n];
    const total = c.width * c.height;
    return { ...base, total, differing: total - bgCount, background: bg.toString(16).padStart(8, '0'), hash };
  });
}

/** A meaningful drawing: at least 200 pixels and 0.2 % of the canvas off the background. */
export const drawn = (s) => s.total > 0 && s.differing >= Math.max(200, 0.002 * s.total);

/** Waits until the page has traced and shown its first result. */
export async function waitReady(page, timeout = 20000) {
  await page.waitForFunction(
    () => {
      const ds = window.doublespar;
      if (!ds || !ds.session || typeof ds.redraw !== 'function') return false;
      const q = document.querySelector('[data-quantity][data-value]');
      return !!q && q.getAttribute('data-value') !== '';
    },
    null,
    { timeout },
  );
}

/** Builds what is missing: the release command line, and www/pkg. */
export function ensureBuilt({ cli = true, web = true } = {}) {
  const run = (cmd, args) => {
    const r = spawnSync(cmd, args, { cwd: ROOT, stdio: ['ignore', 'inherit', 'inherit'] });
    if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed (${r.status})`);
  };
  if (web && !fs.existsSync(WASM)) run(path.join(ROOT, 'scripts', 'build-web.sh'), []);
  if (cli && !fs.existsSync(CLI)) run('cargo', ['build', '--release', '--bin', 'doublespar']);
}

/** `doublespar trace -` on a scenario (text or object): the parsed result JSON. */
export function cliTrace(scenario) {
  const text = typeof scenario === 'string' ? scenario : JSON.stringify(scenario);
  const r = spawnSync(CLI, ['trace', '-'], { input: text, encoding: 'utf8' });
  if (r.status !== 0) {
    throw new Error(`doublespar trace - exited ${r.status}: ${r.stdout}${r.stderr}`);
  }
  return JSON.parse(r.stdout);
}

/**
 * The value at a contract path in a result: `elements[0].e.walkoff_deg`, `spots[1].power`,
 * `rays.oe.exit_position_mm.0` (rays are addressed by label). `undefined` if there is none.
 */
export function resolvePath(result, p) {
  const parts = [];
  for (const seg of p.split('.')) {
    const m = /^([^[\]]*)((?:\[\d+\])*)$/.exec(seg);
    if (!m) return undefined;
    if (m[1] !== '') parts.push(m[1]);
    for (const idx of m[2].matchAll(/\[(\d+)\]/g)) parts.push(Number(idx[1]));
  }
  let v = result;
  for (let i = 0; i < parts.length; i++) {
    if (v === null || v === undefined) return undefined;
    const key = parts[i];
    if (i > 0 && parts[i - 1] === 'rays' && Array.isArray(v)) {
      v = v.find((r) => r.label === key);
    } else if (Array.isArray(v)) {
      const n = typeof key === 'number' ? key : /^\d+$/.test(key) ? Number(key) : NaN;
      v = Number.isInteger(n) ? v[n] : undefined;
    } else if (typeof v === 'object') {
      v = Object.prototype.hasOwnProperty.call(v, key) ? v[key] : undefined;
    } else {
      return undefined;
    }
  }
  return v;
}

// ---------------------------------------------------------------------------------------------
// The page against the command line.

/** Every [data-quantity] on the page as [path, data-value]. */
export const quantities = (page) =>
  page.$$eval('[data-quantity]', (els) =>
    els.map((e) => [e.getAttribute('data-quantity'), e.getAttribute('data-value')]),
  );

const isBlank = (v) => v === null || v.trim() === '';

/**
 * Compares what the page shows with the command line's result: every path in `required` must be
 * on the page, and every [data-quantity] on the page must agree with the result at that path.
 * Numbers: 1e-12 relative (1e-9 for the group indices and delays, which are central differences),
 * with an absolute floor of 1e-15 for the `required` paths and 1e-12
 * for the others (angles and positions that are zero up to rounding come out as ~1e-15 in the
 * wasm build and exactly 0 natively, e.g. an ellipticity in degrees). A null in the result may
 * show as no value; strings, booleans and lists compare as String(value), as the page writes
 * them. Returns a list of readable mismatches (empty when all agree).
 */
export function mismatches(shown, cli, required = []) {
  const out = [];
  const paths = new Set(shown.map(([p]) => p));
  const strict = new Set(required);
  for (const p of required) if (!paths.has(p)) out.push(`${p}: not on the page`);
  for (const [p, value] of shown) {
    const expected = resolvePath(cli, p);
    if (expected === undefined) {
      out.push(`${p}: no such path in the result (data-value=${value})`);
    } else if (expected === null) {
      if (!isBlank(value) && Number.isFinite(Number(value))) {
        out.push(`${p}: the result has null, the page shows ${value}`);
      }
    } else if (typeof expected === 'number') {
      const got = isBlank(value) ? NaN : Number(value);
      // Group indices and delays are central differences (contract/group.rs), good to about
      // 1e-11: the wasm and native builds round them differently there.
      const rel = /\.group_(index|delay_ps)$/.test(p) ? 1e-9 : 1e-12;
      if (!close(got, expected, rel, strict.has(p) ? 1e-15 : 1e-12)) {
        out.push(`${p}: page ${value}, command line ${expected}`);
      }
    } else if (
      typeof expected === 'string' ||
      typeof expected === 'boolean' ||
      (Array.isArray(expected) && expected.every((x) => typeof x !== 'object'))
    ) {
      if (value !== String(expected)) out.push(`${p}: page ${value}, command line ${String(expected)}`);
    } else {
      out.push(`${p}: the result holds an object there, not a value (data-value=${value})`);
    }
  }
  return out;
}

/** The paths the brief singles out, for every crystal in the result and every ray. */
export function requiredPaths(cli, crystalsToo = true) {
  const req = [];
  if (crystalsToo) {
    cli.elements.forEach((el, i) => {
      if (el.kind !== 'crystal') return;
      req.push(`elements[${i}].separation_mm`, `elements[${i}].retardance_rad`, `elements[${i}].e.walkoff_deg`);
    });
  }
  for (const r of cli.rays) req.push(`rays.${r.label}.power`, `rays.${r.label}.exit_position_mm.0`);
  return req;
}

/** Polls until the page agrees with `cli` (the page may update on the next frame). */
export async function expectAgreement(page, cli, required, what, timeout = 15000) {
  const end = Date.now() + timeout;
  let bad;
  for (;;) {
    bad = mismatches(await quantities(page), cli, required);
    if (bad.length === 0 || Date.now() > end) break;
    await page.waitForTimeout(50);
  }
  assert.deepEqual(bad, [], `${what}: the page and the command line disagree`);
}

/** Relative agreement to `rel`, with an absolute floor for values near zero. */
export function close(a, b, rel = 1e-12, floor = 1e-15) {
  if (!Number.isFinite(a) || !Number.isFinite(b)) return false;
  return Math.abs(a - b) <= Math.max(rel * Math.max(Math.abs(a), Math.abs(b)), floor);
}

// ---------------------------------------------------------------------------------------------
// Driving the page as a user would (history, words and order-sheet tests).

/** The page's current scenario, with every default written out. */
export const pageScenario = async (page) => JSON.parse(await page.evaluate(() => window.doublespar.session.scenarioJson()));

/** Waits until the page's scenario satisfies `pred`; returns it (fails saying `what`). */
export async function waitScenario(page, pred, what, timeout = 15000) {
  const end = Date.now() + timeout;
  for (;;) {
    const sc = await pageScenario(page);
    // A predicate that reads a part the page has not written yet (the edit still on its way) waits
    // on; it fails, with the scenario shown, only when the time is up.
    let met = false;
    try {
      met = pred(sc);
    } catch {
      met = false;
    }
    if (met) return sc;
    if (Date.now() > end) assert.fail(`${what}; the page's scenario is ${JSON.stringify(sc).slice(0, 400)}`);
    await page.waitForTimeout(40);
  }
}

/** Types a value into the one control `selector` as a user would: fill, then leave (Tab). */
export async function enterValue(page, selector, value) {
  const field = page.locator(selector);
  assert.equal(await field.count(), 1, `exactly one control ${selector}`);
  await field.fill(String(value));
  await field.press('Tab');
}

/** Clicks the design panel's Solve and waits for section#design[data-state="done"]. */
export async function solveDesign(page, timeout = 30000) {
  await page.click('#design-solve');
  await page
    .waitForFunction(() => document.getElementById('design').dataset.state === 'done', null, { timeout })
    .catch(async () => assert.fail(`the design panel is ${await page.evaluate(() => document.getElementById('design').dataset.state)}: ${await page.textContent('#design-status')}`));
}

/** The text of the visible error slot `[attr="<path>"]`, '' when hidden or absent. */
export function shownError(page, path, attr = 'data-error-for') {
  return page.evaluate(([p, a]) => {
    const el = [...document.querySelectorAll(`[${a}]`)].find((e) => e.getAttribute(a) === p && !e.hidden && e.getClientRects().length > 0);
    return el ? el.textContent : '';
  }, [path, attr]);
}

/** Waits until the error slot of `path` shows a message; returns it. */
export async function waitError(page, path, attr = 'data-error-for', timeout = 15000) {
  const end = Date.now() + timeout;
  for (;;) {
    const text = await shownError(page, path, attr);
    if (text) return text;
    if (Date.now() > end) assert.fail(`no message shown in [${attr}="${path}"]`);
    await page.waitForTimeout(40);
  }
}

/**
 * Clicks the page's export button `what` (on a page opened with acceptDownloads) and returns
 * {name, body: Buffer} of the download.
 */
export async function exported(page, what) {
  const button = page.locator(`button[data-export="${what}"]`);
  assert.equal(await button.count(), 1, `one button data-export="${what}"`);
  const label = await button.getAttribute('aria-label');
  assert.match(label ?? '', /^Download the /, `${what} has an aria-label saying what it downloads`);
  const [download] = await Promise.all([page.waitForEvent('download'), button.click()]);
  assert.ok(download.url().startsWith('blob:'), `${what} is downloaded from a Blob URL, not ${download.url()}`);
  const file = await download.path();
  return { name: download.suggestedFilename(), body: fs.readFileSync(file) };
}

/** Splits CSV text into rows of fields (no field here holds a newline). */
export function parseCsv(text) {
  return text
    .split(/\r?\n/)
    .filter((l, i, all) => !(l === '' && i === all.length - 1))
    .map((line) => {
      const out = [];
      let cur = '';
      let quoted = false;
      for (let i = 0; i < line.length; i++) {
        const c = line[i];
        if (quoted) {
          if (c === '"' && line[i + 1] === '"') { cur += '"'; i++; } else if (c === '"') quoted = false;
          else cur += c;
        } else if (c === '"') quoted = true;
        else if (c === ',') { out.push(cur); cur = ''; } else cur += c;
      }
      out.push(cur);
      return out;
    });
}
