//! Criterion benchmark of importing 10⁵ and 10⁶ rows (about 3.8 and 38 MB) from a file:
//! four data sets, °C, K_d in nM with its standard deviation. The data are generated at
//! bench time into a temporary folder (nothing is committed).
//! `cargo bench -p isochore-data --bench import`

use criterion::{criterion_group, criterion_main, Criterion, Throughput};
use isochore_data::{import_path, ImportOptions};
use std::io::Write;

/// Writes `n` rows like `sample_2,17.95331,41.098881,2.0549441` (about 38 bytes each).
pub fn write_rows(path: &std::path::Path, n: usize) {
    let mut f = std::io::BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(f, "sample,T (°C),Kd (nM),sd_Kd (nM)").unwrap();
    let mut x: u64 = 0x2545_f491_4f6c_dd1d;
    for i in 0..n {
        // xorshift64: deterministic, no extra dependency.
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        let u = (x >> 11) as f64 / (1u64 << 53) as f64;
        let t = 5.0 + 40.0 * u;
        let kd = 50.0 * (1.0 + 0.03 * (t - 25.0)) * (0.95 + 0.1 * u);
        writeln!(f, "sample_{},{t:.5},{kd:.6},{:.7}", i % 4, kd * 0.05).unwrap();
    }
}

fn bench(c: &mut Criterion) {
    let dir = tempfile::tempdir().unwrap();
    let mut g = c.benchmark_group("import");
    g.sample_size(10);
    for n in [100_000usize, 1_000_000] {
        let path = dir.path().join(format!("rows_{n}.csv"));
        write_rows(&path, n);
        let bytes = std::fs::metadata(&path).unwrap().len();
        g.throughput(Throughput::Bytes(bytes));
        g.bench_function(format!("{n} rows ({:.1} MB)", bytes as f64 / 1e6), |b| {
            // The result is dropped outside the timed part: the figure is the import alone.
            b.iter_with_large_drop(|| {
                let imp = import_path(&path, &ImportOptions::default()).unwrap();
                assert_eq!(imp.series.iter().map(|s| s.len()).sum::<usize>(), n);
                imp
            })
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
