#!/usr/bin/env python3
"""Compares isochore-data's import with pandas.read_csv on the same 10^6-row file.

Writes /tmp/isochore_bench_1e6.csv (about 38 MB: sample, °C, K_d in nM, sd), then times,
interleaved round by round so that every program sees the same machine load:
  - pandas.read_csv(path) in this process: wall time and CPU time (process_time)
  - the Rust importer via the `inspect` example: its own timer around import_path, and the
    CPU time (user + system) of the whole child process
and reports the best and the median of the rounds and the peak resident memory (VmHWM) of the Rust process.
Further executables (for example a build of an older commit) are timed the same way.
Usage (from the repository root):
  cargo build --release -p isochore-data --example inspect
  python3 crates/isochore-data/benches/compare_pandas.py [inspect [older-inspect …]] [--rounds N]
"""
import os, random, resource, statistics, subprocess, sys, time

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


def run_rust(exe):
    """One import: (wall s from the example's own timer, CPU s of the process, peak RSS KiB)."""
    p = subprocess.Popen([exe, PATH], stdout=subprocess.PIPE, text=True)
    out = p.stdout.read()
    p.stdout.close()
    _, status, ru = os.wait4(p.pid, 0)
    p.returncode = os.waitstatus_to_exitcode(status)
    if p.returncode != 0:
        raise SystemExit(f"{exe} failed")
    wall = float(out.strip().splitlines()[-1].split(",")[-1].split()[0]) / 1e3
    # The child's own report (VmHWM): wait4's ru_maxrss would include this Python process,
    # whose pages the child shares between fork and exec. Older builds without the line: 0.
    peak = [l.split()[2] for l in out.splitlines() if l.startswith("peak RSS:")]
    return wall, ru.ru_utime + ru.ru_stime, int(peak[0]) if peak else 0


def main():
    argv = sys.argv[1:]
    rounds = 5
    if "--rounds" in argv:
        i = argv.index("--rounds")
        rounds = int(argv[i + 1])
        del argv[i : i + 2]
    exes = argv or [os.environ.get("CARGO_TARGET_DIR", "target") + "/release/examples/inspect"]
    if not os.path.exists(PATH):
        write()
    size = os.path.getsize(PATH)
    import pandas as pd

    pd_wall, pd_cpu, loads = [], [], []
    res = {e: ([], [], []) for e in exes}
    for _ in range(rounds):
        loads.append(os.getloadavg()[0])
        w, c = time.perf_counter(), time.process_time()
        pd.read_csv(PATH)
        pd_wall.append(time.perf_counter() - w)
        pd_cpu.append(time.process_time() - c)
        for e in exes:
            for lst, v in zip(res[e], run_rust(e)):
                lst.append(v)
    print(f"file: {size / 1e6:.1f} MB, {N} rows; {rounds} rounds; "
          f"load average (1 min) {min(loads):.1f}-{max(loads):.1f}")
    med = statistics.median
    print(f"pandas {pd.__version__} read_csv: best {min(pd_wall) * 1e3:.0f} ms wall, "
          f"median {med(pd_wall) * 1e3:.0f} ms (runs {', '.join(f'{x * 1e3:.0f}' for x in pd_wall)}), "
          f"best {min(pd_cpu) * 1e3:.0f} ms CPU, median {med(pd_cpu) * 1e3:.0f} ms")
    for e in exes:
        wall, cpu, rss = res[e]
        print(f"{e}: import_path best {min(wall) * 1e3:.0f} ms wall, median {med(wall) * 1e3:.0f} ms "
              f"(runs {', '.join(f'{x * 1e3:.0f}' for x in wall)}), "
              f"best {min(cpu) * 1e3:.0f} ms CPU, median {med(cpu) * 1e3:.0f} ms (whole process), "
              f"peak RSS {max(rss) / 1024:.0f} MiB ({max(rss) * 1024 / size:.1f} x file)")


if __name__ == "__main__":
    main()
