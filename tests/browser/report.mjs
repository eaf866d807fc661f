// The report's print check: the command line's HTML report of the demo
// design, opened in Debian's headless chromium and printed to PDF, read
// back with Debian's poppler-utils.
//
// Checks: the report loads with its own content policy in force and makes
// no request but the document itself; axe-core finds no accessibility
// violation; every inline chart has a viewBox and renders with a nonzero
// box; printed for A4 and for US Letter it fits in 4 pages, and
// `pdftotext -layout` finds the numbers `tern run` gives for the same
// design (the Youden n, the threshold c* on the estimate's scale, α*, β*,
// the confidence interval's bounds, the p-value in APA style, the number
// to enrol). The pages are rendered with `pdftoppm` to
// tests/artifacts/report-page-N.png (A4) and report-letter-page-N.png, to
// be looked at; the report's HTML and both PDFs are kept there too.
//
// Usage: node tests/browser/report.mjs   (after
// `cargo build --release --bin tern`; scripts/test-page does both)

import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { root, artifacts, launch, check, run } from './lib.mjs';

mkdirSync(artifacts, { recursive: true });

const tern = join(root, 'target', 'release', 'tern');
const axePath = join(root, 'node_modules', 'axe-core', 'axe.min.js');

// The demo design with the report's own fields: a fictional clinic.
function design() {
  const demo = JSON.parse(readFileSync(join(root, 'examples', 'clinic-recovery.json'), 'utf8'));
  return {
    ...demo,
    unit: 'days',
    dropout: 0.15,
    planning_source: 'pilot study at the Eastbrook physiotherapy clinic, 2025 (24 patients)',
    limits_reason: 'a missed improvement and a needless change of schedule cost the clinic about the same',
    notes: 'The Eastbrook clinic (a fictional clinic) compares the recovery time after knee surgery under a new physiotherapy schedule (group 1) with the usual one (group 2).',
  };
}

// Numbers as the report prints them. The minus sign is U+2212.
const minus = (s) => s.replace(/^-/, '\u2212');
// Three significant figures, as the report's tables give rates and thresholds.
const sig3 = (x) => minus(String(Number(x.toPrecision(3))));
// Fixed decimals.
const fixed = (x, d) => minus(x.toFixed(d));
// About three significant figures, two to six decimals: interval bounds
// (APA 7th ed., section 6.36; the report's `apa::decimals_for`).
const decimalsFor = (x) => {
  const a = Math.abs(x);
  if (!Number.isFinite(a) || a >= 10 || a === 0) return 2;
  return Math.min(6, Math.max(2, 2 - Math.floor(Math.log10(a))));
};
// A p-value in APA style (7th ed., section 6.36): no leading zero, three
// decimals, "p < .001" below .001.
const apaP = (p) => (p < 0.001 ? 'p < .001' : p > 0.999 ? 'p > .999' : `p = ${p.toFixed(3).replace(/^0/, '')}`);
const percent = (x) => `${Number((x * 100).toFixed(2))}%`;

// The PDF's text, whitespace runs collapsed to one space.
function pdfText(file) {
  return execFileSync('pdftotext', ['-layout', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

function pages(file) {
  const info = execFileSync('pdfinfo', [file], { encoding: 'utf8' });
  return Number((info.match(/^Pages:\s+(\d+)/m) || [])[1]);
}

async function main() {
  if (!existsSync(tern)) throw new Error('target/release/tern is missing: run cargo build --release --bin tern first');
  if (!existsSync(axePath)) throw new Error('node_modules/axe-core is missing: run scripts/install-tools first');
  const dir = mkdtempSync(join(tmpdir(), 'tern-report-'));
  const file = join(dir, 'design.json');
  writeFileSync(file, JSON.stringify(design(), null, 2));
  const html = join(artifacts, 'report.html');
  execFileSync(tern, ['report', file, '--format', 'html', '--out', html]);
  const answer = JSON.parse(execFileSync(tern, ['run', file], { encoding: 'utf8' }));
  rmSync(dir, { recursive: true, force: true });

  // What the PDF must say, from `tern run`'s answer to the same design.
  const at = answer.at_n;
  const d = answer.decision;
  const ci = d.interval;
  const ciDecimals = Math.max(decimalsFor(ci.low), decimalsFor(ci.high));
  const youden = answer.sample_size.youden;
  const enrol = answer.enrolment.enrol;
  const expected = [
    ['the smallest conclusive n (Youden)', `n = ${youden.n1} in each group (${youden.n_total} in all)`],
    ['the threshold c* on the estimate scale', `below ${sig3(at.rule.estimate)} days`],
    ['the threshold on the statistic scale', `t < ${sig3(at.rule.statistic)}`],
    ['α*', `α* = ${sig3(at.alpha)}`],
    ['β*', `β* = ${sig3(at.beta)}`],
    ['the confidence interval', `${percent(ci.level)} CI [${fixed(ci.low, ciDecimals)}, ${fixed(ci.high, ciDecimals)}] days`],
    ['the statistic in APA style', `t(${at.df}) = ${fixed(d.statistic, 2)}`],
    ['the p-value in APA style', apaP(d.conventional.p_value)],
    ['the number to enrol', `enrol ${enrol.n1} in each group (${enrol.n_total} in all)`],
    ['the dropout share', `dropout of ${percent(answer.enrolment.dropout)}`],
  ];

  const browser = await launch();
  try {
    // 1. With the report's own content policy in force.
    const context = await browser.newContext({ viewport: { width: 1000, height: 900 } });
    const page = await context.newPage();
    const requests = [];
    const errors = [];
    page.on('request', (r) => requests.push(r.url()));
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    page.on('pageerror', (e) => errors.push(String(e)));
    const url = pathToFileURL(html).href;
    await page.goto(url, { waitUntil: 'load' });
    check('the report makes no request but the document itself', requests.length === 1 && requests[0] === url, requests.join(', '));
    check('no console error (content policy violations included)', errors.length === 0, errors.join(' | '));
    check('the report has no script', (await page.locator('script').count()) === 0);

    const svgs = await page.evaluate(() => [...document.querySelectorAll('svg')].map((s) => {
      const box = s.getBBox();
      const rect = s.getBoundingClientRect();
      return { id: s.closest('figure')?.id, viewBox: s.getAttribute('viewBox'), box: [box.width, box.height], rect: [rect.width, rect.height] };
    }));
    check('four inline charts', svgs.length === 4, JSON.stringify(svgs));
    for (const s of svgs) {
      check(`${s.id}: has a viewBox`, /^0 0 \d+ \d+$/.test(s.viewBox || ''), s.viewBox);
      check(`${s.id}: renders with a nonzero box`, s.box[0] > 0 && s.box[1] > 0 && s.rect[0] > 0 && s.rect[1] > 0, JSON.stringify(s));
    }

    for (const [format, name] of [['A4', 'report-page'], ['Letter', 'report-letter-page']]) {
      const pdf = join(artifacts, `report-${format.toLowerCase()}.pdf`);
      await page.pdf({ path: pdf, format });
      const count = pages(pdf);
      console.log(`${format}: ${count} pages`);
      check(`${format}: the demo's report fits in 4 pages`, count >= 1 && count <= 4, `${count} pages`);
      const text = pdfText(pdf);
      for (const [what, phrase] of expected) {
        check(`${format}: the PDF gives ${what}: "${phrase}"`, text.includes(phrase));
      }
      check(`${format}: the caution is printed`, text.includes(answer.caution.replace(/\s+/g, ' ').slice(0, 60)));
      for (const f of readdirSync(artifacts).filter((f) => f.startsWith(`${name}-`) && f.endsWith('.png'))) rmSync(join(artifacts, f));
      execFileSync('pdftoppm', ['-png', '-r', '60', pdf, join(artifacts, name)]);
      // pdftoppm numbers pages with as many digits as the count needs.
      for (const f of readdirSync(artifacts).filter((f) => f.startsWith(`${name}-`))) {
        const m = f.match(/-0*(\d+)\.png$/);
        if (m && f !== `${name}-${m[1]}.png`) execFileSync('mv', [join(artifacts, f), join(artifacts, `${name}-${m[1]}.png`)]);
      }
    }
    check('printing made no request either', requests.length === 1, requests.join(', '));
    await context.close();

    // 2. axe-core, injected as a script: the report's policy forbids
    // scripts, so this context alone bypasses it (the report itself has none).
    const axeContext = await browser.newContext({ bypassCSP: true });
    const axePage = await axeContext.newPage();
    await axePage.goto(url, { waitUntil: 'load' });
    await axePage.addScriptTag({ path: axePath });
    const result = await axePage.evaluate(async () => {
      const r = await window.axe.run(document, { resultTypes: ['violations'] });
      return { version: window.axe.version, violations: r.violations.map((v) => `${v.id} (${v.impact}): ${v.nodes.length} × ${v.nodes.slice(0, 3).map((n) => n.target.join(' ')).join('; ')}`) };
    });
    console.log(`axe-core ${result.version}`);
    check('axe-core: 0 violations', result.violations.length === 0, result.violations.join(' | '));
    await axeContext.close();
  } finally {
    await browser.close();
  }
}

await run('report', main, () => console.log(`report, PDFs and page images in ${artifacts}`));
