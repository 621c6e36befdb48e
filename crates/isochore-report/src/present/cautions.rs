//! The cautions every report states in its "Assumptions and cautions" section, in one
//! place so a single fit's report and a joint fit's say them in the same words.

/// What the standard state and the activity coefficients are taken to be.
pub const ACTIVITIES: &str = "Activities are taken as concentrations relative to the standard state c° = 1 mol/L (dissociation constants are converted as K = c°/K_d); activity coefficients are assumed constant over the temperature range.";

/// Van 't Hoff against calorimetric enthalpies.
pub const CALORIMETRY: &str = "Van 't Hoff enthalpies can differ from calorimetric ones (coupled equilibria, protonation, or a two-state assumption that does not hold); compare with calorimetry where it matters.";

/// The report defers to the laboratory's own validated methods.
pub const LAB_METHODS: &str = "This report documents a calculation; it does not replace the laboratory's own validated methods, which take precedence for any decision.";

/// Values outside the measured range `lo` to `hi` (already written in the display unit).
pub fn extrapolation(lo: &str, hi: &str) -> String {
    format!(
        "Values outside the measured range {lo} to {hi} are extrapolations that hold only if the model does."
    )
}
