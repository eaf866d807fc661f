// Parity of the page with the native command line. For each design it
// types the inputs on the page as a user would (a new design, a click on
// the family card and the direction, the values typed), reads the numbers
// the page DISPLAYS (c* on both scales, α*, β*, the Youden n, the
// conventional n, the outcome) and checks that the CLI's JSON for the same
// design (target/release/tern run -, the design on stdin), rounded the way
// the page shows it, gives the same figures.
//
// Usage: node tests/browser/parity.mjs   (after scripts/build-page and
// cargo build --release --bin tern; scripts/test-page does both)

import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { root, dist, artifacts, startServer, stopServer, launch, text, type, act, check, run } from './lib.mjs';

mkdirSync(artifacts, { recursive: true });
const bin = join(root, 'target', 'release', 'tern');


function cli(design) {
  return JSON.parse(execFileSync(bin, ['run', '-'], { input: JSON.stringify(design), encoding: 'utf8' }));
}

// Does the value, rounded as the shown text is, give the shown text?
function same(shown, value) {
  if (shown === undefined || value === undefined || value === null) return false;
  const s = shown.replace('\u2212', '-');
  const v = Number(s);
  if (!Number.isFinite(v)) return false;
  const m = s.match(/^-?\d+(?:\.(\d+))?(?:e(-?\d+))?$/);
  if (!m) return false;
  const dec = m[1] ? m[1].length : 0;
  const exp = m[2] ? Number(m[2]) : 0;
  const half = 0.5 * 10 ** (exp - dec);
  return Math.abs(value - v) <= half * (1 + 1e-9) + 1e-15;
}

const NUM = /-?\d+(?:\.\d+)?(?:e-?\d+)?/g;
// The numbers of a rule in the order the page writes them.
function ruleNumbers(rule) {
  switch (rule.reject_when) {
    case 'above': case 'below': return [rule.estimate, rule.statistic];
    case 'outside': return [rule.estimate_low, rule.estimate_high, rule.statistic_low, rule.statistic_high];
    case 'at_least': case 'at_most': return [rule.k, rule.estimate];
    case 'outside_counts': return [rule.k_low, rule.k_high].filter((k) => k !== null && k !== undefined);
    default: return [];
  }
}
function compareRule(name, shownText, rule) {
  const shown = (shownText.replace(/H0/g, '').replace(/\u2212/g, '-').match(NUM) || []);
  const want = ruleNumbers(rule);
  const ok = shown.length === want.length && want.every((w, i) => same(shown[i], w));
  check(`${name}: c* (${rule.reject_when})`, ok, `page "${shownText}" vs CLI ${JSON.stringify(want)}`);
}

const DESIGNS = [
  { family: 'mean_z', alternative: 'greater', theta0: 100, theta1: 105, sigma: 15, alpha_max: 0.05, beta_max: 0.10, data: { n: 90, mean: 104 } },
  { family: 'mean_t', alternative: 'less', theta0: 50, theta1: 47, sigma: 8, alpha_max: 0.05, beta_max: 0.2, data: { n: 60, mean: 49.8, sd: 8 } },
  { family: 'paired_t', alternative: 'two_sided', theta0: 0, theta1: 2, sigma: 5, alpha_max: 0.05, beta_max: 0.1, data: { n: 20, mean: 1.5, sd: 5 } },
  { family: 'two_means_pooled', alternative: 'less', theta0: 0, theta1: -3, sigma: 6, ratio: 2, alpha_max: 0.1, beta_max: 0.1, data: { n1: 40, mean1: 39.4, sd1: 6.3, n2: 80, mean2: 42.1, sd2: 5.8 } },
  { family: 'two_means_welch', alternative: 'greater', theta0: 0, theta1: 4, sigma1: 6, sigma2: 10, ratio: 1.5, alpha_max: 0.05, beta_max: 0.1, data: { n1: 50, mean1: 3.1, sd1: 6.2, n2: 75, mean2: 0.2, sd2: 9.5 } },
  { family: 'two_means_welch', alternative: 'two_sided', theta0: 0, theta1: 5, sigma1: 8, sigma2: 12, alpha_max: 0.1, beta_max: 0.2 },
  { family: 'proportion_exact', alternative: 'greater', theta0: 0.75, theta1: 0.9, alpha_max: 0.05, beta_max: 0.1, data: { successes: 71, trials: 80 } },
  { family: 'proportion_exact', alternative: 'two_sided', theta0: 0.5, theta1: 0.7, alpha_max: 0.1, beta_max: 0.1 },
  { family: 'proportion_normal', alternative: 'less', theta0: 0.3, theta1: 0.2, alpha_max: 0.05, beta_max: 0.1, data: { successes: 52, trials: 200 } },
  { family: 'two_proportions', alternative: 'greater', p1: 0.6, p2: 0.45, alpha_max: 0.05, beta_max: 0.2, data: { successes1: 110, trials1: 180, successes2: 80, trials2: 180 } },
  { family: 'two_proportions', alternative: 'two_sided', p1: 0.3, p2: 0.2, ratio: 0.5, alpha_max: 0.1, beta_max: 0.1 },
  { family: 'mean_z', alternative: 'two_sided', theta0: 10, theta1: 11, sigma: 3, alpha_max: 0.05, beta_max: 0.1, data: { n: 200, mean: 10.1 } },
  { family: 'mean_t', alternative: 'greater', theta0: 0, theta1: 0.5, sigma: 1, weight: 0.7, alpha_max: 0.1, beta_max: 0.1, data: { n: 30, mean: 0.31, sd: 1.1 } },
];

const PAGE_FIELD = { theta0: 'theta0', theta1: 'theta1', sigma: 'sigma', sigma1: 'sigma1', sigma2: 'sigma2', p1: 'p1', p2: 'p2', ratio: 'ratio', alpha_max: 'alpha_max', beta_max: 'beta_max', weight: 'weight' };
const TITLES = { reject_h0: 'Reject H0', do_not_reject_h0: 'Do not reject H0', inconclusive: 'Inconclusive' };

async function enter(page, d) {
  await act(page, () => page.click('#new-design'));
  await act(page, () => page.click(`label.chip:has(input[name="family"][value="${d.family}"])`));
  await act(page, () => page.click(`label.chip:has(input[name="alternative"][value="${d.alternative}"])`));
  const oneProp = d.family === 'proportion_exact' || d.family === 'proportion_normal';
  for (const [k, v] of Object.entries(d)) {
    if (k === 'family' || k === 'alternative' || k === 'data') continue;
    let f = PAGE_FIELD[k];
    if (oneProp && k === 'theta0') f = 'p0';
    if (oneProp && k === 'theta1') f = 'p_alt';
    await type(page, `#f-${f}`, String(v));
  }
  for (const [k, v] of Object.entries(d.data || {})) await type(page, `#f-data-${k}`, String(v));
}

async function tableRow(page, label) {
  return page.evaluate((label) => {
    const th = [...document.querySelectorAll('#decide-table th')].find((e) => e.textContent === label);
    return th ? th.nextElementSibling.textContent : '';
  }, label);
}

function detailParts(detail) {
  const a = detail.match(/α\* = (\S+) \(/);
  const b = detail.match(/β\* = (\S+) \(/);
  const rule = detail.slice(detail.lastIndexOf('); ') + 3);
  return { alpha: a && a[1], beta: b && b[1], rule };
}

async function main() {
  if (!existsSync(join(dist, 'index.html'))) throw new Error('dist/index.html is missing: run scripts/build-page first');
  if (!existsSync(bin)) throw new Error('target/release/tern is missing: run cargo build --release --bin tern');
  const { child, url } = await startServer();
  console.log(`server pid ${child.pid} at ${url}`);
  const browser = await launch();
  const outcomes = new Set();
  try {
    const page = await (await browser.newContext({ viewport: { width: 1280, height: 900 } })).newPage();
    const errors = [];
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    page.on('pageerror', (e) => errors.push(String(e)));
    await page.goto(url);
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 20000 });

    for (const d of DESIGNS) {
      const name = `${d.family}/${d.alternative}${d.ratio ? ` ratio ${d.ratio}` : ''}${d.weight ? ` w ${d.weight}` : ''}`;
      const ans = cli(d);
      await enter(page, d);
      const ss = ans.sample_size;
      const head = await text(page, '#size-headline');
      if (ss.youden) {
        const m = head.match(/n = (\d+)/);
        const all = head.match(/\((\d+) in all\)/);
        check(`${name}: Youden n`, m && Number(m[1]) === ss.youden.n1 && (!all || Number(all[1]) === ss.youden.n_total), `page "${head}" vs CLI ${JSON.stringify(ss.youden)}`);
        // α*, β* and c* at the Youden n: the CLI asked at that n.
        const at = cli({ ...Object.fromEntries(Object.entries(d).filter(([k]) => k !== 'data')), n: ss.youden.n1 }).at_n;
        const p = detailParts(await text(page, '#size-detail'));
        check(`${name}: α* at Youden n`, same(p.alpha, at.alpha), `page ${p.alpha} vs CLI ${at.alpha}`);
        check(`${name}: β* at Youden n`, same(p.beta, at.beta), `page ${p.beta} vs CLI ${at.beta}`);
        compareRule(`${name}: at Youden n`, p.rule, at.rule);
      } else {
        check(`${name}: no Youden n`, /No sample size/.test(head), head);
      }
      const conv = await text(page, '#size-conventional');
      if (ss.conventional) {
        const m = conv.match(/needs n = (\d+)/);
        check(`${name}: conventional n`, m && Number(m[1]) === ss.conventional.n1, `page "${conv}" vs CLI ${JSON.stringify(ss.conventional)}`);
      } else {
        check(`${name}: no conventional n`, conv === '', conv);
      }
      if (ans.decision) {
        const dec = ans.decision;
        outcomes.add(dec.outcome);
        const title = await text(page, '#decide-title');
        check(`${name}: outcome ${dec.outcome}`, title === TITLES[dec.outcome], `page "${title}"`);
        const a = await tableRow(page, 'α* at this sample size');
        const b = await tableRow(page, 'β* at this sample size');
        check(`${name}: α* at the data's n`, same(a, dec.at_n.alpha), `page ${a} vs CLI ${dec.at_n.alpha}`);
        check(`${name}: β* at the data's n`, same(b, dec.at_n.beta), `page ${b} vs CLI ${dec.at_n.beta}`);
        compareRule(`${name}: at the data's n`, await tableRow(page, 'rule for this sample'), dec.at_n.rule);
      }
    }
    for (const o of Object.keys(TITLES)) check(`outcome ${o} covered`, outcomes.has(o));

    // The balancing-weight suggestion: one click sets w and recomputes.
    const d = DESIGNS[0];
    const bw = cli(d).sample_size.balancing_weight;
    await enter(page, d);
    const btn = page.locator('#use-balancing-weight');
    check('balancing weight offered', bw !== null && (await btn.isVisible()) && same(await btn.getAttribute('data-weight'), bw), `CLI ${bw}`);
    await page.evaluate(() => document.getElementById('w-weight').scrollIntoView({ block: 'center' }));
    await page.screenshot({ path: join(artifacts, 'weight-input.png') });
    await act(page, () => btn.click());
    const w = Number(await page.inputValue('#f-weight'));
    const withW = cli({ ...d, weight: w });
    const t = await text(page, '#size-headline');
    check('balancing weight applied: Youden n follows', withW.sample_size.youden ? t.includes(`n = ${withW.sample_size.youden.n1}`) : /No sample size/.test(t), `w ${w}: page "${t}" vs CLI ${JSON.stringify(withW.sample_size.youden)}`);
    // A weight out of range is flagged beside it, and the page computes again once fixed.
    await type(page, '#f-weight', '1.5');
    check('weight out of range: message beside it', (await text(page, '#m-weight')).length > 0, await text(page, '#m-weight'));
    await type(page, '#f-weight', '0.5');
    check('weight fixed: message gone, Youden n back', (await text(page, '#m-weight')) === '' && (await text(page, '#size-headline')).includes(`n = ${cli(d).sample_size.youden.n1}`), await text(page, '#size-headline'));
    await reportParity(page);
    check('no console errors', errors.length === 0, errors.join(' | '));
  } finally {
    await browser.close();
    await stopServer(child);
  }
}

// The page's report against `tern report` for the request it was built
// from: the HTML and Markdown downloads equal the command line's output
// apart from the date line, and preparing and saving make no request.
async function reportParity(page) {
  await act(page, () => page.click('#load-demo'));
  await page.fill('#f-planning_source', 'Pilot study at the Riverside clinic, 2025 (24 patients)');
  await page.fill('#f-limits_reason', 'A missed benefit and a false alarm cost about the same.');
  await type(page, '#f-dropout', '15%');
  await type(page, '#f-interval_level', '0.95');
  const requests = [];
  const onRequest = (r) => requests.push(r.url());
  page.on('request', onRequest);
  await page.click('#report-prepare');
  await page.waitForSelector('#report-title', { timeout: 20000 });
  const saved = {};
  for (const [id, format] of [['#report-html', 'html'], ['#report-md', 'md'], ['#report-json', 'json']]) {
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click(id)]);
    saved[format] = readFileSync(await dl.path(), 'utf8');
    check(`report: ${format} file name`, dl.suggestedFilename() === `tern-report-${new Date().toISOString().slice(0, 10)}.${format}`, dl.suggestedFilename());
  }
  page.off('request', onRequest);
  check('report: preparing and saving make no request', requests.length === 0, requests.join(' '));
  const json = JSON.parse(saved.json);
  const request = { ...json.design, ...(json.report.notes ? { notes: json.report.notes } : {}) };
  check('report: the page kept the typed words and level', request.planning_source.startsWith('Pilot study') && request.dropout === 0.15 && request.interval_level === 0.95, JSON.stringify(request));
  const file = join(artifacts, 'report-request.json');
  writeFileSync(file, JSON.stringify(request, null, 2));
  const undated = (t) => t.replace(/ on \d{4}-\d{2}-\d{2}\./g, ' on DATE.');
  for (const format of ['html', 'md']) {
    const cliText = execFileSync(bin, ['report', file, '--format', format], { encoding: 'utf8' });
    const same = undated(cliText) === undated(saved[format]);
    check(`report: the page's ${format} equals tern report's apart from the date`, same, same ? '' : firstDifference(undated(cliText), undated(saved[format])));
  }
  const cliJson = JSON.parse(execFileSync(bin, ['report', file, '--format', 'json'], { encoding: 'utf8' }));
  // The figures agree to 1e-12 relative, not bit for bit: the page's
  // WebAssembly uses Rust's own libm and the command line the system's,
  // which differ in the last bits of exp and log. Every shown figure is
  // rounded far above that, as the HTML and Markdown equality shows.
  const diffs = [];
  const near = (a, b, path) => {
    if (typeof a === 'number' && typeof b === 'number') {
      if (!(a === b || Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b)))) diffs.push(`${path}: ${a} vs ${b}`);
    } else if (a && b && typeof a === 'object' && typeof b === 'object') {
      for (const k of new Set([...Object.keys(a), ...Object.keys(b)])) near(a[k], b[k], `${path}.${k}`);
    } else if (a !== b) diffs.push(`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`);
  };
  near(cliJson.answer, json.answer, 'answer');
  check("report: the page's JSON carries tern report's answer (1e-12 relative)", diffs.length === 0, diffs.slice(0, 5).join('; '));
  await page.click('#report-close');
}

function firstDifference(a, b) {
  let i = 0;
  while (i < a.length && a[i] === b[i]) i++;
  return `first difference at ${i}: CLI "${a.slice(i, i + 80)}" vs page "${b.slice(i, i + 80)}"`;
}

await run('parity', main);
