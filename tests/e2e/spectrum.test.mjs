// End-to-end tests of the spectrum on the page: the Spectrum control below the stack adds a
// wavelength range to the set-up, the transmission plot is drawn from the result's spectrum,
// every point, its output Stokes vector (drawn as a dashed S3/S0 curve) and the colour in white
// light equal the command line's trace of the same document,
// the colour shows as a swatch in the summary, the range is kept while the
// spectrum is off, and a bad point count is named beside its field with the entries kept.
//
// Run: `cd tests/e2e && node --test spectrum.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { useBrowser, withPage as openAt, waitScenario, enterValue, cliTrace, waitError, canvasStats, drawn } from './support.mjs';

const env = useBrowser({ cli: true });
const withPage = (address, body) => openAt(env, address, ({ page }) => body(page));

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
    // The output polarization: the page's Stokes vectors are the command line's, and the plot's
    // dashed second curve is their S3/S0 at every wavelength that leaves power, named in the
    // plot's text alternative.
    shown.stokes.forEach((s, i) => s.forEach((v, k) => {
      const c = cli.spectrum.stokes[i][k];
      assert.ok(Math.abs(v - c) <= 1e-12, `Stokes ${i}[${k}]: page ${v}, command line ${c}`);
    }));
    const want = cli.spectrum.wavelength_nm
      .map((l, i) => [l, cli.spectrum.stokes[i]])
      .filter(([, s]) => s && s[0] > 1e-12)
      .map(([l, s]) => [l, s[3] / s[0]]);
    const dashed = await page.evaluate(() => window.doublespar.session.scene('transmission-wavelength').items
      .filter((i) => i.tag === 'S3/S0 curve'));
    assert.ok(dashed.length > 0 && dashed.every((c) => c.type === 'polyline' && c.dash.length > 0), 'a dashed S3/S0 curve');
    const points = dashed.flatMap((c) => c.points);
    assert.equal(points.length, want.length);
    points.forEach(([x, y], i) => {
      assert.equal(x, want[i][0]);
      assert.ok(Math.abs(y - want[i][1]) <= 1e-12, `S3/S0 at ${x} nm: drawn ${y}, command line ${want[i][1]}`);
    });
    const label = await page.evaluate(() => document.querySelector('canvas[data-view="transmission-wavelength"]').getAttribute('aria-label'));
    assert.match(label, /Dashed: the output's circular part S3\/S0/, label);
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
