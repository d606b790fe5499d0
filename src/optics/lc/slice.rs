//! One uniform slice of a liquid-crystal cell crossed exactly: the exponential P = exp(i θ Δ) of
//! its Berreman matrix (θ = k0 h) in closed form from the q_z of its four plane waves, and a
//! cell's slices kept so that the cell is solved again cheaply at many directions.
//!
//! Physics. For fields ∝ exp(i k0 (q_x x + q_y y)) and ψ = (E_x, E_y, Z0H_x, Z0H_y), a slice of
//! permittivity ε has dψ/dz = i k0 Δ ψ with Berreman's Δ ([`berreman_delta`]; derived in
//! [`crate::optics::lc::stratified`]). The eigenvalues of Δ are the q_z of the slice's four plane
//! waves. For a uniaxial slice, ε = n_o² I + (n_e² − n_o²) n nᵀ, Fresnel's equation factors as
//! (|q|² − n_o²)(qᵀ ε q − n_o² n_e²) = 0 (Born & Wolf, *Principles of Optics*, §15.3), so
//!
//! ```text
//! o waves: q_z = ±√(n_o² − q_x² − q_y²),
//! e waves: ε_zz q_z² + 2 (ε_xz q_x + ε_yz q_y) q_z + (ε_xx q_x² + 2 ε_xy q_x q_y + ε_yy q_y² − n_o² n_e²) = 0,
//! ```
//!
//! real for waves that propagate, complex for evanescent ones. Any function of a 4×4 matrix is
//! the interpolation polynomial of the function at the matrix's eigenvalues, evaluated at the
//! matrix (Cayley–Hamilton; where eigenvalues coincide, as the o and e waves do along a slice's
//! optic axis, the interpolation takes derivatives, the confluent divided differences). In
//! Newton's form, with f(λ) = e^{iθλ} and the eigenvalues ordered λ1..λ4 = (o₊, e₊, o₋, e₋),
//!
//! ```text
//! P = f[λ1] I + f[λ1,λ2] (Δ − λ1) + f[λ1,λ2,λ3] (Δ − λ1)(Δ − λ2) + f[λ1,…,λ4] (Δ − λ1)(Δ − λ2)(Δ − λ3),
//! ```
//!
//! which is exact (to rounding) and costs one sine and cosine per distinct wave instead of a
//! series of 4×4 products (N. J. Higham, *Functions of Matrices*, SIAM 2008, §1.2.2 and §10.4,
//! from memory). The order puts the pairs that can coincide (o₊ with e₊, e₊ with o₋, o₋ with e₋)
//! next to each other: their first divided difference is evaluated as
//! e^{iθa}·iθ·φ₁(iθ(b − a)), φ₁(x) = (eˣ − 1)/x by its series for small x, to full precision
//! however close a and b are. The higher ones divide by o₋ − o₊, e₋ − e₊ and e₋ − o₊, about twice
//! the slice's index apart except for light grazing inside the slice: below
//! [`SLICE_ROOTS_APART`] the slice is crossed by the Taylor series ([`expi`]) instead, as before.
//! The Newton form is expanded into powers of Δ (two real 4×4 products), which keeps rounding
//! near 10⁻¹⁶ while θ·max|λ| stays below [`SLICE_STEP_PHASE`]; thicker slices are halved and
//! their matrix squared.
//!
//! Conventions. ψ and Δ as in [`crate::optics::lc::stratified`]; slices are numbered from the
//! entrance face; thickness in micrometres, k0 in 1/µm. A [`Split`] is a complex 4×4 matrix kept
//! as its real and imaginary parts, whose products vectorize.
//!
//! Builds. The page's size-tuned WebAssembly module (built without the `design-worker` feature)
//! keeps the series for every slice: it solves a cell only at a trace's few ray directions, and
//! the closed form would add about 5 KB to its budgeted size. Native code and the design
//! worker's module (which computes convergent light) take the closed form; the two agree to
//! 10⁻¹² (tested here).
//!
//! Speed. [`Slices`] keeps each slice's ε (which does not depend on the light's direction), so a
//! direction costs per slice Δ, two roots, three sines and cosines, Δ², Δ³ and one complex 4×4
//! product. Where many directions are wanted (a conoscopic figure), or a cell is solved at a ray's
//! direction, [`crate::optics::lc::transfer_lanes`] crosses the same slices for less: the
//! inverse applied to two columns, several directions side by side; this product is what it
//! falls back to and is checked against.

use crate::optics::lc::director::Profile;
use crate::optics::lc::nematic::Nematic;
use crate::optics::material::Indices;
use crate::optics::uniaxial::{OpticAxis, Uniaxial};
use crate::precision::{SLICE_ROOTS_APART, SLICE_STEP_PHASE};
use nalgebra::{Matrix3, Matrix4};
use num_complex::Complex64;

/// Complex 4×4 matrix.
pub type CMatrix4 = Matrix4<Complex64>;

/// Berreman's Δ (q_z ψ = Δ ψ for a plane wave) of a medium of permittivity `eps` at tangential
/// wave vector `qt`, for ψ = (E_x, E_y, Z0H_x, Z0H_y).
pub fn berreman_delta(eps: &Matrix3<f64>, qt: [f64; 2]) -> Matrix4<f64> {
    let [qx, qy] = qt;
    let ezz = eps[(2, 2)];
    // E_z and H_z as rows over ψ.
    let ez = [-eps[(2, 0)] / ezz, -eps[(2, 1)] / ezz, qy / ezz, -qx / ezz];
    let hz = [-qy, qx, 0.0, 0.0];
    let mut d = Matrix4::zeros();
    for j in 0..4 {
        // (εE)_x and (εE)_y over ψ: ε_x· E with E = (E_x, E_y, E_z).
        let e_comp = |row: usize| {
            let ex = if j == 0 { 1.0 } else { 0.0 };
            let ey = if j == 1 { 1.0 } else { 0.0 };
            eps[(row, 0)] * ex + eps[(row, 1)] * ey + eps[(row, 2)] * ez[j]
        };
        d[(0, j)] = qx * ez[j] + if j == 3 { 1.0 } else { 0.0 };
        d[(1, j)] = qy * ez[j] - if j == 2 { 1.0 } else { 0.0 };
        d[(2, j)] = qx * hz[j] - e_comp(1);
        d[(3, j)] = qy * hz[j] + e_comp(0);
    }
    d
}

/// exp(i·a) for a real 4×4 `a`, by scaling and squaring its Taylor series (18 terms after
/// scaling ‖a‖₁ below ½: truncation below 10⁻²⁰ of the result).
pub fn expi(a: &Matrix4<f64>) -> CMatrix4 {
    let norm = (0..4)
        .map(|j| (0..4).map(|i| a[(i, j)].abs()).sum::<f64>())
        .fold(0.0, f64::max);
    let mut squarings = 0;
    let mut scale = 1.0;
    while norm * scale > 0.5 && squarings < 60 {
        scale *= 0.5;
        squarings += 1;
    }
    let x: CMatrix4 = a.map(|v| Complex64::new(0.0, v * scale));
    let mut sum = CMatrix4::identity();
    let mut term = CMatrix4::identity();
    for k in 1..=18 {
        term = term * x / Complex64::from(k as f64);
        sum += term;
    }
    for _ in 0..squarings {
        sum = sum * sum;
    }
    sum
}

/// The uniform uniaxial medium of a slice whose director has tilt `tilt` and azimuth `azimuth`.
pub fn slice_medium(lc: &Nematic, tilt: f64, azimuth: f64) -> Uniaxial {
    let indices = Indices { no: lc.no, ne: lc.ne };
    // The optic axis's polar angle from +z is 90° − tilt.
    Uniaxial::new(
        indices,
        OpticAxis::from_angles(std::f64::consts::FRAC_PI_2 - tilt, azimuth),
    )
}

/// A complex 4×4 matrix as its real and imaginary parts.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Split {
    /// Real part.
    pub re: Matrix4<f64>,
    /// Imaginary part.
    pub im: Matrix4<f64>,
}

impl Split {
    /// The identity.
    pub fn identity() -> Split {
        Split {
            re: Matrix4::identity(),
            im: Matrix4::zeros(),
        }
    }

    /// The product `self · other`.
    pub fn mul(&self, other: &Split) -> Split {
        Split {
            re: self.re * other.re - self.im * other.im,
            im: self.re * other.im + self.im * other.re,
        }
    }

    /// As one complex matrix.
    pub fn to_matrix(self) -> CMatrix4 {
        CMatrix4::from_fn(|i, j| Complex64::new(self.re[(i, j)], self.im[(i, j)]))
    }

    /// Split from one complex matrix.
    pub fn from_matrix(m: &CMatrix4) -> Split {
        Split {
            re: m.map(|z| z.re),
            im: m.map(|z| z.im),
        }
    }
}

/// √v for a real `v`: real for v ≥ 0, else i√(−v).
fn sqrt_real(v: f64) -> Complex64 {
    if v >= 0.0 {
        Complex64::new(v.sqrt(), 0.0)
    } else {
        Complex64::new(0.0, (-v).sqrt())
    }
}

/// The q_z of a uniaxial slice's four waves (eigenvalues of its Δ) at tangential wave vector
/// `qt`, ordered (o₊, e₊, o₋, e₋) as the module header says: o₋ = −o₊; e₊ the root of larger real
/// part (or imaginary part, when complex).
pub fn slice_roots(eps: &Matrix3<f64>, no: f64, ne: f64, qt: [f64; 2]) -> [Complex64; 4] {
    let [qx, qy] = qt;
    let o = sqrt_real(no * no - (qx * qx + qy * qy));
    let a = eps[(2, 2)];
    let b = eps[(0, 2)] * qx + eps[(1, 2)] * qy;
    let c = eps[(0, 0)] * qx * qx + 2.0 * eps[(0, 1)] * qx * qy + eps[(1, 1)] * qy * qy - no * no * ne * ne;
    let disc = b * b - a * c;
    let (ep, em) = if disc >= 0.0 {
        // The root away from zero first, the other from the product c/a (no cancellation).
        let w = -(b + disc.sqrt().copysign(b));
        if b >= 0.0 { (c / w, w / a) } else { (w / a, c / w) }
    } else {
        let s = (-disc).sqrt() / a;
        return [o, Complex64::new(-b / a, s), -o, Complex64::new(-b / a, -s)];
    };
    [o, Complex64::from(ep), -o, Complex64::from(em)]
}

/// e^{iθλ}.
fn cis(theta: f64, lambda: Complex64) -> Complex64 {
    let (s, c) = (theta * lambda.re).sin_cos();
    let z = Complex64::new(c, s);
    if lambda.im == 0.0 {
        z
    } else {
        z * (-theta * lambda.im).exp()
    }
}

/// Below this |x| the first divided difference takes φ₁(x)'s series (its 13 terms then leave a
/// truncation below 10⁻²²); above, the plain difference loses at most 3 bits.
const SERIES_BELOW: f64 = 0.125;

/// 1/k for k = 2 to 13: the factors of φ₁'s series in nested form.
const RECIPROCALS: [f64; 12] = [
    1.0 / 2.0,
    1.0 / 3.0,
    1.0 / 4.0,
    1.0 / 5.0,
    1.0 / 6.0,
    1.0 / 7.0,
    1.0 / 8.0,
    1.0 / 9.0,
    1.0 / 10.0,
    1.0 / 11.0,
    1.0 / 12.0,
    1.0 / 13.0,
];

/// f[a, b] of f(λ) = e^{iθλ}, given f(a) = `fa` and f(b) = `fb`, to full precision however close
/// a and b are.
fn divided(theta: f64, a: Complex64, b: Complex64, fa: Complex64, fb: Complex64) -> Complex64 {
    let x = Complex64::new(0.0, theta) * (b - a);
    if x.norm() >= SERIES_BELOW {
        return (fb - fa) / (b - a);
    }
    // φ₁(x) = 1 + x/2 (1 + x/3 (1 + …)).
    let mut phi = Complex64::ONE;
    for r in RECIPROCALS.iter().rev() {
        phi = Complex64::ONE + x * phi * *r;
    }
    fa * Complex64::new(0.0, theta) * phi
}

/// e^{iy} − 1 without cancellation: (−2 sin²(y/2), sin y).
fn cis_minus_one(y: f64) -> Complex64 {
    let (s, c) = (0.5 * y).sin_cos();
    Complex64::new(-2.0 * s * s, 2.0 * s * c)
}

/// f[a, b] of f(λ) = e^{iθλ} for real a, b, given f(a) = `fa` and f(b) = `fb`: the plain
/// difference, or fa·(e^{iθ(b−a)} − 1)/(b − a) when they are close (iθ fa when equal).
fn divided_real(theta: f64, a: f64, b: f64, fa: Complex64, fb: Complex64) -> Complex64 {
    let gap = b - a;
    if (theta * gap).abs() >= SERIES_BELOW {
        (fb - fa) / gap
    } else if gap == 0.0 {
        fa * Complex64::new(0.0, theta)
    } else {
        fa * cis_minus_one(theta * gap) / gap
    }
}

/// Newton's divided differences f[λ0], f[λ0,λ1], f[λ0,λ1,λ2], f[λ0,…,λ3] of f(λ) = e^{iθλ} at
/// four real eigenvalues ordered as [`slice_roots`] gives them (o₋ = −o₊): three sines and
/// cosines, the neighbours' differences from e^{iθ(e − o)} − 1 directly.
fn newton_real(lambda: [f64; 4], theta: f64) -> [Complex64; 4] {
    let (s, c) = (theta * lambda[0]).sin_cos();
    let f0 = Complex64::new(c, s);
    let f2 = f0.conj();
    let step = |f: Complex64, from: f64, to: f64| {
        let gap = to - from;
        let m = cis_minus_one(theta * gap);
        let d = if gap == 0.0 {
            f * Complex64::new(0.0, theta)
        } else {
            f * m / gap
        };
        (f + f * m, d)
    };
    let (f1, d01) = step(f0, lambda[0], lambda[1]);
    let (_, d23) = step(f2, lambda[2], lambda[3]);
    let d12 = divided_real(theta, lambda[1], lambda[2], f1, f2);
    let d012 = (d12 - d01) / (lambda[2] - lambda[0]);
    let d123 = (d23 - d12) / (lambda[3] - lambda[1]);
    [f0, d01, d012, (d123 - d012) / (lambda[3] - lambda[0])]
}

/// Newton's divided differences of f(λ) = e^{iθλ} at four eigenvalues, any of them complex
/// (evanescent waves), ordered as [`slice_roots`] gives them.
fn newton_complex(lambda: &[Complex64; 4], theta: f64) -> [Complex64; 4] {
    let f0 = cis(theta, lambda[0]);
    let f1 = cis(theta, lambda[1]);
    // o₋ = −o₊: for a propagating o wave its factor is the conjugate.
    let f2 = if lambda[0].im == 0.0 {
        f0.conj()
    } else {
        cis(theta, lambda[2])
    };
    let f3 = cis(theta, lambda[3]);
    let d01 = divided(theta, lambda[0], lambda[1], f0, f1);
    let d12 = divided(theta, lambda[1], lambda[2], f1, f2);
    let d23 = divided(theta, lambda[2], lambda[3], f2, f3);
    let d012 = (d12 - d01) / (lambda[2] - lambda[0]);
    let d123 = (d23 - d12) / (lambda[3] - lambda[1]);
    [f0, d01, d012, (d123 - d012) / (lambda[3] - lambda[0])]
}

/// The coefficients c0..c3 of exp(iθΔ) = c0 + c1 Δ + c2 Δ² + c3 Δ³ for Δ of eigenvalues
/// `lambda` (ordered as [`slice_roots`] gives them).
fn power_coefficients(lambda: &[Complex64; 4], theta: f64) -> [Complex64; 4] {
    let newton = if lambda.iter().all(|l| l.im == 0.0) {
        newton_real(lambda.map(|l| l.re), theta)
    } else {
        newton_complex(lambda, theta)
    };
    // Newton's form d0 + (x − λ0)(d1 + (x − λ1)(d2 + (x − λ2) d3)) expanded into powers of x.
    let mut c = [Complex64::ZERO; 4];
    c[0] = newton[3];
    for (degree, k) in (0..3).rev().enumerate() {
        for i in (1..=degree + 1).rev() {
            c[i] = c[i - 1] - lambda[k] * c[i];
        }
        c[0] = newton[k] - lambda[k] * c[0];
    }
    c
}

/// exp(i θ Δ) of a uniaxial slice of permittivity `eps` (indices `no`, `ne`) at tangential wave
/// vector `qt`, θ = k0 h, in closed form (module header); by the Taylor series ([`expi`]) for
/// light grazing inside the slice.
pub fn slice_exp(eps: &Matrix3<f64>, no: f64, ne: f64, qt: [f64; 2], theta: f64) -> Split {
    let delta = berreman_delta(eps, qt);
    let lambda = slice_roots(eps, no, ne, qt);
    let apart = [(0, 2), (1, 3), (0, 3)]
        .iter()
        .map(|&(i, j)| (lambda[i] - lambda[j]).norm())
        .fold(f64::INFINITY, f64::min);
    let finite = lambda.iter().all(|l| l.re.is_finite() && l.im.is_finite());
    if !finite || apart < SLICE_ROOTS_APART {
        return Split::from_matrix(&expi(&(delta * theta)));
    }
    let largest = lambda.iter().map(|l| l.norm()).fold(0.0, f64::max);
    let mut step = theta;
    let mut halvings = 0;
    while step * largest > SLICE_STEP_PHASE && halvings < 60 {
        step *= 0.5;
        halvings += 1;
    }
    let [c0, c1, c2, c3] = power_coefficients(&lambda, step);
    let d2 = delta * delta;
    let d3 = d2 * delta;
    let mut p = Split {
        re: delta * c1.re + d2 * c2.re + d3 * c3.re,
        im: delta * c1.im + d2 * c2.im + d3 * c3.im,
    };
    for i in 0..4 {
        p.re[(i, i)] += c0.re;
        p.im[(i, i)] += c0.im;
    }
    for _ in 0..halvings {
        p = p.mul(&p);
    }
    p
}

/// A cell's slices as the light crosses them: each slice's permittivity (for its mid-depth
/// director, Born & Wolf §15.2), which does not depend on the light's direction.
#[derive(Debug, Clone, PartialEq)]
pub struct Slices {
    /// Ordinary index.
    pub no: f64,
    /// Extraordinary index.
    pub ne: f64,
    /// Thickness of each slice, µm.
    pub h_um: f64,
    /// Each slice's ε, from the entrance face.
    pub eps: Vec<Matrix3<f64>>,
}

impl Slices {
    /// The slices of a cell `thickness_um` thick of nematic `lc` with director profile `profile`.
    pub fn new(lc: &Nematic, profile: &Profile, thickness_um: f64) -> Slices {
        let n = profile.sublayers();
        Slices {
            no: lc.no,
            ne: lc.ne,
            h_um: thickness_um / n as f64,
            eps: (0..n)
                .map(|j| {
                    let (t, a) = profile.mid(j);
                    slice_medium(lc, t, a).permittivity()
                })
                .collect(),
        }
    }

    /// The transfer matrix ψ(d) = M ψ(0) = P_N ⋯ P_1 at vacuum wavenumber `k0_per_um` and
    /// tangential wave vector `qt`: each slice's closed form ([`slice_exp`]), or its series
    /// ([`expi`]) in the page's own module (see the header).
    pub fn transfer(&self, k0_per_um: f64, qt: [f64; 2]) -> CMatrix4 {
        let theta = k0_per_um * self.h_um;
        if cfg!(all(target_arch = "wasm32", not(feature = "design-worker"))) {
            return self.eps.iter().fold(CMatrix4::identity(), |m, eps| {
                expi(&(berreman_delta(eps, qt) * theta)) * m
            });
        }
        self.eps
            .iter()
            .fold(Split::identity(), |m, eps| {
                slice_exp(eps, self.no, self.ne, qt, theta).mul(&m)
            })
            .to_matrix()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::random::Rng;
    use std::f64::consts::{PI, TAU};

    fn largest_difference(a: &CMatrix4, b: &CMatrix4) -> f64 {
        (a - b).iter().map(|z| z.norm()).fold(0.0, f64::max)
    }

    /// The closed form against the Taylor series (an independent evaluation of the same
    /// exponential) over random directions, director tilts and azimuths, slice thicknesses and
    /// indices: propagating and evanescent waves, directions along the optic axis (o and e
    /// coincide) and slices thick enough to be halved; to 10⁻¹³ of the matrix's size.
    #[test]
    fn the_closed_form_is_the_series() {
        let mut rng = Rng::new(14);
        for case in 0..3000 {
            let no = 1.45 + 0.2 * rng.uniform();
            let ne = no + 0.3 * (rng.uniform() - 0.3);
            let tilt = PI * (rng.uniform() - 0.5);
            let azimuth = TAU * rng.uniform();
            let c = nalgebra::Vector3::new(tilt.cos() * azimuth.cos(), tilt.cos() * azimuth.sin(), tilt.sin());
            let eps = Matrix3::identity() * (no * no) + c * c.transpose() * (ne * ne - no * no);
            let qt = match case % 4 {
                // Along the optic axis inside the slice: o and e waves coincide.
                0 => [no * c.x * c.z.signum(), no * c.y * c.z.signum()],
                // Evanescent waves (beyond the slice's indices).
                1 => {
                    let q = 1.0 + 1.0 * rng.uniform();
                    let phi = TAU * rng.uniform();
                    [q * phi.cos(), q * phi.sin()]
                }
                _ => {
                    let q = 0.99 * rng.uniform();
                    let phi = TAU * rng.uniform();
                    [q * phi.cos(), q * phi.sin()]
                }
            };
            // From a hundredth to twice a wave's phase per slice.
            let theta = 0.01 + 2.0 * rng.uniform();
            let got = slice_exp(&eps, no, ne, qt, theta).to_matrix();
            let want = expi(&(berreman_delta(&eps, qt) * theta));
            let size = want.iter().map(|z| z.norm()).fold(1.0, f64::max);
            let diff = largest_difference(&got, &want);
            assert!(
                diff <= 1e-13 * size,
                "case {case}: no {no}, ne {ne}, tilt {tilt}, qt {qt:?}, θ {theta}: {diff:e} of {size}"
            );
        }
    }

    /// The four roots are the eigenvalues of Δ: det(Δ − λ I) vanishes at each, relative to the
    /// size of Δ's entries (Fresnel's factored equation against Berreman's matrix).
    #[test]
    fn the_roots_are_the_eigenvalues() {
        let mut rng = Rng::new(3);
        for _ in 0..500 {
            let (no, ne) = (1.5, 1.5 + 0.25 * rng.uniform());
            let (tilt, azimuth) = (PI * rng.uniform(), TAU * rng.uniform());
            let c = nalgebra::Vector3::new(tilt.cos() * azimuth.cos(), tilt.cos() * azimuth.sin(), tilt.sin());
            let eps = Matrix3::identity() * (no * no) + c * c.transpose() * (ne * ne - no * no);
            let qt = [1.8 * (rng.uniform() - 0.5), 1.8 * (rng.uniform() - 0.5)];
            let delta = berreman_delta(&eps, qt).map(Complex64::from);
            for lambda in slice_roots(&eps, no, ne, qt) {
                let det = (delta - CMatrix4::identity() * lambda).determinant();
                assert!(det.norm() < 1e-12, "{lambda}: det {det}");
            }
        }
    }
}
