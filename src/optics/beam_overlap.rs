//! Overlap of two Gaussian beams on one plane: whether output rays add as fields, and how much.
//!
//! Physics. Every output ray stands for a TEM₀₀ Gaussian beam with its waist on the observation
//! plane and the scenario's beam diameter D = 2w, w the 1/e² *intensity* radius (the usual beam
//! diameter; the field falls as exp(−r²/w²)). Normalized to unit power, the mode of ray i is
//!
//!   g_i(r) = √(2/(π w²)) · exp(−|r − r_i|²/w²) · exp(i k t_i·r),
//!
//! r_i its point on the plane, t_i the transverse (x, y) part of its unit direction, k = 2π n/λ
//! in the outside medium of index n. Its phase is referred to the lateral origin, as the trace's
//! `phase_rad` is (the plane-wave phase at a fixed lateral point). The field of ray i is J_i g_i(r)
//! with J_i its Jones vector, so the power of a group of rays is
//!
//!   P = ∫ |Σ_i J_i g_i|² dA = Σ_i |J_i|² + Σ_{i≠j} J_jᴴ J_i γ_ij,   γ_ij = ∫ g_i g_j* dA.
//!
//! The interference term of each pair is weighted by its mode overlap γ_ij, in closed form (a
//! Gaussian integral; complete the square about the midpoint m = (r_i + r_j)/2):
//!
//!   γ_ij = exp(−d²/(2w²)) · exp(−k² w² |Δt|²/8) · exp(i k Δt·m),   d = |r_i − r_j|, Δt = t_i − t_j.
//!
//! |γ_ij| ≤ 1, and the matrix γ is a Gram matrix, so P ≥ 0 and the Stokes vector of any group is
//! physical; when the fields do not interfere (orthogonal polarizations, or γ = 0) P is the sum of
//! the rays' powers. For a small tilt θ = |Δt|, k²w²θ²/8 = (π n w θ/λ)²/2.
//! The power coupling |γ|² = exp(−d²/w²) · exp(−(π n w θ/λ)²) is the coupling efficiency of two
//! equal Gaussian beams with lateral offset d and tilt θ at a common waist: Joyce & DeLoach,
//! "Alignment of Gaussian beams", Appl. Opt. 23, 4187 (1984) (quoted from memory; the tests check
//! the closed form above against a direct 2-D quadrature, an independent method).

use num_complex::Complex64;

/// A Gaussian beam's size and wave number on the observation plane.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GaussianBeam {
    /// 1/e² intensity radius w (half the beam diameter), mm.
    pub radius_mm: f64,
    /// Wave number k = 2π n/λ in the outside medium, rad per mm.
    pub k_per_mm: f64,
}

impl GaussianBeam {
    /// A beam of 1/e² intensity diameter `diameter_mm` with wave number `k_per_mm`.
    pub fn new(diameter_mm: f64, k_per_mm: f64) -> GaussianBeam {
        GaussianBeam {
            radius_mm: 0.5 * diameter_mm,
            k_per_mm,
        }
    }

    /// The exponent −ln|γ| of the amplitude overlap for offset `d` = r_i − r_j (mm) and tilt
    /// `dt` = t_i − t_j: d²/(2w²) + k²w²|Δt|²/8. Degenerate cases: 0 when both vanish; +∞ for a
    /// beam of zero radius with an offset.
    pub fn overlap_exponent(&self, d: [f64; 2], dt: [f64; 2]) -> f64 {
        let w = self.radius_mm;
        let d2 = d[0] * d[0] + d[1] * d[1];
        let t2 = dt[0] * dt[0] + dt[1] * dt[1];
        let offset = if d2 == 0.0 { 0.0 } else { d2 / (2.0 * w * w) };
        let tilt = if t2 == 0.0 {
            0.0
        } else {
            self.k_per_mm * self.k_per_mm * w * w * t2 / 8.0
        };
        offset + tilt
    }

    /// The mode overlap γ_ij = ∫ g_i g_j* dA of the beams of two rays at points `ri`, `rj` (mm)
    /// with transverse directions `ti`, `tj`.
    ///
    /// # Formula
    /// γ = exp(−d²/(2w²) − k²w²|Δt|²/8) · exp(i k Δt·(r_i + r_j)/2).
    pub fn overlap(&self, ri: [f64; 2], ti: [f64; 2], rj: [f64; 2], tj: [f64; 2]) -> Complex64 {
        let d = [ri[0] - rj[0], ri[1] - rj[1]];
        let dt = [ti[0] - tj[0], ti[1] - tj[1]];
        let modulus = (-self.overlap_exponent(d, dt)).exp();
        if dt == [0.0, 0.0] {
            return Complex64::new(modulus, 0.0);
        }
        let phase = 0.5 * self.k_per_mm * (dt[0] * (ri[0] + rj[0]) + dt[1] * (ri[1] + rj[1]));
        Complex64::from_polar(modulus, phase)
    }

    /// The power coupling |γ|² of two equal beams offset by `offset_mm` and tilted by
    /// `tilt_rad` (small-angle), as Joyce & DeLoach give it.
    ///
    /// # Formula
    /// η = exp(−d²/w²) · exp(−(k w θ/2)²)  (with k = 2π n/λ: exp(−(π n w θ/λ)²)).
    pub fn power_overlap(&self, offset_mm: f64, tilt_rad: f64) -> f64 {
        (-2.0 * self.overlap_exponent([offset_mm, 0.0], [tilt_rad, 0.0])).exp()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::precision::assert_close;
    use std::f64::consts::PI;

    /// Direct 2-D quadrature of ∫ g_i g_j* dA on a square grid (the midpoint rule, which for
    /// smooth integrands that vanish at the edges is accurate far beyond what is asserted).
    fn quadrature(b: &GaussianBeam, ri: [f64; 2], ti: [f64; 2], rj: [f64; 2], tj: [f64; 2]) -> Complex64 {
        let w = b.radius_mm;
        let g = |r: [f64; 2], t: [f64; 2], x: f64, y: f64| {
            let amp = (2.0 / (PI * w * w)).sqrt() * (-((x - r[0]).powi(2) + (y - r[1]).powi(2)) / (w * w)).exp();
            Complex64::from_polar(amp, b.k_per_mm * (t[0] * x + t[1] * y))
        };
        let cx = 0.5 * (ri[0] + rj[0]);
        let cy = 0.5 * (ri[1] + rj[1]);
        let half = 6.0 * w;
        let n = 600;
        let h = 2.0 * half / n as f64;
        let mut sum = Complex64::ZERO;
        for a in 0..n {
            let x = cx - half + (a as f64 + 0.5) * h;
            for c in 0..n {
                let y = cy - half + (c as f64 + 0.5) * h;
                sum += g(ri, ti, x, y) * g(rj, tj, x, y).conj();
            }
        }
        sum * h * h
    }

    #[test]
    fn the_closed_form_matches_a_direct_quadrature() {
        // Independent method: the overlap integral summed on a grid, against the closed form,
        // for offsets and tilts in both directions (and both together, where the phase matters).
        let b = GaussianBeam::new(0.01, 2.0 * PI / 1064e-6);
        let w = b.radius_mm;
        let tilt = 1064e-6 / (PI * w); // one far-field half-angle
        for (ri, ti, rj, tj) in [
            ([0.0, 0.0], [0.0, 0.0], [0.0, 0.0], [0.0, 0.0]),
            ([0.3 * w, 0.0], [0.0, 0.0], [0.0, 0.0], [0.0, 0.0]),
            ([1.0 * w, -0.5 * w], [0.0, 0.0], [-0.4 * w, 0.2 * w], [0.0, 0.0]),
            ([0.0, 0.0], [0.3 * tilt, 0.0], [0.0, 0.0], [0.0, 0.0]),
            (
                [0.5 * w, 0.2 * w],
                [0.2 * tilt, -0.4 * tilt],
                [-0.3 * w, 0.0],
                [0.0, 0.1 * tilt],
            ),
        ] {
            let closed = b.overlap(ri, ti, rj, tj);
            let quad = quadrature(&b, ri, ti, rj, tj);
            let what = format!("overlap integral, {ri:?} {ti:?} / {rj:?} {tj:?}: closed form vs 2-D quadrature");
            assert_close(closed.re, quad.re, 1e-9, 1.0, &what);
            assert_close(closed.im, quad.im, 1e-9, 1.0, &what);
        }
    }

    #[test]
    fn the_power_coupling_is_joyce_and_deloach() {
        // Joyce & DeLoach, Appl. Opt. 23, 4187 (1984), from memory: η = exp(−d²/w²) for a lateral
        // offset, exp(−(π w θ/λ)²) for a tilt, at a common waist of equal beams.
        let lambda = 632.8e-6;
        let b = GaussianBeam::new(1.0, 2.0 * PI / lambda);
        let w = 0.5;
        assert_close(
            b.power_overlap(0.2, 0.0),
            (-(0.2f64 / w).powi(2)).exp(),
            1e-15,
            0.0,
            "offset",
        );
        let th = 2e-4;
        assert_close(
            b.power_overlap(0.0, th),
            (-(PI * w * th / lambda).powi(2)).exp(),
            1e-13,
            0.0,
            "tilt",
        );
        // |γ|² from the complex overlap is the same number.
        let g = b.overlap([0.2, 0.0], [th, 0.0], [0.0, 0.0], [0.0, 0.0]);
        assert_close(g.norm_sqr(), b.power_overlap(0.2, th), 1e-13, 0.0, "|γ|²");
    }

    #[test]
    fn degenerate_beams_do_not_give_nan() {
        let b = GaussianBeam::new(0.0, 1e4);
        assert_eq!(
            b.overlap([0.0, 0.0], [0.0, 0.0], [0.0, 0.0], [0.0, 0.0]),
            Complex64::new(1.0, 0.0)
        );
        assert_eq!(b.overlap([1.0, 0.0], [0.0, 0.0], [0.0, 0.0], [0.0, 0.0]).norm(), 0.0);
    }
}
