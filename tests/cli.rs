//! The command line as a binary, over a folder of scenarios with golden outputs.
//!
//! For each `tests/cli/NAME.json`, `doublespar trace NAME.json` must exit with the status and
//! print the JSON recorded in `tests/cli/golden/NAME.json` (numbers compared to 1e-12 relative, so
//! that a last-bit difference in a libm does not fail the test, while any real change does). For
//! the cases listed in `TABLES`, `--table` output must equal `golden/NAME.table.txt` exactly.
//! `UPDATE_GOLDEN=1 cargo test --test cli` rewrites the golden files; review the diff.

use serde_json::{Value, json};
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};

const TABLES: [&str; 3] = ["demo", "recombiner", "partial-polarization-three-elements"];

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
    assert_eq!(list.len(), doublespar::material::catalogue().len());
    for m in list {
        assert!(m["citation"].as_str().is_some_and(|c| c.len() > 20), "{m}");
        assert!(m["no"].as_f64().is_some() && m["ne"].as_f64().is_some(), "{m}");
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
