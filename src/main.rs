//! The `vhfit` binary: with no subcommand it opens the desktop workbench; the
//! subcommands `fit`, `predict` and `two-point` run the same engine headless, print a
//! readable table or the JSON contract, and write reports.
//!
//! Exit codes: 0 success, 1 some input could not be used (the message on stderr names the
//! file, line and column), the output could not be written or no window could be opened
//! (no display), 2 bad usage (clap's own usage
//! errors included). A closed stdout (broken pipe) ends the run quietly with 0; see
//! [`output`], the one path every byte to the terminal takes.

mod calorimetric_cmd;
mod cli;
mod errors_in_t_cmd;
mod fit_cmd;
mod intervals_cmd;
mod joint_cmd;
mod load;
mod output;
mod predict_cmd;
mod table;
mod two_point_cmd;

use clap::Parser;
use std::process::ExitCode;

/// Exit code when some input could not be used.
pub const EXIT_INPUT: u8 = 1;
/// Exit code for bad usage.
pub const EXIT_USAGE: u8 = 2;

/// A failure of one command, with the exit code it earns.
#[derive(Debug)]
pub struct Failure {
    /// 1 (input) or 2 (usage).
    pub code: u8,
    /// The message for stderr.
    pub message: String,
}

impl Failure {
    /// An input failure (exit 1).
    pub fn input(message: impl Into<String>) -> Self {
        Failure {
            code: EXIT_INPUT,
            message: message.into(),
        }
    }

    /// A usage failure (exit 2).
    pub fn usage(message: impl Into<String>) -> Self {
        Failure {
            code: EXIT_USAGE,
            message: message.into(),
        }
    }
}

fn main() -> ExitCode {
    let args = match cli::Cli::try_parse() {
        Ok(a) => a,
        Err(e) => return usage_or_help(&e),
    };
    let result = match args.command {
        None => open_window(),
        Some(cli::Command::Fit(a)) => fit_cmd::run(&a),
        Some(cli::Command::Predict(a)) => predict_cmd::run(&a),
        Some(cli::Command::TwoPoint(a)) => two_point_cmd::run(&a),
    };
    let code = match result {
        Ok(()) => 0,
        Err(f) => {
            if !f.message.is_empty() {
                output::note(&f.message);
            }
            f.code
        }
    };
    finish(code)
}

/// The exit code, made 1 when a message could not be written to stderr.
fn finish(code: u8) -> ExitCode {
    if code == 0 && output::stderr_failed() {
        ExitCode::from(EXIT_INPUT)
    } else {
        ExitCode::from(code)
    }
}

/// clap's help and version (stdout, exit 0) and usage errors (stderr, exit 2), written
/// through the same path as everything else.
fn usage_or_help(e: &clap::Error) -> ExitCode {
    let text = e.render().to_string();
    let code = u8::try_from(e.exit_code()).unwrap_or(EXIT_USAGE);
    if e.use_stderr() {
        output::stderr_raw(&text);
        return finish(code);
    }
    match output::print(&text) {
        Ok(()) => finish(code),
        Err(f) => {
            if !f.message.is_empty() {
                output::note(&f.message);
            }
            finish(f.code)
        }
    }
}

/// Opens the desktop workbench. With no display to open it on, says so in one line and
/// points to the command line (exit 1) instead of passing on the windowing library's error.
#[cfg(feature = "gui")]
fn open_window() -> Result<(), Failure> {
    if let Some(message) = no_display() {
        return Err(Failure::input(message));
    }
    isochore_gui::run(None).map_err(|e| {
        let first = e.lines().next().unwrap_or("").trim();
        Failure::input(format!(
            "the window could not open ({first}); the command line needs no window: see vhfit --help"
        ))
    })
}

/// On Linux and the BSDs, a window needs an X11 or Wayland display: the message when neither
/// `DISPLAY` nor `WAYLAND_DISPLAY` is set (or both are empty). Other systems always have one.
#[cfg(feature = "gui")]
fn no_display() -> Option<String> {
    if cfg!(any(windows, target_os = "macos")) {
        return None;
    }
    let set = |name: &str| std::env::var_os(name).is_some_and(|v| !v.is_empty());
    (!set("DISPLAY") && !set("WAYLAND_DISPLAY")).then(|| {
        "no display to open the window on (neither DISPLAY nor WAYLAND_DISPLAY is set); the command line works without one: see vhfit --help".to_string()
    })
}

/// Built without the window: say so and show the subcommands.
#[cfg(not(feature = "gui"))]
fn open_window() -> Result<(), Failure> {
    use clap::CommandFactory;
    let help = cli::Cli::command().render_help();
    Err(Failure::usage(format!(
        "this build has no desktop window (built without the 'gui' feature); use a subcommand\n{help}"
    )))
}
