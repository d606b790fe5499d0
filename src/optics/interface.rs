//! Transmission of plane-wave modes across one plate face: bare (Fresnel) and ideal (lossless).
//!
//! Physics. At a face z = const the tangential components (E_x, E_y, H_x, H_y) are continuous.
//! With two incident modes on one side, two reflected modes on the same side and two transmitted
//! modes on the other, each incident mode gives four linear equations in the four unknown
//! amplitudes (r₁, r₂, t₁, t₂):
//!
//! ```text
//! F(inc) + r₁ F(refl₁) + r₂ F(refl₂) = t₁ F(trans₁) + t₂ F(trans₂),   F = (E_x, E_y, Z0H_x, Z0H_y)
//! ```
//!
//! solved as a 4×4 complex system (LU). Because every propagating mode is normalized to unit
//! power flux across the face (see [`crate::optics::modes`]), |t|² and |r|² are powers, and for lossless
//! media Σ|t|² + Σ|r|² = 1 over propagating modes (checked in the tests). This is the anisotropic
//! generalization of the Fresnel equations; see P. Yeh, *Optical Waves in Layered Media* (1988),
//! ch. 9, and D. W. Berreman, J. Opt. Soc. Am. 62, 502 (1972).
//!
//! Ideal faces. An ideal anti-reflection face reflects nothing and loses nothing, but the way the
//! incident field divides between the crystal's two modes must still follow the boundary. We take
//! the *lossless part* of the bare-face transmission T: its unitary polar factor U (T = U P, P
//! Hermitian positive), computed in closed form (see [`lossless_part`]); when one mode is
//! evanescent T has rank one and U = T/‖T‖, so that mode still receives nothing. U is the unitary
//! map closest to T (K. Fan and A. J. Hoffman, Proc. AMS 6, 111 (1955)); at normal incidence
//! T is diagonal in the mode basis and U reduces to projecting the field onto each mode's
//! transverse field, the textbook rule. This choice is documented in DEVELOPERS.md.

use crate::optics::modes::Mode;
use nalgebra::{Matrix2, Matrix4};
use num_complex::Complex64;

/// Complex 2×2 matrix.
pub type CMatrix2 = Matrix2<Complex64>;

/// How the faces of crystal plates are treated (the contract's `interface_losses`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Losses {
    /// Perfect anti-reflection faces: the lossless part of the Fresnel coupling.
    Ideal,
    /// Bare faces: Fresnel transmission of each mode; reflected light is lost (not traced).
    Uncoated,
}

/// The solved boundary problem at one face, in power-normalized amplitudes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FaceCoupling {
    /// Transmission: entry (i, j) is the amplitude of transmitted mode i for unit incident mode j.
    pub t: CMatrix2,
    /// Reflection: entry (i, j) is the amplitude of reflected mode i for unit incident mode j.
    pub r: CMatrix2,
    /// Which transmitted modes propagate (an evanescent one carries no power).
    pub t_propagating: [bool; 2],
    /// Which reflected modes propagate.
    pub r_propagating: [bool; 2],
}

impl FaceCoupling {
    /// Transmitted plus reflected power for unit power in incident mode `j`, counting only
    /// propagating modes. Equals 1 for lossless media.
    #[cfg(test)]
    pub fn power_balance(&self, j: usize) -> f64 {
        let mut sum = 0.0;
        for i in 0..2 {
            if self.t_propagating[i] {
                sum += self.t[(i, j)].norm_sqr();
            }
            if self.r_propagating[i] {
                sum += self.r[(i, j)].norm_sqr();
            }
        }
        sum
    }

    /// The transmission matrix with rows of evanescent transmitted modes set to zero: what
    /// actually carries power away from the face.
    pub fn propagating_t(&self) -> CMatrix2 {
        let mut t = self.t;
        for i in 0..2 {
            if !self.t_propagating[i] {
                t[(i, 0)] = Complex64::ZERO;
                t[(i, 1)] = Complex64::ZERO;
            }
        }
        t
    }
}

/// Solves the boundary conditions at a bare face.
///
/// `incident` are the two modes arriving at the face, `reflected` the two leaving it on the same
/// side, `transmitted` the two leaving it on the far side, all at the same tangential wave vector.
/// Returns `None` only when the system is singular (no unique solution), which does not happen
/// for media with positive indices away from exactly grazing incidence.
pub fn bare_face(incident: &[Mode; 2], reflected: &[Mode; 2], transmitted: &[Mode; 2]) -> Option<FaceCoupling> {
    let mut m = Matrix4::<Complex64>::zeros();
    for (col, mode) in [(0, &reflected[0]), (1, &reflected[1])] {
        let f = mode.tangential();
        for row in 0..4 {
            m[(row, col)] = -f[row];
        }
    }
    for (col, mode) in [(2, &transmitted[0]), (3, &transmitted[1])] {
        let f = mode.tangential();
        for row in 0..4 {
            m[(row, col)] = f[row];
        }
    }
    let rhs = [incident[0].tangential(), incident[1].tangential()];
    let x = solve4(m, rhs)?;
    if x.iter().flatten().any(|z| !(z.re.is_finite() && z.im.is_finite())) {
        return None;
    }
    let t = CMatrix2::new(x[0][2], x[1][2], x[0][3], x[1][3]);
    let r = CMatrix2::new(x[0][0], x[1][0], x[0][1], x[1][1]);
    Some(FaceCoupling {
        t,
        r,
        t_propagating: [transmitted[0].propagating, transmitted[1].propagating],
        r_propagating: [reflected[0].propagating, reflected[1].propagating],
    })
}

/// Solves m·x = b for both right-hand sides `b` (each a column of four) by Gaussian elimination
/// with partial pivoting (the largest |re| + |im| in the column, as an LU decomposition takes
/// it); `None` when a pivot is zero (a singular system). Written out for the one size the faces
/// need: it is the face solve's inner loop.
fn solve4(mut m: Matrix4<Complex64>, b: [[Complex64; 4]; 2]) -> Option<[[Complex64; 4]; 2]> {
    let size = |z: Complex64| z.re.abs() + z.im.abs();
    let mut x = b;
    for col in 0..4 {
        let pivot = (col..4).max_by(|&i, &j| size(m[(i, col)]).total_cmp(&size(m[(j, col)])))?;
        if size(m[(pivot, col)]) == 0.0 {
            return None;
        }
        if pivot != col {
            m.swap_rows(pivot, col);
            for v in &mut x {
                v.swap(pivot, col);
            }
        }
        let inv = m[(col, col)].inv();
        for row in col + 1..4 {
            let f = m[(row, col)] * inv;
            if f == Complex64::ZERO {
                continue;
            }
            for k in col + 1..4 {
                let a = m[(col, k)];
                m[(row, k)] -= f * a;
            }
            for v in &mut x {
                let a = v[col];
                v[row] -= f * a;
            }
        }
    }
    for v in &mut x {
        for row in (0..4).rev() {
            let mut acc = v[row];
            for k in row + 1..4 {
                acc -= m[(row, k)] * v[k];
            }
            v[row] = acc / m[(row, row)];
        }
    }
    Some(x)
}

/// The lossless part of a transmission matrix: its unitary polar factor U (T = U P with P
/// Hermitian positive) when `t` is invertible, and T/‖T‖ (the partial isometry w₁v₁ᴴ of its one
/// singular triplet) when `t` has rank one.
///
/// Formula: for 2×2 matrices Cayley–Hamilton gives P + det(P) P⁻¹ = tr(P) I, hence
/// `M = T + |det T| T⁻ᴴ = tr(P) U` and U = M √2 / ‖M‖_F, in closed form and accurate for every
/// well-conditioned T (an iterative SVD loses digits when the singular values nearly coincide).
///
/// Degenerate cases: a zero matrix gives a zero matrix; a rank-one matrix (one mode evanescent)
/// gives T/‖T‖_F.
pub fn lossless_part(t: &CMatrix2) -> CMatrix2 {
    let norm = t.norm();
    if norm.is_nan() || norm <= 0.0 || norm.is_infinite() {
        return CMatrix2::zeros();
    }
    let t = t / Complex64::from(norm);
    let det = t[(0, 0)] * t[(1, 1)] - t[(0, 1)] * t[(1, 0)];
    // σ1σ2 = |det| for the scaled T (σ1² + σ2² = 1): rank one when σ2 ≈ 0.
    if det.norm() <= 1e-14 {
        return t;
    }
    // |det T| T⁻ᴴ = |det T| / conj(det T) · adj(T)ᴴ, with adj(T) = [[d, −b], [−c, a]].
    let adj = CMatrix2::new(t[(1, 1)], -t[(0, 1)], -t[(1, 0)], t[(0, 0)]);
    let m = t + adj.adjoint() * (Complex64::from(det.norm()) / det.conj());
    m * Complex64::from(2f64.sqrt() / m.norm())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::modes::{Travel, crystal_modes, isotropic_modes};
    use crate::optics::uniaxial::Uniaxial;

    fn crystal(no: f64, ne: f64, tilt: f64, az: f64) -> Uniaxial {
        Uniaxial::from_numbers(no, ne, tilt, az).unwrap()
    }

    fn qt_of(n: f64, polar_deg: f64, az_deg: f64) -> [f64; 2] {
        let (p, a) = (polar_deg.to_radians(), az_deg.to_radians());
        [n * p.sin() * a.cos(), n * p.sin() * a.sin()]
    }

    #[test]
    fn isotropic_limit_reproduces_the_fresnel_equations() {
        // Fresnel amplitude coefficients (Born & Wolf §1.5.2) for n1 = 1 → n2 = 1.5 at 40°, in
        // the power-normalized form t·√(n2 cosθt / n1 cosθi).
        let (n1, n2, th) = (1.0f64, 1.5f64, 40f64.to_radians());
        let tt = (n1 * th.sin() / n2).asin();
        let ts = 2.0 * n1 * th.cos() / (n1 * th.cos() + n2 * tt.cos());
        let tp = 2.0 * n1 * th.cos() / (n2 * th.cos() + n1 * tt.cos());
        let norm = (n2 * tt.cos() / (n1 * th.cos())).sqrt();
        let cr = crystal(n2, n2, 33.0, 71.0);
        let qt = qt_of(n1, 40.0, 0.0);
        let inc = isotropic_modes(n1, qt, Travel::Forward);
        let refl = isotropic_modes(n1, qt, Travel::Backward);
        let trans = crystal_modes(&cr, qt, Travel::Forward);
        let fc = bare_face(&inc, &refl, &trans).unwrap();
        // In the plane of incidence x–z: e1 is p-polarized, e2 is s-polarized.
        let sv = fc.t.column(1).norm();
        let pv = fc.t.column(0).norm();
        assert!((sv - ts * norm).abs() < 1e-13, "s: {sv} vs {}", ts * norm);
        assert!((pv - tp * norm).abs() < 1e-13, "p: {pv} vs {}", tp * norm);
        assert!((fc.power_balance(0) - 1.0).abs() < 1e-13);
        assert!((fc.power_balance(1) - 1.0).abs() < 1e-13);
    }

    #[test]
    fn normal_incidence_uniaxial_transmission() {
        // At normal incidence each mode sees its own index: T = 4 n1 n / (n1 + n)², with the
        // e-mode's effective index n(θ) (Yariv & Yeh, Optical Waves in Crystals, §4.6).
        let cr = crystal(1.6557, 1.4849, 45.0, 0.0);
        let inc = isotropic_modes(1.0, [0.0, 0.0], Travel::Forward);
        let refl = isotropic_modes(1.0, [0.0, 0.0], Travel::Backward);
        let trans = crystal_modes(&cr, [0.0, 0.0], Travel::Forward);
        let fc = bare_face(&inc, &refl, &trans).unwrap();
        // The ordinary mode is polarized along y (q × c with c in x–z), so it takes e2.
        let to = fc.t[(0, 1)].norm_sqr();
        let expect_o = 4.0 * 1.6557 / (2.6557f64 * 2.6557);
        assert!((to - expect_o).abs() < 1e-13, "{to} vs {expect_o}");
        let ne_eff = trans[1].qz().re;
        let te = fc.t[(1, 0)].norm_sqr();
        let expect_e = 4.0 * ne_eff / ((1.0 + ne_eff) * (1.0 + ne_eff));
        assert!((te - expect_e).abs() < 1e-12, "{te} vs {expect_e}");
    }

    #[test]
    fn energy_is_conserved_at_oblique_incidence_both_ways() {
        for (tilt, az, polar, paz) in [
            (45.0, 0.0, 30.0, 0.0),
            (60.0, 33.0, 50.0, 100.0),
            (5.0, 80.0, 70.0, -40.0),
        ] {
            let cr = crystal(1.6557, 1.4849, tilt, az);
            let qt = qt_of(1.0, polar, paz);
            let out = isotropic_modes(1.0, qt, Travel::Forward);
            let out_back = isotropic_modes(1.0, qt, Travel::Backward);
            let fwd = crystal_modes(&cr, qt, Travel::Forward);
            let back = crystal_modes(&cr, qt, Travel::Backward);
            let entry = bare_face(&out, &out_back, &fwd).unwrap();
            let exit = bare_face(&fwd, &back, &out).unwrap();
            for j in 0..2 {
                assert!((entry.power_balance(j) - 1.0).abs() < 1e-12);
                assert!((exit.power_balance(j) - 1.0).abs() < 1e-12);
            }
            let u = lossless_part(&entry.t);
            let id = u.adjoint() * u;
            assert!((id - CMatrix2::identity()).norm() < 1e-13, "ideal face unitary");
        }
    }

    #[test]
    fn lossless_part_of_a_rank_one_matrix_is_a_partial_isometry() {
        let t = CMatrix2::new(0.6.into(), 0.3.into(), 0.0.into(), 0.0.into());
        let u = lossless_part(&t);
        assert!(u[(1, 0)].norm() < 1e-15 && u[(1, 1)].norm() < 1e-15);
        assert!((u.row(0).norm() - 1.0).abs() < 1e-14);
        assert_eq!(lossless_part(&CMatrix2::zeros()), CMatrix2::zeros());
    }

    /// Independent method: the written-out elimination against nalgebra's LU on random complex
    /// systems (and a singular one refused).
    #[test]
    fn the_face_solve_agrees_with_a_general_lu() {
        let mut rng = crate::random::Rng::new(9);
        let mut z = || Complex64::new(rng.normal(), rng.normal());
        for _ in 0..500 {
            let m = Matrix4::from_fn(|_, _| z());
            let b = [[z(), z(), z(), z()], [z(), z(), z(), z()]];
            let ours = solve4(m, b).unwrap();
            let lu = m.lu();
            for (k, col) in b.iter().enumerate() {
                let theirs = lu.solve(&nalgebra::Vector4::from(*col)).unwrap();
                for i in 0..4 {
                    assert!((ours[k][i] - theirs[i]).norm() < 1e-10 * (1.0 + theirs[i].norm()));
                }
            }
        }
        let mut singular = Matrix4::from_fn(|i, j| Complex64::from((i + j) as f64));
        singular.set_column(3, &singular.column(0).clone_owned());
        let b = [[Complex64::ONE; 4]; 2];
        assert!(solve4(singular, b).is_none_or(|x| x.iter().flatten().any(|z| !z.re.is_finite() || z.norm() > 1e12)));
    }
}
