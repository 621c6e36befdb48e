//! The workbench: owns the document, the undo history, the fits and one struct per panel,
//! and runs the frame loop (shortcuts, dropped files and paste, the close question). Each
//! frame the panels draw from a read-only view of the document ([`Cx`], in
//! [`crate::context`]) and *propose* [`Command`]s and [`Action`]s; after the UI pass the app
//! applies them ([`crate::actions`]), so a frame never sees a half-changed document. Autosave
//! and recovery are in [`crate::autosave`]. The clock is passed in, so tests are
//! deterministic.

pub use crate::actions::Action;
pub use crate::autosave::Recovery;
use crate::command::{Command, History};
pub use crate::context::{Cx, Links};
use crate::doc::Project;
use crate::fitting::Fitter;
use crate::io;
use crate::panels::{
    diagnostics::DiagnosticsPanel, files::FilesPanel, predict::PredictPanel, results::ResultsPanel,
    settings::SettingsPanel, table::TablePanel, vh_plot::PlotPanel,
};
use egui::{Context, Key, KeyboardShortcut, Modifiers};
use serde::{Deserialize, Serialize};
use std::path::{Path, PathBuf};

/// Key under which eframe keeps the preferences.
pub const PREFS_KEY: &str = "isochore-workbench-prefs";

/// How many recent files are remembered.
pub const MAX_RECENT: usize = 8;

/// What the window remembers between runs (besides egui's own layout memory).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct Prefs {
    /// Dark theme.
    pub dark: bool,
    /// Recently opened or saved files, newest first.
    pub recent: Vec<PathBuf>,
    /// Show the measurements table.
    pub show_table: bool,
    /// Show the residual and influence plots.
    pub show_diagnostics: bool,
    /// Show the results side panel.
    pub show_results: bool,
    /// Seconds between autosaves of unsaved changes.
    pub autosave_secs: f64,
    /// The window has started before (the first start opens the demo, later ones the last
    /// project).
    pub started_before: bool,
}

impl Default for Prefs {
    fn default() -> Self {
        Prefs {
            dark: false,
            recent: Vec::new(),
            show_table: true,
            show_diagnostics: true,
            show_results: true,
            autosave_secs: 60.0,
            started_before: false,
        }
    }
}

impl Prefs {
    /// Puts `path` at the top of the recent list.
    pub fn remember(&mut self, path: &Path) {
        self.recent.retain(|p| p != path);
        self.recent.insert(0, path.to_path_buf());
        self.recent.truncate(MAX_RECENT);
    }
}

/// The whole workbench.
pub struct Workbench {
    /// The document.
    pub project: Project,
    /// Undo and redo.
    pub history: History,
    /// The fits.
    pub fitter: Fitter,
    /// Monte Carlo and bootstrap runs (series whose interval setting is not the delta
    /// method).
    pub interval_runs: crate::intervals_run::IntervalRunner,
    /// Remembered preferences.
    pub prefs: Prefs,
    /// The series shown in the table and results.
    pub active: Option<u64>,
    /// Hover and selection.
    pub links: Links,
    /// Measurements table.
    pub table: TablePanel,
    /// Van 't Hoff plot.
    pub plot: PlotPanel,
    /// Residual and influence plots.
    pub diagnostics: DiagnosticsPanel,
    /// Results.
    pub results: ResultsPanel,
    /// Predictions and the two-point calculation.
    pub predict: PredictPanel,
    /// Per-series settings.
    pub settings: SettingsPanel,
    /// Files: open, import preview, save, export.
    pub files: FilesPanel,
    /// The "fit together" window (several series in one joint fit).
    pub joint: crate::panels::joint::JointPanel,
    /// The "Calorimetric ΔH°" window (the active series' calorimetric values).
    pub calorimetric: crate::panels::calorimetric::CalorimetricPanel,
    /// Messages for the chemist (errors while opening, saving, exporting).
    pub messages: Vec<String>,
    /// Where autosaves of never-saved projects go.
    pub autosave_dir: Option<PathBuf>,
    /// Wait for background fits (tests and benchmarks).
    pub block_fits: bool,
    /// Use this wall-clock time (seconds since 1970) instead of the system's (tests).
    pub fixed_unix_time: Option<i64>,
    /// The autosaves offered back (found at start-up or when a project is opened).
    pub recoveries: Vec<Recovery>,
    /// The close dialog is open.
    pub asking_to_close: bool,
    /// Set when the window may close (the eframe wrapper reads it).
    pub may_close: bool,
    /// Set when the window should close now (after the close question was answered).
    pub close_now: bool,
    pub(crate) pending: Vec<Command>,
    pub(crate) actions: Vec<Action>,
    pub(crate) now: f64,
    pub(crate) last_autosave_time: f64,
    pub(crate) last_autosave_rev: u64,
}

impl Workbench {
    /// An empty workbench with these preferences.
    pub fn new(prefs: Prefs) -> Self {
        Workbench {
            project: Project::default(),
            history: History::default(),
            fitter: Fitter::default(),
            interval_runs: Default::default(),
            prefs,
            active: None,
            links: Links::default(),
            table: TablePanel::default(),
            plot: PlotPanel::default(),
            diagnostics: DiagnosticsPanel::default(),
            results: ResultsPanel::default(),
            predict: PredictPanel::default(),
            settings: SettingsPanel::default(),
            files: FilesPanel::default(),
            joint: crate::panels::joint::JointPanel::default(),
            calorimetric: Default::default(),
            messages: Vec::new(),
            autosave_dir: None,
            block_fits: false,
            fixed_unix_time: None,
            recoveries: Vec::new(),
            asking_to_close: false,
            may_close: false,
            close_now: false,
            pending: Vec::new(),
            actions: Vec::new(),
            now: 0.0,
            last_autosave_time: 0.0,
            last_autosave_rev: 0,
        }
    }

    /// A workbench showing the demo project.
    pub fn with_demo(prefs: Prefs) -> Self {
        let mut w = Workbench::new(prefs);
        w.load_demo();
        w
    }

    fn load_demo(&mut self) {
        match io::demo_project() {
            Ok(p) => self.replace_project(p, false),
            Err(e) => self
                .messages
                .push(format!("The demo project could not be loaded: {e}")),
        }
    }

    /// Replaces the project (undoable when `undoable`, otherwise a fresh history).
    pub fn replace_project(&mut self, project: Project, undoable: bool) {
        if undoable {
            self.history.apply(
                &mut self.project,
                Command::ReplaceProject(Box::new(project)),
            );
        } else {
            self.project = project;
            self.history.clear();
        }
        self.active = self.project.series.first().map(|s| s.id);
        self.links = Links::default();
    }

    /// Queues an edit (applied after the current frame, or at the next [`Self::apply_pending`]).
    pub fn push(&mut self, cmd: Command) {
        self.pending.push(cmd);
    }

    /// Queues an action.
    pub fn act(&mut self, action: Action) {
        self.actions.push(action);
    }

    /// Applies queued edits and actions, then brings the fits up to date.
    pub fn apply_pending(&mut self) {
        for cmd in std::mem::take(&mut self.pending) {
            self.history.apply(&mut self.project, cmd);
        }
        for action in std::mem::take(&mut self.actions) {
            self.perform(action);
        }
        if self.active.is_none_or(|id| self.project.get(id).is_none()) {
            self.active = self.project.series.first().map(|s| s.id);
        }
        self.fitter
            .update(&self.project.series, self.now, self.block_fits);
        self.interval_runs
            .update(&self.project.series, self.now, self.block_fits);
    }

    /// The wall-clock time recorded with exclusions (fixed in tests).
    pub fn stamp(&self) -> String {
        let secs = self.fixed_unix_time.unwrap_or_else(|| {
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_or(0, |d| d.as_secs() as i64)
        });
        crate::command::rfc3339_utc(secs)
    }

    /// Sets the app clock (seconds); [`Self::frame`] does this every frame.
    pub fn set_clock(&mut self, now: f64) {
        self.now = now;
    }

    /// The app clock in seconds.
    pub fn now(&self) -> f64 {
        self.now
    }

    /// One frame, drawn into `root` (the root [`egui::Ui`] that eframe or a test harness
    /// hands over): the close button, the whole UI, then the queued edits (and the window
    /// is closed when the close question was answered). `now` is the clock in seconds.
    pub fn frame(&mut self, root: &mut egui::Ui, now: f64) {
        let ctx = &root.ctx().clone();
        self.now = now;
        ctx.set_theme(if self.prefs.dark {
            egui::Theme::Dark
        } else {
            egui::Theme::Light
        });
        self.close_request(ctx);
        // Bring fits up to date before drawing (first frame, or after outside changes).
        self.fitter
            .update(&self.project.series, self.now, self.block_fits);
        self.shortcuts(ctx);
        self.files_input(ctx);
        self.ui(root);
        self.links.hovered = self.links.next_hover.take();
        self.apply_pending();
        self.autosave_tick();
        if std::mem::take(&mut self.close_now) {
            ctx.send_viewport_cmd(egui::ViewportCommand::Close);
        }
        if !self.fitter.running(&self.project.series).is_empty() || self.interval_runs.any_running()
        {
            ctx.request_repaint_after(std::time::Duration::from_millis(100));
        }
    }

    /// The window's close button: with unsaved changes the close is cancelled and the
    /// question asked; without them the window may close.
    fn close_request(&mut self, ctx: &Context) {
        if ctx.input(|i| i.viewport().close_requested()) && !self.may_close {
            if self.history.dirty() {
                ctx.send_viewport_cmd(egui::ViewportCommand::CancelClose);
                self.asking_to_close = true;
            } else {
                self.may_close = true;
            }
        }
    }

    fn shortcuts(&mut self, ctx: &Context) {
        let text_focus = ctx.egui_wants_keyboard_input();
        let (redo, undo, save_as, save, open) = ctx.input_mut(|i| {
            let redo = !text_focus
                && (i.consume_shortcut(&KeyboardShortcut::new(
                    Modifiers::COMMAND | Modifiers::SHIFT,
                    Key::Z,
                )) || i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::Y)));
            let undo = !text_focus
                && i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::Z));
            let save_as = i.consume_shortcut(&KeyboardShortcut::new(
                Modifiers::COMMAND | Modifiers::SHIFT,
                Key::S,
            ));
            let save = i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::S));
            let open = i.consume_shortcut(&KeyboardShortcut::new(Modifiers::COMMAND, Key::O));
            (redo, undo, save_as, save, open)
        });
        if redo {
            self.act(Action::Redo);
        } else if undo {
            self.act(Action::Undo);
        }
        if save_as {
            self.files.ask_save_as();
        } else if save {
            self.act(Action::Save);
        }
        if open {
            self.files.ask_open();
        }
    }

    /// Dropped files and pasted text.
    fn files_input(&mut self, ctx: &Context) {
        let text_focus = ctx.egui_wants_keyboard_input();
        let (dropped, pasted) = ctx.input(|i| {
            let dropped: Vec<PathBuf> = i
                .raw
                .dropped_files
                .iter()
                .map(|f| f.path().to_path_buf())
                .collect();
            let pasted = if text_focus {
                None
            } else {
                i.events.iter().find_map(|e| match e {
                    egui::Event::Paste(t) => Some(t.clone()),
                    _ => None,
                })
            };
            (dropped, pasted)
        });
        for p in dropped {
            self.act(Action::Open(p));
        }
        if let Some(t) = pasted {
            self.act(Action::ImportText(t));
        }
    }

    fn ui(&mut self, root: &mut egui::Ui) {
        let ctx = &root.ctx().clone();
        let mut out = Vec::new();
        let mut actions = Vec::new();
        let dark = self.prefs.dark;
        let stamp = self.stamp();
        let mut cx = Cx {
            project: &self.project,
            fitter: &self.fitter,
            intervals: &self.interval_runs,
            active: self.active,
            links: &mut self.links,
            out: &mut out,
            actions: &mut actions,
            now: self.now,
            dark,
            stamp,
        };
        crate::panels::menu::menu_bar(
            root,
            &mut cx,
            &mut self.prefs,
            &self.history,
            &mut self.files,
            &mut self.joint,
            &mut self.calorimetric,
        );
        crate::panels::status::status_bar(
            root,
            &mut cx,
            &self.history,
            &mut self.messages,
            &self.recoveries,
        );
        egui::Panel::left("series_and_settings")
            .resizable(true)
            .default_size(285.0)
            .show(root, |ui| {
                // Both ways, filling the panel: a wider line (a longer unit) scrolls
                // instead of widening the panel, so panels never jump.
                egui::ScrollArea::both().auto_shrink(false).show(ui, |ui| {
                    self.settings.ui(ui, &mut cx);
                });
            });
        if self.prefs.show_results {
            // Wide enough for a value, its SE and both ends of its interval on one line on a
            // common screen (at 1600 px wide the table's interval column was cut at 380 px).
            let results_width = (root.ctx().content_rect().width() * 0.30).clamp(380.0, 560.0);
            egui::Panel::right("results")
                .resizable(true)
                .default_size(results_width)
                .show(root, |ui| {
                    egui::ScrollArea::both().auto_shrink(false).show(ui, |ui| {
                        self.results.ui(ui, &mut cx);
                        ui.separator();
                        self.predict.ui(ui, &mut cx);
                    });
                });
        }
        if self.prefs.show_table {
            egui::Panel::bottom("measurements")
                .resizable(true)
                .default_size(260.0)
                .show(root, |ui| {
                    self.table.ui(ui, &mut cx);
                });
        }
        egui::CentralPanel::default().show(root, |ui| {
            let h = ui.available_height();
            if self.prefs.show_diagnostics {
                let top = (h * 0.62).max(150.0);
                ui.allocate_ui(egui::vec2(ui.available_width(), top), |ui| {
                    self.plot.ui(ui, &mut cx);
                });
                ui.separator();
                self.diagnostics.ui(ui, &mut cx);
            } else {
                self.plot.ui(ui, &mut cx);
            }
        });
        self.files.export.calorimetric_in_fit = self.calorimetric.in_fit;
        self.files.windows(ctx, &mut cx);
        self.joint.show(ctx, &mut cx);
        self.calorimetric.show(ctx, &mut cx);
        crate::panels::status::close_dialog(ctx, &mut cx, &mut self.asking_to_close);
        self.pending.extend(out);
        self.actions.extend(actions);
    }
}
