//! One module per panel of the window. Panels read the document through
//! [`crate::app::Cx`] and propose commands; none of them changes the document directly.

pub mod calorimetric;
pub mod compensation;
pub mod diagnostics;
pub mod export;
pub mod files;
pub mod intervals;
pub mod joint;
pub mod menu;
pub mod predict;
pub mod results;
pub mod series_list;
pub mod settings;
pub mod status;
pub mod style;
pub mod table;
pub mod vh_plot;
