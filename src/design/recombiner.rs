//! Recombiner check: two equal displacers with a half-wave plate (or rotator) between them.
//!
//! Physics. The first displacer sends the e-ray sideways by s. A half-wave plate at 45° (or a
//! 90° rotator) swaps the two polarizations, so the path that was ordinary becomes extraordinary
//! in the second plate and is displaced by the same s, while the displaced path now travels as
//! ordinary: the paths "oe" and "eo" leave from one point and add as fields. Each has crossed both
//! plates once as o and once as e, so their propagation phases are equal and the output state is
//! the input's (up to the swap). Unequal lengths ΔL or cuts Δθ leave a residual separation
//! Δs ≈ tan ρ ΔL + L ∂(tan ρ)/∂θ Δθ and a phase difference Δφ ≈ k0 (n_e(θ) − n_o) ΔL + …;
//! the phase is by far the more sensitive. Everything here is computed with the full stack trace
//! of [`crate::optics::trace`], the linear sensitivities by central differences of it.
//!
//! "Breaks": the beams no longer overlap to 99 % (Δs > 0.1 w, η = exp(−Δs²/w²), Joyce & DeLoach,
//! Appl. Opt. 23, 4187 (1984), from `beam_overlap.rs`), or the recombined phase moves by more than
//! π/10 (a twentieth of a wave), thresholds named below. Whether the two paths form one spot at
//! all is the trace's own rule (their beams overlap: see `trace.rs`, spots), the same rule the
//! page and the command line show.
//!
//! Temperature: the pair (lengths made at 20 °C) works at the request's `temperature_c` T, where
//! every trace is made ([`crate::design::thermal`]); the residual's change per kelvin is a central
//! difference of the full trace about T (`residual_x_mm`: the residual offset along the walk-off,
//! `phase_difference_rad`: the recombined phase).

use crate::contract::geometry::Contact;
use crate::contract::request::{Middle, RecombinerRequest};
use crate::contract::result::spots;
use crate::contract::scenario::{Element, ElementKind};
use crate::design::part::{Part, crystal};
use crate::design::thermal::{Temperature, indices_at};
use crate::error::Error;
use crate::optics::beam_overlap::GaussianBeam;
use crate::optics::trace::trace;
use crate::optics::uniaxial::walkoff;
use crate::precision::{
    BISECTION_STEPS, BREAK_SCAN_DECADES, BREAK_SCAN_SAMPLES, DIFF_STEP_LENGTH_FLOOR_MM, DIFF_STEP_LENGTH_REL,
    DIFF_STEP_TILT_DEG, NO_WALKOFF_RAD,
};
use serde::Serialize;
use std::f64::consts::{PI, TAU};

/// Overlap below which the recombination counts as broken.
pub const MIN_OVERLAP: f64 = 0.99;
/// Phase change (radians) beyond which the recombination counts as broken.
pub const MAX_PHASE_ERROR: f64 = PI / 10.0;

/// The verdict.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RecombinerCheck {
    /// Whether "oe" and "eo" leave as one spot (their beams overlap, as the trace groups spots).
    pub recombined: bool,
    /// Exit point of "eo" minus that of "oe", [dx, dy] mm.
    pub residual_vector_mm: [f64; 2],
    /// Its length, mm.
    pub residual_separation_mm: f64,
    /// Power overlap of the two recombining beams, exp(−Δs²/w²) (Joyce & DeLoach).
    pub overlap: f64,
    /// Propagation phase of "eo" minus that of "oe", radians, reduced to (−π, π].
    pub phase_difference_rad: f64,
    /// Power in the recombined spot (fraction of the input).
    pub recombined_power: f64,
    /// Power left in every other spot.
    pub stray_power: f64,
    /// ∂(residual dx)/∂ΔL, mm per mm, and ∂Δφ/∂ΔL, rad per mm.
    pub length_sensitivity: [f64; 2],
    /// ∂(residual dx)/∂Δθ, mm per degree, and ∂Δφ/∂Δθ, rad per degree.
    pub tilt_sensitivity: [f64; 2],
    /// Length mismatch of the second displacer (mm, against a perfect pair) at which the
    /// overlap breaks, and at which the phase breaks; null when it does not break within ±L.
    pub length_mismatch_to_break_mm: [Option<f64>; 2],
    /// Cut mismatch of the second displacer (°) at which the overlap breaks, and at which the
    /// phase breaks; null when it does not break within ±10°.
    pub tilt_mismatch_to_break_deg: [Option<f64>; 2],
    /// The residual's change per kelvin about the design temperature (`residual_x_mm`,
    /// `phase_difference_rad`).
    pub temperature: Temperature,
    /// Whether this pair, with its mismatches, is broken: not one spot, overlap below
    /// [`MIN_OVERLAP`], or phase beyond [`MAX_PHASE_ERROR`].
    pub broken: bool,
    /// The verdict in words.
    pub verdict: String,
    /// The scenario checked, ready to load.
    pub scenario: Part,
}

impl RecombinerRequest {
    /// The pair with the second crystal longer by `dl` mm and its cut tilted by `dt` degrees more.
    fn part(&self, dl: f64, dt: f64) -> Part {
        self.part_at(dl, dt, self.temperature_c)
    }

    /// [`RecombinerRequest::part`] working at `t_c` °C.
    fn part_at(&self, dl: f64, dt: f64, t_c: f64) -> Part {
        let plate = |l: f64, t: f64| crystal(self.medium, l, t, 0.0, 1.0);
        let kind = match self.middle {
            Middle::HalfWave => ElementKind::Retarder {
                retardance_waves: 0.5,
                fast_axis_deg: 45.0,
            },
            Middle::Rotator(angle_deg) => ElementKind::Rotator { angle_deg },
        };
        let elements = vec![
            plate(self.length_mm, self.cut_tilt_deg),
            Element {
                gap_mm: 1.0,
                kind,
                contact: Contact::Air,
            },
            plate(self.length_mm + dl, self.cut_tilt_deg + dt),
        ];
        Part::new(self.wavelength, Some(self.beam_diameter_mm), elements).at_temperature(t_c)
    }
}

struct Outcome {
    dx: [f64; 2],
    phase: f64,
    recombined: bool,
    power: f64,
    stray: f64,
}

fn reduce(p: f64) -> f64 {
    let r = p - TAU * (p / TAU).round();
    if r <= -PI { r + TAU } else { r }
}

/// The pair traced on its stack (resolved once, no document written or read): where "oe" and
/// "eo" leave, their phase difference, and the spot they share.
fn outcome(req: &RecombinerRequest, dl: f64, dt: f64) -> Result<Outcome, Error> {
    outcome_at(req, (dl, dt), req.temperature_c)
}

/// [`outcome`] at `t_c` °C.
fn outcome_at(req: &RecombinerRequest, (dl, dt): (f64, f64), t_c: f64) -> Result<Outcome, Error> {
    let (stack, _) = req.part_at(dl, dt, t_c).scenario.resolve()?;
    let traced = trace(&stack);
    let find = |l: &str| {
        traced
            .paths
            .iter()
            .find(|x| x.label == l)
            .ok_or_else(|| Error::new("material", format!("path {l} does not exist (a mode is evanescent)")))
    };
    let (oe, eo) = (find("oe")?, find("eo")?);
    let (e, o) = (eo.exit_xy(), oe.exit_xy());
    let dx = [e[0] - o[0], e[1] - o[1]];
    let spots = spots(&stack, &traced);
    let total_power: f64 = spots.iter().map(|s| s.power).sum();
    let spot = spots.iter().find(|s| s.rays.iter().any(|x| x == "oe"));
    let recombined = spot.is_some_and(|s| s.rays.iter().any(|x| x == "eo"));
    let power = spot.map_or(0.0, |s| s.power);
    Ok(Outcome {
        dx,
        phase: eo.phase_rad - oe.phase_rad,
        recombined,
        power,
        stray: total_power - power,
    })
}

/// Checks a recombiner.
///
/// # Errors
/// As the trace of its scenario; `material` when a path does not exist.
pub fn check(req: &RecombinerRequest) -> Result<RecombinerCheck, Error> {
    let ix = indices_at(&req.medium, req.wavelength, req.temperature_c)?;
    if walkoff(ix, req.cut_tilt_deg.to_radians()).abs() < NO_WALKOFF_RAD {
        return Err(Error::new(
            "cut_tilt_deg",
            "this cut gives no walk-off: there is nothing to recombine",
        ));
    }
    let (dl0, dt0) = (req.length_mismatch_mm, req.tilt_mismatch_deg);
    let at = outcome(req, dl0, dt0)?;
    let w = 0.5 * req.beam_diameter_mm;
    // Both paths leave along the incident direction: an offset, no tilt.
    let eta = |res: f64| GaussianBeam::new(req.beam_diameter_mm, 0.0).power_overlap(res, 0.0);
    let res = at.dx[0].hypot(at.dx[1]);
    // Sensitivities by central differences of the full trace (the phase unwrapped by using
    // differences small enough that it moves far less than π).
    let hl = DIFF_STEP_LENGTH_REL * req.length_mm.max(DIFF_STEP_LENGTH_FLOOR_MM);
    let ht = DIFF_STEP_TILT_DEG;
    let (lp, lm) = (outcome(req, dl0 + hl, dt0)?, outcome(req, dl0 - hl, dt0)?);
    let (tp, tm) = (outcome(req, dl0, dt0 + ht)?, outcome(req, dl0, dt0 - ht)?);
    let ls = [(lp.dx[0] - lm.dx[0]) / (2.0 * hl), (lp.phase - lm.phase) / (2.0 * hl)];
    let ts = [(tp.dx[0] - tm.dx[0]) / (2.0 * ht), (tp.phase - tm.phase) / (2.0 * ht)];
    let max_res = w * (-MIN_OVERLAP.ln()).sqrt();
    let broken_overlap = res > max_res || !at.recombined;
    let broken_phase = reduce(at.phase).abs() > MAX_PHASE_ERROR;
    let verdict = match (at.recombined, broken_overlap, broken_phase) {
        (false, _, _) => "broken: the paths leave as separate spots".to_string(),
        (true, true, _) => format!("broken: the recombining beams overlap to only {:.4}", eta(res)),
        (true, false, true) => format!(
            "broken: the recombined phase is off by {:.3} rad (limit π/10)",
            reduce(at.phase)
        ),
        _ => "recombines: one spot, overlap and phase within their limits".to_string(),
    };
    // Break points: search the exact trace outward from a perfect pair on a logarithmic grid in
    // both directions, then bisect the first crossing; the smaller magnitude of the two sides.
    let search = |max: f64, eval: &dyn Fn(f64) -> Option<(f64, f64)>| -> [Option<f64>; 2] {
        let mut out = [None, None];
        for (k, out_k) in out.iter_mut().enumerate() {
            let bad = |d: f64| {
                eval(d).map(|(r, p)| {
                    if k == 0 {
                        r > max_res
                    } else {
                        reduce(p).abs() > MAX_PHASE_ERROR
                    }
                })
            };
            for sign in [1.0, -1.0] {
                let mut prev = 0.0;
                for i in 0..=BREAK_SCAN_SAMPLES {
                    let (n, i) = (BREAK_SCAN_SAMPLES as f64, i as f64);
                    let d = sign * max * 10f64.powf(-BREAK_SCAN_DECADES + BREAK_SCAN_DECADES * i / n);
                    if bad(d) == Some(true) {
                        let (mut lo, mut hi) = (prev, d);
                        for _ in 0..BISECTION_STEPS {
                            let mid = 0.5 * (lo + hi);
                            if bad(mid) == Some(true) { hi = mid } else { lo = mid }
                        }
                        let m = hi.abs();
                        *out_k = Some(out_k.map_or(m, |o: f64| o.min(m)));
                        break;
                    }
                    prev = d;
                }
            }
        }
        out
    };
    let at_t = |t: f64| outcome_at(req, (dl0, dt0), t).ok();
    let temperature = Temperature::of(
        req.temperature_c,
        vec![
            ("residual_x_mm", Box::new(|t| at_t(t).map(|o| o.dx[0]))),
            ("phase_difference_rad", Box::new(|t| at_t(t).map(|o| o.phase))),
        ],
    );
    let along_length = |d: f64| outcome(req, d, 0.0).ok().map(|o| (o.dx[0].hypot(o.dx[1]), o.phase));
    let along_tilt = |d: f64| outcome(req, 0.0, d).ok().map(|o| (o.dx[0].hypot(o.dx[1]), o.phase));
    Ok(RecombinerCheck {
        recombined: at.recombined,
        residual_vector_mm: at.dx,
        residual_separation_mm: res,
        overlap: eta(res),
        phase_difference_rad: reduce(at.phase),
        recombined_power: at.power,
        stray_power: at.stray.max(0.0),
        length_sensitivity: ls,
        tilt_sensitivity: ts,
        length_mismatch_to_break_mm: search(req.length_mm, &along_length),
        tilt_mismatch_to_break_deg: search(10.0, &along_tilt),
        temperature,
        broken: broken_overlap || broken_phase,
        verdict,
        scenario: req.part(dl0, dt0),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::fields::Fields;
    use crate::contract::scenario::Medium;
    use crate::optics::uniaxial::max_walkoff_cut;
    use crate::optics::wavelength::Wavelength;
    use serde_json::Value;

    fn run(doc: &str) -> RecombinerCheck {
        let v: Value = serde_json::from_str(doc).unwrap();
        let mut f = Fields::new("", &v).unwrap();
        let r = RecombinerRequest::from_json(&mut f).unwrap();
        f.finish().unwrap();
        check(&r).unwrap()
    }

    #[test]
    fn equal_displacers_recombine_with_no_residual_and_no_phase() {
        for middle in [r#""half-wave""#, r#""rotator""#] {
            let c = run(&format!(
                r#"{{"material": "calcite", "length_mm": 10, "middle": {middle}}}"#
            ));
            assert!(c.recombined, "{middle}");
            assert!(c.residual_separation_mm < 1e-12, "{}", c.residual_separation_mm);
            assert!(c.phase_difference_rad.abs() < 1e-9, "{}", c.phase_difference_rad);
            assert!((c.recombined_power - 1.0).abs() < 1e-12 && c.stray_power < 1e-12);
        }
    }

    #[test]
    fn mismatch_sensitivities_match_the_closed_forms() {
        // Δs = tan ρ ΔL at normal incidence; Δφ = k0 (n(θ) − n_o) ΔL for the e-path's extra
        // length against the o-path's (Yariv & Yeh §4.3 for n(θ)).
        let c = run(r#"{"material": "calcite", "length_mm": 10, "wavelength_nm": 632.8}"#);
        let ix = Medium::Catalogue(crate::optics::material::find("calcite").unwrap())
            .indices(Wavelength::from_nm(632.8).unwrap())
            .unwrap();
        let th = max_walkoff_cut(ix).0;
        let rho = walkoff(ix, th);
        let n_th = crate::optics::uniaxial::extraordinary_index(ix, th);
        let k0 = TAU / 632.8e-6;
        assert!(
            (c.length_sensitivity[0].abs() - rho.tan().abs()).abs() < 1e-6,
            "{} vs {}",
            c.length_sensitivity[0],
            rho.tan()
        );
        assert!(
            (c.length_sensitivity[1].abs() - k0 * (n_th - ix.no).abs()).abs() < 1e-4 * k0 * (n_th - ix.no).abs(),
            "{} vs {}",
            c.length_sensitivity[1],
            k0 * (n_th - ix.no)
        );
        // The phase breaks long before the overlap does; both break points agree with the
        // linearization (overlap: Δs = tan ρ ΔL reaches 0.1 w; phase: Δφ reaches π/10).
        let [lo, lp] = c.length_mismatch_to_break_mm.map(Option::unwrap);
        assert!(lp < 1e-3 * lo, "{lp} vs {lo}");
        let expect_lo = 0.5 * (-MIN_OVERLAP.ln()).sqrt() / rho.tan().abs();
        assert!((lo - expect_lo).abs() < 1e-6 * expect_lo, "{lo} vs {expect_lo}");
        let expect_lp = MAX_PHASE_ERROR / (k0 * (n_th - ix.no).abs());
        assert!((lp - expect_lp).abs() < 1e-3 * expect_lp, "{lp} vs {expect_lp}");
        // At the maximum-walk-off cut the residual is insensitive to a cut mismatch to first
        // order; the phase still breaks, and first.
        assert!(c.tilt_sensitivity[0].abs() < 1e-4, "{}", c.tilt_sensitivity[0]);
        let [to, tp] = c.tilt_mismatch_to_break_deg;
        assert!(tp.unwrap() < to.unwrap_or(f64::INFINITY));
        assert!(!c.broken, "{}", c.verdict);
    }

    #[test]
    fn a_small_length_mismatch_inside_the_limits_is_not_broken() {
        // The pair once called "separate spots" although its overlap (0.99998) and phase
        // (−0.0185 rad) were inside their own limits: rays added as fields only within 10⁻³ of
        // the beam diameter. With the overlap rule they form one spot. Expected numbers: Δs =
        // tan ρ ΔL and η = exp(−Δs²/w²) (Joyce & DeLoach, from memory); Δφ = k0 (n(θ) − n_o) ΔL.
        let c = run(
            r#"{"material": "yvo4", "wavelength_nm": 1064, "length_mm": 8, "beam_diameter_mm": 0.5, "length_mismatch_mm": 0.01}"#,
        );
        assert!(c.recombined, "{}", c.verdict);
        assert!(!c.broken, "{}", c.verdict);
        assert!(c.verdict.starts_with("recombines"), "{}", c.verdict);
        assert!(c.overlap > MIN_OVERLAP && c.overlap < 1.0, "{}", c.overlap);
        assert!((c.overlap - 0.99998).abs() < 1e-5, "{}", c.overlap);
        assert!(
            (c.phase_difference_rad.abs() - 0.0185).abs() < 5e-4,
            "{}",
            c.phase_difference_rad
        );
        // The recombined spot holds (almost) the whole beam: the interference of the two paths
        // is weighted by their overlap, and the phase error costs a little.
        assert!(
            c.recombined_power > 0.999 && c.stray_power < 1e-9,
            "{} {}",
            c.recombined_power,
            c.stray_power
        );
    }

    #[test]
    fn a_length_mismatch_leaves_the_predicted_residual() {
        let c = run(
            r#"{"material": "yvo4", "wavelength_nm": 1064, "length_mm": 8, "cut_tilt_deg": 45, "length_mismatch_mm": 0.05}"#,
        );
        let ix = Medium::Catalogue(crate::optics::material::find("yvo4").unwrap())
            .indices(Wavelength::from_nm(1064.0).unwrap())
            .unwrap();
        let expect = 0.05 * walkoff(ix, 45f64.to_radians()).tan().abs();
        assert!(
            (c.residual_separation_mm - expect).abs() < 1e-12,
            "{} vs {expect}",
            c.residual_separation_mm
        );
        assert!(c.overlap < 1.0);
        // 50 µm of length mismatch puts the phase far beyond π/10: the pair is broken.
        assert!(c.broken, "{}", c.verdict);
    }
}
