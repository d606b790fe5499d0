// End-to-end tests of the design panel with biaxial crystals (www/design-panel.js): a KTP
// waveplate, a tilt-tuned KTP plate and a KTP birefringent filter cut along a principal axis, an
// LBO displacer cut in a principal plane, and an achromatic pair whose first plate is given by its
// own principal indices n_x, n_y, n_z, filled in
// through the panel's controls and solved in its worker. The numbers shown are checked against
// the command line's answer to the same request, as kept in the golden files
// tests/cli/design/golden/*.json (written by `doublespar design`, native build). "Use this part"
// loads the part into the set-up, where the page's own trace gives the design's retardance or
// separation; bad values put the core's message beside their field and keep every entry; the
// kinds whose solver stays uniaxial do not offer the biaxial crystals, a two-crystal pair's
// biaxial plate shows and sends its own cut, and a bad principal index of a pair's plate, or of
// a broadband retarder's first crystal alternating with a second, is named on its own field.
//
// Run: `cd tests/e2e && node --test design-biaxial.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, close, solveDesign, enterValue, waitError, waitScenario } from './support.mjs';
import { golden, field, fill, expectDesign, expectFieldError, useDesign, orderSheet } from './design-support.mjs';

const env = useBrowser({ cli: false });
const withPage = (body, options = {}) => openAt(env, '/', ({ page }) => body(page), options);

/** Every field of the golden request is in the request the panel's fields say, with its value. */
async function expectRequest(page, request, what) {
  const said = await page.evaluate(() => window.doublespar.designRequest());
  for (const [k, v] of Object.entries(request)) assert.deepEqual(said[k], v, `${what}: the request's ${k} (${JSON.stringify(said)})`);
}

/** The traced figure `name` of crystal `i` in the set-up's results. */
async function traced(page, i, name) {
  const sel = `[data-quantity="elements[${i}].${name}"]`;
  await page.waitForSelector(sel);
  return Number(await page.getAttribute(sel, 'data-value'));
}

/**
 * A KTP design answered with its y-cut (the cut of largest birefringence): the panel shows the
 * command line's `paths`, the headline names the cut and the order sheet's cut line starts with
 * `sheetCut`.
 */
async function expectYCut(page, design, paths, sheetCut, what) {
  assert.equal(design.cut, 'y', `${what}: the cut of largest birefringence`);
  await expectDesign(page, design, paths, what);
  const headline = await page.textContent('.design-headline');
  assert.ok(headline.includes('y-cut'), headline);
  const sheet = await orderSheet(page);
  assert.ok(sheet.Cut?.startsWith(sheetCut), `${what}: the order sheet's cut: ${sheet.Cut}`);
}

test('a KTP waveplate agrees with the command line and, loaded, retards as designed', { timeout: 120000 }, async () => {
  const { request, design } = golden('waveplate-ktp-half');
  await withPage(async (page) => {
    await fill(page, 'waveplate', [
      ['material', 'ktp'], ['order', 'multiple'], ['order_number', 4], ['wavelength_nm', 1064],
      ['retardance_waves', 0.5], ['temperature_c', 40],
    ]);
    assert.ok(await page.locator(field('cut')).isVisible(), 'a biaxial crystal shows its cut');
    assert.equal(await page.locator(field('plane')).isVisible(), false, 'a waveplate has no principal plane');
    await solveDesign(page);
    await expectRequest(page, request, 'KTP waveplate');
    await expectYCut(page, design, ['plates.0.thickness_mm', 'retardance_waves', 'no', 'ne', 'birefringence', 'acceptance_deg', 'group_delay_ps', 'modes.f.group_index', 'modes.s.group_index'],
      'y-cut: principal y along the face normal; plate 1 slow axis at 0°', 'KTP waveplate');
    const sc = await useDesign(page, design, 'KTP waveplate');
    assert.equal(sc.elements[0].material, 'ktp');
    assert.ok(sc.elements[0].axes, `oriented by axes: ${JSON.stringify(sc.elements[0])}`);
    const g = await traced(page, 0, 'retardance_waves');
    assert.ok(Math.abs(g - 4.5) < 1e-9, `traced retardance ${g} waves, designed 4.5`);
  });
});

test('a tilt-tuned KTP plate agrees with the command line and, loaded in its mount, retards as designed', { timeout: 120000 }, async () => {
  const { request, design } = golden('tilt-tuning-ktp-order');
  await withPage(async (page) => {
    await fill(page, 'tilt-tuning', [
      ['material', 'ktp'], ['wavelength_nm', 1064], ['retardance_waves', 0.25], ['size', 'order'], ['order_number', 9],
      ['made_for_nm', 1050], ['tilt_azimuth_deg', 90], ['temperature_c', 35],
    ]);
    assert.ok(await page.locator(field('cut')).isVisible(), 'a biaxial crystal shows its cut');
    assert.equal(await page.inputValue(field('cut')), '', 'the cut of largest birefringence unless one is chosen');
    await solveDesign(page);
    await expectRequest(page, request, 'tilt-tuned KTP');
    await expectYCut(page, design, ['thickness_mm', 'tilt_deg', 'retardance_waves', 'normal_retardance_waves', 'order', 'sensitivity_waves_per_deg', 'axis_azimuth_deg', 'fast_axis_azimuth_deg'],
      'y-cut: principal y along the face normal; fast axis principal x at 90° from x, slow axis principal z at 0°', 'tilt-tuned KTP');
    // The fast axis is named as a biaxial plate has it, in the panel and on the sheet: the
    // in-face principal axis the f-wave is polarized along (x: n_x < n_z), at its azimuth, and
    // never as a uniaxial plate's optic axis or o/e wave.
    assert.deepEqual([design.fast_principal_axis, design.slow_principal_axis, design.fast_axis_azimuth_deg], ['x', 'z', 90]);
    const panel = await page.textContent('#design');
    assert.ok(panel.includes('fast axis, principal x') && panel.includes('slow axis, principal z'), panel);
    assert.ok(panel.includes('s-wave, polarized along principal z, lags the f-wave along principal x'), panel);
    assert.ok((await page.textContent('.design-headline')).includes('fast axis principal x'));
    const sheet = await orderSheet(page);
    for (const words of [/optic axis/, /\bo-|\be-|ordinary/, /uniaxial/]) {
      assert.doesNotMatch(`${sheet.Cut} ${sheet.Material}`, words, `the sheet's cut and material: ${sheet.Cut} / ${sheet.Material}`);
    }
    assert.ok(sheet.Material.includes('biaxial'), sheet.Material);
    const sc = await useDesign(page, design, 'tilt-tuned KTP');
    assert.ok(sc.elements[0].axes && close(sc.elements[0].mount.tilt_deg, design.tilt_deg), JSON.stringify(sc.elements[0]));
    // The page's trace of the mounted plate reaches the retardance the tilt solver found.
    const g = await traced(page, 0, 'retardance_waves');
    assert.ok(Math.abs(g - design.retardance_waves) < 1e-9, `traced retardance ${g} waves, designed ${design.retardance_waves}`);
  });
});

test('an LBO displacer agrees with the command line and, loaded, separates the beams as designed', { timeout: 180000 }, async () => {
  const { request, design } = golden('displacer-lbo-xz');
  await withPage(async (page) => {
    await fill(page, 'displacer', [
      ['material', 'lbo'], ['plane', 'xz'], ['wavelength_nm', 1064], ['separation_mm', 0.5],
      ['band_nm[0]', 1000], ['band_nm[1]', 1100], ['samples', 20000],
    ]);
    assert.equal(await page.locator(field('cut')).isVisible(), false, 'a displacer has no waveplate cut');
    await solveDesign(page, 90000);
    await expectRequest(page, request, 'LBO displacer');
    await expectDesign(page, design, ['length_mm', 'cut_tilt_deg', 'separation_mm', 'walkoff_deg', 'no', 'ne', 'straight_index', 'group_delay_ps', 'modes.f.group_index', 'modes.s.group_index'], 'LBO displacer');
    const sheet = await orderSheet(page);
    assert.ok(sheet.Cut?.startsWith('principal z at ') && sheet.Cut.includes('in the xz principal plane'), `the order sheet's cut: ${sheet.Cut}`);
    const sc = await useDesign(page, design, 'LBO displacer');
    // The set-up writes a roll of 0 as `axis` (CONVENTIONS.md "More media": the same orientation).
    const axes = sc.elements[0].axes ?? sc.elements[0].axis;
    assert.ok(close(axes.tilt_deg, design.cut_tilt_deg) && (axes.roll_deg ?? 0) === 0, JSON.stringify(sc.elements[0]));
    const s = await traced(page, 0, 'separation_mm');
    assert.ok(Math.abs(s - 0.5) < 1e-9, `traced separation ${s} mm, designed 0.5`);
  });
});

test('bad biaxial values show the core\'s message beside their field and keep every entry', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    await fill(page, 'waveplate', [['material', 'principal'], ['nx', 1.6], ['ny', 1.6]]);
    const iso = await expectFieldError(page, ['nz', 1.6], 'nz', 'three equal indices');
    assert.ok(iso.includes('isotropic'), iso);
    await enterValue(page, field('nz'), 1.7);
    await page.selectOption(field('cut'), 'z');
    const none = await expectFieldError(page, ['retardance_waves', 0.25], 'cut', 'a cut without birefringence');
    assert.ok(none.includes('no birefringence'), none);
    await page.selectOption(field('kind'), 'displacer');
    await page.selectOption(field('plane'), 'xy');
    const flat = await expectFieldError(page, ['separation_mm', 1], 'plane', 'a plane without walk-off');
    assert.ok(flat.includes('no walk-off'), flat);
    await page.selectOption(field('plane'), 'xz');
    await page.fill(field('samples'), '0');
    await solveDesign(page);
  });
});

test('the kinds that take biaxial crystals offer them with their cut, those that stay uniaxial do not', { timeout: 60000 }, async () => {
  await withPage(async (page) => {
    const shown = async () => page.$$eval(`${field('material')} option`, (os) => os.filter((o) => !o.hidden).map((o) => o.value));
    await page.selectOption(field('kind'), 'waveplate');
    for (const k of ['ktp', 'lbo', 'bibo', 'principal']) assert.ok((await shown()).includes(k), `waveplate offers ${k}`);
    await page.selectOption(field('kind'), 'tilt-tuning');
    for (const k of ['ktp', 'lbo', 'bibo', 'principal']) assert.ok((await shown()).includes(k), `the tilt tuning offers ${k}`);
    // The filter and the broadband retarder cut every plate of a biaxial crystal alike.
    for (const kind of ['birefringent-filter', 'broadband-retarder']) {
      await page.selectOption(field('kind'), kind);
      for (const k of ['ktp', 'lbo', 'bibo', 'principal']) assert.ok((await shown()).includes(k), `${kind} offers ${k}`);
      await page.selectOption(field('material'), 'quartz');
      assert.equal(await page.locator(field('cut')).isVisible(), false, `${kind}: quartz has no cut`);
      await page.selectOption(field('material'), 'bibo');
      assert.ok(await page.locator(field('cut')).isVisible(), `${kind}: a biaxial crystal shows its cut`);
    }
    await page.selectOption(field('material'), 'quartz');
    await page.selectOption(field('kind'), 'prism-polarizer');
    for (const k of ['ktp', 'lbo', 'bibo', 'principal']) assert.ok(!(await shown()).includes(k), `the polarizer hides ${k}`);
  });
});

test('a pair\'s biaxial plate shows and sends its own cut', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    const shown = async (prefix) => page.$$eval(`${field(`${prefix}material`)} option`, (os) => os.filter((o) => !o.hidden).map((o) => o.value));
    for (const kind of ['achromat', 'athermal-waveplate']) {
      await page.selectOption(field('kind'), kind);
      for (const prefix of ['first.', 'second.']) {
        for (const k of ['ktp', 'lbo', 'bibo']) assert.ok((await shown(prefix)).includes(k), `${kind}: the ${prefix} plate offers ${k}`);
      }
      assert.equal(await page.locator(field('first.cut')).isVisible(), false, `${kind}: quartz has no cut`);
    }
    // An athermal KTP + quartz pair: the first plate's cut shows, is sent, and the answer's
    // order card names it.
    await fill(page, 'athermal-waveplate', [['first.material', 'ktp'], ['first.cut', 'x'], ['second.material', 'quartz'], ['wavelength_nm', 1064]]);
    assert.ok(await page.locator(field('first.cut')).isVisible(), 'a biaxial plate shows its cut');
    assert.equal(await page.locator(field('second.cut')).isVisible(), false, 'the quartz plate has none');
    const said = await page.evaluate(() => window.doublespar.designRequest());
    assert.deepEqual(said.first, { material: 'ktp', cut: 'x' }, JSON.stringify(said));
    assert.deepEqual(said.second, { material: 'quartz' }, JSON.stringify(said));
    await solveDesign(page);
    const headline = await page.textContent('.design-headline');
    assert.ok(headline.includes('x-cut, slow axis'), headline);
  });
});

test('a KTP filter agrees with the command line and, loaded, passes its centre wavelength', { timeout: 120000 }, async () => {
  const { request, design } = golden('filter-ktp-folded-x-cut');
  await withPage(async (page) => {
    await fill(page, 'birefringent-filter', [
      ['material', 'ktp'], ['cut', 'x'], ['layout', 'folded'], ['stages', 4], ['wavelength_nm', 1064], ['bandwidth_nm', 3],
    ]);
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), request, 'the request the fields say');
    await expectDesign(page, design, ['plates.0.thickness_mm', 'plates.1.axis_azimuth_deg', 'fwhm_nm', 'order', 'cut',
      'principal_indices.0', 'principal_indices.2', 'neighbour_orders_fwhm_nm.1', 'centre_shift_nm_per_k'], 'KTP filter');
    const headline = await page.textContent('.design-headline');
    assert.ok(headline.includes('x-cut'), headline);
    const sheet = await orderSheet(page);
    assert.ok(sheet.Cut?.startsWith('x-cut: principal x along the face normal, slow axes'), `the order sheet's cut: ${sheet.Cut}`);
    await page.click('#design-use');
    const kinds = design.scenario.elements.map((e) => e.kind).join();
    const sc = await waitScenario(page, (x) => x.elements.map((e) => e.kind).join() === kinds, 'the set-up holds the plates and polarizers');
    sc.elements.forEach((e, i) => {
      if (e.kind !== 'crystal') return;
      // The set-up writes a roll of 0 as `axis` (CONVENTIONS.md "More media": the same orientation).
      const [got, want] = [e.axes ?? e.axis, design.scenario.elements[i].axes];
      assert.ok(close(e.thickness_mm, design.scenario.elements[i].thickness_mm) && close(got.tilt_deg, want.tilt_deg)
        && close(got.azimuth_deg, want.azimuth_deg) && (got.roll_deg ?? 0) === want.roll_deg, `element ${i}: ${JSON.stringify(e)}`);
    });
    // The page's own trace of the filter passes everything at the centre (whole half-wave plates).
    const t = await page.evaluate(() => window.doublespar.session.result().total_power);
    assert.ok(Math.abs(t - 1) < 1e-9, `traced transmission at the centre ${t}`);
  });
});

test('a pair with a plate of custom principal indices agrees with the command line', { timeout: 120000 }, async () => {
  const { request, design } = golden('achromat-principal-quartz');
  await withPage(async (page) => {
    await page.selectOption(field('kind'), 'achromat');
    for (const prefix of ['first.', 'second.']) {
      const offered = await page.$$eval(`${field(`${prefix}material`)} option`, (os) => os.filter((o) => !o.hidden).map((o) => o.value));
      assert.ok(offered.includes('principal'), `the ${prefix} plate offers custom principal indices`);
    }
    assert.equal(await page.locator(field('first.nx')).isVisible(), false, 'no principal indices until chosen');
    await fill(page, 'achromat', [
      ['first.material', 'principal'], ['first.nx', 1.52], ['first.ny', 1.56], ['first.nz', 1.61], ['first.cut', 'z'],
      ['second.material', 'quartz'], ['retardance_waves', 0.25], ['wavelengths_nm[0]', 500], ['wavelengths_nm[1]', 900],
    ]);
    assert.equal(await page.locator(field('first.no')).isVisible(), false, 'no uniaxial indices beside them');
    assert.equal(await page.locator(field('second.nx')).isVisible(), false, 'the quartz plate has none');
    await solveDesign(page);
    assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), request, 'the request the fields say');
    await expectDesign(page, design, ['plates.0.thickness_mm', 'plates.1.thickness_mm', 'plates.0.cut', 'at_design_wavelengths.0.1', 'max_error_waves'], 'custom pair');
    const headline = await page.textContent('.design-headline');
    assert.ok(headline.includes('z-cut, slow axis'), headline);
  });
});

test('a bad principal index of a pair\'s plate or of an alternating crystal is named on its field, every entry kept', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    await fill(page, 'achromat', [['first.material', 'principal'], ['first.nx', 1.52], ['first.ny', 1.52], ['second.material', 'quartz']]);
    const range = await expectFieldError(page, ['first.nz', 0.5], 'first.nz', 'an index below 1');
    assert.ok(range.includes('from 1 to 10'), range);
    const iso = await expectFieldError(page, ['first.nz', 1.52], 'first.nz', 'three equal indices');
    assert.ok(range !== iso && iso.includes('isotropic'), iso);
    // An athermal pair needs thermal data: fixed indices are refused on the plate's first index.
    await page.selectOption(field('kind'), 'athermal-waveplate');
    await enterValue(page, field('first.nz'), 1.61);
    await page.click('#design-solve');
    const thermal = await waitError(page, 'first.nx', 'data-design-error-for', 10000);
    assert.ok(thermal.includes('thermal'), thermal);
    // A broadband retarder's first crystal alternating with quartz travels in `materials`; its
    // bad index is shown on the panel's own field.
    await fill(page, 'broadband-retarder', [['material', 'principal'], ['materials', 'quartz'], ['plates', 3],
      ['retardance_waves', 0.25], ['band_nm[0]', 500], ['band_nm[1]', 700]]);
    const said = await page.evaluate(() => window.doublespar.designRequest());
    assert.deepEqual(said.materials[0], { nx: 1.74, ny: 1.75, nz: 1.83 }, JSON.stringify(said));
    assert.equal(said.materials[1], 'quartz', JSON.stringify(said));
    const alternating = await expectFieldError(page, ['nz', 12], 'nz', 'an alternating crystal\'s index above 10');
    assert.ok(alternating.includes('from 1 to 10'), alternating);
  });
});

test('a link carries a biaxial design\'s crystal and its cut or plane', { timeout: 120000 }, async () => {
  for (const [kind, entries, select] of [
    ['waveplate', [['material', 'principal'], ['nx', 1.5], ['ny', 1.52], ['nz', 1.6], ['cut', 'z'], ['retardance_waves', 0.25]], 'cut'],
    ['displacer', [['material', 'bibo'], ['plane', 'yz'], ['separation_mm', 2], ['samples', 0]], 'plane'],
    ['tilt-tuning', [['material', 'lbo'], ['cut', 'x'], ['wavelength_nm', 532], ['retardance_waves', 0.25], ['size', 'order'], ['order_number', 3], ['made_for_nm', 540], ['tilt_azimuth_deg', 0]], 'cut'],
    ['achromat', [['first.material', 'principal'], ['first.nx', 1.52], ['first.ny', 1.56], ['first.nz', 1.61], ['first.cut', 'z'], ['second.material', 'quartz']], 'first.nz'],
    ['birefringent-filter', [['material', 'lbo'], ['cut', 'z'], ['wavelength_nm', 800], ['bandwidth_nm', 2]], 'cut'],
    // A retarder's first crystal by its own indices and cut, alternating with quartz: the link's
    // `materials` list comes back as the panel's fields.
    ['broadband-retarder', [['material', 'principal'], ['nx', 1.52], ['ny', 1.56], ['nz', 1.61], ['cut', 'z'], ['materials', 'quartz'], ['plates', 3],
      ['retardance_waves', 0.25], ['band_nm[0]', 500], ['band_nm[1]', 700], ['generations', 100]], 'materials'],
  ]) {
    let link = '';
    let said = null;
    await withPage(async (page) => {
      await fill(page, kind, entries);
      // The address follows the fields (the history writes it after a pause).
      await page.waitForFunction(() => decodeURIComponent(location.hash.split('&design=')[1] ?? '') === JSON.stringify(window.doublespar.designRequest()), null, { timeout: 15000 });
      link = await page.evaluate(() => location.hash);
      said = await page.evaluate(() => window.doublespar.designRequest());
    });
    await openAt(env, `/${link}`, async ({ page }) => {
      assert.deepEqual(await page.evaluate(() => window.doublespar.designRequest()), said, `${kind}: the link gives the same request`);
      assert.ok(await page.locator(field(select)).isVisible(), `${kind}: the ${select} is shown`);
      await solveDesign(page);
    });
  }
});
