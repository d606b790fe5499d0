// End-to-end tests of the design panel's prism kinds (www/design-panel.js): an angular splitter
// of two wedges, a polarizing prism by total reflection and a tilt-tuned waveplate, each filled in
// through the panel's controls and solved in its worker. The numbers shown are checked against the
// command line's answer to the same request, as kept in the golden files
// tests/cli/design/golden/*.json (written by `doublespar design`, native build); the request the
// fields say must be that golden request (with the core's default tolerances written out). Bad
// values put the core's message beside their field and keep every entry, and "Use this part"
// loads the designed part into the set-up, where the page's own trace must agree with the design.
//
// Run: `cd tests/e2e && node --test design-prisms.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { useBrowser, withPage as openAt, close, enterValue, solveDesign } from './support.mjs';
import { GOLDEN, golden, field, fill, expectDesign, expectPlots, expectFieldError, useDesign, orderSheet, fig, expectRow } from './design-support.mjs';

const env = useBrowser({ cli: false });
const withPage = (body, options = {}) => openAt(env, '/', ({ page }) => body(page), options);

/** The page's own traced value at a result path (data-quantity), as a number. */
const traced = async (page, p) => Number(await page.getAttribute(`[data-quantity="${p}"]`, 'data-value'));

test('an angular splitter agrees with the command line, Monte Carlo included, and its wedges trace to the designed deviations', { timeout: 120000 }, async () => {
  const { request, design } = golden('angular-splitter-calcite');
  await withPage(async (page) => {
    await fill(page, 'angular-splitter', [
      ['material', 'calcite'], ['wavelength_nm', 632.8], ['split_angle_deg', 10], ['aperture_mm', 10],
      ['band_nm[0]', 450], ['band_nm[1]', 900], ['samples', 400], ['seed', 3],
    ]);
    assert.equal(await page.inputValue(field('cement_index')), '', 'optical contact unless a cement is given');
    assert.equal(await page.locator(field('tolerances.tilt_deg')).isVisible(), false, 'no displacer tolerances');
    await solveDesign(page);
    // The core's default tolerances (src/contract/request/splitter.rs) are the fields' starting values.
    const asked = await page.evaluate(() => window.doublespar.designRequest());
    assert.deepEqual(asked, { ...request, tolerances: { wedge_deg: 0.05, axis_deg: 0.5, incidence_deg: 0.1 } }, 'the request the fields say');
    const b = design.band.split_angle_deg;
    const [lo, hi] = [b.indexOf(Math.min(...b)), b.indexOf(Math.max(...b))];
    await expectDesign(page, design, [
      'wedge_angle_deg', 'split_angle_deg', 'small_angle_wedge_deg', 'thickness_mm.0', 'thickness_mm.1', 'clear_aperture_mm',
      'beams.0.deviation_deg', 'beams.1.deviation_deg', `band.split_angle_deg.${lo}`, `band.split_angle_deg.${hi}`,
      'split_angle_spread.n', 'split_angle_spread.mean', 'split_angle_spread.std', 'split_angle_spread.p5', 'split_angle_spread.p95',
    ], 'calcite splitter');
    assert.match(await page.textContent('#design-status'), /Solved, with 400 Monte Carlo samples/);
    await expectPlots(page, ['split-wavelength', 'tolerance-histogram'], 'splitter');

    // The order sheet: what an optician makes and checks, with the command line's numbers.
    const sheet = await orderSheet(page);
    const [oe, eo] = design.beams;
    const mc = design.split_angle_spread;
    assert.ok(sheet.Material?.toLowerCase().includes('calcite'), `splitter: the order sheet names the material: ${sheet.Material}`);
    expectRow(sheet, 'Wedge angle', [`${fig(design.wedge_angle_deg)}° ± 0.05°`], 'splitter');
    expectRow(sheet, 'Dimensions', [`wedge 1 ${fig(design.thickness_mm[0])} mm thick at the axis`, `wedge 2 ${fig(design.thickness_mm[1])} mm`, `${fig(design.edge_thickness_mm)} mm at the thin edge`], 'splitter');
    expectRow(sheet, 'Cut', ['± 0.5°', 'wedge 1 in the faces, along x', '(azimuth 0°)', 'wedge 2 in the faces, along y', '(azimuth 90°)'], 'splitter');
    expectRow(sheet, 'Contact', ['optical contact, no cement'], 'splitter');
    expectRow(sheet, 'Clear aperture', [`${fig(design.clear_aperture_mm)} mm`], 'splitter');
    expectRow(sheet, 'Wavelength band', ['450 nm to 900 nm', `split from ${fig(b[lo])}° to ${fig(b[hi])}°`], 'splitter');
    expectRow(sheet, 'Performance', [`split ${fig(design.split_angle_deg)}° at 632.8 nm`,
      `beam ${oe.label} (polarized along ${oe.polarization}) deviated ${fig(oe.deviation_deg)}°`,
      `beam ${eo.label} (polarized along ${eo.polarization}) deviated ${fig(eo.deviation_deg)}°`], 'splitter');
    expectRow(sheet, 'Tolerances', ['wedge angle ± 0.05°, each axis ± 0.5°, incidence ± 0.1°',
      `over 400 samples the split is ${fig(mc.mean, 5)}° ± ${fig(mc.std, 2)}°`, `${fig(mc.p5, 5)}° to ${fig(mc.p95, 5)}°`], 'splitter');

    // In the set-up, the page's exact trace of the two wedges deviates each beam as designed (the
    // trace gives the angle to the incident beam, the design its signed value toward +x).
    const sc = await useDesign(page, design, 'splitter');
    assert.ok(close(sc.elements[1].faces.front.tilt_deg, design.wedge_angle_deg), 'the common face has the designed wedge angle');
    for (const beam of design.beams) {
      await page.waitForSelector(`[data-quantity="rays.${beam.label}.deviation_deg"]`);
      const dev = await traced(page, `rays.${beam.label}.deviation_deg`);
      assert.ok(close(dev, Math.abs(beam.deviation_deg), 1e-9), `beam ${beam.label}: traced deviation ${dev}°, designed ${beam.deviation_deg}°`);
    }
  });
});

test('a cemented quartz splitter, and a splitter without a tolerance run', { timeout: 120000 }, async () => {
  const { request, design } = golden('angular-splitter-quartz-cemented');
  await withPage(async (page) => {
    await fill(page, 'angular-splitter', [
      ['material', 'quartz'], ['wavelength_nm', 1064], ['split_angle_deg', 1], ['aperture_mm', 15], ['cement_index', 1.48],
      ['samples', 200], ['seed', 1], ['tolerances.wedge_deg', 0.02], ['tolerances.axis_deg', 1], ['tolerances.incidence_deg', 0.5],
    ]);
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), { ...request, seed: 1 }, 'the request the fields say');
    await expectDesign(page, design, ['wedge_angle_deg', 'split_angle_deg', 'contact', 'split_angle_spread.mean', 'split_angle_spread.std'], 'cemented quartz splitter');
    assert.match(await page.textContent('[data-quantity="design.contact"]'), /^cement$/);
    const sheet = await orderSheet(page);
    assert.ok(sheet.Material?.toLowerCase().includes('quartz'), `cemented splitter: the order sheet names the material: ${sheet.Material}`);
    expectRow(sheet, 'Contact', ['cemented, cement of index 1.48'], 'cemented splitter');
    expectRow(sheet, 'Wedge angle', [`${fig(design.wedge_angle_deg)}° ± 0.02°`], 'cemented splitter');
    expectRow(sheet, 'Tolerances', ['wedge angle ± 0.02°, each axis ± 1°, incidence ± 0.5°', 'over 200 samples'], 'cemented splitter');

    await enterValue(page, field('samples'), 0);
    await solveDesign(page);
    assert.equal(await page.locator('[data-quantity^="design.split_angle_spread"]').count(), 0, 'no summary without samples');
    assert.match(await page.textContent('.design-mc'), /Not run \(0 samples\)/);
    await expectPlots(page, ['split-wavelength'], 'splitter without samples');
  });
});

test('a polarizing prism, air-spaced and cemented, agrees with the command line and loads into the set-up', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    for (const [name, entries] of [
      ['prism-polarizer-calcite-air', [['material', 'calcite'], ['wavelength_nm', 632.8], ['cement_index', ''], ['aperture_mm', 10]]],
      ['prism-polarizer-yvo4-cement', [['material', 'yvo4'], ['wavelength_nm', 1064], ['cement_index', 1.55], ['aperture_mm', 8]]],
    ]) {
      const { request, design } = golden(name);
      await fill(page, 'prism-polarizer', entries);
      await solveDesign(page);
      assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), request, `${name}: the request the fields say`);
      await expectDesign(page, design, [
        'prism_angle_deg', 'half_field_deg.0', 'half_field_deg.1', 'critical_angles_deg.0', 'critical_angles_deg.1', 'gap_index',
        'lower_edge.inside.extinction', 'upper_edge.inside.extinction', 'upper_edge.outside.extinction', 'lower_edge.inside.passed',
        'upper_edge.inside.passed', 'thickness_mm.0', 'normal.passed',
      ], name);
      await expectPlots(page, ['passed-incidence', 'leaked-incidence'], name);
      const sheet = await orderSheet(page);
      assert.ok(sheet.Material?.toLowerCase().includes(request.material), `${name}: the order sheet names the material: ${sheet.Material}`);
      expectRow(sheet, 'Prism angle', [`${fig(design.prism_angle_deg)}° between the entrance face and the gap`], name);
      expectRow(sheet, 'Dimensions', [`prism 1 ${fig(design.thickness_mm[0])} mm thick at the axis`, `${fig(design.edge_thickness_mm)} mm at the thin edge`], name);
      expectRow(sheet, 'Cut', ['in the faces, along y', '(azimuth 90°)'], name);
      expectRow(sheet, 'Gap', [request.cement_index ? `cemented, cement of index ${request.cement_index}` : 'air gap (index 1)'], name);
      expectRow(sheet, 'Clear aperture', [`${request.aperture_mm} mm`], name);
      expectRow(sheet, 'Wavelength', [`${request.wavelength_nm} nm`], name);
      expectRow(sheet, 'Field of view', [`${fig(design.half_field_deg[0])}° below and ${fig(design.half_field_deg[1])}° above the normal`,
        `${fig(design.critical_angles_deg[0])}° for the ${design.reflected_mode}-mode`, `${fig(design.critical_angles_deg[1])}° for the ${design.passed_mode}-mode`], name);
      expectRow(sheet, 'Performance', [`passes the ${design.passed_mode}-mode (${fig(design.normal.passed, 3)} of its power`,
        `reflects the ${design.reflected_mode}-mode totally`, `extinction (leaked ÷ passed) is ${fig(design.upper_edge.outside.extinction, 3)}`], name);
    }
    // The air-spaced calcite prism (the first golden) in the set-up.
    const { design } = golden('prism-polarizer-calcite-air');
    await fill(page, 'prism-polarizer', [['material', 'calcite'], ['wavelength_nm', 632.8], ['cement_index', ''], ['aperture_mm', 10]]);
    await solveDesign(page);
    const sc = await useDesign(page, design, 'polarizer');
    for (const t of [sc.elements[0].faces.back.tilt_deg, sc.elements[1].faces.front.tilt_deg]) {
      assert.ok(close(t, design.prism_angle_deg), `the gap is tilted by the prism angle (${t}°)`);
    }
    // The page's trace at normal incidence: the reflected mode is totally reflected at the gap,
    // the one ray rejected.
    await page.waitForSelector('[data-quantity="rejected[0].reason"]');
    const rejected = await page.$$eval('[data-quantity^="rejected["]', (els) => Object.fromEntries(els.map((e) => [e.dataset.quantity, e.dataset.value])));
    assert.deepEqual([rejected['rejected[0].element'], rejected['rejected[0].face'], rejected['rejected[0].reason']], ['0', 'back', 'total internal reflection']);
    assert.equal(rejected['rejected[1].reason'], undefined, 'one ray rejected');
  });
});

test('a tilt-tuned waveplate, given by its thickness or by its order, agrees with the command line and its mount loads into the set-up', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    const quarter = golden('tilt-tuning-quartz-quarter');
    await fill(page, 'tilt-tuning', [
      ['material', 'quartz'], ['wavelength_nm', 632.8], ['retardance_waves', 0.25], ['size', 'thickness'], ['thickness_mm', 0.5],
      ['axis_azimuth_deg', 0], ['tilt_azimuth_deg', 90],
    ]);
    assert.equal(await page.locator(field('made_for_nm')).isVisible(), false, 'no design wavelength for a plate given by its thickness');
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), { ...quarter.request, max_tilt_deg: 30 }, 'quartz: the request the fields say');
    const required = ['tilt_deg', 'retardance_waves', 'normal_retardance_waves', 'order', 'thickness_mm', 'sensitivity_waves_per_deg'];
    await expectDesign(page, quarter.design, required, 'quartz tilt tuning');
    await expectPlots(page, ['retardance-tilt'], 'tilt tuning');
    let sheet = await orderSheet(page);
    assert.ok(sheet.Material?.toLowerCase().includes('quartz'), `quartz tilt tuning: the order sheet names the material: ${sheet.Material}`);
    expectRow(sheet, 'Dimensions', ['plate 0.5 mm thick'], 'quartz tilt tuning');
    expectRow(sheet, 'Cut', ['optic axis in the face, at 0° from x'], 'quartz tilt tuning');
    expectRow(sheet, 'Mount', [`tilted by ${fig(quarter.design.tilt_deg)}° in the plane at azimuth 90° from x`, `${fig(quarter.design.sensitivity_waves_per_deg, 3)} waves per degree`], 'quartz tilt tuning');
    expectRow(sheet, 'Wavelength', ['632.8 nm'], 'quartz tilt tuning');
    expectRow(sheet, 'Performance', [`retardance ${fig(quarter.design.retardance_waves, 5)} waves at the tilt (the target 0.25 plus ${quarter.design.order} whole waves)`,
      `${fig(quarter.design.normal_retardance_waves, 5)} waves untilted`], 'quartz tilt tuning');

    const order = golden('tilt-tuning-mgf2-order');
    await fill(page, 'tilt-tuning', [
      ['material', 'mgf2'], ['wavelength_nm', 633], ['retardance_waves', 0.25], ['size', 'order'], ['order_number', 4], ['made_for_nm', 680],
      ['axis_azimuth_deg', 45], ['tilt_azimuth_deg', 45], ['max_tilt_deg', 40],
    ]);
    assert.equal(await page.locator(field('thickness_mm')).isVisible(), false, 'no thickness for a plate given by its order');
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), order.request, 'MgF2: the request the fields say');
    await expectDesign(page, order.design, required, 'MgF2 tilt tuning');
    sheet = await orderSheet(page);
    assert.ok(sheet.Material?.toLowerCase().includes('mgf2'), `MgF2 tilt tuning: the order sheet names the material: ${sheet.Material}`);
    expectRow(sheet, 'Dimensions', [`plate ${fig(order.design.thickness_mm)} mm thick (order 4 at 680 nm)`], 'MgF2 tilt tuning');
    expectRow(sheet, 'Mount', [`tilted by ${fig(order.design.tilt_deg)}° in the plane at azimuth 45° from x`, `${fig(order.design.sensitivity_waves_per_deg, 3)} waves per degree`], 'MgF2 tilt tuning');
    expectRow(sheet, 'Performance', [`retardance ${fig(order.design.retardance_waves, 5)} waves`, `plus ${order.design.order} whole waves`], 'MgF2 tilt tuning');

    const sc = await useDesign(page, order.design, 'tilt tuning');
    const { mount } = sc.elements[0];
    assert.ok(close(mount.tilt_deg, order.design.tilt_deg) && mount.azimuth_deg === 45, `the plate sits tilted in its mount (${JSON.stringify(mount)})`);
    // The page's trace of the mounted plate (the general tracer) reaches the retardance the tilt
    // solver found: two methods, one number.
    await page.waitForSelector('[data-quantity="elements[0].retardance_waves"]');
    const waves = await traced(page, 'elements[0].retardance_waves');
    assert.ok(close(waves, order.design.retardance_waves, 1e-10), `traced ${waves} waves, designed ${order.design.retardance_waves}`);
  });
});

test('bad values show the core\'s message beside their field and keep every entry', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    await fill(page, 'angular-splitter', [['band_nm[0]', 500], ['band_nm[1]', 700], ['samples', 0]]);
    assert.match(await expectFieldError(page, ['split_angle_deg', -5], 'split_angle_deg', 'negative split'), /Split angle between the beams/);
    await expectFieldError(page, ['split_angle_deg', 'abc'], 'split_angle_deg', 'split "abc"');
    await enterValue(page, field('split_angle_deg'), 10);
    await expectFieldError(page, ['tolerances.wedge_deg', -1], 'tolerances.wedge_deg', 'negative wedge tolerance');
    await enterValue(page, field('tolerances.wedge_deg'), 0.05);
    await expectFieldError(page, ['cement_index', 0.5], 'cement_index', 'cement below 1');
    await enterValue(page, field('cement_index'), '');
    await expectFieldError(page, ['samples', 1e7], 'samples', 'too many samples');
    await enterValue(page, field('samples'), 0);
    await solveDesign(page);

    await fill(page, 'prism-polarizer', []);
    await expectFieldError(page, ['aperture_mm', 0], 'aperture_mm', 'no aperture');
    await enterValue(page, field('aperture_mm'), 10);

    // A thin plate that no tilt within 5° brings to a quarter wave (tests/cli/design/error-tilt-unreachable.json).
    await fill(page, 'tilt-tuning', [['material', 'quartz'], ['size', 'thickness'], ['thickness_mm', 0.01], ['axis_azimuth_deg', 0], ['tilt_azimuth_deg', 0]]);
    const unreachable = JSON.parse(fs.readFileSync(path.join(GOLDEN, 'golden', 'error-tilt-unreachable.json'), 'utf8')).stdout.error;
    const message = await expectFieldError(page, ['max_tilt_deg', 5], 'max_tilt_deg', 'unreachable target');
    assert.ok(message.includes(unreachable.message), `the core's message (${message})`);
    await expectFieldError(page, ['max_tilt_deg', 85], 'max_tilt_deg', 'tilt beyond 80°');
  });
});

test('each prism kind solves from its starting values and fits 400 px', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    for (const kind of ['angular-splitter', 'prism-polarizer', 'tilt-tuning']) {
      await page.selectOption(field('kind'), kind);
      await solveDesign(page);
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
      assert.ok(overflow <= 1, `${kind}: at 400 px the page is ${overflow} px wider than the window`);
      // Every number has its unit, but for counts, an index and fractions of power (dimensionless).
      const rows = await page.$$eval('#design-cards .q, #design-results strong', (els) => els.map((e) => [e.querySelector('dt')?.textContent ?? '', (e.querySelector('dd') ?? e).textContent]));
      const bare = rows.filter(([, t]) => /^[−-]?\d/.test(t) && !/(°|nm|mm|waves)/.test(t)).map(([label]) => label);
      assert.ok(rows.length > 8, `${kind}: numbers shown`);
      assert.deepEqual(bare.filter((l) => !/power|passed|leaked|extinction|samples|index|whole waves/.test(l)), [], `${kind}: numbers without a unit`);
    }
  }, { viewport: { width: 400, height: 900 } });
});

test('a link carries the prism kinds\' fields: a plate given by its order, a splitter\'s samples', { timeout: 120000 }, async () => {
  const links = [];
  const order = golden('tilt-tuning-mgf2-order').request;
  const splitter = golden('angular-splitter-calcite').request;
  await withPage(async (page) => {
    for (const [kind, entries] of [
      ['tilt-tuning', [['material', 'mgf2'], ['wavelength_nm', 633], ['size', 'order'], ['order_number', 4], ['made_for_nm', 680], ['axis_azimuth_deg', 45], ['tilt_azimuth_deg', 45], ['max_tilt_deg', 40]]],
      ['angular-splitter', [['material', 'calcite'], ['wavelength_nm', 632.8], ['band_nm[0]', 450], ['band_nm[1]', 900], ['samples', 400], ['seed', 3]]],
    ]) {
      await fill(page, kind, entries);
      // The address follows the fields (the history writes it after a pause).
      await page.waitForFunction(() => decodeURIComponent(location.hash.split('&design=')[1] ?? '') === JSON.stringify(window.doublespar.designRequest()), null, { timeout: 15000 });
      links.push(await page.evaluate(() => location.hash));
    }
  });
  for (const [link, request] of [[links[0], order], [links[1], { ...splitter, tolerances: { wedge_deg: 0.05, axis_deg: 0.5, incidence_deg: 0.1 } }]]) {
    await openAt(env, `/${link}`, async ({ page }) => {
      assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), request, 'the link gives the same request');
      if (request.kind === 'tilt-tuning') assert.equal(await page.inputValue(field('size')), 'order', 'and shows the plate by its order');
    });
  }
});

test('a splitter whose worker sends its Monte Carlo run in chunks is shown as the displacer\'s is', { timeout: 120000 }, async () => {
  const { request, design } = golden('angular-splitter-calcite');
  const { split_angle_spread: spread, ...nominal } = design;
  await withPage(async (page) => {
    // The panel's next worker is one the test drives message by message: a long displacer run is
    // started and cancelled, which replaces the worker.
    await page.evaluate(() => {
      window.Worker = class {
        constructor() {
          window.__worker = this;
        }
        postMessage(msg) {
          if (msg.type === 'solve') window.__solveId = msg.id;
        }
        terminate() {}
      };
    });
    await page.selectOption(field('kind'), 'displacer');
    await enterValue(page, field('separation_mm'), 2);
    await enterValue(page, field('samples'), 1000000);
    await page.click('#design-solve');
    await page.waitForFunction(() => document.getElementById('design').dataset.state === 'running', null, { timeout: 20000 });
    await page.click('#design-cancel');

    await fill(page, 'angular-splitter', [['band_nm[0]', 450], ['band_nm[1]', 900], ['samples', 400], ['seed', 3]]);
    await page.click('#design-solve');
    await page.waitForFunction(() => window.__solveId !== undefined, null, { timeout: 15000 });
    const send = (data) => page.evaluate((d) => window.__worker.onmessage({ data: { ...d, id: window.__solveId } }), data);
    await send({ type: 'nominal', design: nominal, total: 400 });
    assert.equal(await page.evaluate(() => document.getElementById('design').dataset.state), 'running');
    assert.equal(await page.textContent('#design-mc-state'), 'Running…');
    await send({ type: 'progress', done: 200, total: 400, chunk: 1, chunks: 2 });
    assert.equal(await page.textContent('#design-progress-text'), '200 of 400 samples');
    assert.equal(await page.textContent('#design-mc-state'), 'Running: 200 of 400 samples.');
    await expectDesign(page, design, ['wedge_angle_deg', 'split_angle_deg'], 'the nominal splitter during the run');
    await expectPlots(page, ['split-wavelength', 'tolerance-histogram'], 'splitter during the run');
    // A summary under the displacer's name is read as well as the splitter's own.
    await send({ type: 'done', design: { ...nominal, monte_carlo: spread } });
    assert.equal(await page.evaluate(() => document.getElementById('design').dataset.state), 'done');
    assert.match(await page.textContent('#design-status'), /Solved, with 400 Monte Carlo samples/);
    for (const k of ['n', 'mean', 'std', 'p5', 'p95']) {
      assert.equal(Number(await page.getAttribute(`[data-quantity="design.monte_carlo.${k}"]`, 'data-value')), spread[k], `monte_carlo.${k}`);
    }
    assert.deepEqual(await page.evaluate(() => window.doublespar.designShown().request), { ...request, tolerances: { wedge_deg: 0.05, axis_deg: 0.5, incidence_deg: 0.1 } });
  });
});
