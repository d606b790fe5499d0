// End-to-end tests of the page's design panel (www/, section #design) in headless Chromium:
// every design number the page shows against the command line (`target/release/doublespar
// design -`) on the very request the panel builds (`window.doublespar.designRequest()`), the
// Monte Carlo run in the module worker (progress, a responsive page, cancel), errors beside their
// fields, the plots, and "Use this part". Like every test page, these run under the page's strict
// content security policy (support.mjs), the worker included.
//
// Run: `cd tests/e2e && npm ci && node --test` (or tests/e2e/run.sh, which builds first).

import { test, before } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { spawnSync } from 'node:child_process';
import { ROOT, ARTIFACTS, CLI, WWW, useBrowser, withPage as openAt, canvasStats, drawn, resolvePath, close, enterValue, waitError, shownError, waitScenario } from './support.mjs';

const DESIGN_WASM = path.join(WWW, 'pkg-design', 'doublespar_bg.wasm');

const env = useBrowser();

before(() => {
  if (!fs.existsSync(DESIGN_WASM)) {
    const r = spawnSync(path.join(ROOT, 'scripts', 'build-web.sh'), [], { cwd: ROOT, stdio: ['ignore', 'inherit', 'inherit'] });
    assert.equal(r.status, 0, 'scripts/build-web.sh');
  }
}, { timeout: 30 * 60 * 1000 });

// ---------------------------------------------------------------------------------------------
// Helpers

/** `doublespar design -` on a request object: the parsed design (or {error}). */
function cliDesign(request) {
  const r = spawnSync(CLI, ['design', '-'], { input: JSON.stringify(request), encoding: 'utf8' });
  if (r.status !== 0 && r.status !== 2) throw new Error(`doublespar design - exited ${r.status}: ${r.stdout}${r.stderr}`);
  return JSON.parse(r.stdout);
}

/**
 * Opens the page, waits for its first result, runs `body({page, log})`, then checks what every
 * test page must hold (support.mjs: no console or page error, no CSP violation, no request to
 * another host, no file missing, no panic) and that the worker and its wasm came from the local
 * server. (Under the CSP a request to another host is refused before it is made; the worker's
 * refusals show as console messages about the policy, which fail the test too.)
 */
async function withPage(body, options = {}) {
  const { origin } = env.server;
  const log = await openAt(env, '/', body, options);
  for (const f of ['/design-worker.js', '/pkg-design/doublespar.js', '/pkg-design/doublespar_bg.wasm']) {
    assert.ok(log.requests.includes(`${origin}${f}`), `${f} was requested from the local server`);
  }
  assert.ok(log.workers.length > 0 && log.workers.every((u) => u === `${origin}/design-worker.js`), `the page ran its design worker from the server: ${log.workers}`);
}

const field = (p) => `[data-design-field="${p}"]`;

/** Types into a design field as a user would (fill, then leave it). */
async function enter(page, p, value) {
  const el = page.locator(field(p));
  assert.equal(await el.count(), 1, `exactly one control ${field(p)}`);
  assert.ok(await el.isVisible(), `${field(p)} is visible`);
  await el.fill(String(value));
  await el.press('Tab');
}

async function choose(page, p, value) {
  const el = page.locator(field(p));
  assert.equal(await el.count(), 1, `exactly one control ${field(p)}`);
  await el.selectOption(value);
}

const designState = (page) => page.evaluate(() => document.getElementById('design').dataset.state);

/** Clicks Solve and waits for the state `until` (done by default); returns the final state. */
async function solve(page, until = ['done'], timeout = 30000) {
  await page.click('#design-solve');
  await page
    .waitForFunction((states) => states.includes(document.getElementById('design').dataset.state), until, { timeout })
    .catch(async () => assert.fail(`the design panel is ${await designState(page)}, not ${until}: ${await page.textContent('#design-status')}`));
  return designState(page);
}

/** Every [data-quantity^="design."] on the page as [path, data-value]. */
const designQuantities = (page) =>
  page.$$eval('[data-quantity^="design."]', (els) => els.map((e) => [e.getAttribute('data-quantity'), e.getAttribute('data-value')]));

/**
 * Numbers the core gets by central differences (DEVELOPERS.md: "sensitivities are central
 * differences of the exact plate model"), and what follows from them. A difference with step h
 * turns the last-bit differences between the wasm build's and the native build's transcendental
 * functions (≈1e-16 of a value F) into ≈1e-16·F/h: with h = 1e-4° for walkoff_slope and 1e-3°
 * for the cut-tilt sensitivity that is ≈1e-11 relative, measured 4e-11 for a custom-index plate
 * cut at 30°. Where a test opts in (`fdTolerance`), these compare to 1e-8 relative with a floor of
 * 1e-10 in their unit; everything else stays at 1e-12.
 */
const FINITE_DIFFERENCES = /^design\.(walkoff_slope|sensitivities\..*|length_sensitivity\.\d|tilt_sensitivity\.\d|length_mismatch_to_break_mm\.\d|tilt_mismatch_to_break_deg\.\d)$/;

/**
 * Compares the design numbers on the page with the command line's design: every path in
 * `required` must be shown, and every shown path must agree (numbers to 1e-12 relative with an
 * absolute floor of 1e-15, strings and booleans as String(value)).
 */
function mismatches(shown, cli, required, { fdTolerance = false } = {}) {
  const out = [];
  const paths = new Set(shown.map(([p]) => p));
  for (const p of required) if (!paths.has(p)) out.push(`${p}: not on the page`);
  const root = { design: cli };
  for (const [p, value] of shown) {
    const expected = resolvePath(root, p);
    if (expected === undefined) out.push(`${p}: no such path in the design (data-value=${value})`);
    else if (typeof expected === 'number') {
      const [rel, floor] = fdTolerance && FINITE_DIFFERENCES.test(p) ? [1e-8, 1e-10] : [1e-12, 1e-15];
      if (!close(Number(value), expected, rel, floor)) out.push(`${p}: page ${value}, command line ${expected}`);
    } else if (typeof expected === 'string' || typeof expected === 'boolean') {
      if (value !== String(expected)) out.push(`${p}: page ${value}, command line ${expected}`);
    } else {
      out.push(`${p}: the design holds ${JSON.stringify(expected).slice(0, 60)} there, not a value`);
    }
  }
  return out;
}

/**
 * The command line's design of the request the panel shows solved (the numbers themselves are
 * compared by expectAgreement).
 */
async function shownAndCli(page, what) {
  const request = await page.evaluate(() => window.doublespar.designRequest());
  const shown = await page.evaluate(() => window.doublespar.designShown());
  assert.ok(shown && shown.complete, `${what}: a complete design is shown`);
  assert.deepEqual(shown.request, request, `${what}: the design shown is for the request the fields say`);
  const cli = cliDesign(request);
  assert.ok(!cli.error, `${what}: the command line solves the request: ${JSON.stringify(cli.error)}`);
  return { request, cli };
}

async function expectAgreement(page, required, what, options = {}) {
  const { request, cli } = await shownAndCli(page, what);
  const q = await designQuantities(page);
  assert.deepEqual(mismatches(q, cli, required, options), [], `${what}: the page and the command line disagree`);
  return { request, cli, quantities: Object.fromEntries(q) };
}

/** Per canvas[data-design-plot]: name, label, size, pixels off the commonest colour, hash. */
const plotStats = (page) => page.evaluate(canvasStats, { selector: 'canvas[data-design-plot]' });

async function expectPlots(page, names, what) {
  const stats = await plotStats(page);
  assert.deepEqual(stats.map((s) => s.plot).sort(), [...names].sort(), `${what}: the plots shown`);
  for (const s of stats) {
    assert.ok(drawn(s), `${what}: ${s.plot} is drawn (${s.differing} of ${s.total} pixels off the background)`);
    assert.ok(s.label && s.label.length > 20, `${what}: ${s.plot} has a text alternative`);
  }
  return stats;
}

const errorText = (page, p) =>
  page.evaluate((f) => {
    const el = [...document.querySelectorAll('[data-design-error-for]')].find((e) => e.getAttribute('data-design-error-for') === f);
    if (!el) return null;
    return !el.hidden && el.getClientRects().length > 0 ? el.textContent.trim() : '';
  }, p);

async function expectError(page, p, what) {
  await page
    .waitForFunction(
      (f) => {
        const el = [...document.querySelectorAll('[data-design-error-for]')].find((e) => e.getAttribute('data-design-error-for') === f);
        return el && !el.hidden && el.getClientRects().length > 0 && el.textContent.trim() !== '';
      },
      p,
      { timeout: 10000 },
    )
    .catch(async () => assert.fail(`${what}: [data-design-error-for="${p}"] shows ${JSON.stringify(await errorText(page, p))}; status: ${await page.textContent('#design-status')}`));
  const text = await errorText(page, p);
  assert.ok(text.length > 5, `${what}: a readable message (${text})`);
  return text;
}

const DISPLACER_REQUIRED = [
  'design.cut_tilt_deg', 'design.length_mm', 'design.walkoff_deg', 'design.separation_mm', 'design.clear_aperture_mm',
  'design.crosstalk', 'design.band.min_mm', 'design.band.max_mm', 'design.cut_note', 'design.no', 'design.ne',
  'design.sensitivities.tilt_mm_per_deg', 'design.sensitivities.incidence_mm_per_deg', 'design.sensitivities.thickness_mm_per_mm',
  'design.sensitivities.wavelength_mm_per_nm', 'design.sensitivities.linear_std_mm',
  'design.monte_carlo.n', 'design.monte_carlo.mean', 'design.monte_carlo.std', 'design.monte_carlo.p5', 'design.monte_carlo.p95',
];

async function fillDisplacer(page, samples) {
  await choose(page, 'kind', 'displacer');
  await choose(page, 'material', 'calcite');
  await enter(page, 'wavelength_nm', '632.8');
  await enter(page, 'separation_mm', '2');
  await enter(page, 'beam_diameter_mm', '1');
  await enter(page, 'samples', String(samples));
  await enter(page, 'seed', '5');
}

// ---------------------------------------------------------------------------------------------
// Tests

test('a displacer solved through the controls agrees with the command line, Monte Carlo included, and loads into the set-up', { timeout: 120000 }, async () => {
  await withPage(async ({ page }) => {
    assert.equal(await designState(page), 'idle');
    assert.equal(await page.locator('[data-quantity^="design."]').count(), 0, 'no design numbers before a solve');
    await fillDisplacer(page, 20000);
    // Record what the progress line says and the panel's states as they happen.
    await page.evaluate(() => {
      const rec = { texts: [], states: [] };
      window.__designRec = rec;
      const text = document.getElementById('design-progress-text');
      const run = document.getElementById('design-run');
      const bar = document.getElementById('design-progress');
      new MutationObserver(() => {
        rec.texts.push({ text: text.textContent, visible: !run.hidden && run.getClientRects().length > 0, value: bar.value, max: bar.max });
      }).observe(text, { childList: true, characterData: true, subtree: true });
      const panel = document.getElementById('design');
      new MutationObserver(() => {
        rec.states.push({ state: panel.dataset.state, mc: !!document.querySelector('[data-quantity="design.monte_carlo.mean"]'), nominal: !!document.querySelector('[data-quantity="design.length_mm"]') });
      }).observe(panel, { attributes: true, attributeFilter: ['data-state'] });
    });
    await solve(page);
    const { request, cli } = await expectAgreement(page, DISPLACER_REQUIRED, 'displacer, 20000 samples');
    assert.deepEqual(
      request,
      {
        kind: 'displacer', material: 'calcite', wavelength_nm: 632.8, separation_mm: 2, beam_diameter_mm: 1, aperture_factor: 2,
        tolerances: { tilt_deg: 0.1, incidence_deg: 0.1, thickness_mm: 0.05, wavelength_nm: 0.5 }, samples: 20000, seed: 5,
      },
      'the request the controls say',
    );
    assert.equal(cli.monte_carlo.n, 20000);

    const rec = await page.evaluate(() => window.__designRec);
    const texts = rec.texts.filter((t) => t.visible).map((t) => t.text);
    for (const t of ['10000 of 20000 samples', '20000 of 20000 samples']) assert.ok(texts.includes(t), `the progress said "${t}" (it said ${JSON.stringify(texts)})`);
    assert.ok(rec.texts.some((t) => t.text === '10000 of 20000 samples' && t.value === 10000 && t.max === 20000), 'the <progress> bar followed');
    const running = rec.states.find((s) => s.state === 'running');
    assert.ok(running && running.nominal && !running.mc, `the nominal design was shown while the run went on: ${JSON.stringify(rec.states)}`);
    assert.equal(rec.states[rec.states.length - 1].state, 'done');

    await expectPlots(page, ['separation-wavelength', 'tolerance-histogram'], 'displacer');
    const cutNote = await page.locator('[data-quantity="design.cut_note"]').first().textContent();
    assert.equal(cutNote.trim(), cli.cut_note, 'the cut note is shown');

    // "Use this part": the main views show the designed plate.
    await page.click('#design-use');
    await page
      .waitForFunction(() => Math.abs(Number(document.querySelector('[data-quantity="elements[0].separation_mm"]')?.getAttribute('data-value')) - 2) <= 2e-9, null, { timeout: 15000 })
      .catch(async () => assert.fail(`elements[0].separation_mm is ${await page.getAttribute('[data-quantity="elements[0].separation_mm"]', 'data-value')}`));
    const sep = Number(await page.getAttribute('[data-quantity="elements[0].separation_mm"]', 'data-value'));
    assert.ok(close(sep, 2, 1e-9), `the traced separation is 2 mm (${sep})`);
    const sc = JSON.parse(await page.evaluate(() => window.doublespar.session.scenarioJson()));
    assert.equal(sc.elements.length, 1);
    assert.equal(sc.elements[0].thickness_mm, cli.length_mm, 'the plate has the designed length');
    assert.ok(close(sc.elements[0].axis.tilt_deg, cli.cut_tilt_deg), 'and the designed cut');
    assert.match(await page.evaluate(() => location.hash), /^#scenario=/, 'the address holds the new set-up');
  });
});

test('a 100000-sample run keeps the page responsive and agrees with the command line; Cancel stops a run', { timeout: 180000 }, async () => {
  await withPage(async ({ page }) => {
    await fillDisplacer(page, 100000);
    // Count animation frames (and the longest gap between two) while the run goes on.
    await page.evaluate(() => {
      const f = { count: 0, last: 0, maxGap: 0, running: true };
      window.__frames = f;
      const tick = (t) => {
        if (f.last) f.maxGap = Math.max(f.maxGap, t - f.last);
        f.last = t;
        f.count += 1;
        if (f.running) requestAnimationFrame(tick);
      };
      requestAnimationFrame(tick);
    });
    const before = await page.evaluate(() => window.__frames.count);
    const t0 = Date.now();
    await solve(page);
    const frames = await page.evaluate(() => {
      window.__frames.running = false;
      return window.__frames;
    });
    const ms = Date.now() - t0;
    console.log(`# 100000 samples: ${ms} ms from the click to the summary, ${frames.count - before} frames, longest frame gap ${frames.maxGap.toFixed(1)} ms`);
    assert.ok(frames.count - before >= 2, `the page kept drawing frames during the run (${frames.count - before} in ${ms} ms)`);
    assert.ok(frames.maxGap < 500, `no frame took half a second (longest gap ${frames.maxGap} ms)`);
    const { cli } = await expectAgreement(page, DISPLACER_REQUIRED, 'displacer, 100000 samples');
    assert.equal(cli.monte_carlo.n, 100000);
    assert.equal(await page.textContent('#design-progress-text'), '100000 of 100000 samples');

    // Cancel: a million samples, stopped after the first progress.
    await enter(page, 'samples', '1000000');
    await solve(page, ['running']);
    await page.waitForFunction(() => /^[1-9]\d* of 1000000 samples$/.test(document.getElementById('design-progress-text').textContent), null, { timeout: 20000 });
    assert.equal(await page.locator('#design-cancel').isEnabled(), true, 'Cancel is enabled during the run');
    await page.click('#design-cancel');
    assert.equal(await designState(page), 'cancelled');
    const stopped = await page.textContent('#design-progress-text');
    await page.waitForTimeout(400);
    assert.equal(await page.textContent('#design-progress-text'), stopped, 'the progress stops');
    assert.equal(await page.locator('[data-quantity="design.monte_carlo.mean"]').count(), 0, 'no summary after a cancel');
    assert.ok(await page.locator('[data-quantity="design.length_mm"]').count() > 0, 'the nominal design stays');
    assert.equal(await page.locator('#design-cancel').isDisabled(), true);
    assert.match(await page.textContent('#design-status'), /Cancelled after \d+ of 1000000 samples/);
    // The restarted worker solves again.
    await enter(page, 'samples', '20000');
    await solve(page);
    await expectAgreement(page, DISPLACER_REQUIRED, 'displacer after a cancel');
  });
});

test('a zero-order quartz quarter-wave plate is λ/(4|nₑ − nₒ|) thick; plots redraw in the dark scheme', { timeout: 120000 }, async () => {
  await withPage(async ({ page }) => {
    await choose(page, 'kind', 'waveplate');
    await choose(page, 'order', 'zero');
    await choose(page, 'material', 'quartz');
    await enter(page, 'wavelength_nm', '632.8');
    await enter(page, 'retardance_waves', '0.25');
    assert.equal(await page.locator(field('order_number')).isVisible(), false, 'no order number for a zero-order plate');
    assert.equal(await page.locator(field('separation_mm')).count(), 0, 'no displacer fields for a waveplate');
    await solve(page);
    const { quantities: q } = await expectAgreement(page, [
      'design.plates.0.thickness_mm', 'design.retardance_waves', 'design.acceptance_deg', 'design.no', 'design.ne',
      'design.angular.0.acceptance_deg', 'design.angular.1.acceptance_deg', 'design.angular.2.acceptance_deg',
    ], 'quartz quarter-wave');
    const [no, ne, t] = [q['design.no'], q['design.ne'], q['design.plates.0.thickness_mm']].map(Number);
    const expected = 632.8e-6 / (4 * Math.abs(ne - no));
    assert.ok(close(t, expected, 1e-12), `thickness ${t} mm, λ/(4|nₑ − nₒ|) = ${expected} mm`);
    const plots = ['retardance-wavelength', 'retardance-angle-0', 'retardance-angle-45', 'retardance-angle-90'];
    const light = await expectPlots(page, plots, 'waveplate, light');
    const worst = await page.getAttribute('canvas[data-design-plot="retardance-angle-0"]', 'aria-label');
    assert.match(worst, /plane at 0° to the optic axis/);

    await page.emulateMedia({ colorScheme: 'dark' });
    await page.waitForFunction(() => window.matchMedia('(prefers-color-scheme: dark)').matches);
    let dark;
    const end = Date.now() + 5000;
    do {
      await page.waitForTimeout(50);
      dark = await plotStats(page);
    } while (Date.now() < end && dark.some((s, i) => s.hash === light[i].hash));
    for (const [i, s] of dark.entries()) {
      assert.notEqual(s.hash, light[i].hash, `${s.plot} was redrawn for the dark scheme`);
      const lum = (c) => [0, 2, 4].reduce((sum, k) => sum + parseInt(c.slice(k, k + 2), 16), 0);
      assert.ok(lum(s.background) < lum(light[i].background), `${s.plot}: the dark background is darker`);
    }
    await expectPlots(page, plots, 'waveplate, dark');

    // A resize redraws the plots at their new size.
    const w0 = dark[0].w;
    await page.setViewportSize({ width: 700, height: 900 });
    await page.waitForFunction((w) => document.querySelector('canvas[data-design-plot="retardance-wavelength"]').width !== w, w0, { timeout: 15000 });
    await expectPlots(page, plots, 'waveplate, after a resize');

    // The same plate asked in standard air: the request says so, the answer echoes it with the
    // vacuum wavelength the command line finds for the same request, and the panel shows both.
    await choose(page, 'wavelength_in', 'air');
    await solve(page);
    const { request, cli } = await expectAgreement(page, [
      'design.plates.0.thickness_mm', 'design.wavelength_nm', 'design.air_wavelength_nm', 'design.air_index',
    ], 'quartz quarter-wave in air');
    assert.equal(request.wavelength_in, 'air', `the request states air: ${JSON.stringify(request)}`);
    const { design } = await page.evaluate(() => window.doublespar.designShown());
    assert.equal(design.wavelength_in, 'air', 'the answer echoes the basis');
    assert.equal(design.air_wavelength_nm, 632.8, 'and the wavelength as given');
    assert.ok(close(design.wavelength_nm, cli.wavelength_nm, 1e-12), `vacuum wavelength ${design.wavelength_nm}, command line ${cli.wavelength_nm}`);
    assert.ok(design.wavelength_nm > 632.9 && design.wavelength_nm < 633, `a vacuum wavelength about 0.17 nm longer: ${design.wavelength_nm}`);
    const basis = await page.textContent('.design-basis');
    assert.match(basis, /^In standard air \(index 1\.00027\d+\): wavelength 632\.8\u00a0nm, in vacuum 632\.97\d*\u00a0nm\. The other wavelengths below are in vacuum\.$/, `the basis is shown: ${basis}`);
    // The part loads in air; Undo brings back the set-up it replaced, in vacuum. The panel's own
    // fields are not steps of the set-up's history (DEVELOPERS.md, "History") and keep air.
    const setupBasis = '[data-field="wavelength_in"]';
    await page.click('#design-use');
    await waitScenario(page, (s) => s.wavelength_in === 'air' && s.wavelength_nm === 632.8, 'the designed part loads in air');
    assert.equal(await page.inputValue(setupBasis), 'air', 'the set-up\'s control says air');
    await page.click('#undo');
    await waitScenario(page, (s) => (s.wavelength_in ?? 'vacuum') === 'vacuum', 'Undo brings back the set-up in vacuum');
    assert.equal(await page.inputValue(setupBasis), 'vacuum', 'Undo restores the set-up\'s control to vacuum');
    assert.equal(await page.inputValue(field('wavelength_in')), 'air', 'the design field keeps its value');
    // The link carries the basis and restores it.
    const link = await page.evaluate(() => location.hash);
    assert.equal(JSON.parse(decodeURIComponent(link.split('&design=')[1])).wavelength_in, 'air', `the link's design part: ${link}`);
    await page.goto(`${env.server.origin}/${link}`);
    await page.reload();
    await page.waitForFunction(() => window.doublespar && document.querySelector('[data-design-field="wavelength_in"]')?.value === 'air', null, { timeout: 20000 });
    assert.equal((await page.evaluate(() => window.doublespar.designRequest())).wavelength_in, 'air', 'the request from the link states air');
  });
});

test('each panel clears only its own errors: a set-up that traces again leaves the design panel\'s marks', { timeout: 90000 }, async () => {
  await withPage(async ({ page }) => {
    const THICK = 'input.num[data-field="elements[0].thickness_mm"]';
    await enterValue(page, THICK, 'abc');
    await waitError(page, 'elements[0].thickness_mm');
    await choose(page, 'kind', 'waveplate');
    await enter(page, 'retardance_waves', 'abc');
    await solve(page, ['error']);
    await expectError(page, 'retardance_waves', 'retardance "abc"');

    // The set-up traces again: its message and marks go, the panel's stay.
    await enterValue(page, THICK, '2');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 2, 'the thickness traces');
    assert.equal(await shownError(page, 'elements[0].thickness_mm'), '', 'the set-up\'s message is gone');
    assert.equal(await page.getAttribute(THICK, 'aria-invalid'), null, 'the set-up\'s mark is gone');
    assert.equal(await page.getAttribute(field('retardance_waves'), 'aria-invalid'), 'true', 'the design field is still marked');
    assert.match(await errorText(page, 'retardance_waves'), /Retardance/, 'the design field still shows its message');
    const slotField = await page.$eval('[data-design-error-for="retardance_waves"]', (el) => el.getAttribute('data-error-field'));
    assert.equal(slotField, 'retardance_waves', 'the design slot keeps its path');
  });
});

test('bad values show their message beside their field and keep what was typed', { timeout: 120000 }, async () => {
  await withPage(async ({ page }) => {
    await choose(page, 'kind', 'waveplate');
    await enter(page, 'retardance_waves', 'abc');
    await solve(page, ['error']);
    const m1 = await expectError(page, 'retardance_waves', 'retardance "abc"');
    assert.match(m1, /number/);
    assert.equal(await page.inputValue(field('retardance_waves')), 'abc', 'the typed text stays');
    assert.equal(await page.getAttribute(field('retardance_waves'), 'aria-invalid'), 'true');

    await enter(page, 'retardance_waves', '0.5');
    await solve(page);
    assert.equal(await errorText(page, 'retardance_waves'), '', 'a good value clears the message');

    // A displacer: first a good design, then a bad separation; the good design stays.
    await choose(page, 'kind', 'displacer');
    await enter(page, 'separation_mm', '2');
    await enter(page, 'samples', '0');
    await solve(page);
    const length = await page.getAttribute('[data-quantity="design.length_mm"]', 'data-value');
    await enter(page, 'separation_mm', '-1');
    await solve(page, ['error']);
    await expectError(page, 'separation_mm', 'separation -1');
    assert.equal(await page.inputValue(field('separation_mm')), '-1', 'the typed value stays');
    assert.equal(await page.getAttribute('[data-quantity="design.length_mm"]', 'data-value'), length, 'the last design stays');
    assert.ok(await page.locator('#design-stale').isVisible(), 'and says it is the last one that solved');

    // Errors inside groups: a field of the band, the band as a whole, a tolerance, the samples.
    await enter(page, 'separation_mm', '2');
    for (const [what, fill, errorField] of [
      ['band to blank', [['band_nm[0]', '500'], ['band_nm[1]', '']], 'band_nm[1]'],
      ['band reversed', [['band_nm[0]', '900'], ['band_nm[1]', '500']], 'band_nm'],
      ['negative tolerance', [['band_nm[0]', ''], ['band_nm[1]', ''], ['tolerances.tilt_deg', '-1']], 'tolerances.tilt_deg'],
      ['too many samples', [['tolerances.tilt_deg', '0.1'], ['samples', '2000000']], 'samples'],
    ]) {
      for (const [p, v] of fill) await enter(page, p, v);
      await solve(page, ['error']);
      await expectError(page, errorField, what);
      for (const [p, v] of fill) assert.equal(await page.inputValue(field(p)), v, `${what}: ${p} keeps what was typed`);
    }
    // Enter in a field solves (the keyboard path).
    await page.fill(field('samples'), '0');
    await page.press(field('samples'), 'Enter');
    await page.waitForFunction(() => document.getElementById('design').dataset.state === 'done', null, { timeout: 10000 });
    assert.equal(await errorText(page, 'samples'), '');
  });
});

test('an achromatic pair and a recombiner agree with the command line', { timeout: 120000 }, async () => {
  await withPage(async ({ page }) => {
    await choose(page, 'kind', 'achromat');
    await choose(page, 'first.material', 'quartz');
    await choose(page, 'second.material', 'mgf2');
    await enter(page, 'retardance_waves', '0.25');
    await enter(page, 'wavelengths_nm[0]', '500');
    await enter(page, 'wavelengths_nm[1]', '900');
    await solve(page);
    await expectAgreement(page, [
      'design.plates.0.thickness_mm', 'design.plates.1.thickness_mm', 'design.at_design_wavelengths.0.0', 'design.at_design_wavelengths.0.1',
      'design.at_design_wavelengths.1.0', 'design.at_design_wavelengths.1.1', 'design.max_error_waves',
    ], 'achromat');
    await expectPlots(page, ['retardance-wavelength'], 'achromat');

    await choose(page, 'kind', 'recombiner');
    await choose(page, 'material', 'calcite');
    await enter(page, 'wavelength_nm', '632.8');
    await enter(page, 'length_mm', '10');
    await enter(page, 'length_mismatch_mm', '0.002');
    await solve(page);
    const { cli } = await expectAgreement(page, [
      'design.recombined', 'design.residual_separation_mm', 'design.phase_difference_rad',
      'design.length_mismatch_to_break_mm.0', 'design.length_mismatch_to_break_mm.1',
      'design.tilt_mismatch_to_break_deg.0', 'design.tilt_mismatch_to_break_deg.1',
    ], 'recombiner');
    assert.equal(cli.recombined, true);
    await expectPlots(page, [], 'recombiner');
    await page.click('#design-use');
    await page.waitForFunction(() => document.querySelectorAll('[data-quantity^="rays."][data-quantity$=".power"]').length === 4, null, { timeout: 15000 });
  });
});

test('variants: custom indices with a fixed cut, a multiple-order plate, a rotator, a narrow band', { timeout: 120000 }, async () => {
  await withPage(async ({ page }) => {
    const cases = [
      ['displacer, custom indices, cut 30°, band', async () => {
        await choose(page, 'kind', 'displacer');
        await choose(page, 'material', 'custom');
        await enter(page, 'no', '1.65');
        await enter(page, 'ne', '1.48');
        await enter(page, 'separation_mm', '1.5');
        await enter(page, 'cut_tilt_deg', '30');
        await enter(page, 'band_nm[0]', '500');
        await enter(page, 'band_nm[1]', '900');
        await enter(page, 'samples', '15000');
      }, ['design.cut_tilt_deg', 'design.walkoff_slope', 'design.band.min_at_nm', 'design.monte_carlo.mean'], ['separation-wavelength', 'tolerance-histogram']],
      ['waveplate, order 7 half-wave in MgF2 at 1064 nm', async () => {
        await choose(page, 'kind', 'waveplate');
        await choose(page, 'material', 'mgf2');
        await choose(page, 'order', 'multiple');
        await enter(page, 'order_number', '7');
        await enter(page, 'wavelength_nm', '1064');
        await enter(page, 'retardance_waves', '0.5');
        await enter(page, 'band_nm[0]', '');
        await enter(page, 'band_nm[1]', '');
      }, ['design.plates.0.thickness_mm', 'design.order_number', 'design.acceptance_deg'], ['retardance-wavelength', 'retardance-angle-0', 'retardance-angle-45', 'retardance-angle-90']],
      ['achromat, band narrower than the design wavelengths', async () => {
        await choose(page, 'kind', 'achromat');
        await enter(page, 'band_nm[0]', '600');
        await enter(page, 'band_nm[1]', '800');
      }, ['design.max_error_waves'], ['retardance-wavelength']],
      ['recombiner, YVO4 with a rotator and a cut mismatch', async () => {
        await choose(page, 'kind', 'recombiner');
        await choose(page, 'material', 'yvo4');
        await enter(page, 'wavelength_nm', '1064');
        await enter(page, 'length_mm', '8');
        await enter(page, 'cut_tilt_deg', '45');
        await choose(page, 'middle', 'rotator');
        await enter(page, 'rotator_deg', '90');
        await enter(page, 'tilt_mismatch_deg', '0.01');
      }, ['design.overlap', 'design.tilt_sensitivity.0'], []],
    ];
    for (const [what, fill, required, plots] of cases) {
      await fill();
      await solve(page);
      await expectAgreement(page, required, what, { fdTolerance: true });
      await expectPlots(page, plots, what);
    }
  });
});

test('the panel is labelled, reachable by keyboard and fits 1280 px and 400 px (target/e2e/design*.png)', { timeout: 120000 }, async () => {
  for (const [width, name, scheme] of [[1280, 'design.png', 'light'], [400, 'design-narrow.png', 'dark']]) {
    await withPage(
      async ({ page }) => {
        for (const kind of ['displacer', 'waveplate', 'achromat', 'recombiner', 'angular-splitter', 'prism-polarizer', 'tilt-tuning']) {
          await choose(page, 'kind', kind);
          const unlabelled = await page.$$eval('#design [data-design-field]', (els) =>
            els
              .filter((el) => el.getClientRects().length > 0)
              .filter((el) => !(el.labels && el.labels.length && el.labels[0].textContent.trim()) && !el.getAttribute('aria-label'))
              .map((el) => el.dataset.designField),
          );
          assert.deepEqual(unlabelled, [], `${kind}: every field has a label`);
          const slots = await page.$$eval('#design [data-design-field]', (els) =>
            els
              .filter((el) => el.getClientRects().length > 0)
              .filter((el) => !document.querySelector(`[data-design-error-for="${CSS.escape(el.dataset.designField)}"]`))
              .map((el) => el.dataset.designField),
          );
          assert.deepEqual(slots, [], `${kind}: every field has its error slot`);
        }
        await choose(page, 'kind', 'displacer');
        await enter(page, 'separation_mm', '2');
        await enter(page, 'band_nm[0]', '550');
        await enter(page, 'band_nm[1]', '750');
        // From the last field, Tab reaches Solve; Space presses it.
        await page.focus(field('seed'));
        await page.keyboard.press('Tab');
        assert.equal(await page.evaluate(() => document.activeElement.id), 'design-solve', 'Tab from the last field reaches Solve');
        await page.keyboard.press('Space');
        await page.waitForFunction(() => document.getElementById('design').dataset.state === 'done', null, { timeout: 30000 });
        await expectPlots(page, ['separation-wavelength', 'tolerance-histogram'], `${width} px`);
        const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
        assert.ok(overflow <= 1, `at ${width} px the page is ${overflow} px wider than the window`);
        await page.locator('#design').screenshot({ path: path.join(ARTIFACTS, name) });
      },
      { viewport: { width, height: 900 }, colorScheme: scheme },
    );
    assert.ok(fs.statSync(path.join(ARTIFACTS, name)).size > 1000, `${name} written`);
  }
});

/** The design's warnings and shop notes as the panel lists them: {warnings: [text], notes: [text], role}. */
const adviceShown = (page) =>
  page.evaluate(() => {
    const list = (key) => [...document.querySelectorAll(`#design-results [data-design-advice="${key}"] li`)]
      .filter((li) => li.getClientRects().length > 0)
      .map((li) => li.textContent);
    const box = document.querySelector('#design-results .design-advice');
    return { warnings: list('warnings'), notes: list('notes'), role: box ? box.getAttribute('role') : null };
  });

/** The order sheet's rows as {term: text}. */
const orderSheet = (page) =>
  page.evaluate(() => Object.fromEntries([...document.querySelectorAll('#order-sheet [data-order]')]
    .map((r) => [r.dataset.order, r.querySelector('dd').textContent])));

test('warnings, shop notes and bounds read as words in the panel and on the order sheet; alpha-BBO is marked unverified wherever it is named', { timeout: 120000 }, async () => {
  await withPage(async ({ page }) => {
    // Every material list of the page (the set-up's and the panel's selects) marks the formula
    // without a journal source, and only it (src/optics/material.rs: alpha-BBO is the unverified one).
    const options = await page.$$eval('select option', (els) => els
      .filter((o) => /material$/.test(o.parentElement.dataset.field ?? o.parentElement.dataset.designField ?? ''))
      .map((o) => [o.value, o.textContent]));
    assert.ok(options.some(([v]) => v === 'alpha-bbo'), 'alpha-BBO is listed');
    for (const [value, text] of options) {
      assert.equal(/unverified data/.test(text), value === 'alpha-bbo', `option ${value}: ${text}`);
    }

    // An alpha-BBO displacer: the unverified-data warning, named by the label of its field.
    await choose(page, 'kind', 'displacer');
    await choose(page, 'material', 'alpha-bbo');
    const hint = () => page.$eval(field('material'), (el) => {
      const h = document.getElementById(`${el.id}-hint`);
      return h && h.getClientRects().length > 0 ? h.textContent : '';
    });
    assert.match(await hint(), /^Unverified data/, 'the select says so beside it, where its option text may be cut');
    await enter(page, 'wavelength_nm', '632.8');
    await enter(page, 'separation_mm', '1');
    await enter(page, 'samples', '0');
    await solve(page);
    const { cli } = await shownAndCli(page, 'alpha-BBO displacer');
    let advice = await adviceShown(page);
    assert.equal(advice.role, 'status', 'the lists are a status region');
    assert.equal(advice.warnings.length, cli.warnings.length, `every warning of the command line is listed: ${advice.warnings}`);
    assert.ok(advice.warnings.some((w) => /^Material of the part: unverified data for alpha-bbo/.test(w)), `the unverified-data warning in words: ${advice.warnings}`);
    assert.ok(advice.warnings.every((w) => !/^[a-z_.[\]0-9]+: /.test(w)), `no request path opens a warning: ${advice.warnings}`);
    const material = await page.textContent('#design-cards [data-quantity="design.material"]');
    assert.match(material, /unverified data/, `the results' material line: ${material}`);
    let sheet = await orderSheet(page);
    assert.match(sheet.Material, /unverified data/, `the order sheet's material: ${sheet.Material}`);
    assert.match(sheet.Warnings, /unverified data for alpha-bbo/, `the order sheet's warnings: ${sheet.Warnings}`);

    // A displacer longer than about 100 mm (calcite, 12 mm separation: walk-off ≈ 6.2°, so
    // L ≈ 12 mm / tan 6.2° ≈ 110 mm, from memory of calcite's indices) gets the long-crystal note.
    await choose(page, 'material', 'calcite');
    assert.equal(await hint(), '', 'no such hint for calcite');
    await enter(page, 'separation_mm', '12');
    await solve(page);
    const long = await shownAndCli(page, 'long calcite displacer');
    assert.ok(long.cli.length_mm > 100, `the plate is ${long.cli.length_mm} mm long`);
    advice = await adviceShown(page);
    assert.deepEqual(advice.warnings, [], 'calcite at 632.8 nm has no warning');
    assert.equal(advice.notes.length, long.cli.notes.length, `every shop note is listed: ${advice.notes}`);
    assert.ok(advice.notes.some((n) => /^The plate \(calcite\) is [\d.]+ mm long, longer than about 100 mm/.test(n)), `the long-crystal note: ${advice.notes}`);
    sheet = await orderSheet(page);
    assert.match(sheet['Shop notes'], /longer than about 100 mm/, `the order sheet's notes: ${sheet['Shop notes']}`);
    assert.equal(sheet.Warnings, undefined, 'no warnings row without warnings');

    // A zero-order quartz quarter-wave plate keeps its retardance within 0.01 waves up to the
    // largest incidence asked (10°): its acceptance is a bound, shown as one.
    await choose(page, 'kind', 'waveplate');
    await choose(page, 'order', 'zero');
    await choose(page, 'material', 'quartz');
    await enter(page, 'retardance_waves', '0.25');
    await solve(page);
    const wp = await shownAndCli(page, 'quartz quarter-wave');
    assert.equal(wp.cli.acceptance_bound, 'at_least');
    const acc = await page.$eval('#design-cards [data-quantity="design.acceptance_deg"]', (el) => ({ text: el.textContent, value: el.dataset.value, bound: el.dataset.bound }));
    assert.equal(acc.text, '≥\u00a010°', `a bound reads as one: ${acc.text}`);
    assert.equal(acc.value, String(wp.cli.acceptance_deg), 'data-value stays the number');
    assert.equal(acc.bound, 'at_least');
    const planes = await page.$$eval('#design-cards [data-quantity^="design.angular."]', (els) => els.map((el) => [el.dataset.bound, el.textContent]));
    assert.equal(planes.length, wp.cli.angular.length);
    planes.forEach(([bound, text], i) => {
      assert.equal(bound, wp.cli.angular[i].acceptance_bound);
      assert.equal(text.startsWith('≥'), bound === 'at_least', `plane ${i}: ${text}`);
    });
    advice = await adviceShown(page);
    assert.ok(advice.notes.some((n) => /thinner than about 0\.1 mm/.test(n)), `the thin-plate note: ${advice.notes}`);
    sheet = await orderSheet(page);
    assert.match(sheet.Performance, /acceptance ≥ 10° of incidence/, `the order sheet's acceptance: ${sheet.Performance}`);

    // Where the limit is found (a 40° range: the plate leaves 0.01 waves before it), no "≥".
    await enter(page, 'max_incidence_deg', '40');
    await solve(page);
    const found = await shownAndCli(page, 'quartz quarter-wave, 40°');
    assert.equal(found.cli.acceptance_bound, 'found');
    const accFound = await page.$eval('#design-cards [data-quantity="design.acceptance_deg"]', (el) => ({ text: el.textContent, bound: el.dataset.bound }));
    assert.ok(!accFound.text.includes('≥') && accFound.bound === 'found', `a found acceptance is a plain angle: ${accFound.text}`);
  });
});
