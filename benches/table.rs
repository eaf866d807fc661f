//! Data-file benchmark (criterion): a generated 1,000,000-row × 5-column CSV
//! (about 40 MB: an id, a two-level group, three measurements) read through
//! `TableBuilder` in 1 MiB chunks, as the page feeds it, then summarised
//! (two groups and one column). Run with `cargo bench --bench table`.
//!
//! Printed: criterion's time and throughput (MiB/s of CSV text) for
//! `table/parse_1m_x5` and `table/parse_and_summarise_1m_x5`, and once,
//! before criterion starts, the peak resident memory the read added on
//! Linux (VmHWM from /proc/self/status, against the file size).

use criterion::{Criterion, Throughput};
use std::hint::black_box;
use std::time::{Duration, Instant};
use tern::engine::table::{Mapping, ReadOptions, Table, TableBuilder, summarise};

/// The CSV text (about 40 bytes a row): deterministic, no randomness crate.
fn generate(rows: usize) -> Vec<u8> {
    let mut out = Vec::with_capacity(rows * 42);
    out.extend_from_slice(b"id,arm,systolic,weight_kg,ratio\n");
    let mut s = 0x9E37_79B9_7F4A_7C15u64;
    let mut next = || {
        s ^= s << 13;
        s ^= s >> 7;
        s ^= s << 17;
        (s >> 11) as f64 / (1u64 << 53) as f64
    };
    use std::io::Write;
    for i in 0..rows {
        let arm = if next() < 0.5 { "A" } else { "B" };
        let _ = writeln!(out, "{i},{arm},{:.5},{:.5},{:.8}", 110.0 + 40.0 * next(), 50.0 + 60.0 * next(), next() - 0.5);
    }
    out
}

fn read(bytes: &[u8]) -> Table {
    let mut b = TableBuilder::new(ReadOptions::default());
    b.size_hint(bytes.len() as u64);
    for chunk in bytes.chunks(1 << 20) {
        b.push(chunk).expect("chunk");
    }
    b.finish().expect("table")
}

fn summarise_all(t: &Table) -> f64 {
    let two = Mapping::TwoGroups { value: 2, group: 1, level1: "A".into(), level2: "B".into() };
    let a = summarise(t, &two, &[]).expect("two groups");
    let b = summarise(t, &Mapping::OneColumn { column: 3 }, &[]).expect("one column");
    a.groups[0].mean + b.groups[0].mean
}

fn vm_kib(field: &str) -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with(field))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

fn main() {
    let bytes = generate(1_000_000);
    let mb = bytes.len() as f64 / 1e6;
    // One measured read: time and the memory it adds over the file itself.
    let before = vm_kib("VmRSS:");
    let start = Instant::now();
    let table = read(&bytes);
    let parsed = start.elapsed();
    let check = summarise_all(&table);
    let total = start.elapsed();
    let peak = vm_kib("VmHWM:");
    println!(
        "TABLE_BENCH file {mb:.1} MB, {} rows: read {:.3} s ({:.0} MB/s), read + summarise {:.3} s ({:.0} MB/s); check {check:.6}",
        table.n_rows,
        parsed.as_secs_f64(),
        mb / parsed.as_secs_f64(),
        total.as_secs_f64(),
        mb / total.as_secs_f64()
    );
    if let (Some(b), Some(p)) = (before, peak) {
        let added = (p.saturating_sub(b)) as f64 * 1024.0 / 1e6;
        println!(
            "TABLE_BENCH peak memory added by the read: {added:.1} MB = {:.2} × the file (the file itself, held by the caller, is {mb:.1} MB more)",
            added / mb
        );
    }
    drop(table);

    let mut c = Criterion::default().sample_size(10).measurement_time(Duration::from_secs(20)).configure_from_args();
    let mut g = c.benchmark_group("table");
    g.throughput(Throughput::Bytes(bytes.len() as u64));
    g.bench_function("parse_1m_x5", |b| b.iter(|| black_box(read(black_box(&bytes)).n_rows)));
    g.bench_function("parse_and_summarise_1m_x5", |b| b.iter(|| black_box(summarise_all(&read(black_box(&bytes))))));
    g.finish();
    c.final_summary();
}
