//! Reading alone (issue 14): a data file read and its data sets prepared for a fit, as
//! `vhfit fit FILE` does before fitting (`isochore_analysis::load`, no cells kept), and
//! nothing else. Prints the wall time of the load (the process's start-up and exit not
//! included), the rows prepared and the process's peak resident memory (`VmHWM` of
//! `/proc/self/status`, Linux only), so that the memory of reading a large file can be told
//! from the fit's.
//!
//! Usage: `cargo run --release -p isochore-analysis --example read_alone -- FILE [ROUNDS]`
//! (ROUNDS loads in one process, default 1: the time of each is printed; the peak is the
//! process's over all of them). The allocations made can be counted under `heaptrack`.

use isochore_analysis::Overrides;
use std::path::Path;
use std::time::Instant;

/// The process's peak resident memory in KiB, where the system says it.
fn peak_kib() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    line.split_whitespace().nth(1)?.parse().ok()
}

fn main() {
    let mut args = std::env::args().skip(1);
    let Some(path) = args.next() else {
        eprintln!("usage: read_alone FILE [ROUNDS]");
        std::process::exit(2);
    };
    let rounds: usize = args.next().and_then(|r| r.parse().ok()).unwrap_or(1);
    for _ in 0..rounds {
        let t0 = Instant::now();
        let sets = match isochore_analysis::load(Path::new(&path), &Overrides::default()) {
            Ok(s) => s,
            Err(e) => {
                eprintln!("{e}");
                std::process::exit(1);
            }
        };
        let dt = t0.elapsed();
        let rows: usize = sets.iter().map(|s| s.measurements.len()).sum();
        println!(
            "read and prepared {rows} rows in {} data set(s): {:.1} ms, SHA-256 {}",
            sets.len(),
            dt.as_secs_f64() * 1e3,
            sets.first().map_or("", |s| s.sha256.as_str())
        );
        drop(sets);
    }
    match peak_kib() {
        Some(k) => println!("peak resident memory: {:.1} MiB", k as f64 / 1024.0),
        None => println!("peak resident memory: not known on this system"),
    }
}
