//! The benchmarks' shared data: one invented series of many points, read from CSV text.

use isochore_gui::doc::Project;

/// A million invented points: ln K = 3000/T − 5 with deterministic noise, 5–45 °C, read by
/// isochore-data from CSV text exactly as a file would be.
pub fn big_project(n: usize) -> Project {
    let mut state: u64 = 0x2545_f491_4f6c_dd1d;
    let mut noise = || {
        // xorshift64*: a fixed, portable pseudo-random stream.
        state ^= state >> 12;
        state ^= state << 25;
        state ^= state >> 27;
        let x = state.wrapping_mul(0x2545_f491_4f6c_dd1d);
        (x >> 11) as f64 / (1u64 << 53) as f64 - 0.5
    };
    let mut text = String::from("T (°C),ln K,u(ln K)\n");
    for i in 0..n {
        let t = 5.0 + 40.0 * i as f64 / n as f64;
        let ln_k = 3000.0 / (t + 273.15) - 5.0 + 0.05 * noise();
        text.push_str(&format!("{t:.6},{ln_k:.6},0.03\n"));
    }
    let imp = isochore_data::import_text("synthetic.csv", &text, &Default::default())
        .expect("synthetic data import");
    Project::from_data(isochore_data::Project::from_import(&imp), None)
}
