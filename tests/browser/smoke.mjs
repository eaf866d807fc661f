// Browser smoke test of the built page (dist/), in Debian's headless
// chromium driven by playwright-core. It starts its own static server on
// 127.0.0.1 (a child process whose PID it holds) and stops it at the end.
//
// Checks: the demo renders all four charts (non-blank canvases, sized for
// devicePixelRatio) with no console errors and no request off this machine;
// each chart's Save as SVG and Save as PNG download a well-formed SVG and a
// PNG at twice the chart's size; an input change recomputes; bad values are
// flagged next to their field and the page computes again once they are
// fixed; an inconclusive design; a new
// design starts with empty limits; resizing redraws; a panic does not kill
// the page (on dist-selftest/, the build with the test-only export that
// panics; dist/ must not have it). Saves screenshots under tests/artifacts/
// and reports timings.
//
// Usage: node tests/browser/smoke.mjs   (after scripts/build-page and
// scripts/build-selftest)

import { mkdirSync, readdirSync, readFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { root, dist, distSelftest, artifacts, startServer, stopServer, launch, text, type, check, run, checkChartSaves } from './lib.mjs';

mkdirSync(artifacts, { recursive: true });


// Fraction of a canvas's pixels that are not white, and a checksum.
async function canvasInfo(page, id) {
  return page.evaluate((id) => {
    const c = document.getElementById(id);
    if (!c) return null;
    const ctx = c.getContext('2d');
    const { data } = ctx.getImageData(0, 0, c.width, c.height);
    let ink = 0;
    let sum = 0;
    for (let i = 0; i < data.length; i += 4) {
      if (data[i] < 235 || data[i + 1] < 235 || data[i + 2] < 235) ink += 1;
      sum = (sum * 31 + data[i] + 7 * data[i + 1] + 13 * data[i + 2]) % 1000000007;
    }
    return { width: c.width, height: c.height, cssWidth: c.clientWidth, dpr: window.devicePixelRatio, ink: ink / (data.length / 4), sum };
  }, id);
}

// A full-page screenshot. The caution bar sticks to the bottom of the
// window, which a full-page capture would freeze in mid-page over the form,
// so it is laid out in place for the capture only.
// (Through the element's style: the page's policy refuses added style sheets.)
async function fullPage(page, name) {
  await page.evaluate(() => { document.querySelector('.caution').style.position = 'static'; });
  await page.screenshot({ path: join(artifacts, name), fullPage: true });
  await page.evaluate(() => { document.querySelector('.caution').style.position = ''; });
}

// Screenshots of the sampling and by-n charts under a name.
async function shoot(page, name) {
  for (const id of ['chart-sampling', 'chart-by-n']) {
    await page.evaluate((id) => document.getElementById(id).scrollIntoView({ block: 'center' }), id);
    await page.locator(`#${id}`).screenshot({ path: join(artifacts, `${name}-${id}.png`) });
  }
}

const CHARTS = ['chart-sampling', 'chart-by-n', 'chart-tradeoff', 'chart-total'];

async function main() {
  if (!existsSync(join(dist, 'index.html'))) throw new Error('dist/index.html is missing: run scripts/build-page first');
  if (!existsSync(join(distSelftest, 'index.html'))) throw new Error('dist-selftest/index.html is missing: run scripts/build-selftest first');
  // The module ships as base64 in a script (scripts/finish-page.mjs).
  // The two WebAssembly modules, as base64 scripts: the main one (the
  // target applies to it) and the spreadsheet reader, loaded beside it.
  const moduleOf = (re) => {
    const file = readdirSync(dist).find((f) => re.test(f));
    return { file, bytes: Buffer.from(readFileSync(join(dist, file), 'utf8').match(/"([A-Za-z0-9+/=]+)"/)[1], 'base64') };
  };
  const { file: wasmFile, bytes: wasm } = moduleOf(/^tern-[0-9a-f]+_wasm\.js$/);
  const { file: sheetsFile, bytes: sheetsWasm } = moduleOf(/^sheets-[0-9a-f]+_module\.js$/);
  const { child, url } = await startServer();
  console.log(`server pid ${child.pid} at ${url}`);
  const browser = await launch();
  try {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 2 });
    const page = await context.newPage();
    const errors = [];
    const offsite = [];
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    page.on('pageerror', (e) => errors.push(String(e)));
    page.on('request', (r) => { if (!r.url().startsWith(url) && !r.url().startsWith('data:')) offsite.push(r.url()); });

    await page.goto(url);
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 20000 });
    const readyMs = await page.evaluate(() => Number(document.getElementById('app').dataset.readyMs));

    // The demo.
    check('demo: sample size shown', /n = 54 in each group/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    // A chart's numbers table is written when its <details> is opened, and
    // follows the design while it stays open.
    await page.locator('#table-by-n').evaluate((t) => { t.parentElement.open = true; });
    await page.waitForFunction(() => document.querySelectorAll('#table-by-n tr').length > 10, null, { timeout: 5000 });
    const rowsBefore = await page.locator('#table-by-n').innerText();
    check('numbers table: filled when opened', /54/.test(rowsBefore), rowsBefore.slice(0, 80));
    await type(page, '#f-theta1', '-4');
    check('numbers table: follows the design while open', (await page.locator('#table-by-n').innerText()) !== rowsBefore);
    await type(page, '#f-theta1', '-3');
    await page.locator('#table-by-n').evaluate((t) => { t.parentElement.open = false; });
    check('demo: decision shown', (await text(page, '#decide-title')) === 'Reject H0', await text(page, '#decide-title'));
    check('demo: caution visible', await page.locator('.caution').isVisible());
    check('demo: limits filled', (await page.inputValue('#f-alpha_max')) === '0.10');
    for (const id of CHARTS) {
      const info = await canvasInfo(page, id);
      check(`demo: ${id} drawn`, info && info.ink > 0.02, JSON.stringify(info));
      check(`demo: ${id} sized for devicePixelRatio`, info && info.dpr === 2 && Math.abs(info.width - info.cssWidth * 2) <= 2, JSON.stringify(info));
      // Its numbers table, written when its <details> opens.
      const tableId = `#${id.replace('chart-', 'table-')}`;
      await page.locator(tableId).evaluate((t) => { t.parentElement.open = true; });
      await page.waitForFunction((sel) => document.querySelector(`${sel} table`) !== null, tableId, { timeout: 5000 }).catch(() => {});
      const table = await page.locator(`${tableId} table`).count();
      check(`demo: ${id} has its table`, table === 1);
      await page.locator(tableId).evaluate((t) => { t.parentElement.open = false; });
    }
    await page.screenshot({ path: join(artifacts, 'demo-first-screen.png') });
    await fullPage(page, 'demo.png');
    for (const id of CHARTS) {
      // Centre the chart first so that the sticky caution does not cover it.
      await page.evaluate((id) => document.getElementById(id).scrollIntoView({ block: 'center' }), id);
      await page.locator(`#${id}`).screenshot({ path: join(artifacts, `demo-${id}.png`) });
    }
    // Each chart's Save as SVG and Save as PNG download a file, with no request.
    const offsiteBefore = offsite.length;
    for (const id of CHARTS) await checkChartSaves(page, id.replace('chart-', ''));
    check('save: no request off this machine', offsite.length === offsiteBefore, offsite.join(', '));
    check('demo: no console errors', errors.length === 0, errors.join(' | '));

    // The exported engine contract answers like the command line.
    const design = JSON.parse(readFileSync(join(root, 'examples', 'clinic-recovery.json'), 'utf8'));
    const viaObject = await page.evaluate((d) => window.wasmBindings.tern_answer(d), design);
    check('export: tern_answer gives the sample size', viaObject.sample_size.youden.n1 === 54 && viaObject.decision.outcome === 'reject_h0', JSON.stringify(viaObject.sample_size.youden));
    const viaText = JSON.parse(await page.evaluate((d) => window.wasmBindings.tern_run(JSON.stringify(d)), design));
    check('export: tern_run agrees with tern_answer', viaText.at_n.alpha === viaObject.at_n.alpha && viaText.at_n.beta === viaObject.at_n.beta);
    const refused = await page.evaluate(() => { try { window.wasmBindings.tern_run('{"family":"mean_t","alpah_max":0.1}'); return ''; } catch (e) { return String(e); } });
    check('export: a typo is refused with a suggestion', /did you mean alpha_max/.test(refused), refused);

    // An input change recomputes.
    const byNBefore = (await canvasInfo(page, 'chart-by-n')).sum;
    await type(page, '#f-beta_max', '0.05');
    const headline = await text(page, '#size-headline');
    check('change: sample size recomputed', /n = \d+/.test(headline) && !/n = 54 /.test(headline), headline);
    check('change: chart redrawn', (await canvasInfo(page, 'chart-by-n')).sum !== byNBefore);

    // Timing: input change to all charts redrawn, over repeated edits.
    const times = [];
    for (let i = 0; i < 20; i += 1) {
      await type(page, '#f-sigma', String(5 + (i % 5) * 0.25));
      times.push(await page.evaluate(() => Number(document.getElementById('app').dataset.lastUpdateMs)));
    }
    await type(page, '#f-sigma', '6');
    await type(page, '#f-beta_max', '0.10');

    // The same for a z test, whose distributions are cheap: what the page
    // itself (reading, text, four charts) costs per update.
    await page.check('input[name="family"][value="mean_z"]');
    const zTimes = [];
    const zDraw = [];
    const perChart = {};
    for (let i = 0; i < 20; i += 1) {
      await type(page, '#f-sigma', String(5 + (i % 5) * 0.25));
      zTimes.push(await page.evaluate(() => Number(document.getElementById('app').dataset.lastUpdateMs)));
      zDraw.push(await page.evaluate(() => Number(document.getElementById('app').dataset.drawMs)));
      const each = await page.evaluate((ids) => ids.map((id) => Number(document.getElementById(id).dataset.drawMs)), CHARTS);
      each.forEach((ms, k) => { perChart[CHARTS[k]] = (perChart[CHARTS[k]] || 0) + ms / 20; });
    }
    await shoot(page, 'z');
    // Other shapes: two-sided, and the exact binomial (counts, saw-tooth).
    await page.check('input[name="alternative"][value="two_sided"]');
    await type(page, '#f-sigma', '6');
    await shoot(page, 'two-sided');
    check('two-sided: charts drawn', (await canvasInfo(page, 'chart-sampling')).ink > 0.02);
    await page.check('input[name="family"][value="proportion_exact"]');
    await page.check('input[name="alternative"][value="greater"]');
    await type(page, '#f-p0', '0.75');
    await type(page, '#f-p_alt', '90%');
    await type(page, '#f-data-successes', '52');
    await type(page, '#f-data-trials', '60');
    check('exact binomial: sample size shown', /n = \d+/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    check('exact binomial: decision shown', (await text(page, '#decide-title')) !== 'No decision yet', await text(page, '#decide-title'));
    for (const id of CHARTS) check(`exact binomial: ${id} drawn`, (await canvasInfo(page, id)).ink > 0.02);
    await shoot(page, 'binomial');
    await page.check('input[name="family"][value="two_means_pooled"]');
    await page.check('input[name="alternative"][value="less"]');
    await type(page, '#f-sigma', '6');
    check('family switch back: demo figures again', /n = 54 in each group/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));

    // A value that is not a number: flagged beside the field, the rest kept.
    await type(page, '#f-sigma', 'abc');
    check('bad value: message beside the field', /number/i.test(await text(page, '#m-sigma')), await text(page, '#m-sigma'));
    check('bad value: field marked invalid', (await page.getAttribute('#f-sigma', 'aria-invalid')) === 'true');
    check('bad value: typed text kept', (await page.inputValue('#f-sigma')) === 'abc');
    await page.evaluate(() => document.getElementById('w-sigma').scrollIntoView({ block: 'center' }));
    await page.screenshot({ path: join(artifacts, 'bad-value.png') });
    await type(page, '#f-sigma', '6');
    check('bad value fixed: page computes again', /n = 54 in each group/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    check('bad value fixed: message gone', (await text(page, '#m-sigma')) === '');

    // Out of range (the engine's rule), next to the field.
    await type(page, '#f-alpha_max', '0.7');
    check('out of range: message beside α limit', /0\.5/.test(await text(page, '#m-alpha_max')), await text(page, '#m-alpha_max'));
    await type(page, '#f-alpha_max', '0.10');

    // Bad summary data: flagged, and the design is still computed.
    await type(page, '#f-data-sd1', '-2');
    check('bad data: message beside the field', (await text(page, '#m-data-sd1')).length > 0, await text(page, '#m-data-sd1'));
    check('bad data: design still computed', /n = 54 in each group/.test(await text(page, '#size-headline')));
    await type(page, '#f-data-sd1', '6.3');
    check('bad data fixed: decision back', (await text(page, '#decide-title')) === 'Reject H0', await text(page, '#decide-title'));

    // An inconclusive design: too few people for these limits.
    await type(page, '#f-data-n1', '20');
    await type(page, '#f-data-n2', '20');
    check('inconclusive: outcome shown', (await text(page, '#decide-title')) === 'Inconclusive', await text(page, '#decide-title'));
    await page.locator('#step-decide').scrollIntoViewIfNeeded();
    await fullPage(page, 'inconclusive.png');

    // Resizing redraws the charts at the new width.
    await page.setViewportSize({ width: 760, height: 900 });
    await page.waitForTimeout(300);
    const narrow = await canvasInfo(page, 'chart-sampling');
    check('resize: canvas follows its box', Math.abs(narrow.width - narrow.cssWidth * 2) <= 2 && narrow.ink > 0.02, JSON.stringify(narrow));
    await fullPage(page, 'narrow.png');
    await page.setViewportSize({ width: 1280, height: 900 });

    // A new design: everything empty, the limits too, and the guide says what is missing.
    await page.click('#new-design');
    await page.waitForTimeout(200);
    check('new design: α limit empty', (await page.inputValue('#f-alpha_max')) === '');
    check('new design: β limit empty', (await page.inputValue('#f-beta_max')) === '');
    check('new design: says what is still needed', /Still needed/.test(await text(page, '#size-detail')), await text(page, '#size-detail'));
    check('new design: limit asks for a value', /Needed/.test(await text(page, '#m-alpha_max')), await text(page, '#m-alpha_max'));
    await fullPage(page, 'new-design.png');
    check('no console errors before the panic test', errors.length === 0, errors.join(' | '));

    check('no request left this machine', offsite.length === 0, offsite.join(' '));

    // A panic does not kill the page: on the test build, which has an
    // export that panics on purpose; the page users get has none.
    check('panic: the page users get has no test export', await page.evaluate(() => typeof window.wasmBindings.tern_selftest_panic === 'undefined'));
    const selftest = await startServer(distSelftest);
    try {
      const tpage = await context.newPage();
      await tpage.goto(selftest.url);
      await tpage.waitForSelector('#app[data-ready="true"]', { timeout: 20000 });
      await tpage.click('#load-demo');
      await tpage.waitForTimeout(200);
      check('panic: the test build has the test export', await tpage.evaluate(() => typeof window.wasmBindings.tern_selftest_panic === 'function'));
      await tpage.evaluate(() => { try { window.wasmBindings.tern_selftest_panic(); } catch (e) { /* expected */ } });
      check('panic: the page says so', await tpage.locator('#page-alert').isVisible());
      await type(tpage, '#f-beta_max', '0.05');
      check('panic: the page still computes', /n = \d+/.test(await text(tpage, '#size-headline')) && !(await tpage.locator('#page-alert').isVisible()));
    } finally {
      await stopServer(selftest.child);
    }

    console.log(`timing: first render of the demo ${readyMs.toFixed(0)} ms after navigation start`);
    const stats = (xs) => {
      const s = [...xs].sort((a, b) => a - b);
      const at = (p) => s[Math.min(s.length - 1, Math.floor(p * s.length))];
      return `median ${at(0.5).toFixed(1)} ms, p95 ${at(0.95).toFixed(1)} ms`;
    };
    console.log(`timing: input change to all charts redrawn, demo (pooled t), ${times.length} edits: ${stats(times)} (target p95 <= 16 ms)`);
    console.log(`timing: the same for a z test, ${zTimes.length} edits: ${stats(zTimes)}; of which drawing the four charts: ${stats(zDraw)}`);
    console.log(`timing: mean drawing time per chart (z test): ${Object.entries(perChart).map(([k, v]) => `${k} ${v.toFixed(1)} ms`).join(', ')}`);
    console.log(`size: main module ${wasmFile} ${wasm.length} bytes raw, ${gzipSync(wasm, { level: 9 }).length} bytes gzipped (target <= 500 KB gzipped)`);
    console.log(`size: spreadsheet reader ${sheetsFile} ${sheetsWasm.length} bytes raw, ${gzipSync(sheetsWasm, { level: 9 }).length} bytes gzipped (loaded during page load, after the main module)`);
  } finally {
    await browser.close();
    await stopServer(child);
  }
}

await run('smoke', main, () => console.log(`screenshots in ${artifacts}`));
