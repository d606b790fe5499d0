//! The command line as a binary, over a folder of scenarios with golden outputs.
//!
//! For each `tests/cli/NAME.json`, `doublespar trace NAME.json` must exit with the status and
//! print the JSON recorded in `tests/cli/golden/NAME.json` (numbers compared to 1e-12 relative, so
//! that a last-bit difference in a libm does not fail the test, while any real change does). For
//! the cases listed in `TABLES`, `--table` output must equal `golden/NAME.table.txt` exactly.
//! Design reports (`design FILE --table`) must equal `design/golden/NAME.table.txt`.
//! `UPDATE_GOLDEN=1 cargo test --test cli` rewrites the golden files; review the diff.
//!
//! Beyond the goldens: help on every command, usage errors that name the word and point to
//! help, design requests from flags against the same request as JSON (byte for byte), bad flag
//! values named by flag and field, material keys in any case, a closed standard output, and
//! every side-view plane drawn.

use serde_json::{Value, json};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

const TABLES: [&str; 4] = [
    "demo",
    "recombiner",
    "partial-polarization-three-elements",
    "spectrum-quartz-plate",
];

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_doublespar"))
}

fn dir() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/cli")
}

fn updating() -> bool {
    std::env::var_os("UPDATE_GOLDEN").is_some()
}

fn same(a: &Value, b: &Value, path: &str) -> Result<(), String> {
    match (a, b) {
        (Value::Number(x), Value::Number(y)) => {
            let (x, y) = (x.as_f64().unwrap_or(f64::NAN), y.as_f64().unwrap_or(f64::NAN));
            let tol = 1e-12 * x.abs().max(y.abs()).max(1e-300);
            if (x - y).abs() <= tol {
                Ok(())
            } else {
                Err(format!("{path}: golden {y:e}, got {x:e}"))
            }
        }
        (Value::Array(x), Value::Array(y)) if x.len() == y.len() => x
            .iter()
            .zip(y)
            .enumerate()
            .try_for_each(|(i, (p, q))| same(p, q, &format!("{path}[{i}]"))),
        (Value::Object(x), Value::Object(y)) if x.len() == y.len() => x.iter().try_for_each(|(k, v)| match y.get(k) {
            Some(w) => same(v, w, &format!("{path}.{k}")),
            None => Err(format!("{path}.{k}: not in the golden output")),
        }),
        _ if a == b => Ok(()),
        _ => Err(format!("{path}: golden {b}, got {a}")),
    }
}

#[test]
fn traces_match_their_golden_outputs() {
    golden_run(&dir(), "trace");
}

#[test]
fn designs_match_their_golden_outputs() {
    golden_run(&dir().join("design"), "design");
}

/// Runs `doublespar COMMAND CASE` for every `CASE.json` in `folder` against `folder/golden/`.
fn golden_run(folder: &Path, command: &str) {
    let mut cases: Vec<PathBuf> = std::fs::read_dir(folder)
        .unwrap()
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "json"))
        .collect();
    cases.sort();
    assert!(
        cases.len() >= 8,
        "the golden folder {} lost its cases",
        folder.display()
    );
    let mut failures = Vec::new();
    for case in &cases {
        let name = case.file_stem().unwrap().to_string_lossy().to_string();
        let out = bin().arg(command).arg(case).output().unwrap();
        let stdout = String::from_utf8(out.stdout).unwrap();
        let parsed: Value =
            serde_json::from_str(&stdout).unwrap_or_else(|e| panic!("{name}: stdout is not JSON ({e}): {stdout}"));
        let got = json!({"status": out.status.code(), "stdout": parsed});
        let golden_path = folder.join("golden").join(format!("{name}.json"));
        if updating() {
            std::fs::create_dir_all(folder.join("golden")).unwrap();
            std::fs::write(&golden_path, serde_json::to_string_pretty(&got).unwrap() + "\n").unwrap();
            continue;
        }
        let golden: Value = serde_json::from_str(
            &std::fs::read_to_string(&golden_path).unwrap_or_else(|_| panic!("missing {}", golden_path.display())),
        )
        .unwrap();
        if let Err(e) = same(&got, &golden, &name) {
            failures.push(e);
        }
        // Errors are exit status 2 with an error object naming a field; results are status 0.
        if name.starts_with("error-") {
            assert_eq!(out.status.code(), Some(2), "{name}");
            assert!(
                got["stdout"]["error"]["field"].is_string() && got["stdout"]["error"]["message"].is_string(),
                "{name}"
            );
        } else {
            assert_eq!(out.status.code(), Some(0), "{name}");
        }
    }
    assert!(failures.is_empty(), "golden mismatches:\n{}", failures.join("\n"));
}

#[test]
fn tables_match_their_golden_text() {
    for name in TABLES {
        let out = bin()
            .arg("trace")
            .arg(dir().join(format!("{name}.json")))
            .arg("--table")
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(0), "{name}");
        let text = String::from_utf8(out.stdout).unwrap();
        let golden_path = dir().join("golden").join(format!("{name}.table.txt"));
        if updating() {
            std::fs::create_dir_all(dir().join("golden")).unwrap();
            std::fs::write(&golden_path, &text).unwrap();
            continue;
        }
        let golden = std::fs::read_to_string(&golden_path).unwrap();
        assert_eq!(text, golden, "{name}: table differs from {}", golden_path.display());
    }
}

#[test]
fn standard_input_is_read_with_a_dash() {
    use std::io::Write;
    let mut child = bin()
        .args(["trace", "-"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .unwrap();
    let demo = std::fs::read(dir().join("demo.json")).unwrap();
    child.stdin.take().unwrap().write_all(&demo).unwrap();
    let out = child.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let from_stdin: Value = serde_json::from_slice(&out.stdout).unwrap();
    let from_file: Value =
        serde_json::from_slice(&bin().arg("trace").arg(dir().join("demo.json")).output().unwrap().stdout).unwrap();
    assert_eq!(from_stdin, from_file);
}

#[test]
fn table_mode_errors_are_readable_and_exit_2() {
    let out = bin()
        .arg("trace")
        .arg(dir().join("error-unknown-field.json"))
        .arg("--table")
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("elements[0].axis.azimut_deg"), "{err}");
}

#[test]
fn usage_errors_exit_2_and_help_exits_0() {
    assert_eq!(bin().output().unwrap().status.code(), Some(2));
    assert_eq!(bin().arg("frobnicate").output().unwrap().status.code(), Some(2));
    assert_eq!(bin().args(["trace"]).output().unwrap().status.code(), Some(2));
    assert_eq!(
        bin()
            .args(["trace", "/nonexistent/file.json"])
            .output()
            .unwrap()
            .status
            .code(),
        Some(2)
    );
    assert_eq!(bin().arg("--help").output().unwrap().status.code(), Some(0));
    let demo = bin().arg("demo").output().unwrap();
    assert_eq!(demo.status.code(), Some(0));
    assert!(serde_json::from_slice::<Value>(&demo.stdout).is_ok());
}

#[test]
fn materials_list_every_key_with_a_citation() {
    let out = bin().args(["materials", "--json", "--at", "1064"]).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    let list = v["materials"].as_array().unwrap();
    assert_eq!(
        list.len(),
        doublespar::materials().len() + doublespar::biaxial_materials().len()
    );
    for m in list {
        assert!(m["citation"].as_str().is_some_and(|c| c.len() > 20), "{m}");
        let indices: &[&str] = if m["kind"] == "biaxial" {
            &["nx", "ny", "nz"]
        } else {
            &["no", "ne"]
        };
        assert!(indices.iter().all(|k| m[k].as_f64().is_some()), "{m}");
        // Group indices n - λ dn/dλ in the same order; at 1064 nm every catalogue crystal is in
        // normal dispersion (dn/dλ < 0, a fact of the trade for transparent crystals), so each
        // exceeds its index.
        let group = m["group_indices"].as_array().expect("group indices listed");
        assert_eq!(group.len(), indices.len(), "{m}");
        for (k, g) in indices.iter().zip(group) {
            assert!(g.as_f64().unwrap() > m[k].as_f64().unwrap(), "{k}: {m}");
        }
    }
    // Biaxial crystals are listed with their kind and n_x < n_y < n_z (CONVENTIONS.md, "More
    // media").
    let ktp = list.iter().find(|m| m["key"] == "ktp").expect("ktp listed");
    assert_eq!(ktp["kind"], "biaxial");
    let (x, y, z) = (
        ktp["nx"].as_f64().unwrap(),
        ktp["ny"].as_f64().unwrap(),
        ktp["nz"].as_f64().unwrap(),
    );
    assert!(x < y && y < z, "{ktp}");
    assert!(list.iter().filter(|m| m["kind"] == "uniaxial").count() == doublespar::materials().len());
    // Quartz is optically active, and only quartz: Biot's law, the rotation falls roughly as
    // 1/λ² (common practice), so at 1064 nm it is well below the 21.7 °/mm of the sodium line.
    for m in list {
        let rho = m["rotatory_power_deg_per_mm"].as_f64();
        assert_eq!(rho.is_some(), m["key"] == "quartz", "{m}");
        if let Some(rho) = rho {
            assert!((5.0..8.0).contains(&rho), "{m}");
        }
    }
    assert_eq!(
        bin().args(["materials", "--at", "-3"]).output().unwrap().status.code(),
        Some(2)
    );
}

#[test]
fn materials_mark_a_breakdown_and_unverified_data() {
    // At 10 µm calcite's formula gives n_o² < 0, quartz's sits on its 10 µm resonance and
    // alpha-BBO's gives n_e ≈ 0.93 < 1: no index is listed for them, only the reason.
    let out = bin().args(["materials", "--json", "--at", "10000"]).output().unwrap();
    assert_eq!(out.status.code(), Some(0));
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    for m in v["materials"].as_array().unwrap() {
        if ["calcite", "quartz", "alpha-bbo"].contains(&m["key"].as_str().unwrap()) {
            assert!(m["no"].is_null() && m["ne"].is_null(), "{m}");
            assert_eq!(m["error"]["field"], "wavelength_nm", "{m}");
        }
    }
    let text = String::from_utf8(bin().args(["materials", "--at", "10000"]).output().unwrap().stdout).unwrap();
    let calcite = text.lines().find(|l| l.starts_with("calcite")).unwrap();
    assert!(
        calcite.contains("n/a: formula breaks down") && !calcite.contains("NaN"),
        "{calcite}"
    );
    assert!(text.contains("below 1"), "{text}");
    // The listing itself (no --at) flags the unverified formula, by name.
    let out = bin().args(["materials", "--json"]).output().unwrap();
    let v: Value = serde_json::from_slice(&out.stdout).unwrap();
    for m in v["materials"].as_array().unwrap() {
        let flagged = m["warnings"]
            .as_array()
            .unwrap()
            .iter()
            .any(|w| w.as_str().unwrap().contains("unverified data"));
        assert_eq!(flagged, m["key"] == "alpha-bbo", "{m}");
        assert_eq!(m["verified"], m["key"] != "alpha-bbo", "{m}");
    }
    let text = String::from_utf8(bin().arg("materials").output().unwrap().stdout).unwrap();
    assert!(text.contains("warning: unverified data for alpha-bbo"), "{text}");
}

// ---------------------------------------------------------------------------------------------
// Help, usage errors, design flags, material keys, design reports, closed pipes, side planes.

const COMMANDS: [&str; 6] = ["trace", "draw", "design", "materials", "demo", "help"];

fn run(args: &[&str]) -> std::process::Output {
    bin().args(args).output().unwrap()
}

fn text(bytes: &[u8]) -> String {
    String::from_utf8(bytes.to_vec()).unwrap()
}

#[test]
fn help_is_on_standard_output_for_every_command() {
    let overview = run(&["help"]);
    assert_eq!(overview.status.code(), Some(0));
    let overview_text = text(&overview.stdout);
    for c in COMMANDS {
        assert!(overview_text.contains(&format!("\n  {c} ")), "overview lists {c}");
        let by_help = run(&["help", c]);
        assert_eq!(by_help.status.code(), Some(0), "help {c}");
        let t = text(&by_help.stdout);
        assert!(t.starts_with(&format!("usage: doublespar {c}")), "help {c}: {t}");
        assert!(by_help.stderr.is_empty(), "help {c} writes nothing on standard error");
        for flag in ["--help", "-h"] {
            let out = run(&[c, flag]);
            assert_eq!(out.status.code(), Some(0), "{c} {flag}");
            assert_eq!(text(&out.stdout), t, "{c} {flag} prints the help of {c}");
        }
    }
    for top in [&["--help"][..], &["-h"]] {
        let out = run(top);
        assert_eq!(out.status.code(), Some(0));
        assert_eq!(text(&out.stdout), overview_text);
    }
    // --help wins over anything else on the line, even a bad word.
    assert_eq!(run(&["trace", "--nonsense", "--help"]).status.code(), Some(0));
}

#[test]
fn unknown_commands_flags_and_words_name_themselves_and_point_to_help() {
    let cases: [(&[&str], &str, &str); 8] = [
        (&["frobnicate"], "'frobnicate'", "doublespar help"),
        (&["help", "frobnicate"], "'frobnicate'", "doublespar help"),
        (&["trace", "--tabel", "x.json"], "'--tabel'", "doublespar help trace"),
        (
            &["draw", "side", "x.json", "--darker"],
            "'--darker'",
            "doublespar help draw",
        ),
        (&["draw", "top", "x.json"], "'top'", "doublespar help draw"),
        (&["materials", "--at"], "'--at'", "doublespar help materials"),
        (&["demo", "extra"], "'extra'", "doublespar help demo"),
        (
            &["design", "displacer", "--length-mm", "1"],
            "'--length-mm'",
            "doublespar help design",
        ),
    ];
    for (args, names, points) in cases {
        let out = run(args);
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let err = text(&out.stderr);
        assert!(err.contains(names), "{args:?} names {names}: {err}");
        assert!(err.contains(points), "{args:?} points to {points}: {err}");
        assert!(!err.contains("panicked"), "{args:?}: {err}");
    }
}

/// One request written both ways: flags after the kind, and the JSON document they stand for.
struct FlagCase {
    /// The words after `design`, separated by spaces.
    flags: &'static str,
    json: &'static str,
}

const FLAG_CASES: [FlagCase; 36] = [
    FlagCase {
        flags: "displacer --material Calcite --wavelength-nm 632.8 --band-nm 600,700 --separation-mm 1.5 --beam-diameter-mm 0.5 --cut-tilt-deg 40 --aperture-factor 3 --tol-tilt-deg 0.2 --tol-incidence-deg 0.05 --tol-thickness-mm 0.02 --tol-wavelength-nm 1 --samples 3000 --seed 7 --bins 20 --temperature-c 35 --wavelength-in air",
        json: r#"{"kind": "displacer", "material": "Calcite", "wavelength_nm": 632.8, "band_nm": [600, 700],
                 "separation_mm": 1.5, "beam_diameter_mm": 0.5, "cut_tilt_deg": 40, "aperture_factor": 3,
                 "tolerances": {"tilt_deg": 0.2, "incidence_deg": 0.05, "thickness_mm": 0.02, "wavelength_nm": 1},
                 "samples": 3000, "seed": 7, "bins": 20, "temperature_c": 35, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "displacer --no=1.6 --ne=1.5 --separation-mm=1 --samples=0",
        json: r#"{"kind": "displacer", "no": 1.6, "ne": 1.5, "separation_mm": 1, "samples": 0}"#,
    },
    FlagCase {
        flags: "displacer --nx 1.6 --ny 1.65 --nz 1.8 --plane yz --separation-mm 1 --samples 0",
        json: r#"{"kind": "displacer", "nx": 1.6, "ny": 1.65, "nz": 1.8, "plane": "yz", "separation_mm": 1, "samples": 0}"#,
    },
    FlagCase {
        flags: "waveplate --material QUARTZ --wavelength-nm 1064 --retardance-waves 0.25 --order multiple --order-number 3 --band-nm 1000,1100 --max-incidence-deg 5 --acceptance-error-waves 0.02 --temperature-c -10 --wavelength-in air",
        json: r#"{"kind": "waveplate", "material": "QUARTZ", "wavelength_nm": 1064, "retardance_waves": 0.25,
                 "order": "multiple", "order_number": 3, "band_nm": [1000, 1100], "max_incidence_deg": 5,
                 "acceptance_error_waves": 0.02, "temperature_c": -10, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "waveplate --no 1.5 --ne 1.51 --retardance-waves 0.5 --order compound --base-mm 0.5",
        json: r#"{"kind": "waveplate", "no": 1.5, "ne": 1.51, "retardance_waves": 0.5, "order": "compound", "base_mm": 0.5}"#,
    },
    FlagCase {
        flags: "waveplate --nx 1.5 --ny 1.52 --nz 1.6 --cut z --retardance-waves 0.25",
        json: r#"{"kind": "waveplate", "nx": 1.5, "ny": 1.52, "nz": 1.6, "cut": "z", "retardance_waves": 0.25}"#,
    },
    FlagCase {
        flags: "athermal-waveplate --first-material quartz --second-material mgf2 --retardance-waves 0.5 --wavelength-nm 1064 --acceptance-error-waves 0.001 --temperature-c 40 --wavelength-in air",
        json: r#"{"kind": "athermal-waveplate", "first": {"material": "quartz"}, "second": {"material": "mgf2"},
                 "retardance_waves": 0.5, "wavelength_nm": 1064, "acceptance_error_waves": 0.001, "temperature_c": 40, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "athermal-waveplate --first-material ktp --first-cut x --second-material lbo --second-cut y --retardance-waves 0.25 --wavelength-nm 1064",
        json: r#"{"kind": "athermal-waveplate", "first": {"material": "ktp", "cut": "x"}, "second": {"material": "lbo", "cut": "y"},
                 "retardance_waves": 0.25, "wavelength_nm": 1064}"#,
    },
    FlagCase {
        flags: "achromat --first-material quartz --second-material lbo --second-cut z --retardance-waves 0.5 --wavelengths-nm 500,900",
        json: r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "lbo", "cut": "z"},
                 "retardance_waves": 0.5, "wavelengths_nm": [500, 900]}"#,
    },
    FlagCase {
        // A cut for a uniaxial plate: the same error on the same field from both forms.
        flags: "achromat --first-material quartz --first-cut x --second-material ktp --retardance-waves 0.25 --wavelengths-nm 500,900",
        json: r#"{"kind": "achromat", "first": {"material": "quartz", "cut": "x"}, "second": {"material": "ktp"},
                 "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
    },
    FlagCase {
        flags: "birefringent-filter --material quartz --layout stage-doubling --stages 3 --wavelength-nm 656.3 --bandwidth-nm 1 --band-nm 640,670 --temperature-c 30 --wavelength-in air",
        json: r#"{"kind": "birefringent-filter", "material": "quartz", "layout": "stage-doubling", "stages": 3,
                 "wavelength_nm": 656.3, "bandwidth_nm": 1, "band_nm": [640, 670], "temperature_c": 30, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "birefringent-filter --no 1.5 --ne 1.51 --layout folded --stages 4 --bandwidth-nm 5",
        json: r#"{"kind": "birefringent-filter", "no": 1.5, "ne": 1.51, "layout": "folded", "stages": 4, "bandwidth_nm": 5}"#,
    },
    FlagCase {
        flags: "birefringent-filter --nx 1.74 --ny 1.75 --nz 1.83 --cut x --stages 3 --wavelength-nm 1064 --bandwidth-nm 4",
        json: r#"{"kind": "birefringent-filter", "nx": 1.74, "ny": 1.75, "nz": 1.83, "cut": "x", "stages": 3, "wavelength_nm": 1064, "bandwidth_nm": 4}"#,
    },
    FlagCase {
        // A cut for a uniaxial crystal: the same error on the same field from both forms.
        flags: "birefringent-filter --material quartz --cut y --bandwidth-nm 1",
        json: r#"{"kind": "birefringent-filter", "material": "quartz", "cut": "y", "bandwidth_nm": 1}"#,
    },
    FlagCase {
        flags: "broadband-retarder --nx 1.56 --ny 1.59 --nz 1.61 --cut z --plates 2 --retardance-waves 0.25 --band-nm 700,900 --generations 40",
        json: r#"{"kind": "broadband-retarder", "nx": 1.56, "ny": 1.59, "nz": 1.61, "cut": "z", "plates": 2, "retardance_waves": 0.25,
                 "band_nm": [700, 900], "generations": 40}"#,
    },
    FlagCase {
        flags: "broadband-retarder --material ktp --cut w --plates 2 --retardance-waves 0.25 --band-nm 700,900",
        json: r#"{"kind": "broadband-retarder", "material": "ktp", "cut": "w", "plates": 2, "retardance_waves": 0.25, "band_nm": [700, 900]}"#,
    },
    FlagCase {
        flags: "broadband-retarder --material mgf2 --plates 2 --retardance-waves 0.25 --fast-axis-deg 10 --band-nm 500,700 --max-thickness-mm 0.1 --generations 40 --seed 3 --temperature-c 25 --wavelength-in air",
        json: r#"{"kind": "broadband-retarder", "material": "mgf2", "plates": 2, "retardance_waves": 0.25, "fast_axis_deg": 10,
                 "band_nm": [500, 700], "max_thickness_mm": 0.1, "generations": 40, "seed": 3, "temperature_c": 25, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "broadband-retarder --no 1.5 --ne 1.51 --retardance-waves 0.5 --band-nm 500,700 --generations 20",
        json: r#"{"kind": "broadband-retarder", "no": 1.5, "ne": 1.51, "retardance_waves": 0.5, "band_nm": [500, 700], "generations": 20}"#,
    },
    FlagCase {
        flags: "lc-voltage --thickness-um 5 --lc 5CB --rubbing-azimuth-deg 45 --twist-deg 0 --pretilt-deg 3 --wavelength-nm 633 --retardance-waves 0.3 --retardance-range-waves 0.05,1 --max-voltage-v 15 --temperature-c 27 --wavelength-in air",
        json: r#"{"kind": "lc-voltage", "thickness_um": 5, "lc": "5CB", "rubbing_azimuth_deg": 45, "twist_deg": 0, "pretilt_deg": 3,
                 "wavelength_nm": 633, "retardance_waves": 0.3, "retardance_range_waves": [0.05, 1], "max_voltage_v": 15, "temperature_c": 27, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "athermal-waveplate --first-no 1.6 --first-ne 1.5 --second-no 1.4 --second-ne 1.41 --retardance-waves 0.25",
        json: r#"{"kind": "athermal-waveplate", "first": {"no": 1.6, "ne": 1.5}, "second": {"no": 1.4, "ne": 1.41},
                 "retardance_waves": 0.25}"#,
    },
    FlagCase {
        flags: "achromat --first-material quartz --second-material MgF2 --retardance-waves 0.5 --wavelengths-nm 600,1000 --band-nm 500,1100 --temperature-c 45 --wavelength-in air",
        json: r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "MgF2"},
                 "retardance_waves": 0.5, "wavelengths_nm": [600, 1000], "band_nm": [500, 1100], "temperature_c": 45, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "achromat --first-no 1.6 --first-ne 1.5 --second-material mgf2 --retardance-waves 0.25 --wavelengths-nm 500,900",
        json: r#"{"kind": "achromat", "first": {"no": 1.6, "ne": 1.5}, "second": {"material": "mgf2"},
                 "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
    },
    FlagCase {
        flags: "achromat --first-material quartz --second-no 1.4 --second-ne 1.41 --retardance-waves 0.25 --wavelengths-nm 500,900",
        json: r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"no": 1.4, "ne": 1.41},
                 "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
    },
    FlagCase {
        flags: "achromat --first-material quartz --second-material mgf2 --second-no 1.4 --second-ne 1.41 --retardance-waves 0.25 --wavelengths-nm 500,900",
        // Both a material and indices for the second plate: the same error on the same field,
        // whose message from flags also names the flag.
        json: r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "mgf2", "no": 1.4, "ne": 1.41},
                 "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
    },
    FlagCase {
        flags: "recombiner --material YVO4 --wavelength-nm 1064 --length-mm 8 --cut-tilt-deg 45 --beam-diameter-mm 0.5 --middle rotator --rotator-deg 90 --length-mismatch-mm 0.01 --tilt-mismatch-deg 0.001 --temperature-c 60 --wavelength-in air",
        json: r#"{"kind": "recombiner", "material": "YVO4", "wavelength_nm": 1064, "length_mm": 8, "cut_tilt_deg": 45,
                 "beam_diameter_mm": 0.5, "middle": "rotator", "rotator_deg": 90, "length_mismatch_mm": 0.01,
                 "tilt_mismatch_deg": 0.001, "temperature_c": 60, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "recombiner --no 1.6 --ne 1.5 --length-mm 5 --middle half-wave",
        json: r#"{"kind": "recombiner", "no": 1.6, "ne": 1.5, "length_mm": 5, "middle": "half-wave"}"#,
    },
    FlagCase {
        flags: "angular-splitter --material calcite --wavelength-nm 633 --band-nm 500,800 --split-angle-deg 8 --aperture-mm 12 --cement-index 1.5 --tol-wedge-deg 0.1 --tol-axis-deg 1 --tol-incidence-deg 0.2 --samples 50 --seed 4 --temperature-c 0 --wavelength-in air",
        json: r#"{"kind": "angular-splitter", "material": "calcite", "wavelength_nm": 633, "band_nm": [500, 800],
                 "split_angle_deg": 8, "aperture_mm": 12, "cement_index": 1.5,
                 "tolerances": {"wedge_deg": 0.1, "axis_deg": 1, "incidence_deg": 0.2}, "samples": 50, "seed": 4, "temperature_c": 0, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "angular-splitter --no 1.6 --ne 1.5 --split-angle-deg 3 --samples 0",
        json: r#"{"kind": "angular-splitter", "no": 1.6, "ne": 1.5, "split_angle_deg": 3, "samples": 0}"#,
    },
    FlagCase {
        flags: "prism-polarizer --material calcite --wavelength-nm 1064 --cement-index 1.45 --aperture-mm 12 --temperature-c 80 --wavelength-in air",
        json: r#"{"kind": "prism-polarizer", "material": "calcite", "wavelength_nm": 1064, "cement_index": 1.45, "aperture_mm": 12, "temperature_c": 80, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "prism-polarizer --no 1.7 --ne 1.5",
        json: r#"{"kind": "prism-polarizer", "no": 1.7, "ne": 1.5}"#,
    },
    FlagCase {
        flags: "tilt-tuning --material quartz --wavelength-nm 633 --retardance-waves 0.25 --order-number 3 --made-for-nm 650 --axis-azimuth-deg 0 --tilt-azimuth-deg 0 --max-tilt-deg 45 --temperature-c 30 --wavelength-in air",
        json: r#"{"kind": "tilt-tuning", "material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25, "order_number": 3,
                 "made_for_nm": 650, "axis_azimuth_deg": 0, "tilt_azimuth_deg": 0, "max_tilt_deg": 45, "temperature_c": 30, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "tilt-tuning --no 1.54 --ne 1.55 --thickness-mm 0.5 --retardance-waves 0.25 --tilt-azimuth-deg 90",
        json: r#"{"kind": "tilt-tuning", "no": 1.54, "ne": 1.55, "thickness_mm": 0.5, "retardance_waves": 0.25, "tilt_azimuth_deg": 90}"#,
    },
    FlagCase {
        flags: "tilt-tuning --nx 1.52 --ny 1.56 --nz 1.61 --cut y --thickness-mm 0.1 --retardance-waves 0.3 --tilt-azimuth-deg 90",
        json: r#"{"kind": "tilt-tuning", "nx": 1.52, "ny": 1.56, "nz": 1.61, "cut": "y", "thickness_mm": 0.1, "retardance_waves": 0.3,
                 "tilt_azimuth_deg": 90}"#,
    },
    FlagCase {
        flags: "quartz-rotator --rotation-deg -45 --wavelength-nm 1064 --band-nm 1000,1100 --handedness left --min-thickness-mm 2 --rotation-tolerance-deg 0.2 --ellipticity-tolerance-deg 1 --max-incidence-deg 5 --temperature-c 50 --wavelength-in air",
        json: r#"{"kind": "quartz-rotator", "rotation_deg": -45, "wavelength_nm": 1064, "band_nm": [1000, 1100], "handedness": "left",
                 "min_thickness_mm": 2, "rotation_tolerance_deg": 0.2, "ellipticity_tolerance_deg": 1, "max_incidence_deg": 5, "temperature_c": 50, "wavelength_in": "air"}"#,
    },
    FlagCase {
        flags: "prism-polarizer --no 1.7 --ne 1.5 --wavelength-nm 532 --wavelength-in vacuum",
        json: r#"{"kind": "prism-polarizer", "no": 1.7, "ne": 1.5, "wavelength_nm": 532, "wavelength_in": "vacuum"}"#,
    },
    FlagCase {
        // A basis neither vacuum nor air: the same error on `wavelength_in` from both forms.
        flags: "waveplate --material quartz --retardance-waves 0.25 --wavelength-in sea-level",
        json: r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "wavelength_in": "sea-level"}"#,
    },
];

/// The flags `doublespar help design` lists for `kind`.
fn listed_flags(kind: &str) -> Vec<String> {
    let help = text(&run(&["help", "design"]).stdout);
    let section = help
        .split(&format!("\n{kind} flags:\n"))
        .nth(1)
        .unwrap_or_else(|| panic!("no {kind} section in the design help"));
    section
        .lines()
        .take_while(|l| l.starts_with("  --"))
        .map(|l| l.split_whitespace().next().unwrap().to_string())
        .collect()
}

#[test]
fn design_flags_give_byte_identical_answers_to_the_json_request() {
    let scratch = std::env::temp_dir().join(format!("doublespar-flags-{}", std::process::id()));
    std::fs::create_dir_all(&scratch).unwrap();
    let mut used: std::collections::BTreeMap<&str, std::collections::BTreeSet<String>> = Default::default();
    for (i, case) in FLAG_CASES.iter().enumerate() {
        let words: Vec<&str> = case.flags.split_whitespace().collect();
        let kind = words[0];
        for f in words.iter().filter(|f| f.starts_with("--")) {
            used.entry(kind)
                .or_default()
                .insert(f.split('=').next().unwrap().to_string());
        }
        let file = scratch.join(format!("case-{i}.json"));
        std::fs::write(&file, case.json).unwrap();
        for extra in [&[][..], &["--table"]] {
            let by_flags = bin().arg("design").args(&words).args(extra).output().unwrap();
            let by_json = bin().arg("design").arg(&file).args(extra).output().unwrap();
            assert_eq!(by_flags.status.code(), by_json.status.code(), "{kind} case {i}");
            if by_json.status.code() == Some(2) && extra.is_empty() {
                let (f, j): (Value, Value) = (
                    serde_json::from_slice(&by_flags.stdout).unwrap(),
                    serde_json::from_slice(&by_json.stdout).unwrap(),
                );
                assert_eq!(f["error"]["field"], j["error"]["field"], "{kind} case {i}");
                let (fm, jm) = (
                    f["error"]["message"].as_str().unwrap(),
                    j["error"]["message"].as_str().unwrap(),
                );
                assert!(
                    fm.starts_with(jm) && fm.contains("(flag --"),
                    "{kind} case {i}: {fm} / {jm}"
                );
                continue;
            }
            if by_json.status.code() == Some(2) {
                continue;
            }
            assert_eq!(
                text(&by_flags.stdout),
                text(&by_json.stdout),
                "{kind} case {i} {extra:?}: flags and JSON differ"
            );
            assert_eq!(
                text(&by_flags.stderr),
                text(&by_json.stderr),
                "{kind} case {i} {extra:?}"
            );
        }
    }
    // The cases use every flag the help lists, for every kind.
    for kind in doublespar::DESIGN_KINDS {
        let listed: std::collections::BTreeSet<String> = listed_flags(kind).into_iter().collect();
        assert!(!listed.is_empty(), "{kind}");
        assert_eq!(
            used.get(kind),
            Some(&listed),
            "{kind}: flags used by the cases vs listed by help"
        );
    }
    std::fs::remove_dir_all(&scratch).ok();
}

#[test]
fn a_bad_flag_value_names_the_flag_and_the_request_field() {
    let cases: [(&[&str], &str, &str); 6] = [
        (
            &["displacer", "--material", "calcite", "--separation-mm", "abc"],
            "separation_mm",
            "--separation-mm",
        ),
        (
            &["displacer", "--material", "calcite", "--separation-mm", "-1"],
            "separation_mm",
            "--separation-mm",
        ),
        (
            &[
                "displacer",
                "--material",
                "calcite",
                "--separation-mm",
                "1",
                "--band-nm",
                "700",
            ],
            "band_nm",
            "--band-nm",
        ),
        (
            &["displacer", "--material", "unobtainium", "--separation-mm", "1"],
            "material",
            "--material",
        ),
        (
            &[
                "achromat",
                "--first-material",
                "quartz",
                "--second-material",
                "mgf2",
                "--retardance-waves",
                "0.5",
                "--wavelengths-nm",
                "500,1e400",
            ],
            "wavelengths_nm",
            "--wavelengths-nm",
        ),
        (
            &["prism-polarizer", "--material", "calcite", "--wavelength-in", "argon"],
            "wavelength_in",
            "--wavelength-in",
        ),
    ];
    for (args, field, flag) in cases {
        let out = bin().arg("design").args(args).output().unwrap();
        assert_eq!(out.status.code(), Some(2), "{args:?}");
        let v: Value = serde_json::from_slice(&out.stdout).unwrap();
        assert!(
            v["error"]["field"].as_str().is_some_and(|f| f.starts_with(field)),
            "{args:?}: {v}"
        );
        let msg = v["error"]["message"].as_str().unwrap();
        assert!(msg.contains(flag), "{args:?}: the message names {flag}: {msg}");
        assert!(msg.len() < 300, "{args:?}: a short message: {msg}");
    }
}

#[test]
fn material_keys_are_case_insensitive_and_echoed_in_lower_case() {
    let lower = r#"{"elements": [{"kind": "crystal", "material": "yvo4", "thickness_mm": 2, "axis": {"tilt_deg": 45, "azimuth_deg": 0}}]}"#;
    let scratch = std::env::temp_dir().join(format!("doublespar-case-{}", std::process::id()));
    std::fs::create_dir_all(&scratch).unwrap();
    let mut outputs = Vec::new();
    for key in ["yvo4", "YVO4", "YvO4"] {
        let file = scratch.join(format!("{key}.json"));
        std::fs::write(&file, lower.replace("yvo4", key)).unwrap();
        let out = bin().arg("trace").arg(&file).output().unwrap();
        assert_eq!(out.status.code(), Some(0), "{key}");
        outputs.push(text(&out.stdout));
    }
    assert!(outputs.iter().all(|o| o == &outputs[0]), "every spelling traces alike");
    let v: Value = serde_json::from_str(&outputs[0]).unwrap();
    assert_eq!(v["elements"][0]["material"], "yvo4");
    let design = run(&[
        "design",
        "displacer",
        "--material",
        "Calcite",
        "--separation-mm",
        "1",
        "--samples",
        "0",
    ]);
    let v: Value = serde_json::from_slice(&design.stdout).unwrap();
    assert_eq!(v["material"], "calcite");
    assert_eq!(v["scenario"]["elements"][0]["material"], "calcite");
    std::fs::remove_dir_all(&scratch).ok();
}

/// Design reports: what to order first, then performance, tolerances, notes; golden text for
/// each kind (`tests/cli/design/golden/NAME.table.txt`).
#[test]
fn design_reports_read_top_down_and_match_their_golden_text() {
    let folder = dir().join("design");
    for name in [
        "displacer-calcite",
        "displacer-yvo4-fixed-cut",
        "waveplate-mgf2-compound",
        "waveplate-quartz-zero",
        "achromat-quartz-mgf2",
        "recombiner-calcite-mismatch",
        "angular-splitter-calcite",
        "angular-splitter-quartz-cemented",
        "prism-polarizer-calcite-air",
        "prism-polarizer-yvo4-cement",
        "tilt-tuning-quartz-quarter",
        "tilt-tuning-mgf2-order",
        "tilt-tuning-ktp-order",
        "quartz-rotator-90",
        "quartz-rotator-forced-right",
        "athermal-quartz-mgf2",
        "filter-mgf2-stage-doubling",
        "filter-calcite-folded",
        "broadband-quartz-half",
        "broadband-quartz-mgf2-half",
        "filter-ktp-folded-x-cut",
        "filter-quartz-air",
        "broadband-ktp-quarter",
        "waveplate-ktp-half",
        "displacer-lbo-xz",
    ] {
        let out = bin()
            .arg("design")
            .arg(folder.join(format!("{name}.json")))
            .arg("--table")
            .output()
            .unwrap();
        assert_eq!(out.status.code(), Some(0), "{name}");
        let t = text(&out.stdout);
        let at = |s: &str| {
            t.find(&format!("\n{s}"))
                .unwrap_or_else(|| panic!("{name}: no section {s}:\n{t}"))
        };
        let order = [
            at("What to order"),
            at("Performance"),
            at("Tolerances"),
            at("Notes and warnings"),
        ];
        assert!(
            order.windows(2).all(|w| w[0] < w[1]),
            "{name}: sections out of order:\n{t}"
        );
        assert!(!t.contains("Other figures"), "{name}: every figure has its place:\n{t}");
        let golden_path = folder.join("golden").join(format!("{name}.table.txt"));
        if updating() {
            std::fs::write(&golden_path, &t).unwrap();
            continue;
        }
        let golden =
            std::fs::read_to_string(&golden_path).unwrap_or_else(|_| panic!("missing {}", golden_path.display()));
        assert_eq!(t, golden, "{name}: report differs from {}", golden_path.display());
    }
}

/// `doublespar … | head -1`: the reader goes away; the command ends quietly with status 0.
/// The pipe's read end is closed before the command starts, so every write meets a closed pipe.
#[test]
fn writing_into_a_closed_pipe_ends_quietly() {
    let demo = dir().join("demo.json");
    let demo = demo.to_str().unwrap();
    let cases: [&[&str]; 7] = [
        &["trace", demo],
        &["trace", demo, "--table"],
        &[
            "design",
            "displacer",
            "--material",
            "calcite",
            "--separation-mm",
            "1",
            "--samples",
            "0",
        ],
        &[
            "design",
            "waveplate",
            "--material",
            "quartz",
            "--retardance-waves",
            "0.25",
            "--table",
        ],
        &["draw", "side-walkoff", demo],
        &["materials"],
        &["help", "design"],
    ];
    for args in cases {
        let (reader, writer) = std::io::pipe().unwrap();
        drop(reader);
        let out = bin()
            .args(args)
            .stdout(Stdio::from(writer))
            .stderr(Stdio::piped())
            .output()
            .unwrap();
        let err = text(&out.stderr);
        assert!(!err.contains("panicked"), "{args:?}: {err}");
        assert!(err.is_empty(), "{args:?} is quiet: {err}");
        assert_eq!(out.status.code(), Some(0), "{args:?}");
    }
}

#[test]
fn every_side_plane_is_drawn_from_the_command_line() {
    // Optic axis toward +y: the walk-off is along y (calcite is negative: toward −y).
    let doc = r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45, "azimuth_deg": 90}}]}"#;
    for (view, title) in [
        ("side", "Side view (x–z)"),
        ("side-yz", "Side view (y–z)"),
        ("side-walkoff", "Side view along the walk-off (-90° from x)"),
    ] {
        let mut child = bin()
            .args(["draw", view, "-"])
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .spawn()
            .unwrap();
        {
            use std::io::Write;
            child.stdin.take().unwrap().write_all(doc.as_bytes()).unwrap();
        }
        let out = child.wait_with_output().unwrap();
        assert_eq!(out.status.code(), Some(0), "{view}");
        let svg = text(&out.stdout);
        assert!(svg.starts_with("<svg") || svg.starts_with("<?xml"), "{view}");
        assert!(svg.contains(title), "{view}: {title}");
        // The separation, 1.08 mm for 10 mm of calcite at 45° (ρ = 6.19°, common practice:
        // 10 mm × tan 6.19° ≈ 1.08 mm), is dimensioned in the planes that hold it.
        assert_eq!(svg.contains("1.08 mm<"), view != "side", "{view}");
    }
}
