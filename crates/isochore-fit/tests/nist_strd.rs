//! Accuracy of the general least-squares solver against the NIST StRD linear regression
//! reference datasets (NIST/ITL Statistical Reference Datasets, certified to 15 digits
//! with multiple-precision arithmetic; files in `../shared/reference/nist-strd-lls/`).
//!
//! Every dataset is fitted through [`isochore_fit::least_squares::solve`] on the design the
//! file's model names (polynomial in x, the six Longley predictors, or a line through the
//! origin for NoInt1/NoInt2). The log relative error (LRE, roughly the number of correct
//! significant digits) of every coefficient, its standard deviation, the residual standard
//! deviation and R² is printed as a table (`cargo test -p isochore-fit --test nist_strd --
//! --nocapture`) and required to be at least 9 (Filip, the ill-conditioned degree-10
//! polynomial: at least 7). When the folder is absent (a fresh clone without `shared/`),
//! the test prints why (to the process's stderr, which the test runner does not capture)
//! and passes.

use isochore_fit::least_squares::solve;
use nalgebra::DMatrix;
use std::io::Write;
use std::path::PathBuf;

/// The 11 datasets of the NIST StRD linear least-squares suite.
const DATASETS: [&str; 11] = [
    "Norris", "Pontius", "NoInt1", "NoInt2", "Filip", "Longley", "Wampler1", "Wampler2",
    "Wampler3", "Wampler4", "Wampler5",
];

/// LRE is meaningless beyond the 15 certified digits (NIST StRD README).
const LRE_CAP: f64 = 15.0;

/// Where the shared reference folder is: `$ISOCHORE_SHARED`, else `<repo>/../shared`.
fn reference_dir() -> PathBuf {
    let shared = match std::env::var_os("ISOCHORE_SHARED") {
        Some(p) => PathBuf::from(p),
        None => PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../../../shared"),
    };
    shared.join("reference/nist-strd-lls")
}

/// What a StRD file certifies, and its data.
struct Dataset {
    name: String,
    /// Certified estimates B0.. (or B1 for the no-intercept sets).
    beta: Vec<f64>,
    /// Certified standard deviations of the estimates.
    sd: Vec<f64>,
    residual_sd: f64,
    r2: f64,
    /// Observations, and for each observation its predictor values.
    y: Vec<f64>,
    x: Vec<Vec<f64>>,
}

fn parse_number(s: &str, file: &str, line: usize) -> Result<f64, String> {
    s.parse::<f64>()
        .map_err(|e| format!("{file}: line {line}: cannot read '{s}' as a number: {e}"))
}

fn parse(name: &str, text: &str) -> Result<Dataset, String> {
    let file = format!("{name}.dat");
    let mut beta = Vec::new();
    let mut sd = Vec::new();
    let mut residual_sd = None;
    let mut r2 = None;
    let mut y = Vec::new();
    let mut x = Vec::new();
    let mut in_data = false;
    for (i, raw) in text.lines().enumerate() {
        let line_no = i + 1;
        let t = raw.trim();
        if in_data {
            if t.is_empty() {
                continue;
            }
            let nums: Vec<f64> = t
                .split_whitespace()
                .map(|s| parse_number(s, &file, line_no))
                .collect::<Result<_, _>>()?;
            y.push(nums[0]);
            x.push(nums[1..].to_vec());
            continue;
        }
        let tokens: Vec<&str> = t.split_whitespace().collect();
        // The column-header line of the data block, "Data:  y  x" (the header's
        // "Data: 1 Response Variable" line is not it).
        if tokens.len() >= 2 && tokens[0] == "Data:" && tokens[1] == "y" {
            in_data = true;
            continue;
        }
        // Parameter rows: "B3   <estimate>   <sd>" (only in the certified block).
        if tokens.len() == 3
            && tokens[0].len() >= 2
            && tokens[0].starts_with('B')
            && tokens[0][1..].chars().all(|c| c.is_ascii_digit())
        {
            beta.push(parse_number(tokens[1], &file, line_no)?);
            sd.push(parse_number(tokens[2], &file, line_no)?);
        } else if t.starts_with("Standard Deviation") && tokens.len() == 3 {
            residual_sd = Some(parse_number(tokens[2], &file, line_no)?);
        } else if t.starts_with("R-Squared") && tokens.len() == 2 {
            r2 = Some(parse_number(tokens[1], &file, line_no)?);
        }
    }
    let residual_sd = residual_sd.ok_or(format!("{file}: no residual standard deviation"))?;
    let r2 = r2.ok_or(format!("{file}: no R-squared"))?;
    if beta.is_empty() || y.is_empty() {
        return Err(format!("{file}: no certified parameters or no data"));
    }
    Ok(Dataset {
        name: name.to_string(),
        beta,
        sd,
        residual_sd,
        r2,
        y,
        x,
    })
}

/// The design matrix of the model NIST states for the dataset.
fn design(d: &Dataset) -> (DMatrix<f64>, bool) {
    let n = d.y.len();
    let p = d.beta.len();
    match d.name.as_str() {
        // y = B1·x, no intercept.
        "NoInt1" | "NoInt2" => (DMatrix::from_fn(n, 1, |i, _| d.x[i][0]), false),
        // y = B0 + B1·x1 + … + B6·x6.
        "Longley" => (
            DMatrix::from_fn(n, p, |i, j| if j == 0 { 1.0 } else { d.x[i][j - 1] }),
            true,
        ),
        // Polynomials y = B0 + B1·x + … + B_{p−1}·x^{p−1}.
        _ => (
            DMatrix::from_fn(n, p, |i, j| d.x[i][0].powi(j as i32)),
            true,
        ),
    }
}

/// Log relative error, or log absolute error when the certified value is zero; capped.
fn lre(estimate: f64, certified: f64) -> f64 {
    let err = if certified == 0.0 {
        estimate.abs()
    } else {
        (estimate - certified).abs() / certified.abs()
    };
    if !err.is_finite() {
        return 0.0;
    }
    if err == 0.0 {
        return LRE_CAP;
    }
    (-err.log10()).clamp(0.0, LRE_CAP)
}

struct Scores {
    beta: f64,
    sd: f64,
    residual_sd: f64,
    r2: f64,
}

fn score(d: &Dataset) -> Result<Scores, String> {
    let (x, intercept) = design(d);
    let fit = solve(&x, &d.y, None).map_err(|e| format!("{}: solver refused: {e}", d.name))?;
    let n = d.y.len() as f64;
    let p = d.beta.len() as f64;
    let s2 = fit.rss / (n - p);
    let beta = fit
        .coefficients
        .iter()
        .zip(&d.beta)
        .map(|(e, c)| lre(*e, *c))
        .fold(LRE_CAP, f64::min);
    let sd = (0..d.beta.len())
        .map(|j| lre((fit.unscaled_covariance[(j, j)] * s2).sqrt(), d.sd[j]))
        .fold(LRE_CAP, f64::min);
    let residual_sd = lre(s2.sqrt(), d.residual_sd);
    // R²: centred with an intercept, uncentred (1 − RSS/Σy²) without (NIST StRD README).
    let tss: f64 = if intercept {
        let mean = d.y.iter().sum::<f64>() / n;
        d.y.iter().map(|v| (v - mean).powi(2)).sum()
    } else {
        d.y.iter().map(|v| v * v).sum()
    };
    let r2 = lre(1.0 - fit.rss / tss, d.r2);
    Ok(Scores {
        beta,
        sd,
        residual_sd,
        r2,
    })
}

#[test]
fn nist_strd_linear_least_squares_lre() {
    let dir = reference_dir();
    if !dir.is_dir() {
        // Straight to the process's stderr: libtest captures `eprintln!` of a passing test
        // and shows nothing, so the skip would look like a pass.
        let _ = writeln!(
            std::io::stderr(),
            "NIST StRD check skipped: folder {} not found (set ISOCHORE_SHARED to the shared folder that holds reference/nist-strd-lls)",
            dir.display()
        );
        return;
    }
    let mut failures = Vec::new();
    let mut table = String::from(
        "\nNIST StRD linear least squares: minimum LRE (digits) per quantity\n\
         dataset    coefficients  std devs  residual SD     R²   required\n",
    );
    for name in DATASETS {
        let path = dir.join(format!("{name}.dat"));
        let text = match std::fs::read_to_string(&path) {
            Ok(t) => t,
            Err(e) => {
                failures.push(format!("{}: cannot read: {e}", path.display()));
                continue;
            }
        };
        let d = match parse(name, &text) {
            Ok(d) => d,
            Err(e) => {
                failures.push(e);
                continue;
            }
        };
        // Project requirement (set in issue 2, not a NIST figure): LRE ≥ 9 everywhere,
        // Filip ≥ 7.
        let required = if name == "Filip" { 7.0 } else { 9.0 };
        match score(&d) {
            Ok(s) => {
                table.push_str(&format!(
                    "{name:<10} {:>12.1} {:>9.1} {:>12.1} {:>6.1} {:>10.0}\n",
                    s.beta, s.sd, s.residual_sd, s.r2, required
                ));
                for (what, v) in [
                    ("coefficients", s.beta),
                    ("standard deviations", s.sd),
                    ("residual SD", s.residual_sd),
                    ("R²", s.r2),
                ] {
                    if v < required {
                        failures.push(format!("{name}: LRE of {what} {v:.2} < {required}"));
                    }
                }
            }
            Err(e) => failures.push(e),
        }
    }
    eprintln!("{table}");
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn lre_definition() {
    // NIST StRD README: LRE = −log10(|est − cert|/|cert|); log absolute error at cert = 0.
    assert!((lre(1.000_000_001, 1.0) - 9.0).abs() < 1e-6);
    assert!((lre(1e-12, 0.0) - 12.0).abs() < 1e-9);
    assert_eq!(lre(2.5, 2.5), LRE_CAP);
    assert_eq!(lre(f64::NAN, 1.0), 0.0);
}
