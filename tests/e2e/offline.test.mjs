// The single offline file (target/single/doublespar.html, from scripts/build-single.sh) and the
// embedding (www/embed.js, www/embed.html, www/embed-example.html) in headless Chromium.
//
// (a) The single file opened from file:// with every request that is not the file itself
//     aborted: it renders, follows a control, runs a design in its worker, asks for nothing.
// (b) The example documentation page from the local server: two <spar-figure> elements show
//     their own scenarios, changing one leaves the other's pixels alone, the iframe renders.

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { pathToFileURL } from 'node:url';
import {
  ROOT,
  useBrowser,
  openPage,
  withPage,
  expectClean,
  canvasStats,
  drawn,
  cliTrace,
  close,
  expectAgreement,
  requiredPaths,
} from './support.mjs';

const SINGLE = path.join(ROOT, 'target', 'single', 'doublespar.html');
const example = (name) => fs.readFileSync(path.join(ROOT, 'examples', name), 'utf8');

const env = useBrowser();

/** Builds the single file if it is missing (run.sh always rebuilds it). */
function ensureSingle() {
  if (fs.existsSync(SINGLE)) return;
  const r = spawnSync(path.join(ROOT, 'scripts', 'build-single.sh'), [], { cwd: ROOT, stdio: 'inherit' });
  if (r.status !== 0) throw new Error('scripts/build-single.sh failed');
}

/**
 * Opens the single file from file:// (with `hash`), every request but file:, data: and blob: URLs
 * aborted; waits for its first result, runs `body(page)`, then checks that it fetched nothing but
 * itself, reported no CSP violation, no console or page error, and no panic.
 */
async function withSingle(hash, body) {
  ensureSingle();
  const fileUrl = pathToFileURL(SINGLE).href;
  const { context, page, log } = await openPage(env.browser, null);
  try {
    await page.goto(fileUrl + hash);
    await page.waitForFunction(() => {
      const q = document.querySelector('[data-quantity][data-value]');
      return window.doublespar && q && q.getAttribute('data-value');
    }, null, { timeout: 30000 });
    await body(page);
    assert.equal(await page.isHidden('#panic'), true, 'no panic banner');
  } finally {
    await context.close();
  }
  const foreign = log.requests.filter((u) => !u.startsWith(fileUrl) && !u.startsWith('data:') && !u.startsWith('blob:'));
  assert.deepEqual(foreign, [], 'no request but the file itself');
  expectClean(log);
}

test('the single file works from file:// with no network under its own strict CSP: it renders, follows a control, runs a design, fetches nothing', { timeout: 120000 }, async () => {
  ensureSingle();
  const size = fs.statSync(SINGLE).size;
  assert.ok(size <= 800 * 1024, `the single file is ${size} bytes, within 800 KiB`);
  const html = fs.readFileSync(SINGLE, 'utf8');
  const policies = [...html.matchAll(/<meta http-equiv="Content-Security-Policy" content="([^"]*)">/g)].map((m) => m[1]);
  assert.equal(policies.length, 1, 'one CSP <meta>');
  // Two scripts, each by its hash: the bootstrap in the markup and the page's script it inflates.
  assert.match(policies[0], /^default-src 'none'; script-src 'sha256-[A-Za-z0-9+/=]+' 'sha256-[A-Za-z0-9+/=]+' 'wasm-unsafe-eval'; style-src 'sha256-[A-Za-z0-9+/=]+';/);
  assert.doesNotMatch(policies[0], /unsafe-inline|'self'|\*/, 'nothing inline but by hash, no origin, no wildcard');
  assert.equal(html.split('function __dsMakeCore()').length - 1, 0, 'the page\'s script is stored compressed, not as text');

  await withSingle('', async (page) => {
    // The wasm-bindgen glue is stored once: the design worker's source takes it from the page's
    // script (scripts/build-single.mjs) rather than from a second copy in a string.
    const scripts = (await page.evaluate(() => [...document.scripts].map((s) => s.textContent))).join('\n');
    assert.equal(scripts.split('function __dsMakeCore()').length - 1, 1, 'the glue is in the page\'s scripts once');
    assert.equal(scripts.split('function __wbg_init(').length - 1, 1, 'the glue\'s init is in the page\'s scripts once');
    // Renders: every view canvas has ink (views folded away in a closed disclosure, the
    // conoscopic figure, are drawn only when opened).
    const stats = await page.evaluate(canvasStats, { selector: 'canvas[data-view]:not(details:not([open]) canvas)' });
    assert.ok(stats.length >= 2, `views found: ${stats.map((s) => s.view)}`);
    for (const v of stats) assert.ok(drawn(v), `the ${v.view} view is drawn (${v.differing} of ${v.total} pixels)`);

    // Follows a control: the thickness field changes the separation, as the command line says.
    const sel = '[data-quantity="elements[0].separation_mm"]';
    const sep0 = Number(await page.getAttribute(sel, 'data-value'));
    const thick = page.locator('input:not([type=range])[data-field="elements[0].thickness_mm"]');
    await thick.fill('3.7');
    await thick.press('Tab');
    await page.waitForFunction(([s, v]) => Number(document.querySelector(s).getAttribute('data-value')) !== v, [sel, sep0], { timeout: 10000 });
    const sep1 = Number(await page.getAttribute(sel, 'data-value'));
    const cli = cliTrace(await page.evaluate(() => window.doublespar.session.scenarioJson()));
    assert.ok(close(sep1, cli.elements[0].separation_mm), `separation ${sep1} equals the command line's ${cli.elements[0].separation_mm}`);
    assert.ok(!close(sep0, sep1, 1e-6), `the separation changed (${sep0} → ${sep1})`);

    // The design panel's worker: a displacer with a short Monte Carlo run finishes.
    await page.selectOption('[data-design-field="kind"]', 'displacer');
    for (const [f, v] of [['separation_mm', '2'], ['samples', '20000']]) {
      await page.fill(`[data-design-field="${f}"]`, v);
      await page.press(`[data-design-field="${f}"]`, 'Tab');
    }
    await page.click('#design-solve');
    await page.waitForFunction(() => document.getElementById('design').dataset.state === 'done', null, { timeout: 30000 })
      .catch(async () => assert.fail(`the design panel is ${await page.evaluate(() => document.getElementById('design').dataset.state)}: ${await page.textContent('#design-status')}`));
    const n = await page.getAttribute('[data-quantity="design.monte_carlo.n"]', 'data-value');
    assert.ok(Number(n) > 0, `the Monte Carlo summary is shown (n = ${n})`);

    // The convergent-light views: computed in a worker of their own (from the same inline code)
    // when their disclosure opens, and drawn.
    await page.click('#conoscope-open > summary');
    await page.waitForFunction(() => {
      const c = window.doublespar.convergent();
      return !c.busy && c.ms.conoscope !== undefined && c.ms.acceptance !== undefined;
    }, null, { timeout: 60000 });
    const map = (await page.evaluate(() => window.doublespar.session.scene('conoscope'))).items.find((i) => i.type === 'raster');
    assert.deepEqual([map?.columns, map?.rows], [256, 256], 'the 256 × 256 map is drawn');
    const figure = (await page.evaluate(canvasStats)).find((s) => s.view === 'conoscope');
    assert.ok(drawn(figure), `the conoscopic figure is drawn (${figure.differing} of ${figure.total} pixels)`);
  });
});

test('the single file\'s policy gates the script it inflates: with that script\'s hash altered, nothing runs and the violation is reported', { timeout: 60000 }, async () => {
  ensureSingle();
  const html = fs.readFileSync(SINGLE, 'utf8');
  // The policy's second hash is the inflated script's; change one of its characters.
  const altered = html.replace(/(script-src 'sha256-[^']+' 'sha256-)(.)/, (_, head, c) => head + (c === 'A' ? 'B' : 'A'));
  assert.notEqual(altered, html, 'the second hash was found and altered');
  const dir = fs.mkdtempSync(path.join(ROOT, 'target', 'single', 'altered-'));
  const file = path.join(dir, 'doublespar.html');
  fs.writeFileSync(file, altered);
  const { context, page, log } = await openPage(env.browser, null);
  try {
    await page.goto(pathToFileURL(file).href);
    await page.waitForFunction(() => document.scripts.length === 2, null, { timeout: 30000 });
    await page.waitForTimeout(500);
    assert.equal(await page.evaluate(() => Boolean(window.doublespar)), false, 'the page\'s script did not run');
    assert.ok(log.csp.some((v) => /script-src/.test(v)) || log.consoleErrors.some((v) => /Content Security Policy/.test(v)),
      `a script-src violation is reported (csp: ${JSON.stringify(log.csp)}, console: ${JSON.stringify(log.consoleErrors)})`);
  } finally {
    await context.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
});

test('the single file in a browser that cannot unpack gzip says so in its banner instead of showing a dead page', { timeout: 60000 }, async () => {
  ensureSingle();
  const { context, page, log } = await openPage(env.browser, null);
  try {
    // A browser without DecompressionStream (before 2023 in some engines).
    await page.addInitScript(() => {
      delete globalThis.DecompressionStream;
    });
    await page.goto(pathToFileURL(SINGLE).href);
    await page.waitForFunction(() => !document.getElementById('panic').hidden, null, { timeout: 30000 });
    const said = await page.textContent('#panic');
    assert.match(said, /cannot start/, said);
    assert.match(said, /DecompressionStream/, said);
    assert.equal(await page.evaluate(() => Boolean(window.doublespar)), false, 'the page\'s script did not run');
    assert.deepEqual(log.pageErrors, [], 'no uncaught error besides the message');
  } finally {
    await context.close();
  }
});

test('the single file from file:// with a #scenario= fragment: the recombiner shows four rays that agree with the command line', { timeout: 60000 }, async () => {
  const doc = JSON.parse(example('recombiner.json'));
  await withSingle(`#scenario=${encodeURIComponent(JSON.stringify(doc))}`, async (page) => {
    const sc = JSON.parse(await page.evaluate(() => window.doublespar.session.scenarioJson()));
    const cli = cliTrace(sc);
    assert.deepEqual(cli, cliTrace(doc), 'the page holds exactly the fragment\'s scenario');
    assert.deepEqual(cli.rays.map((r) => r.label).sort(), ['ee', 'eo', 'oe', 'oo']);
    await expectAgreement(page, cli, requiredPaths(cli), 'recombiner in the single file');
    assert.equal(await page.isHidden('#fragment-error'), true, 'no fragment error');
  });
});

test('the example documentation page: two independent figures and an iframe', { timeout: 90000 }, async () => {
  await withPage(env, '/embed-example.html', async ({ page }) => {
    await page.waitForFunction(() => {
      const figs = [...document.querySelectorAll('spar-figure')];
      return figs.length === 2 && figs.every((f) => f.getAttribute('data-state') === 'ready');
    }, null, { timeout: 30000 });

    // Each shows its own scenario.
    const info = await page.evaluate(() => [...document.querySelectorAll('spar-figure')].map((f) => ({
      id: f.id,
      material: f.scenario.elements[0].material,
      elements: f.result.elements.length,
      views: [...f.shadowRoot.querySelectorAll('canvas[data-view]')].map((c) => c.dataset.view),
      sep: Number(f.shadowRoot.querySelector('[data-quantity="elements[0].separation_mm"]').getAttribute('data-value')),
    })));
    assert.equal(info[0].id, 'fig-displacer');
    assert.equal(info[0].material, 'calcite');
    assert.equal(info[0].elements, 1);
    assert.deepEqual(info[0].views, ['side', 'end']);
    assert.equal(info[1].material, 'yvo4');
    assert.equal(info[1].elements, 3);
    assert.deepEqual(info[1].views, ['side', 'end', 'poincare']);
    assert.ok(await page.evaluate(() => {
      const [a, b] = document.querySelectorAll('spar-figure');
      return a.session !== b.session;
    }), 'each figure has its own Session');
    const cli = cliTrace(await page.evaluate(() => document.getElementById('fig-displacer').session.scenarioJson()));
    assert.ok(close(info[0].sep, cli.elements[0].separation_mm), `figure 1 separation ${info[0].sep} is the command line's`);

    const pixels = (id) => page.evaluate(canvasStats, { selector: 'canvas', host: `#${id}` });
    const a0 = await pixels('fig-displacer');
    const b0 = await pixels('fig-pair');
    for (const p of [...a0, ...b0]) assert.ok(drawn(p), `every view is drawn (${JSON.stringify(p)})`);

    // The interactive thickness slider of figure 1 changes its separation and pixels only.
    await page.evaluate(() => {
      const s = document.getElementById('fig-displacer').shadowRoot.querySelector('input[type=range][data-field="elements[0].thickness_mm"]');
      s.value = '4';
      s.dispatchEvent(new Event('input', { bubbles: true }));
    });
    const sepA = await page.evaluate(() => Number(document.getElementById('fig-displacer').shadowRoot.querySelector('[data-quantity="elements[0].separation_mm"]').getAttribute('data-value')));
    assert.ok(!close(sepA, info[0].sep, 1e-6), `the slider changed the separation (${info[0].sep} → ${sepA})`);
    assert.equal(await page.evaluate(() => document.getElementById('fig-displacer').scenario.elements[0].thickness_mm), 4);
    const a1 = await pixels('fig-displacer');
    assert.notDeepEqual(a1.map((p) => p.hash), a0.map((p) => p.hash), 'figure 1 was redrawn');
    assert.deepEqual(await pixels('fig-pair'), b0, "figure 2's pixels did not change");

    // Setting figure 2's scenario attribute changes figure 2 only.
    await page.evaluate(() => {
      const f = document.getElementById('fig-pair');
      const sc = f.scenario;
      sc.elements[0].thickness_mm = 3;
      f.setAttribute('scenario', JSON.stringify(sc));
    });
    assert.equal(await page.evaluate(() => document.getElementById('fig-pair').scenario.elements[0].thickness_mm), 3);
    assert.notDeepEqual((await pixels('fig-pair')).map((p) => p.hash), b0.map((p) => p.hash), 'figure 2 was redrawn');
    assert.deepEqual(await pixels('fig-displacer'), a1, "figure 1's pixels did not change");

    // A bad scenario shows its message inside the element and keeps the picture.
    await page.evaluate(() => document.getElementById('fig-pair').setAttribute('scenario', '{"version": 1, "wavelength_nm": -5, "elements": []}'));
    const err = await page.evaluate(() => {
      const e = document.getElementById('fig-pair').shadowRoot.querySelector('.error');
      return { hidden: e.hidden, text: e.textContent, state: document.getElementById('fig-pair').getAttribute('data-state') };
    });
    assert.equal(err.hidden, false, 'the error is shown');
    assert.match(err.text, /wavelength_nm/, 'the error names its field');
    assert.equal(err.state, 'error');

    // The iframe renders its views.
    await page.frameLocator('#frame-pair').locator('spar-figure[data-state="ready"]').waitFor({ timeout: 30000 });
    const frame = page.frame({ url: /embed\.html/ });
    const frameViews = await frame.evaluate(canvasStats, { selector: 'canvas', host: 'spar-figure' });
    assert.deepEqual(frameViews.map((v) => v.view), ['side', 'end']);
    for (const v of frameViews) assert.ok(drawn(v), `the iframe's ${v.view} view is drawn (${v.differing} of ${v.total})`);
    assert.equal(await frame.evaluate(() => document.querySelector('spar-figure').result.elements.length), 3,
      'the iframe shows the scenario of its fragment');

    // Resizing a figure redraws it at the new size.
    await page.evaluate(() => { document.getElementById('fig-pair').style.height = '20rem'; });
    await page.waitForFunction(() => {
      const c = document.getElementById('fig-pair').shadowRoot.querySelector('canvas');
      return c.height > 0 && Math.abs(c.height - c.clientHeight * devicePixelRatio) < 2;
    }, null, { timeout: 15000 });
  }, { ready: false });
});
