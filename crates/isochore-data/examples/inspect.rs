//! Imports a file and prints what was found: mapping, data sets, rejected rows and the time
//! taken. `cargo run --release -p isochore-data --example inspect -- FILE`
use isochore_data::{import_path, ImportOptions};
use std::time::Instant;

fn main() {
    let Some(path) = std::env::args().nth(1) else {
        eprintln!("usage: inspect FILE");
        std::process::exit(2);
    };
    let t0 = Instant::now();
    match import_path(&path, &ImportOptions::default()) {
        Ok(imp) => {
            let dt = t0.elapsed();
            println!(
                "delimiter: {}, decimal comma: {}",
                imp.delimiter.name(),
                imp.decimal_comma
            );
            for line in imp.describe_mapping() {
                println!("  {line}");
            }
            for s in &imp.series {
                println!("data set '{}': {} rows", s.name, s.len());
                for r in s.converted().unwrap_or_default().iter().take(3) {
                    println!(
                        "    line {} row {}: T = {} K, ln K = {}, σ = {:?}",
                        r.line(),
                        r.row(),
                        r.t_k,
                        r.ln_k,
                        r.sigma_ln_k()
                    );
                }
            }
            for r in imp.rejected.iter().take(10) {
                println!("rejected: {r}");
            }
            // Peak resident memory so far (Linux), for the benchmark script.
            if let Ok(status) = std::fs::read_to_string("/proc/self/status") {
                if let Some(l) = status.lines().find(|l| l.starts_with("VmHWM:")) {
                    println!("peak RSS: {}", l["VmHWM:".len()..].trim());
                }
            }
            println!(
                "sha256 {} ({} bytes), {:.1} ms",
                imp.source.sha256,
                imp.source.bytes,
                dt.as_secs_f64() * 1e3
            );
        }
        Err(e) => {
            eprintln!("{e}");
            std::process::exit(1);
        }
    }
}
