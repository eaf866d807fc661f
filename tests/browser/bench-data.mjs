// Benchmark (run by hand, not part of scripts/test): a generated CSV of
// 1,000,000 rows × 5 columns (about 40 MB) chosen as a file on the built page
// in headless chromium. Prints the time to read and summarise it, the
// wasm-side throughput, and peak memory (JS heap used, sampled through the
// DevTools protocol, plus the WebAssembly memory, which only grows) as
// ratios to the file size. Targets: <= 1.5 s, peak memory <= 3x the file.
//
// Usage: node tests/browser/bench-data.mjs [rows]   (after scripts/build-page)

import { createWriteStream, existsSync, mkdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { once } from 'node:events';
import { root, dist, startServer, stopServer, launch } from './lib.mjs';

const rows = Number(process.argv[2] || 1000000);
const dir = join(root, 'target', 'bench-data');
mkdirSync(dir, { recursive: true });
const file = join(dir, `bench-${rows}.csv`);

// Deterministic values (a small linear congruential generator): an id, a
// two-level group, two measurements with decimals and a whole count.
async function generate() {
  if (existsSync(file)) return;
  const out = createWriteStream(file);
  let s = 12345;
  const rnd = () => { s = (s * 1103515245 + 12345) % 2147483648; return s / 2147483648; };
  out.write('patient_id,arm,recovery_days,pain_score,visits\n');
  let buf = '';
  for (let i = 1; i <= rows; i += 1) {
    const arm = rnd() < 0.5 ? 'treatment' : 'control';
    const days = (30 + 20 * rnd() + 10 * rnd()).toFixed(5);
    const pain = (10 * rnd()).toFixed(6);
    buf += `P${String(i).padStart(8, '0')},${arm},${days},${pain},${Math.floor(12 * rnd())}\n`;
    if (buf.length > 1 << 20) {
      if (!out.write(buf)) await once(out, 'drain');
      buf = '';
    }
  }
  out.end(buf);
  await once(out, 'finish');
}

async function main() {
  if (!existsSync(join(dist, 'index.html'))) throw new Error('dist/index.html is missing: run scripts/build-page first');
  await generate();
  const size = statSync(file).size;
  console.log(`file: ${file}, ${rows} rows, ${(size / 1e6).toFixed(1)} MB`);
  const { child, url } = await startServer();
  const browser = await launch();
  try {
    const page = await (await browser.newContext({ viewport: { width: 1280, height: 900 } })).newPage();
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Performance.enable');
    await page.goto(url);
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 20000 });
    const heap = async () => {
      const { metrics } = await cdp.send('Performance.getMetrics');
      return metrics.find((m) => m.name === 'JSHeapUsedSize').value;
    };
    const wasmBytes = () => page.evaluate(() => window.wasmBindings.tern_memory_bytes());
    const heap0 = await heap();
    const wasm0 = await wasmBytes();
    let peakHeap = heap0;
    let sampling = true;
    const sampler = (async () => {
      while (sampling) {
        try { peakHeap = Math.max(peakHeap, await heap()); } catch { /* page busy */ }
        await new Promise((r) => setTimeout(r, 25));
      }
    })();
    // Did the progress bar show while the page worked (it must not freeze
    // without feedback)?
    await page.evaluate(() => {
      window.__progressSeen = 0;
      const el = document.getElementById('data-progress');
      new MutationObserver(() => { if (!el.hidden) window.__progressSeen += 1; }).observe(el, { attributes: true, subtree: true });
    });
    const before = await page.evaluate(() => Number(document.getElementById('app').dataset.fileLoads || 0));
    const t0 = Date.now();
    await page.setInputFiles('#data-file', file);
    await page.waitForFunction((n) => Number(document.getElementById('app').dataset.fileLoads || 0) > n, before, { timeout: 600000 });
    const wall = Date.now() - t0;
    sampling = false;
    await sampler;
    const app = await page.evaluate(() => ({ ...document.getElementById('app').dataset }));
    const wasm1 = await wasmBytes();
    const parse = Number(app.fileParseMs);
    const total = Number(app.fileMs);
    const peak = peakHeap + wasm1;
    console.log(`state: ${app.fileState}; ${(await page.locator('#data-source').innerText())}`);
    console.log(`time: read ${(parse / 1000).toFixed(2)} s, read + summarise ${(total / 1000).toFixed(2)} s (target <= 1.5 s); wall clock from setInputFiles ${(wall / 1000).toFixed(2)} s`);
    const engine = Number(app.fileEngineMs);
    console.log(`throughput: ${(size / 1e6 / (parse / 1000)).toFixed(1)} MB/s read as the page sees it (1 MB chunks); ${(size / 1e6 / (engine / 1000)).toFixed(1)} MB/s inside the wasm reader alone (${(engine / 1000).toFixed(2)} s of the read)`);
    console.log(`after reading: summaries ${app.summariseMs} ms, chart data (group values, histogram, quantile points) ${app.chartPrepMs} ms, drawing both charts ${app.chartDrawMs} ms`);
    console.log(`memory: JS heap used ${(heap0 / 1e6).toFixed(1)} MB before, peak ${(peakHeap / 1e6).toFixed(1)} MB; wasm memory ${(wasm0 / 1e6).toFixed(1)} MB before, ${(wasm1 / 1e6).toFixed(1)} MB after`);
    console.log(`memory: peak (JS heap + wasm) ${(peak / 1e6).toFixed(1)} MB = ${(peak / size).toFixed(2)}x the file (target <= 3x); wasm growth alone ${((wasm1 - wasm0) / size).toFixed(2)}x`);
    console.log(`progress: the bar changed ${await page.evaluate(() => window.__progressSeen)} times while visible`);
    console.log(`decision: ${await page.locator('#decide-title').innerText()}`);
  } finally {
    await browser.close();
    await stopServer(child);
  }
}

await main();
