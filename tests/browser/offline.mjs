// Private and offline by construction, checked in headless Debian chromium
// (playwright-core). Every static server here is a child process whose PID
// the test holds and stops; each logs the requests it receives, so the test
// sees exactly what reached the host, besides what the browser reports.
//
//   1. served edition: during load only same-origin files of the build;
//      after load (demo loaded, decided, edited, kept, exported, shared)
//      zero requests
//   2. offline: with the network off and the host stopped, a reload opens
//      the page from the service worker and computes a design and a decision
//   3. a new build deployed: the page says an update is available and takes
//      it through its reload button
//   4. dist/ served under /stats/tern/ loads, computes and installs there
//   5. the policy blocks injected fetches, scripts, images (a violation
//      event is seen, the foreign host receives nothing)
//   6. the one-file edition from file:// computes and draws with no request
//   7. keep / export / import / share round trips carry the design only
//
// Usage: node tests/browser/offline.mjs   (after scripts/build-page and
// scripts/build-single --from-dist). Prints cold-start figures.

import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { root, dist, artifacts, launch, text, type, check, ink, run } from './lib.mjs';
import { headersFor } from '../../scripts/page-policy.mjs';

const single = join(root, 'dist-single', 'tern.html');
const CHARTS = ['chart-sampling', 'chart-by-n', 'chart-tradeoff', 'chart-total'];
const DESIGN_KEYS = new Set(['family', 'alternative', 'theta0', 'theta1', 'sigma', 'sigma1', 'sigma2', 'd', 'p1', 'p2', 'ratio', 'alpha_max', 'beta_max', 'weight', 'n', 'unit', 'planning_source', 'limits_reason', 'dropout']);

// Prepare the report, print it (the print dialog of a headless browser
// returns at once; page.pdf prints as "save as PDF" does) and save it in
// every format: the caller checks that none of it made a request.
async function usesReport(page, label) {
  await page.click('#report-prepare');
  await page.waitForSelector('#report-title', { timeout: 20000 });
  check(`${label}: the report is prepared`, /Tern report: two means/.test(await text(page, '#report-title')), await text(page, '#report-title'));
  await page.pdf({ format: 'A4' });
  for (const id of ['#report-html', '#report-md', '#report-json']) {
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click(id)]);
    await dl.path();
  }
  await page.click('#report-print');
  await page.waitForTimeout(300);
  await page.click('#report-close');
}

// The spreadsheet reader is the page's second WebAssembly module: choose an
// .xlsx and check that it is read (both sheets offered), in each edition.
async function readsSpreadsheet(page, label) {
  const before = await page.evaluate(() => Number(document.getElementById('app').dataset.fileLoads || 0));
  await page.setInputFiles('#data-file', {
    name: 'valid.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: readFileSync(join(root, 'tests', 'data_files', 'valid.xlsx')),
  });
  await page.waitForFunction((n) => Number(document.getElementById('app').dataset.fileLoads || 0) > n, before, { timeout: 20000 });
  const state = await page.evaluate(() => document.getElementById('app').dataset.fileState);
  const source = await text(page, '#data-source');
  check(`${label}: an .xlsx is read by the spreadsheet module`, state === 'ready' && /Excel workbook/.test(source) && (await page.locator('input[name="dr-sheet"]').count()) === 2, `${state}: ${source} ${await text(page, '#data-alert')}`);
}


// A static server for `dir` that logs every request it receives.
function serve(dir, env = {}) {
  return new Promise((res, rej) => {
    const child = spawn(process.execPath, [join(root, 'scripts', 'static-server.mjs'), dir, '127.0.0.1', '0'], {
      stdio: ['ignore', 'pipe', 'inherit'],
      env: { ...process.env, TERN_LOG_REQUESTS: '1', ...env },
    });
    const server = { child, url: '', log: [] };
    const timer = setTimeout(() => rej(new Error('static server did not start within 10 s')), 10000);
    child.on('error', rej);
    child.stdout.setEncoding('utf8');
    let rest = '';
    child.stdout.on('data', (chunk) => {
      const lines = (rest + chunk).split('\n');
      rest = lines.pop();
      for (const line of lines) {
        const m = line.match(/^listening (http:\/\/\S+)/);
        if (m) {
          server.url = m[1];
          clearTimeout(timer);
          res(server);
        }
        const r = line.match(/^request (\S+) (\S+)/);
        if (r) server.log.push(`${r[1]} ${r[2]}`);
      }
    });
  });
}

function stop(server) {
  return new Promise((res) => {
    const { child } = server;
    if (child.exitCode !== null || child.signalCode !== null) return res();
    child.once('exit', () => res());
    child.kill('SIGTERM');
    setTimeout(() => { if (child.exitCode === null) child.kill('SIGKILL'); }, 3000).unref();
  });
}

// Wait until `log` has not grown for `quietMs`.
async function quiet(log, quietMs = 700) {
  let n = -1;
  while (n !== log.length) {
    n = log.length;
    await new Promise((r) => setTimeout(r, quietMs));
  }
}

// Every request the browser reports for a context, and every policy
// violation its pages see from their first script on.
function record(context) {
  const seen = [];
  context.on('request', (r) => seen.push(r.url()));
  context.addInitScript(() => {
    window.ternViolations = [];
    document.addEventListener('securitypolicyviolation', (e) => window.ternViolations.push(`${e.effectiveDirective} ${e.blockedURI}`));
  });
  return seen;
}
const violations = (page) => page.evaluate(() => window.ternViolations || ['(not recorded)']);

const ready = (page) => page.waitForSelector('#app[data-ready="true"]', { timeout: 30000 });
const readyMs = (page) => page.evaluate(() => Number(document.getElementById('app').dataset.readyMs));

// The files of the build, as the host sees their paths under `base`.
function buildPaths(base) {
  const files = readdirSync(dist);
  return new Set([base, ...files.map((f) => base + f)]);
}

async function computesDemo(page, label) {
  check(`${label}: sample size computed`, /n = 54 in each group/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
  check(`${label}: decision computed`, (await text(page, '#decide-title')) === 'Reject H0', await text(page, '#decide-title'));
  for (const id of CHARTS) check(`${label}: ${id} drawn`, (await ink(page, id)) > 0.02);
}

const figures = [];

async function servedEdition(browser) {
  const host = await serve(dist);
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  const seen = record(context);
  const page = await context.newPage();
  const errors = [];
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  page.on('pageerror', (e) => errors.push(String(e)));
  try {
    await page.goto(host.url);
    await ready(page);
    figures.push(`served edition, first visit (no cache): demo drawn ${(await readyMs(page)).toFixed(0)} ms after navigation start`);
    await page.waitForSelector('#app[data-offline="ready"]', { timeout: 20000 });
    await quiet(host.log);
    const allowed = buildPaths('/');
    const atLoad = [...host.log];
    check('load: the host received only files of the build', atLoad.every((r) => r.startsWith('GET ') && allowed.has(r.slice(4))), atLoad.join(', '));
    check('load: the browser asked nothing of another origin', seen.every((u) => u.startsWith(host.url) || u.startsWith('data:')), seen.filter((u) => !u.startsWith(host.url)).join(', '));
    check('load: the service worker is installed', (await text(page, '#version')).includes('offline use'), await text(page, '#version'));
    // Installable: chromium's own check finds nothing missing (headless
    // contexts are private windows, which it notes and which do not count).
    const cdp = await context.newCDPSession(page);
    const installErrors = (await cdp.send('Page.getInstallabilityErrors')).installabilityErrors.map((e) => e.errorId).filter((id) => id !== 'in-incognito');
    const manifestErrors = (await cdp.send('Page.getAppManifest')).errors;
    check('load: installable (manifest and worker accepted)', installErrors.length === 0 && manifestErrors.length === 0, JSON.stringify({ installErrors, manifestErrors }));
    await cdp.detach();
    const build = await page.getAttribute('meta[name="tern-build"]', 'content');
    check('version: Cargo version and build id shown', new RegExp(`Tern \\d+\\.\\d+\\.\\d+, build ${build}`).test(await text(page, '#version')), await text(page, '#version'));

    // After load: use the page as a user would; nothing may reach the host.
    const hostBefore = host.log.length;
    const seenBefore = seen.length;
    await page.click('#new-design');
    await page.click('#load-demo');
    await page.waitForTimeout(200);
    await computesDemo(page, 'after load');
    await type(page, '#f-beta_max', '0.05');
    await type(page, '#f-data-n1', '20');
    await type(page, '#f-data-n2', '20');
    check('after load: decided again (inconclusive)', (await text(page, '#decide-title')) === 'Inconclusive', await text(page, '#decide-title'));
    await type(page, '#f-data-n1', '56');
    await type(page, '#f-data-n2', '56');
    await type(page, '#f-beta_max', '0.10');
    await page.check('input[name="family"][value="mean_z"]');
    await page.check('input[name="family"][value="two_means_pooled"]');
    await page.fill('#keep-name', 'knee protocol');
    await page.click('#keep-save');
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#keep-export')]);
    await download.path();
    await page.click('#keep-share');
    await usesReport(page, 'after load');
    await page.waitForTimeout(800);
    check('after load: zero requests reached the host', host.log.length === hostBefore, host.log.slice(hostBefore).join(', '));
    const after = seen.slice(seenBefore).filter((u) => !u.startsWith('blob:'));
    check('after load: the browser made zero requests (a blob: download aside)', after.length === 0, after.join(', '));
    check('served: no console errors', errors.length === 0, errors.join(' | '));
    check('served: the page itself breaks no rule of its policy', (await violations(page)).length === 0, (await violations(page)).join(' | '));

    // Offline: the network off and the host gone; reload.
    await stop(host);
    await context.setOffline(true);
    const failedLoads = [];
    page.on('requestfailed', (r) => failedLoads.push(r.url()));
    await page.reload();
    await ready(page);
    figures.push(`served edition, offline from the service worker: demo drawn ${(await readyMs(page)).toFixed(0)} ms after navigation start`);
    await computesDemo(page, 'offline');
    await type(page, '#f-alpha_max', '0.05');
    check('offline: a changed design is computed', /n = \d+ in each group/.test(await text(page, '#size-headline')) && !/n = 54 /.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    await readsSpreadsheet(page, 'offline');
    // The simulation check's worker script comes from the service worker too.
    await page.fill('#sim-replicates', '1000');
    await page.click('#sim-run');
    await page.waitForFunction(() => ['done', 'stopped'].includes(document.getElementById('simulation').dataset.state), null, { timeout: 30000 });
    check('offline: the simulation check runs in its worker', (await page.evaluate(() => document.getElementById('simulation').dataset.state)) === 'done', await text(page, '#sim-msg'));
    check('offline: no request failed', failedLoads.length === 0, failedLoads.join(', '));
    await page.screenshot({ path: join(artifacts, 'offline-reload.png') });
  } finally {
    await context.close();
    await stop(host);
  }
}

async function update(browser) {
  const tmp = mkdtempSync(join(tmpdir(), 'tern-update-'));
  cpSync(dist, tmp, { recursive: true });
  const host = await serve(tmp);
  const context = await browser.newContext();
  const page = await context.newPage();
  try {
    await page.goto(host.url);
    await ready(page);
    await page.waitForSelector('#app[data-offline="ready"]', { timeout: 20000 });
    const old = await page.getAttribute('meta[name="tern-build"]', 'content');
    check('update: no note before a new build', !(await page.locator('#update-note').isVisible()));
    // "Deploy" a new build: another build id in the page and the worker.
    const fresh = 'f'.repeat(16);
    for (const f of ['index.html', 'sw.js']) {
      const p = join(tmp, f);
      writeFileSync(p, readFileSync(p, 'utf8').replaceAll(old, fresh));
    }
    await page.reload();
    await ready(page);
    await page.waitForSelector('#update-note:not([hidden])', { timeout: 20000 });
    check('update: the note says a new version is available', /new version/.test(await text(page, '#update-note')), await text(page, '#update-note'));
    check('update: the page still runs the old build meanwhile', (await text(page, '#version')).includes(old), await text(page, '#version'));
    await page.screenshot({ path: join(artifacts, 'update-note.png') });
    await Promise.all([page.waitForEvent('load', { timeout: 20000 }), page.click('#update-reload')]);
    await ready(page);
    check('update: after reload the new build runs', (await text(page, '#version')).includes(fresh), await text(page, '#version'));
  } finally {
    await context.close();
    await stop(host);
    rmSync(tmp, { recursive: true, force: true });
  }
}

// A host that sends the documented headers as well as the page's <meta>
// policy: the page still starts, installs its worker and works offline.
async function withHeaders(browser) {
  const readme = readFileSync(join(root, 'README.md'), 'utf8');
  for (const file of ['index.html', 'sw.js']) {
    const csp = headersFor(file)['Content-Security-Policy'];
    check(`headers: README documents the policy for ${file}`, readme.includes(csp), csp);
  }
  const host = await serve(dist, { TERN_HEADERS: '1' });
  const context = await browser.newContext();
  const page = await context.newPage();
  try {
    const response = await page.goto(host.url);
    check('headers: the host sends the policy', (response.headers()['content-security-policy'] || '').includes("connect-src 'none'"));
    await ready(page);
    await page.waitForSelector('#app[data-offline="ready"]', { timeout: 20000 });
    await stop(host);
    await context.setOffline(true);
    await page.reload();
    await ready(page);
    await computesDemo(page, 'headers, offline');
  } finally {
    await context.close();
    await stop(host);
  }
}

async function subFolder(browser) {
  const tmp = mkdtempSync(join(tmpdir(), 'tern-host-'));
  const folder = join(tmp, 'stats', 'tern');
  mkdirSync(folder, { recursive: true });
  cpSync(dist, folder, { recursive: true });
  writeFileSync(join(tmp, 'index.html'), '<!doctype html><title>Department</title><p>Another page of the host.</p>');
  const host = await serve(tmp);
  const context = await browser.newContext();
  const page = await context.newPage();
  try {
    await page.goto(`${host.url}stats/tern/`);
    await ready(page);
    await computesDemo(page, 'sub-folder');
    await page.waitForSelector('#app[data-offline="ready"]', { timeout: 20000 });
    const scope = await page.evaluate(async () => (await navigator.serviceWorker.getRegistration()).scope);
    check('sub-folder: the worker\'s scope is the folder', scope === `${host.url}stats/tern/`, scope);
    await quiet(host.log);
    const allowed = buildPaths('/stats/tern/');
    check('sub-folder: every request stayed in the folder', host.log.every((r) => allowed.has(r.slice(4))), host.log.join(', '));
    // The worker leaves the rest of the host alone.
    await page.reload();
    await ready(page);
    const before = host.log.length;
    await page.goto(host.url);
    check('sub-folder: the host\'s other pages are not answered by the worker', host.log.slice(before).includes('GET /'), host.log.slice(before).join(', '));
  } finally {
    await context.close();
    await stop(host);
    rmSync(tmp, { recursive: true, force: true });
  }
}

// Injected attempts to reach outside the page; returns the violations seen.
async function attack(page, foreign) {
  return page.evaluate(async (foreign) => {
    const violations = [];
    document.addEventListener('securitypolicyviolation', (e) => violations.push(`${e.effectiveDirective} ${e.blockedURI}`));
    const outcome = {};
    for (const [name, url] of [['fetch foreign', `${foreign}leak.js`], ['fetch same origin', './index.html']]) {
      try {
        await fetch(url);
        outcome[name] = 'fetched';
      } catch {
        outcome[name] = 'blocked';
      }
    }
    const s = document.createElement('script');
    s.src = `${foreign}leak.js`;
    document.head.append(s);
    const inline = document.createElement('script');
    inline.textContent = 'window.ternLeaked = "inline";';
    document.head.append(inline);
    const img = new Image();
    img.src = `${foreign}pixel.png`;
    document.body.append(img);
    await new Promise((r) => setTimeout(r, 800));
    return { violations, outcome, leaked: window.ternLeaked || null };
  }, foreign);
}

async function policy(browser, foreignHost) {
  const host = await serve(dist);
  const context = await browser.newContext();
  const page = await context.newPage();
  try {
    await page.goto(host.url);
    await ready(page);
    const csp = await page.getAttribute('meta[http-equiv="Content-Security-Policy"]', 'content');
    check('policy: connect-src \'none\', no unsafe-inline, default-src \'none\'', csp.includes("connect-src 'none'") && !csp.includes('unsafe-inline') && csp.includes("default-src 'none'"), csp);
    const r = await attack(page, foreignHost.url);
    check('policy: fetch to another origin blocked', r.outcome['fetch foreign'] === 'blocked', JSON.stringify(r.outcome));
    check('policy: fetch to the page\'s own host blocked too', r.outcome['fetch same origin'] === 'blocked', JSON.stringify(r.outcome));
    check('policy: violation events for connect, script and image', ['connect-src', 'script-src-elem', 'img-src'].every((d) => r.violations.some((v) => v.startsWith(d))), r.violations.join(' | '));
    check('policy: neither injected script ran', r.leaked === null, r.leaked);
    check('policy: the foreign host received nothing', foreignHost.log.length === 0, foreignHost.log.join(', '));
  } finally {
    await context.close();
    await stop(host);
  }
}

async function oneFile(browser, foreignHost) {
  if (!existsSync(single)) throw new Error('dist-single/tern.html is missing: run scripts/build-single first');
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  const seen = record(context);
  const page = await context.newPage();
  const errors = [];
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
  page.on('pageerror', (e) => errors.push(String(e)));
  try {
    const url = pathToFileURL(single).href;
    await page.goto(url);
    await ready(page);
    figures.push(`one-file edition from file://: demo drawn ${(await readyMs(page)).toFixed(0)} ms after navigation start`);
    await computesDemo(page, 'one file');
    check('one file: the version says which edition', /one-file edition/.test(await text(page, '#version')), await text(page, '#version'));
    await type(page, '#f-sigma', '7');
    check('one file: an input change recomputes', /n = \d+ in each group/.test(await text(page, '#size-headline')) && !/n = 54 /.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    await readsSpreadsheet(page, 'one file');
    await page.click('#keep-save');
    await page.click('#keep-share');
    check('one file: a design is kept', (await page.locator('#keep-list li').count()) >= 1);
    await usesReport(page, 'one file');
    await page.waitForTimeout(300);
    const other = seen.filter((u) => u !== url && !u.startsWith('data:') && !u.startsWith('blob:'));
    check('one file: no request but the file itself', other.length === 0, other.join(', '));
    check('one file: no console errors', errors.length === 0, errors.join(' | '));
    check('one file: the page itself breaks no rule of its policy', (await violations(page)).length === 0, (await violations(page)).join(' | '));
    const r = await attack(page, foreignHost.url);
    check('one file: injected fetch and scripts blocked', r.outcome['fetch foreign'] === 'blocked' && r.leaked === null && r.violations.some((v) => v.startsWith('connect-src')), JSON.stringify(r));
    check('one file: the foreign host received nothing', foreignHost.log.length === 0, foreignHost.log.join(', '));
    await page.screenshot({ path: join(artifacts, 'one-file.png') });
  } finally {
    await context.close();
  }
}

async function designs(browser) {
  const host = await serve(dist);
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, acceptDownloads: true });
  const page = await context.newPage();
  const tmp = mkdtempSync(join(tmpdir(), 'tern-designs-'));
  try {
    await page.goto(host.url);
    await ready(page);
    // Keep: the demo's design under a name; storage holds no data.
    check('keep: nothing kept before asking', (await page.evaluate(() => localStorage.length)) === 0);
    await page.fill('#keep-name', 'Knee protocol, two arms');
    await page.click('#keep-save');
    check('keep: listed', (await text(page, '#keep-list')).includes('Knee protocol, two arms'), await text(page, '#keep-list'));
    const stored = await page.evaluate(() => localStorage.getItem('tern.designs'));
    const kept = JSON.parse(stored);
    check('keep: the stored entry is the design only', kept.length === 1 && Object.keys(kept[0].design).every((k) => DESIGN_KEYS.has(k)) && !/data|39\.4|Riverside/.test(stored), stored);
    await page.reload();
    await ready(page);
    check('keep: still listed after a reload', (await text(page, '#keep-list')).includes('Knee protocol, two arms'));
    await page.click('#new-design');
    await page.click('#keep-list [data-open="0"]');
    await page.waitForTimeout(200);
    check('keep: opening restores the design', (await page.inputValue('#f-theta1')) === '-3' && (await page.inputValue('#f-alpha_max')) === '0.1' && /n = 54 in each group/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    await page.evaluate(() => document.getElementById('designs').scrollIntoView());
    await page.screenshot({ path: join(artifacts, 'designs-panel.png') });

    // Export: a file of design fields that `tern run` answers.
    await page.click('#load-demo');
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('#keep-export')]);
    const file = join(tmp, download.suggestedFilename());
    await download.saveAs(file);
    const exported = JSON.parse(readFileSync(file, 'utf8'));
    check('export: design fields only, no data', Object.keys(exported).every((k) => DESIGN_KEYS.has(k)) && exported.family === 'two_means_pooled', JSON.stringify(exported));
    const cli = join(root, 'target', 'release', 'tern');
    if (existsSync(cli)) {
      const answered = spawnSync(cli, ['run', file], { encoding: 'utf8' });
      const n1 = answered.status === 0 ? JSON.parse(answered.stdout).sample_size.youden.n1 : null;
      check('export: `tern run` answers the exported file (n1 = 54)', n1 === 54, answered.stderr || answered.stdout.slice(0, 200));
    }

    // Import: the exported file restores the design; bad files are refused by field.
    await page.click('#new-design');
    await page.setInputFiles('#keep-import', file);
    await page.waitForFunction(() => /Imported/.test(document.getElementById('keep-msg').textContent), null, { timeout: 5000 });
    check('import: the design is back', (await page.inputValue('#f-sigma')) === '6' && /n = 54 in each group/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));
    const bad = [
      ['typo.json', '{"family":"mean_t","alternative":"greater","theta0":0,"theta1":1,"sigma":2,"alpah_max":0.05,"beta_max":0.2}', /alpah_max.*alpha_max/],
      ['range.json', '{"family":"mean_t","alternative":"greater","theta0":0,"theta1":1,"sigma":2,"alpha_max":0.7,"beta_max":0.2}', /alpha_max/],
      ['text.json', 'family = mean_t', /not JSON/],
    ];
    for (const [name, body, expect] of bad) {
      await page.setInputFiles('#keep-import', { name, mimeType: 'application/json', buffer: Buffer.from(body) });
      await page.waitForFunction((n) => document.getElementById('keep-msg').textContent.includes(n), name, { timeout: 5000 });
      const msg = await text(page, '#keep-msg');
      check(`import: ${name} refused, naming the problem`, /not imported/.test(msg) && expect.test(msg), msg);
    }
    check('import: a refused file leaves the form as it was', (await page.inputValue('#f-sigma')) === '6');
    await page.setInputFiles('#keep-import', join(root, 'examples', 'clinic-recovery.json'));
    await page.waitForFunction(() => /Imported/.test(document.getElementById('keep-msg').textContent), null, { timeout: 5000 });
    check('import: a file with summary data gives the design only, and says so', /summary data were left out/.test(await text(page, '#keep-msg')), await text(page, '#keep-msg'));

    // Share: the link holds the design only, and opens it.
    await page.click('#load-demo');
    await page.click('#keep-share');
    const link = await page.inputValue('#share-link');
    const fragment = decodeURIComponent(link.split('#')[1] || '');
    check('share: the link carries the design in the fragment', fragment.startsWith('design:') && fragment.includes('alpha_max=0.1'), link);
    // The unit travels with the design; the summary figures and the study
    // notes (the demo's mention the Riverside clinic) never do.
    check('share: no summary figures or notes in the link', !/data|mean1|39\.4|56|Riverside|notes/.test(fragment) && fragment.includes('unit=days'), fragment);
    check('share: the page says what the link carries', /design only/.test(await text(page, '#keep-msg')) && /not send/.test(await text(page, '#share-box')));
    const other = await context.newPage();
    await other.goto(link);
    await ready(other);
    check('share: opening the link loads the design', (await other.inputValue('#f-theta1')) === '-3' && /n = 54 in each group/.test(await text(other, '#size-headline')), await text(other, '#size-headline'));
    check('share: and no data', (await other.inputValue('#f-data-n1')) === '' && (await text(other, '#decide-title')) === 'No decision yet', await text(other, '#decide-title'));
    await other.screenshot({ path: join(artifacts, 'link-opened.png') });
    check('share: the opened page says the link held the design only', /design only/.test(await text(other, '#link-note')), await text(other, '#link-note'));
    await other.goto(`${host.url}#design:family=mean_t&alternative=greater&theta0=0&theta1=1&sigma=2&alpha_max=0.7&beta_max=0.2`);
    await other.reload();
    await ready(other);
    check('share: a bad link is refused, naming the field', /could not be opened.*alpha_max/.test(await text(other, '#link-note')), await text(other, '#link-note'));
    check('share: after a bad link the worked example is shown', /n = 54 in each group/.test(await text(other, '#size-headline')), await text(other, '#size-headline'));

    // Delete.
    await page.click('#keep-list [data-delete="0"]');
    check('keep: deleted', (await page.locator('#keep-list li').count()) === 0 && JSON.parse(await page.evaluate(() => localStorage.getItem('tern.designs'))).length === 0);
  } finally {
    await context.close();
    await stop(host);
    rmSync(tmp, { recursive: true, force: true });
  }
}

async function main() {
  if (!existsSync(join(dist, 'sw.js'))) throw new Error('dist/sw.js is missing: run scripts/build-page first');
  mkdirSync(artifacts, { recursive: true });
  // The "other origin" an injected script would try to reach: a host that
  // would answer, so that only the policy can stop the request.
  const foreignDir = mkdtempSync(join(tmpdir(), 'tern-foreign-'));
  writeFileSync(join(foreignDir, 'leak.js'), 'window.ternLeaked = "foreign";');
  const foreign = await serve(foreignDir);
  const browser = await launch();
  try {
    for (const [name, part] of [['served', servedEdition], ['update', update], ['headers', withHeaders], ['sub-folder', subFolder], ['policy', (b) => policy(b, foreign)], ['one file', (b) => oneFile(b, foreign)], ['designs', designs]]) {
      try {
        await part(browser);
      } catch (e) {
        check(`${name}: stopped`, false, e.stack || String(e));
      }
    }
  } finally {
    await browser.close();
    await stop(foreign);
    rmSync(foreignDir, { recursive: true, force: true });
  }
  const size = existsSync(single) ? readFileSync(single).length : 0;
  figures.push(`one-file edition: ${size} bytes`);
  for (const f of figures) console.log(`figure: ${f}`);
}

await run('offline', main);
