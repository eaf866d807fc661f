// Turn trunk's output into Tern's two editions, private by construction.
//
//   node scripts/finish-page.mjs DIST            the served edition, in place
//   node scripts/finish-page.mjs DIST --single OUT.html
//                                                the one-file edition, from a
//                                                DIST already finished
//
// Served edition (DIST/): trunk's inline bootstrap fetch()es the .wasm,
// which a policy with connect-src 'none' forbids. So the module's bytes
// become a same-origin script (tern-HASH_wasm.js, base64), a small external
// boot script starts them with init({ module_or_path: bytes }), and the
// page's Content-Security-Policy allows scripts, styles and the manifest
// from the page's own folder only: no inline script, no connection. A
// service worker (sw.js) keeps exactly the files listed here for offline
// use, and a web app manifest makes the page installable. Every URL is
// relative, so DIST works from any folder of a static host.
//
// One-file edition (OUT.html): the same page with the style sheet, the
// wasm-bindgen glue (exports removed), the base64 module and the boot code
// inlined; its policy allows exactly those inline blocks by their
// SHA-256 hashes. No service worker and no manifest: it works from file://.
//
// The spreadsheet reader (.xlsx, .ods) is a second WebAssembly module,
// built by scripts/build-sheets into target/sheets-web/, so that the main
// module stays small. It ships the same way (served: sheets-HASH.js glue,
// sheets-HASH_module.js base64, sheets-boot-HASH.js, listed in the page
// after the main boot script and kept by the service worker; one file: a
// second inline module script, allowed by its own hash). Its boot sets
// globalThis.ternSheets to a promise of its exports, which the main module
// awaits when a spreadsheet arrives (src/web/datafile/sheets.rs). It is
// started during page load, after the main module, and never fetch()ed.
//
// The simulation check runs in Web Workers that instantiate the page's own
// module: the boot code compiles the module once, leaves it in
// globalThis.ternModule (posted to each worker, which instantiates it
// without compiling again) and the worker script's URL in
// globalThis.ternWorkerUrl. Served: worker-HASH.js, a module worker that
// imports the glue (allowed by worker-src 'self'). One file: the worker's
// source (the glue as a plain module body, then the worker code) sits in a
// <script type="text/plain"> block, never executed in the page, turned
// into a Blob URL at boot (worker-src blob:) and started as a classic
// worker (globalThis.ternWorkerType); such a worker inherits the page's
// policy, so it may not connect anywhere either.
//
// Both carry <meta name="tern-build"> (a hash of the built files) and
// <meta name="tern-edition">, which the page shows beside its version.

import { createHash } from 'node:crypto';
import { copyFileSync, readFileSync, readdirSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { SERVED_POLICY, policy } from './page-policy.mjs';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');

/** The one-file edition's policy: its inline scripts and style by hash, nothing else. */
const singlePolicy = (scriptHashes, styleHash) =>
  policy({ scripts: scriptHashes.map((h) => `'${h}'`).join(' '), styles: `'${styleHash}'`, images: 'data:', manifest: "'none'", worker: 'blob:' });

/**
 * The page's worker code after its glue: the first message brings the
 * compiled module, every other one a chunk of a simulation check's blocks
 * (src/web/simulation.rs) or a sample-size search (`search`: the design,
 * src/web/search.rs, with its progress passed on at most every 100 ms);
 * `initName` is the glue's init.
 */
const workerBody = (initName) => [
  'let ready = null;',
  'self.onmessage = async (event) => {',
  '  const m = event.data;',
  `  if (m.module) { ready = ${initName}({ module_or_path: m.module }); return; }`,
  '  try {',
  '    await ready;',
  '    if (m.search !== undefined) {',
  '      let last = 0;',
  '      const tell = (progress) => {',
  '        const t = performance.now();',
  '        if (t - last >= 100) { last = t; postMessage({ job: m.job, progress }); }',
  '      };',
  `      postMessage({ job: m.job, found: ${SEARCH_EXPORT}(m.search, tell) });`,
  '      return;',
  '    }',
  '    const t0 = performance.now();',
  '    const tally = tern_simulate_blocks(m.request, m.groups, m.first, m.last);',
  '    postMessage({ job: m.job, first: m.first, last: m.last, tally, ms: performance.now() - t0 });',
  '  } catch (e) {',
  '    postMessage({ job: m.job, first: m.first, last: m.last, error: String((e && e.message) || e) });',
  '  }',
  '};',
  '',
].join('\n');
const WORKER_EXPORT = 'tern_simulate_blocks';
const SEARCH_EXPORT = 'tern_search';

const sha256 = (text) => `sha256-${createHash('sha256').update(text).digest('base64')}`;
const shortHash = (...parts) => {
  const h = createHash('sha256');
  for (const p of parts) h.update(p);
  return h.digest('hex').slice(0, 16);
};

function fail(message) {
  console.error(`finish-page: ${message}`);
  process.exit(1);
}

function one(list, what) {
  if (list.length !== 1) fail(`expected exactly one ${what}, found ${list.length} (${list.join(', ')})`);
  return list[0];
}

function setPolicy(html, policy) {
  const re = /<meta http-equiv="Content-Security-Policy" content="[^"]*">/;
  if (!re.test(html)) fail('index.html has no <meta http-equiv="Content-Security-Policy" content="..."> to set');
  return html.replace(re, `<meta http-equiv="Content-Security-Policy" content="${policy}">`);
}

function setMeta(html, name, content) {
  const tag = `<meta name="${name}" content="${content}">`;
  const re = new RegExp(`<meta name="${name}" content="[^"]*">`);
  return re.test(html) ? html.replace(re, tag) : html.replace('</title>', `</title>\n  ${tag}`);
}

// How the boot code turns base64 into bytes: the native decoder where the
// browser has one, else atob.
const decode = (v) => `(Uint8Array.fromBase64 ? Uint8Array.fromBase64(${v}) : Uint8Array.from(atob(${v}), (c) => c.charCodeAt(0)))`;
const DECODE = decode('TERN_WASM_BASE64');

// The spreadsheet reader, as scripts/build-sheets left it.
const SHEETS_DIR = join(root, 'target', 'sheets-web');
function sheetsBuild() {
  const glue = join(SHEETS_DIR, 'tern_sheets.js');
  const wasm = join(SHEETS_DIR, 'tern_sheets_bg.wasm');
  let files;
  try {
    files = { glue: readFileSync(glue, 'utf8'), wasm: readFileSync(wasm) };
  } catch {
    fail(`the spreadsheet reader is not built (${glue}, ${wasm}): run scripts/build-sheets`);
  }
  return files;
}
const SHEETS_EXPORT = 'read_sheet_json';

function served(dist) {
  let html = readFileSync(join(dist, 'index.html'), 'utf8');
  const files = readdirSync(dist);
  const wasmName = one(files.filter((f) => f.endsWith('.wasm')), '.wasm file from trunk (was DIST already finished?)');
  const glueName = one(files.filter((f) => /^tern-[0-9a-f]+\.js$/.test(f)), 'wasm-bindgen glue tern-HASH.js');
  const cssName = one(files.filter((f) => f.endsWith('.css')), 'style sheet');
  const wasm = readFileSync(join(dist, wasmName));
  const glue = readFileSync(join(dist, glueName), 'utf8');
  const css = readFileSync(join(dist, cssName), 'utf8');

  // trunk's bootstrap: one inline module script that fetches the .wasm,
  // and preload links for the glue and the .wasm (a fetch, too).
  const inline = html.match(/<script type="module"[^>]*>[\s\S]*?<\/script>/g) || [];
  if (inline.length !== 1 || !inline[0].includes(glueName)) fail(`expected trunk's one inline bootstrap importing ${glueName}`);
  html = html.replace(inline[0], '');
  html = html.replace(/<link rel="(modulepreload|preload)"[^>]*>\s*/g, '');
  if (/<script(?![^>]*\bsrc=)/.test(html)) fail('an inline <script> is left in index.html; the policy would block it');
  // The blank lines the removed tags leave in <head>.
  const headEnd = html.indexOf('</head>');
  html = html.slice(0, headEnd).replace(/\n[ \t]*(?=\n)/g, '') + html.slice(headEnd);

  const base64 = wasm.toString('base64');
  const wasmJs = `// Tern's WebAssembly module (${wasm.length} bytes), as base64: a script the page's\n// policy allows, where a fetch() of the .wasm would be a connection it forbids.\nexport const TERN_WASM_BASE64 = "${base64}";\n`;
  const wasmJsName = glueName.replace(/\.js$/, '_wasm.js');
  for (const f of [WORKER_EXPORT, SEARCH_EXPORT]) if (!glue.includes(`function ${f}`)) fail(`the glue lacks ${f}, which the page's worker calls`);
  const worker = [
    "// Tern's simulation check, one of the page's Web Workers: the page's own",
    '// module, compiled once by the page and posted here. Generated by',
    '// scripts/finish-page.mjs.',
    `import init, { ${WORKER_EXPORT}, ${SEARCH_EXPORT} } from './${glueName}';`,
    workerBody('init'),
  ].join('\n');
  const workerName = `worker-${shortHash(worker)}.js`;
  const boot = [
    "// Starts Tern: the glue from trunk's wasm-bindgen, the module's bytes from a",
    "// same-origin script, no fetch(); the compiled module and the worker's URL",
    '// stay for the simulation check. Generated by scripts/finish-page.mjs.',
    `import init, * as bindings from './${glueName}';`,
    `import { TERN_WASM_BASE64 } from './${wasmJsName}';`,
    `const ternModule = await WebAssembly.compile(${DECODE});`,
    'globalThis.ternModule = ternModule;',
    `globalThis.ternWorkerUrl = new URL('./${workerName}', import.meta.url).href;`,
    "globalThis.ternWorkerType = 'module';",
    'await init({ module_or_path: ternModule });',
    'window.wasmBindings = bindings;',
    '',
  ].join('\n');
  // The spreadsheet reader's three files.
  const sheets = sheetsBuild();
  if (!sheets.glue.includes(`function ${SHEETS_EXPORT}`)) fail(`the spreadsheet reader's glue lacks ${SHEETS_EXPORT}`);
  const sheetsTag = shortHash(sheets.wasm, sheets.glue);
  const sheetsGlueName = `sheets-${sheetsTag}.js`;
  const sheetsModName = `sheets-${sheetsTag}_module.js`;
  const sheetsJs = `// Tern's spreadsheet reader, a second WebAssembly module (${sheets.wasm.length} bytes), as base64.\nexport const TERN_SHEETS_BASE64 = "${sheets.wasm.toString('base64')}";\n`;
  const sheetsBoot = [
    "// Starts Tern's spreadsheet reader (.xlsx, .ods), a second WebAssembly module,",
    '// during page load; the page awaits globalThis.ternSheets when a spreadsheet',
    '// arrives. Generated by scripts/finish-page.mjs.',
    `import initSheets, * as sheets from './${sheetsGlueName}';`,
    `import { TERN_SHEETS_BASE64 } from './${sheetsModName}';`,
    `globalThis.ternSheets = initSheets({ module_or_path: ${decode('TERN_SHEETS_BASE64')} }).then(() => sheets);`,
    '',
  ].join('\n');
  const sheetsBootName = `sheets-boot-${shortHash(sheetsBoot)}.js`;

  const build = shortHash(wasm, glue, css, html, sheets.wasm, sheets.glue, worker);
  const bootName = `boot-${shortHash(boot)}.js`;

  writeFileSync(join(dist, wasmJsName), wasmJs);
  writeFileSync(join(dist, bootName), boot);
  writeFileSync(join(dist, workerName), worker);
  writeFileSync(join(dist, sheetsGlueName), sheets.glue);
  writeFileSync(join(dist, sheetsModName), sheetsJs);
  writeFileSync(join(dist, sheetsBootName), sheetsBoot);
  rmSync(join(dist, wasmName));
  copyFileSync(join(root, 'www', 'manifest.webmanifest'), join(dist, 'manifest.webmanifest'));
  copyFileSync(join(root, 'www', 'icon.svg'), join(dist, 'icon.svg'));

  html = setPolicy(html, SERVED_POLICY);
  html = setMeta(html, 'tern-build', build);
  html = setMeta(html, 'tern-edition', 'served');
  html = html.replace('</head>', `  <link rel="manifest" href="manifest.webmanifest">\n  <link rel="modulepreload" href="./${glueName}">\n  <link rel="modulepreload" href="./${wasmJsName}">\n  <script type="module" src="./${bootName}"></script>\n  <script type="module" src="./${sheetsBootName}"></script>\n</head>`);
  writeFileSync(join(dist, 'index.html'), html);

  // The service worker keeps exactly these files (every file of DIST but
  // itself) and answers nothing else.
  const kept = readdirSync(dist).filter((f) => f !== 'sw.js').sort();
  const template = readFileSync(join(root, 'www', 'sw.js'), 'utf8');
  const sw = template
    .replace("'__TERN_BUILD__'", JSON.stringify(build))
    .replace("['__TERN_FILES__']", JSON.stringify(kept));
  if (sw === template) fail('www/sw.js lacks the __TERN_BUILD__ / __TERN_FILES__ placeholders');
  writeFileSync(join(dist, 'sw.js'), sw);
  console.log(`finish-page: served edition in ${dist}: build ${build}, ${kept.length} files kept offline (${kept.join(', ')})`);
}

function single(dist, out) {
  let html = readFileSync(join(dist, 'index.html'), 'utf8');
  const files = readdirSync(dist);
  const glueName = one(files.filter((f) => /^tern-[0-9a-f]+\.js$/.test(f)), 'wasm-bindgen glue tern-HASH.js (run the served step first)');
  const wasmJsName = one(files.filter((f) => /^tern-[0-9a-f]+_wasm\.js$/.test(f)), 'tern-HASH_wasm.js');
  const sheetsGlueName = one(files.filter((f) => /^sheets-[0-9a-f]+\.js$/.test(f)), "the spreadsheet reader's glue sheets-HASH.js");
  const sheetsModName = one(files.filter((f) => /^sheets-[0-9a-f]+_module\.js$/.test(f)), "the spreadsheet reader's sheets-HASH_module.js");
  const cssName = one(files.filter((f) => f.endsWith('.css')), 'style sheet');
  const glueFile = readFileSync(join(dist, glueName), 'utf8');
  const wasmJs = readFileSync(join(dist, wasmJsName), 'utf8');
  const css = readFileSync(join(dist, cssName), 'utf8');

  const { glue, initName, bindings } = moduleBody(glueFile, glueName);
  const base64 = (wasmJs.match(/TERN_WASM_BASE64 = "([A-Za-z0-9+/=]+)"/) || [])[1];
  if (!base64) fail(`no base64 module in ${wasmJsName}`);
  for (const f of [WORKER_EXPORT, SEARCH_EXPORT]) if (!bindings.includes(f)) fail(`${glueName} lacks ${f}, which the page's worker calls`);
  // A classic worker: a module worker from a Blob URL of a file:// page has
  // an opaque origin that module loading refuses. The glue's one
  // import.meta (its default .wasm URL, never used: the module is posted)
  // would be a syntax error there.
  const metas = (glue.match(/import\.meta\.url/g) || []).length;
  if (metas !== 1) fail(`expected one import.meta.url in ${glueName}, found ${metas}`);
  const workerSource = [glue.replace('import.meta.url', 'self.location.href'), "// Tern's simulation check, one of the page's Web Workers (one-file edition).", workerBody(initName)].join('\n');
  if (/<\/script/i.test(workerSource)) fail('the worker source holds "</script", which would end its block early');
  const script = [
    glue,
    '// Tern, one-file edition: the module inlined as base64, compiled once and',
    '// started without fetch(); the simulation worker starts from the inline',
    '// source below as a Blob URL.',
    '{',
    `  const TERN_WASM_BASE64 = "${base64}";`,
    `  const ternModule = await WebAssembly.compile(${DECODE});`,
    '  globalThis.ternModule = ternModule;',
    "  const workerSource = document.getElementById('tern-worker-source').textContent;",
    "  globalThis.ternWorkerUrl = URL.createObjectURL(new Blob([workerSource], { type: 'text/javascript' }));",
    "  globalThis.ternWorkerType = 'classic';",
    `  await ${initName}({ module_or_path: ternModule });`,
    `  window.wasmBindings = { ${bindings.join(', ')} };`,
    '}',
  ].join('\n');

  html = html.replace(/\s*<link rel="(modulepreload|manifest)"[^>]*>/g, '');
  html = html.replace(/\s*<script type="module" src="[^"]*"><\/script>/g, '');
  html = html.replace(/<link rel="stylesheet"[^>]*>/, () => `<style>${css}</style>`);
  if (/<link rel="stylesheet"/.test(html) || /<script[^>]*\bsrc=/.test(html)) fail('a file reference is left in the one-file edition');
  // The spreadsheet reader: its own inline module (its own scope, so its
  // glue's names cannot clash with the main glue's), started after the page.
  const sheets = moduleBody(readFileSync(join(dist, sheetsGlueName), 'utf8'), sheetsGlueName);
  if (!sheets.bindings.includes(SHEETS_EXPORT)) fail(`${sheetsGlueName} lacks ${SHEETS_EXPORT}`);
  const sheetsBase64 = (readFileSync(join(dist, sheetsModName), 'utf8').match(/TERN_SHEETS_BASE64 = "([A-Za-z0-9+/=]+)"/) || [])[1];
  if (!sheetsBase64) fail(`no base64 module in ${sheetsModName}`);
  const sheetsScript = [
    sheets.glue,
    "// Tern's spreadsheet reader, one-file edition: a second module, inlined as base64.",
    '{',
    `  const TERN_SHEETS_BASE64 = "${sheetsBase64}";`,
    `  globalThis.ternSheets = ${sheets.initName}({ module_or_path: ${decode('TERN_SHEETS_BASE64')} }).then(() => ({ ${SHEETS_EXPORT} }));`,
    '}',
  ].join('\n');
  html = html.replace('</head>', () => `<script type="text/plain" id="tern-worker-source">${workerSource}</script>\n<script type="module">${script}</script>\n<script type="module">${sheetsScript}</script>\n</head>`);
  html = setPolicy(html, singlePolicy([sha256(script), sha256(sheetsScript)], sha256(css)));
  html = setMeta(html, 'tern-edition', 'single');
  mkdirSync(dirname(out), { recursive: true });
  writeFileSync(out, html);
  console.log(`finish-page: one-file edition ${out}: ${Buffer.byteLength(html)} bytes`);
}

/**
 * wasm-bindgen glue (--target web) as a plain module body: its exports
 * become local names; `initName` is its default export (the async init),
 * `bindings` the other exported names.
 */
function moduleBody(source, name) {
  let glue = source;
  const exported = [...glue.matchAll(/^export (?:async )?(?:function|class|const|let) ([A-Za-z_$][\w$]*)/gm)].map((m) => m[1]);
  glue = glue.replace(/^export (?=(?:async )?(?:function|class|const|let) )/gm, '');
  const tail = glue.match(/^export \{[^}]*\};?\s*$/gm) || [];
  const initName = (glue.match(/(\w+) as default/) || [])[1];
  if (!initName) fail(`no "X as default" export in ${name}`);
  for (const t of tail) glue = glue.replace(t, '');
  if (/^\s*export\b/m.test(glue)) fail(`an export is left in ${name}: ${glue.match(/^\s*export\b.*$/m)[0]}`);
  const bindings = [...new Set(exported.concat(['initSync']))].filter((n) => n !== initName && new RegExp(`\\b(function|class|const|let) ${n}\\b`).test(glue));
  return { glue, initName, bindings };
}

const [dist, flag, out] = process.argv.slice(2);
if (!dist) fail('usage: finish-page.mjs DIST [--single OUT.html]');
if (flag === '--single') {
  if (!out) fail('--single needs an output file');
  single(resolve(dist), resolve(out));
} else {
  served(resolve(dist));
}
