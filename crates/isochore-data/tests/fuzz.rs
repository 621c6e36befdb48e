//! Property tests over arbitrary input: the reader and the project loader must never panic
//! on any byte sequence (a bounded number of cases runs with the normal test suite), and a
//! project must survive save → load unchanged.

use isochore_data::{
    import_bytes, ColumnMapping, ConcentrationUnit, DataSet, EnergyUnit, Exclusion, ImportOptions,
    Project, QuantityKind, RawRow, Replicates, SeriesSettings, SourceInfo, TemperatureUnit,
    UncertaintyColumn, UncertaintyKind, SCHEMA_VERSION,
};
use isochore_fit::{FitOptions, FlagThresholds, Model, SigmaConvention, Weighting};
use proptest::collection::vec;
use proptest::prelude::*;

/// Bytes that look like a lab file often enough to reach deep into the reader.
fn csvish() -> impl Strategy<Value = Vec<u8>> {
    let pieces: Vec<&'static [u8]> = vec![
        b"T (\xc2\xb0C)",
        b"T/K",
        b"temp_K",
        b"K",
        b"pKa",
        b"Kd (nM)",
        b"u(pKa)",
        b"sd_Kd (nM)",
        b"\xce\x94G/kJ mol-1",
        b"sample",
        b"note",
        b"sd (%)",
        b"ln K",
        b",",
        b";",
        b"\t",
        b" ",
        b"  ",
        b"\n",
        b"\r\n",
        b"\"",
        b"\"\"",
        b"#",
        b"25",
        b"25.5",
        b"7,5",
        b"-300",
        b"0",
        b"1e-7",
        b"NaN",
        b"inf",
        b"abc",
        b"\xb0",
        b"\xff\xfe",
        b"\xef\xbb\xbf",
        b"\x00",
        b"|",
        b"\xe2\x88\x92",
        b"1e400",
        b"-",
        b".",
        b"(",
        b")",
    ];
    vec(proptest::sample::select(pieces), 0..120).prop_map(|v| v.concat())
}

/// Files with a valid header and rows of numbers, junk and quoted text, in any dialect, so
/// that most cases import and the per-row paths are exercised.
fn labfile() -> impl Strategy<Value = String> {
    let headers = prop_oneof![
        Just(vec!["T (°C)", "K"]),
        Just(vec!["sample", "T/K", "pKa", "u(pKa)", "note"]),
        Just(vec!["temp_C", "Kd_nM", "sd_Kd (µM)"]),
        Just(vec!["T", "ΔG/kJ mol-1", "±"]),
        Just(vec!["condition", "T [K]", "ln K", "sd (%)"]),
    ];
    let cell = prop_oneof![
        (-50.0..400.0f64).prop_map(|v| format!("{v}")),
        (0.0..10.0f64).prop_map(|v| format!("{v:.3}")),
        Just(String::new()),
        Just("abc".to_string()),
        Just("\"q, \"\"x\"\"\"".to_string()),
        Just("A".to_string()),
        Just("B".to_string()),
        Just("-0".to_string()),
        Just("1e-9".to_string()),
    ];
    let delim = prop_oneof![Just(","), Just(";"), Just("\t"), Just("  ")];
    (headers, vec(vec(cell, 1..6), 0..12), delim, any::<bool>()).prop_map(|(h, rows, d, crlf)| {
        let nl = if crlf { "\r\n" } else { "\n" };
        let mut s = h.join(d);
        for r in rows {
            s.push_str(nl);
            s.push_str(&r.join(d));
        }
        s
    })
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 256, ..ProptestConfig::default() })]

    #[test]
    fn reader_keeps_project_and_import_consistent(text in labfile()) {
        let o = ImportOptions { min_points: 1, ..ImportOptions::default() };
        if let Ok(imp) = isochore_data::import_text("lab.csv", &text, &o) {
            let p = Project::from_import(&imp);
            for (ps, s) in p.series.iter().zip(&imp.series) {
                let again = ps.measurements();
                prop_assert!(again.is_ok(), "{:?}", again);
                prop_assert_eq!(again.unwrap(), s.measurements().unwrap());
                for r in s.converted().unwrap().iter() {
                    prop_assert_eq!(imp.cells(r), ps.raw_rows()[r.row() - 1].cells.clone());
                }
            }
        }
    }

    #[test]
    fn reader_never_panics_on_bytes(bytes in vec(any::<u8>(), 0..2048)) {
        let _ = import_bytes("fuzz.csv", &bytes, &ImportOptions::default());
    }

    #[test]
    fn reader_never_panics_on_csvish_input(bytes in csvish(), avg in any::<bool>()) {
        let o = ImportOptions {
            replicates: if avg { Replicates::Average } else { Replicates::Keep },
            min_points: 1,
            ..ImportOptions::default()
        };
        if let Ok(imp) = import_bytes("fuzz.csv", &bytes, &o) {
            // Everything reachable from a successful import is safe too.
            for s in &imp.series {
                for r in s.converted().unwrap().iter() {
                    let _ = imp.cells(r);
                }
                let mut excluded = s.clone();
                let _ = excluded.exclude(1, "", "");
                let _ = excluded.points();
                let _ = isochore_data::export_csv(s, imp.mapping.quantity.kind);
            }
            // The project recomputes from the raw cells exactly what the import computed.
            let p = Project::from_import(&imp);
            for (ps, s) in p.series.iter().zip(&imp.series) {
                let again = ps.measurements();
                prop_assert!(again.is_ok(), "{:?}", again);
                prop_assert_eq!(again.unwrap(), s.measurements().unwrap());
            }
            let _ = imp.strict();
        }
    }

    #[test]
    fn project_loader_never_panics(bytes in vec(any::<u8>(), 0..2048)) {
        let text = String::from_utf8_lossy(&bytes);
        let _ = Project::from_json(&text, "fuzz.json");
    }

    #[test]
    fn project_loader_never_panics_on_mangled_projects(p in project(), cut in 0usize..4000, flip in 0usize..4000, byte in any::<u8>()) {
        let json = p.to_json();
        let mut b = json.into_bytes();
        if !b.is_empty() {
            let i = flip % b.len();
            b[i] = byte;
            b.truncate(cut.max(1).min(b.len()));
        }
        let _ = Project::from_json(&String::from_utf8_lossy(&b), "mangled.json");
    }

    #[test]
    fn project_round_trips_through_a_file(p in project()) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("p.isochore.json");
        p.save_atomic(&path).unwrap();
        p.save_atomic(&path).unwrap();
        let back = Project::load(&path).unwrap();
        prop_assert_eq!(back, p);
    }
}

fn finite() -> impl Strategy<Value = f64> {
    prop_oneof![-1e300..1e300f64, -1.0..1.0f64, Just(0.0), 1e-300..1e-200f64]
}

fn quantity_kind() -> impl Strategy<Value = QuantityKind> {
    prop_oneof![
        Just(QuantityKind::K),
        Just(QuantityKind::LnK),
        Just(QuantityKind::Log10K),
        Just(QuantityKind::PK),
        Just(QuantityKind::DissociationConstant(
            ConcentrationUnit::Nanomolar
        )),
        Just(QuantityKind::DissociationConstant(ConcentrationUnit::Molar)),
        Just(QuantityKind::DeltaG(EnergyUnit::KilocaloriePerMole)),
    ]
}

fn settings() -> impl Strategy<Value = SeriesSettings> {
    (
        any::<bool>(),
        1.0..1000.0f64,
        any::<bool>(),
        any::<bool>(),
        0.01..0.999f64,
        (finite(), finite(), finite()),
        any::<bool>(),
        0.0..1.0f64,
    )
        .prop_map(
            |(cp, t_ref, w, c, level, (a, b, d), avg, tol)| SeriesSettings {
                fit: FitOptions {
                    model: if cp {
                        Model::CONSTANT_CP
                    } else {
                        Model::LINEAR
                    },
                    t_ref_k: t_ref,
                    weighting: if w {
                        Weighting::Unweighted
                    } else {
                        Weighting::InverseVariance
                    },
                    convention: if c {
                        SigmaConvention::Absolute
                    } else {
                        SigmaConvention::ScaledByFit
                    },
                    level,
                    thresholds: FlagThresholds {
                        outlier_studentized: a,
                        leverage_factor: b,
                        cooks_factor: d,
                    },
                    allow_extreme_temperatures: w,
                },
                energy_unit: if w {
                    EnergyUnit::KilocaloriePerMole
                } else {
                    EnergyUnit::JoulePerMole
                },
                temperature_unit: if c {
                    TemperatureUnit::Fahrenheit
                } else {
                    TemperatureUnit::Kelvin
                },
                replicates: if avg {
                    Replicates::Average
                } else {
                    Replicates::Keep
                },
                replicate_tolerance_k: tol,
                thermometer_uncertainty_k: if avg { Some(tol + 0.01) } else { None },
                intervals: isochore_fit::intervals::IntervalRequest {
                    choice: if c {
                        isochore_fit::intervals::IntervalChoice::MonteCarlo
                    } else {
                        isochore_fit::intervals::IntervalChoice::Delta
                    },
                    draws: 1 + (tol * 1e4) as usize,
                    seed: (level * 1e6) as u64,
                },
            },
        )
}

fn series() -> impl Strategy<Value = DataSet> {
    (
        any::<String>(),
        vec(any::<String>(), 3..5),
        vec((1usize..100_000, vec(any::<String>(), 0..5)), 1..6),
        quantity_kind(),
        settings(),
        any::<String>(),
        vec((any::<String>(), any::<String>()), 0..3),
        any::<u64>(),
        any::<bool>(),
        any::<bool>(),
    )
        .prop_map(
            |(name, headers, rows, kind, settings, notes, excl, bytes, comma, shown)| {
                let n = rows.len();
                let mut mapping = ColumnMapping::new(0, TemperatureUnit::Celsius, 1, kind);
                mapping.uncertainty = Some(UncertaintyColumn {
                    column: 2,
                    kind: if comma {
                        UncertaintyKind::RelativePercent
                    } else {
                        UncertaintyKind::Absolute(kind)
                    },
                });
                let source = SourceInfo {
                    name: "f.csv".into(),
                    path: if comma {
                        None
                    } else {
                        Some("/tmp/f.csv".into())
                    },
                    sha256: "00".repeat(32),
                    bytes,
                };
                let mut s = DataSet::new(name, source, headers, mapping);
                s.decimal_comma = comma;
                s.set_raw_rows(
                    rows.into_iter()
                        .map(|(line, cells)| RawRow { line, cells })
                        .collect(),
                );
                s.settings = settings;
                s.exclusions = excl
                    .into_iter()
                    .enumerate()
                    .filter(|(i, _)| *i < n)
                    .map(|(i, (reason, at))| Exclusion {
                        row: i + 1,
                        reason,
                        at,
                    })
                    .collect();
                s.notes = notes;
                s.shown = shown;
                s
            },
        )
}

fn project() -> impl Strategy<Value = Project> {
    (vec(series(), 0..3), any::<String>()).prop_map(|(series, notes)| Project {
        schema_version: SCHEMA_VERSION,
        series,
        notes,
    })
}
