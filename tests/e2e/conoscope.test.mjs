// End-to-end tests of the conoscopic figure on the page: folded away until opened (it solves
// 16,384 directions), drawn with the first crystal's acceptance map when its disclosure is
// opened and described for a screen reader,
// and its map shade for shade the command line's `doublespar draw conoscope` of the same
// document (whose SVG embeds the map as a PNG, decoded here with node's zlib).
//
// Run: `cd tests/e2e && node --test conoscope.test.mjs` (after scripts/build-web.sh and
// `cargo build --release --bin doublespar`).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import zlib from 'node:zlib';
import { useBrowser, withPage as openAt, canvasStats, drawn, pageScenario, CLI } from './support.mjs';

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

test('the conoscopic figure is drawn when opened, described, and equals the command line\'s', { timeout: 120000 }, async () => {
  await withPage('/', async (page) => {
    const stats = async () => (await page.evaluate(canvasStats)).find((s) => s.view === 'conoscope');
    assert.equal(drawn(await stats()), false, 'folded away, it is not drawn');
    await page.click('#conoscope-open > summary');
    await page.waitForFunction(() => document.getElementById('conoscope-open').open);
    const shown = await stats();
    assert.ok(drawn(shown), `the figure is drawn: ${JSON.stringify(shown)}`);
    assert.match(shown.label, /^Conoscopic figure: .*30° cone/);
    const acceptance = (await page.evaluate(canvasStats)).find((s) => s.view === 'acceptance');
    assert.ok(drawn(acceptance), `the acceptance map is drawn: ${JSON.stringify(acceptance)}`);
    assert.match(acceptance.label, /^Acceptance of element 1 .*retardance/);

    const scene = await page.evaluate(() => window.doublespar.session.scene('conoscope'));
    const map = scene.items.find((i) => i.type === 'raster');
    assert.ok(map, 'the scene holds the map');
    const cli = cliShades(await pageScenario(page));
    assert.equal(cli.width, map.columns);
    assert.equal(cli.height, map.rows);
    assert.deepEqual(map.grey, cli.shades, 'every shade as the command line draws it');
    assert.ok(map.grey.some((g) => g === null) && map.grey.some((g) => g !== null));
  });
});
