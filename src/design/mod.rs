//! Design requests: one JSON document asks a solver for a part, by `kind`.
//!
//! | kind | solver | required fields |
//! |---|---|---|
//! | `displacer` | [`crate::design::displacer`] | `material` (or `no`, `ne`, or `nx`, `ny`, `nz`), `separation_mm` |
//! | `waveplate` | [`crate::design::waveplate::design`] | `material` (or `no`, `ne`, or `nx`, `ny`, `nz`), `retardance_waves` |
//! | `achromat` | [`crate::design::waveplate::achromat`] | `first`, `second`, `retardance_waves`, `wavelengths_nm` |
//! | `recombiner` | [`crate::design::recombiner`] | `material`, `length_mm` |
//! | `angular-splitter` | [`crate::design::splitter`] | `material`, `split_angle_deg` |
//! | `prism-polarizer` | [`crate::design::polarizer`] | `material` |
//! | `tilt-tuning` | [`crate::design::tilt`] | `material`, `retardance_waves`, `thickness_mm` or `order_number` |
//! | `quartz-rotator` | [`crate::design::rotator`] | `rotation_deg` |
//! | `athermal-waveplate` | [`crate::design::athermal`] | `first`, `second`, `retardance_waves` |
//! | `birefringent-filter` | [`crate::design::filter`] | `material`, `bandwidth_nm` |
//! | `broadband-retarder` | [`crate::design::broadband`] | `material` or `materials`, `retardance_waves`, `band_nm` |
//!
//! Every answer carries a `scenario` that loads the designed part into the trace and the page.
//! The requests are documents, read field by field in `src/contract/request/`; here each is
//! handed to its solver.
//!
//! Checks every kind shares, made here once:
//! - *Strictness.* A field that does not apply to the chosen order or middle element
//!   ([`CONDITIONAL`]) is an error naming it, as unknown fields are.
//! - *Wavelengths.* Every crystal is evaluated at every wavelength the answer uses (the design
//!   wavelength or wavelengths, and the band's edges and curve). Outside a formula's data range
//!   the answer's `warnings` carry the trace's own sentence, prefixed by the request field that
//!   holds the wavelength (`wavelength_nm: 1500 nm is outside …`); where a formula breaks down
//!   (a resonance, n² ≤ 0, an index below 1) that field is an error. An unverified formula's
//!   warning is prefixed by the field that names the material, and so is the warning of
//!   unverified thermo-optic data, since every answer states figures per kelvin.
//! - *Shop notes.* `notes` lists guidance on parts a shop would question ([`crate::design::notes`]).
//! - *Wavelength basis.* `wavelength_in` (`"vacuum"` or `"air"`, as in a scenario): the request's
//!   wavelengths are turned into vacuum ones before its reader sees them, and the answer echoes
//!   the basis ([`crate::contract::request::WavelengthBasis`]).

use crate::contract::fields::Fields;
use crate::contract::request::{
    AchromatRequest, AthermalRequest, BroadbandRequest, DisplacerRequest, FilterRequest, LcVoltageRequest,
    PolarizerRequest, RecombinerRequest, RotatorRequest, SplitterRequest, TiltRequest, WavelengthBasis,
    WaveplateRequest,
};
use crate::contract::scenario::Medium;
use crate::error::Error;
use crate::optics::material;
use crate::optics::wavelength::Wavelength;
pub mod athermal;
pub mod broadband;
pub mod displacer;
pub mod evolution;
pub mod filter;
pub mod lc;
pub mod notes;
pub mod part;
pub mod polarizer;
pub mod principal;
pub mod recombiner;
pub mod rotator;
pub mod simplex;
pub mod splitter;
pub mod statistics;
pub mod thermal;
pub mod tilt;
pub mod waveplate;

use serde::Serialize;
use serde_json::{Value, json};

/// The design kinds.
pub const KINDS: [&str; 12] = [
    "displacer",
    "waveplate",
    "achromat",
    "recombiner",
    "angular-splitter",
    "prism-polarizer",
    "tilt-tuning",
    "quartz-rotator",
    "athermal-waveplate",
    "birefringent-filter",
    "broadband-retarder",
    "lc-voltage",
];

fn to_value<T: Serialize>(kind: &str, v: &T) -> Result<Value, Error> {
    let mut out = serde_json::to_value(v).map_err(|e| Error::new("", format!("cannot write the design: {e}")))?;
    if let Value::Object(m) = &mut out {
        m.insert("kind".into(), Value::String(kind.into()));
    }
    Ok(out)
}

/// Fields that apply only to some choices of another field: (kind, field, selector field, the
/// selector values it applies to, the selector's default). Given with any other choice, the field
/// is an error naming it.
pub const CONDITIONAL: [(&str, &str, &str, &[&str], &str); 3] = [
    ("waveplate", "order_number", "order", &["multiple"], "zero"),
    ("waveplate", "base_mm", "order", &["compound"], "zero"),
    ("recombiner", "rotator_deg", "middle", &["rotator"], "half-wave"),
];

/// The first field of `request` that does not apply to its choices, as an error naming it.
fn check_applies(kind: &str, request: &Value) -> Result<(), Error> {
    for (k, field, selector, values, default) in CONDITIONAL {
        if k != kind || request.get(field).is_none_or(Value::is_null) {
            continue;
        }
        let chosen = request.get(selector).and_then(Value::as_str).unwrap_or(default);
        if !values.contains(&chosen) {
            let only: Vec<String> = values.iter().map(|v| format!("\"{selector}\": \"{v}\"")).collect();
            return Err(Error::new(
                field,
                format!(
                    "does not apply with \"{selector}\": \"{chosen}\"; it is read only with {}: remove it or change \"{selector}\"",
                    only.join(" or ")
                ),
            ));
        }
    }
    Ok(())
}

/// The warning of a design from fixed indices (`no`/`ne`, `nx`/`ny`/`nz`): they hold at every
/// temperature, so the answer's temperature figures count them as constant.
const FIXED_INDICES_TEMPERATURE: &str = "fixed indices carry no temperature data: this answer's \
     changes per kelvin count the indices and the thickness as constant; give a catalogue crystal, \
     or a dispersion formula with dn_dt_per_k and expansion_per_k, for real ones";

/// The crystals and wavelengths a request uses, for the checks of [`audit`].
struct Uses {
    /// Each crystal with the path of the field that names it.
    media: Vec<(&'static str, Medium)>,
    /// Each single wavelength (nm) with the request field that holds it.
    wavelengths: Vec<(&'static str, f64)>,
    /// The band of the answer's curves, nm, and whether the request gave it (`band_nm`) or it is
    /// the solver's default.
    band: Option<((f64, f64), bool)>,
    /// Whether the answer uses the crystals' optical activity, whose rotatory-dispersion formula
    /// is audited beside the indices.
    activity: bool,
    /// The design temperature, °C: outside a crystal's temperature data, `temperature_c` warns.
    temperature_c: f64,
}

/// Points at which a band is checked for a breakdown of a formula: 481, so that the curves'
/// own grids (81, 121 and 161 points) are among them.
const BAND_CHECK_INTERVALS: usize = 480;

/// The warnings of every crystal at every wavelength a request uses, each prefixed with the field
/// it concerns and given once.
///
/// # Errors
/// The wavelength field (`wavelength_nm`, `wavelengths_nm[1]`, `band_nm[0]`, `band_nm`) at which
/// a formula breaks down. A default band is not the request's: where a formula breaks down inside
/// it, a warning says so and the curve leaves those wavelengths out.
fn audit(uses: &Uses) -> Result<Vec<String>, Error> {
    let mut warnings: Vec<String> = Vec::new();
    let mut push = |w: String| {
        if !warnings.contains(&w) {
            warnings.push(w);
        }
    };
    for (material_path, medium) in &uses.media {
        // Catalogue crystals, uniaxial or biaxial, and a crystal's own formulas (their indices
        // and warnings by [`Medium::principal`], as the trace takes them). Every answer states
        // temperature figures: a formula without temperature data, and fixed indices, say what
        // those figures leave out.
        // A crystal given by its own numbers is named by the field that holds them.
        let prefix = material_path.strip_suffix("material").unwrap_or_default();
        let (key, data) = match medium {
            Medium::Catalogue(m) => (Some((m.key, m.name)), m.data_warning()),
            Medium::Biaxial(m) => (Some((m.key, m.name)), None),
            Medium::Formula(d) => (None, d.design_temperature_warning()),
            Medium::Custom(_) | Medium::Principal(_) => {
                let first = if matches!(medium, Medium::Custom(_)) {
                    "no"
                } else {
                    "nx"
                };
                push(format!("{prefix}{first}: {FIXED_INDICES_TEMPERATURE}"));
                continue;
            }
        };
        let formula = matches!(medium, Medium::Formula(_));
        let material_path = if formula {
            format!("{prefix}dispersion")
        } else {
            material_path.to_string()
        };
        // Provenance first, once per material, on the field that names it.
        if let Some(w) = &data {
            push(format!("{material_path}: {w}"));
        }
        if let Some((key, name)) = key
            && let Some(th) = material::thermal(key)
        {
            // Every answer states temperature figures: unverified thermo-optic data say so.
            if let Some(w) = th.data_warning(name) {
                push(format!("{material_path}: {w}"));
            }
            if let Some(w) = th.range_warning(name, uses.temperature_c) {
                push(format!("temperature_c: {w}"));
            }
        }
        let mut note = |field: &str, ws: Vec<String>| {
            for w in ws.into_iter().filter(|w| Some(w) != data.as_ref()) {
                push(format!("{field}: {w}"));
            }
        };
        let activity = key
            .and_then(|(key, _)| material::optical_activity(key))
            .filter(|_| uses.activity);
        let at = |nm: f64| {
            let w = Wavelength::from_nm(nm)?;
            let mut ws = medium.principal(w)?.1;
            if let Some(a) = activity {
                ws.extend(a.at(w)?.warnings);
            }
            Ok::<_, Error>(ws)
        };
        for (field, nm) in &uses.wavelengths {
            // A formula that breaks down is named on its axis (`dispersion.o`), as a trace names it;
            // a catalogue formula's breakdown, on the wavelength that reaches it.
            let ws = at(*nm).map_err(|e| {
                if formula {
                    Error::new(format!("{prefix}{}", e.field), e.message)
                } else {
                    Error::new(*field, e.message)
                }
            })?;
            note(field, ws);
        }
        let Some(((lo, hi), given)) = uses.band else { continue };
        let edge_field = |i: usize| {
            if given {
                format!("band_nm[{i}]")
            } else {
                "band_nm (default)".to_string()
            }
        };
        for (i, nm) in [lo, hi].into_iter().enumerate() {
            if let Ok(ws) = at(nm) {
                note(&edge_field(i), ws);
            }
        }
        let n = BAND_CHECK_INTERVALS;
        for k in 0..=n {
            let Err(e) = at(lo + (hi - lo) * k as f64 / n as f64) else {
                continue;
            };
            let field = match k {
                0 => edge_field(0),
                k if k == n => edge_field(1),
                _ if given => "band_nm".to_string(),
                _ => edge_field(0),
            };
            if given {
                return Err(Error::new(field, e.message));
            }
            push(format!(
                "{field}: {}; the curves leave out the wavelengths where it does",
                e.message
            ));
            break;
        }
    }
    Ok(warnings)
}

/// An answer as a value, its warnings, and its crystals with their thicknesses.
type Answered = (Value, Vec<String>, Vec<(Medium, f64)>);

/// The solver's answer as a value, with the warnings of [`audit`] and the part's crystals for
/// the notes: the request read from `f` by `read` (every field taken, then checked for unknown
/// ones), its uses audited, then solved.
fn answer<R, D: Serialize + Designed>(
    kind: &str,
    mut f: Fields,
    read: fn(&mut Fields) -> Result<R, Error>,
    uses: fn(&R) -> Uses,
    solve: fn(&R) -> Result<D, Error>,
) -> Result<Answered, Error> {
    let r = read(&mut f)?;
    f.finish()?;
    let warnings = audit(&uses(&r))?;
    let d = solve(&r)?;
    Ok((to_value(kind, &d)?, warnings, d.part().crystals()))
}

/// A design answer: it carries the part it designed.
trait Designed {
    fn part(&self) -> &part::Part;
}

macro_rules! designed {
    ($($t:ty),*) => {$(
        impl Designed for $t {
            fn part(&self) -> &part::Part {
                &self.scenario
            }
        }
    )*};
}

designed!(
    displacer::DisplacerDesign,
    waveplate::WaveplateDesign,
    waveplate::AchromatDesign,
    recombiner::RecombinerCheck,
    splitter::SplitterDesign,
    polarizer::PolarizerDesign,
    tilt::TiltDesign,
    rotator::RotatorDesign,
    athermal::AthermalDesign,
    filter::FilterDesign,
    broadband::BroadbandDesign,
    lc::LcVoltageDesign
);

/// A cell design uses no crystal: only its wavelength is checked.
fn lc_uses(r: &LcVoltageRequest) -> Uses {
    Uses {
        media: Vec::new(),
        wavelengths: vec![("wavelength_nm", r.wavelength.nm())],
        band: None,
        activity: false,
        temperature_c: crate::optics::material::REFERENCE_C,
    }
}

/// A request that uses one crystal at its `wavelength_nm`.
fn single(medium: Medium, nm: f64, temperature_c: f64) -> Uses {
    Uses {
        media: vec![("material", medium)],
        wavelengths: vec![("wavelength_nm", nm)],
        band: None,
        activity: false,
        temperature_c,
    }
}

fn displacer_uses(r: &DisplacerRequest) -> Uses {
    Uses {
        band: r.band_nm.map(|b| (b, true)),
        ..single(r.medium, r.wavelength.nm(), r.temperature_c)
    }
}

fn waveplate_uses(r: &WaveplateRequest) -> Uses {
    Uses {
        band: Some((r.band(), r.band_nm.is_some())),
        ..single(r.medium, r.wavelength.nm(), r.temperature_c)
    }
}

fn achromat_uses(r: &AchromatRequest) -> Uses {
    let (w1, w2) = r.wavelengths_nm;
    Uses {
        media: vec![("first.material", r.a.medium), ("second.material", r.b.medium)],
        wavelengths: vec![("wavelengths_nm[0]", w1), ("wavelengths_nm[1]", w2)],
        band: Some((r.band(), r.band_nm.is_some())),
        activity: false,
        temperature_c: r.temperature_c,
    }
}

fn athermal_uses(r: &AthermalRequest) -> Uses {
    Uses {
        media: vec![("first.material", r.a.medium), ("second.material", r.b.medium)],
        wavelengths: vec![("wavelength_nm", r.wavelength.nm())],
        band: None,
        activity: false,
        temperature_c: r.temperature_c,
    }
}

fn recombiner_uses(r: &RecombinerRequest) -> Uses {
    single(r.medium, r.wavelength.nm(), r.temperature_c)
}

fn splitter_uses(r: &SplitterRequest) -> Uses {
    Uses {
        band: Some((r.band(), r.band_nm.is_some())),
        ..single(r.medium, r.wavelength.nm(), r.temperature_c)
    }
}

fn polarizer_uses(r: &PolarizerRequest) -> Uses {
    single(r.medium, r.wavelength.nm(), r.temperature_c)
}

fn rotator_uses(r: &RotatorRequest) -> Uses {
    let quartz = material::find("quartz").map(Medium::Catalogue);
    Uses {
        media: quartz.into_iter().map(|m| ("kind", m)).collect(),
        wavelengths: vec![("wavelength_nm", r.wavelength.nm())],
        band: Some((r.band(), r.band_nm.is_some())),
        activity: true,
        temperature_c: r.temperature_c,
    }
}

fn filter_uses(r: &FilterRequest) -> Uses {
    Uses {
        band: r.band_nm.map(|b| (b, true)),
        ..single(r.medium, r.wavelength.nm(), r.temperature_c)
    }
}

fn broadband_uses(r: &BroadbandRequest) -> Uses {
    let one = r.media.iter().all(|m| m.medium == r.media[0].medium);
    let names = [
        "materials[0]",
        "materials[1]",
        "materials[2]",
        "materials[3]",
        "materials[4]",
        "materials[5]",
        "materials[6]",
    ];
    Uses {
        media: if one {
            vec![("material", r.media[0].medium)]
        } else {
            names.iter().copied().zip(r.media.iter().map(|p| p.medium)).collect()
        },
        wavelengths: vec![],
        band: Some((r.band_nm, true)),
        activity: false,
        temperature_c: r.temperature_c,
    }
}

fn tilt_uses(r: &TiltRequest) -> Uses {
    let mut u = single(r.medium, r.wavelength.nm(), r.temperature_c);
    u.wavelengths.extend(r.made_for_nm().map(|nm| ("made_for_nm", nm)));
    u
}

/// The dispersion source of each catalogue crystal the part uses, once per crystal and source:
/// `[{material, source, citation, fitted_in}]` (empty for fixed indices only), `fitted_in` the
/// wavelength the source's formula was fitted in as its paper states it (`air`, `vacuum` or
/// `not stated`), as the materials listing gives it.
fn sources_used(crystals: &[(Medium, f64)]) -> Value {
    let mut seen: Vec<(&str, &str)> = Vec::new();
    let mut out = Vec::new();
    for (m, _) in crystals {
        let (source, citation, fitted_in) = match m {
            Medium::Catalogue(c) => (c.source, c.citation, c.fitted_in),
            Medium::Biaxial(b) => (b.source, b.citation, b.fitted_in),
            _ => continue,
        };
        if seen.contains(&(m.key(), source)) {
            continue;
        }
        seen.push((m.key(), source));
        out.push(json!({"material": m.key(), "source": source, "citation": citation, "fitted_in": fitted_in.as_str()}));
    }
    Value::Array(out)
}

/// Solves a design request given as a parsed JSON value.
///
/// The answer is the solver's, with `kind`, `warnings` (as the trace's, see the module header),
/// `notes` (shop guidance), `sources` (the dispersion source of each catalogue crystal used) and
/// the wavelength basis (`wavelength_in`, the request's wavelengths in vacuum and, for air, as
/// given) added.
///
/// # Errors
/// The path of the first offending field of the request, or a solver's error.
pub fn solve(request: &Value) -> Result<Value, Error> {
    let mut f = Fields::new("", request)?;
    let kind = f
        .string("kind")?
        .ok_or_else(|| Error::new("kind", format!("is required: one of {}", KINDS.join(", "))))?;
    // Every wavelength in vacuum before the kind's reader sees it (`wavelength_in`).
    let basis = WavelengthBasis::read(kind, request)?;
    let request = &basis.request;
    let mut f = Fields::new("", request)?;
    f.string("kind")?;
    check_applies(kind, request)?;
    let answered = match kind {
        "displacer" => answer(kind, f, DisplacerRequest::from_json, displacer_uses, displacer::design),
        "waveplate" => answer(kind, f, WaveplateRequest::from_json, waveplate_uses, waveplate::design),
        "achromat" => answer(kind, f, AchromatRequest::from_json, achromat_uses, waveplate::achromat),
        "recombiner" => answer(
            kind,
            f,
            RecombinerRequest::from_json,
            recombiner_uses,
            recombiner::check,
        ),
        "angular-splitter" => answer(kind, f, SplitterRequest::from_json, splitter_uses, splitter::design),
        "prism-polarizer" => answer(kind, f, PolarizerRequest::from_json, polarizer_uses, polarizer::design),
        "tilt-tuning" => answer(kind, f, TiltRequest::from_json, tilt_uses, tilt::design),
        "quartz-rotator" => answer(kind, f, RotatorRequest::from_json, rotator_uses, rotator::design),
        "athermal-waveplate" => answer(kind, f, AthermalRequest::from_json, athermal_uses, athermal::athermal),
        "birefringent-filter" => answer(kind, f, FilterRequest::from_json, filter_uses, filter::design),
        "broadband-retarder" => answer(kind, f, BroadbandRequest::from_json, broadband_uses, broadband::design),
        "lc-voltage" => answer(kind, f, LcVoltageRequest::from_json, lc_uses, lc::design),
        other => {
            return Err(Error::new(
                "kind",
                format!("unknown design kind '{other}'; expected one of {}", KINDS.join(", ")),
            ));
        }
    };
    let (mut out, warnings, crystals) = answered.map_err(|e| basis.explain(e))?;
    let notes = notes::notes(&crystals, out["clear_aperture_mm"].as_f64());
    if let Value::Object(m) = &mut out {
        // A solver's own warnings (what the audit cannot see) come before the audit's.
        let mut all: Vec<Value> = m.get("warnings").and_then(Value::as_array).cloned().unwrap_or_default();
        all.extend(warnings.into_iter().map(Value::String));
        m.insert("warnings".into(), Value::Array(all));
        m.insert("sources".into(), sources_used(&crystals));
        // A solver's own notes (what it assumed or changed) come before the shop's.
        let mut all: Vec<Value> = m.get("notes").and_then(Value::as_array).cloned().unwrap_or_default();
        all.extend(notes.into_iter().map(Value::String));
        m.insert("notes".into(), Value::Array(all));
    }
    basis.echo(&mut out);
    Ok(out)
}

/// Solves a design request given as JSON text.
///
/// # Errors
/// `""` for text that is not JSON, otherwise as [`solve`].
pub fn solve_str(text: &str) -> Result<Value, Error> {
    if text.len() > crate::contract::scenario::MAX_DOCUMENT_BYTES {
        return Err(Error::new("", "the request is larger than 1 MiB"));
    }
    let v: Value = crate::contract::fields::parse_text(text)?;
    solve(&v)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::scenario::Scenario;

    fn solved(doc: &str) -> Value {
        solve_str(doc).unwrap_or_else(|e| panic!("{doc}: {e}"))
    }

    fn field_of(doc: &str) -> String {
        solve_str(doc).expect_err(doc).field
    }

    fn strings(v: &Value) -> Vec<String> {
        v.as_array()
            .unwrap_or_else(|| panic!("a list: {v}"))
            .iter()
            .map(|x| x.as_str().unwrap_or_default().to_string())
            .collect()
    }

    #[test]
    fn fields_that_do_not_apply_to_the_choice_are_errors() {
        for (doc, field) in [
            (
                r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order": "zero", "order_number": 3}"#,
                "order_number",
            ),
            (
                r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order_number": 3}"#,
                "order_number",
            ),
            (
                r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order": "multiple", "base_mm": 1}"#,
                "base_mm",
            ),
            (
                r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order": "compound", "order_number": 2}"#,
                "order_number",
            ),
            (
                r#"{"kind": "recombiner", "material": "yvo4", "wavelength_nm": 1064, "length_mm": 5, "rotator_deg": 80}"#,
                "rotator_deg",
            ),
        ] {
            let e = solve_str(doc).expect_err(doc);
            assert_eq!(e.field, field, "{doc}: {e}");
            assert!(e.message.contains("does not apply"), "{}", e.message);
        }
        // The same fields with the choice they belong to are read.
        for doc in [
            r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order": "multiple", "order_number": 3}"#,
            r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "order": "compound", "base_mm": 1}"#,
            r#"{"kind": "recombiner", "material": "yvo4", "wavelength_nm": 1064, "length_mm": 5, "middle": "rotator", "rotator_deg": 90}"#,
        ] {
            solved(doc);
        }
    }

    #[test]
    fn designs_warn_in_the_words_of_the_trace() {
        // Calcite's formula covers 204-2172 nm (Ghosh 1999); at 2300 nm the displacer warns with
        // the very sentence the trace of its own scenario gives, on the request's field.
        let d = solved(
            r#"{"kind": "displacer", "material": "calcite", "wavelength_nm": 2300, "separation_mm": 1, "samples": 0}"#,
        );
        let warnings = strings(&d["warnings"]);
        let sc = Scenario::from_json(&d["scenario"]).unwrap();
        let traced = crate::contract::result::trace_scenario(&sc).unwrap().warnings;
        assert_eq!(traced.len(), 1, "{traced:?}");
        let sentence = traced[0].strip_prefix("elements[0]: ").unwrap();
        assert_eq!(warnings, [format!("wavelength_nm: {sentence}")]);
        // A band edge outside the range warns on that edge.
        let d = solved(
            r#"{"kind": "displacer", "material": "calcite", "wavelength_nm": 633, "band_nm": [600, 2300], "separation_mm": 1, "samples": 0}"#,
        );
        let w = strings(&d["warnings"]);
        assert!(
            w.len() == 1 && w[0].starts_with("band_nm[1]: 2300 nm is outside"),
            "{w:?}"
        );
        // A waveplate's default band (±20 %) reaching past the range says so too.
        let d =
            solved(r#"{"kind": "waveplate", "material": "quartz", "wavelength_nm": 1800, "retardance_waves": 0.25}"#);
        let w = strings(&d["warnings"]);
        assert!(
            w.len() == 1 && w[0].starts_with("band_nm (default): 2160 nm is outside"),
            "{w:?}"
        );
        // Inside every range: no warning.
        let d =
            solved(r#"{"kind": "waveplate", "material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25}"#);
        assert!(strings(&d["warnings"]).is_empty());
        // The achromat names which of its wavelengths.
        let d = solved(
            r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "mgf2"}, "retardance_waves": 0.25, "wavelengths_nm": [500, 2100], "band_nm": [500, 2000]}"#,
        );
        let w = strings(&d["warnings"]);
        assert!(
            w.iter().any(|x| x.starts_with("wavelengths_nm[1]: 2100 nm is outside")),
            "{w:?}"
        );
        // The recombiner, outside YVO4's 480-1340 nm (Shi et al. 2001).
        let d = solved(r#"{"kind": "recombiner", "material": "yvo4", "wavelength_nm": 1550, "length_mm": 5}"#);
        let w = strings(&d["warnings"]);
        assert!(
            w.len() == 1 && w[0].starts_with("wavelength_nm: 1550 nm is outside"),
            "{w:?}"
        );
    }

    #[test]
    fn a_formula_that_breaks_down_is_an_error_on_the_wavelength_field() {
        // Rutile (DeVore 1951): n_o has a pole at λ² = 0.0803 µm² (283.4 nm), n_e at 290.3 nm;
        // between about 197 and 283 nm n_o² < 0.
        for (doc, field) in [
            (
                r#"{"kind": "displacer", "material": "rutile", "wavelength_nm": 250, "separation_mm": 1, "samples": 0}"#,
                "wavelength_nm",
            ),
            (
                r#"{"kind": "displacer", "material": "rutile", "wavelength_nm": 600, "band_nm": [250, 700], "separation_mm": 1, "samples": 0}"#,
                "band_nm[0]",
            ),
            // Both edges are fine (n ≈ 1.3 at 150 nm); the poles lie inside the band.
            (
                r#"{"kind": "displacer", "material": "rutile", "wavelength_nm": 600, "band_nm": [150, 700], "separation_mm": 1, "samples": 0}"#,
                "band_nm",
            ),
            (
                r#"{"kind": "waveplate", "material": "rutile", "wavelength_nm": 600, "band_nm": [500, 250], "retardance_waves": 0.5}"#,
                "band_nm",
            ),
            (
                r#"{"kind": "waveplate", "material": "rutile", "wavelength_nm": 600, "band_nm": [250, 500], "retardance_waves": 0.5}"#,
                "band_nm[0]",
            ),
            (
                r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "rutile"}, "retardance_waves": 0.25, "wavelengths_nm": [600, 250]}"#,
                "wavelengths_nm[1]",
            ),
            // alpha-BBO's n_e falls below 1 near 9.5 µm.
            (
                r#"{"kind": "recombiner", "material": "alpha-bbo", "wavelength_nm": 10000, "length_mm": 5}"#,
                "wavelength_nm",
            ),
        ] {
            assert_eq!(field_of(doc), field, "{doc}");
        }
        // A default band is not the request's: a breakdown inside it is a warning, and the
        // curve leaves those wavelengths out (rutile at 340 nm: default band 272-408 nm).
        let d = solved(r#"{"kind": "waveplate", "material": "rutile", "wavelength_nm": 340, "retardance_waves": 0.5}"#);
        let w = strings(&d["warnings"]);
        assert!(
            w.iter()
                .any(|x| x.starts_with("band_nm (default): ") && x.contains("leave out")),
            "{w:?}"
        );
        assert!(d["wavelength_curve"].as_array().unwrap().len() < 121);
    }

    #[test]
    fn every_result_from_the_unverified_formula_says_so() {
        let flagged = |v: &Value, path: &str| {
            strings(&v["warnings"])
                .iter()
                .any(|w| w.starts_with(&format!("{path}: unverified data for alpha-bbo")))
        };
        for doc in [
            r#"{"kind": "displacer", "material": "alpha-bbo", "separation_mm": 1, "samples": 0}"#,
            r#"{"kind": "waveplate", "material": "alpha-bbo", "retardance_waves": 0.5}"#,
            r#"{"kind": "recombiner", "material": "alpha-bbo", "wavelength_nm": 532, "length_mm": 5}"#,
        ] {
            let d = solved(doc);
            assert!(flagged(&d, "material"), "{doc}: {}", d["warnings"]);
            // Once, however many wavelengths the answer uses.
            let n = strings(&d["warnings"])
                .iter()
                .filter(|w| w.contains("unverified data"))
                .count();
            assert_eq!(n, 1, "{doc}");
            // The scenario it hands on is traced with the same warning.
            let sc = Scenario::from_json(&d["scenario"]).unwrap();
            let t = crate::contract::result::trace_scenario(&sc).unwrap();
            assert!(
                t.warnings
                    .iter()
                    .any(|w| w.starts_with("elements[0]: unverified data for alpha-bbo")),
                "{:?}",
                t.warnings
            );
        }
        let d = solved(
            r#"{"kind": "achromat", "first": {"material": "quartz"}, "second": {"material": "alpha-bbo"}, "retardance_waves": 0.25, "wavelengths_nm": [500, 900]}"#,
        );
        assert!(flagged(&d, "second.material"), "{}", d["warnings"]);
        // A verified material carries no such warning.
        let d = solved(r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "samples": 0}"#);
        assert!(strings(&d["warnings"]).is_empty());
    }

    #[test]
    fn shop_notes_flag_thin_long_and_wide_parts() {
        // A zero-order quartz quarter-wave plate at 633 nm is about 17 µm thick (λ/(4 Δn)).
        let d =
            solved(r#"{"kind": "waveplate", "material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25}"#);
        let n = strings(&d["notes"]);
        assert!(n.len() == 1 && n[0].contains("thinner than about 0.1 mm"), "{n:?}");
        // A 40 mm calcite displacer is about 370 mm long and needs a 42 mm aperture.
        let d = solved(r#"{"kind": "displacer", "material": "calcite", "separation_mm": 40, "samples": 0}"#);
        let n = strings(&d["notes"]);
        assert!(n.iter().any(|x| x.contains("longer than about 100 mm")), "{n:?}");
        assert!(n.iter().any(|x| x.contains("clear aperture of 42.0 mm")), "{n:?}");
        // An everyday part: no notes, but the list is there.
        let d = solved(r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "samples": 0}"#);
        assert_eq!(d["notes"], json!([]));
    }

    #[test]
    fn a_bound_is_flagged_and_written_as_one() {
        // Within 2° a zero-order quartz quarter-wave plate stays within 0.01 wave in every
        // plane: the acceptance is only known to be at least 2°.
        let d = solved(
            r#"{"kind": "waveplate", "material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25, "max_incidence_deg": 2}"#,
        );
        assert_eq!(d["acceptance_deg"], json!(2.0));
        assert_eq!(d["acceptance_bound"], "at_least");
        // Independent of the bisection: every computed point of every plane stays in the limit.
        for plane in d["angular"].as_array().unwrap() {
            assert_eq!(plane["acceptance_bound"], "at_least");
            let curve = plane["curve"].as_array().unwrap();
            let g0 = curve[0][1].as_f64().unwrap();
            assert!(curve.iter().all(|p| (p[1].as_f64().unwrap() - g0).abs() <= 0.01));
        }
        // A tenth-order plate leaves the limit within 10°: a found value, written plainly.
        let d = solved(
            r#"{"kind": "waveplate", "material": "quartz", "wavelength_nm": 633, "retardance_waves": 0.25, "order": "multiple", "order_number": 10}"#,
        );
        assert_eq!(d["acceptance_bound"], "found");
        assert!(d["acceptance_deg"].as_f64().unwrap() < 10.0);
    }

    /// A range that leaves out an end says so: a separation of −1 mm or 0 mm is "above 0 mm",
    /// never "from 0 mm" (which would invite the 0 it refuses); a range that holds both ends
    /// says "from … to …".
    #[test]
    fn range_messages_of_the_solvers_say_which_ends_they_hold() {
        let message = |doc: &str| solve_str(doc).expect_err(doc);
        for (doc, field, text) in [
            (
                r#"{"kind": "displacer", "material": "calcite", "separation_mm": -1}"#,
                "separation_mm",
                "must be above 0 mm and at most 1000 mm, got \u{2212}1 mm",
            ),
            (
                r#"{"kind": "displacer", "material": "calcite", "separation_mm": 0}"#,
                "separation_mm",
                "must be above 0 mm and at most 1000 mm, got 0 mm",
            ),
            (
                r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "beam_diameter_mm": 0}"#,
                "beam_diameter_mm",
                "must be above 0 mm and at most 1000 mm, got 0 mm",
            ),
            (
                r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1, "aperture_factor": 0.5}"#,
                "aperture_factor",
                "must be from 1 to 10, got 0.5",
            ),
            (
                r#"{"kind": "waveplate", "material": "quartz", "retardance_waves": 0.25, "max_incidence_deg": 90}"#,
                "max_incidence_deg",
                "must be from 0.01° to 80°, got 90°",
            ),
        ] {
            let e = message(doc);
            assert_eq!((e.field.as_str(), e.message.as_str()), (field, text), "{doc}");
        }
        // The largest value each excluding range holds is still taken.
        solved(
            r#"{"kind": "displacer", "material": "calcite", "separation_mm": 1000, "beam_diameter_mm": 1000, "samples": 0}"#,
        );
    }

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

    #[test]
    fn a_rotator_is_audited_on_its_rotatory_dispersion_and_strict() {
        // The rotatory-dispersion formula of quartz covers 230-1500 nm (activity.rs), its
        // indices further: at 1600 nm only the rotatory power warns, on the field.
        let d =
            solved(r#"{"kind": "quartz-rotator", "rotation_deg": 45, "wavelength_nm": 1600, "band_nm": [1400, 1600]}"#);
        let w = strings(&d["warnings"]);
        assert!(
            w.len() == 2
                && w[0].starts_with(
                    "wavelength_nm: 1600 nm is outside the 230-1500 nm range of the rotatory-dispersion formula"
                )
                && w[1].starts_with("band_nm[1]: 1600 nm"),
            "{w:?}"
        );
        // Its own notes come before the shop's, and say where its temperature figure comes from.
        assert!(
            strings(&d["notes"])[0]
                .starts_with("the temperature sensitivity dθ/dT carries the rotatory power's own change")
        );
        assert_eq!(
            field_of(r#"{"kind": "quartz-rotator", "rotation_deg": 45, "thickness_mm": 3}"#),
            "thickness_mm"
        );
        // At the formula's resonance (92.6 nm) the request's wavelength is the error.
        assert_eq!(
            field_of(r#"{"kind": "quartz-rotator", "rotation_deg": 45, "wavelength_nm": 92.6}"#),
            "wavelength_nm"
        );
        assert_eq!(d["scenario"]["version"], 2);
        Scenario::from_json(&d["scenario"]).unwrap();
    }

    #[test]
    fn prism_designs_are_audited_and_strict_like_every_kind() {
        // Calcite's formula covers 204-2172 nm (Ghosh 1999): a splitter at 2000 nm warns on its
        // default band (±10 %), a tilt-tuned plate made for 2300 nm on made_for_nm.
        let d = solved(
            r#"{"kind": "angular-splitter", "material": "calcite", "wavelength_nm": 2000, "split_angle_deg": 5, "samples": 0}"#,
        );
        let w = strings(&d["warnings"]);
        assert!(
            w.len() == 1 && w[0].starts_with("band_nm (default): 2200 nm is outside"),
            "{w:?}"
        );
        let d = solved(
            r#"{"kind": "tilt-tuning", "material": "calcite", "wavelength_nm": 2100, "order_number": 0, "made_for_nm": 2300, "retardance_waves": 0.25, "max_tilt_deg": 60}"#,
        );
        let w = strings(&d["warnings"]);
        assert!(
            w.iter().any(|x| x.starts_with("made_for_nm: 2300 nm is outside")),
            "{w:?}"
        );
        // Unknown fields name themselves, in every new kind.
        for (doc, field) in [
            (
                r#"{"kind": "angular-splitter", "material": "calcite", "split_angle_deg": 5, "wedge_deg": 3}"#,
                "wedge_deg",
            ),
            (
                r#"{"kind": "prism-polarizer", "material": "calcite", "gap_mm": 0.01}"#,
                "gap_mm",
            ),
            (
                r#"{"kind": "tilt-tuning", "material": "quartz", "thickness_mm": 1, "retardance_waves": 0.25, "tilt_deg": 3}"#,
                "tilt_deg",
            ),
        ] {
            assert_eq!(field_of(doc), field, "{doc}");
        }
        // Each answer echoes its kind and carries a version-2 scenario that loads.
        for doc in [
            r#"{"kind": "angular-splitter", "material": "quartz", "split_angle_deg": 1, "samples": 0}"#,
            r#"{"kind": "prism-polarizer", "material": "calcite"}"#,
            r#"{"kind": "tilt-tuning", "material": "quartz", "thickness_mm": 0.5, "retardance_waves": 0.25, "tilt_azimuth_deg": 90}"#,
        ] {
            let d = solved(doc);
            assert_eq!(d["scenario"]["version"], 2, "{doc}");
            Scenario::from_json(&d["scenario"]).unwrap_or_else(|e| panic!("{doc}: {e}"));
        }
    }
}
