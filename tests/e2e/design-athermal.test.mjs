// End-to-end tests of the design panel's athermal waveplate pair and of its temperature field
// (www/design-panel.js): the request is filled in through the panel's controls and solved in its
// worker, and every number shown is checked against the release command line's answer to the
// same request (`doublespar design KIND --flag value …`, native build), to 1e-12 and to the
// digits the page shows. A temperature given in the panel changes a displacer's answer exactly
// as --temperature-c does; an out-of-range temperature is named beside its field and every entry
// is kept.
//
// Run: `cd tests/e2e && node --test design-athermal.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { CLI, useBrowser, withPage as openAt, solveDesign, quantities, mismatches, close } from './support.mjs';
import { field, fill, expectDesign, expectPlots, expectFieldError, useDesign, orderSheet, expectRow } from './design-support.mjs';

const env = useBrowser({ cli: true });
const withPage = (body, options = {}) => openAt(env, '/', ({ page }) => body(page), options);

/** The release command line's design for `kind` with `flags` ([name, value] pairs). */
function cliDesign(kind, flags) {
  const args = ['design', kind, ...flags.flatMap(([k, v]) => [`--${k}`, String(v)])];
  const r = spawnSync(CLI, args, { encoding: 'utf8' });
  assert.equal(r.status, 0, `doublespar ${args.join(' ')}: ${r.stdout}${r.stderr}`);
  return JSON.parse(r.stdout);
}

const SUPERSCRIPT = { '⁰': '0', '¹': '1', '²': '2', '³': '3', '⁴': '4', '⁵': '5', '⁶': '6', '⁷': '7', '⁸': '8', '⁹': '9', '⁻': '-' };

/** The number a result's text starts with ("0.45513 mm", "−1.234×10⁻⁸ waves/K²", "≥ 500 °C"). */
function shownNumber(text) {
  const t = text.replace(/[≥≤\u00a0]/g, ' ').replace(/\u2212/g, '-').trim();
  const m = /^(-?\d+(?:\.\d+)?)(?:×10([⁻⁰¹²³⁴⁵⁶⁷⁸⁹]+))?/.exec(t);
  assert.ok(m, `a number in ${JSON.stringify(text)}`);
  const exp = m[2] ? Number([...m[2]].map((c) => SUPERSCRIPT[c]).join('')) : 0;
  const digits = (m[1].split('.')[1] ?? '').length;
  return { value: Number(m[1]) * 10 ** exp, half: 0.5 * 10 ** (exp - digits) };
}

/** The text of the result `design.<path>` agrees with `want` to the digits it shows. */
async function expectDigits(page, path, want, what) {
  const el = page.locator(`[data-quantity="design.${path}"]`).first();
  const text = await el.textContent();
  const { value, half } = shownNumber(text);
  assert.ok(Math.abs(value - want) <= half * (1 + 1e-9), `${what}: ${path} shows ${text}, the command line ${want}`);
}

test('an athermal quartz and MgF2 pair agrees with the command line to the digits shown, draws its curve and loads its two plates', { timeout: 120000 }, async () => {
  const flags = [['first-material', 'quartz'], ['second-material', 'mgf2'], ['retardance-waves', 0.25], ['wavelength-nm', 632.8], ['acceptance-error-waves', 0.01]];
  const design = cliDesign('athermal-waveplate', flags);
  await withPage(async (page) => {
    await fill(page, 'athermal-waveplate', [['first.material', 'quartz'], ['second.material', 'mgf2'], ['retardance_waves', 0.25], ['wavelength_nm', 632.8], ['acceptance_error_waves', 0.01]]);
    assert.equal(await page.locator(field('temperature_c')).isVisible(), true, 'the temperature field is there');
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), {
      kind: 'athermal-waveplate', first: { material: 'quartz' }, second: { material: 'mgf2' },
      retardance_waves: 0.25, wavelength_nm: 632.8, acceptance_error_waves: 0.01,
    }, 'the request the fields say');
    const shown = ['plates.0.thickness_mm', 'plates.1.thickness_mm', 'temperature.band_c.0', 'temperature.band_c.1', 'curvature_waves_per_k2'];
    await expectDesign(page, design, [...shown, 'retardance_waves', 'single_plate.thickness_mm', 'temperature.design_temperature_c'], 'athermal pair');
    const at = (p) => p.split('.').reduce((v, k) => v[k], design);
    for (const p of shown) await expectDigits(page, p, at(p), 'athermal pair');
    assert.ok(design.temperature.band_c[1] - design.temperature.band_c[0] >= design.single_plate.temperature.band_c[1] - design.single_plate.temperature.band_c[0],
      'the pair keeps its retardance over a wider band than one plate alone');
    await expectPlots(page, ['retardance-temperature'], 'athermal pair');
    expectRow(await orderSheet(page), 'Dimensions', ['plate 1', 'plate 2', 'as made at 20 °C'], 'athermal pair');
    const sc = await useDesign(page, design, 'athermal pair');
    assert.deepEqual(sc.elements.map((e) => e.material), ['quartz', 'mgf2'], 'the set-up holds the two plates');
  });
});

/**
 * As expectDesign, except the o–e phase reduced modulo 2π: a phase of some 15 000 rad carries
 * about 1e-11 rad of rounding there, which the wasm and native maths libraries round differently
 * once the indices are shifted to a temperature; it is compared to 1e-10 rad. The change per
 * kelvin (a central difference, about 1e-13 µm/K of rounding) is compared with the 1e-12 floor.
 */
async function expectHot(page, design, required) {
  const phase = 'design.exit_phase_mod_2pi_rad';
  const shown = (await quantities(page)).filter(([p]) => p.startsWith('design.'));
  assert.deepEqual(mismatches(shown.filter(([p]) => p !== phase), { design }, required.map((p) => `design.${p}`)), [], 'displacer at 60 °C: the page and the command line disagree');
  const [, v] = shown.find(([p]) => p === phase);
  assert.ok(close(Number(v), design.exit_phase_mod_2pi_rad, 0, 1e-10), `the exit phase: page ${v}, command line ${design.exit_phase_mod_2pi_rad}`);
  assert.ok(shown.some(([p]) => p === 'design.temperature.per_kelvin.separation_um'), 'the change per kelvin is shown');
}

test('a temperature in the panel changes a displacer exactly as --temperature-c does; out of range it is named beside its field', { timeout: 120000 }, async () => {
  const base = [['material', 'calcite'], ['separation-mm', 2], ['samples', 0]];
  const hot = cliDesign('displacer', [...base, ['temperature-c', 60]]);
  const cold = cliDesign('displacer', base);
  assert.notEqual(hot.length_mm, cold.length_mm, 'the command line designs another length at 60 °C');
  await withPage(async (page) => {
    await fill(page, 'displacer', [['material', 'calcite'], ['separation_mm', 2], ['samples', 0], ['temperature_c', 60]]);
    await solveDesign(page);
    const req = await page.evaluate(() => window.doublespar.designRequest());
    assert.equal(req.temperature_c, 60, 'the request states the temperature');
    const required = ['length_mm', 'length_at_temperature_mm', 'separation_mm', 'no', 'ne', 'temperature.design_temperature_c'];
    await expectHot(page, hot, required);
    await expectDigits(page, 'length_mm', hot.length_mm, 'displacer at 60 °C');
    // Loaded into the set-up, the part works at its temperature: the page's own trace separates
    // the beams by the 2 mm asked.
    const sc = await useDesign(page, hot, 'displacer at 60 °C');
    assert.equal(sc.temperature_c, 60, 'the set-up takes the design temperature');
    await page.waitForSelector('[data-quantity="elements[0].separation_mm"]');
    const sep = Number(await page.getAttribute('[data-quantity="elements[0].separation_mm"]', 'data-value'));
    assert.ok(close(sep, 2, 1e-9), `the set-up separates by ${sep} mm`);
    // Back at 20 °C the panel's answer is the command line's without the flag.
    await fill(page, 'displacer', [['temperature_c', 20]]);
    await solveDesign(page);
    assert.equal('temperature_c' in await page.evaluate(() => window.doublespar.designRequest()), false, '20 °C is the default');
    await expectDesign(page, cold, ['length_mm', 'temperature.per_kelvin.separation_um'], 'displacer at 20 °C');

    const message = await expectFieldError(page, ['temperature_c', 600], 'temperature_c', 'a temperature above 500 °C');
    assert.ok(message.includes('500'), `the message gives the range: ${message}`);
  });
});

test('the athermal pair solves from its starting values, fits 400 px and every number has its unit; a link carries it with its temperature', { timeout: 120000 }, async () => {
  let link = '';
  await withPage(async (page) => {
    await page.selectOption(field('kind'), 'athermal-waveplate');
    await fill(page, 'athermal-waveplate', [['temperature_c', 35]]);
    await solveDesign(page);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    assert.ok(overflow <= 1, `at 400 px the page is ${overflow} px wider than the window`);
    const rows = await page.$$eval('#design-cards .q, #design-results strong', (els) => els.map((e) => [e.querySelector('dt')?.textContent ?? '', (e.querySelector('dd') ?? e).textContent]));
    const bare = rows.filter(([, t]) => /^[−-]?\d/.test(t) && !/(°|nm|mm|waves|K)/.test(t)).map(([label]) => label);
    assert.ok(rows.length > 10, 'numbers shown');
    assert.deepEqual(bare, [], 'numbers without a unit');
    const request = await page.evaluate(() => window.doublespar.designRequest());
    assert.equal(request.temperature_c, 35, 'the request states the temperature');
    await page.waitForFunction(() => decodeURIComponent(location.hash.split('&design=')[1] ?? '') === JSON.stringify(window.doublespar.designRequest()), null, { timeout: 15000 });
    link = await page.evaluate(() => location.hash);
  }, { viewport: { width: 400, height: 900 } });
  await openAt(env, `/${link}`, async ({ page }) => {
    const request = await page.evaluate(() => window.doublespar.designRequest());
    assert.equal(request.kind, 'athermal-waveplate', 'the link chooses the kind');
    assert.equal(request.temperature_c, 35, 'and fills the temperature');
  });
});
