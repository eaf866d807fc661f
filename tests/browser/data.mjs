// Browser test of deciding from a data file (step 3, "From a data file"), in
// Debian's headless chromium driven by playwright-core, on the built page
// (dist/) served by its own static server (PID held, stopped at the end).
//
// Checks: the example data file loads with one click and decides (figures
// filled into the summary fields, marked, undoable); pasted CSV text; a
// dropped file (a DataTransfer dispatched as a drop event); a chosen file
// (setInputFiles); a file with problems lists row, column and value and
// leaving those rows out works; headers and cells with HTML or script show
// as text and run nothing (no dialog, no injected element); a binary file
// named .csv gives a message and the page still computes; a decimal-comma
// file read with the override; no console errors, no request off this
// machine. Screenshots of the data section under tests/artifacts/.
//
// Usage: node tests/browser/data.mjs   (after scripts/build-page)

import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { root, dist, artifacts, startServer, stopServer, launch, text, act, check, run, checkChartSaves } from './lib.mjs';

mkdirSync(artifacts, { recursive: true });


const loads = (page) => page.evaluate(() => Number(document.getElementById('app').dataset.fileLoads || 0));

// Run an action that reads a data file and wait until the page has read it.
async function loaded(page, action) {
  const before = await loads(page);
  await action();
  await page.waitForFunction((n) => Number(document.getElementById('app').dataset.fileLoads || 0) > n, before, { timeout: 20000 });
  return page.evaluate(() => document.getElementById('app').dataset.fileState);
}

const fieldValue = (page, name) => page.inputValue(`#f-data-${name}`);

// Drop a file on the drop zone as a browser would.
async function drop(page, name, content, type = 'text/csv') {
  return loaded(page, () => page.evaluate(({ name, content, type }) => {
    const dt = new DataTransfer();
    dt.items.add(new File([content], name, { type }));
    const zone = document.getElementById('drop-zone');
    zone.dispatchEvent(new DragEvent('dragover', { dataTransfer: dt, bubbles: true, cancelable: true }));
    zone.dispatchEvent(new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, { name, content, type }));
}

async function paste(page, content) {
  await page.evaluate(() => { document.getElementById('data-paste-box').open = true; });
  await page.fill('#data-paste', content);
  return loaded(page, () => page.click('#data-paste-read'));
}

async function choose(page, name, buffer, mimeType = 'text/csv') {
  return loaded(page, () => page.setInputFiles('#data-file', { name, mimeType, buffer }));
}

// The caution bar sticks to the bottom of the window; it is laid out in
// place for the capture only (through the CSSOM: the page's policy refuses
// style tags).
async function shot(page, name) {
  await page.evaluate(() => { document.querySelector('.caution').style.position = 'static'; });
  await page.locator('#step-decide').screenshot({ path: join(artifacts, name) });
  await page.evaluate(() => { document.querySelector('.caution').style.position = ''; });
}

async function main() {
  if (!existsSync(join(dist, 'index.html'))) throw new Error('dist/index.html is missing: run scripts/build-page first');
  const { child, url } = await startServer();
  console.log(`server pid ${child.pid} at ${url}`);
  const browser = await launch();
  try {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 1 });
    const page = await context.newPage();
    const errors = [];
    const offsite = [];
    const dialogs = [];
    page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
    page.on('pageerror', (e) => errors.push(String(e)));
    page.on('dialog', async (d) => { dialogs.push(d.message()); await d.dismiss(); });
    page.on('request', (r) => { if (!r.url().startsWith(url) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) offsite.push(r.url()); });
    await page.goto(url);
    await page.waitForSelector('#app[data-ready="true"]', { timeout: 20000 });

    // 1. The example data file, one click, decides.
    const typedBefore = await fieldValue(page, 'mean1');
    const state = await loaded(page, () => page.click('#data-demo'));
    check('example: read', state === 'ready', state);
    const src = await text(page, '#data-source');
    check('example: 116 rows, 5 columns', /116 data rows, 5 columns/.test(src), src);
    check('example: group sizes 56 and 56 filled', (await fieldValue(page, 'n1')) === '56' && (await fieldValue(page, 'n2')) === '56', `${await fieldValue(page, 'n1')} ${await fieldValue(page, 'n2')}`);
    const mean1 = Number(await fieldValue(page, 'mean1'));
    check('example: mean of group 1 is 39.375', Math.abs(mean1 - 39.375) < 1e-9, String(mean1));
    check('example: the fields are marked as from the file', await page.locator('#w-data-mean1.from-file').count() === 1);
    check('example: the note names the file', /clinic-recovery-data\.csv/.test(await text(page, '#data-fill-text')), await text(page, '#data-fill-text'));
    const title = await text(page, '#decide-title');
    check('example: decision shown', ['Reject H0', 'Do not reject H0', 'Inconclusive'].includes(title), title);
    const summary = await text(page, '#data-summary');
    check('example: summary per group', /early loading/.test(summary) && /standard/.test(summary) && /39\.4/.test(summary), summary.slice(0, 200));
    const ink = await page.evaluate(() => {
      const c = document.getElementById('chart-histogram');
      const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
      let k = 0;
      for (let i = 0; i < d.length; i += 4) if (d[i] < 235 || d[i + 1] < 235 || d[i + 2] < 235) k += 1;
      return k / (d.length / 4);
    });
    check('example: histogram drawn', ink > 0.02, String(ink));
    check('example: quantile plot has its table', await page.locator('#table-quantile table').count() === 1);
    check('example: the two protocols were picked as groups', /early loading/.test(await text(page, '#data-mapping')));
    await shot(page, 'data-example.png');
    // The data file's charts save as SVG and PNG like the design's.
    for (const name of ['histogram', 'quantile']) await checkChartSaves(page, name);

    // Undo puts back what was typed before, and "use again" refills.
    await act(page, () => page.click('#data-fill-undo'));
    check('undo: typed figures back', (await fieldValue(page, 'mean1')) === typedBefore && typedBefore === '39.4', `${await fieldValue(page, 'mean1')} vs ${typedBefore}`);
    check('undo: no field marked', await page.locator('.from-file').count() === 0);
    await act(page, () => page.click('#data-fill-use'));
    check('use again: file figures back', (await fieldValue(page, 'n1')) === '56');
    // A figure the user edits is theirs: the mark goes.
    await act(page, async () => { await page.fill('#f-data-sd2', '5.9'); });
    check('edit: the edited field is no longer marked', await page.locator('#w-data-sd2.from-file').count() === 0 && await page.locator('#w-data-sd1.from-file').count() === 1);

    // A family change remaps: two proportions from the yes/no column.
    await act(page, () => page.click('label.chip:has(input[name="family"][value="two_proportions"])'));
    const s1 = await fieldValue(page, 'successes1');
    check('two proportions: successes filled from the yes/no column', s1 === '38', s1);
    check('two proportions: no value charts for yes/no outcomes', await page.locator('#data-charts').isHidden());
    await shot(page, 'data-two-proportions.png');
    await act(page, () => page.click('label.chip:has(input[name="family"][value="two_means_pooled"])'));
    check('edit: the file does not overwrite a typed figure', (await fieldValue(page, 'sd2')) === '5.9' && (await fieldValue(page, 'n2')) === '56', await fieldValue(page, 'sd2'));

    // 2. Pasted CSV text.
    await page.click('#new-design');
    await act(page, () => page.click('label.chip:has(input[name="family"][value="mean_t"])'));
    const st2 = await paste(page, 'score\n4.1\n5.2\n3.9\n6.0\n5.5\n');
    check('paste: read', st2 === 'ready', st2);
    check('paste: n and mean filled', (await fieldValue(page, 'n')) === '5' && Math.abs(Number(await fieldValue(page, 'mean')) - 4.94) < 1e-9, `${await fieldValue(page, 'n')} ${await fieldValue(page, 'mean')}`);

    // Per-split scores of two learners (an invented lab's 2 × 5-fold run):
    // the differences decide the cross-validated comparison.
    await page.click('#new-design');
    await act(page, () => page.click('label.chip:has(input[name="family"][value="two_learners_cv"])'));
    await act(page, () => page.click('label.chip:has(input[name="alternative"][value="greater"])'));
    for (const [id, v] of [['#f-theta0', '0'], ['#f-theta1', '0.03'], ['#f-sigma', '0.02'], ['#f-folds', '5'], ['#f-alpha_max', '0.1'], ['#f-beta_max', '0.2']]) await page.fill(id, v);
    const scores = [[0.912, 0.881], [0.905, 0.889], [0.921, 0.874], [0.899, 0.892], [0.915, 0.870], [0.908, 0.884], [0.917, 0.879], [0.902, 0.895], [0.919, 0.868], [0.910, 0.886]];
    const st2c = await paste(page, 'split,model_a,model_b\n' + scores.map((r, i) => `rep${Math.floor(i / 5) + 1}-fold${(i % 5) + 1},${r[0]},${r[1]}`).join('\n') + '\n');
    const diffs = scores.map(([a, b]) => a - b);
    const meanDiff = diffs.reduce((x, y) => x + y, 0) / diffs.length;
    check('per-split scores: read as two score columns', st2c === 'ready', st2c);
    check('per-split scores: J and the mean difference filled', (await fieldValue(page, 'n')) === '10' && Math.abs(Number(await fieldValue(page, 'mean')) - meanDiff) < 1e-9, `${await fieldValue(page, 'n')} ${await fieldValue(page, 'mean')} vs ${meanDiff}`);
    const cvTitle = await page.locator('#decide-title').innerText();
    check('per-split scores: the cross-validated comparison decides', /Reject H0|Do not reject H0|Inconclusive/.test(cvTitle), cvTitle);
    await page.click('#new-design');
    await act(page, () => page.click('label.chip:has(input[name="family"][value="mean_t"])'));

    // Cells copied from a spreadsheet: tabs between columns, decimal commas.
    const st2b = await paste(page, 'arm\tscore\nA\t4,5\nA\t5,5\nB\t3,0\n');
    check('paste from a spreadsheet: tabs and decimal commas', st2b === 'ready' && await page.locator('input[name="dr-delimiter"][value="tab"]').isChecked() && (await fieldValue(page, 'mean')) === '4.333333333', `${st2b} ${await fieldValue(page, 'mean')}`);

    // 3. A dropped file (semicolons, decimal commas).
    const st3 = await drop(page, 'scores.csv', 'id;score\n1;4,5\n2;5,25\n3;3,75\n4;6,5\n');
    check('drop: read', st3 === 'ready', st3);
    check('drop: semicolon found', (await page.locator('input[name="dr-delimiter"][value=";"]').isChecked()));
    check('drop: decimal comma found', (await page.locator('input[name="dr-decimal"][value="comma"]').isChecked()));
    const m3 = Number(await fieldValue(page, 'mean'));
    check('drop: mean of 4,5 5,25 3,75 6,5 is 5', Math.abs(m3 - 5) < 1e-9, String(m3));
    // The override: read the same file with a decimal point.
    await loaded(page, () => page.click('label.chip:has(input[name="dr-decimal"][value="point"])'));
    check('override: decimal point chosen', await page.locator('input[name="dr-decimal"][value="point"]').isChecked());

    // 4. A chosen file, with problems.
    const bad = 'patient,group,days\nA1,new,40\nA2,new,forty-one\nA3,old,44\nA4,old,\nA5,new,38\nA6,old,n/a?\nA7,new,39\nA8,old,45\n';
    await act(page, () => page.click('label.chip:has(input[name="family"][value="two_means_pooled"])'));
    const st4 = await choose(page, 'problems.csv', Buffer.from(bad));
    check('choose: read', st4 === 'ready', st4);
    const probs = await text(page, '#data-problems');
    check('problems: row, column and value listed', /forty-one/.test(probs) && /days/.test(probs) && /\b3\b/.test(probs), probs.slice(0, 300));
    check('problems: total counted', /2 problems in 2 rows/.test(probs), probs.slice(0, 120));
    await shot(page, 'data-problems.png');
    const nBefore = Number(await fieldValue(page, 'n1')) + Number(await fieldValue(page, 'n2'));
    await act(page, () => page.check('#data-exclude'));
    const excludedNote = await text(page, '#data-notes');
    check('exclude: rows left out and said so', /left out/.test(excludedNote), excludedNote);
    const nAfter = Number(await fieldValue(page, 'n1')) + Number(await fieldValue(page, 'n2'));
    check('exclude: the sizes did not grow', nAfter <= nBefore, `${nBefore} -> ${nAfter}`);

    // The missing-value list is editable: "forty-one" read as missing.
    await loaded(page, async () => { await page.fill('#data-missing', 'NA\nforty-one'); await page.locator('#data-missing').blur(); });
    const probs2 = await text(page, '#data-problems');
    check('missing list: an added token is no longer a problem', /1 problem in 1 row/.test(probs2) && !/forty-one/.test(probs2), probs2.slice(0, 120));
    check('missing list: leaving rows out is still chosen after reading again', await page.locator('#data-exclude').isChecked());
    await loaded(page, async () => { await page.fill('#data-missing', 'NA\nN/A\nNaN\n.\n-'); await page.locator('#data-missing').blur(); });

    // 5. HTML and script in headers and cells stay text.
    const xss = '"<img src=x onerror=alert(1)>",<script>alert(2)</script>,value\n"<b>bold</b>",a,1\n"<img src=y onerror=alert(3)>",b,2\n"<svg onload=alert(4)>",a,3\nz,b,4\n';
    const st5 = await drop(page, '<img src=x onerror=alert(5)>.csv', xss);
    check('xss: read', st5 === 'ready', st5);
    await page.evaluate(() => { document.getElementById('data-preview-box').open = true; });
    await page.waitForTimeout(300);
    const injected = await page.evaluate(() => document.querySelectorAll('#app img, #app script, #app svg, #data-preview b, #data-columns b, #data-source b').length);
    check('xss: no element injected', injected === 0, String(injected));
    const shown = await text(page, '#data-preview');
    check('xss: header shown as text', shown.includes('<img src=x onerror=alert(1)>'), shown.slice(0, 200));
    check('xss: cells shown as text', shown.includes('<svg onload=alert(4)>') && shown.includes('<b>bold</b>'));
    check('xss: file name shown as text', (await text(page, '#data-source')).includes('<img src=x onerror=alert(5)>.csv'));
    check('xss: no dialog', dialogs.length === 0, dialogs.join(' | '));
    await shot(page, 'data-xss.png');

    // 6. Spreadsheets: .xlsx with a sheet picker, .ods, a truncated .xlsx.
    const corpus = (f) => readFileSync(join(root, 'tests', 'data_files', f));
    const XLSX = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';
    const st8 = await choose(page, 'valid.xlsx', corpus('valid.xlsx'), XLSX);
    check('xlsx: read', st8 === 'ready' && /Excel workbook/.test(await text(page, '#data-source')), `${st8}: ${await text(page, '#data-source')}`);
    check('xlsx: both sheets offered', await page.locator('input[name="dr-sheet"]').count() === 2);
    await loaded(page, () => page.click('label.chip:has(input[name="dr-sheet"][value="Dose"])'));
    check('xlsx: the other sheet read', /sheet “Dose”, 3 data rows/.test(await text(page, '#data-source')), await text(page, '#data-source'));
    await shot(page, 'data-xlsx.png');
    const st9 = await choose(page, 'valid.ods', corpus('valid.ods'), 'application/vnd.oasis.opendocument.spreadsheet');
    check('ods: read', st9 === 'ready' && /OpenDocument/.test(await text(page, '#data-source')), `${st9}: ${await text(page, '#data-source')}`);
    const st10 = await choose(page, 'truncated.xlsx', corpus('truncated.xlsx'), XLSX);
    check('truncated xlsx: a message, the last table kept', st10 === 'error' && /could not be read/.test(await text(page, '#data-alert')) && /valid\.ods/.test(await text(page, '#data-source')), `${st10}: ${await text(page, '#data-alert')}`);
    // The spreadsheet reader (the page's second WebAssembly module) failed
    // to start: a message asking for CSV, the last table kept.
    await page.evaluate(() => {
      window.ternSheetsKept = globalThis.ternSheets;
      globalThis.ternSheets = Promise.reject(new Error('no module in this test'));
      globalThis.ternSheets.catch(() => {});
    });
    const st10b = await choose(page, 'valid.xlsx', corpus('valid.xlsx'), XLSX);
    const alert10b = await text(page, '#data-alert');
    check('spreadsheet reader failed to start: a message asking for CSV, the last table kept', st10b === 'error' && /could not start/.test(alert10b) && /CSV/.test(alert10b) && /valid\.ods/.test(await text(page, '#data-source')), `${st10b}: ${alert10b}`);
    await page.evaluate(() => { globalThis.ternSheets = window.ternSheetsKept; });

    // 7. Paired columns: rows with one side missing are dropped and counted.
    await act(page, () => page.click('label.chip:has(input[name="family"][value="paired_t"])'));
    const st11 = await choose(page, 'paired.csv', corpus('paired.csv'));
    check('paired: read', st11 === 'ready', st11);
    check('paired: before and after picked', await page.locator('input[name="dm-first"][value="before"]').isChecked() && await page.locator('input[name="dm-second"][value="after"]').isChecked());
    check('paired: 4 pairs, 2 rows dropped and said so', (await fieldValue(page, 'n')) === '4' && /\b2 row.*paired.*left out/.test(await text(page, '#data-notes')), `${await fieldValue(page, 'n')}: ${await text(page, '#data-notes')}`);
    await shot(page, 'data-paired.png');
    await act(page, () => page.click('label.chip:has(input[name="family"][value="two_means_pooled"])'));

    // A cell of many kilobytes is shortened on the page (the file is not).
    const st12 = await choose(page, 'long_field.csv', corpus('long_field.csv'));
    const longest = await page.evaluate(() => Math.max(0, ...[...document.querySelectorAll('#data-preview td')].map((td) => td.textContent.length)));
    check('long cell: read, shown shortened', st12 === 'ready' && longest <= 61, `${st12}, longest cell ${longest} characters`);

    // 8. A binary file named .csv: a message, the page still computes.
    const junk = Buffer.from(Array.from({ length: 4096 }, (_, i) => (i * 7919 + 13) % 256));
    const st6 = await choose(page, 'photo.csv', junk, 'text/csv');
    check('binary: refused with a message', st6 === 'error' && /could not be read/.test(await text(page, '#data-alert')), `${st6}: ${await text(page, '#data-alert')}`);
    await page.click('#load-demo');
    await page.waitForTimeout(300);
    await act(page, () => page.fill('#f-beta_max', '0.05'));
    check('binary: the page still computes', /n = \d+/.test(await text(page, '#size-headline')), await text(page, '#size-headline'));

    // 9. The example as a chosen file.
    const example = readFileSync(join(root, 'examples', 'clinic-recovery-data.csv'));
    const st7 = await choose(page, 'clinic-recovery-data.csv', example);
    check('choose: the example file as a file', st7 === 'ready' && (await fieldValue(page, 'n1')) === '56', st7);
    await shot(page, 'data-section.png');
    // A narrow window: the section still lays out (screenshot only).
    await page.setViewportSize({ width: 420, height: 900 });
    await page.waitForTimeout(300);
    await shot(page, 'data-section-narrow.png');
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    check('narrow: no sideways scrolling of the page', overflow <= 1, `${overflow} px`);
    await page.setViewportSize({ width: 1280, height: 900 });

    check('no console errors', errors.length === 0, errors.join(' | '));
    check('no request left this machine', offsite.length === 0, offsite.join(' '));
  } finally {
    await browser.close();
    await stopServer(child);
  }
}

await run('data', main, () => console.log(`screenshots in ${artifacts}`));
