// End-to-end tests of the page's exports (issue 5, part 3): each view as SVG and PNG, the plots'
// data as CSV and JSON, the results as JSON and CSV, the scenario as JSON, and the print sheet
// (print media, and a one-page PDF written to target/e2e/sheet.pdf), and the order sheet of a
// solved design (a page of its own, A4 and Letter PDFs in target/e2e/order-*.pdf).
//
// Run: `cd tests/e2e && npm ci && node --test` (or tests/e2e/run.sh, which builds first).

import { test } from 'node:test';
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import { ARTIFACTS, useBrowser, withPage as openAt, solveDesign, exported, parseCsv } from './support.mjs';

const VIEWS = ['side', 'end', 'poincare', 'walkoff-tilt', 'separation-wavelength', 'retardance-wavelength'];
const PLOTS = ['walkoff-tilt', 'separation-wavelength', 'retardance-wavelength'];
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

const env = useBrowser({ cli: false });

/** Opens the page (demo set-up), runs `body(page)`, then checks it as every test page (support.mjs). */
const withPage = (body, options = {}) => openAt(env, '/', ({ page }) => body(page), { acceptDownloads: true, ...options });

test('every view exports as SVG that parses, with the side view tracing the e-ray', async () => {
  await withPage(async (page) => {
    for (const view of VIEWS) {
      const { name, body } = await exported(page, `${view}:svg`);
      assert.equal(name, `doublespar-${view}.svg`);
      const text = body.toString('utf8');
      assert.ok(text.startsWith('<svg'), `${view}: the file starts with <svg`);
      const info = await page.evaluate((src) => {
        const doc = new DOMParser().parseFromString(src, 'image/svg+xml');
        const root = doc.documentElement;
        const ray = doc.querySelector('polyline[data-tag="ray e"]');
        return {
          error: doc.querySelector('parsererror')?.textContent ?? null,
          root: root.localName,
          width: Number(root.getAttribute('width')),
          height: Number(root.getAttribute('height')),
          tags: doc.querySelectorAll('[data-tag]').length,
          rayE: ray ? ray.getAttribute('points') : null,
        };
      }, text);
      assert.equal(info.error, null, `${view}: the SVG parses`);
      assert.equal(info.root, 'svg');
      assert.ok(info.tags > 0, `${view}: the SVG has data-tag elements`);
      const box = await page.locator(`canvas[data-view="${view}"]`).boundingBox();
      assert.ok(Math.abs(info.width - box.width) <= 1 && Math.abs(info.height - box.height) <= 1,
        `${view}: the SVG is the canvas's CSS size (${info.width}×${info.height} against ${box.width}×${box.height})`);
      if (view === 'side') {
        assert.ok(info.rayE, 'the side view has polyline[data-tag="ray e"]');
        const first = info.rayE.trim().split(/\s+/)[0].split(',').map(Number);
        assert.equal(first.length, 2, 'the e-ray has a first point');
        assert.ok(first.every(Number.isFinite), `the e-ray's first point is finite: ${first}`);
      }
    }
  });
});

test('every view exports as PNG', async () => {
  await withPage(async (page) => {
    for (const view of VIEWS) {
      const { name, body } = await exported(page, `${view}:png`);
      assert.equal(name, `doublespar-${view}.png`);
      assert.ok(body.length > PNG_SIGNATURE.length && body.subarray(0, 8).equals(PNG_SIGNATURE), `${view}: PNG signature`);
    }
  });
});

test('the plots export their data as CSV and JSON; the other views have no data buttons', async () => {
  await withPage(async (page) => {
    for (const view of ['side', 'end', 'poincare']) {
      assert.equal(await page.locator(`button[data-export="${view}:csv"], button[data-export="${view}:json"]`).count(), 0);
    }
    for (const view of PLOTS) {
      const series = await page.evaluate((v) => window.doublespar.session.series(v), view);
      assert.ok(series && series.points.length > 1, `${view}: session.series gives points`);

      const json = await exported(page, `${view}:json`);
      assert.equal(json.name, `doublespar-${view}.json`);
      assert.deepEqual(JSON.parse(json.body.toString('utf8')), series, `${view}: the JSON is session.series`);

      const csv = await exported(page, `${view}:csv`);
      assert.equal(csv.name, `doublespar-${view}.csv`);
      const rows = parseCsv(csv.body.toString('utf8'));
      const unit = (label, u) => (u ? `${label} (${u})` : label);
      assert.deepEqual(rows[0], [unit(series.x_label, series.x_unit), unit(series.y_label, series.y_unit), 'point'], `${view}: header`);
      const data = rows.slice(1);
      assert.equal(data.length, series.points.length + (series.current ? 1 : 0), `${view}: one row per sample and the current point`);
      data.slice(0, series.points.length).forEach((r, i) => {
        assert.equal(r[2], 'sample');
        assert.equal(Number(r[0]), series.points[i][0]);
        assert.equal(Number(r[1]), series.points[i][1]);
      });
      if (series.current) {
        const last = data[data.length - 1];
        assert.deepEqual([Number(last[0]), Number(last[1]), last[2]], [...series.current, 'current'], `${view}: the current point row`);
      }
    }
  });
});

test('the results export as JSON and CSV, and the scenario as JSON', async () => {
  await withPage(async (page) => {
    const { result, scenario } = await page.evaluate(() => ({
      // As JSON writes it (-0 becomes 0).
      result: JSON.parse(JSON.stringify(window.doublespar.session.result())),
      scenario: JSON.parse(window.doublespar.session.scenarioJson()),
    }));

    const json = await exported(page, 'results:json');
    assert.equal(json.name, 'doublespar-results.json');
    const doc = JSON.parse(json.body.toString('utf8'));
    assert.deepEqual(doc.result, result, 'the results JSON holds session.result()');
    assert.deepEqual(doc.scenario, scenario, 'the results JSON holds the scenario');

    const sc = await exported(page, 'scenario:json');
    assert.equal(sc.name, 'doublespar-scenario.json');
    assert.deepEqual(JSON.parse(sc.body.toString('utf8')), scenario);

    const csv = await exported(page, 'results:csv');
    assert.equal(csv.name, 'doublespar-results.csv');
    const rows = parseCsv(csv.body.toString('utf8'));
    assert.deepEqual(rows[0], ['label', 'power', 'exit_x_mm', 'exit_y_mm', 'S0', 'S1', 'S2', 'S3',
      'ellipse_azimuth_deg', 'ellipticity_deg', 'handedness']);
    const blank = rows.findIndex((r) => r.length === 1 && r[0] === '');
    assert.ok(blank > 0, 'a blank line between the ray and the crystal sections');
    const rays = rows.slice(1, blank);
    assert.equal(rays.length, result.rays.length, 'one row per ray');
    rays.forEach((r, k) => {
      const ray = result.rays[k];
      assert.equal(r[0], ray.label);
      assert.equal(Number(r[1]), ray.power);
      assert.equal(Number(r[2]), ray.exit_position_mm[0]);
      assert.equal(Number(r[3]), ray.exit_position_mm[1]);
      assert.deepEqual(r.slice(4, 8).map(Number), ray.stokes);
      assert.equal(Number(r[8]), ray.ellipse.azimuth_deg);
      assert.equal(Number(r[9]), ray.ellipse.ellipticity_deg);
      assert.equal(r[10], ray.ellipse.handedness);
    });
    assert.deepEqual(rows[blank + 1], ['element', 'material', 'no', 'ne', 'separation_mm', 'retardance_rad']);
    const crystals = result.elements.map((e, i) => [e, i]).filter(([e]) => e.kind === 'crystal');
    const elRows = rows.slice(blank + 2);
    assert.equal(elRows.length, crystals.length, 'one row per crystal');
    elRows.forEach((r, k) => {
      const [e, i] = crystals[k];
      assert.deepEqual([Number(r[0]), r[1], Number(r[2]), Number(r[3]), Number(r[4]), Number(r[5])],
        [i + 1, e.material, e.no, e.ne, e.separation_mm, e.retardance_rad]);
    });
  });
});

test('the print sheet hides the controls, shows the set-up, results and views, and fits one page', async () => {
  await withPage(async (page) => {
    await page.emulateMedia({ media: 'print' });
    const seen = await page.evaluate(() => {
      const shown = (el) => !!el && el.getClientRects().length > 0 && getComputedStyle(el).visibility !== 'hidden';
      return {
        controls: shown(document.getElementById('controls')),
        design: shown(document.getElementById('design')),
        buttons: [...document.querySelectorAll('button')].filter(shown).map((b) => b.textContent),
        inputs: [...document.querySelectorAll('input, select')].filter(shown).length,
        results: shown(document.getElementById('results')),
        rays: shown(document.getElementById('ray-table')),
        sheet: shown(document.getElementById('print-sheet')),
        sheetText: document.getElementById('print-sheet').textContent,
        safety: shown(document.getElementById('safety')),
        canvases: [...document.querySelectorAll('figure:not(.view-split):not(.view-temperature):not(.view-spectrum):not(.view-lc):not(.view-conoscope) canvas[data-view]')].map((c) => {
          const r = c.getBoundingClientRect();
          return shown(c) && r.width > 20 && r.height > 20;
        }),
      };
    });
    assert.equal(seen.controls, false, 'the set-up controls are hidden');
    assert.equal(seen.design, false, 'the design panel is hidden');
    assert.deepEqual(seen.buttons, [], 'no button is shown');
    assert.equal(seen.inputs, 0, 'no input or select is shown');
    assert.ok(seen.results, '#results is shown');
    assert.ok(seen.rays, 'the ray table is shown');
    assert.ok(seen.sheet, 'the set-up summary is shown');
    assert.match(seen.sheetText, /632\.8/, 'the summary gives the wavelength');
    assert.match(seen.sheetText, /calcite/, 'the summary lists the crystal');
    assert.ok(seen.safety, 'the laser-safety caution is shown');
    assert.deepEqual(seen.canvases, VIEWS.map(() => true), 'every view but the split, temperature, spectrum and voltage plots (on screen only) is shown');

    // Back to no emulation (an emulated 'screen' would make page.pdf print the screen styles).
    await page.emulateMedia({ media: null });
    const onScreen = await page.evaluate(() => document.getElementById('print-sheet').getClientRects().length);
    assert.equal(onScreen, 0, 'the set-up summary is not shown on screen');

    for (const format of ['A4', 'Letter']) {
      const pdf = await page.pdf({ format, printBackground: true });
      if (format === 'A4') fs.writeFileSync(path.join(ARTIFACTS, 'sheet.pdf'), pdf);
      const text = pdf.toString('latin1');
      assert.ok(text.startsWith('%PDF-'), 'a PDF');
      const pages = (text.match(/\/Type\s*\/Page(?![s\w])/g) ?? []).length;
      assert.equal(pages, 1, `the design sheet is one ${format} page, not ${pages}`);
    }
  });
});

/** Pages of a PDF that Chromium wrote (its page objects). */
const pdfPages = (pdf) => (pdf.toString('latin1').match(/\/Type\s*\/Page(?![s\w])/g) ?? []).length;

test('printing a solved design adds a one-page order sheet with everything a shop needs (A4 and Letter)', { timeout: 120000 }, async () => {
  await withPage(async (page) => {
    await page.emulateMedia({ media: 'print' });
    assert.equal(await page.evaluate(() => document.getElementById('order-sheet').getClientRects().length), 0,
      'no order sheet before a design is solved');
    await page.emulateMedia({ media: null });
    await page.fill('[data-design-field="samples"]', '0');
    await page.fill('[data-design-field="band_nm[0]"]', '550');
    await page.fill('[data-design-field="band_nm[1]"]', '750');
    await solveDesign(page);
    const shown = await page.evaluate(() => window.doublespar.designShown().design);

    await page.emulateMedia({ media: 'print' });
    const sheet = await page.evaluate(() => {
      const el = document.getElementById('order-sheet');
      const rows = Object.fromEntries([...el.querySelectorAll('[data-order]')].map((r) => [r.dataset.order, r.querySelector('dd').textContent]));
      return { shown: el.getClientRects().length > 0, rows, text: el.textContent, breakBefore: getComputedStyle(el).breakBefore };
    });
    assert.ok(sheet.shown, 'the order sheet is printed');
    assert.equal(sheet.breakBefore, 'page', 'on a page of its own');
    const r = sheet.rows;
    assert.deepEqual(Object.keys(r), ['Part', 'Material', 'Data source', 'Dimensions', 'Cut', 'Clear aperture', 'Wavelength band', 'Performance']);
    assert.equal(r.Part, 'Beam displacer');
    assert.match(r.Material, /^calcite \(CaCO3\), negative uniaxial; data valid \d+–\d+ nm$/);
    assert.ok(r['Data source'].length > 30 && /\d{4}/.test(r['Data source']), `a citation with its year: ${r['Data source']}`);
    const len = Number(shown.length_mm.toPrecision(4));
    assert.ok(r.Dimensions.startsWith(`length ${len} mm ± 0.05 mm`), `length with its tolerance: ${r.Dimensions}`);
    assert.match(r.Cut, new RegExp(`^optic axis at ${Number(shown.cut_tilt_deg.toPrecision(4))}° ± 0\\.1° to the face normal`));
    assert.match(r['Clear aperture'], new RegExp(`^at least ${Number(shown.clear_aperture_mm.toPrecision(4))} mm`));
    assert.equal(r['Wavelength band'], '550 nm to 750 nm');
    assert.match(sheet.text, /Design guidance; defers to local laser-safety regulations and licensed practice\./);

    await page.emulateMedia({ media: null });
    for (const format of ['A4', 'Letter']) {
      const pdf = await page.pdf({ format, printBackground: true });
      fs.writeFileSync(path.join(ARTIFACTS, `order-${format}.pdf`), pdf);
      // The set-up's sheet is one page (the test above); the order sheet starts a page and
      // does not break inside, so two pages in all means the order sheet is one page.
      assert.equal(pdfPages(pdf), 2, `the design sheet and the order sheet, one ${format} page each`);
    }

    // A waveplate's thickness tolerance is the change that moves its retardance by the
    // acceptance error: Γ = Δn·L/λ in waves (common practice), so δL = δΓ·λ/|Δn|.
    await page.selectOption('[data-design-field="kind"]', 'waveplate');
    await solveDesign(page);
    const wp = await page.evaluate(() => window.doublespar.designShown().design);
    const tol = (0.01 * wp.wavelength_nm * 1e-6) / Math.abs(wp.birefringence);
    const rows = await page.evaluate(() => Object.fromEntries([...document.querySelectorAll('#order-sheet [data-order]')]
      .map((r) => [r.dataset.order, r.querySelector('dd').textContent])));
    assert.equal(rows.Part, 'Waveplate');
    assert.equal(rows.Dimensions, `plate 1: ${Number(wp.plates[0].thickness_mm.toPrecision(4))} mm thick; ± ${Number(tol.toPrecision(2))} mm (moves the retardance by 0.01 waves)`);
    assert.match(rows.Cut, /^optic axis in the face \(90° to the face normal\)/);

    // The prism kinds' sheets have the most rows (design-prisms.test.mjs checks their values):
    // each still fits its page.
    for (const kind of ['angular-splitter', 'prism-polarizer', 'tilt-tuning']) {
      await page.selectOption('[data-design-field="kind"]', kind);
      await solveDesign(page);
      for (const format of ['A4', 'Letter']) {
        assert.equal(pdfPages(await page.pdf({ format, printBackground: true })), 2, `${kind}: the design sheet and the order sheet, one ${format} page each`);
      }
    }
  });
});
