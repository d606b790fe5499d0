// The whole table of bad scenarios (tests/bad/scenarios.json, shared with tests/bad_input.rs),
// plus oversized documents, given to the page as a user would: each through the file-open
// control, and each whose link is short enough through a change of the address's fragment. For
// every case the page must show a visible message naming the field, and keep the last good state
// exactly: the scenario, the controls, the shown numbers, the views' pixels and the fragment.
//
// One page runs every case in turn; the good state is loaded again only after a case changed it
// (which is itself a failure).
//
// Run: `cd tests/e2e && npm ci && node --test bad-input.test.mjs` (or tests/e2e/run.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, useBrowser, withPage, canvasStats, cliTrace } from './support.mjs';

const env = useBrowser();

const TABLE = JSON.parse(fs.readFileSync(path.join(ROOT, 'tests', 'bad', 'scenarios.json'), 'utf8'));
const GOOD = fs.readFileSync(path.join(ROOT, 'examples', 'recombiner.json'), 'utf8');
/** As tests/bad_input.rs builds it: a valid scenario padded to 10 MiB by one long string. */
const padded = (bytes) => `{"elements": [{"kind": "rotator", "angle_deg": 1}], "pad": "${'x'.repeat(bytes)}"}`;
const CASES = [
  ...TABLE,
  // Over the page's 2 MiB limit for a file: refused before it is read.
  { name: 'a ten-megabyte document', doc: padded(10 << 20), field: '' },
  // Under the page's limit, over the core's 1 MiB.
  { name: 'a 1.5 MiB document', doc: padded(3 << 19), field: '' },
];
/** Links longer than this are not tried through the fragment (browsers cut long addresses). */
const MAX_LINK = 64 * 1024;

/** The page names the whole document when the core gives no field. */
const shownField = (c) => c.field || 'document';

/** What must not change on a bad input. */
const snapshot = async (page) => ({
  scenario: await page.evaluate(() => window.doublespar.session.scenarioJson()),
  hash: await page.evaluate(() => location.hash),
  controls: await page.$$eval('[data-field]', (els) => els.map((e) => `${e.dataset.field}=${e.value}`)),
  shown: await page.$$eval(
    '[data-quantity="elements[0].separation_mm"], [data-quantity="rays.ee.power"], [data-quantity="total_power"]',
    (els) => els.map((e) => `${e.dataset.quantity}=${e.textContent}`),
  ),
  views: (await page.evaluate(canvasStats)).map((s) => `${s.view}:${s.w}x${s.h}:${s.hash}`),
});

/** The text of a message element when it is shown (visible, not hidden), else ''. */
const shownText = (page, id) =>
  page.evaluate((i) => {
    const el = document.getElementById(i);
    return el && !el.hidden && el.getClientRects().length > 0 ? el.textContent : '';
  }, id);

/** Opens `doc` through the file-open control as the file `name`; waits for the load or its message. */
async function openFile(page, name, doc) {
  await page.setInputFiles('#scenario-file', { name, mimeType: 'application/json', buffer: Buffer.from(doc) });
}

/** Loads the good scenario through the visible button and the file chooser; returns its state. */
async function loadGood(page) {
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.click('#open-scenario')]);
  assert.equal(chooser.isMultiple(), false, 'one file at a time');
  await chooser.setFiles({ name: 'recombiner.json', mimeType: 'application/json', buffer: Buffer.from(GOOD) });
  await page.waitForFunction(
    (want) => {
      const sc = JSON.parse(window.doublespar.session.scenarioJson());
      return sc.wavelength_nm === want && location.hash.startsWith('#scenario=')
        && document.querySelector('[data-quantity="rays.ee.power"]') !== null;
    },
    JSON.parse(GOOD).wavelength_nm,
    { timeout: 10000 },
  );
  const state = await snapshot(page);
  assert.deepEqual(cliTrace(state.scenario), cliTrace(GOOD), 'the opened file is the scenario the page holds');
  assert.deepEqual(JSON.parse(decodeURIComponent(state.hash.slice('#scenario='.length))), JSON.parse(state.scenario),
    'the fragment holds the opened scenario');
  return state;
}

/**
 * Runs every case through `attempt(page, c, i)` (which returns the message shown) and checks
 * the message and the kept state; returns the failures as readable lines.
 */
async function runCases(page, log, cases, attempt) {
  let good = await loadGood(page);
  const failures = [];
  for (const [i, c] of cases.entries()) {
    const errorsBefore = log.consoleErrors.length + log.pageErrors.length + log.csp.length;
    let message = '';
    try {
      message = await attempt(page, c, i);
    } catch (e) {
      failures.push(`${c.name}: ${e.message.split('\n')[0]}`);
    }
    if (message && !message.includes(shownField(c))) {
      failures.push(`${c.name}: the message does not name ${shownField(c)}: ${message}`);
    }
    const now = await snapshot(page);
    const changed = Object.keys(good).filter((k) => JSON.stringify(now[k]) !== JSON.stringify(good[k]));
    if (changed.length) {
      failures.push(`${c.name}: changed ${changed.join(', ')}`);
      good = await loadGood(page);
    }
    const said = [...log.consoleErrors, ...log.pageErrors, ...log.csp].slice(errorsBefore);
    if (said.length) failures.push(`${c.name}: the page said ${said.join(' | ')}`);
  }
  return failures;
}

test('every bad scenario file shows a message naming its field and file, and keeps the set-up', { timeout: 300000 }, async () => {
  await withPage(env, '/', async ({ page, log }) => {
    assert.equal(await page.isVisible('#open-scenario'), true, 'the open button is visible');
    assert.equal(await page.getAttribute('#scenario-file', 'accept'), '.json,application/json');
    const failures = await runCases(page, log, CASES, async (p, c, i) => {
      const name = `bad-${i}.json`;
      await openFile(p, name, c.doc);
      const handle = await p
        .waitForFunction(
          (n) => {
            const el = document.getElementById('file-error');
            return !el.hidden && el.getClientRects().length > 0 && el.textContent.includes(n) ? el.textContent : false;
          },
          name,
          { timeout: 10000 },
        )
        .catch(() => { throw new Error(`no #file-error naming ${name}`); });
      const text = await handle.jsonValue();
      assert.equal(await p.getAttribute('#file-error', 'role'), 'alert');
      return text;
    });
    assert.deepEqual(failures, [], `${CASES.length} bad files`);

    // The next good load clears the message.
    await loadGood(page);
    assert.equal(await shownText(page, 'file-error'), '', 'a good file clears the message');
  });
});

test('every bad scenario in a changed fragment shows #fragment-error and keeps the set-up', { timeout: 300000 }, async () => {
  const short = CASES.filter((c) => encodeURIComponent(c.doc).length < MAX_LINK);
  assert.ok(short.length >= TABLE.length - 2, `${short.length} cases are short enough for a link`);
  await withPage(env, '/', async ({ page, log }) => {
    const failures = await runCases(page, log, short, async (p, c) => {
      // The page's hashchange listener is registered first and works synchronously: when this
      // one runs, the page has dealt with the new fragment.
      await p.evaluate(
        (hash) => new Promise((resolve) => {
          window.addEventListener('hashchange', () => resolve(), { once: true });
          location.hash = hash;
        }),
        `#scenario=${encodeURIComponent(c.doc)}`,
      );
      const text = await shownText(p, 'fragment-error');
      if (!text) throw new Error('#fragment-error is not shown');
      if (!/current set-up was kept/.test(text)) throw new Error(`#fragment-error does not say the set-up was kept: ${text}`);
      return text;
    });
    assert.deepEqual(failures, [], `${short.length} bad fragments`);

    // An edit that traces clears the message.
    await page.fill('input:not([type=range])[data-field="elements[0].thickness_mm"]', '7');
    await page.press('input:not([type=range])[data-field="elements[0].thickness_mm"]', 'Tab');
    await page.waitForFunction(() => document.getElementById('fragment-error').hidden, null, { timeout: 15000 })
      .catch(async () => assert.fail(`#fragment-error stays after a good edit: ${await shownText(page, 'fragment-error')}`));
  });
});
