// End-to-end tests of the design panel's birefringent filter, broadband retarder and
// liquid-crystal cell voltage
// (www/design-panel.js): the request filled in through the panel's controls and solved in its
// worker gives the command line's answer (tests/cli/design/golden), its plots are drawn, the
// order sheet names the plates, "Use this part" loads them, and a bad value is named beside its
// field with every entry kept.
//
// Run: `cd tests/e2e && node --test design-filters.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, solveDesign, close, quantities, waitScenario } from './support.mjs';
import { golden, fill, expectDesign, expectPlots, expectFieldError, orderSheet, expectRow } from './design-support.mjs';

const env = useBrowser({ cli: true });
const withPage = (body) => openAt(env, '/', ({ page }) => body(page));

test('a stage-doubling filter from the panel is the command line\'s, drawn and loaded', { timeout: 120000 }, async () => {
  const { request, design } = golden('filter-mgf2-stage-doubling');
  await withPage(async (page) => {
    await fill(page, 'birefringent-filter', [['material', request.material], ['layout', request.layout], ['stages', request.stages],
      ['wavelength_nm', request.wavelength_nm], ['bandwidth_nm', request.bandwidth_nm]]);
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), request, 'the request the fields say');
    await expectDesign(page, design, ['plates.0.thickness_mm', 'plates.3.thickness_mm', 'order', 'total_thickness_mm', 'wavelength_nm'], 'filter');
    const shown = (await page.evaluate(() => window.doublespar.designShown())).design;
    assert.ok(close(shown.fwhm_nm, design.fwhm_nm, 1e-9), `pass band: page ${shown.fwhm_nm}, command line ${design.fwhm_nm}`);
    await expectPlots(page, ['transmission-wavelength'], 'filter');
    expectRow(await orderSheet(page), 'Performance', ['pass band', 'FWHM'], 'filter');
    await page.click('#design-use');
    const kinds = design.scenario.elements.map((e) => e.kind).join();
    const sc = await waitScenario(page, (x) => x.elements.map((e) => e.kind).join() === kinds, 'the set-up holds the plates and polarizers');
    sc.elements.forEach((e, i) => {
      if (e.kind === 'crystal') assert.ok(close(e.thickness_mm, design.scenario.elements[i].thickness_mm), `element ${i}`);
    });
    await fill(page, 'birefringent-filter', [['layout', 'folded']]);
    await expectFieldError(page, ['stages', 11], 'stages', 'eleven folded plates');
  });
});

test('a broadband retarder from the panel is the command line\'s to the search\'s precision, with its plots', { timeout: 120000 }, async () => {
  const { request, design } = golden('broadband-quartz-half');
  await withPage(async (page) => {
    await fill(page, 'broadband-retarder', [['material', request.material], ['plates', request.plates], ['retardance_waves', request.retardance_waves],
      ['band_nm[0]', request.band_nm[0]], ['band_nm[1]', request.band_nm[1]]]);
    await solveDesign(page);
    const req = await page.evaluate(() => window.doublespar.designRequest());
    assert.deepEqual({ ...req, fast_axis_deg: undefined, generations: undefined, seed: undefined },
      { ...request, fast_axis_deg: undefined, generations: undefined, seed: undefined }, 'the request the fields say');
    const shown = (await page.evaluate(() => window.doublespar.designShown())).design;
    // The search is deterministic, but the page's and the command line's maths libraries may
    // round a comparison between two nearly equal candidates differently: compared to 1e-6.
    for (const k of ['retardance_waves', 'fast_axis_deg', 'distance']) {
      assert.ok(close(shown.departures[k], design.departures[k], 1e-6, 1e-9), `${k}: page ${shown.departures[k]}, command line ${design.departures[k]}`);
    }
    assert.ok(shown.departures.retardance_waves < shown.classic.departures.retardance_waves, 'better than the classic design');
    // Every number shown, to the same precision.
    const at = (p) => p.split('.').reduce((v, k) => v?.[k], design);
    const shownNumbers = (await quantities(page)).filter(([p]) => p.startsWith('design.'));
    assert.ok(shownNumbers.length > 15, 'the cards show the plates and departures');
    for (const [p, v] of shownNumbers) {
      const want = at(p.slice('design.'.length));
      if (typeof want === 'number') assert.ok(close(Number(v), want, 1e-6, 1e-9), `${p}: page ${v}, command line ${want}`);
      else assert.equal(v, String(want), p);
    }
    await expectPlots(page, ['retardance-wavelength', 'fast-axis-wavelength'], 'broadband retarder');
    expectRow(await orderSheet(page), 'Performance', ['within ±'], 'broadband retarder');
    await expectFieldError(page, ['plates', 9], 'plates', 'nine plates');
  });
});

test('a broadband retarder of two crystals from the panel alternates them plate by plate, as the command line designs it', { timeout: 120000 }, async () => {
  const { request, design } = golden('broadband-quartz-mgf2-half');
  await withPage(async (page) => {
    await fill(page, 'broadband-retarder', [['material', request.materials[0]], ['materials', request.materials[1]], ['plates', request.materials.length],
      ['retardance_waves', request.retardance_waves], ['band_nm[0]', request.band_nm[0]], ['band_nm[1]', request.band_nm[1]]]);
    await solveDesign(page);
    const req = await page.evaluate(() => window.doublespar.designRequest());
    assert.deepEqual({ ...req, fast_axis_deg: undefined, generations: undefined, seed: undefined },
      { ...request, fast_axis_deg: undefined, generations: undefined, seed: undefined }, 'the request the fields say: materials, no material or plates');
    const shown = (await page.evaluate(() => window.doublespar.designShown())).design;
    assert.deepEqual(shown.plates.map((p) => p.material), request.materials, 'each plate of its crystal');
    assert.equal(shown.classic, undefined, 'no classic design for two crystals');
    // As for one crystal: the worker's search may round a comparison differently, 1e-6.
    for (const k of ['retardance_waves', 'fast_axis_deg', 'distance']) {
      assert.ok(close(shown.departures[k], design.departures[k], 1e-6, 1e-9), `${k}: page ${shown.departures[k]}, command line ${design.departures[k]}`);
    }
    // A plate count the core refuses is named on the plates field, not on the second crystal.
    await expectFieldError(page, ['plates', 9], 'plates', 'nine plates of two crystals');
  });
});

test('a cell\'s voltage from the panel is the command line\'s, drawn, and loads the switched cell', { timeout: 120000 }, async () => {
  const { request, design } = golden('lc-voltage');
  await withPage(async (page) => {
    await fill(page, 'lc-voltage', [['thickness_um', request.thickness_um], ['lc', request.lc], ['rubbing_azimuth_deg', request.rubbing_azimuth_deg],
      ['wavelength_nm', request.wavelength_nm], ['retardance_waves', request.retardance_waves],
      ['retardance_range_waves[0]', request.retardance_range_waves[0]], ['retardance_range_waves[1]', request.retardance_range_waves[1]]]);
    assert.equal(await page.locator('[data-design-field="temperature_c"]').isVisible(), true, 'the temperature is checked against the nematic\'s range');
    await solveDesign(page);
    const req = await page.evaluate(() => window.doublespar.designRequest());
    assert.deepEqual({ ...req, twist_deg: undefined, pretilt_deg: undefined, max_voltage_v: undefined },
      { ...request, twist_deg: undefined, pretilt_deg: undefined, max_voltage_v: undefined }, 'the request the fields say');
    // The director solves converge in the worker's build as in the native one to rounding: 1e-9.
    const at = (p) => p.split('.').reduce((v, k) => v?.[k], design);
    const shownNumbers = (await quantities(page)).filter(([p]) => p.startsWith('design.'));
    assert.ok(shownNumbers.some(([p]) => p === 'design.voltage_v') && shownNumbers.some(([p]) => p === 'design.range.thickness_um'), 'voltage and range shown');
    for (const [p, v] of shownNumbers) {
      const want = at(p.slice('design.'.length));
      if (typeof want === 'number') assert.ok(close(Number(v), want, 1e-9, 1e-12), `${p}: page ${v}, command line ${want}`);
      else assert.equal(v, String(want), p);
    }
    await expectPlots(page, ['retardance-voltage'], 'cell voltage');
    expectRow(await orderSheet(page), 'Performance', ['V RMS'], 'cell voltage');
    await page.click('#design-use');
    const sc = await waitScenario(page, (x) => x.elements[0]?.kind === 'lc_cell', 'the set-up holds the cell');
    assert.ok(close(sc.elements[0].voltage_v, design.voltage_v, 1e-9), 'at the designed voltage');
    const traced = await page.evaluate(() => window.doublespar.session.result().elements[0].retardance_waves);
    assert.ok(close(traced, request.retardance_waves, 1e-6), `the page's trace of the cell gives ${traced} waves`);
    await expectFieldError(page, ['retardance_waves', 5], 'retardance_waves', 'a retardance the cell cannot reach');
    // 5CB clears to an isotropic liquid at about 35 °C (common practice): refused on the field.
    const hot = await expectFieldError(page, ['temperature_c', 40], 'temperature_c', 'a cell above its clearing point');
    assert.match(hot, /clearing point/, hot);
  });
});
