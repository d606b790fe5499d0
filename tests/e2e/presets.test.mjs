// End-to-end tests of the preset chooser (DEVELOPERS.md, "The page"): its starting points come
// from the core (`presets()`, the documents of examples/), not from a copy in the page, so the
// list must be the files on disk and each must load as the file reads; a preset load is one
// step of the history that Undo takes back and Redo brings again.
//
// Run: `cd tests/e2e && npm ci && node --test presets.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, useBrowser, withPage as openAt, pageScenario, waitScenario, enterValue } from './support.mjs';

const env = useBrowser({ cli: false });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

const EXAMPLES = path.join(ROOT, 'examples');
/** The example documents on disk: {key: file name without .json, text}. */
const examples = () => fs.readdirSync(EXAMPLES).filter((f) => f.endsWith('.json')).sort()
  .map((f) => ({ key: f.slice(0, -'.json'.length), text: fs.readFileSync(path.join(EXAMPLES, f), 'utf8') }));

/** A document as the core writes it back, every default filled in (the session is put back after). */
const normalized = (page, text) => page.evaluate((t) => {
  const s = window.doublespar.session;
  const before = s.scenarioJson();
  s.updateJson(t);
  const out = JSON.parse(s.scenarioJson());
  s.updateJson(before);
  return out;
}, text);

const loadPreset = async (page, key) => {
  await page.selectOption('#preset', key);
  await page.click('#load-preset');
};

test('the preset chooser lists exactly the documents of examples/, and each loads as its file reads', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    const files = examples();
    assert.ok(files.length >= 3, `examples/ holds ${files.length} documents`);
    const options = await page.$$eval('#preset option', (els) => els.map((o) => ({ key: o.value, name: o.textContent })));
    assert.deepEqual(options.map((o) => o.key).sort(), files.map((f) => f.key), 'one preset per file of examples/, keyed by its name');
    assert.equal(options[0].key, 'demo', 'the demo comes first');
    for (const o of options) assert.ok(o.name.trim().length > 0, `the preset ${o.key} has a name`);

    // Each file's scenario, loaded through the chooser, is the file's own (defaults filled in).
    // The demo last, so that every load changes the set-up.
    for (const f of [...files.filter((x) => x.key !== 'demo'), ...files.filter((x) => x.key === 'demo')]) {
      const expected = await normalized(page, f.text);
      await loadPreset(page, f.key);
      await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(expected), `the preset ${f.key} loads examples/${f.key}.json`);
      const origin = await page.getAttribute('#setup-origin', 'data-origin');
      assert.equal(origin, f.key === 'demo' ? 'demo' : 'preset');
    }
  });
});

test('Undo and Redo work across a preset load: one step each way', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    const demo = await pageScenario(page);
    const file = examples().find((f) => f.key === 'quarter-wave');
    const preset = await normalized(page, file.text);
    const name = await page.$eval('#preset option[value="quarter-wave"]', (o) => o.textContent);

    await enterValue(page, 'input.num[data-field="elements[0].thickness_mm"]', '4.2');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 4.2, 'thickness 4.2');
    const edited = await pageScenario(page);

    await loadPreset(page, 'quarter-wave');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(preset), 'the preset loads');
    assert.match(await page.textContent('#history-status'), new RegExp(`Loaded the preset “${name}”; it replaced the demo, edited\\.`));

    await page.click('#undo');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(edited), 'one Undo brings back the edited demo');
    await page.click('#undo');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(demo), 'a second Undo brings back the demo');
    assert.equal(await page.isDisabled('#undo'), true, 'nothing left to undo');
    await page.click('#redo');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(edited), 'Redo makes the edit again');
    await page.click('#redo');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(preset), 'Redo loads the preset again');
    assert.equal(await page.getAttribute('#setup-origin', 'data-origin'), 'preset');
    assert.equal(await page.isDisabled('#redo'), true, 'nothing left to redo');
    assert.equal(await page.inputValue('input.num[data-field="elements[0].thickness_mm"]'), String(preset.elements[0].thickness_mm), 'the controls show the preset');
  });
});
