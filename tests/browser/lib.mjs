// Helpers shared by the browser tests (smoke.mjs, parity.mjs): the static
// server child process (its PID held and stopped exactly), the chromium
// launch flags (no outside connections), and typing that waits for the
// page to recompute.

import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

const here = dirname(fileURLToPath(import.meta.url));
export const root = resolve(here, '..', '..');
export const dist = process.env.TERN_DIST ? resolve(process.env.TERN_DIST) : join(root, 'dist');
export const artifacts = join(root, 'tests', 'artifacts');
// The page with the `selftest` feature (scripts/build-selftest), for the
// smoke test's panic check only.
export const distSelftest = join(root, 'dist-selftest');

export function startServer(folder = dist) {
  return new Promise((res, rej) => {
    const child = spawn(process.execPath, [join(root, 'scripts', 'static-server.mjs'), folder, '127.0.0.1', '0'], {
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    const timer = setTimeout(() => rej(new Error('static server did not start within 10 s')), 10000);
    child.on('error', rej);
    child.stdout.setEncoding('utf8');
    child.stdout.on('data', (text) => {
      const m = text.match(/listening (http:\/\/\S+)/);
      if (m) {
        clearTimeout(timer);
        res({ child, url: m[1] });
      }
    });
  });
}

export function stopServer(child) {
  return new Promise((res) => {
    if (child.exitCode !== null) return res();
    child.once('exit', () => res());
    child.kill('SIGTERM');
    setTimeout(() => { if (child.exitCode === null) child.kill('SIGKILL'); }, 3000).unref();
  });
}

export function launch() {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
}

// The share of a canvas's pixels that are not (near) white: a chart drawn
// has ink (playwright's and puppeteer's page.evaluate alike).
export const ink = (page, id) => page.evaluate((id) => {
  const c = document.getElementById(id);
  const { data } = c.getContext('2d').getImageData(0, 0, c.width, c.height);
  let n = 0;
  for (let i = 0; i < data.length; i += 4) if (data[i] < 235 || data[i + 1] < 235 || data[i + 2] < 235) n += 1;
  return n / (data.length / 4);
}, id);

export const updates = (page) => page.evaluate(() => Number(document.getElementById('app').dataset.updates || 0));
export const text = (page, sel) => page.locator(sel).innerText();

// Type into a field and wait until the page has recomputed.
export async function type(page, selector, value) {
  const before = await updates(page);
  await page.fill(selector, value);
  await page.waitForFunction((n) => Number(document.getElementById('app').dataset.updates || 0) > n, before, { timeout: 5000 });
}

// Run an action (a click) and wait until the page has recomputed.
export async function act(page, action) {
  const before = await updates(page);
  await action();
  await page.waitForFunction((n) => Number(document.getElementById('app').dataset.updates || 0) > n, before, { timeout: 5000 });
}

// The tally every browser test keeps: `check` prints one "ok" or "FAIL"
// line per assertion; `run` runs the test's main function (an exception
// counts as one failure), prints "N passed, N failed" and exits with the
// verdict. `after` prints anything the test wants said before the tally.
let passed = 0;
let failed = 0;

export function check(name, ok, detail = '') {
  if (ok) {
    passed += 1;
    console.log(`ok   ${name}`);
  } else {
    failed += 1;
    console.log(`FAIL ${name}${detail ? `: ${detail}` : ''}`);
  }
}

export async function run(name, main, after = () => {}) {
  try {
    await main();
  } catch (e) {
    failed += 1;
    console.log(`FAIL ${name} test stopped: ${e.stack || e}`);
  }
  after();
  console.log(`${passed} passed, ${failed} failed`);
  process.exit(failed === 0 ? 0 : 1);
}

// Click a chart's "Save as SVG" and "Save as PNG" and check the files the
// browser downloads: the SVG parses as XML (DOMParser, no parsererror) and
// has a viewBox or a size; the PNG has the PNG signature and twice the
// chart's CSS size (IHDR width and height). `name` is the chart's name
// (`sampling`, `histogram`, ...), its canvas `#chart-NAME`.
export async function checkChartSaves(page, name) {
  const canvas = `#chart-${name}`;
  // Centre the buttons, clear of the caution bar that sticks to the bottom.
  await page.evaluate((sel) => document.querySelector(sel).scrollIntoView({ block: 'center' }), `#save-svg-${name}`);
  const [svgDownload] = await Promise.all([page.waitForEvent('download', { timeout: 5000 }), page.click(`#save-svg-${name}`)]);
  check(`save ${name}: SVG file name`, svgDownload.suggestedFilename() === `tern-chart-${name}.svg`, svgDownload.suggestedFilename());
  check(`save ${name}: SVG through a Blob URL`, svgDownload.url().startsWith('blob:'), svgDownload.url());
  const svgText = readFileSync(await svgDownload.path(), 'utf8');
  const parsed = await page.evaluate((text) => {
    const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
    const root = doc.documentElement;
    return { error: doc.getElementsByTagName('parsererror').length, root: root.localName, width: root.getAttribute('width'), viewBox: root.getAttribute('viewBox') };
  }, svgText);
  check(`save ${name}: the SVG parses`, parsed.error === 0 && parsed.root === 'svg' && (parsed.viewBox || parsed.width), JSON.stringify(parsed));
  const css = await page.evaluate((sel) => { const c = document.querySelector(sel); return [c.clientWidth, c.clientHeight]; }, canvas);
  const [pngDownload] = await Promise.all([page.waitForEvent('download', { timeout: 5000 }), page.click(`#save-png-${name}`)]);
  check(`save ${name}: PNG file name`, pngDownload.suggestedFilename() === `tern-chart-${name}.png`, pngDownload.suggestedFilename());
  check(`save ${name}: PNG through a Blob URL`, pngDownload.url().startsWith('blob:'), pngDownload.url());
  const png = readFileSync(await pngDownload.path());
  const signature = png.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
  const size = png.length >= 24 ? [png.readUInt32BE(16), png.readUInt32BE(20)] : [];
  check(`save ${name}: a PNG twice the chart's CSS size`, signature && size[0] === 2 * css[0] && size[1] === 2 * css[1], `signature ${signature}, ${size} for CSS ${css}`);
}
