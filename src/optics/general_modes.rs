//! Plane-wave modes of a general crystal (biaxial and/or optically active) at one tangential wave
//! vector: the same two-mode interface as [`crate::optics::modes::crystal_modes`], by the 4×4
//! first-order method.
//!
//! Physics. In the face frame (face ⊥ z) a plane wave e^{i k0 (q_t·r + q_z z)} of the medium of
//! [`crate::optics::anisotropic`] obeys, with E dimensionless and h = Z0 H,
//!
//! ```text
//! q × E = B = h − iκE,     q × h = −D = −(εE + iκh).
//! ```
//!
//! The z rows hold no q_z: they give (E_z, h_z) in terms of the tangential fields
//! ψ = (E_x, E_y, h_x, h_y), and the other four rows become q_z ψ = Δ ψ (D. W. Berreman, J. Opt.
//! Soc. Am. 62, 502 (1972); P. Yeh, *Optical Waves in Layered Media*, ch. 9). Its four eigenvalues
//! (the complex Schur form's diagonal, by a short shifted QR iteration checked against nalgebra's
//! Schur decomposition) are the normal components of the four waves. The normal energy
//! flux is S_z = Re(E × h*)_z = ψᴴ J ψ; for a lossless medium (ε real symmetric, κ real
//! symmetric: the constitutive matrix is Hermitian) J Δ is Hermitian, so waves of different q_z
//! carry no cross flux, and each pair of propagating waves is found as the two flux-orthonormal
//! eigenvectors of the 2×2 Hermitian problem on their invariant subspace (Rayleigh–Ritz with the
//! flux metric). This keeps the two modes power-orthogonal to rounding however close they are,
//! so that power is accounted across a face near a degenerate direction.
//!
//! Roots. A root whose imaginary part exceeds [`EVANESCENT_ROOT`] (relative) is evanescent and
//! travels the way it decays (Im q_z > 0 forward); a real root travels the way its energy flows
//! (the sign of S_z of its null vector). Never NaN: when rounding leaves other than two roots each
//! way (at grazing incidence), the two most forward (or backward) are taken.
//!
//! Which slot is which ([`ModeKind::Ordinary`] holds the medium's first letter,
//! [`Anisotropic::letters`]):
//! - a propagating wave is on the inner sheet of the index surface (it is the fast wave, `f`) when
//!   its index |q| is below the mean of the two indices of the non-chiral crystal along its own wave
//!   normal q/|q| (the eigenvalues of the transverse part of ε⁻¹). The test is of the wave itself,
//!   so a ray keeps its letter from face to face. `f` is first for a biaxial crystal; for a uniaxial
//!   one `o` is the ordinary (or, when chiral, ordinary-like) wave: the inner sheet when
//!   n_e > n_o, the outer one when n_e < n_o. If both waves fall on one side (which only rounding
//!   near an optic axis does) the lower |q| is the inner one;
//! - beside one propagating wave, the evanescent one takes the other slot;
//! - two evanescent waves: for a uniaxial crystal the one whose q_z² is nearer the ordinary root
//!   n_o² − |q_t|² is `o`; for a biaxial crystal the one decaying faster is `f` (the lower index
//!   gives the faster decay in an isotropic medium).
//!
//! Degenerate directions (two waves with one q_z to [`DEGENERATE_MODES`]: a uniaxial crystal along
//! its axis, a biaxial one along a binormal, where conical refraction happens): any field of the
//! pair is a mode, and the basis is fixed as the uniaxial closed form fixes it. The first slot's
//! displacement D is perpendicular to x̂ when |q_x| ≤ |q_y| and to ŷ otherwise (so D ∥ q × x̂ or
//! q × ŷ for a transverse D); the second is the wave of the pair that carries no cross flux with
//! it across the face (for a uniaxial crystal D₂ ∥ D₁ × q). Two degenerate evanescent waves
//! (an isotropic crystal beyond its critical angle) take the same first wave and the second
//! orthogonal to it in ψ.
//!
//! Normalization as in [`crate::optics::modes`]: |S_z| = 1 when propagating, |E| = 1 when
//! evanescent; the phase makes E's largest component real and positive (so a non-chiral wave's
//! fields are real).
//!
//! Optical activity, sign: with κ₁ = κ₂ = κ along the optic axis of a uniaxial crystal, the two
//! waves along the axis are circular with indices n_o ± κ, and linear light's azimuth (from +x
//! toward +y, looking along +z, the direction of travel) changes by −k0 κ per unit length: a
//! positive κ turns the plane of polarization clockwise as seen by an observer looking toward the
//! source, which is a right-handed (dextrorotatory) crystal in CONVENTIONS.md's sense (tested).
//!
//! Moduli are taken as √(|z|²), never by `hypot` (which `Complex64::norm` uses): the square root
//! is correctly rounded on every platform while `hypot` is not, and a thick plate multiplies a
//! last-digit difference in q_z by k0·L ~ 10⁵, so this keeps the page's module and the command
//! line to the same digits.

use crate::optics::anisotropic::{Anisotropic, ModeLetters};
use crate::optics::modes::{CVector3, Mode, ModeKind, Travel};
use crate::precision::{DEGENERATE_MODES, EIGEN_SWEEPS, EVANESCENT_ROOT};
use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

// The 4×4 algebra is written on plain arrays with a handful of loops (and the eigenvalues by a
// short shifted QR iteration): the page's WebAssembly module carries every routine the trace can
// reach, and generic matrix code for one more element type weighs several times as much.
type C = Complex64;
/// Tangential fields ψ = (E_x, E_y, h_x, h_y).
pub(crate) type V4 = [C; 4];
/// A 4×4 matrix, rows first.
pub(crate) type M4 = [[C; 4]; 4];

pub(crate) fn mul(a: &M4, b: &M4) -> M4 {
    let mut out = [[C::ZERO; 4]; 4];
    for (row, a_row) in out.iter_mut().zip(a) {
        for (aik, b_row) in a_row.iter().zip(b) {
            for (o, bkj) in row.iter_mut().zip(b_row) {
                *o += aik * bkj;
            }
        }
    }
    out
}

fn dot(row: &V4, v: &V4) -> C {
    row[0] * v[0] + row[1] * v[1] + row[2] * v[2] + row[3] * v[3]
}

pub(crate) fn apply(a: &M4, v: &V4) -> V4 {
    [dot(&a[0], v), dot(&a[1], v), dot(&a[2], v), dot(&a[3], v)]
}

/// a − λ I.
fn shifted(a: &M4, l: C) -> M4 {
    let mut m = *a;
    for (i, row) in m.iter_mut().enumerate() {
        row[i] -= l;
    }
    m
}

/// x a + y b.
fn combine(a: &V4, x: C, b: &V4, y: C) -> V4 {
    [
        a[0] * x + b[0] * y,
        a[1] * x + b[1] * y,
        a[2] * x + b[2] * y,
        a[3] * x + b[3] * y,
    ]
}

pub(crate) fn norm(v: &V4) -> f64 {
    v.iter().map(|z| z.norm_sqr()).sum::<f64>().sqrt()
}

/// The flux form F(a, b) = aᴴ J b, with S_z = F(ψ, ψ) = Re(E_x h_y* − E_y h_x*).
pub(crate) fn flux(a: &V4, b: &V4) -> C {
    0.5 * (a[0].conj() * b[3] + a[3].conj() * b[0] - a[1].conj() * b[2] - a[2].conj() * b[1])
}

/// The medium's first-order system at one tangential wave vector (face frame).
pub(crate) struct System {
    /// q_z ψ = Δ ψ.
    pub(crate) delta: M4,
    /// (E_z, h_z) = lift · ψ.
    lift: [V4; 2],
    eps: Matrix3<f64>,
    kappa: Matrix3<f64>,
    qt: [f64; 2],
}

impl System {
    pub(crate) fn new(m: &Anisotropic, qt: [f64; 2]) -> System {
        let eps = m.permittivity();
        // Without optical activity κ is zero (as the product would give it, exactly).
        let kappa = if m.is_chiral() {
            m.chirality_tensor()
        } else {
            Matrix3::zeros()
        };
        let i = C::i();
        // [q_t ×] for q_t = (q_x, q_y, 0).
        let cross = Matrix3::new(0.0, 0.0, qt[1], 0.0, 0.0, -qt[0], -qt[1], qt[0], 0.0);
        // The 6×6 system (M − R_t) (E, h) = q_z R_z (E, h): M = [[ε, iκ], [−iκ, I]],
        // R_t (E, h) = (−q_t × h, q_t × E).
        let c6 = |r: usize, k: usize| -> C {
            let (ri, ki) = (r % 3, k % 3);
            match (r / 3, k / 3) {
                (0, 0) => C::from(eps[(ri, ki)]),
                (0, _) => i * kappa[(ri, ki)] + cross[(ri, ki)],
                (_, 0) => -i * kappa[(ri, ki)] - cross[(ri, ki)],
                _ => C::from(if ri == ki { 1.0 } else { 0.0 }),
            }
        };
        const T: [usize; 4] = [0, 1, 3, 4];
        // (E_z, h_z) from the z rows: [[c22, c25], [c52, c55]] (E_z, h_z) = −(z rows)·ψ; the
        // determinant is ε_zz − κ_zz² > 0 for any admitted crystal (|κ| < 1% of the indices).
        let (z00, z01, z10, z11) = (c6(2, 2), c6(2, 5), c6(5, 2), c6(5, 5));
        let det = z00 * z11 - z01 * z10;
        let mut lift = [[C::ZERO; 4]; 2];
        for (k, &t) in T.iter().enumerate() {
            lift[0][k] = -(z11 * c6(2, t) - z01 * c6(5, t)) / det;
            lift[1][k] = -(z00 * c6(5, t) - z10 * c6(2, t)) / det;
        }
        // R_z on ψ is the signed permutation P (its own inverse): rows (h_y, −h_x, −E_y, E_x).
        let mut delta = [[C::ZERO; 4]; 4];
        for (row, (r, sign)) in delta.iter_mut().zip([(4, 1.0), (3, -1.0), (1, -1.0), (0, 1.0)]) {
            for (k, &t) in T.iter().enumerate() {
                row[k] = (c6(r, t) + c6(r, 2) * lift[0][k] + c6(r, 5) * lift[1][k]) * sign;
            }
        }
        System {
            delta,
            lift,
            eps,
            kappa,
            qt,
        }
    }

    /// The full (E, h, D) of tangential fields ψ.
    fn fields(&self, psi: &V4) -> (CVector3, CVector3, CVector3) {
        let e = CVector3::new(psi[0], psi[1], dot(&self.lift[0], psi));
        let h = CVector3::new(psi[2], psi[3], dot(&self.lift[1], psi));
        let d = CVector3::from_fn(|r, _| {
            (0..3)
                .map(|k| e[k] * self.eps[(r, k)] + h[k] * C::new(0.0, self.kappa[(r, k)]))
                .sum()
        });
        (e, h, d)
    }

    /// Rayleigh quotient F(ψ, Δψ)/F(ψ, ψ): the real q_z of a propagating wave, refined.
    fn refined(&self, psi: &V4) -> f64 {
        let f = flux(psi, psi).re;
        if f != 0.0 {
            flux(psi, &apply(&self.delta, psi)).re / f
        } else {
            0.0
        }
    }
}

/// A plane rotation (c real, s) with [[c, s], [−s*, c]]·(a, b) = (·, 0).
fn givens(a: C, b: C) -> (f64, C) {
    let na = a.norm_sqr().sqrt();
    let r = (a.norm_sqr() + b.norm_sqr()).sqrt();
    if r == 0.0 {
        (1.0, C::ZERO)
    } else if na == 0.0 {
        (0.0, C::ONE)
    } else {
        (na / r, a / na * b.conj() / r)
    }
}

/// Rows p, p + 1 of h ← G (those rows), within the columns `cols`.
fn rotate_rows(h: &mut M4, p: usize, (c, s): (f64, C), cols: std::ops::RangeInclusive<usize>) {
    let (top, rest) = h.split_at_mut(p + 1);
    for (x, y) in top[p][cols.clone()].iter_mut().zip(&mut rest[0][cols]) {
        let (a, b) = (*x, *y);
        *x = a * c + s * b;
        *y = -s.conj() * a + b * c;
    }
}

/// h ← G h G ᴴ with G the rotation `g` of rows and columns p, p + 1, within the leading
/// (n + 1) × (n + 1) block.
fn rotate(h: &mut M4, p: usize, (c, s): (f64, C), n: usize) {
    rotate_rows(h, p, (c, s), 0..=n);
    for row in h.iter_mut().take(n + 1) {
        let (x, y) = (row[p], row[p + 1]);
        row[p] = x * c + y * s.conj();
        row[p + 1] = -x * s + y * c;
    }
}

/// The four eigenvalues of Δ: Hessenberg form by plane rotations, then the shifted QR iteration
/// (Wilkinson shifts, an exceptional shift every eleventh sweep, deflation from the bottom) — the
/// complex Schur form's diagonal (Golub & Van Loan, *Matrix Computations*, §7.5). Backward stable:
/// a semisimple double root (a degenerate pair) stays real to rounding. Should the iteration not
/// settle (never met), the diagonal reached is taken: finite, if not converged.
fn eigenvalues(delta: &M4) -> [C; 4] {
    let mut h = *delta;
    for j in 0..2 {
        for i in (j + 2..4).rev() {
            let g = givens(h[i - 1][j], h[i][j]);
            rotate(&mut h, i - 1, g, 3);
            h[i][j] = C::ZERO;
        }
    }
    let scale = h.iter().flatten().map(|z| z.norm_sqr().sqrt()).fold(0.0, f64::max);
    let mut out = [C::ZERO; 4];
    let (mut n, mut sweeps) = (3usize, 0usize);
    while n > 0 {
        let (a, b, c, d) = (h[n - 1][n - 1], h[n - 1][n], h[n][n - 1], h[n][n]);
        if c.norm_sqr().sqrt() <= f64::EPSILON * (a.norm_sqr().sqrt() + d.norm_sqr().sqrt()).max(f64::EPSILON * scale) {
            out[n] = d;
            n -= 1;
            sweeps = 0;
            continue;
        }
        sweeps += 1;
        if sweeps > EIGEN_SWEEPS {
            break;
        }
        let mu = if sweeps % 11 == 0 {
            d + c.norm_sqr().sqrt()
        } else {
            let (mean, root) = (0.5 * (a + d), csqrt(0.25 * (a - d) * (a - d) + b * c));
            let (l1, l2) = (mean + root, mean - root);
            if (l1 - d).norm_sqr().sqrt() <= (l2 - d).norm_sqr().sqrt() {
                l1
            } else {
                l2
            }
        };
        for (i, row) in h.iter_mut().enumerate().take(n + 1) {
            row[i] -= mu;
        }
        let mut gs = [(1.0, C::ZERO); 3];
        for k in 0..n {
            let g = givens(h[k][k], h[k + 1][k]);
            rotate_rows(&mut h, k, g, k..=n);
            gs[k] = g;
        }
        for (k, &(c, s)) in gs.iter().enumerate().take(n) {
            for row in h.iter_mut().take(n + 1) {
                let (x, y) = (row[k], row[k + 1]);
                row[k] = x * c + y * s.conj();
                row[k + 1] = -x * s + y * c;
            }
        }
        for (i, row) in h.iter_mut().enumerate().take(n + 1) {
            row[i] += mu;
        }
    }
    for (k, slot) in out.iter_mut().enumerate().take(n + 1) {
        *slot = h[k][k];
    }
    out
}

/// The principal square root √z (Re ≥ 0), from |z| alone: (√((|z| + x)/2), ±√((|z| − x)/2)).
fn csqrt(z: C) -> C {
    let r = z.norm_sqr().sqrt();
    let re = (0.5 * (r + z.re)).max(0.0).sqrt();
    let im = (0.5 * (r - z.re)).max(0.0).sqrt();
    C::new(re, if z.im < 0.0 { -im } else { im })
}

/// An orthonormal basis of the `dim`-dimensional (1 or 2) null space of `m`, a matrix of rank
/// 4 − `dim` to rounding: Gaussian elimination with complete pivoting (rank-revealing for such a
/// matrix, whose other singular values are far from zero), back substitution with each free
/// unknown set to 1 in turn, then Gram–Schmidt. Never NaN (a pivot that is exactly zero ends the
/// elimination early).
pub(crate) fn null_basis(mut a: M4, dim: usize) -> [V4; 2] {
    let mut col = [0usize, 1, 2, 3];
    let mut rank = 0;
    for k in 0..4 - dim {
        // The largest modulus, compared by its square (the same order, no square roots).
        let (mut pi, mut pj, mut best) = (k, k, 0.0);
        for (i, row) in a.iter().enumerate().skip(k) {
            for (j, x) in row.iter().enumerate().skip(k) {
                if x.norm_sqr() > best {
                    (pi, pj, best) = (i, j, x.norm_sqr());
                }
            }
        }
        if best == 0.0 {
            break;
        }
        a.swap(k, pi);
        for row in a.iter_mut() {
            row.swap(k, pj);
        }
        col.swap(k, pj);
        let (top, rest) = a.split_at_mut(k + 1);
        for row in rest.iter_mut() {
            let f = row[k] / top[k][k];
            for (x, p) in row[k..].iter_mut().zip(&top[k][k..]) {
                *x -= f * p;
            }
        }
        rank = k + 1;
    }
    let mut out = [[C::ZERO; 4]; 2];
    for (t, v) in out.iter_mut().enumerate().take(dim) {
        let mut x = [C::ZERO; 4];
        x[(4 - dim + t).max(rank)] = C::ONE;
        for k in (0..rank).rev() {
            let sum: C = (k + 1..4).map(|j| a[k][j] * x[j]).sum();
            x[k] = -sum / a[k][k];
        }
        for (j, &c) in col.iter().enumerate() {
            v[c] = x[j];
        }
    }
    // Gram–Schmidt (Hermitian).
    for t in 0..dim {
        let mut v = out[t];
        for u in &out[..t] {
            let p: C = u.iter().zip(&v).map(|(x, y)| x.conj() * y).sum();
            v = combine(&v, C::ONE, u, -p);
        }
        let n = norm(&v);
        out[t] = if n > 0.0 {
            combine(&v, C::from(1.0 / n), &v, C::ZERO)
        } else {
            [C::ZERO; 4]
        };
    }
    out
}

/// One wave: its q_z, tangential fields and whether it propagates.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Wave {
    pub(crate) qz: C,
    pub(crate) psi: V4,
    pub(crate) propagating: bool,
}

/// The two waves of `sys` travelling along `travel`, not yet in slots: (waves, whether they were
/// taken as one degenerate pair in the documented basis, first slot first).
fn waves(sys: &System, travel: Travel) -> ([Wave; 2], bool) {
    let s = travel.sign();
    // Each root with whether it propagates and how far it goes along +z: its decay rate, or its
    // normal flux.
    let mut scored = [(C::ZERO, false, 0.0); 4];
    for (out, l) in scored.iter_mut().zip(eigenvalues(&sys.delta)) {
        *out = if l.im.abs() > EVANESCENT_ROOT * (1.0 + l.norm_sqr().sqrt()) {
            (l, false, l.im)
        } else {
            let l = C::from(l.re);
            let v = null_basis(shifted(&sys.delta, l), 1)[0];
            (l, true, flux(&v, &v).re)
        };
    }
    // The two that go along the travel (the two most so, if rounding at grazing blurs it).
    let along = |i: usize| scored[i].2 * s;
    let first = (1..4).fold(0, |m, i| if along(i) > along(m) { i } else { m });
    let second = (0..4)
        .filter(|&i| i != first)
        .fold(usize::from(first == 0), |m, i| if along(i) > along(m) { i } else { m });
    let [(l0, p0, _), (l1, p1, _)] = [scored[first], scored[second]];
    let scale = 1.0 + l0.norm_sqr().sqrt().max(l1.norm_sqr().sqrt());
    if p0 && p1 {
        return propagating_pair(sys, l0, l1, s);
    }
    if (l0 - l1).norm_sqr().sqrt() <= DEGENERATE_MODES * scale {
        // Two degenerate evanescent waves.
        let u = null_basis(pair_product(sys, l0, l1), 2);
        let c = first_of_pair(sys, &u);
        let wave = |psi| Wave {
            qz: 0.5 * (l0 + l1),
            psi,
            propagating: false,
        };
        let first = combine(&u[0], c[0], &u[1], c[1]);
        let second = combine(&u[0], c[1].conj(), &u[1], -c[0].conj());
        return ([wave(first), wave(second)], true);
    }
    let single = |l: C, p: bool| {
        let psi = null_basis(shifted(&sys.delta, l), 1)[0];
        let qz = if p { C::from(sys.refined(&psi)) } else { l };
        Wave {
            qz,
            psi,
            propagating: p,
        }
    };
    ([single(l0, p0), single(l1, p1)], false)
}

/// (Δ − λ₀)(Δ − λ₁): its null space is the pair's invariant subspace, also when λ₀ = λ₁.
fn pair_product(sys: &System, l0: C, l1: C) -> M4 {
    mul(&shifted(&sys.delta, l0), &shifted(&sys.delta, l1))
}

/// The coefficients (on the basis `u`) of the wave of the pair whose D has no component along x̂
/// (along ŷ when |q_x| > |q_y|): the documented first wave of a degenerate pair.
fn first_of_pair(sys: &System, u: &[V4; 2]) -> [C; 2] {
    let along = usize::from(sys.qt[0].abs() > sys.qt[1].abs());
    let a = [sys.fields(&u[0]).2[along], sys.fields(&u[1]).2[along]];
    let n = (a[0].norm_sqr() + a[1].norm_sqr()).sqrt();
    if n > 0.0 {
        [a[1] / n, -a[0] / n]
    } else {
        [C::ONE, C::ZERO]
    }
}

/// The two propagating waves of roots λ₀, λ₁ (travelling the way of sign `s`): flux-orthonormal
/// eigenvectors of the 2×2 Hermitian problem on their invariant subspace.
fn propagating_pair(sys: &System, l0: C, l1: C, s: f64) -> ([Wave; 2], bool) {
    pair_in(sys, &null_basis(pair_product(sys, l0, l1), 2), s)
}

/// The two propagating waves whose invariant subspace `u` spans (travelling the way of sign `s`),
/// as [`propagating_pair`] finds them: (waves, whether they were taken as one degenerate pair).
pub(crate) fn pair_in(sys: &System, u: &[V4; 2], s: f64) -> ([Wave; 2], bool) {
    let du = [apply(&sys.delta, &u[0]), apply(&sys.delta, &u[1])];
    let (pair, degenerate) = pair_coefficients(sys, u, &du, s);
    let wave = |(qz, c): (f64, [C; 2])| Wave {
        qz: C::from(qz),
        psi: combine(&u[0], c[0], &u[1], c[1]),
        propagating: true,
    };
    (pair.map(wave), degenerate)
}

/// The two waves of [`pair_in`] as their q_z and their coefficients on the basis `u` (whose
/// images under Δ are `du`), and whether they were taken as one degenerate pair.
pub(crate) fn pair_coefficients(sys: &System, u: &[V4; 2], du: &[V4; 2], s: f64) -> ([(f64, [C; 2]); 2], bool) {
    // G = Uᴴ J U (definite, sign s), A = Uᴴ J Δ U, both Hermitian (their Hermitian parts taken,
    // which rounding aside they are already).
    let herm = |f: &dyn Fn(usize, usize) -> C| {
        let (d0, d1, off) = (f(0, 0).re * s, f(1, 1).re * s, 0.5 * (f(1, 0) + f(0, 1).conj()) * s);
        (d0, d1, off)
    };
    let (g00, g11, g10) = herm(&|r, k| flux(&u[r], &u[k]));
    let (a00, a11, a10) = herm(&|r, k| flux(&u[r], &du[k]));
    // Cholesky G = L Lᴴ, L = [[l11, 0], [l21, l22]], and C = L⁻¹ A L⁻ᴴ.
    let l11 = g00.max(f64::MIN_POSITIVE).sqrt();
    let l21 = g10 / l11;
    let l22 = (g11 - l21.norm_sqr()).max(f64::MIN_POSITIVE).sqrt();
    let c11 = a00 / (l11 * l11);
    let c21 = (a10 - l21 * c11 * l11) / (l11 * l22);
    let c22 = (a11 - 2.0 * (l21.conj() * c21).re * l22 - l21.norm_sqr() * c11) / (l22 * l22);
    let c12 = c21.conj();
    let mean = 0.5 * (c11 + c22);
    let d = 0.5 * (c11 - c22);
    let half = (d * d + c12.norm_sqr()).sqrt();
    // The basis coefficients of a unit vector w of C's: L⁻ᴴ w.
    let coeffs_of = |w: [C; 2]| {
        let x1 = w[1] / l22;
        [(w[0] - l21.conj() * x1) / l11, x1]
    };
    let wave = |qz: f64, c: [C; 2]| (qz, c);
    if half <= DEGENERATE_MODES * (1.0 + mean.abs()) {
        // One q_z: the documented basis, the second flux-orthogonal to the first (G f)ᴴ x = 0.
        let f = first_of_pair(sys, u);
        let gf = [g00 * f[0] + g10.conj() * f[1], g10 * f[0] + g11 * f[1]];
        return ([wave(mean, f), wave(mean, [gf[1].conj(), -gf[0].conj()])], true);
    }
    // The eigenvector of C for mean + half, from the form without cancellation ((c₁₂, half − d)
    // when d < 0, (half + d, c₁₂*) otherwise), and the other exactly orthogonal to it, so that
    // the two waves carry no cross flux however close they are.
    let v = if d < 0.0 {
        [c12, C::from(half - d)]
    } else {
        [C::from(half + d), c12.conj()]
    };
    let n = (v[0].norm_sqr() + v[1].norm_sqr()).sqrt();
    let upper = [v[0] / n, v[1] / n];
    let lower = [-upper[1].conj(), upper[0].conj()];
    (
        [wave(mean + half, coeffs_of(upper)), wave(mean - half, coeffs_of(lower))],
        false,
    )
}

/// Whether the propagating wave of wave vector `q` is on the inner sheet of the index surface
/// (module header); `None` when rounding cannot tell.
fn on_inner_sheet(medium: &Anisotropic, q: &Vector3<f64>) -> Option<bool> {
    let n = q.norm();
    let (na, nb) = medium.indices_along(q / n);
    let mid = 0.5 * (na + nb);
    (n != mid).then_some(n < mid)
}

/// Whether the medium's first letter names the inner sheet (always for `f`; for `o`, when
/// n_e ≥ n_o) and, for a uniaxial crystal, its ordinary index.
fn first_letter(medium: &Anisotropic) -> (bool, Option<f64>) {
    match (medium.letters(), medium.uniaxial_axis()) {
        (ModeLetters::OrdinaryExtraordinary, Some(ax)) => {
            let ne = medium.principal[ax];
            let no = medium.principal[(ax + 1) % 3];
            (ne >= no, Some(no))
        }
        _ => (true, None),
    }
}

/// Puts two waves in their slots (module header): returns whether to swap them.
pub(crate) fn swapped(medium: &Anisotropic, qt: [f64; 2], w: &[Wave; 2]) -> bool {
    let (first_inner, no) = first_letter(medium);
    let q_of = |x: &Wave| Vector3::new(qt[0], qt[1], x.qz.re);
    match (w[0].propagating, w[1].propagating) {
        (true, true) => {
            let (q0, q1) = (q_of(&w[0]), q_of(&w[1]));
            let inner0 = match (on_inner_sheet(medium, &q0), on_inner_sheet(medium, &q1)) {
                (Some(a), Some(b)) if a != b => a,
                _ => q0.norm() <= q1.norm(),
            };
            inner0 != first_inner
        }
        (true, false) | (false, true) => {
            let k = usize::from(w[1].propagating);
            let inner = on_inner_sheet(medium, &q_of(&w[k])).unwrap_or(false);
            // The propagating wave's slot is 0 when its sheet is the first letter's.
            let slot = if inner == first_inner { 0 } else { 1 };
            slot != k
        }
        (false, false) => match no {
            Some(no) => {
                let ordinary = C::from(no * no - qt[0] * qt[0] - qt[1] * qt[1]);
                (w[1].qz * w[1].qz - ordinary).norm_sqr().sqrt() < (w[0].qz * w[0].qz - ordinary).norm_sqr().sqrt()
            }
            None => w[1].qz.im.abs() > w[0].qz.im.abs(),
        },
    }
}

/// Both modes of a general crystal `medium` (given in the face frame, face ⊥ z) at tangential
/// wave vector `qt`, travelling along `travel`: the medium's first letter in the
/// `ModeKind::Ordinary` slot, its second in the other (module header). Never NaN.
pub fn general_modes(medium: &Anisotropic, qt: [f64; 2], travel: Travel) -> [Mode; 2] {
    let sys = System::new(medium, qt);
    let (mut w, degenerate) = waves(&sys, travel);
    if !degenerate && swapped(medium, qt, &w) {
        w.swap(0, 1);
    }
    let kinds = [ModeKind::Ordinary, ModeKind::Extraordinary];
    [
        assemble(&sys, kinds[0], travel, &w[0]),
        assemble(&sys, kinds[1], travel, &w[1]),
    ]
}

/// The normalized mode of one wave.
fn assemble(sys: &System, kind: ModeKind, travel: Travel, w: &Wave) -> Mode {
    let (e, h, d) = sys.fields(&w.psi);
    let q = CVector3::new(C::from(sys.qt[0]), C::from(sys.qt[1]), w.qz);
    let size = if w.propagating {
        (e.x * h.y.conj() - e.y * h.x.conj()).re.abs().sqrt()
    } else {
        e.norm()
    };
    // Phase: E's largest component real and positive.
    let big = e.iter().fold(C::ZERO, |m, z| {
        if z.norm_sqr().sqrt() > m.norm_sqr().sqrt() {
            *z
        } else {
            m
        }
    });
    let phase = if big.norm_sqr().sqrt() > 0.0 {
        big.conj() / C::from(big.norm_sqr().sqrt())
    } else {
        C::ONE
    };
    let f = if size > 0.0 && size.is_finite() {
        phase / size
    } else {
        phase
    };
    let (e, h, d) = (e * f, h * f, d * f);
    let ray = if w.propagating {
        let s = e.cross(&h.map(|z| z.conj())).map(|z| z.re);
        s.try_normalize(0.0)
    } else {
        None
    };
    Mode::assembled(kind, travel, q, e, h, d, w.propagating, ray)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::anisotropic::orientation;
    use crate::optics::modes::crystal_modes;
    use crate::optics::uniaxial::Uniaxial;
    use crate::precision::assert_within;
    use crate::random::Rng;

    fn medium(principal: [f64; 3], r: Matrix3<f64>, chirality: [f64; 3]) -> Anisotropic {
        Anisotropic::new(principal, r, chirality).unwrap()
    }

    /// The cross flux F(a, b) across the face of two modes (0 for power-orthogonal ones).
    fn cross_flux(a: &Mode, b: &Mode) -> C {
        let psi = |m: &Mode| [m.e.x, m.e.y, m.h.x, m.h.y];
        flux(&psi(a), &psi(b))
    }

    /// max |x − φ y| over the components, φ the unit phase that best aligns y with x.
    fn phase_distance(x: &CVector3, y: &CVector3) -> f64 {
        let p = y.dotc(x);
        let phi = if p.norm() > 0.0 { p / C::from(p.norm()) } else { C::ONE };
        (x - y * phi).camax()
    }

    /// The general solver agrees with the uniaxial closed form (`modes.rs`) for any crystal with
    /// two equal principal indices, in any orientation (the distinct index on any of the three
    /// principal axes), at any tangential wave vector including evanescent ones: q_z, the ray
    /// direction and the fields (up to a phase, relative to their size) to 1e-12. An independent method: the closed form
    /// solves two quadratics; this one a 4×4 eigenproblem.
    #[test]
    fn uniaxial_crystals_agree_with_the_closed_form() {
        let mut rng = Rng::new(0x5eed_0b1a);
        let mut worst = [0.0f64; 3];
        let mut evanescent = 0;
        for case in 0..2000 {
            let no = 1.4 + 0.8 * rng.uniform();
            let ne = 1.4 + 0.8 * rng.uniform();
            let (tilt, az, roll) = (
                std::f64::consts::PI * rng.uniform(),
                std::f64::consts::TAU * rng.uniform(),
                std::f64::consts::TAU * rng.uniform(),
            );
            // The distinct index on principal axis `slot`: a rotation taking ẑ there first.
            let slot = case % 3;
            let to_slot = match slot {
                2 => Matrix3::identity(),
                0 => Matrix3::new(0.0, 0.0, 1.0, 0.0, 1.0, 0.0, -1.0, 0.0, 0.0),
                _ => Matrix3::new(1.0, 0.0, 0.0, 0.0, 0.0, 1.0, 0.0, -1.0, 0.0),
            };
            let r = orientation(tilt, az, roll) * to_slot.transpose();
            let mut principal = [no; 3];
            principal[slot] = ne;
            let general = medium(principal, r, [0.0; 3]);
            let axis = r.column(slot).into_owned();
            let (t, a) = (axis.z.clamp(-1.0, 1.0).acos(), axis.y.atan2(axis.x));
            let closed = Uniaxial::from_numbers(no, ne, t.to_degrees(), a.to_degrees()).unwrap();
            // |q_t| up to 2.4: beyond every index, so a share of the waves are evanescent.
            let (qn, qa) = (2.4 * rng.uniform(), std::f64::consts::TAU * rng.uniform());
            let qt = [qn * qa.cos(), qn * qa.sin()];
            for travel in [Travel::Forward, Travel::Backward] {
                let want = crystal_modes(&closed, qt, travel);
                let got = general_modes(&general, qt, travel);
                for (w, g) in want.iter().zip(&got) {
                    assert_eq!(w.propagating, g.propagating, "case {case} {:?}", w.kind);
                    evanescent += usize::from(!w.propagating);
                    let dq = (w.qz() - g.qz()).norm();
                    assert!(dq < 1e-12, "case {case} {:?}: q_z {} vs {}", w.kind, w.qz(), g.qz());
                    worst[0] = worst[0].max(dq);
                    if let (Some(a), Some(b)) = (w.ray_direction(), g.ray_direction()) {
                        let dr = (a - b).norm();
                        assert!(dr < 1e-12, "case {case}: ray {a} vs {b}");
                        worst[1] = worst[1].max(dr);
                    }
                    // Relative to the fields' size (unit flux makes them large near grazing).
                    let size = w.e.norm().max(w.h.norm()).max(w.d.norm());
                    let df = phase_distance(&g.e, &w.e)
                        .max(phase_distance(&g.h, &w.h))
                        .max(phase_distance(&g.d, &w.d))
                        / size;
                    // Davis–Kahan: the fields of two waves a gap g apart are fixed by Δ to its
                    // rounding over g (~10⁻¹⁵ n²/g), the closed form's by geometry; 1e-12 where
                    // the waves are well apart (g ≥ 10⁻³), that bound where they are close.
                    let gap = (want[0].qz() - want[1].qz()).norm();
                    let allowed = 1e-12_f64.max(64.0 * f64::EPSILON * 4.84 / gap);
                    assert!(
                        df < allowed,
                        "case {case} {:?}: fields differ by {df} (gap {gap})",
                        w.kind
                    );
                    if gap >= 1e-3 {
                        worst[2] = worst[2].max(df);
                    }
                }
            }
        }
        assert!(evanescent > 500, "the cases reach evanescent waves ({evanescent})");
        eprintln!(
            "worst q_z {:.2e}, ray {:.2e}, fields {:.2e}",
            worst[0], worst[1], worst[2]
        );
    }

    /// Along the optic axis the closed form's degenerate basis (D_o ∥ q × x̂) is the one taken.
    #[test]
    fn along_the_axis_the_basis_is_the_closed_forms() {
        for (qt, tilt) in [([0.0, 0.0], 0.0), ([0.3, 0.1], 0.3f64.atan2(1.0))] {
            let no = 1.6557;
            let qz = (no * no - 0.1f64).sqrt();
            let axis = Vector3::new(qt[0], qt[1], if qt[0] == 0.0 { 1.0 } else { qz }).normalize();
            let _ = tilt;
            let (t, a) = (axis.z.acos(), axis.y.atan2(axis.x));
            let closed = Uniaxial::from_numbers(no, 1.4849, t.to_degrees(), a.to_degrees()).unwrap();
            let general = medium([no, no, 1.4849], orientation(t, a, 0.7), [0.0; 3]);
            let want = crystal_modes(&closed, qt, Travel::Forward);
            let got = general_modes(&general, qt, Travel::Forward);
            for (w, g) in want.iter().zip(&got) {
                assert_within((w.qz() - g.qz()).norm(), 0.0, 1e-12, "q_z along the axis");
                assert_within(phase_distance(&g.d, &w.d), 0.0, 1e-12, "degenerate basis, D");
            }
        }
    }

    /// J·Δ is Hermitian for a lossless medium, chiral or not: the flux identity every
    /// power-orthogonality argument of the module header rests on.
    #[test]
    fn the_flux_form_makes_the_system_hermitian() {
        let m = medium([1.5, 1.7, 1.9], orientation(0.4, 1.1, -0.3), [2e-3, -1e-3, 3e-3]);
        let sys = System::new(&m, [0.3, -0.8]);
        for i in 0..4 {
            for k in 0..4 {
                let ei = [0, 1, 2, 3].map(|r| C::from(if r == i { 1.0 } else { 0.0 }));
                let ek = [0, 1, 2, 3].map(|r| C::from(if r == k { 1.0 } else { 0.0 }));
                let a = flux(&ei, &apply(&sys.delta, &ek));
                let b = flux(&ek, &apply(&sys.delta, &ei)).conj();
                assert!((a - b).norm() < 1e-15, "{i} {k}: {a} vs {b}");
            }
        }
    }

    /// The shifted QR iteration agrees with nalgebra's complex Schur form (an independent
    /// implementation of the same decomposition) on generated systems, chiral, evanescent and
    /// degenerate ones included, to 1e-13.
    #[test]
    fn the_qr_iteration_agrees_with_a_library_schur_form() {
        let mut rng = Rng::new(3);
        for case in 0..500 {
            let principal = if case % 5 == 0 {
                [1.6; 3]
            } else {
                [0; 3].map(|_| 1.4 + 0.8 * rng.uniform())
            };
            let m = medium(
                principal,
                orientation(3.0 * rng.uniform(), 6.0 * rng.uniform(), 6.0 * rng.uniform()),
                [0; 3].map(|_| if case % 2 == 0 { 1e-3 * rng.normal() } else { 0.0 }),
            );
            let qt = [2.4 * rng.uniform() - 1.2, 2.4 * rng.uniform() - 1.2];
            let sys = System::new(&m, qt);
            let ours = eigenvalues(&sys.delta);
            let d = nalgebra::Matrix4::from_fn(|r, k| sys.delta[r][k]);
            let (_, t) = d.try_schur(f64::EPSILON, 1000).unwrap().unpack();
            let theirs = [0, 1, 2, 3].map(|k| t[(k, k)]);
            // Each of ours has one of theirs within 1e-13, and the other way round.
            for (a, b) in [(&ours, &theirs), (&theirs, &ours)] {
                for x in a {
                    let gap = b.iter().map(|y| (x - y).norm()).fold(f64::INFINITY, f64::min);
                    assert!(gap < 1e-13, "case {case}: {x} in {a:?} vs {b:?}");
                }
            }
        }
    }

    /// Every mode solves the wave equation of the medium: q × E = h − iκE and
    /// q × h = −(εE + iκh) = −D, to 1e-12; propagating modes carry unit flux the right way and the
    /// two of a pair carry no cross flux (power-orthogonal), also exactly on a binormal, near one
    /// (10⁻⁹ off) and along a chiral crystal's axis, and for an isotropic crystal (chiral or
    /// not) beyond its critical angle; exactly at it (grazing) the answer is finite.
    #[test]
    fn modes_solve_maxwell_and_are_power_orthogonal_everywhere() {
        let r = orientation(0.4, 1.1, -0.6);
        let biaxial = medium([1.83, 1.74, 1.75], r, [0.0; 3]);
        let [b0, _] = biaxial.optic_axes().unwrap();
        let chiral = medium([1.5443, 1.5443, 1.5534], r, [3.5e-5, 3.5e-5, -2e-5]);
        let axis = r.column(2).into_owned();
        let mut rng = Rng::new(7);
        let mut cases: Vec<(Anisotropic, [f64; 2])> = Vec::new();
        // Exactly along a binormal and the chiral axis (face ⊥ z: q_t is the wave vector's
        // tangential part for a wave of the medium's index along that direction), and nearby.
        for (m, dir, n) in [(biaxial, b0, 1.75), (chiral, axis, 1.5443)] {
            for off in [0.0, 1e-9, 1e-6, 1e-3] {
                let d = (dir + Vector3::new(off, -0.5 * off, 0.0)).normalize();
                cases.push((m, [n * d.x, n * d.y]));
            }
        }
        // An isotropic crystal beyond its critical angle (a degenerate evanescent pair), exactly
        // at it (grazing), and an isotropic chiral one beyond it.
        let isotropic = medium([1.6; 3], r, [0.0; 3]);
        let chiral_isotropic = medium([1.6; 3], r, [2e-3; 3]);
        for qt in [[2.0, 0.3], [0.0, 1.7], [1.6, 0.0], [1.6 * 0.6, 1.6 * 0.8]] {
            cases.push((isotropic, qt));
            cases.push((chiral_isotropic, qt));
        }
        for _ in 0..300 {
            let m = medium(
                [
                    1.4 + 0.8 * rng.uniform(),
                    1.4 + 0.8 * rng.uniform(),
                    1.4 + 0.8 * rng.uniform(),
                ],
                orientation(3.0 * rng.uniform(), 6.0 * rng.uniform(), 6.0 * rng.uniform()),
                [1e-3 * rng.normal(), 1e-3 * rng.normal(), 1e-3 * rng.normal()],
            );
            cases.push((m, [2.4 * rng.uniform() - 1.2, 2.4 * rng.uniform() - 1.2]));
        }
        let mut worst = 0.0f64;
        for (m, qt) in &cases {
            for travel in [Travel::Forward, Travel::Backward] {
                let modes = general_modes(m, *qt, travel);
                let (eps, kap) = (
                    m.permittivity().map(C::from),
                    m.chirality_tensor().map(|k| C::new(0.0, k)),
                );
                for md in &modes {
                    let all = md.e.iter().chain(md.h.iter()).chain(md.q.iter());
                    assert!(all.clone().all(|z| z.re.is_finite() && z.im.is_finite()));
                    let r1 = md.q.cross(&md.e) - (md.h - kap * md.e);
                    let r2 = md.q.cross(&md.h) + (eps * md.e + kap * md.h);
                    let r3 = md.d - (eps * md.e + kap * md.h);
                    let scale = md.e.norm().max(md.h.norm());
                    let res = (r1.norm() + r2.norm() + r3.norm()) / scale;
                    // Exactly grazing, the forward and backward roots meet at q_z = 0 (a
                    // defective double root), which any method resolves only to √ε ≈ 1e-8: there
                    // the fields must be finite and nearly solve the equations.
                    let grazing = (qt[0].hypot(qt[1]) - 1.6).abs() < 1e-12;
                    assert!(
                        res < if grazing { 1e-6 } else { 1e-12 },
                        "{qt:?} {travel:?}: residual {res}"
                    );
                    if grazing {
                        continue;
                    }
                    if md.propagating {
                        let sz = cross_flux(md, md).re;
                        assert_within(sz, travel.sign(), 1e-12, "unit flux along the travel");
                    } else {
                        assert!(md.qz().im * travel.sign() > 0.0, "decays along its travel");
                    }
                }
                if modes[0].propagating && modes[1].propagating && (qt[0].hypot(qt[1]) - 1.6).abs() >= 1e-12 {
                    let x = cross_flux(&modes[0], &modes[1]).norm();
                    worst = worst.max(x);
                    assert!(x < 1e-12, "{qt:?}: cross flux {x}");
                }
            }
        }
        eprintln!("worst cross flux {worst:.2e}");
    }

    /// Stokes (S0, S1, S2, S3) of a transverse pair (x, y).
    fn stokes(x: C, y: C) -> [f64; 4] {
        [
            x.norm_sqr() + y.norm_sqr(),
            x.norm_sqr() - y.norm_sqr(),
            2.0 * (x * y.conj()).re,
            -2.0 * (x * y.conj()).im,
        ]
    }

    /// With an isotropic chirality κ the two waves are circular with indices n ∓ κ exactly, in
    /// every direction (the local chiral medium's circular waves: Lakhtakia, *Beltrami Fields in
    /// Chiral Media*, ch. 1, from memory); the fast one is the first.
    #[test]
    fn an_isotropic_chiral_medium_has_indices_n_plus_and_minus_kappa() {
        let (n, k) = (1.6, 4e-3);
        let m = medium([n; 3], orientation(0.3, 0.2, 0.1), [k; 3]);
        for qt in [[0.0, 0.0], [0.5, 0.3], [-1.1, 0.7]] {
            let [a, b] = general_modes(&m, qt, Travel::Forward);
            assert_within(a.q.map(|z| z.re).norm(), n - k, 1e-12, "fast circular index n − κ");
            assert_within(b.q.map(|z| z.re).norm(), n + k, 1e-12, "slow circular index n + κ");
            if qt == [0.0, 0.0] {
                for md in [a, b] {
                    let s = stokes(md.e.x, md.e.y);
                    assert_within(s[3].abs() / s[0], 1.0, 1e-12, "circular");
                }
            }
        }
    }

    /// Along the optic axis of a quartz-like crystal (κ₁ = κ₂, any κ₃) linear light's azimuth
    /// (from +x toward +y) changes by −k0 κ₁ per unit length: the rotatory power ρ = k0 κ₁ of the
    /// module header of `anisotropic.rs`, with the sign that makes κ₁ > 0 dextrorotatory
    /// (CONVENTIONS.md: clockwise seen looking toward the source, the azimuth decreasing along
    /// the path). Quartz turns 21.7°/mm at 589.3 nm (a handbook value, common practice), which
    /// fixes κ₁ here.
    #[test]
    fn linear_light_turns_along_a_chiral_axis_by_k0_kappa_l() {
        let k0 = std::f64::consts::TAU / 589.3e-6; // per mm
        let kappa1 = 21.7f64.to_radians() / k0;
        let m = medium(
            [1.5443, 1.5443, 1.5534],
            Matrix3::identity(),
            [kappa1, kappa1, -0.6 * kappa1],
        );
        let [a, b] = general_modes(&m, [0.0, 0.0], Travel::Forward);
        assert_within(b.qz().re - a.qz().re, 2.0 * kappa1, 1e-15, "circular split 2κ₁");
        // x-polarized light as the two waves: a e_a + b e_b = x̂ (transverse parts).
        let det = a.e.x * b.e.y - a.e.y * b.e.x;
        let (ca, cb) = (b.e.y / det, -a.e.y / det);
        for l_mm in [0.1, 1.0, 3.7] {
            let field = |md: &Mode, c: C| md.e * c * C::from_polar(1.0, k0 * md.qz().re * l_mm);
            let e = field(&a, ca) + field(&b, cb);
            let s = stokes(e.x, e.y);
            // The rounding of q_z (~10⁻¹⁶ n) times the phase k0 L it builds.
            let tol = 1e-12 + 4.0 * f64::EPSILON * 1.6 * k0 * l_mm;
            assert_within(s[3] / s[0], 0.0, tol, "stays linear");
            let azimuth = 0.5 * s[2].atan2(s[1]);
            let want = -21.7f64.to_radians() * l_mm;
            let turn = (azimuth - want + std::f64::consts::FRAC_PI_2).rem_euclid(std::f64::consts::PI)
                - std::f64::consts::FRAC_PI_2;
            assert_within(turn, 0.0, tol, "azimuth −k0 κ₁ L (dextrorotatory for κ₁ > 0)");
        }
    }

    /// Off the axis of a chiral uniaxial crystal the waves are ellipses whose axis ratio tan χ
    /// follows the first-order formula tan 2χ = 2 G / |n_e(θ)² − n_o²|, G = n_o s·g·s with the
    /// gyration g = (tr κ) I − κ (Landau & Lifshitz, *Electrodynamics of Continuous Media*, §101;
    /// Born & Wolf §15.3 for n_e(θ); from memory), here to 10⁻³ relative (the formula's neglected
    /// orders are κ/Δn and Δn/n times it, under 10⁻³ within 10° of the axis).
    #[test]
    fn elliptic_waves_off_a_chiral_axis_follow_the_first_order_formula() {
        let k0 = std::f64::consts::TAU / 589.3e-6;
        let kappa1 = 21.7f64.to_radians() / k0;
        let kappa3 = -0.6 * kappa1;
        let (no, ne) = (1.5443, 1.5534);
        for theta_deg in [0.0f64, 0.5, 1.0, 2.0, 4.0, 10.0] {
            let th = theta_deg.to_radians();
            let m = medium([no, no, ne], orientation(th, 0.0, 0.0), [kappa1, kappa1, kappa3]);
            let ne_th = 1.0 / ((th.cos() / no).powi(2) + (th.sin() / ne).powi(2)).sqrt();
            let g = kappa1 * (1.0 + th.cos().powi(2)) + kappa3 * th.sin().powi(2);
            let (gs, split) = (2.0 * no * g, (ne_th * ne_th - no * no).abs());
            let want = gs / (split * split + gs * gs).sqrt(); // |sin 2χ|
            for md in general_modes(&m, [0.0, 0.0], Travel::Forward) {
                let s = stokes(md.d.x, md.d.y);
                let got = (s[3] / s[0]).abs();
                assert_within(got, want, 1e-3 * want + 1e-12, "ellipticity, first-order formula");
            }
        }
    }
}
