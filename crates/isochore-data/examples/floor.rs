//! The floor of reading a lab file (issue 14): read the whole file into one buffer and split
//! it into lines and cells, converting no number — what any reader of the file must do at
//! least. `scripts/bench_speed.sh` times this whole process beside `vhfit fit --summary`
//! and states the ratio.
//!
//! `--hash` also computes the SHA-256 of the bytes (as the importer does, on a second
//! thread), for the floor of what `vhfit` is asked to do.
//!
//! Usage: `cargo run --release -p isochore-data --example floor -- FILE [--hash]`

use sha2::{Digest, Sha256};
use std::time::Instant;

fn main() {
    let mut args = std::env::args().skip(1);
    let Some(path) = args.next() else {
        eprintln!("usage: floor FILE [--hash]");
        std::process::exit(2);
    };
    let hash = args.any(|a| a == "--hash");
    let start = Instant::now();
    let bytes = match std::fs::read(&path) {
        Ok(b) => b,
        Err(e) => {
            eprintln!("{path}: {e}");
            std::process::exit(1);
        }
    };
    let (lines, cells, digest) = std::thread::scope(|s| {
        let digest = hash.then(|| s.spawn(|| Sha256::digest(&bytes)));
        let mut lines = 0usize;
        let mut cells = 0usize;
        for line in bytes.split(|&b| b == b'\n') {
            if line.is_empty() {
                continue;
            }
            lines += 1;
            cells += 1 + memchr::memchr_iter(b',', line).count();
        }
        let digest = digest.map(|h| h.join().expect("hash thread"));
        (lines, cells, digest)
    });
    let digest = digest.map_or_else(String::new, |d| {
        format!(
            ", SHA-256 {}",
            d.iter().map(|b| format!("{b:02x}")).collect::<String>()
        )
    });
    println!(
        "{lines} lines, {cells} cells in {:.1} ms{digest}",
        start.elapsed().as_secs_f64() * 1e3
    );
}
