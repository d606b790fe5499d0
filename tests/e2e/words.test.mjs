// End-to-end tests of the page's words (DEVELOPERS.md, "The page"): messages name the field as
// the page labels it, elements counted from 1, and keep the contract path in data-error-field;
// ranges that exclude an end say so; a one-sided band explains itself; number fields step with
// the arrow keys (Shift ×10, Alt ×0.1); no two controls share an accessible name.
//
// Run: `cd tests/e2e && npm ci && node --test words.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, waitScenario, enterValue, waitError } from './support.mjs';

const env = useBrowser({ cli: false });
const withPage = (body) => openAt(env, '/', ({ page }) => body(page));

test('a message names the field as the page labels it, elements counted from 1', { timeout: 60000 }, async () => {
  await withPage(async (page) => {
    await page.click('[data-add="crystal"]');
    await waitScenario(page, (s) => s.elements.length === 2, 'a second crystal');
    const legends = await page.$$eval('#stack-list .card-number', (els) => els.map((e) => e.textContent));
    assert.deepEqual(legends, ['Element 1', 'Element 2'], 'cards are numbered from 1');

    const f = 'elements[1].thickness_mm';
    await enterValue(page, `input.num[data-field="${f}"]`, 'abc');
    assert.equal(await waitError(page, f), 'Element 2 · Thickness: enter a number in millimetres, such as 2.5 (got a string)');
    const field = await page.$eval(`[data-error-for="${f}"]`, (el) => el.getAttribute('data-error-field'));
    assert.equal(field, f, 'the slot keeps the contract path');
    assert.match(await page.textContent('#stale-note'), /Element 2 · Thickness needs attention/);

    // A range that leaves out an end says so.
    await enterValue(page, `input.num[data-field="${f}"]`, '0');
    await page.waitForFunction((p) => /above 0/.test(document.querySelector(`[data-error-for="${p}"]`).textContent), f, { timeout: 15000 });
    assert.equal(await waitError(page, f), 'Element 2 · Thickness: must be above 0 mm and at most 10000 mm, got 0 mm');
    await enterValue(page, 'input.num[data-field="beam.incidence.polar_deg"]', '90');
    assert.equal(await waitError(page, 'beam.incidence.polar_deg'),
      'Polar angle: must be above −90° and below 90° (grazing light never enters), got 90°');
    await enterValue(page, 'input.num[data-field="beam.incidence.polar_deg"]', '0');
    await enterValue(page, `input.num[data-field="${f}"]`, '2');
    await waitScenario(page, (s) => s.elements[1].thickness_mm === 2, 'a good value traces again');
  });
});

test('a one-sided band explains itself', { timeout: 60000 }, async () => {
  await withPage(async (page) => {
    await enterValue(page, '[data-design-field="band_nm[0]"]', '600');
    await page.click('#design-solve');
    assert.equal(await waitError(page, 'band_nm[1]', 'data-design-error-for'),
      'Band to: give the upper end of the band too, or leave both ends empty for the design wavelength alone');
    assert.equal(await page.evaluate(() => document.getElementById('design').dataset.state), 'error', 'nothing is sent to the solver');
  });
});

test('number fields step with the arrow keys: Shift ×10, Alt ×0.1, from a base step per field', { timeout: 60000 }, async () => {
  await withPage(async (page) => {
    const thick = page.locator('input.num[data-field="elements[0].thickness_mm"]');
    await thick.focus();
    await thick.press('ArrowUp');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 12.6, 'ArrowUp adds 0.1 mm to 12.5 mm');
    await thick.press('Shift+ArrowUp');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 13.6, 'Shift+ArrowUp adds 1 mm');
    await thick.press('Alt+ArrowDown');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 13.59, 'Alt+ArrowDown takes 0.01 mm');
    assert.equal(await thick.inputValue(), '13.59', 'no binary residue in the field');

    const tilt = page.locator('input.num[data-field="elements[0].axis.tilt_deg"]');
    await tilt.focus();
    await tilt.press('ArrowDown');
    await waitScenario(page, (s) => s.elements[0].axis.tilt_deg === 44, 'ArrowDown takes 1° from the tilt');
    assert.equal(await page.inputValue('input[type=range][data-field="elements[0].axis.tilt_deg"]'), '44', 'the slider follows');
    const wl = page.locator('input.num[data-field="wavelength_nm"]');
    await wl.focus();
    await wl.press('Shift+ArrowDown');
    await waitScenario(page, (s) => s.wavelength_nm === 622.8, 'Shift+ArrowDown takes 10 nm');

    const dwl = page.locator('[data-design-field="wavelength_nm"]');
    await dwl.focus();
    await dwl.press('ArrowUp');
    assert.equal(await dwl.inputValue(), '633.8', 'the design panel\'s fields step too');
  });
});

/** Every control in the accessibility tree (Chromium's computed names) as {role, name}. */
async function controlNames(page) {
  const cdp = await page.context().newCDPSession(page);
  const { nodes } = await cdp.send('Accessibility.getFullAXTree');
  await cdp.detach();
  const roles = new Set(['button', 'textbox', 'combobox', 'slider', 'spinbutton', 'checkbox', 'radio', 'listbox', 'searchbox', 'link']);
  return nodes
    .filter((n) => !n.ignored && roles.has(n.role?.value))
    .map((n) => ({ role: n.role.value, name: (n.name?.value ?? '').trim() }));
}

function duplicates(list) {
  const seen = new Map();
  for (const c of list) seen.set(c.name, (seen.get(c.name) ?? 0) + 1);
  return [...seen].filter(([name, n]) => n > 1 || name === '').map(([name, n]) => `"${name}" ×${n}`);
}

test('no two controls share an accessible name', { timeout: 90000 }, async () => {
  await withPage(async (page) => {
    for (const kind of ['retarder', 'polarizer', 'rotator', 'crystal']) await page.click(`[data-add="${kind}"]`);
    await waitScenario(page, (s) => s.elements.length === 5, 'one element of each kind added');
    const states = [];
    for (const pol of ['linear', 'elliptical', 'circular', 'jones', 'stokes']) {
      await page.selectOption('[data-field="beam.polarization.kind"]', pol);
      for (const part of ['displacer', 'waveplate', 'achromat', 'recombiner', 'angular-splitter', 'prism-polarizer', 'tilt-tuning']) {
        await page.selectOption('[data-design-field="kind"]', part);
        const names = await controlNames(page);
        assert.ok(names.length > 40, `${pol}, ${part}: the tree holds the controls (${names.length})`);
        const dup = duplicates(names);
        if (dup.length) states.push(`${pol} light, ${part}: ${dup.join(', ')}`);
      }
    }
    assert.deepEqual(states, [], 'controls sharing an accessible name (or having none)');
  });
});
