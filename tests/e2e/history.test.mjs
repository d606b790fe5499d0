// End-to-end tests of the set-up's history (DEVELOPERS.md, "The page", history): Undo and Redo
// by button and keyboard, runs of edits as one step, the browser's Back and Forward, loads that
// one Undo takes back and the message saying what they replaced, the "Now showing" line, and the
// design panel's inputs in the shared link.
//
// Run: `cd tests/e2e && npm ci && node --test history.test.mjs` (after scripts/build-web.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, useBrowser, withPage as openAt, pageScenario, waitScenario, enterValue, solveDesign, waitError } from './support.mjs';

const env = useBrowser({ cli: false });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

const THICK = 'input.num[data-field="elements[0].thickness_mm"]';
const TILT = 'input.num[data-field="elements[0].axis.tilt_deg"]';
const TILT_RANGE = 'input[type=range][data-field="elements[0].axis.tilt_deg"]';
const origin = (page) => page.evaluate(() => {
  const el = document.getElementById('setup-origin');
  return { kind: el.dataset.origin, edited: el.dataset.edited, text: el.textContent };
});
const statusText = (page) => page.textContent('#history-status');

test('Undo and Redo take back every change, by button and by keyboard; a text field keeps its own Ctrl+Z', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    const demo = await pageScenario(page);
    assert.equal(await page.isDisabled('#undo'), true, 'nothing to undo at first');
    await enterValue(page, THICK, '3.7');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 3.7, 'thickness 3.7');
    await enterValue(page, TILT, '30');
    await waitScenario(page, (s) => s.elements[0].axis.tilt_deg === 30, 'tilt 30');
    await page.click('[data-add="retarder"]');
    await waitScenario(page, (s) => s.elements.length === 2, 'a retarder added');

    await page.click('#undo');
    await waitScenario(page, (s) => s.elements.length === 1 && s.elements[0].axis.tilt_deg === 30, 'Undo removes the added retarder');
    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].axis.tilt_deg === 45 && s.elements[0].thickness_mm === 3.7, 'Undo puts the tilt back');
    assert.equal(await page.inputValue(TILT), '45', 'the tilt field shows the undone value');
    await page.click('#undo');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(demo), 'Undo brings back the demo');
    assert.equal(await page.isDisabled('#undo'), true, 'nothing left to undo');

    // The keyboard, with the focus outside any text field.
    await page.locator('#stack-title').click();
    await page.keyboard.press('Control+Shift+Z');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 3.7, 'Ctrl+Shift+Z redoes the thickness');
    await page.keyboard.press('Control+y');
    await waitScenario(page, (s) => s.elements[0].axis.tilt_deg === 30, 'Ctrl+Y redoes the tilt');
    await page.keyboard.press('Control+z');
    await waitScenario(page, (s) => s.elements[0].axis.tilt_deg === 45, 'Ctrl+Z undoes the tilt');

    // In a text field Ctrl+Z is the field's own: the set-up is not undone.
    const before = await pageScenario(page);
    await page.locator(THICK).focus();
    await page.keyboard.press('Control+z');
    await page.waitForTimeout(300);
    assert.deepEqual(await pageScenario(page), before, 'Ctrl+Z in a text field does not undo the set-up');

    // A new edit after Undo drops what Redo held.
    await enterValue(page, THICK, '8');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 8, 'thickness 8');
    assert.equal(await page.isDisabled('#redo'), true, 'a new edit leaves nothing to redo');
  });
});

test('typing a number and dragging a slider are one step each', { timeout: 60000 }, async () => {
  await withPage('/', async (page) => {
    const thick = page.locator(THICK);
    await thick.fill('');
    await thick.pressSequentially('20.25', { delay: 60 });
    await thick.press('Tab');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 20.25, 'typed 20.25');
    const range = page.locator(TILT_RANGE);
    await range.scrollIntoViewIfNeeded();
    const box = await range.boundingBox();
    const y = box.y + box.height / 2;
    await page.mouse.move(box.x + box.width * 0.5, y);
    await page.mouse.down();
    for (let i = 1; i <= 8; i += 1) {
      await page.mouse.move(box.x + box.width * (0.5 + i * 0.03), y);
      await page.waitForTimeout(40);
    }
    await page.mouse.up();
    const dragged = await waitScenario(page, (s) => s.elements[0].axis.tilt_deg > 100, 'the drag moved the tilt');
    assert.ok(dragged.elements[0].axis.tilt_deg < 180);
    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].axis.tilt_deg === 45 && s.elements[0].thickness_mm === 20.25, 'one Undo takes back the whole drag');
    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 12.5, 'one Undo takes back the whole number typed');
  });
});

test('Back and Forward walk through the committed set-ups without adding steps', { timeout: 60000 }, async () => {
  await withPage('/', async (page) => {
    await enterValue(page, THICK, '4');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 4, 'thickness 4');
    await enterValue(page, THICK, '6');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 6, 'thickness 6');
    const length = await page.evaluate(() => history.length);
    await page.goBack();
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 4, 'Back shows thickness 4');
    const hash = await page.evaluate(() => location.hash);
    assert.equal(JSON.parse(decodeURIComponent(hash.slice('#scenario='.length))).elements[0].thickness_mm, 4, 'the address holds the step shown');
    await page.goBack();
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 12.5, 'Back again shows the demo');
    await page.goForward();
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 4, 'Forward shows thickness 4');
    await page.goForward();
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 6, 'Forward shows thickness 6');
    assert.equal(await page.evaluate(() => history.length), length, 'walking the history added no entry');
    assert.equal(await page.isDisabled('#redo'), true, 'at the newest step nothing is left to redo');

    // A link put into the address is a step too, which Undo takes back.
    const recombiner = fs.readFileSync(path.join(ROOT, 'examples', 'recombiner.json'), 'utf8');
    await page.evaluate((h) => { location.hash = h; }, `#scenario=${encodeURIComponent(recombiner)}`);
    await waitScenario(page, (s) => s.wavelength_nm === 1064, 'the link in the address loads');
    assert.equal((await origin(page)).kind, 'link');
    assert.match(await statusText(page), /^Loaded a shared link; it replaced the demo, edited\. Undo brings that back\.$/);
    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 6, 'Undo goes back to the set-up before the link');
    await page.click('#redo');
    await waitScenario(page, (s) => s.wavelength_nm === 1064, 'Redo shows the link\'s set-up again');
  });
});

test('a number typed and left before the page traces it is still a step of its own', { timeout: 60000 }, async () => {
  await withPage('/', async (page) => {
    const fire = (value, types) => page.evaluate(([sel, v, ts]) => {
      const field = document.querySelector(sel);
      if (v !== null) field.value = v;
      for (const t of ts) field.dispatchEvent(new Event(t, { bubbles: true }));
    }, [THICK, value, types]);
    // 4: the field's input and change events in one task, so its change (the run's end) comes
    // before the commit that records the run, as when a busy machine traces after the field
    // was typed into and left.
    await fire('4', ['input', 'change']);
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 4, 'thickness 4');
    // 6: typed, traced, then left; a step of its own, not a continuation of the 4's run.
    await fire('6', ['input']);
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 6, 'thickness 6');
    await fire(null, ['change']);
    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 4, 'Undo shows thickness 4, not the set-up before both edits');
    await page.click('#undo');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 12.5, 'Undo again shows the demo');
  });
});

test('a preset, a file and a designed part load as one step each, say what they replaced, and show where the set-up came from', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    const demo = await pageScenario(page);
    assert.deepEqual(await origin(page), { kind: 'demo', edited: 'false', text: 'Now showing the demo.' });
    await enterValue(page, THICK, '9');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 9, 'thickness 9');
    assert.deepEqual(await origin(page), { kind: 'demo', edited: 'true', text: 'Now showing the demo, edited.' });
    const edited = await pageScenario(page);

    // A preset.
    await page.selectOption('#preset', 'recombiner');
    await page.click('#load-preset');
    await waitScenario(page, (s) => s.wavelength_nm === 1064 && s.elements.length === 3, 'the preset loads');
    assert.equal((await origin(page)).kind, 'preset');
    assert.match((await origin(page)).text, /the preset “YVO₄ pair, half-wave plate”\.$/);
    assert.match(await statusText(page), /Loaded the preset “YVO₄ pair, half-wave plate”; it replaced the demo, edited\. Undo brings that back\./);
    await page.click('#undo');
    await waitScenario(page, (s) => JSON.stringify(s) === JSON.stringify(edited), 'one Undo brings back the edited demo');
    assert.deepEqual(await origin(page), { kind: 'demo', edited: 'true', text: 'Now showing the demo, edited.' });
    await page.click('#redo');
    await waitScenario(page, (s) => s.wavelength_nm === 1064, 'Redo loads the preset again');

    // A file.
    const doc = fs.readFileSync(path.join(ROOT, 'examples', 'quarter-wave.json'));
    await page.setInputFiles('#scenario-file', { name: 'my-plate.json', mimeType: 'application/json', buffer: doc });
    await waitScenario(page, (s) => s.wavelength_nm === 532, 'the file loads');
    assert.match((await origin(page)).text, /the file my-plate\.json\.$/);
    assert.match(await statusText(page), /Loaded the file my-plate\.json; it replaced the preset “YVO₄ pair, half-wave plate”\./);
    await page.click('#undo');
    await waitScenario(page, (s) => s.wavelength_nm === 1064 && s.elements.length === 3, 'one Undo takes the file back');
    await page.click('#redo');
    await waitScenario(page, (s) => s.wavelength_nm === 532, 'Redo opens it again');

    // A designed part.
    await page.fill('[data-design-field="samples"]', '0');
    await solveDesign(page);
    await page.click('#design-use');
    await waitScenario(page, (s) => s.elements.length === 1 && s.elements[0].material === 'calcite' && s.wavelength_nm === 632.8, 'the designed part loads');
    assert.equal((await origin(page)).kind, 'design');
    assert.match((await origin(page)).text, /the designed part \(beam displacer\)\.$/);
    assert.match(await statusText(page), /Loaded the designed part \(beam displacer\); it replaced the file my-plate\.json\./);
    await page.click('#undo');
    await waitScenario(page, (s) => s.wavelength_nm === 532, 'one Undo takes the designed part back');
    assert.notDeepEqual(await pageScenario(page), demo);
  });
});

test('the design panel\'s inputs travel in the link; a bad design part names its field and keeps the rest', { timeout: 90000 }, async () => {
  let link = '';
  await withPage('/', async (page) => {
    assert.doesNotMatch(await page.evaluate(() => location.hash), /design=/, 'no design part while the panel holds its defaults');
    await page.selectOption('[data-design-field="material"]', 'yvo4');
    await enterValue(page, '[data-design-field="wavelength_nm"]', '1064');
    await enterValue(page, '[data-design-field="separation_mm"]', '0.8');
    await page.waitForFunction(() => location.hash.includes('&design='), null, { timeout: 15000 });
    await enterValue(page, THICK, '7');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 7, 'an edit of the set-up');
    await page.waitForFunction(() => /&design=/.test(location.hash) && /thickness_mm%22%3A7/.test(location.hash), null, { timeout: 15000 });
    link = await page.evaluate(() => location.hash);
  });
  const design = JSON.parse(decodeURIComponent(link.split('&design=')[1]));
  assert.deepEqual([design.material, design.wavelength_nm, design.separation_mm], ['yvo4', 1064, 0.8], `the link's design part: ${JSON.stringify(design)}`);

  await withPage(`/${link}`, async (page) => {
    assert.equal((await pageScenario(page)).elements[0].thickness_mm, 7, 'the link restores the set-up');
    assert.equal(await page.inputValue('[data-design-field="material"]'), 'yvo4', 'and the design material');
    assert.equal(await page.inputValue('[data-design-field="wavelength_nm"]'), '1064', 'and the design wavelength');
    assert.equal(await page.inputValue('[data-design-field="separation_mm"]'), '0.8', 'and the separation');
    assert.equal((await page.evaluate(() => document.getElementById('setup-origin').dataset.origin)), 'link');
  });

  const bad = { kind: 'displacer', material: 'unobtainium', wavelength_nm: 'abc', separation_mm: 2.5, colour: 'red' };
  await withPage(`/${link.split('&design=')[0]}&design=${encodeURIComponent(JSON.stringify(bad))}`, async (page) => {
    const attr = 'data-design-error-for';
    assert.match(await waitError(page, 'material', attr), /^Material of the part: “unobtainium” is not one of its choices/);
    assert.match(await waitError(page, 'wavelength_nm', attr), /^Wavelength of the part: the link gives no number here/);
    assert.match(await waitError(page, '', attr), /Colour: the design panel has no such field/);
    assert.equal(await page.inputValue('[data-design-field="separation_mm"]'), '2.5', 'the good fields of the link are kept');
    assert.equal((await pageScenario(page)).elements[0].thickness_mm, 7, 'the set-up of the link loads');
  });
});
