// Cold-start figures of both editions (a measurement, not a test): the time
// from navigation start to the demo drawn (#app's data-ready-ms, set by the
// page), as the median of RUNS fresh browser contexts each, for
//   - the served edition, first visit (nothing cached, static host on loopback)
//   - the served edition, opened offline from its service worker
//   - the one-file edition from file:// in chromium
//   - the one-file edition from file:// in Firefox ESR (when installed)
//
// Usage: node tests/browser/coldstart.mjs [RUNS]   (after scripts/build-page
// and scripts/build-single --from-dist)

import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import puppeteer from 'puppeteer-core';
import { root, startServer, stopServer, launch } from './lib.mjs';

const RUNS = Number(process.argv[2] || 5);
const single = pathToFileURL(join(root, 'dist-single', 'tern.html')).href;
const readyMs = (page) =>
  page.waitForSelector('#app[data-ready="true"]', { timeout: 30000 }).then(() => page.evaluate(() => Number(document.getElementById('app').dataset.readyMs)));
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const show = (name, xs) => console.log(`cold start: ${name}: median ${median(xs).toFixed(0)} ms (runs: ${xs.map((x) => x.toFixed(0)).join(', ')})`);

const { child, url } = await startServer();
const browser = await launch();
try {
  const first = [];
  const offline = [];
  const file = [];
  for (let i = 0; i < RUNS; i += 1) {
    const context = await browser.newContext();
    const page = await context.newPage();
    await page.goto(url);
    first.push(await readyMs(page));
    await page.waitForSelector('#app[data-offline="ready"]', { timeout: 20000 });
    await context.setOffline(true);
    await page.reload();
    offline.push(await readyMs(page));
    await context.close();
    const c2 = await browser.newContext();
    const p2 = await c2.newPage();
    await p2.goto(single);
    file.push(await readyMs(p2));
    await c2.close();
  }
  show('served edition, first visit', first);
  show('served edition, offline from the service worker', offline);
  show('one-file edition from file:// (chromium)', file);
} finally {
  await browser.close();
  await stopServer(child);
}

if (existsSync('/usr/bin/firefox-esr')) {
  const ff = await puppeteer.launch({ browser: 'firefox', executablePath: '/usr/bin/firefox-esr', headless: true });
  try {
    const xs = [];
    for (let i = 0; i < RUNS; i += 1) {
      const context = await ff.createBrowserContext();
      const page = await context.newPage();
      await page.goto(single);
      xs.push(await readyMs(page));
      await context.close();
    }
    show('one-file edition from file:// (Firefox ESR)', xs);
  } finally {
    await ff.close();
  }
}
