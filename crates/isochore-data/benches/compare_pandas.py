#!/usr/bin/env python3
"""Compares isochore-data's import with pandas.read_csv on the same 10^6-row file.

Writes /tmp/isochore_bench_1e6.csv (about 38 MB: sample, °C, K_d in nM, sd), then times
  - pandas.read_csv(path)                      (best of 5, in this process)
  - the Rust importer via the `inspect` example (best of 5; its own timer around import_path)
and reports the peak resident memory of the Rust process.
Usage (from the repository root):
  cargo build --release -p isochore-data --example inspect
  python3 crates/isochore-data/benches/compare_pandas.py [path/to/target/release/examples/inspect]
"""
import os, random, resource, subprocess, sys, time

PATH = "/tmp/isochore_bench_1e6.csv"
N = 1_000_000


def write():
    rnd = random.Random(7)
    with open(PATH, "w", encoding="utf-8") as f:
        f.write("sample,T (°C),Kd (nM),sd_Kd (nM)\n")
        for i in range(N):
            u = rnd.random()
            t = 5 + 40 * u
            kd = 50 * (1 + 0.03 * (t - 25)) * (0.95 + 0.1 * u)
            f.write(f"sample_{i % 4},{t:.5f},{kd:.6f},{kd * 0.05:.7f}\n")


def main():
    exe = sys.argv[1] if len(sys.argv) > 1 else os.environ.get("CARGO_TARGET_DIR", "target") + "/release/examples/inspect"
    if not os.path.exists(PATH):
        write()
    size = os.path.getsize(PATH)
    import pandas as pd
    best_pd = min(_time(lambda: pd.read_csv(PATH)) for _ in range(5))
    rust = []
    for _ in range(5):
        out = subprocess.run([exe, PATH], capture_output=True, text=True, check=True).stdout
        rust.append(float(out.strip().splitlines()[-1].split(",")[-1].split()[0]) / 1e3)
    peak_kb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
    print(f"file: {size / 1e6:.1f} MB, {N} rows")
    print(f"pandas {pd.__version__} read_csv: best {best_pd * 1e3:.0f} ms")
    print(f"isochore-data import_path: best {min(rust) * 1e3:.0f} ms (runs: {', '.join(f'{r * 1e3:.0f}' for r in rust)})")
    print(f"isochore-data peak RSS: {peak_kb / 1024:.0f} MiB ({peak_kb * 1024 / size:.1f} x file size)")
    print(f"load average: {os.getloadavg()}")


def _time(f):
    t = time.perf_counter()
    f()
    return time.perf_counter() - t


if __name__ == "__main__":
    main()
