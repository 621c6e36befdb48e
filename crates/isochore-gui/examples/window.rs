//! Opens the workbench window on its own: `cargo run -p isochore-gui --example window
//! [project-or-data-file]`. The `vhfit` binary does the same with no subcommand.

fn main() {
    let path = std::env::args_os().nth(1).map(std::path::PathBuf::from);
    if let Err(e) = isochore_gui::run(path) {
        eprintln!("{e}");
        std::process::exit(1);
    }
}
