// End-to-end tests of the design panel's quartz rotator (www/design-panel.js): a c-cut quartz
// plate of one hand that turns linear light by a requested angle, filled in through the panel's
// controls and solved in its worker. The numbers shown are checked against the command line's
// answer to the same request, as kept in the golden files tests/cli/design/golden/*.json (written
// by `doublespar design`, native build); the request the fields say must be that golden request
// (with the core's default tolerances written out). "Use this part" loads the plate into the
// set-up, where the page's own trace must turn the light by the requested angle; bad values put
// the core's message beside their field and keep every entry.
//
// Run: `cd tests/e2e && node --test design-rotator.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { useBrowser, withPage as openAt, close, enterValue, solveDesign, waitScenario } from './support.mjs';
import { GOLDEN, golden, field, fill, expectDesign, expectPlots, expectFieldError, orderSheet, fig, expectRow } from './design-support.mjs';

const env = useBrowser({ cli: false });
const withPage = (body, options = {}) => openAt(env, '/', ({ page }) => body(page), options);

// The core's default tolerances and search limit (src/contract/request/rotator.rs), which the
// fields start from and the request then states.
const DEFAULTS = { rotation_tolerance_deg: 0.5, ellipticity_tolerance_deg: 0.5, max_incidence_deg: 10 };

/** `x` brought into (−90°, 90°] by whole half turns: a linear state's azimuth modulo 180°. */
const halfTurn = (x) => x - 180 * Math.round(x / 180);

const REQUIRED = [
  'thickness_mm', 'thickness_tolerance_mm', 'requested_rotation_deg', 'rotation_deg', 'traced_rotation_deg',
  'rotatory_power_deg_per_mm', 'dispersion_deg_per_nm', 'acceptance_deg', 'acceptance_limited_by',
  'rotation_tolerance_deg', 'ellipticity_tolerance_deg', 'handedness',
];

test('a 90° quartz rotator agrees with the command line, draws its curves, fills the order sheet and, loaded, turns the light by 90°', { timeout: 120000 }, async () => {
  const { request, design } = golden('quartz-rotator-90');
  await withPage(async (page) => {
    await fill(page, 'quartz-rotator', [['rotation_deg', 90], ['wavelength_nm', 632.8], ['band_nm[0]', 600], ['band_nm[1]', 680]]);
    assert.equal(await page.locator(field('material')).isVisible(), false, 'the crystal is quartz: no material to choose');
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), { ...request, ...DEFAULTS }, 'the request the fields say');
    const b = design.band.rotation_deg;
    const [lo, hi] = [b.indexOf(Math.min(...b)), b.indexOf(Math.max(...b))];
    await expectDesign(page, design, [...REQUIRED, `band.rotation_deg.${lo}`, `band.rotation_deg.${hi}`, `band.wavelength_nm.${lo}`], '90° rotator');
    assert.equal(design.handedness, 'left', 'a positive rotation is a left-handed plate');
    assert.equal(await page.locator('[data-quantity="design.half_turns_added"]').count(), 0, 'no half turns to show');
    await expectPlots(page, ['rotation-wavelength', 'ellipticity-incidence', 'rotation-error-incidence'], '90° rotator');
    // The acceptance figure names the angle in its text alternative.
    const label = await page.getAttribute('canvas[data-design-plot="ellipticity-incidence"]', 'aria-label');
    assert.ok(label.includes(`acceptance ${fig(design.acceptance_deg)}°`), label);
    // The temperature note is there, in the panel's words.
    const notes = await page.$$eval('[data-design-advice="notes"] li', (els) => els.map((e) => e.textContent));
    assert.ok(notes.some((n) => n.startsWith('The temperature sensitivity dθ/dT carries the rotatory power\'s own change')), notes.join(' | '));

    const sheet = await orderSheet(page);
    assert.ok(sheet.Material?.toLowerCase().includes('quartz'), `the order sheet names the material: ${sheet.Material}`);
    expectRow(sheet, 'Optical activity', ['left-handed crystal', `rotatory power ${fig(design.rotatory_power_deg_per_mm, 5)}°/mm at 632.8 nm`, 'g11 = 0'], 'rotator');
    expectRow(sheet, 'Dimensions', [`plate ${fig(design.thickness_mm, 5)} mm ± ${fig(design.thickness_tolerance_mm, 2)} mm thick`], 'rotator');
    expectRow(sheet, 'Cut', ['c-cut: optic axis along the face normal'], 'rotator');
    expectRow(sheet, 'Wavelength band', ['600 nm to 680 nm', `rotation from ${fig(b[lo])}° to ${fig(b[hi])}°`], 'rotator');
    expectRow(sheet, 'Performance', [`rotation 90° from x toward y at 632.8 nm`, `dθ/dλ ${fig(design.dispersion_deg_per_nm, 3)}°/nm`,
      `acceptance ${fig(design.acceptance_deg, 3)}° of incidence (set by the ellipticity)`], 'rotator');
    expectRow(sheet, 'Shop notes', ['The temperature sensitivity dθ/dT carries the rotatory power\'s own change'], 'rotator');

    // In the set-up: the page's own exact trace of the plate, lit by linear light along x,
    // leaves linear light at the requested azimuth (modulo 180°).
    await page.click('#design-use');
    const sc = await waitScenario(page, (s) => s.elements.length === 1 && close(s.elements[0].thickness_mm, design.thickness_mm), 'the set-up holds the designed plate');
    const plate = sc.elements[0];
    assert.deepEqual([plate.material, plate.handedness, plate.optical_activity, plate.axis.tilt_deg], ['quartz', 'left', true, 0], JSON.stringify(plate));
    await page.waitForSelector('[data-quantity="spots[0].ellipse.azimuth_deg"]');
    const az = Number(await page.getAttribute('[data-quantity="spots[0].ellipse.azimuth_deg"]', 'data-value'));
    assert.ok(Math.abs(halfTurn(az - 90)) < 1e-9, `traced azimuth ${az}°, requested 90°`);
    const chi = Number(await page.getAttribute('[data-quantity="spots[0].ellipse.ellipticity_deg"]', 'data-value'));
    assert.ok(Math.abs(chi) < 1e-9, `linear output (ellipticity ${chi}°)`);
  });
});

test('a forced hand with a thickness floor reaches the rotation modulo 180° and says so', { timeout: 120000 }, async () => {
  const { request, design } = golden('quartz-rotator-forced-right');
  await withPage(async (page) => {
    await fill(page, 'quartz-rotator', [
      ['rotation_deg', 45], ['wavelength_nm', 1064], ['handedness', 'right'], ['min_thickness_mm', 10],
      ['rotation_tolerance_deg', 0.2], ['ellipticity_tolerance_deg', 1],
    ]);
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), { ...request, max_incidence_deg: 10 }, 'the request the fields say');
    await expectDesign(page, design, [...REQUIRED, 'half_turns_added'], 'forced right-handed rotator');
    assert.equal(design.half_turns_added, -1);
    const warnings = await page.$$eval('[data-design-advice="notes"] li', (els) => els.map((e) => [e.dataset.field, e.textContent]));
    assert.ok(warnings.some(([f, t]) => f === 'handedness' && t.startsWith('Hand of the quartz: a right-handed crystal turns the other way')), JSON.stringify(warnings));
    const sheet = await orderSheet(page);
    expectRow(sheet, 'Performance', [`rotation −135° from x toward y at 1064 nm (the request 45° minus 1 × 180°)`], 'forced rotator');
    expectRow(sheet, 'Optical activity', ['right-handed crystal'], 'forced rotator');
  });
});

test('bad rotator values show the core\'s message beside their field and keep every entry', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    await fill(page, 'quartz-rotator', [['rotation_deg', 45], ['band_nm[0]', 600], ['band_nm[1]', 700]]);
    const zero = JSON.parse(fs.readFileSync(path.join(GOLDEN, 'golden', 'error-rotator-zero-rotation.json'), 'utf8')).stdout.error;
    const message = await expectFieldError(page, ['rotation_deg', 0], 'rotation_deg', 'no rotation');
    assert.ok(message.includes(zero.message) && message.startsWith('Rotation of the part'), `the core's message, with the field's name (${message})`);
    await expectFieldError(page, ['rotation_deg', 'abc'], 'rotation_deg', 'rotation "abc"');
    await expectFieldError(page, ['rotation_deg', 4000], 'rotation_deg', 'beyond ten turns');
    await enterValue(page, field('rotation_deg'), 45);
    await expectFieldError(page, ['ellipticity_tolerance_deg', 50], 'ellipticity_tolerance_deg', 'ellipticity tolerance beyond 45°');
    await enterValue(page, field('ellipticity_tolerance_deg'), 0.5);
    await expectFieldError(page, ['min_thickness_mm', -1], 'min_thickness_mm', 'negative floor');
    await enterValue(page, field('min_thickness_mm'), '');
    // At the resonance of the rotatory-dispersion formula (92.6 nm) there is no rotatory power.
    await expectFieldError(page, ['wavelength_nm', 92.6], 'wavelength_nm', 'at the resonance');
    await enterValue(page, field('wavelength_nm'), 632.8);
    await solveDesign(page);
    assert.equal(await page.evaluate(() => document.getElementById('design').dataset.state), 'done');
  });
});

test('the rotator solves from its starting values and fits 400 px', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    await page.selectOption(field('kind'), 'quartz-rotator');
    await solveDesign(page);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    assert.ok(overflow <= 1, `at 400 px the page is ${overflow} px wider than the window`);
    const rows = await page.$$eval('#design-cards .q, #design-results strong', (els) => els.map((e) => [e.querySelector('dt')?.textContent ?? '', (e.querySelector('dd') ?? e).textContent]));
    const bare = rows.filter(([, t]) => /^[−-]?\d/.test(t) && !/(°|nm|mm|waves)/.test(t)).map(([label]) => label);
    assert.ok(rows.length > 8, 'numbers shown');
    assert.deepEqual(bare.filter((l) => !/half turns/.test(l)), [], 'numbers without a unit');
  }, { viewport: { width: 400, height: 900 } });
});

test('a link carries the rotator\'s fields, a forced hand included', { timeout: 120000 }, async () => {
  const { request } = golden('quartz-rotator-forced-right');
  let link = '';
  await withPage(async (page) => {
    await fill(page, 'quartz-rotator', [
      ['rotation_deg', 45], ['wavelength_nm', 1064], ['handedness', 'right'], ['min_thickness_mm', 10],
      ['rotation_tolerance_deg', 0.2], ['ellipticity_tolerance_deg', 1],
    ]);
    // The address follows the fields (the history writes it after a pause).
    await page.waitForFunction(() => decodeURIComponent(location.hash.split('&design=')[1] ?? '') === JSON.stringify(window.doublespar.designRequest()), null, { timeout: 15000 });
    link = await page.evaluate(() => location.hash);
  });
  await openAt(env, `/${link}`, async ({ page }) => {
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), { ...request, max_incidence_deg: 10 }, 'the link gives the same request');
    assert.equal(await page.inputValue(field('handedness')), 'right', 'and shows the forced hand');
  });
});
