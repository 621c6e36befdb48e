//! The atomic report writer under failure: a write that fails midway (the file-size limit of
//! the process, set with `ulimit -f`, makes the disk "full" after a few hundred bytes) and a
//! read-only folder. Either way the call returns an error, the old file survives byte for
//! byte, and the folder holds exactly what it held before: no half-written report and no
//! temporary file (`.isochore-*.part`, see `src/atomic.rs`) left behind.
//!
//! The failing writes run in a child process (this test binary run again for one ignored
//! test), so the limit and the unprivileged user do not touch the other tests. As root,
//! which writes into read-only folders anyway, the child runs as user 65534 via `setpriv`.

#![cfg(unix)]

use isochore_report::{write_atomic, TEMP_PREFIX, TEMP_SUFFIX};
use std::io::Write;
use std::os::unix::fs::{MetadataExt, PermissionsExt};
use std::path::Path;
use std::process::Command;

/// Environment variable naming the file the child writes.
const TARGET: &str = "ISOCHORE_TEST_ATOMIC_TARGET";

/// What an old report holds before each failed write.
const OLD: &[u8] = b"<html>the old report, complete</html>\n";

/// More than the child's file-size limit (1024 bytes).
fn new_report() -> Vec<u8> {
    b"<p>new report</p>\n".repeat(4096)
}

/// Sorted names in `dir`; none may be one of the writer's temporary files.
fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    assert!(
        !v.iter()
            .any(|n| n.starts_with(TEMP_PREFIX) && n.ends_with(TEMP_SUFFIX)),
        "temporary file left: {v:?}"
    );
    v
}

/// Whether this process runs as root (a file it creates belongs to uid 0).
fn is_root(dir: &Path) -> bool {
    let probe = dir.join("owner-probe");
    std::fs::write(&probe, b"").unwrap();
    let root = std::fs::metadata(&probe).unwrap().uid() == 0;
    std::fs::remove_file(&probe).unwrap();
    root
}

/// Runs the ignored test `name` of this binary in a child process after the shell lines
/// `prelude`, as user 65534 when `unprivileged` and root. Returns false (after saying why
/// on stderr, where the test runner shows it) when that cannot be arranged here.
fn run_child(name: &str, target: &Path, prelude: &str, unprivileged: bool) -> bool {
    let mut cmd = Command::new("sh");
    cmd.arg("-c")
        .arg(format!("{prelude}\nexec \"$@\""))
        .arg("sh");
    if unprivileged && is_root(target.parent().unwrap().parent().unwrap()) {
        if Command::new("setpriv").arg("--version").output().is_err() {
            let _ = writeln!(
                std::io::stderr(),
                "{name}: skipped: running as root and `setpriv` is not available to drop to an unprivileged user"
            );
            return false;
        }
        cmd.args([
            "setpriv",
            "--reuid=65534",
            "--regid=65534",
            "--clear-groups",
        ]);
    }
    cmd.arg(std::env::current_exe().unwrap())
        .args([
            name,
            "--exact",
            "--ignored",
            "--nocapture",
            "--test-threads=1",
        ])
        .env(TARGET, target);
    let out = cmd.output().expect("run the test binary again");
    let stdout = String::from_utf8_lossy(&out.stdout);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(
        out.status.success() && stdout.contains("1 passed"),
        "child {name} failed:\n{stdout}\n{stderr}"
    );
    true
}

/// Child side: the write must fail and say which file.
fn child_write_must_fail() {
    let target = std::env::var_os(TARGET).expect("run by the parent test");
    let target = Path::new(&target);
    let e = write_atomic(target, &new_report()).expect_err("the write must fail");
    println!("refused as expected: {e}");
    assert!(e.to_string().contains("r.html"), "{e}");
}

#[test]
#[ignore = "child process of write_failing_midway_keeps_the_old_file"]
fn child_write_under_size_limit() {
    child_write_must_fail();
}

#[test]
#[ignore = "child process of read_only_folder_keeps_the_old_file"]
fn child_write_into_read_only_folder() {
    child_write_must_fail();
}

#[test]
fn write_failing_midway_keeps_the_old_file() {
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("r.html");
    std::fs::write(&target, OLD).unwrap();
    // dash and bash count `ulimit -f` in 512- and 1024-byte blocks: 2 blocks is at most
    // 2 KiB, far below the 72 KiB report. SIGXFSZ ignored, so the write gets EFBIG.
    run_child(
        "atomic::child_write_under_size_limit",
        &target,
        "trap '' XFSZ; ulimit -f 2",
        false,
    );
    assert_eq!(std::fs::read(&target).unwrap(), OLD);
    assert_eq!(names(dir.path()), ["r.html"], "leftover in the folder");
    // The same write without the limit succeeds (the failure above was the limit's).
    write_atomic(&target, &new_report()).unwrap();
    assert_eq!(std::fs::read(&target).unwrap(), new_report());
    assert_eq!(names(dir.path()), ["r.html"]);
}

#[test]
fn read_only_folder_keeps_the_old_file() {
    let outer = tempfile::tempdir().unwrap();
    let dir = outer.path().join("ro");
    std::fs::create_dir(&dir).unwrap();
    let target = dir.join("r.html");
    std::fs::write(&target, OLD).unwrap();
    let mode = |p: &Path, m: u32| std::fs::set_permissions(p, std::fs::Permissions::from_mode(m));
    // The unprivileged child must be able to reach the folder, not write in it.
    mode(outer.path(), 0o755).unwrap();
    mode(&target, 0o644).unwrap();
    mode(&dir, 0o555).unwrap();
    let ran = run_child(
        "atomic::child_write_into_read_only_folder",
        &target,
        ":",
        true,
    );
    mode(&dir, 0o755).unwrap();
    if ran {
        assert_eq!(std::fs::read(&target).unwrap(), OLD);
        assert_eq!(names(&dir), ["r.html"], "leftover in the folder");
    }
}

#[test]
fn read_only_file_is_replaced_whole_or_kept_whole() {
    // A read-only file in a writable folder: the rename may replace it (POSIX allows it) or
    // the platform may refuse; either way the result is one complete version and no
    // temporary.
    let dir = tempfile::tempdir().unwrap();
    let target = dir.path().join("r.html");
    std::fs::write(&target, OLD).unwrap();
    std::fs::set_permissions(&target, std::fs::Permissions::from_mode(0o444)).unwrap();
    let now = std::fs::read(&target);
    match write_atomic(&target, &new_report()) {
        Ok(()) => assert_eq!(std::fs::read(&target).unwrap(), new_report()),
        Err(_) => assert_eq!(std::fs::read(&target).unwrap(), now.unwrap()),
    }
    assert_eq!(names(dir.path()), ["r.html"], "leftover in the folder");
}
