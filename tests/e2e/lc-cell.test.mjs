// End-to-end tests of the liquid-crystal cell on the page: "+ LC cell" adds a cell to the stack,
// moving its voltage changes the reported retardance exactly as the command line's trace of the
// same document gives it, the retardance-against-voltage plot and the side view's director are
// drawn, Undo takes the voltage back, and a bad voltage is named beside its field with the entry
// kept; custom nematic constants are edited in their own fields, checked against the
// Freedericksz threshold formula, with a bad constant named beside its field; warming the page's
// temperature lowers the cell's retardance as the command line gives it, and the clearing point
// is named on the temperature field with the entry kept; 5PCH chosen from the nematic list traces
// as the command line traces it, with the command line's warnings.
//
// Run: `cd tests/e2e && node --test lc-cell.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, waitScenario, enterValue, cliTrace, waitError, canvasStats, drawn } from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

const cellIndex = (s) => s.elements.findIndex((e) => e.kind === 'lc_cell');

test('a cell added and switched reports the command line\'s retardance, and Undo takes it back', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('button[data-add="lc_cell"]');
    const added = await waitScenario(page, (s) => cellIndex(s) >= 0, 'a cell in the stack');
    const i = cellIndex(added);
    const el = added.elements[i];
    assert.equal(el.lc, '5cb');
    assert.equal(el.voltage_v, 0);
    const voltage = `input.num[data-field="elements[${i}].voltage_v"]`;
    const before = await page.evaluate((k) => window.doublespar.session.result().elements[k].retardance_waves, i);

    await enterValue(page, voltage, '2');
    const sc = await waitScenario(page, (s) => s.elements[i]?.voltage_v === 2, 'the voltage at 2 V');
    const shown = await page.evaluate((k) => window.doublespar.session.result().elements[k], i);
    const cli = cliTrace(sc).elements[i];
    assert.ok(shown.retardance_waves < before, `switching lowers the retardance: ${before} → ${shown.retardance_waves}`);
    assert.ok(Math.abs(shown.retardance_waves - cli.retardance_waves) <= 1e-12 * Math.abs(cli.retardance_waves),
      `page ${shown.retardance_waves}, command line ${cli.retardance_waves}`);
    assert.ok(Math.abs(shown.threshold_voltage_v - cli.threshold_voltage_v) <= 1e-12 * cli.threshold_voltage_v);
    assert.deepEqual(shown.director_profile.z_um, cli.director_profile.z_um);

    await page.waitForFunction(() => /Retardance of the first liquid-crystal cell against voltage/
      .test(document.querySelector('canvas[data-view="retardance-voltage"]').getAttribute('aria-label')));
    const stats = await page.evaluate(canvasStats);
    for (const view of ['retardance-voltage', 'side']) {
      const s = stats.find((x) => x.view === view);
      assert.ok(drawn(s), `${view} is drawn: ${JSON.stringify(s)}`);
    }

    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[i]?.voltage_v === 0, 'Undo sets the voltage back to 0 V');
  });
});

test('a bad voltage is named beside its field and nothing entered is lost', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('button[data-add="lc_cell"]');
    const added = await waitScenario(page, (s) => cellIndex(s) >= 0, 'a cell in the stack');
    const i = cellIndex(added);
    await enterValue(page, `input.num[data-field="elements[${i}].thickness_um"]`, '7');
    await waitScenario(page, (s) => s.elements[i]?.thickness_um === 7, 'a 7 µm cell');
    await enterValue(page, `input.num[data-field="elements[${i}].voltage_v"]`, '-3');
    const msg = await waitError(page, `elements[${i}].voltage_v`);
    assert.ok(msg.length > 0, msg);
    assert.equal(await page.inputValue(`input.num[data-field="elements[${i}].voltage_v"]`), '-3', 'the bad voltage stays for correction');
    assert.equal(await page.inputValue(`input.num[data-field="elements[${i}].thickness_um"]`), '7', 'the thickness is kept');
  });
});

test('custom nematic constants are edited on the page: the threshold follows K11 as the Freedericksz formula says, and a bad constant is named beside its field', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('button[data-add="lc_cell"]');
    const i = cellIndex(await waitScenario(page, (s) => cellIndex(s) >= 0, 'a cell in the stack'));
    const field = (k) => `input.num[data-field="elements[${i}].lc.${k}"]`;
    assert.equal(await page.isVisible(field('k11_pn')), false, 'the constants are folded away for a catalogue nematic');
    await page.selectOption(`[data-field="elements[${i}].lc"]`, 'custom');
    const custom = await waitScenario(page, (s) => typeof s.elements[i]?.lc === 'object', 'custom constants in the scenario');
    assert.deepEqual(Object.keys(custom.elements[i].lc).sort(), ['eps_parallel', 'eps_perpendicular', 'k11_pn', 'k22_pn', 'k33_pn', 'ne', 'no']);
    assert.equal(await page.isVisible(field('k11_pn')), true, 'the constants are shown');

    await enterValue(page, field('k11_pn'), '12.5');
    const sc = await waitScenario(page, (s) => s.elements[i]?.lc?.k11_pn === 12.5, 'K11 at 12.5 pN');
    const shown = await page.evaluate((k) => window.doublespar.session.result().elements[k], i);
    const cli = cliTrace(sc).elements[i];
    assert.ok(Math.abs(shown.retardance_waves - cli.retardance_waves) <= 1e-12 * Math.abs(cli.retardance_waves),
      `page ${shown.retardance_waves}, command line ${cli.retardance_waves}`);
    // Freedericksz threshold of an untwisted cell, V_th = π √(K11/(ε0 Δε)) (V. Freedericksz and
    // V. Zolina, Trans. Faraday Soc. 29, 919 (1933); de Gennes & Prost, The Physics of Liquid
    // Crystals, §3.2), ε0 = 8.8541878128e-12 F/m (CODATA 2018).
    const lc = sc.elements[i].lc;
    assert.equal(sc.elements[i].twist_deg, 0);
    const vth = Math.PI * Math.sqrt(12.5e-12 / (8.8541878128e-12 * (lc.eps_parallel - lc.eps_perpendicular)));
    assert.ok(Math.abs(shown.threshold_voltage_v - vth) <= 1e-12 * vth, `threshold ${shown.threshold_voltage_v} V, formula ${vth} V`);

    // ε⊥ above ε∥: the core names the constant, beside its field; the entry stays.
    await enterValue(page, field('eps_perpendicular'), '25');
    const msg = await waitError(page, `elements[${i}].lc.eps_parallel`);
    assert.match(msg, /eps_perpendicular/);
    assert.equal(await page.inputValue(field('eps_perpendicular')), '25', 'the entry stays for correction');
    assert.equal(await page.inputValue(field('k11_pn')), '12.5', 'the other constants are kept');
  });
});

test('a warmer cell has the command line\'s lower retardance, and at the clearing point the temperature is named', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('button[data-add="lc_cell"]');
    const i = cellIndex(await waitScenario(page, (s) => cellIndex(s) >= 0, 'a cell in the stack'));
    const cold = await page.evaluate((k) => window.doublespar.session.result().elements[k].retardance_waves, i);
    await enterValue(page, 'input.num[data-field="temperature_c"]', '33');
    const sc = await waitScenario(page, (s) => s.temperature_c === 33, 'the set-up at 33 °C');
    const warm = await page.evaluate((k) => window.doublespar.session.result().elements[k].retardance_waves, i);
    const cli = cliTrace(sc).elements[i];
    assert.ok(warm < 0.85 * cold, `warming lowers the retardance: ${cold} → ${warm}`);
    assert.ok(Math.abs(warm - cli.retardance_waves) <= 1e-12 * cli.retardance_waves, `page ${warm}, command line ${cli.retardance_waves}`);
    await enterValue(page, 'input.num[data-field="temperature_c"]', '36');
    const msg = await waitError(page, 'temperature_c');
    assert.match(msg, /clearing point/);
    assert.equal(await page.inputValue('input.num[data-field="temperature_c"]'), '36', 'the entry stays for correction');
  });
});

test('5PCH chosen from the nematic list traces as the command line does, with its warnings', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('button[data-add="lc_cell"]');
    const added = await waitScenario(page, (s) => cellIndex(s) >= 0, 'a cell in the stack');
    const i = cellIndex(added);
    await page.selectOption(`select[data-field="elements[${i}].lc"]`, '5pch');
    const sc = await waitScenario(page, (s) => s.elements[i]?.lc === '5pch', 'the cell of 5PCH');
    const shown = await page.evaluate(() => window.doublespar.session.result());
    const cli = cliTrace(sc);
    const [a, b] = [shown.elements[i], cli.elements[i]];
    assert.ok(Math.abs(a.retardance_waves - b.retardance_waves) <= 1e-12 * Math.abs(b.retardance_waves),
      `page ${a.retardance_waves}, command line ${b.retardance_waves}`);
    assert.equal(a.ne, b.ne);
    assert.deepEqual(shown.warnings, cli.warnings);
    assert.ok(cli.warnings.some((w) => w.includes("5PCH's elastic and dielectric constants are recalled")),
      `the recalled-constants warning: ${cli.warnings}`);
  });
});
