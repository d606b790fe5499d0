// End-to-end tests of the liquid-crystal cell on the page: "+ LC cell" adds a cell to the stack,
// moving its voltage changes the reported retardance exactly as the command line's trace of the
// same document gives it, the retardance-against-voltage plot and the side view's director are
// drawn, Undo takes the voltage back, and a bad voltage is named beside its field with the entry
// kept.
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
