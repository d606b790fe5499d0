// End-to-end tests of the spectrum on the page: the Spectrum control below the stack adds a
// wavelength range to the set-up, the transmission plot is drawn from the result's spectrum,
// every point, its output Stokes vector (drawn as a dashed S3/S0 curve on its own right-hand
// axis from −1 to 1) and the colour in white light equal the command line's trace of the same
// document, the plot's CSV and JSON downloads carry the transmission and S3/S0 as the command
// line gives them,
// the colour shows as a swatch in the summary, the range is kept while the
// spectrum is off, and a bad point count is named beside its field with the entries kept.
//
// Run: `cd tests/e2e && node --test spectrum.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, waitScenario, enterValue, cliTrace, waitError, canvasStats, drawn, exported, parseCsv } from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page), { acceptDownloads: true });

const SPECTRUM = 'select[data-field="spectrum"]';
const POINTS = 'input.num[data-field="spectrum.points"]';

test('a spectrum turned on is traced as the command line traces it and drawn', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    assert.equal(await page.isVisible(POINTS), false, 'the range is hidden while the spectrum is off');
    await page.selectOption(SPECTRUM, 'on');
    await enterValue(page, POINTS, '81');
    const sc = await waitScenario(page, (s) => s.spectrum?.points === 81, 'a spectrum of 81 points');
    assert.deepEqual(sc.spectrum, { from_nm: 400, to_nm: 800, points: 81 });
    const cli = cliTrace(sc);
    const shown = await page.evaluate(() => window.doublespar.session.result().spectrum);
    assert.equal(shown.wavelength_nm.length, 81);
    assert.deepEqual(shown.wavelength_nm, cli.spectrum.wavelength_nm);
    shown.transmission.forEach((t, i) => {
      const c = cli.spectrum.transmission[i];
      assert.ok(Math.abs(t - c) <= 1e-12 * Math.max(1, Math.abs(c)), `point ${i}: page ${t}, command line ${c}`);
    });
    // The colour in white light: the command line's, in the summary with its swatch.
    const white = cli.spectrum.white_light;
    assert.equal(shown.white_light.srgb, white.srgb);
    shown.white_light.xyz.forEach((v, i) => assert.ok(Math.abs(v - white.xyz[i]) <= 1e-12, `xyz[${i}]: page ${v}, command line ${white.xyz[i]}`));
    await page.waitForFunction((c) => document.querySelector('[data-quantity="spectrum.white_light.srgb"]')?.textContent.startsWith(c), white.srgb);
    const swatch = await page.evaluate(() => getComputedStyle(document.getElementById('white-light-swatch')).backgroundColor);
    const [r, g, b] = [1, 3, 5].map((i) => parseInt(white.srgb.slice(i, i + 2), 16));
    assert.equal(swatch, `rgb(${r}, ${g}, ${b})`);
    await page.waitForFunction(() => /Transmission of the whole set-up from 400 to 800 nm, 81 points/
      .test(document.querySelector('canvas[data-view="transmission-wavelength"]').getAttribute('aria-label')));
    const stats = (await page.evaluate(canvasStats)).find((s) => s.view === 'transmission-wavelength');
    assert.ok(drawn(stats), `the plot is drawn: ${JSON.stringify(stats)}`);
    // The output polarization: the page's Stokes vectors are the command line's (the demo's
    // two spots add as powers to unpolarized light; the next test has a circular part).
    shown.stokes.forEach((s, i) => s.forEach((v, k) => {
      const c = cli.spectrum.stokes[i][k];
      assert.ok(Math.abs(v - c) <= 1e-12, `Stokes ${i}[${k}]: page ${v}, command line ${c}`);
    }));
    // Off: the document has no spectrum; on again: the range entered is still there.
    await page.selectOption(SPECTRUM, 'off');
    await waitScenario(page, (s) => s.spectrum === undefined, 'spectrum off');
    await page.selectOption(SPECTRUM, 'on');
    await waitScenario(page, (s) => s.spectrum?.points === 81, 'the range is kept');
    await page.click('#undo');
    await waitScenario(page, (s) => s.spectrum === undefined, 'Undo turns it off again');
  });
});

test('a bad point count is named beside its field and nothing entered is lost', { timeout: 90000 }, async () => {
  await withPage('/', async (page) => {
    await page.selectOption(SPECTRUM, 'on');
    await enterValue(page, 'input.num[data-field="spectrum.from_nm"]', '500');
    await waitScenario(page, (s) => s.spectrum?.from_nm === 500, 'from 500 nm');
    await enterValue(page, POINTS, '1');
    const msg = await waitError(page, 'spectrum.points');
    assert.match(msg, /2/, msg);
    assert.equal(await page.inputValue(POINTS), '1', 'the bad count stays for correction');
    assert.equal(await page.inputValue('input.num[data-field="spectrum.from_nm"]'), '500', 'the start is kept');
  });
});

// A quartz plate at 45° between the input's linear polarization and no analyser: the output
// turns from linear through both circular handednesses across the range.
const QUARTZ = {
  version: 2, wavelength_nm: 600, beam: { polarization: { kind: 'linear', azimuth_deg: 0 } },
  elements: [{ kind: 'crystal', material: 'quartz', optical_activity: false, thickness_mm: 0.5, axis: { tilt_deg: 90, azimuth_deg: 45 } }],
  spectrum: { from_nm: 400, to_nm: 800, points: 81 },
};

test('S3/S0 is drawn on its own axis and downloaded beside the transmission as the command line gives it', { timeout: 120000 }, async () => {
  await withPage(`/#scenario=${encodeURIComponent(JSON.stringify(QUARTZ))}`, async (page) => {
    const sc = await waitScenario(page, (s) => s.spectrum?.points === 81 && s.elements[0]?.material === 'quartz', 'the quartz plate with its spectrum');
    const cli = cliTrace(sc);
    const want = cli.spectrum.wavelength_nm
      .map((l, i) => [l, cli.spectrum.stokes[i]])
      .filter(([, s]) => s && s[0] > 1e-12)
      .map(([l, s]) => [l, s[3] / s[0]]);
    assert.equal(want.length, 81);
    assert.ok(want.some(([, v]) => v > 0.9) && want.some(([, v]) => v < -0.9), 'both handednesses in the range');
    // The dashed curve stands on its own right-hand axis: −1 at the frame's bottom, +1 at its
    // top, with five ticks and its name; read back through the frame, it is the command line's
    // S3/S0.
    const scene = await page.evaluate(() => window.doublespar.session.scene('transmission-wavelength'));
    const dashed = scene.items.filter((i) => i.tag === 'S3/S0 curve');
    assert.ok(dashed.length > 0 && dashed.every((c) => c.type === 'polyline' && c.dash.length > 0), 'a dashed S3/S0 curve');
    const frameYs = scene.items.find((i) => i.tag === 'frame').points.map((p) => p[1]);
    const [y0, y1] = [Math.min(...frameYs), Math.max(...frameYs)];
    assert.equal(scene.items.filter((i) => i.tag === 'right tick').length, 5, 'ticks at −1, −0.5, 0, 0.5 and 1');
    assert.ok(scene.items.some((i) => i.type === 'text' && i.text === 'S3/S0'), 'the right axis is named');
    const points = dashed.flatMap((c) => c.points);
    assert.equal(points.length, want.length);
    points.forEach(([x, y], i) => {
      assert.equal(x, want[i][0]);
      const back = -1 + 2 * (y - y0) / (y1 - y0);
      assert.ok(Math.abs(back - want[i][1]) <= 1e-12, `S3/S0 at ${x} nm: drawn ${back}, command line ${want[i][1]}`);
    });
    const label = await page.evaluate(() => document.querySelector('canvas[data-view="transmission-wavelength"]').getAttribute('aria-label'));
    assert.match(label, /Dashed, on the right-hand axis from −1 to 1: the output's circular part S3\/S0/, label);
    // The plot's data as downloaded: CSV with an S3/S0 column, JSON with S3/S0 as `second`,
    // every value the command line's to 1e-12.
    const s3At = new Map(want);
    const csv = parseCsv((await exported(page, 'transmission-wavelength:csv')).body.toString('utf8'));
    assert.deepEqual(csv[0], ['wavelength (nm)', 'transmission (of the input power)', 'point', 'S3/S0']);
    const samples = csv.slice(1).filter((r) => r[2] === 'sample');
    assert.equal(samples.length, 81);
    samples.forEach((r, i) => {
      const [l, t, , s3] = r;
      assert.equal(Number(l), cli.spectrum.wavelength_nm[i]);
      assert.ok(Math.abs(Number(t) - cli.spectrum.transmission[i]) <= 1e-12, `CSV transmission at ${l} nm: ${t}, command line ${cli.spectrum.transmission[i]}`);
      assert.ok(Math.abs(Number(s3) - s3At.get(Number(l))) <= 1e-12, `CSV S3/S0 at ${l} nm: ${s3}, command line ${s3At.get(Number(l))}`);
    });
    const json = JSON.parse((await exported(page, 'transmission-wavelength:json')).body.toString('utf8'));
    assert.equal(json.second.label, 'S3/S0');
    assert.deepEqual(json.second.axis, [-1, 1]);
    assert.equal(json.second.points.length, want.length);
    json.second.points.forEach(([l, v], i) => {
      assert.equal(l, want[i][0]);
      assert.ok(Math.abs(v - want[i][1]) <= 1e-12, `JSON S3/S0 at ${l} nm: ${v}, command line ${want[i][1]}`);
    });
    json.points.forEach(([l, t], i) => {
      assert.equal(l, cli.spectrum.wavelength_nm[i]);
      assert.ok(Math.abs(t - cli.spectrum.transmission[i]) <= 1e-12, `JSON transmission at ${l} nm`);
    });
  });
});
