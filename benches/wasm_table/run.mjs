// Wasm-side speed of the data-file reader in Node's V8, driven as the page
// drives it: the file stays in JavaScript, 1 MiB chunks are copied into the
// module and pushed one call at a time, then the summaries and chart data.
// Usage: node run.mjs module.wasm
import { readFileSync } from 'node:fs';
const stub = () => 0;
const imports = new Proxy({}, { get: () => new Proxy({}, { get: () => stub }) });
const { instance } = await WebAssembly.instantiate(readFileSync(process.argv[2]), imports);
const ex = instance.exports;
// 1,000,000 rows x 5 columns, about 40 bytes a row (as benches/table.rs).
let s = 0x9E3779B9 >>> 0;
const rnd = () => { s ^= s << 13; s >>>= 0; s ^= s >>> 17; s ^= s << 5; s >>>= 0; return s / 4294967296; };
let parts = ['id,arm,systolic,weight_kg,ratio\n'];
for (let i = 0; i < 1_000_000; i++) {
  parts.push(`${i},${rnd() < 0.5 ? 'A' : 'B'},${(110 + 40 * rnd()).toFixed(5)},${(50 + 60 * rnd()).toFixed(5)},${(rnd() - 0.5).toFixed(8)}\n`);
}
const csv = new TextEncoder().encode(parts.join(''));
parts = null;
// Collect the generator's garbage first: otherwise a major JS collection,
// triggered as the module's memory grows, lands inside the first run.
if (globalThis.gc) gc();
const mb = csv.length / 1e6;
const CH = 1 << 20;
const buf = ex.alloc(CH);
for (let run = 1; run <= 3; run++) {
  const t0 = performance.now();
  const b = ex.builder_new(csv.length);
  for (let off = 0; off < csv.length; off += CH) {
    const chunk = csv.subarray(off, Math.min(off + CH, csv.length));
    new Uint8Array(ex.memory.buffer, buf, chunk.length).set(chunk);
    if (!ex.builder_push(b, buf, chunk.length)) throw new Error('push refused');
  }
  ex.builder_finish(b);
  const t1 = performance.now();
  ex.summarise_last();
  const t2 = performance.now();
  console.log(`WASM_TABLE run ${run}: read ${((t1 - t0) / 1000).toFixed(3)} s (${(mb / ((t1 - t0) / 1000)).toFixed(0)} MB/s), summaries and chart data ${((t2 - t1) / 1000).toFixed(3)} s, total ${((t2 - t0) / 1000).toFixed(3)} s; module memory ${(ex.memory.buffer.byteLength / 1e6).toFixed(0)} MB for a ${mb.toFixed(1)} MB file`);
  ex.drop_last();
}
