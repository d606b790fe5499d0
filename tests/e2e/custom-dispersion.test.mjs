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
