// The one-file edition from file:// in Debian's Firefox ESR, driven by
// puppeteer-core over WebDriver BiDi (no browser download: the executable
// is /usr/bin/firefox-esr). Checks that the page starts, computes the demo's
// design and decision, draws the charts, recomputes on input and makes no
// request but the file itself. Skips (exit 0, says so) when Firefox is absent.
//
// Usage: node tests/browser/firefox.mjs   (after scripts/build-single)

import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import puppeteer from 'puppeteer-core';
import { root, artifacts, check, ink, run } from './lib.mjs';

const FIREFOX = '/usr/bin/firefox-esr';
const single = join(root, 'dist-single', 'tern.html');
const CHARTS = ['chart-sampling', 'chart-by-n', 'chart-tradeoff', 'chart-total'];


async function main() {
  if (!existsSync(single)) throw new Error('dist-single/tern.html is missing: run scripts/build-single first');
  const browser = await puppeteer.launch({
    browser: 'firefox',
    executablePath: FIREFOX,
    headless: true,
    // No update checks, telemetry or other outside connections of its own.
    extraPrefsFirefox: {
      'app.update.enabled': false,
      'browser.safebrowsing.malware.enabled': false,
      'browser.safebrowsing.phishing.enabled': false,
      'datareporting.policy.dataSubmissionEnabled': false,
      'network.captive-portal-service.enabled': false,
      'network.connectivity-service.enabled': false,
    },
  });
  try {
    const page = await browser.newPage();
    await page.setViewport({ width: 1280, height: 900 });
    const url = pathToFileURL(single).href;
    const requests = [];
    const errors = [];
    page.on('request', (r) => requests.push(r.url()));
    page.on('pageerror', (e) => errors.push(String(e)));
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    await page.goto(url);
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 30000 });
    const readyMs = await page.evaluate(() => Number(document.getElementById('app').dataset.readyMs));
    const txt = (sel) => page.$eval(sel, (e) => e.innerText);
    check('firefox, file://: sample size computed', /n = 54 in each group/.test(await txt('#size-headline')), await txt('#size-headline'));
    check('firefox, file://: decision computed', (await txt('#decide-title')) === 'Reject H0', await txt('#decide-title'));
    for (const id of CHARTS) {
      const share = await ink(page, id);
      check(`firefox, file://: ${id} drawn`, share > 0.02, String(share));
    }
    const before = await page.evaluate(() => Number(document.getElementById('app').dataset.updates));
    await page.$eval('#f-sigma', (e) => { e.value = '7'; e.dispatchEvent(new Event('input', { bubbles: true })); });
    await page.waitForFunction((n) => Number(document.getElementById('app').dataset.updates) > n, {}, before);
    check('firefox, file://: an input change recomputes', !/n = 54 /.test(await txt('#size-headline')), await txt('#size-headline'));
    // The spreadsheet reader, the second (inlined) WebAssembly module.
    const xlsx = readFileSync(join(root, 'tests', 'data_files', 'valid.xlsx')).toString('base64');
    const grid = await page.evaluate(async (b64) => {
      const reader = await globalThis.ternSheets;
      return reader.read_sheet_json(Uint8Array.from(atob(b64), (c) => c.charCodeAt(0)), undefined);
    }, xlsx);
    check('firefox, file://: the spreadsheet module reads an .xlsx', /"sheets":\["Waiting times","Dose"\]/.test(grid), String(grid).slice(0, 200));
    // The simulation check, in a classic worker started from the page's
    // inline source (a Blob URL), under the page's policy.
    await page.$eval('#sim-replicates', (e) => { e.value = '2000'; });
    await page.click('#sim-run');
    await page.waitForFunction(() => ['done', 'stopped'].includes(document.getElementById('simulation').dataset.state), { timeout: 30000 });
    const sim = JSON.parse(await page.evaluate(() => window.wasmBindings.tern_last_simulation()));
    check('firefox, file://: the simulation check runs in its worker', sim.simulation.replicates_done === 2000 && (await txt('#simulation')).includes('Drawn: 2000 data sets'), await txt('#sim-msg'));
    const fetched = await page.evaluate(async () => {
      try {
        await fetch('http://127.0.0.1:9/never');
        return 'fetched';
      } catch {
        return 'blocked';
      }
    });
    check('firefox, file://: an injected fetch is blocked', fetched === 'blocked');
    const other = requests.filter((u) => u !== url && !u.startsWith('data:') && !u.startsWith('blob:'));
    check('firefox, file://: no request but the file itself (and its worker\'s Blob URL)', other.length === 0, other.join(', '));
    check('firefox, file://: no errors', errors.length === 0, errors.join(' | '));
    await page.screenshot({ path: join(artifacts, 'firefox-one-file.png') });
    console.log(`figure: one-file edition in Firefox from file://: demo drawn ${readyMs.toFixed(0)} ms after navigation start`);
  } finally {
    await browser.close();
  }
}

if (!existsSync(FIREFOX)) {
  console.log(`firefox test skipped: ${FIREFOX} is not installed (scripts/install-tools installs it)`);
  process.exit(0);
}
await run('firefox', main);
