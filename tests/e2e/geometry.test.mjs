// End-to-end tests of the stack editor's version-2 geometry (DEVELOPERS.md, "The page"; the
// contract's "Geometry of an element"): faces, aperture and mount of a crystal, the contact with
// the element before, and the screen distance.
// - Each preset with geometry loads, traces without an error, shows its numbers (deviation,
//   screen position, split angle, rejected rays) as the command line gives them, and keeps every
//   geometry field through an edit of a harmless field: the link and the page's document read
//   back the same faces, apertures, mounts, contacts, cement index and screen.
// - A set-up whose geometry fields are all at their defaults writes none of them (the page
//   writes version 2 throughout, as the core writes every document back).
// - Bad geometry (tests/bad/scenarios.json, its version-2 rows) applied to the page shows the
//   core's message beside the offending control, named as the page labels it, and every value
//   entered stays in the controls, so that fixing one field traces the rest.
//
// Run: `cd tests/e2e && npm ci && node --test geometry.test.mjs` (after scripts/build-web.sh and
// `cargo build --release`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ROOT, useBrowser, withPage as openAt, pageScenario, waitScenario, enterValue, waitError, cliTrace, close } from './support.mjs';

const env = useBrowser();
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

/** The presets whose documents use version 2's geometry (examples/). */
const GEOMETRY_PRESETS = ['crossed-calcite-splitter', 'straight-through-prism', 'air-gap-calcite-polarizer', 'quartz-wedge-splitter', 'tilt-tuned-quartz-plate'];
const GEOMETRY_KEYS = ['faces', 'aperture_mm', 'mount', 'contact', 'cement_index'];
const readExample = (key) => fs.readFileSync(path.join(ROOT, 'examples', `${key}.json`), 'utf8');

/** The geometry of a document: per element its geometry fields, and the screen. */
function geometryOf(doc) {
  // A direction in one key order (the core writes its keys sorted).
  const faceOf = (f) => (f ? { tilt_deg: f.tilt_deg ?? 0, azimuth_deg: f.azimuth_deg ?? 0 } : { tilt_deg: 0, azimuth_deg: 0 });
  return {
    screen_mm: doc.screen_mm ?? 0,
    elements: doc.elements.map((e) => {
      const g = {};
      for (const k of GEOMETRY_KEYS) {
        if (e[k] === undefined) continue;
        if (k === 'faces') g.faces = { front: faceOf(e.faces.front), back: faceOf(e.faces.back) };
        else if (k === 'mount') g.mount = faceOf(e.mount);
        else g[k] = e[k];
      }
      if (e.contact === 'cement' && g.cement_index === undefined) g.cement_index = 1.55;
      return g;
    }),
  };
}

/** The scenario in the page's link (its fragment), as a document. */
const linkScenario = (page) => page.evaluate(() => {
  const part = location.hash.slice('#scenario='.length).split('&')[0];
  return JSON.parse(decodeURIComponent(part));
});

/** The text of every shown field error, as one string ('' when none). */
const shownErrors = (page) => page.$$eval('[data-error-for]', (els) => els.filter((e) => !e.hidden && e.textContent).map((e) => e.textContent).join(' | '));

test('each geometry preset loads, traces, shows its numbers and keeps its geometry through an edit', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    for (const key of GEOMETRY_PRESETS) {
      const file = JSON.parse(readExample(key));
      const want = geometryOf(file);
      await page.selectOption('#preset', key);
      await page.click('#load-preset');
      await waitScenario(page, (s) => JSON.stringify(geometryOf(s)) === JSON.stringify(want), `the preset ${key} loads its geometry`);
      assert.equal(await shownErrors(page), '', `${key}: no field shows an error`);
      assert.equal(await page.isHidden('#stale-note'), true, `${key}: the views are up to date`);

      // The page's numbers are the command line's.
      const cli = cliTrace(JSON.stringify(await pageScenario(page)));
      const shown = Object.fromEntries(await page.$$eval('[data-quantity]', (els) => els.map((e) => [e.dataset.quantity, e.dataset.value])));
      for (const ray of cli.rays) {
        for (const [q, v] of [[`rays.${ray.label}.deviation_deg`, ray.deviation_deg], [`rays.${ray.label}.screen_position_mm.0`, ray.screen_position_mm[0]]]) {
          assert.ok(close(Number(shown[q]), v, 1e-9, 1e-12), `${key}: ${q} shows ${shown[q]}, the command line ${v}`);
        }
      }
      cli.elements.forEach((e, i) => {
        if (e.kind !== 'crystal') return;
        const q = `elements[${i}].split_angle_deg`;
        assert.ok(close(Number(shown[q]), e.split_angle_deg, 1e-9, 1e-12), `${key}: ${q} shows ${shown[q]}, the command line ${e.split_angle_deg}`);
      });
      const rejected = await page.$$eval('#rejected-rows tr', (rows) => rows.map((r) => r.textContent));
      if (cli.rejected.length === 0) {
        assert.match(rejected.join(''), /None/, `${key}: no rejected ray`);
      } else {
        assert.equal(rejected.length, cli.rejected.length, `${key}: one row per rejected ray`);
        for (const [k, x] of cli.rejected.entries()) {
          assert.ok(close(Number(shown[`rejected[${k}].power`]), x.power, 1e-9, 1e-15), `${key}: rejected[${k}].power`);
          assert.match(rejected[k], new RegExp(`Element ${x.element + 1}.*${x.face} face.*${x.reason}`), `${key}: rejected row ${k} in words`);
        }
        assert.match(await page.textContent('#rejected-note'), /not leave forward/);
      }

      // A harmless edit keeps every geometry field, in the page's document and in its link.
      const diameter = (file.beam?.diameter_mm ?? 1) + 0.25;
      await enterValue(page, 'input.num[data-field="beam.diameter_mm"]', String(diameter));
      const after = await waitScenario(page, (s) => s.beam.diameter_mm === diameter, `${key}: the beam diameter edit traces`);
      assert.deepEqual(geometryOf(after), want, `${key}: the page's document keeps its geometry`);
      const link = await linkScenario(page);
      assert.deepEqual(geometryOf(link), want, `${key}: the link keeps its geometry`);
    }
  });
});

test('a set-up with every geometry field at its default writes none of them; a wedge edited in is written', { timeout: 60000 }, async () => {
  await withPage('/', async (page) => {
    await enterValue(page, 'input.num[data-field="elements[0].thickness_mm"]', '11');
    await waitScenario(page, (s) => s.elements[0].thickness_mm === 11, 'the demo edited');
    const link = await linkScenario(page);
    assert.deepEqual(link, await pageScenario(page), 'the link holds the document as the core writes it back');
    for (const k of [...GEOMETRY_KEYS, 'screen_mm']) {
      assert.equal(JSON.stringify(link).includes(`"${k}"`), false, `the demo's link has no ${k}`);
    }

    // Tilting the back face asks for an aperture, beside the aperture's control.
    await page.click('#stack-list li:first-child details.geometry > summary');
    await enterValue(page, 'input.num[data-field="elements[0].faces.back.tilt_deg"]', '10');
    assert.match(await waitError(page, 'elements[0].aperture_mm'), /^Element 1 · Aperture: is required/);
    await enterValue(page, 'input.num[data-field="elements[0].aperture_mm"]', '8');
    const s = await waitScenario(page, (x) => x.elements[0].aperture_mm === 8, 'the wedge traces with an aperture');
    assert.deepEqual(s.elements[0].faces.back, { tilt_deg: 10, azimuth_deg: 0 });
    const wedge = await linkScenario(page);
    assert.deepEqual(wedge.elements[0].faces, { front: { tilt_deg: 0, azimuth_deg: 0 }, back: { tilt_deg: 10, azimuth_deg: 0 } });
    assert.match(await page.textContent('#stack-list li:first-child details.geometry > summary'), /aperture 8 mm/);

    // A crystal turned into a retarder keeps its geometry aside and gets it back.
    await page.selectOption('select[data-field="elements[0].kind"]', 'retarder');
    await enterValue(page, 'input.num[data-field="elements[0].retardance_waves"]', '0.5');
    await waitScenario(page, (x) => x.elements[0].kind === 'retarder', 'a retarder traces, its placement put aside');
    await page.selectOption('select[data-field="elements[0].kind"]', 'crystal');
    await waitScenario(page, (x) => x.elements[0].kind === 'crystal' && x.elements[0].aperture_mm === 8, 'the crystal has its wedge again');
  });
});

test('bad geometry shows the core\'s message beside its control, and every value entered stays', { timeout: 90000 }, async () => {
  const table = JSON.parse(fs.readFileSync(path.join(ROOT, 'tests', 'bad', 'scenarios.json'), 'utf8'));
  // The version-2 geometry cases (the table also holds version-2 cases of other fields, such
  // as a crystal's own dispersion formula, which tests/e2e/custom-dispersion.test.mjs covers).
  const geometry = /aperture_mm|faces|mount|contact|gap_mm|screen_mm/;
  const cases = table.filter((c) => /"version": 2/.test(c.doc) && geometry.test(c.field));
  assert.ok(cases.length >= 5, `${cases.length} version-2 cases`);
  const labels = {
    'elements[0].aperture_mm': 'Element 1 · Aperture',
    'elements[0].faces': 'Element 1 · Faces',
    'elements[0].mount': 'Element 1 · Mount',
    'elements[1].contact': 'Element 2 · Contact',
    'elements[1].gap_mm': 'Element 2 · Gap before',
    screen_mm: 'Screen distance',
  };
  await withPage('/', async (page) => {
    for (const c of cases) {
      const doc = JSON.parse(c.doc);
      const thrown = await page.evaluate((d) => {
        try {
          window.doublespar.applyScenario(d);
          return null;
        } catch (e) {
          return e;
        }
      }, doc);
      assert.equal(thrown?.field, c.field, `${c.name}: the core names ${c.field}`);
      const text = await waitError(page, c.field);
      assert.ok(labels[c.field], `a label is expected for ${c.field}`);
      assert.ok(text.startsWith(`${labels[c.field]}: `), `${c.name}: the message names the field as the page labels it: ${text}`);
      assert.equal(await page.$eval(`[data-error-for="${c.field}"]`, (el) => el.getAttribute('data-error-field')), c.field);

      // Every geometry value of the document is in its control.
      const leaves = [];
      doc.elements.forEach((e, i) => {
        for (const side of ['front', 'back']) {
          const face = e.faces?.[side];
          if (face?.tilt_deg !== undefined) leaves.push([`elements[${i}].faces.${side}.tilt_deg`, face.tilt_deg]);
        }
        if (e.aperture_mm !== undefined) leaves.push([`elements[${i}].aperture_mm`, e.aperture_mm]);
        if (e.mount?.tilt_deg !== undefined) leaves.push([`elements[${i}].mount.tilt_deg`, e.mount.tilt_deg]);
        if (e.contact !== undefined) leaves.push([`elements[${i}].contact`, e.contact]);
      });
      if (doc.screen_mm !== undefined) leaves.push(['screen_mm', doc.screen_mm]);
      for (const [p, v] of leaves) {
        const value = await page.$eval(`[data-field="${p}"]:not([type=range])`, (el) => el.value);
        assert.equal(value, String(v), `${c.name}: ${p} keeps ${v}`);
      }
    }

    // The last case fixed in its own control: the rest of what was entered traces.
    await enterValue(page, 'input.num[data-field="screen_mm"]', '50');
    const s = await waitScenario(page, (x) => x.screen_mm === 50, 'the screen fixed');
    assert.equal(s.elements[0].axis.azimuth_deg, 90);

    // The mount on a rotator is shown with the rotator, and clearing it traces.
    await page.evaluate((d) => { try { window.doublespar.applyScenario(d); } catch { /* shown beside its field */ } },
      JSON.parse(cases.find((c) => c.field === 'elements[0].mount').doc));
    assert.equal(await page.isVisible('input.num[data-field="elements[0].mount.tilt_deg"]'), true, 'the rotator shows its mount');
    await enterValue(page, 'input.num[data-field="elements[0].mount.tilt_deg"]', '0');
    await waitScenario(page, (x) => x.elements.length === 1 && x.elements[0].kind === 'rotator' && x.elements[0].angle_deg === 5, 'the rotator traces without its mount');
    assert.equal(await page.isVisible('input.num[data-field="elements[0].mount.tilt_deg"]'), false, 'an ideal element hides a mount at its default');
  });
});
