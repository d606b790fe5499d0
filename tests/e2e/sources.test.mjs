// End-to-end tests of dispersion sources on the page: the stack editor's source select for a
// catalogue crystal with several published formulas, the numbers the results show against the
// command line's trace of the same document (the chosen source, its indices, how far the sources
// disagree), the choice kept per material and undone, and an unknown source named beside its
// field with every other entry kept.
//
// Run: `cd tests/e2e && npm ci && node --test sources.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, waitScenario, cliTrace, expectAgreement, waitError } from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

const SOURCE = 'select[data-field="elements[0].source"]';
const MATERIAL = 'select[data-field="elements[0].material"]';

const shown = (page, selector) => page.evaluate((s) => {
  const el = document.querySelector(s);
  return !!el && !el.closest('[hidden]');
}, selector);

test('a crystal with two published formulas: the source select, the chosen indices and the disagreement as the command line gives them', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(MATERIAL, 'calcite');
    await waitScenario(page, (s) => s.elements[0].material === 'calcite', 'calcite');
    assert.equal(await shown(page, SOURCE), true, 'calcite has two sources: the select shows');
    const options = await page.$$eval(`${SOURCE} option`, (os) => os.map((o) => [o.value, o.textContent]));
    assert.deepEqual(options.map(([v]) => v), ['', 'tropf-1995'], 'the default first, then the other source');
    assert.match(options[0][1], /Ghosh 1999 \(default\)/);
    const before = await waitScenario(page, (s) => s.elements[0].source === undefined, 'the default is implied');
    const required = ['elements[0].source', 'elements[0].source_spread.birefringence', 'elements[0].no', 'elements[0].ne', 'elements[0].separation_mm'];
    await expectAgreement(page, cliTrace(before), required, 'calcite, default source');
    await page.selectOption(SOURCE, 'tropf-1995');
    const chosen = await waitScenario(page, (s) => s.elements[0].source === 'tropf-1995', 'the handbook formula chosen');
    const cli = cliTrace(chosen);
    assert.equal(cli.elements[0].source, 'tropf-1995');
    await expectAgreement(page, cli, required, 'calcite, tropf-1995');
    const text = await page.textContent('[data-quantity="elements[0].source_spread.birefringence"]');
    assert.match(text, /ghosh-1999, tropf-1995/, text);
    // Another crystal with one source hides the select and writes no source; coming back to
    // calcite brings the choice back.
    await page.selectOption(MATERIAL, 'sapphire');
    await waitScenario(page, (s) => s.elements[0].material === 'sapphire' && s.elements[0].source === undefined, 'sapphire, no source');
    assert.equal(await shown(page, SOURCE), false, 'sapphire has one source: no select');
    await page.selectOption(MATERIAL, 'calcite');
    await waitScenario(page, (s) => s.elements[0].source === 'tropf-1995', 'calcite keeps its chosen source');
    // Undo walks back through the material changes to the default source.
    for (let i = 0; i < 3; i++) await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].material === 'calcite' && s.elements[0].source === undefined, 'Undo restores the default source');
  });
});

test('a file naming an unknown source is refused with the field and the known sources, the set-up kept', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(MATERIAL, 'calcite');
    await page.selectOption(SOURCE, 'tropf-1995');
    await waitScenario(page, (s) => s.elements[0].source === 'tropf-1995', 'the handbook formula chosen');
    const doc = {
      version: 2, wavelength_nm: 632.8,
      elements: [{ kind: 'crystal', material: 'calcite', source: 'nobody-1900', thickness_mm: 3, axis: { tilt_deg: 45, azimuth_deg: 0 } }],
    };
    await page.setInputFiles('#scenario-file', { name: 'unknown-source.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(doc)) });
    await page.waitForFunction(() => !document.getElementById('file-error').hidden, null, { timeout: 15000 });
    const msg = await page.textContent('#file-error');
    assert.match(msg, /elements\[0\]\.source/, msg);
    assert.match(msg, /ghosh-1999, tropf-1995/, msg);
    assert.equal(await page.inputValue(SOURCE), 'tropf-1995', 'the chosen source is kept');
    await waitScenario(page, (s) => s.elements[0].source === 'tropf-1995', 'the set-up is kept');
  });
});

test('a design in the panel says which formula its indices came from', { timeout: 120000 }, async () => {
  const { fill } = await import('./design-support.mjs');
  const { solveDesign } = await import('./support.mjs');
  await withPage('/', async (page) => {
    await fill(page, 'displacer', [['material', 'calcite'], ['separation_mm', 1], ['wavelength_nm', 632.8]]);
    await solveDesign(page);
    const items = await page.$$eval('#design-results [data-design-advice="sources"] li', (els) => els.map((e) => e.textContent));
    assert.equal(items.length, 1, JSON.stringify(items));
    assert.match(items[0], /ghosh-1999 formula, G\. Ghosh/, items[0]);
  });
});
