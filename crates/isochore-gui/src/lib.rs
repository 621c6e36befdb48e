//! # isochore-gui
//!
//! The Isochore workbench window (eframe + egui, drawn with the glow OpenGL renderer, which
//! runs on Mesa's software rasteriser where there is no GPU). It is a view: it holds the
//! document and the undo history, shows what isochore-fit computes, reads and writes files
//! through isochore-data and isochore-report, and computes no statistics itself.
//!
//! Entry point: [`run`]. The pieces: [`doc`] (the document), [`command`] (every edit, with
//! undo), [`fitting`] (fits in and off the UI thread), [`decimate`] (drawing a million
//! points), [`io`] (files), [`export`] (reports written off the UI thread),
//! [`intervals_run`] (Monte Carlo and bootstrap intervals off the UI thread), [`panels`]
//! (one struct per panel), [`context`] (what panels see
//! and propose), [`actions`] (what the app does for them), [`autosave`] (autosave and
//! recovery) and [`app`] (the frame loop).

#![deny(missing_docs)]

pub mod actions;
pub mod app;
pub mod autosave;
pub mod command;
pub mod context;
pub mod decimate;
pub mod doc;
pub mod export;
pub mod fitting;
pub mod intervals_run;
pub mod io;
pub mod joint_export;
pub mod panels;
pub mod start;

pub use app::{Action, Prefs, Workbench};

use std::path::PathBuf;
use std::time::Instant;

/// The eframe wrapper: the workbench plus a clock and persistence.
struct WindowApp {
    bench: Workbench,
    start: Instant,
    /// The cold-start probe (`ISOCHORE_FIRST_FRAME`), when asked for.
    probe: Option<start::FirstFrameProbe>,
}

impl eframe::App for WindowApp {
    fn ui(&mut self, ui: &mut egui::Ui, _frame: &mut eframe::Frame) {
        // The frame also answers the window's close button (the close question).
        if let Some(probe) = &mut self.probe {
            probe.frame(ui.ctx());
        }
        let now = self.start.elapsed().as_secs_f64();
        self.bench.frame(ui, now);
        // eframe writes preferences and layout at the end of a frame once the save interval
        // has passed; an idle window draws no frames, so wake it once per interval, or a
        // change made just before a crash would be lost.
        ui.ctx().request_repaint_after(
            eframe::App::auto_save_interval(self) + std::time::Duration::from_secs(1),
        );
    }

    fn save(&mut self, storage: &mut dyn eframe::Storage) {
        eframe::set_value(storage, app::PREFS_KEY, &self.bench.prefs);
    }

    fn auto_save_interval(&self) -> std::time::Duration {
        std::time::Duration::from_secs(30)
    }
}

/// The application icon (assets/icons/isochore-256.png, drawn for Isochore), built into the
/// binary so no file is needed at run time.
pub const ICON_PNG: &[u8] = include_bytes!("../../../assets/icons/isochore-256.png");

/// The window icon decoded from [`ICON_PNG`]; `None` (and the desktop's default icon) if it
/// cannot be decoded.
pub fn app_icon() -> Option<egui::IconData> {
    eframe::icon_data::from_png_bytes(ICON_PNG).ok()
}

/// Opens the workbench window on `project` (a project file or a data file); when `None`,
/// on the demo at the first start and on the last project later ([`Workbench::start`]).
/// Blocks until the window closes.
///
/// # Errors
/// A message when no window can be opened (no display, no OpenGL).
pub fn run(project: Option<PathBuf>) -> Result<(), String> {
    let mut viewport = egui::ViewportBuilder::default()
        .with_title("Isochore — van 't Hoff workbench")
        .with_app_id("isochore")
        .with_inner_size([1500.0, 950.0])
        .with_min_inner_size([900.0, 600.0])
        .with_drag_and_drop(true);
    if let Some(icon) = app_icon() {
        viewport = viewport.with_icon(icon);
    }
    let options = eframe::NativeOptions {
        viewport,
        renderer: eframe::Renderer::Glow,
        persist_window: true,
        ..Default::default()
    };
    eframe::run_native(
        "isochore",
        options,
        Box::new(move |cc| {
            let prefs: Prefs = cc
                .storage
                .and_then(|s| eframe::get_value(s, app::PREFS_KEY))
                .unwrap_or_default();
            let bench =
                Workbench::start(prefs, project.as_deref(), eframe::storage_dir("isochore"));
            Ok(Box::new(WindowApp {
                bench,
                start: Instant::now(),
                probe: start::FirstFrameProbe::from_env(),
            }))
        }),
    )
    .map_err(|e| format!("The window could not be opened: {e}"))
}

#[cfg(test)]
mod tests {
    #[test]
    fn the_icon_decodes_to_a_square_picture() {
        let icon = super::app_icon().expect("icon decodes");
        assert_eq!((icon.width, icon.height), (256, 256));
        assert_eq!(icon.rgba.len(), 256 * 256 * 4);
        // Corners are transparent (rounded tile), the centre is opaque.
        assert_eq!(icon.rgba[3], 0);
        let centre = (128 * 256 + 128) * 4;
        assert_eq!(icon.rgba[centre + 3], 255);
    }
}
