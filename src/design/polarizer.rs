//! Polarizer by total internal reflection: two prisms of one uniaxial crystal across a vanishing
//! gap of air or cement, tilted so that one mode is totally reflected at the gap and the other
//! passes, over a field of view centred on the normal.
//!
//! Geometry (element frame, CONVENTIONS.md version 2): the first prism's front face is across z,
//! its back face (the gap) tilted by the prism angle θ_g toward +x; the second prism's front face
//! is the gap plane, its back face across z. Both optic axes lie along y, in the faces and in the
//! gap, perpendicular to the plane of the gap's tilt (x–z). For incidence in that plane the two
//! modes are then polarized in the plane (ordinary, index n_o) and along y (extraordinary, index
//! n_e exactly, since the wave vector stays perpendicular to the axis), and neither walks off.
//!
//! Which mode is reflected: total internal reflection at the gap can only reflect the mode of
//! the higher index while the lower passes. For a negative crystal (calcite, n_o > n_e) that is
//! the ordinary mode, as in the classic air-spaced calcite polarizer; for a positive crystal
//! (quartz, n_e > n_o) it is the extraordinary mode, which this design reflects. The gap's index
//! n_g must be below the lower index.
//!
//! Field of view (closed form, Snell at the entrance then the critical angles at the gap). A ray
//! entering at φ (in the x–z plane, positive toward +x, from an outside index n₀) travels at ψ
//! with n₀ sin φ = n sin ψ and meets the gap at θ_g − ψ. The reflected mode (index n_r) stays
//! totally reflected while θ_g − ψ_r ≥ θ_r = asin(n_g/n_r): up to φ₊ with
//! n₀ sin φ₊ = n_r sin(θ_g − θ_r). The passed mode (n_p) gets through while θ_g − ψ_p < θ_p =
//! asin(n_g/n_p): down to φ₋ with n₀ sin φ₋ = n_p sin(θ_g − θ_p) (negative). The prism angle that
//! centres the field (φ₋ = −φ₊) solves n_r sin(θ_g − θ_r) + n_p sin(θ_g − θ_p) = 0, which has one
//! root between θ_r and θ_p; it is found by bisection, and the edges the answer reports are
//! found again on the exact trace of the designed pair ([`crate::optics::trace`]).
//!
//! In a negative crystal the passed e-mode is polarized along the gap (s), so an uncoated gap
//! costs it twice the s reflection near its critical angle; in a positive crystal the passed
//! o-mode is p and loses little. That is the price of an axis along y, which keeps both modes'
//! indices exact at every incidence in the plane of the tilt.
//!
//! Transmission and extinction: with uncoated faces (Fresnel at the entrance, both sides of the
//! gap and the exit), for light polarized along each mode, for the ray through the axis point
//! with the apertures set aside, at [`EDGE_STEP_DEG`] inside and
//! outside each edge and over a curve; inside the field the reflected mode's transmission is
//! exactly zero (the reflection is total), so the extinction ratio (leaked ÷ passed) is zero
//! there and is reported where it is not: beyond the upper edge.
//!
//! Temperature: the pair works at the request's `temperature_c` T, where its indices and every
//! trace are taken ([`crate::design::thermal`]); the prism angle is as made (angles do not change
//! with a uniform expansion along z of a plate of parallel faces; the gap's tilt is taken as
//! made) and the cement's index is taken to hold at every temperature. The edges' change per
//! kelvin is a central difference about T of the closed form above at the indices of T ± h
//! (`lower_edge_deg`, `upper_edge_deg`), which the trace's edges follow (tested).

use crate::contract::geometry::{Angles, Contact, Placement};
use crate::contract::request::PolarizerRequest;
use crate::contract::scenario::{ElementKind, Polarization};
use crate::design::part::{Part, min_edge_mm, path_power, placed_crystal};
use crate::design::thermal::{Temperature, growth, indices_at};
use crate::error::Error;
use crate::optics::interface::Losses;
use crate::optics::traced::RejectReason;
use crate::precision::{BISECTION_STEPS, DESIGN_SCAN_INTERVALS, EDGE_STEP_DEG};
use serde::Serialize;

/// Largest incidence (degrees) scanned for an edge of the field of view.
const MAX_SCAN_DEG: f64 = 80.0;

/// Transmission of the two modes at one incidence (uncoated faces, input polarized along each).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Transmission {
    /// Incidence in the plane of the gap's tilt, degrees.
    pub incidence_deg: f64,
    /// Transmission of the passed mode.
    pub passed: f64,
    /// Transmission of the mode meant to be reflected.
    pub leaked: f64,
    /// leaked ÷ passed; absent when nothing passes.
    pub extinction: Option<f64>,
}

/// One edge of the field of view.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Edge {
    /// The edge's incidence (traced), degrees.
    pub incidence_deg: f64,
    /// The closed form's edge, degrees.
    pub closed_form_deg: f64,
    /// Just inside the field.
    pub inside: Transmission,
    /// Just outside it.
    pub outside: Transmission,
}

/// Transmission against incidence.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TransmissionCurve {
    /// Incidences, degrees.
    pub incidence_deg: Vec<f64>,
    /// Passed mode's transmission.
    pub passed: Vec<f64>,
    /// Reflected mode's leak.
    pub leaked: Vec<f64>,
}

/// The designed polarizer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PolarizerDesign {
    /// Prism angle: tilt of the gap from the entrance face, degrees.
    pub prism_angle_deg: f64,
    /// The mode totally reflected at the gap: "o" or "e".
    pub reflected_mode: String,
    /// The mode passed: "e" or "o".
    pub passed_mode: String,
    /// Index of the gap (1 for air).
    pub gap_index: f64,
    /// Critical angles at the gap, degrees: of the reflected mode, of the passed mode.
    pub critical_angles_deg: [f64; 2],
    /// Half-angle field of view on each side, degrees: below (toward −x) and above the normal.
    pub half_field_deg: [f64; 2],
    /// The lower edge of the field (negative incidence).
    pub lower_edge: Edge,
    /// The upper edge.
    pub upper_edge: Edge,
    /// Transmission at normal incidence.
    pub normal: Transmission,
    /// Transmission over ±1.5 fields.
    pub curve: TransmissionCurve,
    /// Each prism's thickness at its axis point, mm.
    pub thickness_mm: [f64; 2],
    /// Those thicknesses at the design temperature, mm (grown by α⊥: the axes lie in the faces).
    pub thickness_at_temperature_mm: [f64; 2],
    /// The field's edges' change per kelvin about the design temperature (`lower_edge_deg`,
    /// `upper_edge_deg`).
    pub temperature: Temperature,
    /// Thickness left at each prism's thin edge, mm.
    pub edge_thickness_mm: f64,
    /// Clear aperture, mm.
    pub clear_aperture_mm: f64,
    /// The designed pair, ready to load.
    pub scenario: Part,
}

impl PolarizerRequest {
    fn part(&self, theta_deg: f64, t: f64) -> Part {
        let aperture_mm = Some(self.aperture_mm);
        let gap = Angles {
            tilt_deg: theta_deg,
            azimuth_deg: 0.0,
        };
        let first = Placement {
            back: gap,
            aperture_mm,
            ..Placement::default()
        };
        let second = Placement {
            front: gap,
            aperture_mm,
            ..Placement::default()
        };
        let contact = self.cement_index.map_or(Contact::Air, Contact::Cement);
        Part::new(
            self.wavelength,
            None,
            vec![
                placed_crystal(self.medium, t, 90.0, 90.0, 1.0, first, Contact::Air),
                placed_crystal(self.medium, t, 90.0, 90.0, 0.0, second, contact),
            ],
        )
        .at_temperature(self.temperature_c)
    }
}

/// The part lit at `incidence_deg` in the x–z plane, unpolarized, with `losses`: the forward
/// power of paths starting with `reflected` and with the other letter, each doubled (the input
/// power along one mode).
fn transmission(part: &Part, incidence_deg: f64, reflected: char, losses: Losses) -> Option<Transmission> {
    let mut p = unlimited(part);
    p.scenario.beam.polar_deg = incidence_deg;
    p.scenario.beam.polarization = Polarization::Unpolarized;
    p.scenario.losses = losses;
    let (stack, traced) = p.traced().ok()?;
    let (mut leaked, mut passed) = (0.0, 0.0);
    for path in &traced.paths {
        let power = 2.0 * path_power(&stack, path);
        if path.label.starts_with(reflected) {
            leaked += power;
        } else {
            passed += power;
        }
    }
    Some(Transmission {
        incidence_deg,
        passed,
        leaked,
        extinction: (passed > 0.0).then(|| leaked / passed),
    })
}

/// The part without its apertures: the field of view is the gap's, for the ray through the axis
/// point, whatever the prisms' size (a ray entering far off-axis at a steep gap leaves through a
/// side before the gap; that is the aperture's business, not the polarizer's).
fn unlimited(part: &Part) -> Part {
    let mut p = part.clone();
    for e in &mut p.scenario.elements {
        if let ElementKind::Crystal(c) = &mut e.kind {
            c.placement.aperture_mm = None;
        }
    }
    p
}

/// Whether a ray whose label starts with `letter` is totally reflected at `part`'s gap when lit
/// at `incidence_deg`.
fn reflects(part: &Part, incidence_deg: f64, letter: char) -> bool {
    let mut p = part.clone();
    p.scenario.beam.polar_deg = incidence_deg;
    p.traced().is_ok_and(|(_, t)| {
        t.rejected
            .iter()
            .any(|r| r.reason == RejectReason::TotalInternalReflection && r.label.starts_with(letter))
    })
}

/// The first incidence from 0 toward `sign` at which `holds` stops holding, bisected.
fn edge(sign: f64, holds: &dyn Fn(f64) -> bool) -> Option<f64> {
    let mut lo = 0.0;
    let n = DESIGN_SCAN_INTERVALS;
    for k in 1..=n {
        let x = sign * MAX_SCAN_DEG * k as f64 / n as f64;
        if !holds(x) {
            let mut hi = x;
            for _ in 0..BISECTION_STEPS {
                let mid = 0.5 * (lo + hi);
                if holds(mid) { lo = mid } else { hi = mid }
            }
            return Some(0.5 * (lo + hi));
        }
        lo = x;
    }
    None
}

/// Designs a polarizer.
///
/// # Errors
/// `material` for a crystal without birefringence; `cement_index` at or above the lower index
/// (nothing would be reflected while the other mode passes).
pub fn design(req: &PolarizerRequest) -> Result<PolarizerDesign, Error> {
    let ix = indices_at(&req.medium, req.wavelength, req.temperature_c)?;
    if (ix.ne - ix.no).abs() < crate::precision::NO_BIREFRINGENCE {
        return Err(Error::new(
            "material",
            "this crystal is not birefringent: both modes would meet the gap alike",
        ));
    }
    let negative = ix.no > ix.ne;
    let (n_r, n_p) = if negative { (ix.no, ix.ne) } else { (ix.ne, ix.no) };
    let (reflected, passed) = if negative { ('o', 'e') } else { ('e', 'o') };
    let ng = req.gap_index();
    if ng >= n_p {
        return Err(Error::new(
            "cement_index",
            format!(
                "must be below the crystal's lower index {} for the gap to reflect one mode and pass the other",
                crate::numfmt::sig(n_p, 6)
            ),
        ));
    }
    let n0 = 1.0;
    let (th_r, th_p) = ((ng / n_r).asin(), (ng / n_p).asin());
    let f = |th: f64| n_r * (th - th_r).sin() + n_p * (th - th_p).sin();
    let (mut lo, mut hi) = (th_r, th_p);
    for _ in 0..BISECTION_STEPS {
        let mid = 0.5 * (lo + hi);
        if f(mid) < 0.0 { lo = mid } else { hi = mid }
    }
    let theta = 0.5 * (lo + hi);
    let upper_closed = (n_r * (theta - th_r).sin() / n0).asin().to_degrees();
    let lower_closed = (n_p * (theta - th_p).sin() / n0).asin().to_degrees();
    let theta_deg = theta.to_degrees();
    let max_tilt = crate::contract::geometry::MAX_FACE_TILT_DEG;
    if theta_deg > max_tilt {
        return Err(Error::new(
            "cement_index",
            format!(
                "puts the gap at {}° from the entrance face, beyond the {max_tilt}° a face may tilt: choose a cement of lower index",
                crate::numfmt::sig(theta_deg, 4)
            ),
        ));
    }
    // The closed-form edges (lower, upper) of the pair as made, at the indices of `tc` °C.
    let closed_edges = |tc: f64| -> Option<[f64; 2]> {
        let ix = indices_at(&req.medium, req.wavelength, tc).ok()?;
        let (n_r, n_p) = if negative { (ix.no, ix.ne) } else { (ix.ne, ix.no) };
        let side = |n: f64| (n * (theta - (ng / n).asin()).sin() / n0).asin().to_degrees();
        Some([side(n_p), side(n_r)])
    };
    let temperature = Temperature::of(
        req.temperature_c,
        vec![
            ("lower_edge_deg", Box::new(|tc| closed_edges(tc).map(|e| e[0]))),
            ("upper_edge_deg", Box::new(|tc| closed_edges(tc).map(|e| e[1]))),
        ],
    );
    let t = min_edge_mm(req.aperture_mm) + 0.5 * req.aperture_mm * theta.tan();
    let part = req.part(theta_deg, t);
    let open = unlimited(&part);
    let blocks = |x: f64| reflects(&open, x, reflected);
    let passes = |x: f64| !reflects(&open, x, passed);
    let fail = || Error::new("material", "the designed pair has no field of view");
    let upper = edge(1.0, &blocks).ok_or_else(fail)?;
    let lower = edge(-1.0, &passes).ok_or_else(fail)?;
    let bare = |x: f64| transmission(&part, x, reflected, Losses::Uncoated).ok_or_else(fail);
    let edge_at = |x: f64, closed: f64, sign: f64| -> Result<Edge, Error> {
        Ok(Edge {
            incidence_deg: x,
            closed_form_deg: closed,
            inside: bare(x - sign * EDGE_STEP_DEG)?,
            outside: bare(x + sign * EDGE_STEP_DEG)?,
        })
    };
    let span = 1.5 * upper.max(-lower);
    let n = DESIGN_SCAN_INTERVALS;
    let mut curve = TransmissionCurve {
        incidence_deg: vec![],
        passed: vec![],
        leaked: vec![],
    };
    for k in 0..=n {
        let x = -span + 2.0 * span * k as f64 / n as f64;
        if let Ok(tr) = bare(x) {
            curve.incidence_deg.push(x);
            curve.passed.push(tr.passed);
            curve.leaked.push(tr.leaked);
        }
    }
    Ok(PolarizerDesign {
        prism_angle_deg: theta_deg,
        reflected_mode: reflected.to_string(),
        passed_mode: passed.to_string(),
        gap_index: ng,
        critical_angles_deg: [th_r.to_degrees(), th_p.to_degrees()],
        half_field_deg: [-lower, upper],
        lower_edge: edge_at(lower, lower_closed, -1.0)?,
        upper_edge: edge_at(upper, upper_closed, 1.0)?,
        normal: bare(0.0)?,
        curve,
        thickness_mm: [t, t],
        thickness_at_temperature_mm: [t * growth(&req.medium, 90.0, 90.0, req.temperature_c); 2],
        temperature,
        edge_thickness_mm: min_edge_mm(req.aperture_mm),
        clear_aperture_mm: req.aperture_mm,
        scenario: part,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::scenario::Scenario;
    use crate::precision::assert_within;

    fn request(doc: &str) -> PolarizerRequest {
        crate::contract::request::read_ok(doc, PolarizerRequest::from_json)
    }

    #[test]
    fn the_traced_field_matches_the_critical_angles() {
        for doc in [
            r#"{"material": "calcite"}"#,
            r#"{"material": "calcite", "wavelength_nm": 1064, "cement_index": 1.47}"#,
            r#"{"material": "yvo4", "wavelength_nm": 1064}"#,
            r#"{"material": "alpha-bbo", "wavelength_nm": 355}"#,
        ] {
            let r = request(doc);
            let d = design(&r).unwrap();
            let ix = r.medium.indices(r.wavelength).unwrap();
            // Independently: the critical angles asin(n_g/n) and Snell at the entrance.
            let ng = r.gap_index();
            let (n_r, n_p) = if ix.no > ix.ne { (ix.no, ix.ne) } else { (ix.ne, ix.no) };
            let th = d.prism_angle_deg.to_radians();
            let up = (n_r * (th - (ng / n_r).asin()).sin()).asin().to_degrees();
            let down = (n_p * (th - (ng / n_p).asin()).sin()).asin().to_degrees();
            // Within 1e-5°: the trace's verdict on total reflection is not monotonic within about
            // 2e-6° of the critical angle (a ray through a vanishing film at near-grazing angle
            // is rejected at +1e-6° and passes at +1e-7° and +2e-6°), so the bisection of the
            // traced edge can stop anywhere in that band.
            assert_within(
                d.upper_edge.incidence_deg,
                up,
                1e-5,
                "critical angle of the reflected mode + Snell",
            );
            assert_within(
                d.lower_edge.incidence_deg,
                down,
                1e-5,
                "critical angle of the passed mode + Snell",
            );
            // Centred.
            assert_within(d.half_field_deg[0], d.half_field_deg[1], 2e-5, "a centred field");
            assert_within(
                d.upper_edge.closed_form_deg,
                -d.lower_edge.closed_form_deg,
                1e-12,
                "centred closed form",
            );
            // Inside the field nothing leaks; just beyond the upper edge the reflected mode leaks,
            // just beyond the lower edge the passed mode is reflected too.
            assert_eq!(d.upper_edge.inside.leaked, 0.0, "{doc}");
            assert!(d.upper_edge.outside.leaked > 0.0, "{doc}");
            assert_eq!(d.lower_edge.outside.passed, 0.0, "{doc}");
            // Uncoated, the passed mode loses at the entrance, at both sides of the gap (near its
            // critical angle: Fresnel s for the e-mode along y, p for the o-mode in the plane of
            // incidence) and at the exit.
            let bare = |n: f64| 1.0 - ((n - 1.0) / (n + 1.0)).powi(2);
            let (i, n_pass) = (th, n_p);
            let t = (n_pass * i.sin() / ng).asin();
            let r = if ix.no > ix.ne {
                (n_pass * i.cos() - ng * t.cos()) / (n_pass * i.cos() + ng * t.cos())
            } else {
                (ng * i.cos() - n_pass * t.cos()) / (ng * i.cos() + n_pass * t.cos())
            };
            let fresnel = bare(n_pass).powi(2) * (1.0 - r * r).powi(2);
            assert_within(
                d.normal.passed,
                fresnel,
                1e-9,
                "Fresnel s or p at four faces (Born & Wolf §1.5)",
            );
            Scenario::from_json(&d.scenario.document()).unwrap();
        }
    }

    #[test]
    fn air_spaced_calcite_has_the_expected_field() {
        // Calcite at 632.8 nm, n_o ≈ 1.6557, n_e ≈ 1.4849 (Ghosh 1999): the critical angles
        // are 37.1° and 42.3°, and the centred field of an air-spaced pair is a few degrees on
        // each side (common practice: about ±4° for this kind of prism).
        let d = design(&request(r#"{"material": "calcite"}"#)).unwrap();
        assert!(
            (d.critical_angles_deg[0] - 37.1).abs() < 0.1,
            "{:?}",
            d.critical_angles_deg
        );
        assert!(
            (d.critical_angles_deg[1] - 42.3).abs() < 0.1,
            "{:?}",
            d.critical_angles_deg
        );
        assert!(
            d.half_field_deg[1] > 3.0 && d.half_field_deg[1] < 5.0,
            "{:?}",
            d.half_field_deg
        );
        assert_eq!((d.reflected_mode.as_str(), d.passed_mode.as_str()), ("o", "e"));
        // Quartz is positive: its extraordinary mode is reflected.
        let q = design(&request(r#"{"material": "quartz"}"#)).unwrap();
        assert_eq!(q.reflected_mode, "e");
        // A cement as dense as the crystal's lower index reflects nothing; one just below it
        // would need a gap tilted beyond any face the contract allows.
        for doc in [
            r#"{"material": "calcite", "cement_index": 1.55}"#,
            r#"{"no": 1.6, "ne": 1.5999, "cement_index": 1.5998}"#,
        ] {
            let e = design(&request(doc)).unwrap_err();
            assert_eq!(e.field, "cement_index", "{doc}: {e}");
        }
    }
}
