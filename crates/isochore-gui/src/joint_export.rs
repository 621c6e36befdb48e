//! The joint report written from the "fit together" view (issue 12: the joint fit in the
//! reports, from the window as from `vhfit fit A B --share … --report DIR`): the report input
//! of isochore-analysis (`joint_report_input`: every series' rows with their cells as typed,
//! the joint fit, the test of equality, the compensation analysis, the calorimetric
//! comparisons and, when shown, the fit with the calorimetric values), every format into
//! one folder under the stem `joint-fit`, written by isochore-report on a worker thread. The
//! overwrite guard (no input and no file isochore did not write is replaced) is checked
//! before anything is written, as on the command line.

use crate::doc::{Entry, Project};
use isochore_analysis::joint::JointAnalysis;
use isochore_analysis::{Overrides, PreparedSet};
use isochore_fit::calorimetric::CalorimetricComparison;
use isochore_fit::global::{CalorimetricJointFit, GlobalError};
use isochore_fit::Model;
use std::path::{Path, PathBuf};
use std::sync::mpsc::{Receiver, TryRecvError};

/// The stem of the joint report's files (the command line's).
pub const JOINT_STEM: &str = "joint-fit";

/// A joint report being written.
pub struct JointExport {
    rx: Receiver<Result<Vec<PathBuf>, String>>,
}

impl JointExport {
    /// Checks the targets and starts writing the joint report of `chosen` (fitted with
    /// `model` into `analysis`) into `folder`.
    ///
    /// # Errors
    /// A sentence when the folder is not given, a series no longer converts, or the guard
    /// refuses a file (nothing is written then).
    pub fn start(
        project: &Project,
        chosen: &[&Entry],
        model: Model,
        analysis: &JointAnalysis,
        comparisons: &[Vec<CalorimetricComparison>],
        constrained: Option<&Result<CalorimetricJointFit, GlobalError>>,
        folder: &Path,
    ) -> Result<JointExport, String> {
        if folder.as_os_str().is_empty() {
            return Err("Give a folder for the joint report.".into());
        }
        let overrides = Overrides {
            model: Some(model),
            with_cells: true,
            ..Overrides::default()
        };
        let sets: Vec<PreparedSet> = chosen
            .iter()
            .map(|s| PreparedSet::from_data_set(&s.data, s.name(), &overrides))
            .collect::<Result<_, _>>()
            .map_err(|e| e.to_string())?;
        let input =
            isochore_analysis::joint_report_input(&sets, analysis, comparisons, constrained, &[]);
        let inputs: Vec<PathBuf> = project
            .path
            .iter()
            .cloned()
            .chain(
                chosen
                    .iter()
                    .filter_map(|s| s.data.source.path.as_ref().map(PathBuf::from)),
            )
            .collect();
        let guard = isochore_report::OverwriteGuard::new(&inputs);
        let refusals: Vec<String> =
            isochore_report::joint_report_set_paths(&input, folder, JOINT_STEM)
                .iter()
                .filter_map(|p| guard.refusal(p))
                .collect();
        if !refusals.is_empty() {
            return Err(format!("No report was written:\n{}", refusals.join("\n")));
        }
        let (tx, rx) = std::sync::mpsc::channel();
        let folder = folder.to_path_buf();
        std::thread::Builder::new()
            .name("isochore-joint-export".into())
            .spawn(move || {
                let r = isochore_report::write_joint_report_set(&input, &folder, JOINT_STEM)
                    .map_err(|e| e.to_string())
                    .and_then(|written| guard.record(&written).map(|()| written));
                let _ = tx.send(r);
            })
            .map_err(|e| format!("could not start the export: {e}"))?;
        Ok(JointExport { rx })
    }

    /// The files written once the worker is done, or the failure in words.
    pub fn poll(&self) -> Option<Result<Vec<PathBuf>, String>> {
        match self.rx.try_recv() {
            Ok(r) => Some(r),
            Err(TryRecvError::Empty) => None,
            Err(TryRecvError::Disconnected) => Some(Err("the export stopped unexpectedly".into())),
        }
    }
}
