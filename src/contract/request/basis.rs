//! The wavelength basis of a design request: `"wavelength_in": "vacuum"` (the default) or
//! `"air"`, as in a scenario.
//!
//! Physics. A wavelength measured in air is the vacuum wavelength divided by the index of the
//! air, λ_air = λ_vac / n_air(λ_vac); the solvers and the dispersion formulas work with vacuum
//! wavelengths. A request in air has every wavelength it gives converted to vacuum once, here,
//! before its kind's reader sees it, with Ciddor's standard air
//! ([`material::vacuum_from_air`], Ciddor 1996), exactly as a scenario's `wavelength_nm` is. A
//! width of wavelengths (a filter's `bandwidth_nm`, a displacer's `tolerances.wavelength_nm`)
//! is scaled by dλ_vac/dλ_air at the request's `wavelength_nm` (a central difference of the same
//! conversion over ±10⁻⁴ of it), so that the width between two air wavelengths becomes the
//! width between their vacuum equivalents to first order; the scale is 1 + (n − 1) + λ dn/dλ,
//! about 1.00026 in the visible.
//!
//! Conventions. The answer echoes `wavelength_in`, each wavelength field of the request in vacuum
//! under its own name (where the solver's answer does not already hold it) and, for `"air"`, the
//! value as given beside it under the name with `air_` in front (`air_wavelength_nm`,
//! `air_band_nm`, `air_wavelengths_nm`, `air_made_for_nm`, `air_bandwidth_nm`,
//! `tolerances.air_wavelength_nm`), as a trace result writes `air_wavelength_nm` beside its
//! vacuum `wavelength_nm`, with `air_index` (the index of standard air at the design
//! wavelength) where the kind has a `wavelength_nm`. A width the answer reports of its own (a
//! filter's `fwhm_nm`, listed in [`ANSWER_WIDTHS`]) is a vacuum width, and for `"air"` it gets an
//! `air_` twin beside it scaled by dλ_air/dλ_vac at the request's `wavelength_nm` (the reciprocal
//! of the scale above, at the same point), so that it is the width between the air wavelengths of
//! its two ends to first order. The answer's curves and every other wavelength in it are vacuum
//! wavelengths. The answer's `scenario` documents are written in the
//! request's basis: for `"air"`, the air wavelength with `"wavelength_in": "air"`, so that the
//! page shows the number the designer typed and reading the scenario back converts it to the
//! very vacuum wavelength the design used (bit for bit where the scenario's wavelength is one the
//! request gave; otherwise, such as a broadband retarder's band centre, to rounding).

use crate::contract::fields::number_list;
use crate::error::Error;
use crate::numfmt::quote;
use crate::optics::material::{air_from_vacuum, vacuum_from_air};
use crate::optics::wavelength::Wavelength;
use serde_json::{Map, Value, json};

/// How a request field holds wavelengths.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Form {
    /// One wavelength, nm; `Some(default)` when the reader takes a default in the request's
    /// basis.
    Single(Option<f64>),
    /// Two wavelengths `[a, b]`, nm.
    Pair,
    /// A width of wavelengths about the request's `wavelength_nm`, nm.
    Width,
}

/// The request's wavelength default (the readers' `wavelength_nm` default), nm.
const DEFAULT_NM: f64 = 632.8;

/// The wavelength fields of every kind that has any: (kind, path with `.` between names, form).
/// The readers in this folder are the reference: a field listed here must be read by that kind,
/// and `tests/design_wavelength_in.rs` checks that every kind with a `wavelength_nm` is listed.
const FIELDS: &[(&str, &str, Form)] = &[
    ("displacer", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("displacer", "band_nm", Form::Pair),
    ("displacer", "tolerances.wavelength_nm", Form::Width),
    ("waveplate", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("waveplate", "band_nm", Form::Pair),
    ("achromat", "wavelengths_nm", Form::Pair),
    ("achromat", "band_nm", Form::Pair),
    ("recombiner", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("angular-splitter", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("angular-splitter", "band_nm", Form::Pair),
    ("prism-polarizer", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("tilt-tuning", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    // Its default is the wavelength, read after conversion.
    ("tilt-tuning", "made_for_nm", Form::Single(None)),
    ("quartz-rotator", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("quartz-rotator", "band_nm", Form::Pair),
    ("athermal-waveplate", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    ("birefringent-filter", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
    // After `wavelength_nm`, about which widths are scaled.
    ("birefringent-filter", "bandwidth_nm", Form::Width),
    ("birefringent-filter", "band_nm", Form::Pair),
    ("broadband-retarder", "band_nm", Form::Pair),
    ("lc-voltage", "wavelength_nm", Form::Single(Some(DEFAULT_NM))),
];

/// Widths that answers report of their own, nm (kind, path with `.` between names): each a
/// number, or a list whose `null`s stay `null`. For an air request each gets an `air_` twin in
/// standard air (see the module header); a `null` figure gets none.
pub const ANSWER_WIDTHS: &[(&str, &str)] = &[
    ("birefringent-filter", "fwhm_nm"),
    ("birefringent-filter", "neighbour_orders_fwhm_nm"),
    // A drift of the centre wavelength is a width per kelvin.
    ("birefringent-filter", "centre_shift_nm_per_k"),
];

/// One wavelength field of the request as given and in vacuum.
#[derive(Debug, Clone, PartialEq)]
struct Converted {
    /// Its path, `.` between names.
    path: &'static str,
    /// How it holds wavelengths.
    form: Form,
    /// The value in the request's basis (as given, or the default).
    given: Value,
    /// The value in vacuum.
    vacuum: Value,
}

/// A design request's wavelength basis, with the request rewritten in vacuum wavelengths.
#[derive(Debug, Clone, PartialEq)]
pub struct WavelengthBasis {
    /// The request with every wavelength in vacuum and without `wavelength_in`: what the kind's
    /// reader reads.
    pub request: Value,
    /// Whether the request gave its wavelengths in standard air.
    air: bool,
    /// Its wavelength fields, as given and in vacuum.
    converted: Vec<Converted>,
    /// The index of standard air at the request's `wavelength_nm` (air requests with one).
    air_index: Option<f64>,
    /// The answer's own widths ([`ANSWER_WIDTHS`] of the request's kind) and dλ_air/dλ_vac at its
    /// `wavelength_nm` (air requests with one).
    air_widths: Option<(Vec<&'static str>, f64)>,
    /// The conversion's warnings, each prefixed by its field.
    warnings: Vec<String>,
}

/// The value at `path` (names joined by `.`) in `v`.
fn at<'a>(v: &'a Value, path: &str) -> Option<&'a Value> {
    path.split('.').try_fold(v, |v, name| v.get(name))
}

/// The object at `path` in `v` (made where missing) and the last name of the path.
fn place<'a, 'p>(v: &'a mut Value, path: &'p str) -> Option<(&'a mut Map<String, Value>, &'p str)> {
    let (parents, name) = match path.rsplit_once('.') {
        Some((p, n)) => (Some(p), n),
        None => (None, path),
    };
    let mut obj = v.as_object_mut()?;
    for parent in parents.into_iter().flat_map(|p| p.split('.')) {
        obj = obj.entry(parent).or_insert_with(|| json!({})).as_object_mut()?;
    }
    Some((obj, name))
}

/// The vacuum wavelength (nm) of `air_nm` in standard air with the index of the air there,
/// errors and warnings named by `path`.
fn vacuum_nm(path: &str, air_nm: f64, warnings: &mut Vec<String>) -> Result<(f64, f64), Error> {
    let c = vacuum_from_air(air_nm).map_err(|e| Error::new(path, e.message))?;
    warnings.extend(c.warnings.iter().map(|w| format!("{path}: {w}")));
    Ok((c.vacuum.nm(), c.air_index))
}

/// A vacuum width `v` (a number, or a list of numbers and `null`s) in standard air, each number
/// times `scale` (dλ_air/dλ_vac); `None` for anything else (a `null` figure).
fn in_air(v: &Value, scale: f64) -> Option<Value> {
    match v {
        Value::Number(n) => n.as_f64().map(|x| json!(x * scale)),
        Value::Array(list) => Some(Value::Array(
            list.iter().map(|x| in_air(x, scale).unwrap_or(Value::Null)).collect(),
        )),
        _ => None,
    }
}

/// dλ_vac/dλ_air at `air_nm` (see the module header).
fn width_scale(air_nm: f64) -> Result<f64, Error> {
    const H: f64 = 1e-4;
    let up = vacuum_from_air(air_nm * (1.0 + H))?.vacuum.nm();
    let down = vacuum_from_air(air_nm * (1.0 - H))?.vacuum.nm();
    Ok((up - down) / (2.0 * H * air_nm))
}

impl WavelengthBasis {
    /// Reads `wavelength_in` of a design request of kind `kind` and rewrites the request's
    /// wavelengths in vacuum (see the module header). A field that is not a number (or a list of
    /// two) is left as it is, for the kind's reader to name.
    ///
    /// # Errors
    /// `wavelength_in` for a value other than `"vacuum"` or `"air"`; the wavelength field (such
    /// as `band_nm[1]`) whose air wavelength has no vacuum equivalent (at or below the
    /// standard-air formula's resonance, 132 nm).
    pub fn read(kind: &str, request: &Value) -> Result<WavelengthBasis, Error> {
        let air = match request.get("wavelength_in") {
            None => false,
            Some(Value::String(s)) if s == "vacuum" => false,
            Some(Value::String(s)) if s == "air" => true,
            Some(other) => {
                let shown = other.as_str().map_or_else(|| other.to_string(), str::to_string);
                return Err(Error::new(
                    "wavelength_in",
                    format!("unknown value '{shown}'; expected \"vacuum\" or \"air\""),
                ));
            }
        };
        let mut out = WavelengthBasis {
            request: request.clone(),
            air,
            converted: Vec::new(),
            air_index: None,
            air_widths: None,
            warnings: Vec::new(),
        };
        if let Some(m) = out.request.as_object_mut() {
            m.remove("wavelength_in");
        }
        for (_, path, form) in FIELDS.iter().filter(|(k, ..)| *k == kind) {
            let given = match (at(request, path), form) {
                (Some(v), _) => v.clone(),
                (None, Form::Single(Some(d))) => json!(d),
                (None, _) => continue,
            };
            let vacuum = if air {
                match out.convert(path, &given, *form)? {
                    Some(v) => v,
                    None => continue,
                }
            } else {
                given.clone()
            };
            if air && let Some((obj, name)) = place(&mut out.request, path) {
                obj.insert(name.to_string(), vacuum.clone());
            }
            out.converted.push(Converted {
                path,
                form: *form,
                given,
                vacuum,
            });
        }
        let widths: Vec<&'static str> = ANSWER_WIDTHS
            .iter()
            .filter(|(k, _)| *k == kind)
            .map(|(_, p)| *p)
            .collect();
        let centre = out
            .converted
            .iter()
            .find(|c| c.path == "wavelength_nm")
            .and_then(|c| c.given.as_f64());
        if air && !widths.is_empty() {
            // The centre converted above, so its scale exists; a failure leaves the twins out.
            out.air_widths = centre.and_then(|c| width_scale(c).ok()).map(|s| (widths, 1.0 / s));
        }
        Ok(out)
    }

    /// `given` (at `path`, of `form`) in vacuum; `None` when it is not a number or a list of two,
    /// left for the reader to refuse.
    fn convert(&mut self, path: &str, given: &Value, form: Form) -> Result<Option<Value>, Error> {
        let ws = &mut self.warnings;
        Ok(Some(match form {
            Form::Single(_) => {
                let Some(nm) = given.as_f64() else { return Ok(None) };
                let (vac, index) = vacuum_nm(path, nm, ws)?;
                if path == "wavelength_nm" {
                    self.air_index = Some(index);
                }
                json!(vac)
            }
            Form::Pair => {
                let Ok(b) = number_list(path, given, 2) else {
                    return Ok(None);
                };
                json!([
                    vacuum_nm(&format!("{path}[0]"), b[0], ws)?.0,
                    vacuum_nm(&format!("{path}[1]"), b[1], ws)?.0
                ])
            }
            Form::Width => {
                // Scaled at the request's wavelength (listed before any width), whose own
                // errors are named on it.
                let centre = self.converted.iter().find(|c| c.path == "wavelength_nm");
                let (Some(w), Some(c)) = (given.as_f64(), centre.and_then(|c| c.given.as_f64())) else {
                    return Ok(None);
                };
                json!(w * width_scale(c).map_err(|e| Error::new(path, e.message))?)
            }
        }))
    }

    /// An error of the kind's reader on a field this basis converted, its message saying which
    /// air value the vacuum number it quotes stands for; other errors unchanged.
    pub fn explain(&self, mut e: Error) -> Error {
        if !self.air {
            return e;
        }
        let of = |c: &Converted, i: Option<usize>| match i {
            Some(i) => c.given.get(i).and_then(Value::as_f64),
            None => c.given.as_f64(),
        };
        for c in &self.converted {
            let hit = if e.field == c.path {
                Some(None)
            } else {
                (0..2).find(|i| e.field == format!("{}[{i}]", c.path)).map(Some)
            };
            if let Some(nm) = hit.and_then(|i| of(c, i)) {
                e.message = format!("{} (the vacuum equivalent of {} nm in air)", e.message, quote(nm));
                break;
            }
        }
        e
    }

    /// Writes the basis into a solver's `answer` (see the module header): `wavelength_in`, the
    /// request's wavelength fields in vacuum where the answer lacks them, their `air_` twins, the
    /// air index and the conversion's warnings, and the answer's scenarios in the request's basis.
    pub fn echo(&self, answer: &mut Value) {
        if let Some(m) = answer.as_object_mut() {
            m.insert("wavelength_in".into(), json!(if self.air { "air" } else { "vacuum" }));
        }
        for c in &self.converted {
            let Some((obj, name)) = place(answer, c.path) else {
                continue;
            };
            obj.entry(name).or_insert_with(|| c.vacuum.clone());
            if self.air {
                obj.insert(format!("air_{name}"), c.given.clone());
            }
        }
        if !self.air {
            return;
        }
        if let Some((widths, scale)) = &self.air_widths {
            for path in widths {
                let Some(twin) = at(answer, path).and_then(|v| in_air(v, *scale)) else {
                    continue;
                };
                if let Some((obj, name)) = place(answer, path) {
                    obj.insert(format!("air_{name}"), twin);
                }
            }
        }
        if let Some(m) = answer.as_object_mut() {
            if let Some(n) = self.air_index {
                m.insert("air_index".into(), json!(n));
            }
            let mut all: Vec<Value> = m.get("warnings").and_then(Value::as_array).cloned().unwrap_or_default();
            all.extend(self.warnings.iter().cloned().map(Value::String));
            m.insert("warnings".into(), Value::Array(all));
        }
        self.scenarios_in_air(answer);
    }

    /// Every scenario document in `v` (an object under a `scenario` key) rewritten in standard
    /// air: the air wavelength the request gave for its vacuum wavelength when it is one of
    /// them, otherwise its air equivalent, with `"wavelength_in": "air"`.
    fn scenarios_in_air(&self, v: &mut Value) {
        match v {
            Value::Object(m) => {
                for (k, x) in m.iter_mut() {
                    if k == "scenario" && x.get("elements").is_some() {
                        self.scenario_in_air(x);
                    } else {
                        self.scenarios_in_air(x);
                    }
                }
            }
            Value::Array(a) => a.iter_mut().for_each(|x| self.scenarios_in_air(x)),
            _ => {}
        }
    }

    fn scenario_in_air(&self, sc: &mut Value) {
        let Some(vac) = sc.get("wavelength_nm").and_then(Value::as_f64) else {
            return;
        };
        let given = self
            .converted
            .iter()
            .filter(|c| c.form != Form::Width)
            .find_map(|c| match (&c.given, &c.vacuum) {
                (Value::Number(g), Value::Number(v)) if v.as_f64() == Some(vac) => g.as_f64(),
                (Value::Array(g), Value::Array(v)) => {
                    let i = v.iter().position(|x| x.as_f64() == Some(vac))?;
                    g.get(i)?.as_f64()
                }
                _ => None,
            });
        let air_nm = given.or_else(|| air_from_vacuum(Wavelength::from_nm(vac).ok()?));
        if let (Some(nm), Some(m)) = (air_nm, sc.as_object_mut()) {
            m.insert("wavelength_nm".into(), json!(nm));
            m.insert("wavelength_in".into(), json!("air"));
        }
    }
}
