// End-to-end tests of a crystal given by its own dispersion formula on the page: the stack
// editor's "custom formula" choice (range, A, Sellmeier terms, IR term per axis), the indices
// and separation the results show against the command line's trace of the same document, a bad
// coefficient named beside its own field with every entry kept, and the entry kept while another
// material is chosen and back.
//
// Run: `cd tests/e2e && npm ci && node --test custom-dispersion.test.mjs` (after
// scripts/build-web.sh and `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import {
  useBrowser, withPage as openAt, waitScenario, enterValue, cliTrace, expectAgreement, waitError, shownError,
} from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

const MATERIAL = 'select[data-field="elements[0].material"]';
const input = (path) => `input.num[data-field="elements[0].dispersion.${path}"]`;

test('a custom formula: entered on the page, traced as the command line traces it, kept across material choices', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(MATERIAL, 'custom-formula');
    // The entry starts from calcite's published coefficients: the same indices as the catalogue.
    const start = await waitScenario(page, (s) => s.elements[0].dispersion !== undefined, 'a custom formula');
    assert.deepEqual(start.elements[0].dispersion.range_nm, [204, 2172]);
    const calcite = cliTrace({ ...start, elements: [{ ...start.elements[0], dispersion: undefined, material: 'calcite' }] });
    const custom = cliTrace(start);
    assert.equal(custom.elements[0].material, 'custom dispersion');
    assert.equal(custom.elements[0].no, calcite.elements[0].no, 'calcite coefficients give calcite n_o');
    assert.equal(custom.elements[0].ne, calcite.elements[0].ne, 'calcite coefficients give calcite n_e');

    // A formula of one's own: a third Sellmeier term on o and an IR term on e.
    await enterValue(page, input('o.sellmeier[2][0]'), '0.05');
    await enterValue(page, input('o.sellmeier[2][1]'), '0.03');
    await enterValue(page, input('e.ir'), '0.002');
    await enterValue(page, input('range_nm[1]'), '2000');
    const sc = await waitScenario(page, (s) => s.elements[0].dispersion.e.ir === 0.002 && s.elements[0].dispersion.range_nm[1] === 2000, 'the new terms');
    assert.deepEqual(sc.elements[0].dispersion.o.sellmeier[2], [0.05, 0.03]);
    const cli = cliTrace(sc);
    assert.notEqual(cli.elements[0].no, calcite.elements[0].no, 'the third term changes n_o');
    await expectAgreement(page, cli, ['elements[0].no', 'elements[0].ne', 'elements[0].separation_mm', 'elements[0].e.walkoff_deg', 'elements[0].o.group_index'], 'custom formula');

    // Another material and back: every coefficient entered is still there.
    await page.selectOption(MATERIAL, 'quartz');
    await waitScenario(page, (s) => s.elements[0].material === 'quartz', 'quartz');
    await page.selectOption(MATERIAL, 'custom-formula');
    const back = await waitScenario(page, (s) => s.elements[0].dispersion !== undefined, 'the formula again');
    assert.deepEqual(back.elements[0].dispersion, sc.elements[0].dispersion, 'the formula is kept');
    assert.equal(await page.inputValue(input('e.ir')), '0.002');
  });
});

test('a bad coefficient is named beside its own field, the entry kept; a formula that breaks down is named on its axis', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(MATERIAL, 'custom-formula');
    await waitScenario(page, (s) => s.elements[0].dispersion !== undefined, 'a custom formula');
    await enterValue(page, input('e.sellmeier[1][1]'), '-3');
    const msg = await waitError(page, 'elements[0].dispersion.e.sellmeier[1][1]');
    assert.match(msg, /0 or more/, msg);
    assert.equal(await page.inputValue(input('e.sellmeier[1][1]')), '-3', 'the bad value stays for correction');
    assert.equal(await page.inputValue(input('e.a')), '1.35859695', 'the other coefficients are kept');
    assert.equal(await shownError(page, 'elements[0].dispersion.o.a'), '', 'no message on another field');
    // Corrected, the message goes; a formula with n² < 0 at the wavelength is named on its axis.
    await enterValue(page, input('e.sellmeier[1][1]'), '120');
    await waitScenario(page, (s) => s.elements[0].dispersion.e.sellmeier[1][1] === 120, 'corrected');
    await enterValue(page, input('o.a'), '-5');
    const axis = await waitError(page, 'elements[0].dispersion.o');
    assert.match(axis, /n² = /, axis);
    assert.equal(await page.inputValue(input('o.a')), '-5');
  });
});

test('a loaded formula the compact entry cannot show (x, y, z with poles, a citation) is kept and traced as loaded', { timeout: 90000 }, async () => {
  const dispersion = {
    range_nm: [400, 1600],
    fitted_in: 'air',
    citation: 'an invented test formula',
    x: { a: 3.0, poles: [[0.04, 0.04]] },
    y: { a: 3.1, poles: [[0.04, 0.04]] },
    z: { a: 3.4, poles: [[0.05, 0.05]], ir: 0.01 },
  };
  const doc = { version: 2, wavelength_nm: 800, elements: [{ kind: 'crystal', dispersion, thickness_mm: 2, axes: { tilt_deg: 30, azimuth_deg: 0, roll_deg: 0 } }] };
  const address = `/#scenario=${encodeURIComponent(JSON.stringify(doc))}`;
  await withPage(address, async (page) => {
    const sc = await waitScenario(page, (s) => s.elements[0].dispersion?.z !== undefined, 'the loaded formula');
    assert.deepEqual(sc.elements[0].dispersion, dispersion, 'kept exactly');
    await expectAgreement(page, cliTrace(sc), ['elements[0].nx', 'elements[0].nz', 'elements[0].s.index'], 'loaded biaxial formula');
  });
});

const FORM = 'select[data-field="elements[0].dispersion"]';

test('a biaxial formula entered on the page: x, y and z beside o and e, traced as the command line traces it, nothing lost when switching', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(MATERIAL, 'custom-formula');
    const start = await waitScenario(page, (s) => s.elements[0].dispersion !== undefined, 'a custom formula');
    const { o, e } = start.elements[0].dispersion;
    // Biaxial chosen with its fields blank: it starts from the uniaxial formulas (x and y from o,
    // z from e), the orientation takes a roll, and the crystal traces as the uniaxial one does.
    await page.selectOption(FORM, 'biaxial');
    const first = await waitScenario(page, (s) => s.elements[0].dispersion.x !== undefined, 'the biaxial form');
    const d = first.elements[0].dispersion;
    assert.deepEqual([d.x, d.y, d.z], [o, o, e], 'x and y start from o, z from e');
    assert.equal(d.o, undefined, 'one form at a time');
    assert.equal(d.e, undefined, 'one form at a time');
    assert.equal(await page.isVisible('input.num[data-field="elements[0].axes.tilt_deg"]'), true, 'a biaxial crystal is oriented by its principal axes');
    assert.equal(await page.isVisible('input.num[data-field="elements[0].axes.roll_deg"]'), true, 'the roll shows');
    assert.equal(await page.isVisible(input('o.a')), false, 'o and e are put away');

    // A biaxial formula of one's own: y raised, an IR term on z, a third term on x.
    await enterValue(page, input('y.a'), '1.80');
    await enterValue(page, input('z.ir'), '0.002');
    await enterValue(page, input('x.sellmeier[2][0]'), '0.05');
    await enterValue(page, input('x.sellmeier[2][1]'), '0.03');
    await enterValue(page, 'input.num[data-field="elements[0].axes.tilt_deg"]', '30');
    await enterValue(page, 'input.num[data-field="elements[0].axes.roll_deg"]', '20');
    const sc = await waitScenario(page, (s) => s.elements[0].dispersion.x?.sellmeier?.[2]?.[1] === 0.03 && s.elements[0].axes?.roll_deg === 20, 'the biaxial entry');
    assert.equal(sc.elements[0].dispersion.y.a, 1.8);
    assert.equal(sc.elements[0].dispersion.z.ir, 0.002);
    const cli = cliTrace(sc);
    assert.equal(cli.elements[0].material, 'custom dispersion');
    assert.ok(cli.elements[0].nx < cli.elements[0].ny, `n_y raised: ${cli.elements[0].nx}, ${cli.elements[0].ny}`);
    await expectAgreement(page, cli, ['elements[0].nx', 'elements[0].ny', 'elements[0].nz', 'elements[0].f.index', 'elements[0].s.index', 'elements[0].separation_mm'], 'biaxial custom formula');

    // A bad coefficient is named beside its own field on the axis it belongs to, the entry kept;
    // a formula that breaks down is named on its axis.
    await enterValue(page, input('z.sellmeier[0][1]'), '-3');
    const msg = await waitError(page, 'elements[0].dispersion.z.sellmeier[0][1]');
    assert.match(msg, /0 or more/, msg);
    assert.equal(await page.inputValue(input('z.sellmeier[0][1]')), '-3', 'the bad value stays for correction');
    assert.equal(await shownError(page, 'elements[0].dispersion.x.sellmeier[0][1]'), '', 'no message on the same field of x');
    await enterValue(page, input('z.sellmeier[0][1]'), String(e.sellmeier[0][1]));
    await waitScenario(page, (s) => s.elements[0].dispersion.z.sellmeier[0][1] === e.sellmeier[0][1], 'corrected');
    await enterValue(page, input('y.a'), '-5');
    const axis = await waitError(page, 'elements[0].dispersion.y');
    assert.match(axis, /n² = /, axis);
    assert.match(axis, /Formula for y/, axis);
    await enterValue(page, input('y.a'), '1.80');
    await waitScenario(page, (s) => s.elements[0].dispersion.y.a === 1.8, 'y restored');

    // Back to uniaxial: o and e as they were; biaxial again: x, y, z as entered.
    await page.selectOption(FORM, 'uniaxial');
    const uni = await waitScenario(page, (s) => s.elements[0].dispersion.o !== undefined, 'the uniaxial form again');
    assert.deepEqual(uni.elements[0].dispersion, start.elements[0].dispersion, 'o and e kept while biaxial was shown');
    assert.equal(await page.isVisible('input.num[data-field="elements[0].axes.roll_deg"]'), true, 'a rolled crystal keeps its principal axes');
    await page.selectOption(FORM, 'biaxial');
    const again = await waitScenario(page, (s) => s.elements[0].dispersion.x !== undefined, 'biaxial again');
    assert.deepEqual(again.elements[0].dispersion, sc.elements[0].dispersion, 'x, y and z kept while uniaxial was shown');

    // Another material and back: the form and every coefficient are still there.
    await page.selectOption(MATERIAL, 'quartz');
    await waitScenario(page, (s) => s.elements[0].material === 'quartz', 'quartz');
    await page.selectOption(MATERIAL, 'custom-formula');
    const back = await waitScenario(page, (s) => s.elements[0].dispersion !== undefined, 'the formula again');
    assert.deepEqual(back.elements[0].dispersion, sc.elements[0].dispersion, 'the biaxial formula is kept');
    assert.equal(await page.inputValue(FORM), 'biaxial');
  });
});

test('a loaded biaxial formula in the compact form is shown in the entry, round-trips exactly and is traced as the command line traces it', { timeout: 90000 }, async () => {
  const dispersion = {
    range_nm: [400, 1600],
    fitted_in: 'air',
    citation: 'an invented test formula',
    x: { a: 3.0, sellmeier: [[0.04, 0.04]] },
    y: { a: 3.1, sellmeier: [[0.04, 0.04], [0.5, 90]], ir: 0.005 },
    z: { a: 3.4, ir: 0.01 },
  };
  const doc = { version: 2, wavelength_nm: 800, elements: [{ kind: 'crystal', dispersion, thickness_mm: 2, axes: { tilt_deg: 30, azimuth_deg: 10, roll_deg: 15 } }] };
  const address = `/#scenario=${encodeURIComponent(JSON.stringify(doc))}`;
  await withPage(address, async (page) => {
    const sc = await waitScenario(page, (s) => s.elements[0].dispersion?.z !== undefined, 'the loaded formula');
    assert.deepEqual(sc.elements[0].dispersion, dispersion, 'kept exactly, fitted_in and citation carried');
    assert.equal(await page.inputValue(FORM), 'biaxial');
    assert.equal(await page.inputValue(input('y.sellmeier[1][1]')), '90', 'shown in the entry');
    assert.equal(await page.inputValue(input('z.ir')), '0.01');
    assert.equal(await page.isVisible(input('x.a')), true, 'the entry shows, not the kept-as-loaded note');
    await expectAgreement(page, cliTrace(sc), ['elements[0].nx', 'elements[0].ny', 'elements[0].nz', 'elements[0].f.index', 'elements[0].s.index'], 'loaded compact biaxial formula');
    // An edit keeps the members the entry does not show.
    await enterValue(page, input('x.a'), '2.9');
    const edited = await waitScenario(page, (s) => s.elements[0].dispersion.x.a === 2.9, 'the edit');
    assert.deepEqual(edited.elements[0].dispersion, { ...dispersion, x: { ...dispersion.x, a: 2.9 } });
  });
});

test('a custom formula\'s temperature data: entered per axis, traced at temperature as the command line traces it, a bad value named beside its field', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(MATERIAL, 'custom-formula');
    await waitScenario(page, (s) => s.elements[0].dispersion !== undefined, 'a custom formula');
    await enterValue(page, input('o.dn_dt_per_k'), '3e-6');
    await enterValue(page, input('e.dn_dt_per_k'), '0.000013');
    await enterValue(page, input('o.expansion_per_k'), '-5.8e-6');
    await enterValue(page, input('e.expansion_per_k'), '25e-6');
    await enterValue(page, 'input.num[data-field="temperature_c"]', '60');
    const sc = await waitScenario(page, (s) => s.temperature_c === 60 && s.elements[0].dispersion.e.expansion_per_k === 25e-6, 'the temperature data at 60 °C');
    assert.equal(sc.elements[0].dispersion.o.dn_dt_per_k, 3e-6);
    assert.equal(sc.elements[0].dispersion.e.dn_dt_per_k, 13e-6);
    const cli = cliTrace(sc);
    // Calcite's coefficients with calcite's temperature constants: catalogue calcite at 60 °C.
    const calcite = cliTrace({ ...sc, elements: [{ ...sc.elements[0], dispersion: undefined, material: 'calcite' }] });
    for (const k of ['no', 'ne', 'thickness_at_temperature_mm']) assert.equal(cli.elements[0][k], calcite.elements[0][k], k);
    await expectAgreement(page, cli, ['elements[0].no', 'elements[0].ne', 'elements[0].thickness_at_temperature_mm', 'elements[0].separation_mm'], 'custom formula at 60 °C');
    // A dn/dT beyond any crystal's: named on its own field, every entry kept.
    await enterValue(page, input('e.dn_dt_per_k'), '0.01');
    const msg = await waitError(page, 'elements[0].dispersion.e.dn_dt_per_k');
    assert.match(msg, /0\.001|1e-3|0\.01/, msg);
    assert.equal(await page.inputValue(input('e.dn_dt_per_k')), '0.01');
    assert.equal(await page.inputValue(input('o.expansion_per_k')), '-5.8e-6');
  });
});
