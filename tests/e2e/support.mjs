// Shared by the end-to-end tests and scripts/bench-web.mjs: a static file server for www/, the
// Chromium launch, the command line as reference, and the contract's result paths.
//
// Nothing here reaches the network: the server listens on 127.0.0.1 at a free port, and every
// page opened through openPage() has each request it makes logged and, unless it goes to that
// server, aborted.

import http from 'node:http';
import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';

const here = path.dirname(fileURLToPath(import.meta.url));
export const ROOT = path.resolve(here, '..', '..');
// E2E_WWW serves another copy of the page (e.g. to check that the tests catch a planted bug).
export const WWW = process.env.E2E_WWW ? path.resolve(process.env.E2E_WWW) : path.join(ROOT, 'www');
export const CLI = path.join(ROOT, 'target', 'release', 'doublespar');
export const WASM = path.join(WWW, 'pkg', 'doublespar_bg.wasm');

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

/**
 * A new context and page whose every request, console error and page error is recorded in
 * `log`: {requests: [url], foreign: [url], consoleErrors: [text], pageErrors: [text]}.
 * Requests to anything but `origin` are aborted (and listed in `foreign`).
 */
export async function openPage(browser, origin, options = {}) {
  const context = await browser.newContext({ colorScheme: 'light', ...options });
  const log = { requests: [], foreign: [], consoleErrors: [], pageErrors: [] };
  const local = (url) => url === origin || url.startsWith(origin + '/');
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
    if (msg.type() === 'error') {
      const loc = msg.location();
      log.consoleErrors.push(`${msg.text()} (${loc.url}:${loc.lineNumber})`);
    }
  });
  page.on('pageerror', (err) => log.pageErrors.push(String(err && err.stack ? err.stack : err)));
  return { context, page, log };
}

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

/** Relative agreement to `rel`, with an absolute floor for values near zero. */
export function close(a, b, rel = 1e-12, floor = 1e-15) {
  if (!Number.isFinite(a) || !Number.isFinite(b)) return false;
  return Math.abs(a - b) <= Math.max(rel * Math.max(Math.abs(a), Math.abs(b)), floor);
}
