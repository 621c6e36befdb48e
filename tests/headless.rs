//! The command line on its own: without a display it says so in one line and points to
//! `vhfit --help`.

use std::process::Command;

#[test]
fn without_a_display_the_window_is_refused_in_one_line() {
    let out = Command::new(env!("CARGO_BIN_EXE_vhfit"))
        .env_remove("DISPLAY")
        .env_remove("WAYLAND_DISPLAY")
        .output()
        .expect("the binary runs");
    let err = String::from_utf8_lossy(&out.stderr);
    assert_ne!(out.status.code(), Some(0), "{err}");
    assert!(out.status.code().is_some(), "ended by a signal: {err}");
    assert!(out.stdout.is_empty());
    assert!(err.ends_with('\n'), "ends with a newline: {err:?}");
    assert_eq!(err.lines().count(), 1, "one line: {err:?}");
    assert!(err.contains("no display"), "{err}");
    assert!(err.contains("vhfit --help"), "{err}");
    assert!(!err.contains(".rs"), "no source path: {err}");
}
