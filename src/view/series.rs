//! Plot series of one crystal of a scenario: its behaviour against one parameter.
//!
//! Each series takes one crystal of a scenario, at the scenario's incidence and outside index,
//! and varies one parameter while holding the rest: the e-ray walk-off against the cut tilt (the
//! angle between optic axis and plate normal), and the o–e separation and the retardance against
//! wavelength over the material's validity range. Every point is the exact plane-wave solution of
//! [`crate::optics::plate`] for a uniaxial crystal, or the whole trace of the plate alone for a
//! biaxial or optically active one (its second mode's walk-off: e or s), so the plotted curve
//! passes through the traced operating point.
//! Points where a mode is evanescent or the dispersion formula breaks down are left out.

#[cfg(any(test, target_arch = "wasm32"))]
use crate::contract::fields::{Fields, number_list};
use crate::contract::geometry::{Contact, Placement};
use crate::contract::resolve::axis_from_degrees;
use crate::contract::scenario::{CrystalPlate, Element, ElementKind, Medium, Scenario};
use crate::error::Error;
use crate::optics::material::Indices;
use crate::optics::plate::plate_optics;
use crate::optics::stack::Element as StackElement;
use crate::optics::trace::trace;
use crate::optics::traced::LayerTrace;
use crate::optics::uniaxial::angle_between;
use crate::optics::wavelength::Wavelength;
use serde::Serialize;
#[cfg(any(test, target_arch = "wasm32"))]
use serde_json::Value;
use std::f64::consts::TAU;

/// Wavelength range used for crystals with fixed custom indices, nm.
pub const CUSTOM_RANGE_NM: (f64, f64) = (400.0, 1600.0);
/// Points per wavelength sweep.
pub const WAVELENGTH_POINTS: usize = 121;

/// A sampled curve with its axes and the current operating point.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Series {
    /// What is plotted, e.g. "walk-off against cut tilt".
    pub title: String,
    /// Name of the x quantity.
    pub x_label: String,
    /// Unit of x.
    pub x_unit: String,
    /// Name of the y quantity.
    pub y_label: String,
    /// Unit of y.
    pub y_unit: String,
    /// The samples [x, y].
    pub points: Vec<[f64; 2]>,
    /// The scenario's own operating point, when it is defined.
    pub current: Option<[f64; 2]>,
    /// Further points to mark and label as the current one (a design's second wavelength, say);
    /// where two labels would collide the placement pass leaves one out, never a dot.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub markers: Vec<[f64; 2]>,
    /// A remark for the reader (no dispersion, evanescent range, …).
    pub note: String,
}

impl Series {
    /// A series from its words `[title, x label, x unit, y label, y unit]`, its points, its
    /// operating point and its note, with no further markers. One constructor for every plot,
    /// not inlined: the page's WebAssembly then holds one copy.
    #[inline(never)]
    pub fn new(words: [&str; 5], points: Vec<[f64; 2]>, current: Option<[f64; 2]>, note: String) -> Series {
        let [title, x_label, x_unit, y_label, y_unit] = words;
        Series {
            title: title.into(),
            x_label: x_label.into(),
            x_unit: x_unit.into(),
            y_label: y_label.into(),
            y_unit: y_unit.into(),
            points,
            current,
            markers: Vec::new(),
            note,
        }
    }

    /// Reads a series written as JSON (the shape it serializes to). Read by hand rather than
    /// derived, which keeps the page's WebAssembly module small.
    ///
    /// # Errors
    /// The path of the first offending field, under `series`.
    #[cfg(any(test, target_arch = "wasm32"))]
    pub fn from_json(v: &Value) -> Result<Series, Error> {
        let mut f = Fields::new("series", v)?;
        let text = |f: &mut Fields, name: &'static str| -> Result<String, Error> {
            Ok(f.string(name)?.unwrap_or_default().to_string())
        };
        let (title, x_label, x_unit, y_label, y_unit, note) = (
            text(&mut f, "title")?,
            text(&mut f, "x_label")?,
            text(&mut f, "x_unit")?,
            text(&mut f, "y_label")?,
            text(&mut f, "y_unit")?,
            text(&mut f, "note")?,
        );
        let points = match f.get("points") {
            Some(Value::Array(items)) => items
                .iter()
                .enumerate()
                .map(|(i, p)| number_list(&format!("series.points[{i}]"), p, 2).map(|xy| [xy[0], xy[1]]))
                .collect::<Result<Vec<_>, _>>()?,
            None => Vec::new(),
            Some(_) => return Err(Error::new("series.points", "must be a list of [x, y] pairs")),
        };
        let current = match f.get("current") {
            None => None,
            Some(c) => {
                let xy = number_list("series.current", c, 2)?;
                Some([xy[0], xy[1]])
            }
        };
        let markers = match f.get("markers") {
            None | Some(Value::Null) => Vec::new(),
            Some(Value::Array(items)) => items
                .iter()
                .enumerate()
                .map(|(i, p)| number_list(&format!("series.markers[{i}]"), p, 2).map(|xy| [xy[0], xy[1]]))
                .collect::<Result<Vec<_>, _>>()?,
            Some(_) => return Err(Error::new("series.markers", "must be a list of [x, y] pairs")),
        };
        f.finish()?;
        Ok(Series {
            title,
            x_label,
            x_unit,
            y_label,
            y_unit,
            points,
            current,
            markers,
            note,
        })
    }
}

/// The crystal a plot follows and the beam's tangential wave vector.
pub(crate) struct Setting {
    /// The plate.
    pub(crate) plate: CrystalPlate,
    /// q_t of the incident beam.
    pub(crate) qt: [f64; 2],
}

/// Crystal number `crystal` of the scenario with the beam's tangential wave vector.
pub(crate) fn setting(sc: &Scenario, crystal: usize) -> Option<Setting> {
    let plate = sc
        .elements
        .iter()
        .filter_map(|e| match e.kind {
            ElementKind::Crystal(p) => Some(p),
            _ => None,
        })
        .nth(crystal)?;
    let (p, a) = (sc.beam.polar_deg.to_radians(), sc.beam.azimuth_deg.to_radians());
    let n = sc.outside_index;
    Some(Setting {
        plate,
        qt: [n * p.sin() * a.cos(), n * p.sin() * a.sin()],
    })
}

fn indices_at(plate: &CrystalPlate, wl: Wavelength) -> Option<Indices> {
    plate.medium.indices(wl).ok()
}

/// Whether the plate needs the whole trace: a biaxial or optically active crystal, which the
/// uniaxial closed form of [`plate_optics`] does not describe.
fn needs_trace(p: &CrystalPlate) -> bool {
    match p.medium {
        Medium::Biaxial(_) | Medium::Principal(_) => true,
        Medium::Formula(d) => !d.is_uniaxial_form(),
        Medium::Catalogue(_) | Medium::Custom(_) => p.chirality.is_some_and(|c| c.active),
    }
}

/// The scenario's incident beam on `plate` alone (version 1's plate: its placement left out) at
/// the scenario's wavelength and temperature, as a scenario of its own.
pub(crate) fn plate_alone(sc: &Scenario, plate: &CrystalPlate) -> Scenario {
    Scenario {
        elements: vec![Element {
            gap_mm: 0.0,
            kind: ElementKind::Crystal(CrystalPlate {
                placement: Placement::default(),
                ..*plate
            }),
            contact: Contact::Air,
        }],
        screen_mm: 0.0,
        ..sc.clone()
    }
}

/// (walk-off of the second mode, rad; separation, mm; retardance, rad) of a one-plate scenario
/// (see [`plate_alone`]), from its exact trace: the numbers its crystal report gives (the modes'
/// normal components over the thickness at temperature, the exit points of its two rays), without
/// building the report. `None` when a mode is evanescent or the document does not resolve.
pub(crate) fn traced_plate(alone: &Scenario) -> Option<(f64, f64, f64)> {
    let (stack, _) = alone.resolve().ok()?;
    let StackElement::Slab(slab) = stack.layers.first()?.element else {
        return None;
    };
    let traced = trace(&stack);
    let LayerTrace::Slab { modes, .. } = traced.layers.first()? else {
        return None;
    };
    if !(modes[0].propagating && modes[1].propagating) {
        return None;
    }
    let exit = |c: char| {
        traced
            .paths
            .iter()
            .find(|p| p.label.len() == 1 && p.label.starts_with(c))
            .map(|p| p.exit_point_mm)
    };
    let [first, second] = slab.medium.letters();
    let (a, b) = (exit(first)?, exit(second)?);
    let separation = (b[0] - a[0]).hypot(b[1] - a[1]);
    let k = modes[1].wave_vector();
    let walkoff = angle_between(&k, &modes[1].ray_direction()?);
    let retardance = stack.wavelength.k0_per_mm() * (k.z - modes[0].wave_vector().z) * slab.thickness_mm;
    Some((walkoff, separation, retardance))
}

/// [`traced_plate`] of the plate with its tilt set to `tilt_deg`, at `wl`.
fn traced_numbers(sc: &Scenario, p: &CrystalPlate, tilt_deg: f64, wl: Wavelength) -> Option<(f64, f64, f64)> {
    let at = Scenario {
        wavelength: wl,
        ..sc.clone()
    };
    traced_plate(&plate_alone(&at, &CrystalPlate { tilt_deg, ..*p }))
}

/// [`plate_numbers`] of the plate at `wl` and tilt `tilt_deg`, by the closed form where it holds
/// and by the whole trace otherwise.
fn numbers_at(sc: &Scenario, st: &Setting, tilt_deg: f64, wl: Wavelength) -> Option<(f64, f64, f64)> {
    let p = &st.plate;
    if needs_trace(p) {
        traced_numbers(sc, p, tilt_deg, wl)
    } else {
        plate_numbers(indices_at(p, wl)?, tilt_deg, p.azimuth_deg, st.qt, p.thickness_mm, wl)
    }
}

/// (walk-off rad, separation mm, retardance rad) of one plate, or None if a mode is evanescent.
fn plate_numbers(ix: Indices, tilt: f64, az: f64, qt: [f64; 2], l: f64, wl: Wavelength) -> Option<(f64, f64, f64)> {
    plate_optics(ix, axis_from_degrees(tilt, az).ok()?, l, wl, qt)
        .map(|p| (p.walkoff_rad, p.separation_mm, p.retardance_rad))
}

pub(crate) fn no_crystal(title: &str, x_label: &str, x_unit: &str, y_label: &str, y_unit: &str) -> Series {
    Series::new(
        [title, x_label, x_unit, y_label, y_unit],
        vec![],
        None,
        "no crystal in the stack".into(),
    )
}

/// Walk-off of crystal number `crystal` (counting crystals only, from 0) against its cut tilt,
/// 0–90° (0–180° when the current tilt exceeds 90° or the incidence is oblique), in 1° steps.
///
/// # Errors
/// `wavelength_nm` when the crystal's dispersion formula breaks down at the wavelength.
pub fn walkoff_vs_tilt(sc: &Scenario, crystal: usize) -> Result<Series, Error> {
    let (title, xl, xu, yl, yu) = ("Walk-off against cut tilt", "cut tilt", "°", "walk-off", "°");
    let Some(st) = setting(sc, crystal) else {
        return Ok(no_crystal(title, xl, xu, yl, yu));
    };
    if !needs_trace(&st.plate) {
        // The formula's breakdown is an error here, as the trace reports it.
        st.plate.medium.indices(sc.wavelength)?;
    }
    let oblique = st.qt[0].hypot(st.qt[1]) > 0.0;
    let top = if st.plate.tilt_deg > 90.0 || oblique { 180 } else { 90 };
    let p = &st.plate;
    let points = (0..=top)
        .filter_map(|t| {
            let t = t as f64;
            numbers_at(sc, &st, t, sc.wavelength).map(|(w, _, _)| [t, w.to_degrees()])
        })
        .collect();
    let current = numbers_at(sc, &st, p.tilt_deg, sc.wavelength).map(|(w, _, _)| [p.tilt_deg, w.to_degrees()]);
    let note = format!("at {} nm, axis azimuth {}°", sc.wavelength.nm(), p.azimuth_deg);
    Ok(Series::new([title, xl, xu, yl, yu], points, current, note))
}

/// The separation (mm) and retardance (waves) series of crystal number `crystal` against
/// wavelength over its material's range ([`CUSTOM_RANGE_NM`] for custom indices),
/// [`WAVELENGTH_POINTS`] samples, from one sweep: both read the same plate at each wavelength.
#[inline(never)] // one copy in the page's WebAssembly, not one per caller
pub fn wavelength_sweeps(sc: &Scenario, crystal: usize) -> [Series; 2] {
    let words = [
        ["Separation against wavelength", "separation", "mm"],
        ["Retardance against wavelength", "retardance", "waves"],
    ];
    let Some(st) = setting(sc, crystal) else {
        let none = |[title, y_label, y_unit]: [&str; 3]| no_crystal(title, "wavelength", "nm", y_label, y_unit);
        return [none(words[0]), none(words[1])];
    };
    let p = st.plate;
    let (range, note) = match p.medium {
        Medium::Catalogue(m) => (m.range_nm, format!("{} over its formula's range", m.key)),
        Medium::Biaxial(m) => (m.range_nm, format!("{} over its formula's range", m.key)),
        Medium::Formula(d) => (d.range_nm, "custom dispersion over its formula's range".to_string()),
        Medium::Custom(_) | Medium::Principal(_) => (CUSTOM_RANGE_NM, "custom indices: no dispersion".to_string()),
    };
    // (separation, retardance in waves) of the plate at `nm`.
    let value = |nm: f64| -> Option<[f64; 2]> {
        let wl = Wavelength::from_nm(nm).ok()?;
        numbers_at(sc, &st, p.tilt_deg, wl).map(|(_, s, r)| [s, r / TAU])
    };
    let x = ["wavelength", "nm"];
    sweep_pair(x, words, range, WAVELENGTH_POINTS, sc.wavelength.nm(), &value, note)
}

/// Two curves from one sweep of x over `lo..=hi` in `n` samples: `value(x)` gives both y values
/// (a sample where it gives none is left out of both), `now` is the scenario's own x, and
/// `x` and `words` name x (`[label, unit]`) and each curve (`[title, y label, y unit]`).
pub(crate) fn sweep_pair(
    x: [&str; 2],
    words: [[&str; 3]; 2],
    (lo, hi): (f64, f64),
    n: usize,
    now: f64,
    value: &dyn Fn(f64) -> Option<[f64; 2]>,
    note: String,
) -> [Series; 2] {
    let mut points = [Vec::with_capacity(n), Vec::with_capacity(n)];
    for i in 0..n {
        let at = lo + (hi - lo) * i as f64 / (n - 1) as f64;
        if let Some(v) = value(at) {
            points[0].push([at, v[0]]);
            points[1].push([at, v[1]]);
        }
    }
    let current = value(now);
    let [first, second] = points;
    let curve = |k: usize, points| {
        let [title, y_label, y_unit] = words[k];
        Series::new(
            [title, x[0], x[1], y_label, y_unit],
            points,
            current.map(|v| [now, v[k]]),
            note.clone(),
        )
    };
    [curve(0, first), curve(1, second)]
}

/// o–e separation of crystal number `crystal` against wavelength ([`wavelength_sweeps`]).
pub fn separation_vs_wavelength(sc: &Scenario, crystal: usize) -> Series {
    let [separation, _] = wavelength_sweeps(sc, crystal);
    separation
}

/// Retardance (waves) of crystal number `crystal` against wavelength ([`wavelength_sweeps`]).
pub fn retardance_vs_wavelength(sc: &Scenario, crystal: usize) -> Series {
    let [_, retardance] = wavelength_sweeps(sc, crystal);
    retardance
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::{ElementReport, trace_scenario as trace};

    /// The three curves of the first crystal of `doc` pass through the values its trace reports
    /// (the report is the independent path: modes, exit points, the report's own retardance);
    /// returns the walk-off curve.
    fn curves_through_the_traced_point(doc: &str) -> Series {
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let ElementReport::Crystal {
            separation_mm,
            retardance_waves,
            modes,
            ..
        } = &r.elements[0]
        else {
            panic!()
        };
        let w = walkoff_vs_tilt(&sc, 0).unwrap();
        assert!((w.current.unwrap()[1] - modes.second.walkoff_deg.unwrap()).abs() < 1e-9);
        assert!(w.points.len() > 90);
        let s = separation_vs_wavelength(&sc, 0);
        assert!((s.current.unwrap()[1] - separation_mm.unwrap()).abs() < 1e-12);
        assert_eq!(s.points.len(), WAVELENGTH_POINTS);
        let g = retardance_vs_wavelength(&sc, 0);
        assert!((g.current.unwrap()[1] - retardance_waves.unwrap()).abs() < 1e-9);
        w
    }

    #[test]
    fn sweeps_of_biaxial_and_active_crystals_pass_through_the_traced_point() {
        curves_through_the_traced_point(include_str!("../../examples/ktp-plate.json"));
        curves_through_the_traced_point(include_str!("../../examples/quartz-rotator.json"));
    }

    #[test]
    fn sweeps_pass_through_the_traced_point() {
        let w = curves_through_the_traced_point(include_str!("../../examples/demo.json"));
        let on_curve = w.points.iter().find(|p| p[0] == 45.0).unwrap();
        assert!((on_curve[1] - w.current.unwrap()[1]).abs() < 1e-12);
        // Calcite: walk-off is largest near the 42° cut and zero at 0° and 90°.
        let peak = w
            .points
            .iter()
            .cloned()
            .fold([0.0, 0.0], |a, p| if p[1] > a[1] { p } else { a });
        assert!((peak[0] - 42.0).abs() <= 1.0, "{peak:?}");
        assert!(w.points[0][1].abs() < 1e-9 && w.points[90][1].abs() < 1e-9);
    }

    #[test]
    fn series_read_back_what_they_write() {
        let sc = Scenario::from_json_str(include_str!("../../examples/demo.json")).unwrap();
        let s = separation_vs_wavelength(&sc, 0);
        assert_eq!(Series::from_json(&serde_json::to_value(&s).unwrap()).unwrap(), s);
        let mut two = s.clone();
        two.markers = vec![[500.0, 1.0], [600.0, 1.1]];
        assert_eq!(Series::from_json(&serde_json::to_value(&two).unwrap()).unwrap(), two);
        let bad = serde_json::json!({"markers": [[1, 2], [3, "x"]]});
        assert_eq!(Series::from_json(&bad).unwrap_err().field, "series.markers[1][1]");
        let bad = serde_json::json!({"points": [[1, 2], [3]]});
        assert_eq!(Series::from_json(&bad).unwrap_err().field, "series.points[1]");
    }

    #[test]
    fn a_stack_without_crystals_gives_empty_series() {
        let sc = Scenario::from_json_str(r#"{"elements": [{"kind": "rotator", "angle_deg": 5}]}"#).unwrap();
        assert!(walkoff_vs_tilt(&sc, 0).unwrap().points.is_empty());
        assert_eq!(separation_vs_wavelength(&sc, 0).note, "no crystal in the stack");
    }
}
