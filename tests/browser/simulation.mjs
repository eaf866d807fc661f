// The simulation check on the page, in Debian's headless chromium: the
// served edition (dist/) and the one-file edition from file://.
//
// Checks: the panel offers the shapes of the design's kind of data; a
// refused value is named at its field; a run in the page's Web Workers
// gives exactly the numbers `tern simulate` gives for the request the
// page saves (same seed: counts, shares, sample of statistics, every
// figure); progress comes while it runs; a field typed into during a run
// answers at once (the delay from each keydown to its handler is measured
// and printed); the design changed after a run marks the result as stale;
// Cancel stops a long run with its partial figures; "Save the result as
// JSON" downloads the request and the result; the one-file edition runs
// the check from its inline worker source with its policy in force and
// makes no request but the file itself (and the worker's own Blob URL).
//
// Usage: node tests/browser/simulation.mjs   (after scripts/build-page,
// scripts/build-single and `cargo build --release --bin tern`;
// scripts/test-page does all three)

import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { root, artifacts, startServer, stopServer, launch, check, ink, run } from './lib.mjs';

const tern = join(root, 'target', 'release', 'tern');
const single = join(root, 'dist-single', 'tern.html');

const state = (page) => page.evaluate(() => document.getElementById('simulation').dataset.state);
const waitEnd = (page, timeout = 60000) =>
  page.waitForFunction(() => ['done', 'stopped'].includes(document.getElementById('simulation').dataset.state), null, { timeout });
const last = async (page) => JSON.parse(await page.evaluate(() => window.wasmBindings.tern_last_simulation()));

/** `tern simulate` on a request object: its `simulation` result. */
function cli(request) {
  const dir = mkdtempSync(join(tmpdir(), 'tern-sim-'));
  try {
    const file = join(dir, 'check.json');
    writeFileSync(file, JSON.stringify(request));
    return JSON.parse(execFileSync(tern, ['simulate', file], { encoding: 'utf8' })).simulation;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * Where the page's result and the command line's differ: every figure
 * drawn or counted must be the same to the last bit; the analytic α*, β*
 * come from each target's own ln and exp, so they may differ in the last
 * digits (1e-12 relative allowed there).
 */
function differences(a, b, path = '') {
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    return [...new Set([...Object.keys(a), ...Object.keys(b)])].flatMap((k) => differences(a[k], b[k], `${path}.${k}`));
  }
  if (JSON.stringify(a) === JSON.stringify(b)) return [];
  if (path.startsWith('.analytic.') && typeof a === 'number' && typeof b === 'number' && Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b))) return [];
  return [`${path}: page ${JSON.stringify(a)}, command line ${JSON.stringify(b)}`];
}

/** Record, in the page, each change of the progress bar's value (ms). */
const watchProgress = (page) =>
  page.evaluate(() => {
    const bar = document.getElementById('sim-progress');
    const seen = [{ t: performance.now(), v: bar.value }];
    window.simProgress = seen;
    const tick = () => {
      if (bar.value !== seen[seen.length - 1].v) seen.push({ t: performance.now(), v: bar.value });
      if (!['done', 'stopped'].includes(document.getElementById('simulation').dataset.state)) requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  });

async function served(browser) {
  const { child, url } = await startServer();
  try {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
    const errors = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    await page.goto(url);
    await page.waitForFunction(() => document.getElementById('app').dataset.ready === 'true');

    // The demo compares means: the shapes of measurements, not of yes/no outcomes.
    const visible = async (id) => page.locator(`#sim-shape-w-${id}`).isVisible();
    check('shapes of measurements offered', (await visible('gamma')) && (await visible('resample')) && !(await visible('bernoulli')));
    check('the panel names the size it runs at', /n1 = 54, n2 = 54/.test(await page.locator('#sim-size').innerText()), await page.locator('#sim-size').innerText());

    // Refusals at their fields.
    await page.click('#sim-shape-w-gamma');
    check('the gamma shape asks for a skewness', await page.locator('#sim-w-skewness').isVisible());
    await page.fill('#sim-skewness', '0');
    await page.click('#sim-run');
    const skewMsg = await page.locator('#sim-m-skewness').innerText();
    check('a skewness of 0 is refused at its field', /skewness is 0, but must be a number above 0/.test(skewMsg), skewMsg);
    await page.fill('#sim-skewness', '1.5');
    await page.fill('#sim-replicates', '10,000');
    await page.click('#sim-run');
    const repMsg = await page.locator('#sim-m-replicates').innerText();
    check('"10,000" is refused, not guessed', /not a number/.test(repMsg), repMsg);
    check('nothing ran after a refusal', (await state(page)) === 'idle');

    // A run, against the command line.
    await page.fill('#sim-replicates', '20000');
    await page.fill('#sim-seed', '2026');
    await page.click('#sim-run');
    await waitEnd(page);
    const first = await last(page);
    check('the run ends done', (await state(page)) === 'done');
    check('the request carries the shape, replicates and seed', first.request.simulation.shape === 'gamma' && first.request.simulation.seed === 2026 && first.request.n === 54, JSON.stringify(first.request.simulation));
    const diff = differences(first.simulation, cli(first.request));
    check('same seed: the page gives exactly what tern simulate gives', diff.length === 0, diff.slice(0, 5).join('; '));
    const readings = await page.locator('#sim-readings').innerText();
    check('the sentences name the shape and the limits', /right-skewed data \(gamma, skewness 1\.5\)/.test(readings) && /your limit 0\.1/.test(readings), readings.slice(0, 200));
    const tableText = await page.evaluate(() => document.getElementById('sim-table').textContent);
    check('the table shows both rules', /threshold of least total error/.test(tableText) && /conventional, p ≤ 0\.1/.test(tableText), tableText.slice(0, 200));

    // The chart is drawn.
    const drawn = await ink(page, 'chart-check');
    check('the realised error rates are drawn', drawn > 0.02, String(drawn));
    check('the chart has an accessible name with the rates', /threshold of least total error, α, false alarms under H0: 0\.1/.test(await page.getAttribute('#chart-check', 'aria-label')), await page.getAttribute('#chart-check', 'aria-label'));

    // The finished check goes into the report, as tern report draws it.
    await page.click('#report-prepare');
    await page.waitForSelector('#report-view:not([hidden])');
    const reportText = await page.locator('#report-body').innerText();
    check('the report holds the check', /Check by simulation/.test(reportText) && /right-skewed data \(gamma, skewness 1\.5\)/.test(reportText), reportText.slice(0, 120));
    const saves = {};
    for (const format of ['html', 'json']) {
      const [dl] = await Promise.all([page.waitForEvent('download'), page.click(`#report-${format}`)]);
      saves[format] = readFileSync(await dl.path(), 'utf8');
    }
    const reportJson = JSON.parse(saves.json);
    const design = { ...reportJson.design, ...(reportJson.report.notes ? { notes: reportJson.report.notes } : {}) };
    check("the report's design block carries the simulation block", design.simulation && design.simulation.seed === 2026, JSON.stringify(design.simulation));
    const dir = mkdtempSync(join(tmpdir(), 'tern-sim-report-'));
    try {
      writeFileSync(join(dir, 'design.json'), JSON.stringify(design));
      const cliHtml = execFileSync(tern, ['report', join(dir, 'design.json'), '--format', 'html'], { encoding: 'utf8' });
      const undated = (t) => t.replace(/ on \d{4}-\d{2}-\d{2}\./g, ' on DATE.');
      const [a, b] = [undated(cliHtml), undated(saves.html)];
      let i = 0;
      while (i < a.length && a[i] === b[i]) i++;
      check("the page's report with its check equals tern report's apart from the date", a === b, `first difference at ${i}: command line "${a.slice(i - 40, i + 60)}" vs page "${b.slice(i - 40, i + 60)}"`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
    await page.click('#report-close');

    // Save as JSON.
    await page.evaluate(() => document.getElementById('sim-save').scrollIntoView({ block: 'center' }));
    const [download] = await Promise.all([page.waitForEvent('download', { timeout: 5000 }), page.click('#sim-save')]);
    const saved = JSON.parse(readFileSync(await download.path(), 'utf8'));
    check('saved: the request and the result', download.suggestedFilename() === 'tern-simulation.json' && saved.simulation.replicates === 20000 && saved.request.simulation.seed === 2026);
    check('saved through a Blob URL', download.url().startsWith('blob:'), download.url());

    // A long run: progress while it runs, typing answers at once.
    await page.click('#sim-shape-w-normal');
    await page.fill('#sim-replicates', '400000');
    await page.evaluate(() => {
      window.keyDelays = [];
      document.getElementById('f-notes').addEventListener('keydown', (e) => window.keyDelays.push(performance.now() - e.timeStamp));
    });
    await page.click('#sim-run');
    await watchProgress(page);
    await page.waitForFunction(() => document.getElementById('sim-progress').value > 0, null, { timeout: 20000 });
    await page.click('#f-notes');
    await page.keyboard.type('typed during a run', { delay: 30 });
    await waitEnd(page, 120000);
    const delays = await page.evaluate(() => window.keyDelays);
    const worst = Math.max(...delays);
    check('typing during a run: every key handled', delays.length === 'typed during a run'.length, String(delays.length));
    check('typing during a run: no key waits for the check (worst delay under 250 ms)', worst < 250, worst.toFixed(1));
    const marks = await page.evaluate(() => window.simProgress);
    const gaps = marks.slice(1).map((m, i) => m.t - marks[i].t);
    const elapsed = await page.evaluate(() => Number(document.getElementById('simulation').dataset.elapsedMs));
    check('progress came in several steps', marks.length >= 5, String(marks.length));
    check('the design changed during the run: the result is marked stale', await page.locator('#sim-stale').isVisible());
    const long = await last(page);
    check('the long run drew every data set', long.simulation.replicates_done === 400000, String(long.simulation.replicates_done));
    console.log(`figure: 400,000 data sets per hypothesis (two_means_pooled, n = 54 per group, normal) in ${elapsed} ms with ${await page.evaluate(() => navigator.hardwareConcurrency)} cores' workers; progress every ${Math.max(...gaps).toFixed(0)} ms at worst (${marks.length} updates); keydown delay during the run: worst ${worst.toFixed(1)} ms, median ${delays.sort((a, b) => a - b)[delays.length >> 1].toFixed(1)} ms`);

    // Cancel.
    await page.fill('#sim-replicates', '1000000');
    await page.click('#sim-run');
    await page.waitForFunction(() => document.getElementById('sim-progress').value > 0, null, { timeout: 20000 });
    await page.click('#sim-cancel');
    await waitEnd(page);
    const cancelled = await last(page);
    check('Cancel stops the run', (await state(page)) === 'stopped');
    check('Cancel keeps the partial figures', cancelled.simulation.replicates_done > 0 && cancelled.simulation.replicates_done < 1000000, String(cancelled.simulation.replicates_done));
    check('Cancel says so', /Cancelled/.test(await page.locator('#sim-closing').innerText()));
    const after = await page.evaluate(() => document.getElementById('sim-progress').value);
    await page.waitForTimeout(400);
    check('no progress after Cancel', (await page.evaluate(() => document.getElementById('sim-progress').value)) === after);
    check('Run is offered again', await page.locator('#sim-run').isEnabled());

    // Resampling the example data file (step 3).
    await page.click('#data-demo');
    await page.waitForFunction(() => /early loading/.test(document.getElementById('datafile').innerText), null, { timeout: 10000 });
    await page.click('#sim-shape-w-resample');
    await page.fill('#sim-replicates', '2000');
    await page.click('#sim-run');
    await waitEnd(page);
    const resampled = await last(page);
    check('resampling the data file runs', resampled.simulation.population.startsWith('data resampled from your file') && resampled.simulation.replicates_done === 2000, resampled.simulation.population);

    check('no errors in the console', errors.length === 0, errors.join(' | '));
    await page.locator('#simulation').screenshot({ path: join(artifacts, 'simulation-panel.png') });
  } finally {
    await stopServer(child);
  }
}

// A long sample-size search (exact binomial, two-sided, p0 = .5 against
// .51: its Youden n is 30,934, tests/reference/exact_large.json) runs in
// a worker: the page answers each keystroke while it runs, shows where it
// stands, and Stop ends it.
async function search(browser) {
  const { child, url } = await startServer();
  try {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    const errors = [];
    page.on('pageerror', (e) => errors.push(String(e)));
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    await page.goto(url);
    await page.waitForFunction(() => document.getElementById('app').dataset.ready === 'true');
    await page.click('#new-design');
    await page.click('label:has(input[value="proportion_exact"])');
    await page.click('label:has(input[value="two_sided"])');
    for (const [id, v] of [['#f-p0', '0.5'], ['#f-alpha_max', '0.05'], ['#f-beta_max', '0.2']]) await page.fill(id, v);
    const started = Date.now();
    await page.fill('#f-p_alt', '0.51');
    const answered = Date.now() - started;
    const card = () => page.evaluate(() => [document.getElementById('size-card').dataset.state, document.getElementById('size-search-text').innerText]);
    check('search: the long search goes to a worker', (await card())[0] === 'searching', JSON.stringify(await card()));
    await page.waitForFunction(() => /: n = \d+/.test(document.getElementById('size-search-text').innerText), null, { timeout: 20000 });
    check('search: where it stands is shown', /n = \d+/.test((await card())[1]), (await card())[1]);
    check('search: the charts say they wait for it', /still running/.test(await page.getAttribute('#chart-sampling', 'aria-label')), await page.getAttribute('#chart-sampling', 'aria-label'));
    await page.click('#report-prepare');
    check('search: the report waits for it', /still running/.test(await page.locator('#report-msg').innerText()), await page.locator('#report-msg').innerText());
    const delays = [];
    await page.click('#f-unit');
    await page.evaluate(() => { window.searchKeys = []; document.getElementById('f-unit').addEventListener('keydown', (e) => window.searchKeys.push(performance.now() - e.timeStamp)); });
    await page.keyboard.type('patients', { delay: 20 });
    delays.push(...(await page.evaluate(() => window.searchKeys)));
    check('search: typing is answered while it runs (worst key delay under 250 ms)', Math.max(...delays) < 250, Math.max(...delays).toFixed(1));
    await page.waitForFunction(() => document.getElementById('size-card').dataset.state === 'found', null, { timeout: 60000 });
    const took = Date.now() - started;
    const headline = await page.locator('#size-headline').innerText();
    check('search: the worker finds n = 30934', /30[ ,\u202f]?934/.test(headline), headline);
    await page.click('#report-prepare');
    await page.waitForSelector('#report-view:not([hidden])', { timeout: 5000 });
    check('search: the report then uses its findings', /30[ ,\u202f]?934/.test(await page.locator('#report-body').innerText()));
    await page.click('#report-close');
    console.log(`figure: exact two-sided search p0 = .5 against .51 in a worker: the keystroke answered in ${answered} ms, the answer in ${(took / 1000).toFixed(1)} s; worst key delay meanwhile ${Math.max(...delays).toFixed(1)} ms`);
    // Stop.
    await page.fill('#f-p_alt', '0.509');
    await page.waitForFunction(() => document.getElementById('size-card').dataset.state === 'searching', null, { timeout: 5000 });
    await page.click('#size-search-stop');
    check('search: Stop ends it and says so', /Stopped/.test((await card())[1]), (await card())[1]);
    await page.fill('#f-p_alt', '0.51');
    check('search: findings are kept for their design', (await card())[0] === 'found');
    check('search: no errors in the console', errors.length === 0, errors.join(' | '));
  } finally {
    await stopServer(child);
  }
}

async function oneFile(browser) {
  if (!existsSync(single)) throw new Error('dist-single/tern.html is missing: run scripts/build-single first');
  const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
  const url = pathToFileURL(single).href;
  const requests = [];
  const errors = [];
  page.on('request', (r) => requests.push(r.url()));
  page.on('pageerror', (e) => errors.push(String(e)));
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  await page.goto(url);
  await page.waitForFunction(() => document.getElementById('app').dataset.ready === 'true');
  await page.fill('#sim-replicates', '3000');
  await page.fill('#sim-seed', '7');
  await page.click('#sim-run');
  await waitEnd(page);
  const r = await last(page);
  check('one file: the check runs from the inline worker source', (await state(page)) === 'done' && r.simulation.replicates_done === 3000);
  const diff = differences(r.simulation, cli(r.request));
  check('one file: the same numbers as tern simulate', diff.length === 0, diff.slice(0, 5).join('; '));
  const other = requests.filter((u) => u !== url && !u.startsWith('data:') && !u.startsWith('blob:'));
  check('one file: no request but the file itself and its worker', other.length === 0, other.join(', '));
  check('one file: no errors (the policy lets the worker start)', errors.length === 0, errors.join(' | '));
}

await run('simulation', async () => {
  const browser = await launch();
  try {
    await served(browser);
    await search(browser);
    await oneFile(browser);
  } finally {
    await browser.close();
  }
});
