// Numbers people can read on the page: a huge input is quoted compactly and its message never
// widens the page; circular light shows no azimuth; positions share one unit per table; narrow
// embedded figures stack their views and show each whole.
//
// Run: `cd tests/e2e && npm ci && node --test numbers.test.mjs` (or tests/e2e/run.sh).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage } from './support.mjs';

const env = useBrowser({ cli: false });

const link = (doc) => `/#scenario=${encodeURIComponent(JSON.stringify(doc))}`;

test('a huge or long input is quoted compactly and its message stays inside the page', { timeout: 120000 }, async () => {
  await withPage(env, '/', async ({ page }) => {
    await page.setViewportSize({ width: 420, height: 800 });
    const field = page.locator('input.num[data-field="elements[0].thickness_mm"]');
    await field.fill('1e308');
    await field.dispatchEvent('change');
    const slot = page.locator('[data-error-for="elements[0].thickness_mm"]');
    await slot.waitFor({ state: 'visible', timeout: 15000 });
    const text = await slot.textContent();
    assert.match(text, /1e308/, `the message quotes 1e308: ${text}`);
    assert.ok(text.length < 200, `the message is short: ${text.length} characters`);
    // A pasted 5000-character word in a field that takes text must not widen the page either.
    const wide = await page.evaluate(() => {
      const el = document.querySelector('[data-error-for="elements[0].thickness_mm"]');
      el.textContent = `unknown value '${'x'.repeat(5000)}'`;
      return { scroll: document.documentElement.scrollWidth, view: window.innerWidth, box: el.getBoundingClientRect().right };
    });
    assert.ok(wide.scroll <= wide.view + 1, `the page does not scroll sideways: ${JSON.stringify(wide)}`);
    assert.ok(wide.box <= wide.view + 1, `the message wraps inside the page: ${JSON.stringify(wide)}`);
  });
});

test('circular light shows no azimuth in the tables', { timeout: 120000 }, async () => {
  const doc = { beam: { polarization: { kind: 'circular', handedness: 'left' } }, elements: [{ kind: 'rotator', angle_deg: 10 }] };
  await withPage(env, link(doc), async ({ page }) => {
    const az = page.locator('[data-quantity="spots[0].ellipse.azimuth_deg"]');
    assert.equal((await az.textContent()).trim(), '—');
    assert.notEqual(await az.getAttribute('data-value'), '', 'data-value keeps the number');
    assert.equal((await page.locator('[data-quantity="spots[0].ellipse.ellipticity_deg"]').textContent()).trim(), '−45.00°');
  });
});

test('positions in a table share one unit', { timeout: 120000 }, async () => {
  // Two rays 2 µm apart, the other 0: the column says µm for both, never mm beside µm.
  const doc = { elements: [{ kind: 'crystal', material: 'calcite', thickness_mm: 0.02, axis: { tilt_deg: 45 } }] };
  await withPage(env, link(doc), async ({ page }) => {
    const texts = await page.$$eval('[data-quantity^="rays."][data-quantity*="exit_position_mm"]', (els) => els.map((e) => e.textContent));
    const units = new Set(texts.map((t) => t.split(' ').pop()));
    assert.deepEqual([...units], ['µm'], texts.join(', '));
    for (const t of texts) assert.ok(t.split(' ')[0].replace('−', '').length <= 8, t);
  });
});

test('a narrow embedded figure stacks its views and shows each whole', { timeout: 120000 }, async () => {
  await withPage(env, '/embed-example.html', async ({ page }) => {
    await page.setViewportSize({ width: 300, height: 900 });
    await page.waitForFunction(() => document.querySelector('spar-figure')?.hasAttribute('data-stacked'), null, { timeout: 15000 });
    // The first trace done and its views made (on a loaded machine this comes after the resize),
    // then two frames for the stacked layout to settle before it is measured.
    await page.evaluate(() => document.querySelector('spar-figure').ready);
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r))));
    const boxes = await page.evaluate(() => {
      const fig = document.querySelector('spar-figure');
      const host = fig.getBoundingClientRect();
      return [...fig.shadowRoot.querySelectorAll('canvas')].map((c) => {
        const r = c.getBoundingClientRect();
        return { top: r.top, bottom: r.bottom, left: r.left, right: r.right, host: { top: host.top, bottom: host.bottom } };
      });
    });
    assert.ok(boxes.length >= 2, 'two views');
    assert.ok(boxes[1].top >= boxes[0].bottom - 1, `stacked: ${JSON.stringify(boxes)}`);
    for (const b of boxes) assert.ok(b.bottom <= b.host.bottom + 1 && b.bottom - b.top >= 100, `whole: ${JSON.stringify(b)}`);
  }, { ready: false });
});
