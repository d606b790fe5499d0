// Helpers shared by the design panel's end-to-end tests of the design kinds (design-prisms,
// design-rotator): the golden requests and answers of tests/cli/design, filling the panel,
// comparing its numbers with the command line's, its plots, its field errors, "Use this part",
// and the order sheet.

import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, canvasStats, drawn, close, enterValue, mismatches, quantities, waitError, waitScenario } from './support.mjs';

export const GOLDEN = path.join(ROOT, 'tests', 'cli', 'design');
/** A golden request (tests/cli/design/NAME.json) and the command line's answer to it. */
export function golden(name) {
  const request = JSON.parse(fs.readFileSync(path.join(GOLDEN, `${name}.json`), 'utf8'));
  const answer = JSON.parse(fs.readFileSync(path.join(GOLDEN, 'golden', `${name}.json`), 'utf8'));
  assert.equal(answer.status, 0, `${name}: the command line solved it`);
  return { request, design: answer.stdout };
}

export const field = (p) => `[data-design-field="${p}"]`;

/** Fills the panel: the kind first, then each [path, value] (a select is chosen, a number typed). */
export async function fill(page, kind, entries) {
  await page.selectOption(field('kind'), kind);
  for (const [p, v] of entries) {
    const el = page.locator(field(p));
    assert.ok(await el.isVisible(), `${kind}: ${p} is shown`);
    if ((await el.evaluate((e) => e.tagName)) === 'SELECT') await el.selectOption(String(v));
    else await enterValue(page, field(p), v);
  }
}

/**
 * The design numbers on the page against the command line's design: every `required` path shown,
 * every shown one equal (1e-12 relative; support.mjs, mismatches).
 */
export async function expectDesign(page, design, required, what) {
  const shown = (await quantities(page)).filter(([p]) => p.startsWith('design.'));
  assert.deepEqual(mismatches(shown, { design }, required.map((p) => `design.${p}`)), [], `${what}: the page and the command line disagree`);
}

export async function expectPlots(page, names, what) {
  const stats = await page.evaluate(canvasStats, { selector: 'canvas[data-design-plot]' });
  assert.deepEqual(stats.map((s) => s.plot).sort(), [...names].sort(), `${what}: the plots shown`);
  for (const s of stats) {
    assert.ok(drawn(s), `${what}: ${s.plot} is drawn (${s.differing} of ${s.total} pixels off the background)`);
    assert.ok(s.label && s.label.length > 20, `${what}: ${s.plot} has a text alternative`);
  }
}

/** Solve with a bad value: the error shows beside `errorField` and every field keeps its text. */
export async function expectFieldError(page, [p, bad], errorField, what) {
  const before = await page.$$eval('[data-design-field]', (els) => els.map((e) => [e.dataset.designField, e.value]));
  await enterValue(page, field(p), bad);
  await page.click('#design-solve');
  const message = await waitError(page, errorField, 'data-design-error-for', 10000);
  assert.ok(message.length > 10, `${what}: a readable message (${message})`);
  assert.equal(await page.getAttribute(field(errorField), 'aria-invalid'), 'true', `${what}: the field is marked`);
  const after = await page.$$eval('[data-design-field]', (els) => els.map((e) => [e.dataset.designField, e.value]));
  assert.deepEqual(after, before.map(([q, v]) => [q, q === p ? String(bad) : v]), `${what}: every entry is kept`);
  assert.equal(await page.evaluate(() => document.getElementById('design').dataset.state), 'error');
  return message;
}

/** "Use this part", then waits for the set-up to hold the design's scenario. */
export async function useDesign(page, design, what) {
  await page.click('#design-use');
  return waitScenario(page, (s) => s.elements.length === design.scenario.elements.length
    && s.elements.every((e, i) => close(e.thickness_mm, design.scenario.elements[i].thickness_mm)), `${what}: the set-up holds the designed part`);
}

/** The order sheet's rows (#order-sheet, written for printing) as {term: text}. */
export const orderSheet = (page) =>
  page.evaluate(() => Object.fromEntries([...document.querySelectorAll('#order-sheet [data-order]')]
    .map((r) => [r.dataset.order, r.querySelector('dd').textContent])));

/** A golden number as the sheet writes it: `n` significant digits, no trailing zeros, "−". */
export const fig = (v, n = 4) => String(Number(v.toPrecision(n))).replace('-', '−');

/** Each of `parts` is in the sheet's row `term`. */
export function expectRow(sheet, term, parts, what) {
  assert.equal(typeof sheet[term], 'string', `${what}: the order sheet has a row "${term}" (rows: ${Object.keys(sheet).join(', ')})`);
  for (const p of parts) assert.ok(sheet[term].includes(p), `${what}: the order sheet's "${term}" says ${JSON.stringify(p)}: ${sheet[term]}`);
}
