// End-to-end tests of biaxial and optically active crystals on the page: the stack editor's
// controls for them (principal indices, roll, handedness, optical activity), the numbers the
// results show against the command line's trace of the same document, and a bad principal index
// named beside its own field with every other entry kept.
//
// Run: `cd tests/e2e && npm ci && node --test crystals.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import {
  useBrowser, withPage as openAt, waitScenario, enterValue, cliTrace, expectAgreement, waitError,
} from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

const loadPreset = async (page, key) => {
  await page.selectOption('#preset', key);
  await page.click('#load-preset');
};

/** Whether the crystal card's row for `key` (a Field's data-field ending) is shown. */
const shown = (page, path) => page.evaluate((p) => {
  const el = document.querySelector(`[data-field="${p}"]`);
  return !!el && !el.closest('[hidden]');
}, path);

test('a biaxial crystal: the KTP preset shows principal indices, 2V, f and s modes and group delay as the command line traces them', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await loadPreset(page, 'ktp-plate');
    const sc = await waitScenario(page, (s) => s.elements[0].material === 'ktp', 'the KTP preset loads');
    assert.equal(sc.elements[0].axes.roll_deg, 90, 'the roll is kept');
    // (The core writes a crystal with roll 0 back as `axis`, which is `axes` with roll 0.)
    const orientation = (s) => s.elements[0].axes ?? s.elements[0].axis;
    assert.equal(await shown(page, 'elements[0].axes.roll_deg'), true, 'the roll control shows for a biaxial crystal');
    assert.equal(await shown(page, 'elements[0].handedness'), false, 'no handedness for KTP');
    const cli = cliTrace(sc);
    const required = ['elements[0].nx', 'elements[0].ny', 'elements[0].nz', 'elements[0].optic_axis_angle_deg',
      'elements[0].f.index', 'elements[0].s.index', 'elements[0].s.walkoff_deg', 'elements[0].group_delay_ps',
      'elements[0].f.group_index', 'elements[0].separation_mm', 'rays.f.power', 'rays.s.power'];
    await expectAgreement(page, cli, required, 'KTP plate');
    // The rolled crystal's roll changes the trace, and Undo brings it back.
    await enterValue(page, 'input.num[data-field="elements[0].axes.roll_deg"]', '0');
    const turned = await waitScenario(page, (s) => (orientation(s).roll_deg ?? 0) === 0, 'roll 0');
    await expectAgreement(page, cliTrace(turned), ['elements[0].separation_mm'], 'KTP plate, roll 0');
    await page.click('#undo');
    await waitScenario(page, (s) => orientation(s).roll_deg === 90, 'Undo restores the roll');
  });
});

test('custom principal indices: entered, traced, and a bad one named beside its field with the others kept', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption('select[data-field="elements[0].material"]', 'custom-principal');
    await waitScenario(page, (s) => s.elements[0].nx !== undefined, 'custom nx, ny, nz');
    assert.equal(await shown(page, 'elements[0].axes.roll_deg'), true, 'the roll control shows for custom principal indices');
    await enterValue(page, 'input.num[data-field="elements[0].nz"]', '1.9');
    const sc = await waitScenario(page, (s) => s.elements[0].nz === 1.9, 'nz 1.9');
    await expectAgreement(page, cliTrace(sc), ['elements[0].nx', 'elements[0].s.index', 'elements[0].optic_axis_angle_deg'], 'custom biaxial');
    await enterValue(page, 'input.num[data-field="elements[0].ny"]', '0.5');
    const msg = await waitError(page, 'elements[0].ny');
    assert.match(msg, /ny/i, msg);
    assert.equal(await page.inputValue('input.num[data-field="elements[0].nz"]'), '1.9', 'nz kept');
    assert.equal(await page.inputValue('input.num[data-field="elements[0].ny"]'), '0.5', 'the bad value stays for correction');
  });
});

test('optical activity: the quartz rotator turns the light by its rotatory power; handedness and the switch act as the command line says', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await loadPreset(page, 'quartz-rotator');
    const sc = await waitScenario(page, (s) => s.elements[0].handedness === 'left', 'the rotator loads');
    assert.equal(await shown(page, 'elements[0].handedness'), true);
    assert.equal(await shown(page, 'elements[0].optical_activity'), true);
    const cli = cliTrace(sc);
    assert.ok(Math.abs(cli.total_power - 1) < 1e-6, `the rotator passes the 45° polarizer: ${cli.total_power}`);
    await expectAgreement(page, cli, ['elements[0].rotatory_power_deg_per_mm', 'total_power'], 'quartz rotator');
    // Right-handed: the light turns the other way, to −45°, and the polarizer at 45° stops it.
    await page.selectOption('select[data-field="elements[0].handedness"]', 'right');
    const right = await waitScenario(page, (s) => s.elements[0].handedness === 'right', 'right-handed');
    const r = cliTrace(right);
    assert.ok(r.total_power < 1e-6, `crossed: ${r.total_power}`);
    // What little passes has no meaningful ellipse: the total alone is compared.
    await page.waitForFunction((want) => Math.abs(Number(document.querySelector('[data-quantity="total_power"]')?.getAttribute('data-value')) - want) < 1e-12,
      r.total_power, { timeout: 15000 });
    // Switched off: no rotation, half the light passes.
    await page.selectOption('select[data-field="elements[0].optical_activity"]', 'false');
    const off = await waitScenario(page, (s) => s.elements[0].optical_activity === false, 'activity off');
    const o = cliTrace(off);
    assert.ok(Math.abs(o.total_power - 0.5) < 1e-6, `no rotation: ${o.total_power}`);
    await expectAgreement(page, o, ['total_power'], 'activity off');
    // Back to a catalogue crystal without activity: its controls leave, the document drops them.
    await page.selectOption('select[data-field="elements[0].material"]', 'calcite');
    const calcite = await waitScenario(page, (s) => s.elements[0].material === 'calcite', 'calcite');
    assert.equal(calcite.elements[0].handedness, undefined);
    assert.equal(await shown(page, 'elements[0].handedness'), false);
  });
});

test('a wavelength measured in air: the page sends it as given and shows the vacuum wavelength the trace used', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption('select[data-field="wavelength_in"]', 'air');
    const sc = await waitScenario(page, (s) => s.wavelength_in === 'air', 'wavelength in air');
    assert.equal(sc.wavelength_nm, 632.8, 'the wavelength stays as entered');
    const cli = cliTrace(sc);
    assert.ok(cli.wavelength_nm > 632.9 && cli.wavelength_nm < 633.0, `vacuum ${cli.wavelength_nm}`);
    await expectAgreement(page, cli, ['wavelength_nm', 'elements[0].separation_mm'], 'air wavelength');
  });
});

test('temperature: the control sends temperature_c, and the crystal\'s thickness and retardance follow the command line', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await enterValue(page, 'input.num[data-field="temperature_c"]', '60');
    const sc = await waitScenario(page, (s) => s.temperature_c === 60, 'temperature 60 °C');
    const cli = cliTrace(sc);
    assert.equal(cli.elements[0].temperature_c, 60);
    assert.ok(cli.elements[0].thickness_at_temperature_mm !== cli.elements[0].thickness_mm, 'the plate grows');
    await expectAgreement(page, cli, ['elements[0].thickness_at_temperature_mm', 'elements[0].separation_mm', 'elements[0].retardance_rad'], 'at 60 °C');
    await enterValue(page, 'input.num[data-field="temperature_c"]', '900');
    const msg = await waitError(page, 'temperature_c');
    assert.match(msg, /500/, msg);
  });
});
