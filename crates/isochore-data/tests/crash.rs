//! Nothing lost on a crash: a child process (this test binary run again for one ignored
//! test) saves two projects of about 40 kB in turn to the same path, and is killed with SIGKILL
//! at a pseudo-random moment, again and again. After every kill the project file must load
//! with [`Project::load`] as exactly the old or the new project — the one the child's
//! progress lines say it can be — never damaged, never missing; the `.bak` beside it must
//! be a complete project too; temporary files a killed save leaves behind must never carry a
//! name a project is recognised by (`.json` or `.autosave`), and a later save must still
//! work beside them.

#![cfg(unix)]

use isochore_data::{import_text, ImportOptions, Project};
use std::collections::BTreeSet;
use std::io::{BufRead, BufReader, Read, Write};
use std::path::{Path, PathBuf};
use std::process::{Child, ChildStderr, Command, Stdio};
use std::time::{Duration, Instant};

/// Environment variable naming the project file the child saves to.
const TARGET: &str = "ISOCHORE_TEST_CRASH_TARGET";
/// How many times the child is killed.
const KILLS: usize = 200;
/// Rows in each project.
const ROWS: usize = 200;

/// Two different projects, `A` and `B`: two data sets of generated rows (about 40 kB of
/// JSON, which this crate's unoptimised test build takes a few milliseconds to serialise,
/// write and sync); B has other K values in its second data set, an exclusion and other
/// notes.
fn projects() -> [Project; 2] {
    let mut text = String::from("series,T (°C),K,note\n");
    for i in 0..ROWS {
        text.push_str(&format!(
            "set_{},{}.{:03},{},run {i} of the crash test\n",
            i % 2,
            5 + i % 50,
            (i * 7) % 1000,
            100 + i % 97
        ));
    }
    let imp = import_text("crash.csv", &text, &ImportOptions::default()).unwrap();
    let mut a = Project::from_import(&imp);
    a.notes = "version A".to_string();
    let mut b = a.clone();
    b.notes = "version B, edited after the crash test's first save".to_string();
    for row in b.series[1].raw_rows_mut() {
        row.cells[2].push('1');
    }
    b.series[0]
        .exclude(3, "air bubble", "2026-12-02T15:00:00Z")
        .unwrap();
    assert_ne!(a, b);
    [a, b]
}

/// Child side: saves B, A, B, A, … to the path in [`TARGET`], writing `begin i` before and
/// `end i` after each save to stderr (stdout carries the test runner's own lines), from
/// the moment a byte arrives on stdin until killed (or after 2000 saves, so that a child
/// whose parent died does not run on). Does nothing when not started by the parent, or when
/// stdin closes first.
#[test]
#[ignore = "child process of sigkill_during_save_leaves_old_or_new_project"]
fn child_saves_in_turn() {
    let Some(target) = std::env::var_os(TARGET) else {
        return;
    };
    let both = projects();
    // Waiting for the word lets the parent start the next child while it checks the files
    // the last one left: starting a process is most of the time a kill takes.
    let mut go = [0u8];
    if std::io::stdin().read(&mut go).unwrap_or(0) == 0 {
        return;
    }
    for n in 0..2000 {
        let i = (n + 1) % 2;
        eprintln!("begin {i}");
        both[i].save_atomic(&target).unwrap();
        eprintln!("end {i}");
    }
}

/// A child that is killed when dropped, so that a failing assertion leaves no process behind.
struct Killed(Child);

impl Drop for Killed {
    fn drop(&mut self) {
        let _ = self.0.kill();
        let _ = self.0.wait();
    }
}

/// Starts a child that will save to `target` once told to (see [`go`]).
fn start_child(target: &Path) -> Killed {
    let child = Command::new(std::env::current_exe().unwrap())
        .args([
            "crash::child_saves_in_turn",
            "--exact",
            "--ignored",
            "--nocapture",
            "--test-threads=1",
        ])
        .env(TARGET, target)
        .stdin(Stdio::piped())
        .stdout(Stdio::null())
        .stderr(Stdio::piped())
        .spawn()
        .expect("run the test binary again");
    Killed(child)
}

/// Tells a child from [`start_child`] to save; returns it, its first progress line (read
/// once its first save has begun) and the rest of its progress lines to read.
fn go(mut child: Killed) -> (Killed, String, BufReader<ChildStderr>) {
    child.0.stdin.take().unwrap().write_all(b"g").unwrap();
    let mut out = BufReader::new(child.0.stderr.take().unwrap());
    let mut line = String::new();
    loop {
        line.clear();
        let n = out.read_line(&mut line).unwrap();
        assert!(n > 0, "the child ended before saving");
        if line.starts_with("begin ") {
            return (child, line, out);
        }
    }
}

/// The names in `dir` other than the project and its backup.
fn leftovers(dir: &Path, project: &str) -> BTreeSet<String> {
    std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| *n != project && *n != format!("{project}.bak"))
        .collect()
}

/// Tells which of the two projects a file holds, read with [`Project::load`]. Each distinct
/// content is loaded once: a file byte for byte equal to one loaded before holds what that
/// one held (the loader reads nothing but the bytes), which keeps 200 kills within seconds.
struct Reader<'a> {
    both: &'a [Project; 2],
    seen: Vec<(Vec<u8>, usize)>,
}

impl Reader<'_> {
    /// Which project the file at `path` holds; fails the test when it is missing, damaged or
    /// holds neither.
    fn which(&mut self, path: &Path, after: &str) -> usize {
        assert!(path.is_file(), "{after}: {} is missing", path.display());
        let bytes = std::fs::read(path).unwrap();
        if let Some((_, i)) = self.seen.iter().find(|(b, _)| *b == bytes) {
            return *i;
        }
        let p = Project::load(path).unwrap_or_else(|e| panic!("{after}: {e}"));
        let i = self
            .both
            .iter()
            .position(|b| *b == p)
            .unwrap_or_else(|| panic!("{after}: {} holds neither project", path.display()));
        self.seen.push((bytes, i));
        i
    }
}

/// A small xorshift generator with a fixed start, so that a failure repeats.
struct XorShift(u64);

impl XorShift {
    fn below(&mut self, n: u64) -> u64 {
        self.0 ^= self.0 << 13;
        self.0 ^= self.0 >> 7;
        self.0 ^= self.0 << 17;
        self.0 % n
    }
}

/// Where the kills landed, from the child's progress lines and the folder.
#[derive(Debug, Default)]
struct Landed {
    /// Between two saves (the last line was `end`; rare, the gap is a print).
    between: usize,
    /// In a save, between creating a temporary file and the rename (a new temporary file
    /// was left behind).
    mid_write: usize,
    /// In a save, after the rename (the new project was in place; only counted when it
    /// differs from the old one).
    after_rename: usize,
    /// In a save, before any temporary file existed (serialising), or after the rename of a
    /// project equal to the old one.
    elsewhere_in_save: usize,
}

/// The progress lines `begin i` / `end i` of the child as (is_end, i).
fn progress(text: &str) -> Vec<(bool, usize)> {
    text.lines()
        .filter_map(|l| {
            let (what, i) = l.split_once(' ')?;
            let i = i.trim().parse().ok()?;
            match what {
                "begin" => Some((false, i)),
                "end" => Some((true, i)),
                _ => None,
            }
        })
        .collect()
}

#[test]
fn sigkill_during_save_leaves_old_or_new_project() {
    let both = projects();
    let mut reader = Reader {
        both: &both,
        seen: Vec::new(),
    };
    let dir = tempfile::tempdir().unwrap();
    let name = "work.isochore.json";
    let path = dir.path().join(name);
    let bak: PathBuf = dir.path().join(format!("{name}.bak"));
    // Start with A in place and B as its backup. The time of one save (made here, as the
    // child makes them) sets the window the kills fall in: two saves long, so that every
    // step of a save is hit.
    both[1].save_atomic(&path).unwrap();
    let start = Instant::now();
    both[0].save_atomic(&path).unwrap();
    let save = start.elapsed();
    let window_us = (2 * save.as_micros()).clamp(2_000, 12_000) as u64;
    let mut in_place = reader.which(&path, "before the first kill");
    let mut rng = XorShift(0x9E37_79B9_7F4A_7C15);
    let mut landed = Landed::default();
    let mut before = leftovers(dir.path(), name);
    assert!(before.is_empty(), "a clean save leaves nothing: {before:?}");
    let mut next = start_child(&path);
    for kill in 0..KILLS {
        let (mut child, first, mut out) = go(next);
        next = start_child(&path);
        std::thread::sleep(Duration::from_micros(rng.below(window_us)));
        child.0.kill().unwrap();
        child.0.wait().unwrap();
        let mut text = first;
        out.read_to_string(&mut text).unwrap();
        let lines = progress(&text);
        let last = *lines.last().unwrap();
        let after = format!("after kill {kill} (last progress line {last:?})");
        let now = reader.which(&path, &after);
        // The project before the save the child was in: that of its last finished save,
        // or the one in place when it started.
        let old = lines.iter().rev().find(|l| l.0).map_or(in_place, |l| l.1);
        match last {
            (true, i) => {
                assert_eq!(now, i, "{after}: a finished save is not in place");
                landed.between += 1;
            }
            (false, new) => {
                assert!(
                    now == old || now == new,
                    "{after}: project {now} is in place, neither the old {old} nor the new {new}"
                );
                let left = leftovers(dir.path(), name);
                if left.difference(&before).next().is_some() {
                    landed.mid_write += 1;
                } else if now != old {
                    landed.after_rename += 1;
                } else {
                    landed.elsewhere_in_save += 1;
                }
            }
        }
        // The backup, which a damaged project's message points to, is whole too.
        reader.which(&bak, &format!("{after}, backup"));
        // Temporary files left by killed saves are never taken for a project: a project is
        // recognised by a name ending in `.json` or `.autosave` (isochore-analysis'
        // is_project_file), and they never carry the project's name.
        before = leftovers(dir.path(), name);
        for n in &before {
            let lower = n.to_lowercase();
            assert!(
                !lower.ends_with(".json") && !lower.ends_with(".autosave") && !n.contains(name),
                "{after}: leftover {n} could be taken for a project"
            );
        }
        in_place = now;
    }
    drop(next);
    // A save beside the leftovers works: the new project in place, the old one backed up.
    let next = 1 - in_place;
    both[next].save_atomic(&path).unwrap();
    assert_eq!(reader.which(&path, "after the last save"), next);
    assert_eq!(reader.which(&bak, "after the last save, backup"), in_place);
    assert!(
        landed.mid_write > 0,
        "no kill landed while a temporary file was being written: {landed:?}"
    );
    println!(
        "{KILLS} kills in a window of {window_us} µs (one save took {save:?}): {landed:?}; \
         {} temporary files left by killed saves",
        before.len()
    );
}
