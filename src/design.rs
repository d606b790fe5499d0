//! Design requests: one JSON document asks a solver for a part, by `kind`.
//!
//! | kind | solver | required fields |
//! |---|---|---|
//! | `displacer` | [`crate::design_displacer`] | `material` (or `no`, `ne`), `separation_mm` |
//! | `waveplate` | [`crate::design_waveplate::design`] | `material`, `retardance_waves` |
//! | `achromat` | [`crate::design_waveplate::achromat`] | `first`, `second`, `retardance_waves`, `wavelengths_nm` |
//! | `recombiner` | [`crate::design_recombiner`] | `material`, `length_mm` |
//!
//! Every answer carries a `scenario` that loads the designed part into the trace and the page.

use crate::error::Error;
use crate::json_fields::Fields;
use crate::{design_displacer, design_recombiner, design_waveplate};
use serde::Serialize;
use serde_json::Value;

/// The design kinds.
pub const KINDS: [&str; 4] = ["displacer", "waveplate", "achromat", "recombiner"];

fn to_value<T: Serialize>(kind: &str, v: &T) -> Result<Value, Error> {
    let mut out = serde_json::to_value(v).map_err(|e| Error::new("", format!("cannot write the design: {e}")))?;
    if let Value::Object(m) = &mut out {
        m.insert("kind".into(), Value::String(kind.into()));
    }
    Ok(out)
}

/// Solves a design request given as a parsed JSON value.
///
/// # Errors
/// The path of the first offending field of the request, or a solver's error.
pub fn solve(request: &Value) -> Result<Value, Error> {
    let mut f = Fields::new("", request)?;
    let kind = f
        .string("kind")?
        .ok_or_else(|| Error::new("kind", format!("is required: one of {}", KINDS.join(", "))))?;
    let out = match kind {
        "displacer" => {
            let r = design_displacer::DisplacerRequest::from_json(&mut f)?;
            f.finish()?;
            to_value(kind, &design_displacer::design(&r)?)?
        }
        "waveplate" => {
            let r = design_waveplate::WaveplateRequest::from_json(&mut f)?;
            f.finish()?;
            to_value(kind, &design_waveplate::design(&r)?)?
        }
        "achromat" => {
            let r = design_waveplate::AchromatRequest::from_json(&mut f)?;
            f.finish()?;
            to_value(kind, &design_waveplate::achromat(&r)?)?
        }
        "recombiner" => {
            let r = design_recombiner::RecombinerRequest::from_json(&mut f)?;
            f.finish()?;
            to_value(kind, &design_recombiner::check(&r)?)?
        }
        other => {
            return Err(Error::new(
                "kind",
                format!("unknown design kind '{other}'; expected one of {}", KINDS.join(", ")),
            ));
        }
    };
    Ok(out)
}

/// Solves a design request given as JSON text.
///
/// # Errors
/// `""` for text that is not JSON, otherwise as [`solve`].
pub fn solve_str(text: &str) -> Result<Value, Error> {
    if text.len() > crate::scenario::MAX_DOCUMENT_BYTES {
        return Err(Error::new("", "the request is larger than 1 MiB"));
    }
    let v: Value = crate::json_fields::parse_text(text)?;
    solve(&v)
}

/// A readable summary: every number, text and short list at the top level and one level down,
/// skipping curves, histograms and the scenario.
pub fn summary_text(design: &Value) -> String {
    let mut out = String::new();
    fn walk(out: &mut String, prefix: &str, v: &Value) {
        match v {
            Value::Object(m) => {
                for (k, x) in m {
                    if matches!(
                        k.as_str(),
                        "scenario" | "curve" | "wavelength_curve" | "histogram" | "angular"
                    ) {
                        continue;
                    }
                    let p = if prefix.is_empty() {
                        k.clone()
                    } else {
                        format!("{prefix}.{k}")
                    };
                    walk(out, &p, x);
                }
            }
            Value::Array(a) if a.len() <= 4 && a.iter().all(|x| !x.is_object()) => {
                let items: Vec<String> = a.iter().map(short).collect();
                out.push_str(&format!("{prefix:<44} [{}]\n", items.join(", ")));
            }
            Value::Array(a) => {
                for (i, x) in a.iter().enumerate() {
                    walk(out, &format!("{prefix}[{i}]"), x);
                }
            }
            other => out.push_str(&format!("{prefix:<44} {}\n", short(other))),
        }
    }
    fn short(v: &Value) -> String {
        match v {
            Value::Number(n) if n.is_i64() || n.is_u64() => n.to_string(),
            Value::Number(n) => n.as_f64().map_or_else(
                || n.to_string(),
                |x| {
                    if x == 0.0 || (1e-3..1e6).contains(&x.abs()) {
                        crate::numfmt::sig(x, 7)
                    } else {
                        format!("{x:.6e}")
                    }
                },
            ),
            Value::String(s) => s.clone(),
            Value::Array(_) => "[…]".into(),
            other => other.to_string(),
        }
    }
    walk(&mut out, "", design);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_kind_solves_and_unknown_kinds_are_named() {
        for doc in [
            r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "samples": 1000}"#,
            r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25}"#,
            r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.5, "wavelengths_nm": [600, 1000]}"#,
            r#"{"kind": "recombiner", "material": "yvo4", "wavelength_nm": 1064, "length_mm": 5}"#,
        ] {
            let v = solve_str(doc).unwrap();
            assert!(v["scenario"]["elements"].is_array(), "{doc}");
            assert!(!summary_text(&v).is_empty());
        }
        assert_eq!(solve_str(r#"{"kind": "lens"}"#).unwrap_err().field, "kind");
        assert_eq!(solve_str(r#"{"material": "calcite"}"#).unwrap_err().field, "kind");
        assert_eq!(
            solve_str(r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "colour": 2}"#)
                .unwrap_err()
                .field,
            "colour"
        );
    }
}
