//! Plane-wave modes of a uniaxial crystal and of the isotropic outside medium, for one
//! tangential wave vector.
//!
//! Physics. All faces are parallel to the x–y plane, so the tangential part q_t = (q_x, q_y) of
//! the normalized wave vector q = k/k0 is the same in every layer (phase matching). For each medium
//! we need the normal component q_z of each mode and its fields:
//!
//! - ordinary: q_z = ±√(n_o² − |q_t|²); D ∥ E ∥ q × c.
//! - extraordinary: q·A·q = 1 with A = I/n_e² + (1/n_o² − 1/n_e²) c cᵀ is a quadratic
//!   a q_z² + 2 b q_z + c₀ = 0 in q_z. Its ray direction is A·q, whose z-component is
//!   a q_z + b = ±√(b² − a c₀); so the root `(−b + √disc)/a` is the one whose *energy* flows into
//!   +z (forward), even where its wave vector points backward. D ∥ (q × c) × q, E = ε⁻¹ D.
//! - isotropic: q_z = ±√(n² − |q_t|²), any transverse E.
//!
//! A negative discriminant makes the mode evanescent: q_z is complex with the imaginary part that
//! decays along the direction of travel, and the mode carries no power along z. This is how total
//! internal reflection is reported, never as NaN.
//!
//! Field units: E is dimensionless, H is scaled by the vacuum impedance (Z0·H = q × E), so that
//! the time-averaged Poynting vector is ½ Re(E × H*) / Z0 ∝ Re(E × H*) in every medium alike.
//! Propagating modes are normalized to unit |S_z| = |Re(E × H*)_z|, so that |amplitude|² is the
//! power carried across a face. Evanescent modes are normalized to |E| = 1.
//!
//! Degenerate direction: when q is (almost) along c the two modes are degenerate and any
//! transverse pair is a valid basis; we then take D_o ∥ q × x̂ (or q × ŷ, whichever is larger,
//! ties going to q × x̂: at normal incidence along the axis D_o ∥ ŷ and D_e ∥ x̂).
//!
//! Basis of the outside medium (forward): the transverse pair e1, e2 obtained from x̂, ŷ by the
//! smallest rotation that carries ẑ onto the beam direction u, so that at normal incidence e1 = x̂,
//! e2 = ŷ. Jones vectors are components on (e1, e2). Backward waves use the mirror images of
//! e1, e2 in the face. Sources: Born & Wolf §15.2–15.3; P. Yeh, *Optical Waves in Layered Media*
//! (1988), ch. 9 (modes of anisotropic layers).

use crate::optics::uniaxial::Uniaxial;
use crate::precision::DEGENERATE_DIRECTION;
use nalgebra::{Matrix3, Vector3};
use num_complex::Complex64;

/// Complex 3-vector.
pub type CVector3 = Vector3<Complex64>;

/// Ordinary or extraordinary (for the isotropic medium: first or second basis vector).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ModeKind {
    /// The ordinary wave (index n_o in every direction); in an isotropic medium, basis vector e1.
    Ordinary,
    /// The extraordinary wave; in an isotropic medium, basis vector e2.
    Extraordinary,
}

/// Direction in which a mode carries energy across the faces.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Travel {
    /// Energy (or, if evanescent, decay) toward +z.
    Forward,
    /// Energy (or decay) toward −z.
    Backward,
}

impl Travel {
    /// +1 forward, −1 backward.
    pub fn sign(self) -> f64 {
        match self {
            Travel::Forward => 1.0,
            Travel::Backward => -1.0,
        }
    }
}

/// One plane-wave mode at a given tangential wave vector.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Mode {
    /// Which mode.
    pub kind: ModeKind,
    /// Which way it carries energy.
    pub travel: Travel,
    /// Normalized wave vector k/k0 (q_z complex for an evanescent mode).
    pub q: CVector3,
    /// Electric field (see the module header for the normalization).
    pub e: CVector3,
    /// Z0·H = q × E.
    pub h: CVector3,
    /// Relative displacement D/ε0 = ε E.
    pub d: CVector3,
    /// Whether the mode propagates (real q_z) rather than being evanescent.
    pub propagating: bool,
    /// Unit ray direction from the closed form (q for o-waves and isotropic media, A·q for
    /// e-waves); `None` when evanescent. Agrees with Re(E × H*) (tested) and is exact where that
    /// product would carry rounding, e.g. it gives exactly zero walk-off for o-waves.
    ray: Option<Vector3<f64>>,
}

impl Mode {
    fn build(
        kind: ModeKind,
        travel: Travel,
        q: CVector3,
        e: CVector3,
        d: CVector3,
        propagating: bool,
        ray: Vector3<f64>,
    ) -> Self {
        let h = q.cross(&e);
        let ray_norm = ray.norm();
        let ray = (propagating && ray_norm > 0.0).then(|| ray / ray_norm);
        let mut mode = Mode {
            kind,
            travel,
            q,
            e,
            h,
            d,
            propagating,
            ray,
        };
        let scale = if propagating {
            // The normal Poynting flux Re(E × H*)_z, without the other two components.
            let sz = (e.x * h.y.conj() - e.y * h.x.conj()).re.abs();
            if sz > 0.0 { 1.0 / sz.sqrt() } else { 1.0 }
        } else {
            let n = e.norm();
            if n > 0.0 { 1.0 / n } else { 1.0 }
        };
        mode.e *= Complex64::from(scale);
        mode.h *= Complex64::from(scale);
        mode.d *= Complex64::from(scale);
        mode
    }

    /// A mode whose fields another solver has found and normalized as this module's header says
    /// (the general crystal's, [`crate::optics::general_modes`]); `ray` is its unit energy
    /// direction, `None` when evanescent.
    #[allow(clippy::too_many_arguments)]
    pub(crate) fn assembled(
        kind: ModeKind,
        travel: Travel,
        q: CVector3,
        e: CVector3,
        h: CVector3,
        d: CVector3,
        propagating: bool,
        ray: Option<Vector3<f64>>,
    ) -> Self {
        Mode {
            kind,
            travel,
            q,
            e,
            h,
            d,
            propagating,
            ray,
        }
    }

    /// Normal component q_z of the normalized wave vector.
    pub fn qz(&self) -> Complex64 {
        self.q.z
    }

    /// Tangential fields (E_x, E_y, Z0 H_x, Z0 H_y), the quantities continuous across a face.
    pub fn tangential(&self) -> [Complex64; 4] {
        [self.e.x, self.e.y, self.h.x, self.h.y]
    }

    /// Time-averaged Poynting vector Re(E × H*) in the module's units.
    pub fn poynting(&self) -> Vector3<f64> {
        let hc = self.h.map(|z| z.conj());
        self.e.cross(&hc).map(|z| z.re)
    }

    /// Real part of the wave vector (the wave vector itself for a propagating mode).
    pub fn wave_vector(&self) -> Vector3<f64> {
        self.q.map(|z| z.re)
    }

    /// Refractive index |k|/k0 seen by a propagating mode (|Re q| for an evanescent one).
    pub fn index(&self) -> f64 {
        self.wave_vector().norm()
    }

    /// Unit ray (energy) direction, or `None` for an evanescent mode.
    pub fn ray_direction(&self) -> Option<Vector3<f64>> {
        self.ray
    }

    /// The same mode seen in a frame rotated by `r` (every vector v becomes r·v). A mode solved
    /// in a face's own frame is brought back to the lab frame this way; its normalization (unit
    /// power flux across that face) is kept.
    pub fn rotated(&self, r: &Matrix3<f64>) -> Mode {
        Mode {
            q: real_times(r, &self.q),
            e: real_times(r, &self.e),
            h: real_times(r, &self.h),
            d: real_times(r, &self.d),
            ray: self.ray.map(|v| r * v),
            ..*self
        }
    }
}

/// Square root of `x` as the root of q_z² = x that travels along `travel`: real (signed by the
/// travel) when x > 0, otherwise imaginary with the decaying sign. Returns (root, propagating).
fn signed_root(x: f64, travel: Travel) -> (Complex64, bool) {
    if x > 0.0 {
        (Complex64::new(travel.sign() * x.sqrt(), 0.0), true)
    } else {
        (Complex64::new(0.0, travel.sign() * (-x).sqrt()), false)
    }
}

/// A real matrix times a complex vector, as (m·Re v) + i (m·Im v): the same numbers as the
/// complex product with a zero imaginary part, at a quarter of the multiplications.
fn real_times(m: &Matrix3<f64>, v: &CVector3) -> CVector3 {
    let re = m * v.map(|z| z.re);
    let im = m * v.map(|z| z.im);
    CVector3::new(
        Complex64::new(re.x, im.x),
        Complex64::new(re.y, im.y),
        Complex64::new(re.z, im.z),
    )
}

/// |q_t|: a plain square root (the components are indices, never near overflow or underflow,
/// so `hypot`'s care costs without gaining a digit).
fn tangential_norm(qt: [f64; 2]) -> f64 {
    (qt[0] * qt[0] + qt[1] * qt[1]).sqrt()
}

fn real3(v: Vector3<f64>) -> CVector3 {
    v.map(Complex64::from)
}

/// The normal components q_z of both wave vectors (ordinary, then extraordinary) of `crystal` at
/// tangential wave vector `qt`, travelling along `travel`, each with whether it propagates; `m`
/// is the crystal's extraordinary surface A ([`Uniaxial::extraordinary_surface`]). What fixes a
/// ray's direction beyond a face, without its fields.
fn crystal_normals(crystal: &Uniaxial, m: &Matrix3<f64>, qt: [f64; 2], travel: Travel) -> [(Complex64, bool); 2] {
    let no = crystal.indices.no;
    let qt_norm = tangential_norm(qt);
    // Ordinary: q_z² = n_o² − |q_t|², factored for accuracy near the critical angle.
    let ordinary = signed_root((no - qt_norm) * (no + qt_norm), travel);
    // Extraordinary: a q_z² + 2 b q_z + c0 = 0 from q·A·q = 1.
    let a = m[(2, 2)];
    let b = m[(2, 0)] * qt[0] + m[(2, 1)] * qt[1];
    let c0 = m[(0, 0)] * qt[0] * qt[0] + 2.0 * m[(0, 1)] * qt[0] * qt[1] + m[(1, 1)] * qt[1] * qt[1] - 1.0;
    let extraordinary = extraordinary_root(a, b, c0, travel);
    [ordinary, extraordinary]
}

/// The root q_z of a q_z² + 2 b q_z + c0 = 0 (q·A·q = 1 along a face's normal, A the
/// extraordinary surface) that travels along `travel`, and whether it propagates: real, the one
/// whose energy flows along `travel`, when the discriminant is positive; otherwise complex,
/// decaying along `travel`.
fn extraordinary_root(a: f64, b: f64, c0: f64, travel: Travel) -> (Complex64, bool) {
    let disc = b * b - a * c0;
    let s = travel.sign();
    if disc > 0.0 {
        let r = disc.sqrt();
        // Root (−b + s·r)/a, computed without cancellation.
        let root = if s * b <= 0.0 {
            (-b + s * r) / a
        } else {
            c0 / (-b - s * r)
        };
        (Complex64::new(root, 0.0), true)
    } else {
        (Complex64::new(-b / a, s * (-disc).sqrt() / a), false)
    }
}

/// The wave vector beyond a face of unit normal `normal` (lab frame) of a forward wave in the
/// medium of ordinary index `no` and extraordinary surface `a` (`None`: an isotropic medium of
/// index `no`, or the ordinary mode), for an incident wave vector `q`: the tangential part
/// q − (q·n)n is kept and the normal component is the root [`crystal_modes`] and
/// [`isotropic_modes`] take, written in the lab frame instead of the face's own (the same
/// quadratic, its coefficients n·A·n, n·A·q_t and q_t·A·q_t − 1). `None` when that wave is
/// evanescent. What a ray's direction beyond a face depends on, without its fields.
pub fn wave_vector_across(
    q: Vector3<f64>,
    normal: Vector3<f64>,
    no: f64,
    a: Option<&Matrix3<f64>>,
) -> Option<Vector3<f64>> {
    let qt = q - normal * q.dot(&normal);
    let (qn, propagating) = match a {
        None => {
            let qt_norm = qt.norm();
            signed_root((no - qt_norm) * (no + qt_norm), Travel::Forward)
        }
        Some(a) => {
            let an = a * normal;
            let c0 = qt.dot(&(a * qt)) - 1.0;
            extraordinary_root(normal.dot(&an), an.dot(&qt), c0, Travel::Forward)
        }
    };
    propagating.then(|| qt + normal * qn.re)
}

/// Both modes (ordinary, then extraordinary) of `crystal` at tangential wave vector `qt`,
/// travelling along `travel`.
pub fn crystal_modes(crystal: &Uniaxial, qt: [f64; 2], travel: Travel) -> [Mode; 2] {
    let surfaces = CrystalSurfaces::of(crystal);
    crystal_modes_with(crystal, &surfaces, qt, travel)
}

/// A uniaxial crystal's two matrices that its modes use at every tangential wave vector: the
/// extraordinary surface A ([`Uniaxial::extraordinary_surface`]) and ε⁻¹
/// ([`Uniaxial::inverse_permittivity`]), formed once for a crystal whose modes are solved many
/// times in one frame (the faces of a stack traced over many incidences).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CrystalSurfaces {
    /// The extraordinary surface A.
    pub surface: Matrix3<f64>,
    /// The inverse relative permittivity ε⁻¹.
    pub inverse_permittivity: Matrix3<f64>,
}

impl CrystalSurfaces {
    /// The matrices of `crystal`.
    pub fn of(crystal: &Uniaxial) -> CrystalSurfaces {
        CrystalSurfaces {
            surface: crystal.extraordinary_surface(),
            inverse_permittivity: crystal.inverse_permittivity(),
        }
    }
}

/// [`crystal_modes`] with the crystal's matrices already formed (`surfaces`, those of `crystal`):
/// the same numbers.
pub fn crystal_modes_with(crystal: &Uniaxial, surfaces: &CrystalSurfaces, qt: [f64; 2], travel: Travel) -> [Mode; 2] {
    let c = crystal.axis.unit();
    let m = surfaces.surface;
    let [(qz_o, prop_o), (qz_e, prop_e)] = crystal_normals(crystal, &m, qt, travel);
    let q_o = CVector3::new(qt[0].into(), qt[1].into(), qz_o);
    let q_e = CVector3::new(qt[0].into(), qt[1].into(), qz_e);

    let cc = real3(c);
    let inv_eps = surfaces.inverse_permittivity;

    // Ordinary displacement ∥ q × c, with a fixed fallback along the optic axis.
    let d_o_of = |q: &CVector3| -> CVector3 {
        let d = q.cross(&cc);
        if d.norm() > DEGENERATE_DIRECTION * q.norm() {
            // Near the optic axis |q × c| is small and its rounding error is not: remove the
            // spurious part along q, so that D stays transverse to machine precision
            // (found by the independent 4×4 cross-check).
            d - q * (q.dot(&d) / q.dot(q))
        } else {
            let dx = q.cross(&real3(Vector3::x()));
            let dy = q.cross(&real3(Vector3::y()));
            if dx.norm() >= dy.norm() { dx } else { dy }
        }
    };
    let d_o = d_o_of(&q_o);
    let e_o = real_times(&inv_eps, &d_o);
    let d_e = d_o_of(&q_e).cross(&q_e);
    let e_e = real_times(&inv_eps, &d_e);

    [
        Mode::build(ModeKind::Ordinary, travel, q_o, e_o, d_o, prop_o, q_o.map(|z| z.re)),
        Mode::build(
            ModeKind::Extraordinary,
            travel,
            q_e,
            e_e,
            d_e,
            prop_e,
            m * q_e.map(|z| z.re),
        ),
    ]
}

/// The transverse basis (e1, e2) of a forward wave along unit vector `u` in the outside medium:
/// x̂ and ŷ carried by the smallest rotation that takes ẑ onto `u`.
///
/// Formula: e1 = (1 − u_x²/(1+u_z), −u_x u_y/(1+u_z), −u_x), e2 = (−u_x u_y/(1+u_z),
/// 1 − u_y²/(1+u_z), −u_y). Defined for u_z > −1; forward beams have u_z > 0.
pub fn beam_basis(u: Vector3<f64>) -> (Vector3<f64>, Vector3<f64>) {
    let w = 1.0 + u.z;
    let e1 = Vector3::new(1.0 - u.x * u.x / w, -u.x * u.y / w, -u.x);
    let e2 = Vector3::new(-u.x * u.y / w, 1.0 - u.y * u.y / w, -u.y);
    (e1, e2)
}

/// Both modes of an isotropic medium of index `n` at tangential wave vector `qt`: the fields
/// along e1 (reported as [`ModeKind::Ordinary`]) and e2 ([`ModeKind::Extraordinary`]) of
/// [`beam_basis`] for forward waves, their mirror images in the face for backward waves.
///
/// `qt` must be shorter than `n` for the modes to propagate; otherwise they are evanescent and the
/// basis is taken at grazing incidence.
pub fn isotropic_modes(n: f64, qt: [f64; 2], travel: Travel) -> [Mode; 2] {
    let qt_norm = tangential_norm(qt);
    let (qz, propagating) = signed_root((n - qt_norm) * (n + qt_norm), travel);
    let q = CVector3::new(qt[0].into(), qt[1].into(), qz);
    let uz = if propagating { qz.re.abs() / n } else { 0.0 };
    let u = Vector3::new(qt[0] / n, qt[1] / n, uz);
    let (mut e1, mut e2) = beam_basis(u);
    if travel == Travel::Backward {
        e1.z = -e1.z;
        e2.z = -e2.z;
    }
    let n2 = Complex64::from(n * n);
    let mk = |kind, e: CVector3| Mode::build(kind, travel, q, e, e * n2, propagating, q.map(|z| z.re));
    if !propagating && qt_norm > 0.0 {
        // An evanescent wave (complex q, q·q = n²) must have q·E = 0: the s-like field
        // E_s = ẑ × q̂_t is real and transverse; the p-like one is q × E_s / n (complex). A real
        // grazing basis would not solve the wave equation and would misplace the light that the
        // face reflects between the reflected waves.
        let s_like = Vector3::new(-qt[1], qt[0], 0.0) / qt_norm;
        let p_like = q.cross(&real3(s_like)) / Complex64::from(n);
        return [
            mk(ModeKind::Ordinary, p_like),
            mk(ModeKind::Extraordinary, real3(s_like)),
        ];
    }
    [
        mk(ModeKind::Ordinary, real3(e1)),
        mk(ModeKind::Extraordinary, real3(e2)),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::uniaxial::{angle_between, extraordinary_index, walkoff};

    fn crystal(no: f64, ne: f64, tilt: f64, az: f64) -> Uniaxial {
        Uniaxial::from_numbers(no, ne, tilt, az).unwrap()
    }

    /// Residual of the wave equation q × (q × E) + ε E = 0, relative to |ε E|.
    fn wave_equation_residual(cr: &Uniaxial, m: &Mode) -> f64 {
        let eps = cr.permittivity().map(Complex64::from);
        let r = m.q.cross(&m.q.cross(&m.e)) + eps * m.e;
        r.norm() / (eps * m.e).norm()
    }

    #[test]
    fn normal_incidence_matches_closed_forms() {
        let cr = crystal(1.6557, 1.4849, 45.0, 0.0);
        let [o, e] = crystal_modes(&cr, [0.0, 0.0], Travel::Forward);
        assert!((o.qz().re - 1.6557).abs() < 1e-15);
        let n45 = extraordinary_index(cr.indices, 45f64.to_radians());
        assert!((e.qz().re - n45).abs() < 1e-14, "{} vs {}", e.qz().re, n45);
        let rho = angle_between(&e.wave_vector(), &e.ray_direction().unwrap());
        assert!((rho - walkoff(cr.indices, 45f64.to_radians())).abs() < 1e-13);
        // Negative crystal: the ray leans away from the axis, which lies in +x: so toward −x.
        assert!(e.ray_direction().unwrap().x < 0.0);
        for m in [o, e] {
            assert!(wave_equation_residual(&cr, &m) < 1e-14);
            assert!((m.poynting().z - 1.0).abs() < 1e-14);
        }
    }

    #[test]
    fn evanescent_modes_are_reported_not_nan() {
        // Immersion index above the crystal's: the ordinary wave cannot propagate.
        let cr = crystal(1.38, 1.39, 30.0, 20.0);
        let [o, e] = crystal_modes(&cr, [1.45, 0.0], Travel::Forward);
        assert!(!o.propagating && !e.propagating);
        assert!(o.qz().im > 0.0 && e.qz().im > 0.0, "decay toward +z");
        for m in [o, e] {
            assert!(m.e.iter().all(|z| z.re.is_finite() && z.im.is_finite()));
            assert!(m.ray_direction().is_none());
        }
    }

    /// An evanescent wave of an isotropic medium solves the wave equation: q·E = 0 with
    /// q·q = n² (complex q, bilinear products), both travels, any azimuth, and its two fields are
    /// independent (Born & Wolf §1.5.4 for the evanescent field beyond a totally reflecting face).
    #[test]
    fn evanescent_isotropic_waves_are_transverse() {
        for (qt, travel) in [
            ([1.2, 0.3], Travel::Forward),
            ([-0.4, 1.1], Travel::Backward),
            ([0.0, 1.6], Travel::Forward),
        ] {
            let modes = isotropic_modes(1.0, qt, travel);
            for m in &modes {
                assert!(!m.propagating);
                assert!(m.q.dot(&m.e).norm() < 1e-15, "q·E = {}", m.q.dot(&m.e));
                assert!((m.q.dot(&m.q) - Complex64::from(1.0)).norm() < 1e-15);
                assert!(
                    (m.q.z.im > 0.0) == (travel == Travel::Forward),
                    "decays along its travel"
                );
            }
            assert!(modes[0].e.cross(&modes[1].e).norm() > 0.5, "independent fields");
        }
    }

    #[test]
    fn backward_roots_carry_energy_backward() {
        let cr = crystal(1.6557, 1.4849, 37.0, 110.0);
        for qt in [[0.0, 0.0], [0.3, -0.2], [0.9, 0.1]] {
            let [o, e] = crystal_modes(&cr, qt, Travel::Backward);
            assert!(o.poynting().z < 0.0 && e.poynting().z < 0.0);
            let [fo, fe] = crystal_modes(&cr, qt, Travel::Forward);
            assert!(fo.poynting().z > 0.0 && fe.poynting().z > 0.0);
            for m in [o, e, fo, fe] {
                assert!(wave_equation_residual(&cr, &m) < 1e-13);
                // Cross-method: the closed-form ray (q or A·q) is the direction of Re(E × H*).
                let s = m.poynting();
                let ray = m.ray_direction().unwrap();
                assert!((s / s.norm() - ray).norm() < 1e-14, "{ray:?} vs {s:?}");
            }
        }
    }

    #[test]
    fn beam_basis_is_orthonormal_and_continuous() {
        for (p, a) in [(0.0f64, 0.0f64), (10.0, 30.0), (60.0, -120.0), (89.0, 200.0)] {
            let (p, a) = (p.to_radians(), a.to_radians());
            let u = Vector3::new(p.sin() * a.cos(), p.sin() * a.sin(), p.cos());
            let (e1, e2) = beam_basis(u);
            assert!((e1.norm() - 1.0).abs() < 1e-14 && (e2.norm() - 1.0).abs() < 1e-14);
            assert!(e1.dot(&e2).abs() < 1e-14 && e1.dot(&u).abs() < 1e-14 && e2.dot(&u).abs() < 1e-14);
            assert!((e1.cross(&e2) - u).norm() < 1e-14, "right-handed (e1, e2, u)");
        }
    }
}
