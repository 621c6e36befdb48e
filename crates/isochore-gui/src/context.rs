//! What the panels see and say in a frame: [`Cx`], a read-only view of the document and the
//! fits with the outboxes where panels propose edits and actions, and [`Links`], the hover and
//! selection shared by the table and every plot.

use crate::actions::Action;
use crate::command::Command;
use crate::doc::Project;
use crate::fitting::Fitter;

/// Hover and selection shared by the table and every plot.
#[derive(Debug, Clone, Copy, Default, PartialEq)]
pub struct Links {
    /// The point under the pointer last frame: (series id, row).
    pub hovered: Option<(u64, usize)>,
    /// The point clicked in the table.
    pub selected: Option<(u64, usize)>,
    /// Collected during this frame; becomes `hovered` after it.
    pub next_hover: Option<(u64, usize)>,
}

/// Read-only view of the app handed to panels, plus the outboxes they write to.
pub struct Cx<'a> {
    /// The document.
    pub project: &'a Project,
    /// Latest fits.
    pub fitter: &'a Fitter,
    /// Monte Carlo and bootstrap runs.
    pub intervals: &'a crate::intervals_run::IntervalRunner,
    /// The active series.
    pub active: Option<u64>,
    /// Hover and selection.
    pub links: &'a mut Links,
    /// Proposed edits.
    pub out: &'a mut Vec<Command>,
    /// Proposed actions.
    pub actions: &'a mut Vec<Action>,
    /// The app clock, seconds.
    pub now: f64,
    /// Dark theme in use.
    pub dark: bool,
    /// The wall-clock time as RFC 3339, recorded with exclusions.
    pub stamp: String,
}

impl Cx<'_> {
    /// The active series.
    pub fn series(&self) -> Option<&crate::doc::Entry> {
        self.active.and_then(|id| self.project.get(id))
    }
}
