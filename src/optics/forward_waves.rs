//! The two forward waves of a general crystal alone, found from the forward factor of its
//! characteristic quartic: what a plate in convergent light needs at each direction, without the
//! backward waves and without the shifted QR iteration of [`crate::optics::general_modes`].
//!
//! Physics. At tangential wave vector q_t the crystal's four waves are the eigenpairs of the 4×4
//! matrix Δ of [`crate::optics::general_modes`] (q_z ψ = Δ ψ). For a lossless medium J Δ is
//! Hermitian (J the flux form), so Δ is self-adjoint under J and its characteristic polynomial
//! det(x − Δ) = x⁴ + c₃x³ + c₂x² + c₁x + c₀ has real coefficients, the optical activity included
//! (its roots come in conjugate pairs). Where all four waves propagate the four roots are real, and
//! the two forward waves, those carrying energy along +z, are in a plate lit from air the two
//! largest. Their sum S and product P follow from the largest root u₁ of the resolvent cubic of
//! Ferrari's method (Euler's form): with x = y − c₃/4 and y⁴ + p y² + q y + r the depressed
//! quartic,
//!
//! ```text
//! u³ + 2p u² + (p² − 4r) u − q² = 0,   u₁ = (y₁ + y₂)²,
//! y² − √u₁ y + B,   B = (p + u₁ + q/√u₁) / 2      (the factor of the two largest roots),
//! ```
//!
//! u₁ the largest root by Viète's trigonometric form, polished by a Newton step. S and P are
//! well conditioned even where the two forward waves coincide (along an optic axis), unlike the
//! roots themselves, whose split a polynomial fixes only to √ε there. The waves' invariant
//! subspace is then the null space of Δ² − S Δ + P (a polynomial in Δ: the same invariant
//! subspaces, and this one is found to rounding whatever the split), and the waves themselves and
//! their q_z come from the 2×2 Hermitian problem on it in the flux metric, by the very routine
//! the general solver uses ([`crate::optics::general_modes`], Rayleigh–Ritz), so that they are
//! flux-orthonormal: F(ψᵢ, ψⱼ) = δᵢⱼ. The q_z are Rayleigh quotients on an exact subspace,
//! correct to rounding however inexact S and P (tested against the general solver).
//!
//! Which answer is trusted. The answer is `None`, and the caller solves the direction by the
//! general solver, unless (a) the resolvent's largest root is found positive and the two
//! forward roots lie well above the two backward ones ([`crate::precision::FORWARD_SEPARATION`]), (b) the flux form is positive definite on the
//! subspace found, so that both waves carry energy forward (a pair holding a backward or an
//! evanescent wave is indefinite or neutral), with a margin ([`crate::precision::FORWARD_DEFINITE`]),
//! and (c) each wave solves Δψ = q_z ψ to [`crate::precision::FORWARD_RESIDUAL`] of |Δ| |ψ|. So
//! a wave running backward in q_z, a wave near grazing, an evanescent wave or any rounding
//! trouble falls back to the general path.
//!
//! Sources: the characteristic quartic of the 4×4 method: D. W. Berreman, J. Opt. Soc. Am. 62,
//! 502 (1972); Ferrari's method in Euler's form and Viète's trigonometric roots of a cubic with
//! three real roots: standard algebra (e.g. Abramowitz & Stegun §3.8.2–3.8.3, from memory); the
//! Rayleigh–Ritz step: Golub & Van Loan, *Matrix Computations*, §8.1.

use crate::optics::anisotropic::Anisotropic;
use crate::optics::general_modes::{M4, System, V4, Wave, apply, flux, mul, norm, pair_coefficients, swapped};
use crate::precision::{FORWARD_DEFINITE, FORWARD_RESIDUAL, FORWARD_SEPARATION};
use num_complex::Complex64;

type C = Complex64;

/// The two forward waves of a crystal at one tangential wave vector.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ForwardWaves {
    /// The normal components q_z of the two waves (propagating, so real), larger first.
    pub qz: [f64; 2],
    /// Their tangential fields ψ = (E_x, E_y, Z0 H_x, Z0 H_y), orthonormal under the flux form F
    /// of [`crate::optics::general_modes`]: F(ψᵢ, ψⱼ) = δᵢⱼ (unit power each, no cross flux).
    pub psi: [V4; 2],
    /// Whether the two are one degenerate pair (along an optic axis), in the general solver's
    /// documented basis.
    pub degenerate: bool,
}

/// The characteristic polynomial det(x − Δ) = x⁴ + c₃x³ + c₂x² + c₁x + c₀ of `delta` as
/// [c₃, c₂, c₁, c₀] (real parts: its coefficients are real for a lossless medium, see the header),
/// from the power sums tₖ = tr Δᵏ by Newton's identities, Δ² (`square`) given:
/// c₃ = −t₁, c₂ = −(c₃t₁ + t₂)/2, c₁ = −(c₂t₁ + c₃t₂ + t₃)/3, c₀ = −(c₁t₁ + c₂t₂ + c₃t₃ + t₄)/4,
/// with t₃ = Σ (Δ²)ᵢⱼ Δⱼᵢ and t₄ = Σ (Δ²)ᵢⱼ (Δ²)ⱼᵢ.
fn characteristic(delta: &M4, square: &M4) -> [f64; 4] {
    let (mut t1, mut t2, mut t3, mut t4) = (0.0, 0.0, 0.0, 0.0);
    for i in 0..4 {
        t1 += delta[i][i].re;
        t2 += square[i][i].re;
        for j in 0..4 {
            t3 += (square[i][j] * delta[j][i]).re;
            t4 += (square[i][j] * square[j][i]).re;
        }
    }
    let c3 = -t1;
    let c2 = -(c3 * t1 + t2) / 2.0;
    let c1 = -(c2 * t1 + c3 * t2 + t3) / 3.0;
    let c0 = -(c1 * t1 + c2 * t2 + c3 * t3 + t4) / 4.0;
    [c3, c2, c1, c0]
}

/// The two largest roots of a real quartic as one quadratic factor x² − S x + P, and the larger
/// root of the other factor (the top of the backward pair).
#[derive(Debug, Clone, Copy)]
struct Factors {
    sum: f64,
    product: f64,
    backward_top: f64,
}

/// The factors of the real quartic x⁴ + c₃x³ + c₂x² + c₁x + c₀ (see the header) from the
/// largest root of its resolvent cubic, or `None` unless the depressed resolvent t³ + P t + Q has
/// P < 0 and that root is positive. Where the quartic has complex roots the cubic has one real
/// root, the trigonometric form (its argument clamped) gives a number that is not one, and the
/// factor found is no factor: [`forward_waves`]'s checks decline it.
fn factors([c3, c2, c1, c0]: [f64; 4]) -> Option<Factors> {
    // Depressed quartic y⁴ + p y² + q y + r, x = y + a.
    let a = -0.25 * c3;
    let p = c2 - 0.375 * c3 * c3;
    let q = c1 - 0.5 * c3 * c2 + 0.125 * c3 * c3 * c3;
    let r = c0 - 0.25 * c3 * c1 + c3 * c3 * c2 / 16.0 - 3.0 * c3.powi(4) / 256.0;
    // Resolvent u³ + 2p u² + (p² − 4r) u − q², depressed by u = t − 2p/3: t³ + P t + Q.
    let (b, c, d) = (2.0 * p, p * p - 4.0 * r, -q * q);
    let big_p = c - b * b / 3.0;
    let big_q = 2.0 * b * b * b / 27.0 - b * c / 3.0 + d;
    (big_p < 0.0).then_some(())?;
    let m = 2.0 * (-big_p / 3.0).sqrt();
    let cos3 = (3.0 * big_q / (big_p * m)).clamp(-1.0, 1.0);
    let mut u = m * (cos3.acos() / 3.0).cos() - b / 3.0;
    // One Newton step on the resolvent, kept where it lowers the residual.
    let resolvent = |u: f64| ((u + b) * u + c) * u + d;
    let slope = (3.0 * u + 2.0 * b) * u + c;
    if slope != 0.0 {
        let polished = u - resolvent(u) / slope;
        if resolvent(polished).abs() < resolvent(u).abs() {
            u = polished;
        }
    }
    (u > 0.0 && u.is_finite()).then_some(())?;
    // y² − √u y + B and y² + √u y + C, B + C = p + u, √u (B − C) = q.
    let root = u.sqrt();
    let (big_b, big_c) = (0.5 * (p + u + q / root), 0.5 * (p + u - q / root));
    Some(Factors {
        sum: root + 2.0 * a,
        product: big_b + a * root + a * a,
        backward_top: 0.5 * (-root + (u - 4.0 * big_c).max(0.0).sqrt()) + a,
    })
}

/// The three indices of 0..4 other than `k`, in order.
fn others(k: usize) -> [usize; 3] {
    match k {
        0 => [1, 2, 3],
        1 => [0, 2, 3],
        2 => [0, 1, 3],
        _ => [0, 1, 2],
    }
}

/// An orthonormal basis of the null space of `a`, a 4×4 matrix of rank 2 to rounding, as the
/// general solver's null basis finds it (Gaussian elimination with complete pivoting, back
/// substitution with each free unknown set to 1 in turn, then Gram–Schmidt), written out for
/// this one case: rows and columns are taken by index rather than moved, and each pivot inverted
/// once. `None` when a pivot is zero.
fn null_pair(a: &M4) -> Option<[V4; 2]> {
    let largest = |size: usize, at: &dyn Fn(usize, usize) -> C| {
        let (mut best, mut pos) = (0.0, (0, 0));
        for i in 0..size {
            for j in 0..size {
                let m = at(i, j).norm_sqr();
                if m > best {
                    (best, pos) = (m, (i, j));
                }
            }
        }
        (best > 0.0).then_some(pos)
    };
    let (r0, c0) = largest(4, &|i, j| a[i][j])?;
    let inv0 = a[r0][c0].inv();
    let (rows, cols) = (others(r0), others(c0));
    // The 3×3 left once row r0 has eliminated column c0.
    let mut b = [[C::ZERO; 3]; 3];
    for (brow, &r) in b.iter_mut().zip(&rows) {
        let f = a[r][c0] * inv0;
        for (x, &c) in brow.iter_mut().zip(&cols) {
            *x = a[r][c] - f * a[r0][c];
        }
    }
    let (r1, c1) = largest(3, &|i, j| b[i][j])?;
    let inv1 = b[r1][c1].inv();
    let mut out = [[C::ZERO; 4]; 2];
    for (v, free) in out.iter_mut().zip((0..3).filter(|&j| j != c1)) {
        v[cols[free]] = C::ONE;
        v[cols[c1]] = -b[r1][free] * inv1;
        let sum = a[r0][cols[free]] + a[r0][cols[c1]] * v[cols[c1]];
        v[c0] = -sum * inv0;
    }
    // Gram–Schmidt (Hermitian).
    let [first, second] = out;
    let n0 = norm(&first);
    let first = first.map(|z| z / n0);
    let p: C = first.iter().zip(&second).map(|(x, y)| x.conj() * y).sum();
    let second: V4 = std::array::from_fn(|i| second[i] - p * first[i]);
    let n1 = norm(&second);
    (n1 > 0.0).then(|| [first, second.map(|z| z / n1)])
}

/// The two forward waves of `medium` (face frame, face ⊥ z) at tangential wave vector `qt` from
/// the forward factor of the characteristic quartic (module header); `None` where that answer is
/// not trusted (a wave evanescent, grazing or running backward in q_z, or rounding trouble), for
/// the general solver to answer.
pub fn forward_waves(medium: &Anisotropic, qt: [f64; 2]) -> Option<ForwardWaves> {
    let sys = System::new(medium, qt);
    let delta = &sys.delta;
    let square = mul(delta, delta);
    let f = factors(characteristic(delta, &square))?;
    let scale = delta.iter().flatten().map(|z| z.norm_sqr()).fold(0.0, f64::max).sqrt();
    // The forward pair well apart from the backward one (its lower root is at least S/2 minus
    // half the split, S/2 − √(S²/4 − P)).
    let lower = 0.5 * f.sum - (0.25 * f.sum * f.sum - f.product).max(0.0).sqrt();
    (lower - f.backward_top > FORWARD_SEPARATION * scale).then_some(())?;
    // Δ² − S Δ + P: null on the forward pair's invariant subspace.
    let mut pair = square;
    for (i, (row, drow)) in pair.iter_mut().zip(delta).enumerate() {
        for (x, d) in row.iter_mut().zip(drow) {
            *x -= f.sum * d;
        }
        row[i] += f.product;
    }
    let u = null_pair(&pair)?;
    // The flux form on the subspace: positive definite, with a margin.
    let (g00, g11) = (flux(&u[0], &u[0]).re, flux(&u[1], &u[1]).re);
    let g10 = flux(&u[1], &u[0]);
    let trace = g00 + g11;
    (g00 > 0.0 && g11 > 0.0 && g00 * g11 - g10.norm_sqr() > FORWARD_DEFINITE * trace * trace).then_some(())?;
    let du = [apply(delta, &u[0]), apply(delta, &u[1])];
    let (waves, degenerate) = pair_coefficients(&sys, &u, &du, 1.0);
    let mut out = ForwardWaves {
        qz: [0.0; 2],
        psi: [[C::ZERO; 4]; 2],
        degenerate,
    };
    for (k, (qz, c)) in waves.iter().enumerate() {
        let psi: V4 = std::array::from_fn(|i| c[0] * u[0][i] + c[1] * u[1][i]);
        let moved: V4 = std::array::from_fn(|i| c[0] * du[0][i] + c[1] * du[1][i]);
        let residual: V4 = std::array::from_fn(|i| moved[i] - qz * psi[i]);
        (norm(&residual) <= FORWARD_RESIDUAL * scale * norm(&psi)).then_some(())?;
        // Unit flux (the degenerate pair's second wave is only flux-orthogonal to the first).
        let f = flux(&psi, &psi).re;
        (f > 0.0).then_some(())?;
        out.qz[k] = *qz;
        out.psi[k] = psi.map(|z| z / f.sqrt());
    }
    Some(out)
}

/// The forward waves' q_z in the medium's slots (its first letter first, as
/// [`crate::optics::general_modes::general_modes`] puts them), where [`forward_waves`] answers.
pub fn forward_qz_in_slots(medium: &Anisotropic, qt: [f64; 2]) -> Option<[f64; 2]> {
    let w = forward_waves(medium, qt)?;
    let waves = [0, 1].map(|k| Wave {
        qz: C::from(w.qz[k]),
        psi: w.psi[k],
        propagating: true,
    });
    Some(if !w.degenerate && swapped(medium, qt, &waves) {
        [w.qz[1], w.qz[0]]
    } else {
        w.qz
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::anisotropic::orientation;
    use crate::optics::general_modes::general_modes;
    use crate::optics::modes::Travel;
    use crate::random::Rng;

    fn medium(principal: [f64; 3], r: nalgebra::Matrix3<f64>, chirality: [f64; 3]) -> Anisotropic {
        Anisotropic::new(principal, r, chirality).unwrap()
    }

    /// Independent method: against the general solver (its shifted QR iteration and the scores of
    /// all four waves) over generated crystals, biaxial, uniaxial and chiral, near and on optic
    /// axes, and directions out to the largest |q_t| below every index: the same two q_z to
    /// 1e-12, and each of the general solver's forward waves (unit flux) inside the span of the
    /// two found here to 1e-12 (its coefficients on them, by the flux form, rebuild it), and the
    /// q_z in the solver's slots. Where an answer is given the general solver's waves propagate.
    #[test]
    fn the_forward_waves_are_the_general_solver_s() {
        let mut rng = Rng::new(0xf0_7a7d);
        let (mut answered, mut worst_q, mut worst_psi) = (0, 0.0f64, 0.0f64);
        let cases = 6000;
        for case in 0..cases {
            let principal = match case % 4 {
                0 => {
                    let no = 1.4 + 0.8 * rng.uniform();
                    [no, no, 1.4 + 0.8 * rng.uniform()]
                }
                _ => [0; 3].map(|_| 1.4 + 0.8 * rng.uniform()),
            };
            let chirality = if case % 3 == 0 {
                [0; 3].map(|_| 1e-3 * rng.normal())
            } else {
                [0.0; 3]
            };
            let m = medium(
                principal,
                orientation(3.0 * rng.uniform(), 6.0 * rng.uniform(), 6.0 * rng.uniform()),
                chirality,
            );
            // Along an optic axis now and then (the degenerate pair), else a random direction
            // with |q_t| up to the smallest index.
            let qt = match (case % 7, m.optic_axes()) {
                (0, Some([axis, _])) => {
                    let n = m.indices_along(axis).0;
                    let axis = if axis.z < 0.0 { -axis } else { axis };
                    [n * axis.x, n * axis.y]
                }
                _ => {
                    let smallest = principal.iter().copied().fold(f64::INFINITY, f64::min);
                    let (r, a) = (smallest * rng.uniform().sqrt(), std::f64::consts::TAU * rng.uniform());
                    [r * a.cos(), r * a.sin()]
                }
            };
            let want = general_modes(&m, qt, Travel::Forward);
            let Some(got) = forward_waves(&m, qt) else {
                continue;
            };
            answered += 1;
            assert!(
                want.iter().all(|w| w.propagating),
                "case {case}: answered an evanescent pair"
            );
            let mut wq = [want[0].qz().re, want[1].qz().re];
            wq.sort_by(|a, b| b.total_cmp(a));
            for (w, g) in wq.iter().zip(&got.qz) {
                worst_q = worst_q.max((w - g).abs());
                assert!((w - g).abs() < 1e-12, "case {case}: q_z {w} against {g}");
            }
            for w in &want {
                let psi = w.tangential();
                let coeffs = got.psi.map(|g| flux(&g, &psi));
                let rebuilt: V4 = std::array::from_fn(|i| coeffs[0] * got.psi[0][i] + coeffs[1] * got.psi[1][i]);
                let off = norm(&std::array::from_fn(|i| psi[i] - rebuilt[i])) / norm(&psi);
                worst_psi = worst_psi.max(off);
                assert!(off < 1e-12, "case {case}: a wave {off} outside the span");
            }
            let slots = forward_qz_in_slots(&m, qt).unwrap();
            for (w, g) in want.iter().zip(&slots) {
                assert!(
                    (w.qz().re - g).abs() < 1e-12,
                    "case {case}: slot q_z {} against {g}",
                    w.qz().re
                );
            }
            for i in 0..2 {
                for j in 0..2 {
                    let f = flux(&got.psi[i], &got.psi[j]);
                    let want = if i == j { 1.0 } else { 0.0 };
                    assert!((f - want).norm() < 1e-13, "case {case}: F({i}, {j}) = {f}");
                }
            }
        }
        eprintln!("{answered} of {cases} answered; worst q_z {worst_q:.1e}, span {worst_psi:.1e}");
        assert!(answered > cases * 9 / 10, "{answered} of {cases} answered");
    }

    /// Declined, for the general solver: waves evanescent (|q_t| beyond an index, or beyond
    /// them all), a wave grazing the face (q_z = 0.005, found by bisection on the general
    /// solver's), and an isotropic chiral crystal exactly at its critical angle; answered well
    /// inside every index.
    #[test]
    fn evanescent_and_grazing_waves_are_left_to_the_general_solver() {
        let m = medium([1.74, 1.75, 1.83], orientation(0.4, 1.1, -0.6), [0.0; 3]);
        for qt in [[2.0, 0.3], [0.0, 1.79], [0.0, 1.9]] {
            assert!(general_modes(&m, qt, Travel::Forward).iter().any(|w| !w.propagating));
            assert_eq!(forward_waves(&m, qt), None, "{qt:?}");
        }
        // The lower forward q_z along x: falls to 0 where that wave turns evanescent.
        let lowest = |x: f64| {
            let waves = general_modes(&m, [x, 0.0], Travel::Forward);
            waves
                .iter()
                .map(|w| if w.propagating { w.qz().re } else { -1.0 })
                .fold(f64::INFINITY, f64::min)
        };
        let (mut inside, mut beyond) = (1.0, 2.0);
        for _ in 0..60 {
            let mid = 0.5 * (inside + beyond);
            if lowest(mid) > 0.005 {
                inside = mid;
            } else {
                beyond = mid;
            }
        }
        assert!((lowest(inside) - 0.005).abs() < 1e-6);
        assert_eq!(forward_waves(&m, [inside, 0.0]), None, "grazing at q_x = {inside}");
        let isotropic = medium([1.6; 3], orientation(0.3, 0.2, 0.1), [2e-3; 3]);
        assert_eq!(forward_waves(&isotropic, [1.6, 0.0]), None);
        assert!(forward_waves(&m, [0.5, -0.3]).is_some());
    }

    /// The characteristic polynomial's roots are Δ's eigenvalues: checked against the general
    /// solver's q_z (its shifted QR iteration) by the polynomial's value there.
    #[test]
    fn the_characteristic_polynomial_vanishes_at_the_waves() {
        let mut rng = Rng::new(21);
        for _ in 0..200 {
            let m = medium(
                [0; 3].map(|_| 1.4 + 0.8 * rng.uniform()),
                orientation(3.0 * rng.uniform(), 6.0 * rng.uniform(), 6.0 * rng.uniform()),
                [0; 3].map(|_| 1e-3 * rng.normal()),
            );
            let qt = [rng.uniform() - 0.5, rng.uniform() - 0.5];
            let delta = System::new(&m, qt).delta;
            let c = characteristic(&delta, &mul(&delta, &delta));
            for travel in [Travel::Forward, Travel::Backward] {
                for mode in general_modes(&m, qt, travel) {
                    let x = mode.qz().re;
                    let value = (((x + c[0]) * x + c[1]) * x + c[2]) * x + c[3];
                    assert!(value.abs() < 1e-12, "p({x}) = {value}");
                }
            }
        }
    }
}
