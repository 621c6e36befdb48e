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
