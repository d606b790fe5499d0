//! Angular splitter: two wedges of one uniaxial crystal with crossed optic axes, contacted along
//! their common tilted face, that send the two polarizations out at equal and opposite angles.
//!
//! Geometry (the element frame of CONVENTIONS.md, version 2). The first wedge has its front face
//! across z and its back face tilted by the wedge angle α toward +x (normal (sin α, 0, cos α));
//! the second wedge's front face is that same plane and its back face is across z again. The
//! first wedge's optic axis lies along x, the second's along y, both in the faces. At normal
//! incidence the light polarized along y is ordinary in the first wedge and extraordinary in the
//! second (path "oe"), the light polarized along x the reverse ("eo"); at the tilted face one
//! meets n_o → n_e and the other n_e → n_o, and both bend, in opposite senses, again at the exit.
//! The wedges are optically contacted, or cemented when the request gives a cement index.
//!
//! Both paths stay in the x–z plane with wave vectors perpendicular to the optic axis that
//! matters to them, so each crosses the tilted face as an isotropic medium would: the exact
//! deviation of a beam is sin δ = sin α (√(n₂² − n₁² sin² α) − n₁ cos α) (Snell at the tilted
//! face, then at the exit face), and the split is the difference of the two. For small angles
//! this is the common textbook split 2·arcsin((n_e − n_o)·tan α) (from memory). The design
//! itself is found on the exact trace ([`crate::optics::trace`]) of the designed part, by
//! bisection in α; the tests check it against both formulas.
//!
//! Thickness: each wedge is given the smallest thickness at its axis point that leaves
//! [`min_edge_mm`] of material at its thin edge across the clear aperture.
//!
//! Tolerances by Monte Carlo: each sample moves the common face's tilt (both wedges together, as
//! a contacted pair must), turns each wedge's optic axis about z by its own error and tilts the
//! incident beam in the plane of the split, and follows both beams through the pair by their
//! wave-vector chains ([`crate::optics::chain`]): the directions a whole trace gives, exactly,
//! without the fields (a tenth of the work; see the README's benchmark).
//!
//! Temperature: the pair works at the request's `temperature_c` T, where every trace is made
//! ([`crate::design::thermal`]); the split's change per kelvin is a central difference of the
//! exact trace of the designed pair about T (`split_angle_deg`).

use crate::contract::geometry::{Angles, Contact, Placement};
use crate::contract::request::SplitterRequest;
use crate::contract::scenario::Element;
use crate::design::part::{Part, angle_between_deg, min_edge_mm, path_power, placed_crystal};
use crate::design::statistics::{Summary, summarize};
use crate::design::thermal::{Temperature, growth, indices_at};
use crate::error::Error;
use crate::numfmt::sig;
use crate::optics::chain::chain;
use crate::optics::stack::{Element as Layered, Medium, Stack};
use crate::optics::uniaxial::{OpticAxis, Uniaxial};
use crate::optics::wavelength::Wavelength;
use crate::precision::{BISECTION_STEPS, CRITICAL_MARGIN_DEG, DESIGN_SCAN_INTERVALS};
use crate::random::Rng;
use nalgebra::Vector3;
use serde::Serialize;
use std::f64::consts::FRAC_PI_2;

/// Histogram bins of the Monte Carlo summary.
const BINS: usize = 40;

/// One beam leaving the splitter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SplitBeam {
    /// Path label: "oe" (polarized along y) or "eo" (along x).
    pub label: String,
    /// Its polarization at the entrance: "y" or "x".
    pub polarization: String,
    /// Deviation from the incident beam in the x–z plane, degrees, positive toward +x.
    pub deviation_deg: f64,
    /// Power for the design's input (linear at 45°).
    pub power: f64,
}

/// The split and deviations over the band.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SplitCurve {
    /// Wavelengths, nm.
    pub wavelength_nm: Vec<f64>,
    /// Split angle at each, degrees.
    pub split_angle_deg: Vec<f64>,
    /// Deviation of "oe" at each, degrees.
    pub deviation_oe_deg: Vec<f64>,
    /// Deviation of "eo" at each, degrees.
    pub deviation_eo_deg: Vec<f64>,
}

/// The designed splitter.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SplitterDesign {
    /// Wedge angle α (tilt of the common face from the entrance face), degrees.
    pub wedge_angle_deg: f64,
    /// The wedge angle the small-angle split 2·arcsin((n_e − n_o)·tan α) would give, degrees.
    pub small_angle_wedge_deg: f64,
    /// The traced split at the design wavelength, degrees.
    pub split_angle_deg: f64,
    /// Each wedge's thickness at its axis point, mm (first, second).
    pub thickness_mm: [f64; 2],
    /// Those thicknesses at the design temperature, mm (each grown by α⊥: the axes lie in the
    /// faces).
    pub thickness_at_temperature_mm: [f64; 2],
    /// Thickness left at each wedge's thin edge, mm.
    pub edge_thickness_mm: f64,
    /// Clear aperture, mm.
    pub clear_aperture_mm: f64,
    /// How the wedges meet: "optical" or "cement".
    pub contact: String,
    /// The two beams.
    pub beams: Vec<SplitBeam>,
    /// The split over the band.
    pub band: SplitCurve,
    /// Error standard deviations of the Monte Carlo run.
    pub tolerances: crate::contract::request::SplitterTolerances,
    /// The split's change per kelvin about the design temperature (`split_angle_deg`).
    pub temperature: Temperature,
    /// Monte Carlo samples run.
    pub samples: usize,
    /// Seed of the run.
    pub seed: u64,
    /// Split angle over the run, degrees; absent when no samples were run.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub split_angle_spread: Option<Summary>,
    /// The designed pair, ready to load.
    pub scenario: Part,
}

/// Errors of one built pair: wedge angle, each axis's turn about z, incidence in the x–z plane.
#[derive(Debug, Clone, Copy, Default)]
struct Errors {
    wedge_deg: f64,
    axis_deg: [f64; 2],
    incidence_deg: f64,
}

/// A face normal tilted by `deg` toward +x (toward −x when negative).
fn toward_x(deg: f64) -> Angles {
    Angles {
        tilt_deg: deg.abs(),
        azimuth_deg: if deg < 0.0 { 180.0 } else { 0.0 },
    }
}

impl SplitterRequest {
    fn contact(&self) -> Contact {
        self.cement_index.map_or(Contact::Optical, Contact::Cement)
    }

    /// The pair with wedge angle `alpha_deg` and thicknesses `t`, built with `err`, at `nm`.
    fn part(&self, alpha_deg: f64, t: [f64; 2], err: Errors, wavelength: Wavelength) -> Part {
        let a = alpha_deg + err.wedge_deg;
        let aperture_mm = Some(self.aperture_mm);
        let first = Placement {
            back: toward_x(a),
            aperture_mm,
            ..Placement::default()
        };
        let second = Placement {
            front: toward_x(a),
            aperture_mm,
            ..Placement::default()
        };
        let elements: Vec<Element> = vec![
            placed_crystal(self.medium, t[0], 90.0, err.axis_deg[0], 1.0, first, Contact::Air),
            placed_crystal(
                self.medium,
                t[1],
                90.0,
                90.0 + err.axis_deg[1],
                0.0,
                second,
                self.contact(),
            ),
        ];
        let mut part = Part::new(wavelength, None, elements).at_temperature(self.temperature_c);
        part.scenario.beam.polar_deg = err.incidence_deg;
        part
    }

    fn thicknesses(&self, alpha_deg: f64) -> [f64; 2] {
        let t = min_edge_mm(self.aperture_mm) + 0.5 * self.aperture_mm * alpha_deg.to_radians().tan();
        [t, t]
    }
}

/// The nominal pair's stack with the errors of one sample applied to it directly: the common
/// face's normal, each wedge's optic axis and the incident direction, as [`SplitterRequest::part`]
/// would place them (tested), without building and resolving a scenario per sample.
fn perturbed(base: &Stack, alpha_deg: f64, err: Errors) -> Stack {
    let mut s = base.clone();
    let a = (alpha_deg + err.wedge_deg).to_radians();
    let normal = Vector3::new(a.sin(), 0.0, a.cos());
    for (i, layer) in s.layers.iter_mut().enumerate() {
        if let Layered::Slab(slab) = &mut layer.element {
            let Medium::Uniaxial(u) = &mut slab.medium else {
                continue;
            };
            let azimuth = (90.0 * i as f64 + err.axis_deg[i.min(1)]).to_radians();
            *u = Uniaxial::new(u.indices, OpticAxis::from_angles(FRAC_PI_2, azimuth));
            if let Some(f) = &mut slab.faces {
                if i == 0 {
                    f.back.normal = normal;
                } else {
                    f.front.normal = normal;
                }
            }
        }
    }
    let t = err.incidence_deg.to_radians();
    s.input.direction = Vector3::new(t.sin(), 0.0, t.cos());
    s
}

/// The angle between the beams "oe" and "eo" of a stack, degrees; `None` when either does not
/// leave. Their wave-vector chains ([`chain`]) give exactly the directions a whole trace reports
/// (tested there), without the fields a split does not depend on.
fn split_of(stack: &Stack) -> Option<f64> {
    let (oe, eo) = (chain(stack, "oe")?, chain(stack, "eo")?);
    Some(angle_between_deg(&oe.direction, &eo.direction))
}

/// The traced beams "oe" and "eo" of a part: (deviation toward +x in degrees, power) each, and
/// the angle between them; `None` when either does not leave (total internal reflection).
fn beams(part: &Part) -> Option<([(f64, f64); 2], f64)> {
    let (stack, traced) = part.traced().ok()?;
    let find = |l: &str| traced.paths.iter().find(|p| p.label == l);
    let (oe, eo) = (find("oe")?, find("eo")?);
    let incident = stack.input.direction;
    let dev = |d: &nalgebra::Vector3<f64>| (d.x.atan2(d.z) - incident.x.atan2(incident.z)).to_degrees();
    Some((
        [
            (dev(&oe.direction), path_power(&stack, oe)),
            (dev(&eo.direction), path_power(&stack, eo)),
        ],
        angle_between_deg(&oe.direction, &eo.direction),
    ))
}

/// Designs a splitter.
///
/// # Errors
/// `material` for a crystal without birefringence; `split_angle_deg` beyond what the crystal can
/// give before one beam is totally reflected at the common face or at the exit.
pub fn design(req: &SplitterRequest) -> Result<SplitterDesign, Error> {
    let ix = indices_at(&req.medium, req.wavelength, req.temperature_c)?;
    let dn = (ix.ne - ix.no).abs();
    if dn < crate::precision::NO_BIREFRINGENCE {
        return Err(Error::new(
            "material",
            "this crystal is not birefringent: nothing would split",
        ));
    }
    let split_at =
        |alpha: f64| beams(&req.part(alpha, req.thicknesses(alpha), Errors::default(), req.wavelength)).map(|(_, s)| s);
    // The largest wedge: below total reflection of the beam going from the higher index to the
    // lower (or into the cement), and within the contract's face tilts.
    let (lo_n, hi_n) = (ix.no.min(ix.ne), ix.no.max(ix.ne));
    let barrier = req.cement_index.map_or(lo_n, |c| c.min(lo_n));
    let critical = (barrier / hi_n).asin().to_degrees();
    let top = critical.min(crate::contract::geometry::MAX_FACE_TILT_DEG) - CRITICAL_MARGIN_DEG;
    // Scan up from 0 for the first wedge that splits by at least the target, then bisect.
    let steps = DESIGN_SCAN_INTERVALS;
    let mut lo = 0.0;
    let mut hi = None;
    let mut best = 0.0f64;
    for k in 1..=steps {
        let a = top * k as f64 / steps as f64;
        match split_at(a) {
            Some(s) if s >= req.split_angle_deg => {
                hi = Some(a);
                break;
            }
            Some(s) => {
                best = best.max(s);
                lo = a;
            }
            None => break,
        }
    }
    let Some(mut hi) = hi else {
        return Err(Error::new(
            "split_angle_deg",
            format!(
                "is more than this pair can give: at most about {}° before a beam is totally reflected",
                sig(best, 4)
            ),
        ));
    };
    for _ in 0..BISECTION_STEPS {
        let mid = 0.5 * (lo + hi);
        if split_at(mid).is_some_and(|s| s >= req.split_angle_deg) {
            hi = mid;
        } else {
            lo = mid;
        }
    }
    let alpha = 0.5 * (lo + hi);
    let t = req.thicknesses(alpha);
    let part = req.part(alpha, t, Errors::default(), req.wavelength);
    let (pair, split) =
        beams(&part).ok_or_else(|| Error::new("split_angle_deg", "the designed pair does not pass both beams"))?;
    let beams_out = vec![
        SplitBeam {
            label: "oe".into(),
            polarization: "y".into(),
            deviation_deg: pair[0].0,
            power: pair[0].1,
        },
        SplitBeam {
            label: "eo".into(),
            polarization: "x".into(),
            deviation_deg: pair[1].0,
            power: pair[1].1,
        },
    ];
    // The band: the built pair at each wavelength (points where a formula breaks down are left
    // out, as the audit says).
    let (b0, b1) = req.band();
    let mut band = SplitCurve {
        wavelength_nm: vec![],
        split_angle_deg: vec![],
        deviation_oe_deg: vec![],
        deviation_eo_deg: vec![],
    };
    for k in 0..=steps {
        let nm = b0 + (b1 - b0) * k as f64 / steps as f64;
        let Ok(w) = Wavelength::from_nm(nm) else { continue };
        if indices_at(&req.medium, w, req.temperature_c).is_err() {
            continue;
        }
        if let Some((p, s)) = beams(&req.part(alpha, t, Errors::default(), w)) {
            band.wavelength_nm.push(nm);
            band.split_angle_deg.push(s);
            band.deviation_oe_deg.push(p[0].0);
            band.deviation_eo_deg.push(p[1].0);
        }
    }
    let temperature = Temperature::of(
        req.temperature_c,
        vec![(
            "split_angle_deg",
            Box::new(|t| beams(&part.clone().at_temperature(t)).map(|(_, s)| s)),
        )],
    );
    let tol = req.tolerances;
    let mut rng = Rng::new(req.seed);
    let (base, _) = part.scenario.resolve()?;
    let runs: Vec<f64> = (0..req.samples)
        .map(|_| {
            let err = Errors {
                wedge_deg: tol.wedge_deg * rng.normal(),
                axis_deg: [tol.axis_deg * rng.normal(), tol.axis_deg * rng.normal()],
                incidence_deg: tol.incidence_deg * rng.normal(),
            };
            split_of(&perturbed(&base, alpha, err)).unwrap_or(f64::NAN)
        })
        .collect();
    let small = ((split.to_radians() / 2.0).sin() / dn).atan().to_degrees();
    Ok(SplitterDesign {
        wedge_angle_deg: alpha,
        small_angle_wedge_deg: small,
        split_angle_deg: split,
        thickness_mm: t,
        thickness_at_temperature_mm: [0, 1]
            .map(|i| t[i] * growth(&req.medium, 90.0, 90.0 * i as f64, req.temperature_c)),
        edge_thickness_mm: min_edge_mm(req.aperture_mm),
        clear_aperture_mm: req.aperture_mm,
        contact: if req.cement_index.is_some() {
            "cement"
        } else {
            "optical"
        }
        .into(),
        beams: beams_out,
        band,
        tolerances: tol,
        temperature,
        samples: req.samples,
        seed: req.seed,
        split_angle_spread: (req.samples > 0).then(|| summarize(&runs, BINS)),
        scenario: part,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::scenario::Scenario;
    use crate::precision::assert_within;

    fn request(doc: &str) -> SplitterRequest {
        crate::contract::request::read_ok(doc, SplitterRequest::from_json)
    }

    /// Exact deviation of a beam crossing the tilted face from index n1 into n2 at normal
    /// incidence, then the exit face across z: Snell twice (an independent closed form).
    fn snell_deviation_deg(n1: f64, n2: f64, alpha_deg: f64) -> f64 {
        let a = alpha_deg.to_radians();
        (a.sin() * ((n2 * n2 - n1 * n1 * a.sin().powi(2)).sqrt() - n1 * a.cos()))
            .asin()
            .to_degrees()
    }

    #[test]
    fn the_traced_split_matches_snell_at_each_face() {
        for (doc, target) in [
            (r#"{"material": "calcite", "split_angle_deg": 10, "samples": 0}"#, 10.0),
            (r#"{"material": "quartz", "split_angle_deg": 1, "samples": 0}"#, 1.0),
            (
                r#"{"material": "yvo4", "wavelength_nm": 1064, "split_angle_deg": 20, "samples": 0}"#,
                20.0,
            ),
            (
                r#"{"material": "calcite", "split_angle_deg": 5, "cement_index": 1.55, "samples": 0}"#,
                5.0,
            ),
        ] {
            let r = request(doc);
            let d = design(&r).unwrap();
            let ix = r.medium.indices(r.wavelength).unwrap();
            let a = d.wedge_angle_deg;
            let (oe, eo) = (
                snell_deviation_deg(ix.no, ix.ne, a),
                snell_deviation_deg(ix.ne, ix.no, a),
            );
            assert_within(d.beams[0].deviation_deg, oe, 1e-10, "Snell at both faces, path oe");
            assert_within(d.beams[1].deviation_deg, eo, 1e-10, "Snell at both faces, path eo");
            assert_within(d.split_angle_deg, (oe - eo).abs(), 1e-10, "split from Snell");
            assert_within(d.split_angle_deg, target, 1e-9, "the required split");
            // Symmetric to first order: each beam takes about half the split.
            assert!(
                (d.beams[0].deviation_deg + d.beams[1].deviation_deg).abs() < 0.1 * target,
                "{doc}"
            );
            // The answer's scenario loads, with its geometry, and traces to the same split.
            let sc = Scenario::from_json(&d.scenario.document()).unwrap();
            let res = crate::contract::result::trace_scenario(&sc).unwrap();
            let json = serde_json::to_value(&res).unwrap();
            assert!(json.to_string().contains("split"), "{doc}");
            assert!(
                (d.beams[0].power + d.beams[1].power - 1.0).abs() < 1e-12,
                "ideal faces pass all"
            );
        }
    }

    #[test]
    fn samples_perturbed_on_the_stack_equal_the_built_pair() {
        let r = request(r#"{"material": "yvo4", "wavelength_nm": 1064, "split_angle_deg": 6, "samples": 0}"#);
        let d = design(&r).unwrap();
        let (base, _) = d.scenario.scenario.resolve().unwrap();
        let t = d.thickness_mm;
        let mut rng = Rng::new(11);
        for _ in 0..50 {
            let err = Errors {
                wedge_deg: 0.5 * rng.normal(),
                axis_deg: [2.0 * rng.normal(), 2.0 * rng.normal()],
                incidence_deg: rng.normal(),
            };
            let built = beams(&r.part(d.wedge_angle_deg, t, err, r.wavelength)).unwrap().1;
            let fast = split_of(&perturbed(&base, d.wedge_angle_deg, err)).unwrap();
            assert_within(fast, built, 1e-12, "the same pair built through its scenario");
        }
    }

    #[test]
    fn small_splits_follow_the_textbook_formula() {
        // Split = 2·arcsin((n_e − n_o)·tan α) for small wedge angles (common textbook result,
        // from memory); the exact split differs at second order in α.
        let r = request(r#"{"material": "quartz", "split_angle_deg": 0.5, "samples": 0}"#);
        let d = design(&r).unwrap();
        let ix = r.medium.indices(r.wavelength).unwrap();
        let textbook = 2.0
            * ((ix.ne - ix.no).abs() * d.wedge_angle_deg.to_radians().tan())
                .asin()
                .to_degrees();
        assert!((textbook - 0.5).abs() < 1e-3 * 0.5, "{textbook}");
        assert!((d.small_angle_wedge_deg - d.wedge_angle_deg).abs() < 1e-3 * d.wedge_angle_deg);
    }

    #[test]
    fn tolerances_spread_the_split_and_unreachable_splits_are_refused() {
        let r = request(r#"{"material": "calcite", "split_angle_deg": 10, "samples": 400, "seed": 5}"#);
        let d = design(&r).unwrap();
        let s = d.split_angle_spread.unwrap();
        assert_eq!(s.n, 400);
        assert!((s.mean - 10.0).abs() < 0.05 && s.std > 0.0 && s.std < 0.2, "{s:?}");
        // Without errors every sample is the design.
        let r = request(
            r#"{"material": "calcite", "split_angle_deg": 10, "samples": 10, "tolerances": {"wedge_deg": 0, "axis_deg": 0, "incidence_deg": 0}}"#,
        );
        let s = design(&r).unwrap().split_angle_spread.unwrap();
        assert!(s.std < 1e-12, "{s:?}");
        // Quartz cannot split by 30°.
        let e = design(&request(
            r#"{"material": "quartz", "split_angle_deg": 30, "samples": 0}"#,
        ))
        .unwrap_err();
        assert_eq!(e.field, "split_angle_deg", "{e}");
    }
}
