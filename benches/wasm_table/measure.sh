#!/usr/bin/env bash
# Size and speed of the data-file reader as WebAssembly (BENCHMARKS.md,
# "Data files"). Needs the wasm32 target, npm's wasm-opt (scripts/install-tools
# puts it in node_modules/.bin) and Node.
#   bash benches/wasm_table/measure.sh
set -euo pipefail
cd "$(dirname "$0")"
root=$(cd ../.. && pwd)
opt="${WASM_OPT:-$root/node_modules/.bin/wasm-opt}"
[ -x "$opt" ] || { echo "measure.sh: $opt missing; run scripts/install-tools" >&2; exit 1; }
export CARGO_TARGET_DIR="$root/target/wasm_table"
out="$CARGO_TARGET_DIR/wasm32-unknown-unknown/release/wasm_table.wasm"
for variant in baseline table spreadsheets; do
  features=""; [ "$variant" != baseline ] && features="--features $variant"
  # shellcheck disable=SC2086
  cargo build --quiet --release --target wasm32-unknown-unknown $features
  "$opt" -Oz --strip-debug --strip-producers --enable-bulk-memory --enable-nontrapping-float-to-int \
    --enable-sign-ext "$out" -o "$CARGO_TARGET_DIR/$variant.wasm"
  echo "WASM_SIZE $variant: $(stat -c %s "$CARGO_TARGET_DIR/$variant.wasm") bytes, $(gzip -9 -c "$CARGO_TARGET_DIR/$variant.wasm" | wc -c) gzipped"
done
node --expose-gc run.mjs "$CARGO_TARGET_DIR/table.wasm"
