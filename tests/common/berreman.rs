//! The general 4×4 (Berreman) first-order system of a homogeneous anisotropic medium, shared by
//! the independent cross-checks: Δ with q_z ψ = Δ ψ for the tangential fields ψ = (E_x, E_y,
//! Z0H_x, Z0H_y), its eigenvalues from the real Schur form, null vectors and null spaces, and the
//! seeded generator the checks draw their cases from. The derivation of Δ and the numerical
//! choices are written out in `tests/independent_wave_equation.rs`.
//!
//! Sources: D. W. Berreman, J. Opt. Soc. Am. 62, 502–510 (1972); M. Born and E. Wolf,
//! *Principles of Optics*, §15.2.

use nalgebra::{Matrix3, Matrix4, Vector3, Vector4};
use num_complex::Complex64;

/// Complex scalar.
pub type C = Complex64;

/// Optic axis from the documented convention c = (sin t cos a, sin t sin a, cos t).
pub fn axis_unit(tilt_deg: f64, az_deg: f64) -> Vector3<f64> {
    let (t, a) = (tilt_deg.to_radians(), az_deg.to_radians());
    Vector3::new(t.sin() * a.cos(), t.sin() * a.sin(), t.cos())
}

/// ε = n_o² I + (n_e² − n_o²) c cᵀ (Born & Wolf §15.2 in the principal frame, rotated to the lab).
pub fn permittivity(no: f64, ne: f64, c: &Vector3<f64>) -> Matrix3<f64> {
    Matrix3::identity() * (no * no) + c * c.transpose() * (ne * ne - no * no)
}

/// E_z = a·ψ (see the module header).
pub fn ez_row(qx: f64, qy: f64, eps: &Matrix3<f64>) -> [f64; 4] {
    let ezz = eps[(2, 2)];
    [-eps[(2, 0)] / ezz, -eps[(2, 1)] / ezz, qy / ezz, -qx / ezz]
}

/// Berreman's Δ for ψ = (E_x, E_y, H̃_x, H̃_y): q_z ψ = Δ ψ.
pub fn berreman(qx: f64, qy: f64, eps: &Matrix3<f64>) -> Matrix4<f64> {
    let a = ez_row(qx, qy, eps);
    let mut d = Matrix4::zeros();
    for j in 0..4 {
        d[(0, j)] = qx * a[j];
        d[(1, j)] = qy * a[j];
        d[(2, j)] = -eps[(1, 2)] * a[j];
        d[(3, j)] = eps[(0, 2)] * a[j];
    }
    d[(0, 3)] += 1.0;
    d[(1, 2)] -= 1.0;
    d[(2, 0)] += -qx * qy - eps[(1, 0)];
    d[(2, 1)] += qx * qx - eps[(1, 1)];
    d[(3, 0)] += -qy * qy + eps[(0, 0)];
    d[(3, 1)] += qx * qy + eps[(0, 1)];
    d
}

/// The four eigenvalues of Δ from its real Schur form T = Qᵀ Δ Q (quasi-triangular): 1×1 blocks
/// are real eigenvalues, each 2×2 block [[a, b], [c, d]] gives (a+d)/2 ± √(((a−d)/2)² + bc).
///
/// Not `Matrix4::complex_eigenvalues`: in nalgebra 0.35 it assumes every remaining 2×2 block has a
/// negative discriminant, and returns NaN imaginary parts when the Schur iteration leaves a block
/// with a (tiny) positive one, which it does for the near-degenerate real pairs tested here.
pub fn eigenvalues(d: &Matrix4<f64>) -> [C; 4] {
    try_eigenvalues(d).unwrap_or_else(|| panic!("the Schur iteration does not converge on {d}"))
}

/// Sweeps of the Schur and SVD iterations before they are given up (nalgebra's plain `schur`
/// and `svd` iterate without bound, and a few matrices met near critical angles never settle).
pub const MAX_SWEEPS: usize = 10_000;

/// [`eigenvalues`], or `None` when the Schur iteration does not converge.
pub fn try_eigenvalues(d: &Matrix4<f64>) -> Option<[C; 4]> {
    let (_, t) = d.try_schur(f64::EPSILON, MAX_SWEEPS)?.unpack();
    let mut out = [C::new(0.0, 0.0); 4];
    let mut m = 0;
    while m < 4 {
        if m == 3 || t[(m + 1, m)] == 0.0 {
            out[m] = C::from(t[(m, m)]);
            m += 1;
        } else {
            let (a, b, c, d) = (t[(m, m)], t[(m, m + 1)], t[(m + 1, m)], t[(m + 1, m + 1)]);
            let (mean, half) = (0.5 * (a + d), 0.5 * (a - d));
            let disc = half * half + b * c;
            let s = disc.abs().sqrt();
            if disc >= 0.0 {
                out[m] = C::from(mean + s);
                out[m + 1] = C::from(mean - s);
            } else {
                out[m] = C::new(mean, s);
                out[m + 1] = C::new(mean, -s);
            }
            m += 2;
        }
    }
    out.iter().all(|z| z.re.is_finite() && z.im.is_finite()).then_some(out)
}

/// Unit null vector of Δ − λ I (right singular vector of the smallest singular value).
pub fn null_vector(d: &Matrix4<f64>, lambda: C) -> Vector4<C> {
    if lambda.im == 0.0 {
        // Real eigenvalue: a real null vector (cheaper, same answer up to a phase).
        let svd = (d - Matrix4::identity() * lambda.re).svd(false, true);
        let vt = svd.v_t.expect("v_t requested");
        let k = (0..4)
            .min_by(|&i, &j| svd.singular_values[i].total_cmp(&svd.singular_values[j]))
            .unwrap();
        return Vector4::new(vt[(k, 0)], vt[(k, 1)], vt[(k, 2)], vt[(k, 3)]).map(C::from);
    }
    null_space(d, lambda, 1).expect("the SVD converges").remove(0)
}

/// An orthonormal basis (in the ordinary Hermitian sense) of the `dim`-dimensional near-null
/// space of Δ − λ I: the right singular vectors of its `dim` smallest singular values. A
/// semisimple double eigenvalue (both polarizations of an isotropic medium) has a null space of
/// dimension two.
pub fn null_space(d: &Matrix4<f64>, lambda: C, dim: usize) -> Option<Vec<Vector4<C>>> {
    let m = d.map(C::from) - Matrix4::<C>::identity() * lambda;
    let svd = m.try_svd(false, true, f64::EPSILON, MAX_SWEEPS)?;
    let vt = svd.v_t.expect("v_t requested");
    let mut order: Vec<usize> = (0..4).collect();
    order.sort_by(|&i, &j| svd.singular_values[i].total_cmp(&svd.singular_values[j]));
    let out = order[..dim]
        .iter()
        .map(|&k| {
            Vector4::new(
                vt[(k, 0)].conj(),
                vt[(k, 1)].conj(),
                vt[(k, 2)].conj(),
                vt[(k, 3)].conj(),
            )
        })
        .collect();
    Some(out)
}

/// xorshift64* (Vigna), deterministic and dependency-free.
pub struct Rng(pub u64);

impl Rng {
    pub fn next_u64(&mut self) -> u64 {
        let mut x = self.0;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.0 = x;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    /// Uniform in [0, 1).
    pub fn unit(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
    pub fn range(&mut self, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * self.unit()
    }
    /// 10^u with u uniform in [lo_exp, hi_exp].
    pub fn log_range(&mut self, lo_exp: f64, hi_exp: f64) -> f64 {
        10f64.powf(self.range(lo_exp, hi_exp))
    }
    pub fn sign(&mut self) -> f64 {
        if self.next_u64() & 1 == 0 { 1.0 } else { -1.0 }
    }
    pub fn chance(&mut self, p: f64) -> bool {
        self.unit() < p
    }
}
