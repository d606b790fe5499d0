//! Plot series of a whole set-up's split angle: how far apart in angle its output beams leave,
//! against wavelength and against the angle of incidence.
//!
//! The split angle of a traced set-up is the largest angle between the directions of two output
//! rays that carry power (at least [`NO_POWER`] of the input); 0 when fewer than two do, and 0 for
//! plane-parallel plates, whose rays all leave along the incident beam. The curves follow the
//! beams of the set-up as traced: the rays that carry power in its exact trace, each followed
//! through the set-up with one parameter changed (the wavelength, with every crystal's
//! dispersion; or the polar angle of incidence in the plane of the scenario's incidence azimuth,
//! from −[`INCIDENCE_SPAN_DEG`] to +[`INCIDENCE_SPAN_DEG`]) by its wave-vector chain
//! ([`crate::optics::chain`]), which gives exactly the direction a whole trace would. So the
//! curve passes through the traced set-up; where fewer than two of its beams get through (one is
//! totally reflected) or the set-up cannot be resolved (a formula breaking down) the curve has a
//! gap. A stack of plane-parallel plates splits nothing at any wavelength or incidence: its curve
//! is drawn flat without tracing.

use crate::contract::scenario::{ElementKind, Medium, Scenario};
use crate::numfmt::NO_POWER;
use crate::optics::chain::ChainPlan;
use crate::optics::geometry::direction;
use crate::optics::spots::power_of;
use crate::optics::trace::trace;
use crate::optics::uniaxial::angle_between;
use crate::optics::wavelength::Wavelength;
use crate::view::series::{CUSTOM_RANGE_NM, Series, WAVELENGTH_POINTS};
use nalgebra::Vector3;

/// Half-width of the incidence sweep, degrees.
pub const INCIDENCE_SPAN_DEG: f64 = 15.0;
/// Samples of a sweep of a stack with more than four crystals.
pub const SPLIT_POINTS_MANY_CRYSTALS: usize = 31;

/// The beams of a scenario: the labels of the rays that carry power in its exact trace.
fn beams(sc: &Scenario) -> Vec<String> {
    let Ok((stack, _)) = sc.resolve() else {
        return Vec::new();
    };
    trace(&stack)
        .paths
        .into_iter()
        .filter(|p| power_of(&p.matrix, &stack.input.stokes) >= NO_POWER)
        .map(|p| p.label)
        .collect()
}

/// The split of `beams` through a scenario, each followed by its wave-vector chain; `None` when
/// fewer than two get through or the scenario cannot be resolved.
fn split_of(sc: &Scenario, beams: &[String]) -> Option<f64> {
    split_at(sc, sc.wavelength, beams)
}

/// [`split_of`] with the scenario at another `wavelength` (resolved without a copy).
fn split_at(sc: &Scenario, wavelength: Wavelength, beams: &[String]) -> Option<f64> {
    let (stack, _) = sc.resolve_at(wavelength, sc.temperature_c).ok()?;
    let plans: Vec<ChainPlan> = beams.iter().filter_map(|l| ChainPlan::new(&stack, l)).collect();
    split_along(&plans, stack.input.direction, beams.len())
}

/// The split of the beams planned in `plans` (of `beams` asked for) when the stack is lit along
/// `incident`: a plan is the chain of its beam at any incidence
/// ([`ChainPlan::follow`]), so one resolved stack serves a whole incidence sweep.
fn split_along(plans: &[ChainPlan], incident: Vector3<f64>, beams: usize) -> Option<f64> {
    let dirs: Vec<Vector3<f64>> = plans
        .iter()
        .filter_map(|p| p.follow(incident))
        .map(|e| e.direction)
        .collect();
    (dirs.len() >= 2 || beams < 2).then(|| widest_deg(&dirs))
}

/// The curve's note: which beams it follows.
fn followed(beams: &[String]) -> String {
    match beams.len() {
        0 | 1 => "fewer than two beams carry power".into(),
        _ => format!("beams {} followed exactly", beams.join(", ")),
    }
}

/// The largest angle between two of `dirs`, degrees (0 for fewer than two).
fn widest_deg(dirs: &[Vector3<f64>]) -> f64 {
    let mut best = 0.0f64;
    for (i, a) in dirs.iter().enumerate() {
        for b in &dirs[i + 1..] {
            best = best.max(angle_between(a, b));
        }
    }
    best.to_degrees()
}

/// Whether every crystal is version 1's plate: all rays then leave along the incident beam at
/// any wavelength and incidence, and the split is 0 without a trace.
fn plane_parallel(sc: &Scenario) -> bool {
    sc.elements.iter().all(|e| match e.kind {
        ElementKind::Crystal(c) => c.placement.is_default(),
        _ => true,
    })
}

/// Samples of a sweep: fewer for stacks of many crystals, whose every trace costs more.
fn samples(sc: &Scenario) -> usize {
    let crystals = sc
        .elements
        .iter()
        .filter(|e| matches!(e.kind, ElementKind::Crystal(_)))
        .count();
    if crystals > 4 {
        SPLIT_POINTS_MANY_CRYSTALS
    } else {
        WAVELENGTH_POINTS
    }
}

/// The flat series of a plane-parallel stack.
fn no_split(title: &str, x_label: &str, x_unit: &str, (lo, hi): (f64, f64), now: f64) -> Series {
    series(
        title,
        x_label,
        x_unit,
        vec![[lo, 0.0], [hi, 0.0]],
        Some([now, 0.0]),
        "plane-parallel faces: every ray leaves along the beam".into(),
    )
}

/// The wavelengths every crystal's formula covers (the custom range when none has a formula).
fn common_range(sc: &Scenario) -> (f64, f64) {
    let mut range: Option<(f64, f64)> = None;
    for el in &sc.elements {
        let catalogued = match el.kind {
            ElementKind::Crystal(c) => match c.medium {
                Medium::Catalogue(m) => Some(m.range_nm),
                Medium::Biaxial(m) => Some(m.range_nm),
                Medium::Formula(d) => Some(d.range_nm),
                Medium::Custom(_) | Medium::Principal(_) => None,
            },
            _ => None,
        };
        if let Some((lo, hi)) = catalogued {
            range = Some(range.map_or((lo, hi), |(a, b)| (a.max(lo), b.min(hi))));
        }
    }
    match range {
        Some((lo, hi)) if lo < hi => (lo, hi),
        _ => CUSTOM_RANGE_NM,
    }
}

fn series(
    title: &str,
    x_label: &str,
    x_unit: &str,
    points: Vec<[f64; 2]>,
    current: Option<[f64; 2]>,
    note: String,
) -> Series {
    Series::new([title, x_label, x_unit, "split angle", "°"], points, current, note)
}

/// The split angle against wavelength over the range every crystal's formula covers.
pub fn split_vs_wavelength(sc: &Scenario) -> Series {
    let (lo, hi) = common_range(sc);
    if plane_parallel(sc) {
        return no_split(
            "Split angle against wavelength",
            "wavelength",
            "nm",
            (lo, hi),
            sc.wavelength.nm(),
        );
    }
    let beams = beams(sc);
    let at = |nm: f64| -> Option<f64> { split_at(sc, Wavelength::from_nm(nm).ok()?, &beams) };
    let n = samples(sc);
    let points = (0..n)
        .filter_map(|i| {
            let nm = lo + (hi - lo) * i as f64 / (n - 1) as f64;
            at(nm).map(|v| [nm, v])
        })
        .collect();
    let now = sc.wavelength.nm();
    series(
        "Split angle against wavelength",
        "wavelength",
        "nm",
        points,
        split_of(sc, &beams).map(|v| [now, v]),
        followed(&beams),
    )
}

/// The split angle against the polar angle of incidence, in the plane of the incidence azimuth.
pub fn split_vs_incidence(sc: &Scenario) -> Series {
    if plane_parallel(sc) {
        let span = (-INCIDENCE_SPAN_DEG, INCIDENCE_SPAN_DEG);
        return no_split(
            "Split angle against incidence",
            "incidence",
            "°",
            span,
            sc.beam.polar_deg,
        );
    }
    let beams = beams(sc);
    // Only the incident direction changes along the sweep: one stack, one plan per beam.
    let resolved = sc.resolve().ok();
    let plans: Vec<ChainPlan> = resolved.as_ref().map_or_else(Vec::new, |(stack, _)| {
        beams.iter().filter_map(|l| ChainPlan::new(stack, l)).collect()
    });
    let azimuth = sc.beam.azimuth_deg.to_radians();
    let at = |polar: f64| -> Option<f64> {
        resolved.as_ref()?;
        split_along(&plans, direction(polar.to_radians(), azimuth), beams.len())
    };
    let n = samples(sc);
    let points = (0..n)
        .filter_map(|i| {
            let p = -INCIDENCE_SPAN_DEG + 2.0 * INCIDENCE_SPAN_DEG * i as f64 / (n - 1) as f64;
            at(p).map(|v| [p, v])
        })
        .collect();
    let now = sc.beam.polar_deg;
    series(
        "Split angle against incidence",
        "incidence",
        "°",
        points,
        split_of(sc, &beams).map(|v| [now, v]),
        format!("{}, in the plane at azimuth {}°", followed(&beams), sc.beam.azimuth_deg),
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::{TraceResult, trace_scenario};

    /// The largest angle between two rays of a result document that carry power, degrees.
    fn split_angle_deg(result: &TraceResult) -> f64 {
        let dirs: Vec<Vector3<f64>> = result
            .rays
            .iter()
            .filter(|r| r.power >= NO_POWER)
            .map(|r| Vector3::from(r.direction))
            .collect();
        widest_deg(&dirs)
    }

    /// A two-wedge splitter: the split is near the small-angle rule 2·arcsin((n_e − n_o)·tan α)
    /// (common textbook result, from memory) at normal incidence, the curve passes through the
    /// traced point, and a plane-parallel plate splits nothing.
    #[test]
    fn the_split_of_a_wedge_pair_follows_the_small_angle_rule() {
        let wedge = |front: f64, back: f64, az: f64, contact: &str| {
            format!(
                r#"{{"kind": "crystal", "material": "calcite", "thickness_mm": 4, "axis": {{"tilt_deg": 90, "azimuth_deg": {az}}}, "aperture_mm": 6, "faces": {{"front": {{"tilt_deg": {front}}}, "back": {{"tilt_deg": {back}}}}}{contact}}}"#
            )
        };
        let alpha = 5.0f64;
        let doc = format!(
            r#"{{"version": 2, "elements": [{}, {}]}}"#,
            wedge(0.0, alpha, 90.0, ""),
            wedge(alpha, 0.0, 0.0, r#", "contact": "optical""#)
        );
        let sc = Scenario::from_json_str(&doc).unwrap();
        let r = trace_scenario(&sc).unwrap();
        let split = split_angle_deg(&r);
        let ix = crate::optics::material::find("calcite")
            .unwrap()
            .indices(sc.wavelength)
            .unwrap()
            .indices;
        let rule = (2.0 * ((ix.ne - ix.no).abs() * alpha.to_radians().tan()).asin()).to_degrees();
        assert!((split - rule).abs() < 0.02 * rule, "{split} against {rule}");
        let s = split_vs_wavelength(&sc);
        // The curve's point follows the beams by their wave-vector chains: the same to rounding.
        assert!((s.current.unwrap()[1] - split).abs() < 1e-12);
        assert!(s.points.len() > 100);
        let plate = Scenario::from_json_str(
            r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 2, "axis": {"tilt_deg": 45}}]}"#,
        )
        .unwrap();
        assert!(split_vs_incidence(&plate).points.iter().all(|p| p[1] < 1e-12));
    }

    /// The prism presets the curves are checked on.
    const PRISMS: [&str; 4] = [
        include_str!("../../examples/crossed-calcite-splitter.json"),
        include_str!("../../examples/straight-through-prism.json"),
        include_str!("../../examples/quartz-wedge-splitter.json"),
        include_str!("../../examples/air-gap-calcite-polarizer.json"),
    ];

    /// One resolved stack and one plan per beam give, number for number, what resolving a copy
    /// of the scenario at each incidence gives.
    #[test]
    fn the_incidence_curve_is_the_scenario_resolved_at_each_incidence() {
        for doc in PRISMS {
            let sc = Scenario::from_json_str(doc).unwrap();
            let beams = beams(&sc);
            let curve = split_vs_incidence(&sc);
            let n = samples(&sc);
            let expected: Vec<[f64; 2]> = (0..n)
                .filter_map(|i| {
                    let p = -INCIDENCE_SPAN_DEG + 2.0 * INCIDENCE_SPAN_DEG * i as f64 / (n - 1) as f64;
                    let mut at = sc.clone();
                    at.beam.polar_deg = p;
                    split_of(&at, &beams).map(|v| [p, v])
                })
                .collect();
            assert_eq!(curve.points, expected);
        }
    }

    /// Independent path through the code: on the splitter presets, every point of both curves
    /// equals the split of the whole trace (result document) of the changed scenario, to 1e-10°.
    #[test]
    fn the_curves_equal_whole_traces_point_by_point() {
        for doc in PRISMS {
            let sc = Scenario::from_json_str(doc).unwrap();
            let by_wavelength = split_vs_wavelength(&sc);
            let by_incidence = split_vs_incidence(&sc);
            assert!(by_wavelength.points.len() > 100 && by_incidence.points.len() > 100);
            for (series, set) in [
                (
                    &by_wavelength,
                    (|s: &mut Scenario, x: f64| s.wavelength = Wavelength::from_nm(x).unwrap())
                        as fn(&mut Scenario, f64),
                ),
                (&by_incidence, |s: &mut Scenario, x: f64| s.beam.polar_deg = x),
            ] {
                for p in series.points.iter().step_by(7) {
                    let mut changed = sc.clone();
                    set(&mut changed, p[0]);
                    let whole = split_angle_deg(&trace_scenario(&changed).unwrap());
                    assert!(
                        (whole - p[1]).abs() < 1e-10,
                        "{}: at {}: {whole} vs {}",
                        series.title,
                        p[0],
                        p[1]
                    );
                }
            }
        }
    }
}
