// End-to-end tests of the conoscopic figure on the page: folded away until opened, then computed
// at 256 × 256 directions in the page's worker (design-worker.js) and drawn with the first
// crystal's acceptance map, described for a screen reader; the worker's map drawn by the page
// equals, shade for shade, the command line's `doublespar draw conoscope` of the same document
// at its 128 × 128 (whose SVG embeds the map as a PNG, decoded here with node's zlib); a newer
// edit wins over an answer under way, the figure says it is computing, a set-up the figure
// cannot be solved for names its element, a KTP plate's figure comes at 256 × 256 too and a
// liquid-crystal cell's at the core's 192 × 192; an embedded <spar-figure> computes its own in a worker; the white-light switch
// draws a c-cut plate's interference colours (black centre between crossed polarizers, coloured
// isochromes), computed in the worker at 256 × 256, with the sampling noted, and an active
// quartz plate's at the core's 128 × 128 for a general crystal.
//
// Run: `cd tests/e2e && node --test conoscope.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import zlib from 'node:zlib';
import fs from 'node:fs';
import path from 'node:path';
import { useBrowser, withPage as openAt, canvasStats, drawn, pageScenario, CLI, ROOT } from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

/** The shades of the PNG the command line embeds in its SVG: null where transparent. */
function cliShades(scenario) {
  const r = spawnSync(CLI, ['draw', 'conoscope', '-'], { input: JSON.stringify(scenario), encoding: 'utf8' });
  assert.equal(r.status, 0, r.stderr);
  const b64 = /href="data:image\/png;base64,([^"]+)"/.exec(r.stdout)[1];
  const png = Buffer.from(b64, 'base64');
  let at = 8;
  let width = 0;
  let height = 0;
  const idat = [];
  while (at < png.length) {
    const len = png.readUInt32BE(at);
    const kind = png.toString('latin1', at + 4, at + 8);
    const data = png.subarray(at + 8, at + 8 + len);
    if (kind === 'IHDR') [width, height] = [data.readUInt32BE(0), data.readUInt32BE(4)];
    if (kind === 'IDAT') idat.push(data);
    at += 12 + len;
  }
  const raw = zlib.inflateSync(Buffer.concat(idat));
  const shades = [];
  for (let y = 0; y < height; y += 1) {
    const row = y * (1 + 2 * width);
    assert.equal(raw[row], 0, 'filter type 0');
    for (let x = 0; x < width; x += 1) {
      const [g, a] = [raw[row + 1 + 2 * x], raw[row + 2 + 2 * x]];
      shades.push(a === 0 ? null : g);
    }
  }
  return { width, height, shades };
}

/** Waits until the page's convergent-light maps are computed and drawn. */
async function settled(page, timeout = 60000) {
  await page.waitForFunction(() => {
    const c = window.doublespar.convergent();
    const fig = document.getElementById('conoscope-open').closest('figure');
    return !c.busy && fig.getAttribute('aria-busy') === 'false' && c.ms.conoscope !== undefined && c.ms.acceptance !== undefined;
  }, null, { timeout });
}

/**
 * Asks a worker of the test's own (the page's script, design-worker.js) for the map of `view` of
 * the session's scenario at `pixels`, hands it to the session and returns the scene's raster.
 */
async function ownMap(page, view, pixels) {
  return page.evaluate(async ([view, pixels]) => {
    const w = new Worker('design-worker.js', { type: 'module' });
    const text = window.doublespar.session.scenarioJson();
    const answer = await new Promise((resolve) => {
      w.onmessage = (ev) => { if (ev.data.type === 'convergent') resolve(ev.data); };
      w.postMessage({ type: 'convergent', id: 1, scenario: text, pixels, views: [view] });
    });
    w.terminate();
    if (answer.error) return { error: answer.error };
    const m = answer.map;
    window.doublespar.session.setConvergent(view, m.pixels, m.values, m.min, m.max, '', '');
    return window.doublespar.session.scene(view).items.find((i) => i.type === 'raster');
  }, [view, pixels]);
}

test('the conoscopic figure is computed in the worker when opened, described, and equals the command line\'s', { timeout: 180000 }, async () => {
  await withPage('/', async (page) => {
    const stats = async () => (await page.evaluate(canvasStats)).find((s) => s.view === 'conoscope');
    assert.equal(drawn(await stats()), false, 'folded away, it is not drawn');
    assert.deepEqual((await page.evaluate(() => window.doublespar.convergent())).ms, {}, 'nor computed');
    await page.click('#conoscope-open > summary');
    await page.waitForFunction(() => document.getElementById('conoscope-open').open);
    await settled(page);
    const shown = await stats();
    assert.ok(drawn(shown), `the figure is drawn: ${JSON.stringify(shown)}`);
    assert.match(shown.label, /^Conoscopic figure: .*30° cone of incidence directions, 256 × 256/);
    const acceptance = (await page.evaluate(canvasStats)).find((s) => s.view === 'acceptance');
    assert.ok(drawn(acceptance), `the acceptance map is drawn: ${JSON.stringify(acceptance)}`);
    assert.match(acceptance.label, /^Acceptance of element 1 .*retardance/);
    assert.match(await page.textContent('#convergent-status'), /256 × 256 directions computed in \d+ ms/);

    const scene = await page.evaluate(() => window.doublespar.session.scene('conoscope'));
    const map = scene.items.find((i) => i.type === 'raster');
    assert.ok(map, 'the scene holds the map');
    assert.deepEqual([map.columns, map.rows], [256, 256]);
    assert.ok(map.grey.some((g) => g === null) && map.grey.some((g) => g !== null));
    // Shade for shade the command line's figure, computed by the worker at its size.
    const cli = cliShades(await pageScenario(page));
    const own = await ownMap(page, 'conoscope', cli.width);
    assert.equal(cli.height, own.rows);
    assert.deepEqual(own.grey, cli.shades, 'every shade as the command line draws it');
    // The SVG export holds the map.
    const svg = await page.evaluate(() => window.doublespar.session.svg('conoscope', 400, 420, false));
    assert.match(svg, /<image data-tag="map"/);
  });
});

test('a newer edit wins over an answer under way, the figure says it is computing, and errors name their element', { timeout: 180000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('#conoscope-open > summary');
    await settled(page);
    const base = await pageScenario(page);
    const plate = (mm) => ({ ...base, elements: base.elements.map((e, i) => (i === 0 ? { ...e, thickness_mm: mm } : e)) });
    // Two edits in a row: the first is under way when the second comes.
    const during = await page.evaluate(([a, b]) => {
      window.doublespar.applyScenario(a);
      const fig = document.getElementById('conoscope-open').closest('figure');
      const state = { busy: fig.getAttribute('aria-busy'), status: document.getElementById('convergent-status').textContent };
      window.doublespar.applyScenario(b);
      return state;
    }, [plate(0.5), plate(3)]);
    assert.equal(during.busy, 'true');
    assert.match(during.status, /^Computing up to 256 × 256 directions/);
    await settled(page);
    assert.equal((await pageScenario(page)).elements[0].thickness_mm, 3);
    const drawnMap = (await page.evaluate(() => window.doublespar.session.scene('conoscope'))).items.find((i) => i.type === 'raster');
    const fresh = await ownMap(page, 'conoscope', 256);
    assert.deepEqual(drawnMap.grey, fresh.grey, 'the map drawn is the last edit\'s');

    // A biaxial crystal is solved at every direction from its two forward waves, at the page's
    // 256 × 256 (the core's cap for a general crystal), and the figure's note says so. The
    // quartz plate's map above is 256 × 256 too, so the wait is for a map other than it.
    const shadeSum = (raster) => raster.grey.reduce((a, g) => a + (g ?? -1), 0);
    const quartzSum = shadeSum(drawnMap);
    await page.evaluate(() => window.doublespar.applyScenario({
      version: 2, beam: { polarization: { kind: 'linear', azimuth_deg: 45 } },
      elements: [{ kind: 'crystal', material: 'ktp', thickness_mm: 1, axes: { tilt_deg: 0, azimuth_deg: 0, roll_deg: 0 } },
        { kind: 'polarizer', gap_mm: 1, transmission_axis_deg: -45 }],
    }));
    await page.waitForFunction((before) => {
      const r = window.doublespar.session.scene('conoscope').items.find((i) => i.type === 'raster');
      return r !== undefined && r.columns === 256 && r.grey.reduce((a, g) => a + (g ?? -1), 0) !== before;
    }, quartzSum, { timeout: 60000, polling: 200 });
    await settled(page);
    const ktpScene = await page.evaluate(() => window.doublespar.session.scene('conoscope'));
    assert.ok(ktpScene.items.some((i) => i.type === 'text' && i.text.includes('256 × 256 directions')), 'the note says how many');
    const ktpStatus = await page.textContent('#convergent-status');
    console.log(`KTP plate's figure: ${ktpStatus}`);
    assert.match(ktpStatus, /^256 × 256 directions computed in \d+ ms\.$/, 'no remark of fewer directions');

    // A crystal with faces at an angle is not solved in convergent light: the figure names it.
    await page.evaluate(() => window.doublespar.applyScenario({
      version: 2, elements: [{ kind: 'crystal', material: 'quartz', thickness_mm: 5, axis: { tilt_deg: 90, azimuth_deg: 0 }, faces: { back: { tilt_deg: 10 } }, aperture_mm: 10 }],
    }));
    await settled(page);
    const texts = (await page.evaluate(() => window.doublespar.session.scene('conoscope'))).items.filter((i) => i.type === 'text').map((i) => i.text);
    assert.ok(texts.some((t) => t.includes('not drawn') && t.includes('elements[0]')), JSON.stringify(texts));

    // A liquid-crystal cell is solved at every direction, at the core's cap of 192 × 192, and the
    // status and the figure's note say so.
    await page.evaluate(() => window.doublespar.applyScenario({
      version: 2, wavelength_nm: 550, beam: { polarization: { kind: 'linear', azimuth_deg: 0 } },
      elements: [{ kind: 'lc_cell', thickness_um: 2.52, lc: '5cb', twist_deg: 90, pretilt_deg: 2 },
        { kind: 'polarizer', gap_mm: 1, transmission_axis_deg: 90 }],
    }));
    await page.waitForFunction(() => window.doublespar.session.scene('conoscope').items.some((i) => i.type === 'raster' && i.columns === 192), null, { timeout: 60000, polling: 200 });
    await settled(page);
    const cellScene = await page.evaluate(() => window.doublespar.session.scene('conoscope'));
    const cellMap = cellScene.items.find((i) => i.type === 'raster');
    assert.deepEqual([cellMap?.columns, cellMap?.rows], [192, 192], 'the cell\'s map at the cap');
    assert.ok(cellScene.items.some((i) => i.type === 'text' && i.text.includes('192 × 192 directions')), 'the note says how many');
    assert.match(await page.textContent('#convergent-status'), /^192 × 192 directions computed in \d+ ms \(fewer for a liquid-crystal cell, which is solved again at every direction\)/);
  });
});

test('white light: the switch draws the interference colours computed in the worker, with the sampling noted', { timeout: 240000 }, async () => {
  await withPage('/', async (page) => {
    await page.click('#conoscope-open > summary');
    await settled(page);
    await page.evaluate(() => window.doublespar.applyScenario({
      version: 2, wavelength_nm: 589.3, beam: { polarization: { kind: 'linear', azimuth_deg: 0 } },
      elements: [{ kind: 'crystal', material: 'quartz', optical_activity: false, thickness_mm: 2, axis: { tilt_deg: 0, azimuth_deg: 0 } },
        { kind: 'polarizer', transmission_axis_deg: 90 }],
    }));
    await settled(page);
    assert.equal(await page.evaluate(() => document.getElementById('conoscope-white-box').hidden), true, 'off at first');
    await page.click('#conoscope-white');
    await page.waitForFunction(() => {
      const c = window.doublespar.convergent();
      return c.ms.white !== undefined && !c.busy;
    }, null, { timeout: 180000, polling: 250 });
    const shown = await page.evaluate(() => {
      const c = document.getElementById('conoscope-white-canvas');
      const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
      const at = (x, y) => Array.from(d.slice(4 * (y * c.width + x), 4 * (y * c.width + x) + 4));
      let chroma = 0;
      for (let i = 0; i < d.length; i += 4) {
        if (d[i + 3] === 255) chroma = Math.max(chroma, Math.max(d[i], d[i + 1], d[i + 2]) - Math.min(d[i], d[i + 1], d[i + 2]));
      }
      // The middle column lies inside the cone in every row: a part of the rows that no worker
      // drew would leave it transparent there.
      const blankRows = [];
      for (let y = 0; y < c.height; y += 1) if (at(c.width / 2, y)[3] !== 255) blankRows.push(y);
      return {
        side: [c.width, c.height],
        blankRows,
        hidden: document.getElementById('conoscope-white-box').hidden,
        centre: at(c.width / 2, c.height / 2),
        corner: at(0, 0),
        chroma,
        note: document.getElementById('conoscope-white-note').textContent,
        ms: window.doublespar.convergent().ms.white,
      };
    });
    console.log(`white-light figure, 256 × 256, in the workers (with the two 256 × 256 maps): ${Math.round(shown.ms)} ms`);
    assert.deepEqual(shown.side, [256, 256]);
    assert.deepEqual(shown.blankRows, [], 'every part of the rows is drawn');
    assert.equal(shown.hidden, false);
    assert.deepEqual(shown.corner, [0, 0, 0, 0], 'transparent outside the cone');
    // Along the axis there is no retardance: black between crossed polarizers (common practice).
    assert.ok(shown.centre[3] === 255 && shown.centre.slice(0, 3).every((v) => v <= 3), `centre ${shown.centre}`);
    assert.ok(shown.chroma > 100, `the isochromes are coloured: ${shown.chroma}`);
    assert.match(shown.note, /D65 white light \(CIE 1931 2° observer\): 81 wavelengths, 380–780 nm in air at 5 nm; 256 × 256 directions/);

    // The same plate with its optical activity is a general crystal: its white-light figure
    // comes at the core's cap of 128 × 128, and its centre, where the plate turns the plane of
    // polarization by about 43° in yellow light, is not black.
    await page.evaluate(() => window.doublespar.applyScenario({
      version: 2, wavelength_nm: 589.3, beam: { polarization: { kind: 'linear', azimuth_deg: 0 } },
      elements: [{ kind: 'crystal', material: 'quartz', thickness_mm: 2, axis: { tilt_deg: 0, azimuth_deg: 0 } },
        { kind: 'polarizer', transmission_axis_deg: 90 }],
    }));
    await page.waitForFunction(() => !window.doublespar.convergent().busy
      && document.getElementById('conoscope-white-note').textContent.includes('128 × 128 directions'), null, { timeout: 180000, polling: 250 });
    const active = await page.evaluate(() => {
      const c = document.getElementById('conoscope-white-canvas');
      const d = c.getContext('2d').getImageData(c.width / 2, c.height / 2, 1, 1).data;
      return { side: [c.width, c.height], centre: Array.from(d), ms: window.doublespar.convergent().ms.white };
    });
    console.log(`white-light figure of an active quartz plate, 128 × 128, in the workers (with the two 256 × 256 maps): ${Math.round(active.ms)} ms`);
    assert.deepEqual(active.side, [128, 128]);
    assert.ok(active.centre[3] === 255 && Math.max(...active.centre.slice(0, 3)) > 60, `centre ${active.centre}`);
  });
});

test('an embedded figure (<spar-figure>) computes its conoscopic view in a worker of its own', { timeout: 180000 }, async () => {
  const doc = JSON.parse(fs.readFileSync(path.join(ROOT, 'scripts', 'bench', 'conoscope.json'), 'utf8'));
  await openAt(env, '/embed-example.html', async ({ page }) => {
    await page.evaluate(async (doc) => {
      const el = document.createElement('spar-figure');
      el.id = 'fig-conoscope';
      el.setAttribute('views', 'conoscope');
      el.setAttribute('scenario', JSON.stringify(doc));
      el.style.cssText = 'display: block; width: 400px; height: 420px';
      document.body.append(el);
      await el.ready;
    }, doc);
    await page.waitForFunction(() => document.getElementById('fig-conoscope').session.scene('conoscope').items.some((i) => i.type === 'raster'), null, { timeout: 60000, polling: 250 });
    const embedded = await page.evaluate(() => document.getElementById('fig-conoscope').session.scene('conoscope').items.find((i) => i.type === 'raster'));
    assert.deepEqual([embedded.columns, embedded.rows], [256, 256]);
    // The worker's values for the same text, shaded as the view's note says (black 0, white 1,
    // 64 shades): the embedded picture is that map.
    const values = await page.evaluate(async () => {
      const w = new Worker('design-worker.js', { type: 'module' });
      const text = document.getElementById('fig-conoscope').session.scenarioJson();
      const answer = await new Promise((resolve) => {
        w.onmessage = (ev) => { if (ev.data.type === 'convergent') resolve(ev.data); };
        w.postMessage({ type: 'convergent', id: 1, scenario: text, pixels: 256, views: ['conoscope'] });
      });
      w.terminate();
      return Array.from(answer.map.values);
    });
    const shades = values.map((v) => (Number.isNaN(v) ? null : Math.round(Math.round(Math.min(1, Math.max(0, v)) * 63) * 255 / 63)));
    assert.deepEqual(embedded.grey, shades, 'the embedded figure is the worker\'s map');
    const stats = (await page.evaluate(canvasStats, { host: '#fig-conoscope' })).find((s) => s.view === 'conoscope');
    assert.ok(drawn(stats), `the embedded figure is drawn: ${JSON.stringify(stats)}`);
  }, { ready: false });
});
