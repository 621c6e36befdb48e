//! Small helpers: invented data files written into a temporary folder, and an ordinary
//! least-squares slope computed here, independently of isochore-fit.

use std::path::PathBuf;

/// Writes `text` as `name` in a fresh temporary folder (kept alive by the returned guard).
pub fn file(name: &str, text: &str) -> (tempfile::TempDir, PathBuf) {
    let dir = tempfile::tempdir().expect("temporary folder");
    let path = dir.path().join(name);
    std::fs::write(&path, text).expect("write test file");
    (dir, path)
}

/// pKa at four temperatures (invented): ln K = −pKa·ln 10.
pub const TEMPS_K: [f64; 4] = [278.15, 288.15, 298.15, 308.15];
/// The pKa values of [`TEMPS_K`].
pub const PKA: [f64; 4] = [7.62, 7.45, 7.31, 7.18];

/// ΔH° (J/mol) of the unweighted straight line ln K = a + b/T through [`TEMPS_K`], [`PKA`]:
/// ΔH° = −R·b with b the ordinary least-squares slope Σ(x−x̄)(y−ȳ)/Σ(x−x̄)² (the textbook
/// formula, common practice), R = 8.314462618 J mol⁻¹ K⁻¹ (CODATA 2018).
pub fn unweighted_delta_h() -> f64 {
    let x: Vec<f64> = TEMPS_K.iter().map(|t| 1.0 / t).collect();
    let y: Vec<f64> = PKA.iter().map(|p| -p * std::f64::consts::LN_10).collect();
    let n = x.len() as f64;
    let (mx, my) = (x.iter().sum::<f64>() / n, y.iter().sum::<f64>() / n);
    let sxy: f64 = x.iter().zip(&y).map(|(a, b)| (a - mx) * (b - my)).sum();
    let sxx: f64 = x.iter().map(|a| (a - mx) * (a - mx)).sum();
    -8.314_462_618 * sxy / sxx
}

/// The four rows as CSV with a σ column whose cells are `sigma[i]` ("" for empty).
pub fn csv(sigma: [&str; 4]) -> String {
    let mut s = String::from("temp/K,pKa,u(pKa)\n");
    for i in 0..4 {
        s.push_str(&format!("{},{},{}\n", TEMPS_K[i], PKA[i], sigma[i]));
    }
    s
}
