//! The `isochore` binary: with no subcommand it opens the desktop workbench; the
//! subcommands `fit`, `predict` and `two-point` run the same engine headless, print a
//! readable table or the JSON contract, and write reports.
//!
//! Exit codes: 0 success, 1 some input could not be used (the message on stderr names the
//! file, line and column), 2 bad usage (clap's own usage errors included).

mod cli;
mod fit_cmd;
mod json;
mod load;
mod predict_cmd;
mod table;
mod two_point_cmd;

use clap::Parser;
use std::process::ExitCode;

/// jemalloc, built with transparent huge pages on (`.cargo/config.toml`): a large import
/// then touches a few hundred 2 MiB pages instead of tens of thousands of 4 KiB ones, which
/// takes about a fifth off the time to read a million-row file (see the isochore-data
/// README).
#[cfg(not(target_env = "msvc"))]
#[global_allocator]
static ALLOCATOR: tikv_jemallocator::Jemalloc = tikv_jemallocator::Jemalloc;

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
    let args = cli::Cli::parse();
    let result = match args.command {
        None => open_window(),
        Some(cli::Command::Fit(a)) => fit_cmd::run(&a),
        Some(cli::Command::Predict(a)) => predict_cmd::run(&a),
        Some(cli::Command::TwoPoint(a)) => two_point_cmd::run(&a),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            if !f.message.is_empty() {
                eprintln!("isochore: {}", f.message);
            }
            ExitCode::from(f.code)
        }
    }
}

/// Opens the desktop workbench.
#[cfg(feature = "gui")]
fn open_window() -> Result<(), Failure> {
    isochore_gui::run(None).map_err(Failure::input)
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
