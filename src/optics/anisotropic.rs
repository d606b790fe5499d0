//! A general non-absorbing crystal: three principal indices on three principal axes, and an
//! optional optical activity. This holds biaxial crystals (three different indices) and chiral
//! ones (crystalline quartz); a uniaxial crystal without optical activity keeps its own closed form
//! ([`crate::optics::uniaxial`]), which is the fast path and the cross-check of this one.
//!
//! Physics. The medium is described in the principal frame, whose axes a₁, a₂, a₃ are the columns
//! of the rotation `axes` (lab frame = axes · principal frame):
//!
//! ```text
//! ε = R diag(n₁², n₂², n₃²) Rᵀ,      κ = R diag(κ₁, κ₂, κ₃) Rᵀ,
//! D = ε₀ ε E + (i/c) κ H,            B = μ₀ H − (i/c) κ E.
//! ```
//!
//! The second line is the local (Drude–Born–Fedorov, or "Pasteur") form of natural optical
//! activity: a reciprocal, lossless chiral medium has a real symmetric κ. It is used rather than
//! the gyration form D = ε₀(εE + i G×E), G = g·k/k₀, because it is local: tangential E and H are
//! continuous at a face, the Poynting vector Re(E × H*) is the energy flux and the 4×4 method is
//! exact with it. The two agree to first order in the activity: for symmetric κ,
//! q×(κE) + κ(q×E) = ((tr κ) I − κ)q × E, so the gyration tensor is g = (tr κ) I − κ and, back,
//! κ = ½(tr g) I − g ([`Anisotropic::chirality_from_gyration`]); they differ by κ², about 10⁻⁹ of
//! ε for quartz. Along a principal axis a₃ the rotatory power is ρ = k₀ (κ₁ + κ₂)/2 per unit length
//! (for an isotropic κ the two circular waves have indices n ± κ exactly).
//! Sources: M. Born and E. Wolf, *Principles of Optics*, 7th ed., §15.3 (optic axes of a biaxial
//! crystal); L. D. Landau and E. M. Lifshitz, *Electrodynamics of Continuous Media*, §§ 98–101
//! (gyrotropic media, from memory); A. Lakhtakia, *Beltrami Fields in Chiral Media* (1994), ch. 1
//! (the local constitutive form, from memory).
//!
//! Conventions (`../shared/CONVENTIONS.md`, "More media"): orientation `axes` {tilt, azimuth,
//! roll} gives R = Rz(azimuth)·Ry(tilt)·Rz(roll); for a uniaxial crystal the optic axis is R·ẑ, so
//! `axis` {tilt, azimuth} is `axes` with roll 0. Catalogue biaxial crystals have n_x < n_y < n_z on
//! their principal axes x, y, z. Mode letters: `o`/`e` for a uniaxial crystal (two equal principal
//! indices), `f` (fast, lower index) and `s` (slow) for a biaxial one.

use crate::error::{Error, finite};
use nalgebra::{Matrix3, Vector3};

/// Relative difference of two principal indices below which they are taken as equal (the crystal
/// is uniaxial). Published biaxial crystals differ by 10⁻³ or more.
pub const EQUAL_PRINCIPAL: f64 = 1e-12;

/// The letters that name a medium's two modes in ray labels and reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ModeLetters {
    /// Uniaxial: ordinary `o` and extraordinary `e`.
    OrdinaryExtraordinary,
    /// Biaxial: fast `f` (lower index) and slow `s`.
    FastSlow,
}

impl ModeLetters {
    /// The two letters, first mode first.
    pub fn letters(self) -> [char; 2] {
        match self {
            ModeLetters::OrdinaryExtraordinary => ['o', 'e'],
            ModeLetters::FastSlow => ['f', 's'],
        }
    }
}

/// A general crystal at one wavelength: principal indices, principal axes and chirality.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Anisotropic {
    /// Principal refractive indices n₁, n₂, n₃ along the columns of `axes`.
    pub principal: [f64; 3],
    /// Proper rotation whose columns are the principal axes in the lab frame.
    pub axes: Matrix3<f64>,
    /// Principal values κ₁, κ₂, κ₃ of the chirality tensor on the same axes (all 0 without
    /// optical activity).
    pub chirality: [f64; 3],
}

/// R = Rz(azimuth)·Ry(tilt)·Rz(roll), angles in radians: carries ẑ to
/// (sin t cos a, sin t sin a, cos t), as the optic-axis convention does.
pub fn orientation(tilt: f64, azimuth: f64, roll: f64) -> Matrix3<f64> {
    let rz = |a: f64| {
        let (s, c) = a.sin_cos();
        Matrix3::new(c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0)
    };
    let (s, c) = tilt.sin_cos();
    let ry = Matrix3::new(c, 0.0, s, 0.0, 1.0, 0.0, -s, 0.0, c);
    rz(azimuth) * ry * rz(roll)
}

impl Anisotropic {
    /// A crystal from its principal indices, its principal axes and its chirality.
    ///
    /// # Errors
    /// `principal` when an index is not finite or below 1; `axes` when the matrix is not a proper
    /// rotation (to 10⁻⁹); `chirality` when a value is not finite or is not small against the
    /// indices (|κ| ≥ 0.01·min n: no crystal comes near, and the modes would stop being the
    /// slightly perturbed crystal modes every report assumes).
    pub fn new(principal: [f64; 3], axes: Matrix3<f64>, chirality: [f64; 3]) -> Result<Self, Error> {
        for n in principal {
            if !(n.is_finite() && n >= 1.0) {
                return Err(Error::new(
                    "principal",
                    format!("a principal index must be a finite number of at least 1, got {n}"),
                ));
            }
        }
        for x in axes.iter() {
            finite("axes", *x)?;
        }
        let off = (axes.transpose() * axes - Matrix3::identity()).abs().max();
        if off > 1e-9 || (axes.determinant() - 1.0).abs() > 1e-9 {
            return Err(Error::new("axes", "the principal axes must form a proper rotation"));
        }
        let smallest = principal.iter().cloned().fold(f64::INFINITY, f64::min);
        for k in chirality {
            if !(k.is_finite() && k.abs() < 0.01 * smallest) {
                return Err(Error::new(
                    "chirality",
                    format!("a chirality must be finite and below 1% of the indices, got {k}"),
                ));
            }
        }
        Ok(Anisotropic {
            principal,
            axes,
            chirality,
        })
    }

    /// The chirality principal values κ = ½(tr g) I − g for a gyration tensor g with principal
    /// values `g` (see the module header).
    pub fn chirality_from_gyration(g: [f64; 3]) -> [f64; 3] {
        let half_trace = 0.5 * (g[0] + g[1] + g[2]);
        [half_trace - g[0], half_trace - g[1], half_trace - g[2]]
    }

    /// The relative permittivity ε in the lab frame.
    pub fn permittivity(&self) -> Matrix3<f64> {
        let [a, b, c] = self.principal;
        self.axes * Matrix3::from_diagonal(&Vector3::new(a * a, b * b, c * c)) * self.axes.transpose()
    }

    /// The chirality tensor κ in the lab frame.
    pub fn chirality_tensor(&self) -> Matrix3<f64> {
        self.axes * Matrix3::from_diagonal(&Vector3::from(self.chirality)) * self.axes.transpose()
    }

    /// Whether the crystal is optically active (any κ not zero).
    pub fn is_chiral(&self) -> bool {
        self.chirality.iter().any(|k| *k != 0.0)
    }

    /// The same crystal seen in a frame rotated by `r` (its axes become r·axes).
    pub fn rotated(&self, r: &Matrix3<f64>) -> Anisotropic {
        Anisotropic {
            axes: r * self.axes,
            ..*self
        }
    }

    /// For a uniaxial crystal (two principal indices equal to `EQUAL_PRINCIPAL`), the position
    /// (0, 1 or 2) of the distinct one, whose axis is the optic axis; `None` when biaxial. A crystal
    /// with three equal indices is reported as uniaxial along its third axis.
    pub fn uniaxial_axis(&self) -> Option<usize> {
        let p = self.principal;
        let same = |i: usize, j: usize| (p[i] - p[j]).abs() <= EQUAL_PRINCIPAL * p[i].max(p[j]);
        if same(0, 1) {
            Some(2)
        } else if same(0, 2) {
            Some(1)
        } else if same(1, 2) {
            Some(0)
        } else {
            None
        }
    }

    /// The letters of the two modes: `o`/`e` when uniaxial, `f`/`s` when biaxial.
    pub fn letters(&self) -> ModeLetters {
        if self.uniaxial_axis().is_some() {
            ModeLetters::OrdinaryExtraordinary
        } else {
            ModeLetters::FastSlow
        }
    }

    /// The two optic axes (binormals: the wave-normal directions along which the two modes of the
    /// non-chiral crystal have one index) of a biaxial crystal, unit vectors in the lab frame;
    /// `None` for a uniaxial one.
    ///
    /// Formula (Born & Wolf §15.3.3): with the principal indices sorted n_a < n_b < n_c on axes
    /// a, b, c, the binormals lie in the a–c plane at ±V from c, with
    /// tan V = (n_c/n_a) √((n_b² − n_a²)/(n_c² − n_b²)). The first axis returned has a positive
    /// component along a.
    pub fn optic_axes(&self) -> Option<[Vector3<f64>; 2]> {
        if self.uniaxial_axis().is_some() {
            return None;
        }
        let mut order = [0usize, 1, 2];
        order.sort_by(|&i, &j| self.principal[i].total_cmp(&self.principal[j]));
        let [ia, ib, ic] = order;
        let (na, nb, nc) = (self.principal[ia], self.principal[ib], self.principal[ic]);
        let v = ((nc / na) * ((nb * nb - na * na) / (nc * nc - nb * nb)).sqrt()).atan();
        let a: Vector3<f64> = self.axes.column(ia).into();
        let c: Vector3<f64> = self.axes.column(ic).into();
        let (s, co) = v.sin_cos();
        Some([a * s + c * co, -a * s + c * co])
    }

    /// The two indices (lower first) of the crystal without its optical activity along the unit
    /// wave normal `s`: 1/n² are the eigenvalues of the transverse part of ε⁻¹ on the plane ⊥ s
    /// (Born & Wolf §15.2), independent of the binormal formula of [`Anisotropic::optic_axes`].
    pub fn indices_along(&self, s: Vector3<f64>) -> (f64, f64) {
        let [a, b, c] = self.principal;
        let d = Vector3::new(1.0 / (a * a), 1.0 / (b * b), 1.0 / (c * c));
        let inv = self.axes * Matrix3::from_diagonal(&d) * self.axes.transpose();
        let t1 = s
            .cross(&Vector3::x())
            .try_normalize(1e-6)
            .unwrap_or_else(|| s.cross(&Vector3::y()).normalize());
        let t2 = s.cross(&t1);
        let (a, b, c) = (t1.dot(&(inv * t1)), t1.dot(&(inv * t2)), t2.dot(&(inv * t2)));
        let mean = 0.5 * (a + c);
        let half = (0.25 * (a - c) * (a - c) + b * b).sqrt();
        (1.0 / (mean + half).sqrt(), 1.0 / (mean - half).sqrt())
    }

    /// The angle 2V between the two optic axes of a biaxial crystal, radians.
    pub fn optic_axis_angle(&self) -> Option<f64> {
        let [u, v] = self.optic_axes()?;
        Some(u.dot(&v).clamp(-1.0, 1.0).acos())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn crystal(principal: [f64; 3], tilt: f64, az: f64, roll: f64) -> Anisotropic {
        Anisotropic::new(principal, orientation(tilt, az, roll), [0.0; 3]).unwrap()
    }

    #[test]
    fn orientation_carries_z_to_the_optic_axis_convention() {
        let (t, a) = (0.7, -2.1);
        let z = orientation(t, a, 1.3) * Vector3::z();
        let want = Vector3::new(t.sin() * a.cos(), t.sin() * a.sin(), t.cos());
        assert!((z - want).norm() < 1e-15);
    }

    #[test]
    fn along_each_optic_axis_the_two_indices_meet() {
        // Principal indices of a KTP-like crystal near 1 µm (invented for the test, any
        // n_a < n_b < n_c will do), in a shuffled order and an arbitrary orientation.
        let m = crystal([1.83, 1.74, 1.75], 0.4, 1.1, -0.6);
        let axes = m.optic_axes().unwrap();
        for u in axes {
            let (n1, n2) = m.indices_along(u);
            assert!((n1 - n2).abs() < 1e-12, "{n1} {n2}");
        }
        // And nowhere else nearby: a small step off the axis splits them.
        let off = (axes[0] + Vector3::new(0.0, 0.01, 0.0)).normalize();
        let (n1, n2) = m.indices_along(off);
        assert!((n1 - n2).abs() > 1e-6);
    }

    #[test]
    fn uniaxial_when_two_indices_are_equal() {
        let m = crystal([1.5, 1.6, 1.5], 0.0, 0.0, 0.0);
        assert_eq!(m.uniaxial_axis(), Some(1));
        assert_eq!(m.letters().letters(), ['o', 'e']);
        assert!(m.optic_axes().is_none());
        assert_eq!(crystal([1.5, 1.6, 1.7], 0.0, 0.0, 0.0).letters().letters(), ['f', 's']);
    }

    #[test]
    fn chirality_and_gyration_are_inverse_maps() {
        let g = [-0.42, -0.42, 1.0];
        let k = Anisotropic::chirality_from_gyration(g);
        // g = (tr κ) I − κ
        let tr = k[0] + k[1] + k[2];
        for i in 0..3 {
            assert!((tr - k[i] - g[i]).abs() < 1e-15);
        }
    }

    #[test]
    fn bad_data_is_refused_by_name() {
        let r = orientation(0.1, 0.2, 0.3);
        assert_eq!(
            Anisotropic::new([1.5, 0.5, 1.6], r, [0.0; 3]).unwrap_err().field,
            "principal"
        );
        assert_eq!(
            Anisotropic::new([1.5, 1.5, 1.6], r * 2.0, [0.0; 3]).unwrap_err().field,
            "axes"
        );
        assert_eq!(
            Anisotropic::new([1.5, 1.5, 1.6], r, [0.0, f64::NAN, 0.0])
                .unwrap_err()
                .field,
            "chirality"
        );
    }
}
