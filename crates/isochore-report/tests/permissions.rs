//! Reports are created with the permissions any new file gets (0666 less the umask, as
//! `File::create` gives), not the private 0600 of a temporary file: colleagues on a shared
//! drive can open them. Every report file (HTML, PDF, Markdown, CSV, figures) is written
//! through `write_atomic`, so that is what is checked. The check runs again in a child
//! process under `umask 027`, whose expected 0640 differs from both 0600 and the 0644 of
//! the common umask 022.

#![cfg(unix)]

use isochore_report::write_atomic;
use std::os::unix::fs::PermissionsExt;
use std::path::Path;

const NAME: &str = "permissions::a_written_report_has_the_permissions_of_a_new_file";

fn mode(p: &Path) -> u32 {
    std::fs::metadata(p).unwrap().permissions().mode() & 0o777
}

#[test]
fn a_written_report_has_the_permissions_of_a_new_file() {
    let child = std::env::var_os("ISOCHORE_UMASK_CHILD").is_some();
    if !child {
        let status = std::process::Command::new("sh")
            .arg("-c")
            .arg("umask 027 && exec \"$0\" --exact \"$1\" --test-threads=1")
            .arg(std::env::current_exe().unwrap())
            .arg(NAME)
            .env("ISOCHORE_UMASK_CHILD", "1")
            .status()
            .unwrap();
        assert!(status.success(), "the check failed under umask 027");
    }
    let dir = tempfile::tempdir().unwrap();
    let reference = dir.path().join("reference.txt");
    std::fs::File::create(&reference).unwrap();
    let report = dir.path().join("binding.html");
    write_atomic(&report, b"<html>report</html>\n").unwrap();
    assert_eq!(mode(&report), mode(&reference));
    // Written again over itself: the same.
    write_atomic(&report, b"<html>report, again</html>\n").unwrap();
    assert_eq!(mode(&report), mode(&reference));
    if child {
        // umask 027 takes write from the group and everything from others.
        assert_eq!(mode(&report), 0o640);
    }
}
