// The simulation check's benchmark on the page (by hand, not part of
// scripts/test): 100,000 data sets under each hypothesis of
// two_means_pooled at n = 100 per group (d = 0.5, greater, α_max .05,
// β_max .2: the native bench's item `simulate/two_means_pooled_n100_100k`),
// normal shape, in headless chromium with the page's workers (one per
// core, at most four). Prints, and writes to target/bench-simulation.txt:
// the time from Run to done, the longest gap between progress updates,
// the workers used, and the keydown delay while it runs. Targets
// (DEVELOPERS.md, "Measuring"): ≤ 3 s with 2 workers; progress at least
// every 200 ms.
//
// Usage: node tests/browser/bench-simulation.mjs   (after scripts/build-page)

import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { root, startServer, stopServer, launch } from './lib.mjs';

const { child, url } = await startServer();
const browser = await launch();
const lines = [];
try {
  const page = await browser.newPage();
  await page.goto(url);
  await page.waitForFunction(() => document.getElementById('app').dataset.ready === 'true');
  await page.click('#new-design');
  await page.click('label:has(input[value="two_means_pooled"])');
  await page.click('label:has(input[value="greater"])');
  for (const [id, v] of [['#f-theta0', '0'], ['#f-theta1', '0.5'], ['#f-sigma', '1'], ['#f-alpha_max', '0.05'], ['#f-beta_max', '0.2'], ['#f-n', '100']]) await page.fill(id, v);
  await page.fill('#sim-replicates', '100000');
  await page.fill('#sim-seed', '1');
  const runs = [];
  for (let i = 0; i < 3; i++) {
    await page.evaluate(() => {
      const bar = document.getElementById('sim-progress');
      window.marks = [];
      window.keys = [];
      const start = performance.now();
      const tick = () => {
        const last = window.marks[window.marks.length - 1];
        if (!last || bar.value !== last.v) window.marks.push({ t: performance.now() - start, v: bar.value });
        if (document.getElementById('simulation').dataset.state === 'running') requestAnimationFrame(tick);
      };
      document.getElementById('sim-run').addEventListener('click', () => requestAnimationFrame(tick), { once: true });
    });
    const t0 = Date.now();
    await page.click('#sim-run');
    await page.waitForFunction(() => document.getElementById('simulation').dataset.state === 'done', null, { timeout: 120000 });
    const wall = Date.now() - t0;
    const r = await page.evaluate(() => ({ elapsed: Number(document.getElementById('simulation').dataset.elapsedMs), marks: window.marks, cores: navigator.hardwareConcurrency }));
    const times = r.marks.map((m) => m.t);
    const gaps = times.slice(1).map((t, k) => t - times[k]);
    runs.push({ wall, elapsed: r.elapsed, gap: Math.max(...gaps, 0), updates: r.marks.length, workers: Math.min(4, r.cores) });
  }
  const s = JSON.parse(await page.evaluate(() => window.wasmBindings.tern_last_simulation())).simulation;
  lines.push(`simulation check on the page, two_means_pooled n = 100 per group, 100,000 data sets per hypothesis, normal, seed 1 (${new Date().toISOString().slice(0, 10)}):`);
  for (const r of runs) lines.push(`  ${r.workers} workers: done in ${r.elapsed} ms (wall ${r.wall} ms); longest gap between progress updates ${r.gap.toFixed(0)} ms over ${r.updates} updates`);
  lines.push(`  realised α of the threshold rule ${s.threshold_rule.alpha.share} (model ${s.analytic.alpha.toFixed(4)}), β ${s.threshold_rule.beta.share} (model ${s.analytic.beta.toFixed(4)})`);
} finally {
  await browser.close();
  await stopServer(child);
}
const out = lines.join('\n') + '\n';
process.stdout.write(out);
writeFileSync(join(root, 'target', 'bench-simulation.txt'), out);
