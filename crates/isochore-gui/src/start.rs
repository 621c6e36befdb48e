//! How the window starts, and where the demo project stands: the first start opens the
//! demo; later starts reopen the last project, or an empty window with the demo one click
//! away; every autosave found is offered back whichever project opens. Data opened while
//! the demo is shown start a new untitled project rather than mixing with the demo's
//! invented series (see [`is_demo`]).

use crate::app::{Prefs, Workbench};
use crate::doc::Project;
use crate::io;
use std::path::{Path, PathBuf};

/// Whether `project` is a demo project (never saved, every series one of the demo's data
/// sets or the ligand demo's), however it was changed since.
pub fn is_demo(project: &Project) -> bool {
    if project.path.is_some() || project.series.is_empty() {
        return false;
    }
    let demos: Vec<Project> = [io::demo_project(), io::ligand_demo_project()]
        .into_iter()
        .filter_map(Result::ok)
        .collect();
    project.series.iter().all(|s| {
        demos
            .iter()
            .flat_map(|d| &d.series)
            .any(|d| d.data.source.sha256 == s.data.source.sha256)
    })
}

/// The project file opened or saved last, if it still exists.
pub fn last_project(prefs: &Prefs) -> Option<PathBuf> {
    prefs
        .recent
        .iter()
        .find(|p| io::is_project_file(p))
        .filter(|p| p.is_file())
        .cloned()
}

impl Workbench {
    /// The workbench as the window starts it: `open` when given (a project or a data file);
    /// otherwise the demo at the first start, the last project at later starts, or an
    /// empty window (the demo one click away) when there is none. Every autosave found in
    /// `autosave_dir` or beside a recent project is offered.
    pub fn start(prefs: Prefs, open: Option<&Path>, autosave_dir: Option<PathBuf>) -> Workbench {
        let first = !prefs.started_before;
        let mut w = Workbench::new(prefs);
        w.prefs.started_before = true;
        w.autosave_dir = autosave_dir;
        let open = open
            .map(Path::to_path_buf)
            .or_else(|| (!first).then(|| last_project(&w.prefs)).flatten());
        match open {
            Some(p) => {
                w.open_path(&p);
                w.apply_pending();
            }
            None if first => match io::demo_project() {
                Ok(p) => w.replace_project(p, false),
                Err(e) => w
                    .messages
                    .push(format!("The demo project could not be loaded: {e}")),
            },
            None => {}
        }
        w.offer_recoveries();
        w
    }
}

/// The cold-start probe: with `ISOCHORE_FIRST_FRAME` set in the environment, the window
/// writes to stderr when its first frame was on screen — the Unix time in nanoseconds (for
/// a script that noted the time it started the program) and the time since the process
/// started (from Linux's `/proc`, to 10 ms) — and closes. Used by
/// `scripts/bench_window_start.sh`; nothing changes without the variable.
#[derive(Debug, Default)]
pub struct FirstFrameProbe {
    frames: u32,
}

impl FirstFrameProbe {
    /// The probe, when `ISOCHORE_FIRST_FRAME` is set.
    pub fn from_env() -> Option<FirstFrameProbe> {
        std::env::var_os("ISOCHORE_FIRST_FRAME").map(|_| FirstFrameProbe::default())
    }

    /// Called at the start of every frame. The first frame asks for a second at once; when
    /// the second starts, the first has been painted and presented, so the time is written
    /// and the window asked to close.
    pub fn frame(&mut self, ctx: &egui::Context) {
        self.frames += 1;
        if self.frames == 1 {
            ctx.request_repaint();
            return;
        }
        if self.frames != 2 {
            return;
        }
        let unix_ns = std::time::SystemTime::now()
            .duration_since(std::time::UNIX_EPOCH)
            .map_or(0, |d| d.as_nanos());
        let since_start = process_age_secs()
            .map_or_else(|| "unknown".to_string(), |s| format!("{:.0} ms", s * 1e3));
        eprintln!("first frame on screen: unix_ns={unix_ns} since_process_start={since_start}");
        ctx.send_viewport_cmd(egui::ViewportCommand::Close);
    }
}

/// Seconds since this process started, from `/proc/self/stat` (field 22, in clock ticks of
/// 1/100 s, the Linux value of `CLK_TCK` on the usual architectures) and `/proc/uptime`.
fn process_age_secs() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    // The command name (field 2) may hold spaces; the fields after its ')' are plain.
    let after = &stat[stat.rfind(')')? + 2..];
    let start_ticks: f64 = after.split_whitespace().nth(19)?.parse().ok()?;
    let uptime: f64 = std::fs::read_to_string("/proc/uptime")
        .ok()?
        .split_whitespace()
        .next()?
        .parse()
        .ok()?;
    Some(uptime - start_ticks / 100.0)
}
