//! Bad input through the command line: a table of malformed, out-of-range and oversized
//! scenarios (`tests/bad/scenarios.json`, shared with the browser tests of the bindings), each of
//! which must give exit status 2 and an error object naming the expected field.

use serde_json::Value;
use std::io::Write;
use std::process::{Command, Stdio};

fn run_stdin(doc: &[u8]) -> (Option<i32>, Value) {
    let mut child = Command::new(env!("CARGO_BIN_EXE_doublespar"))
        .args(["trace", "-"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut stdin = child.stdin.take().unwrap();
    let doc = doc.to_vec();
    // Write from a thread so that a large document cannot deadlock against a full stdout pipe.
    let writer = std::thread::spawn(move || {
        let _ = stdin.write_all(&doc);
    });
    let out = child.wait_with_output().unwrap();
    writer.join().unwrap();
    let v: Value = serde_json::from_slice(&out.stdout)
        .unwrap_or_else(|e| panic!("stdout is not JSON ({e}): {}", String::from_utf8_lossy(&out.stdout)));
    (out.status.code(), v)
}

#[test]
fn every_bad_scenario_names_its_field_and_exits_2() {
    let table: Vec<Value> = serde_json::from_str(include_str!("bad/scenarios.json")).unwrap();
    assert!(table.len() >= 40, "the table holds {} cases", table.len());
    let mut failures = Vec::new();
    for case in &table {
        let (name, doc, field) = (
            case["name"].as_str().unwrap(),
            case["doc"].as_str().unwrap(),
            case["field"].as_str().unwrap(),
        );
        let (status, v) = run_stdin(doc.as_bytes());
        let got = v["error"]["field"].as_str().unwrap_or("<none>");
        let message = v["error"]["message"].as_str().unwrap_or("");
        if status != Some(2) || got != field || message.is_empty() {
            failures.push(format!(
                "{name}: status {status:?}, field '{got}' (expected '{field}'), message '{message}'"
            ));
        }
    }
    assert!(failures.is_empty(), "{}", failures.join("\n"));
}

#[test]
fn a_ten_megabyte_document_is_refused_without_reading_it_all() {
    let mut doc = String::from(r#"{"elements": [{"kind": "rotator", "angle_deg": 1}], "pad": ""#);
    doc.push_str(&"x".repeat(10 << 20));
    doc.push_str("\"}");
    let (status, v) = run_stdin(doc.as_bytes());
    assert_eq!(status, Some(2));
    assert_eq!(v["error"]["field"], "");
    assert!(v["error"]["message"].as_str().unwrap().contains("at most"), "{v}");
}
