//! Independent cross-check of the closed-form uniaxial mode solver (`doublespar::modes`) against
//! the general 4×4 first-order system of a stratified anisotropic medium, solved with nalgebra's
//! general (non-symmetric) eigenvalue machinery. Nothing below uses a uniaxial formula except the
//! permittivity tensor itself and the one normal-incidence sanity check that is there to validate
//! the 4×4 matrix.
//!
//! Sources: D. W. Berreman, "Optics in stratified and anisotropic media: 4×4-matrix formulation",
//! J. Opt. Soc. Am. 62, 502–510 (1972); M. Born and E. Wolf, *Principles of Optics*, §15.2
//! (plane waves in anisotropic media: q × (q × E) + ε E = 0).
//!
//! # The 4×4 matrix Δ
//!
//! Time dependence exp(−iωt), fields ∝ exp(i k0 (q_x x + q_y y + q_z z)), μ = 1, H̃ = Z0 H. Then
//! ∇× → i k0 q×, and Maxwell's curl equations become
//!
//! ```text
//! q × E = H̃,            q × H̃ = −ε E.
//! ```
//!
//! In components (q_x, q_y fixed by phase matching, q_z the unknown):
//!
//! ```text
//! (q×E)_x:  q_y E_z − q_z E_y = H̃_x      (q×H̃)_x:  q_y H̃_z − q_z H̃_y = −(εE)_x
//! (q×E)_y:  q_z E_x − q_x E_z = H̃_y      (q×H̃)_y:  q_z H̃_x − q_x H̃_z = −(εE)_y
//! (q×E)_z:  q_x E_y − q_y E_x = H̃_z      (q×H̃)_z:  q_x H̃_y − q_y H̃_x = −(εE)_z
//! ```
//!
//! The two z-equations contain no q_z; they give the normal components in terms of the tangential
//! ones (ε_zz > 0 for a positive-definite ε):
//!
//! ```text
//! H̃_z = q_x E_y − q_y E_x
//! E_z  = a·ψ,   a = (−ε_zx/ε_zz, −ε_zy/ε_zz, q_y/ε_zz, −q_x/ε_zz),   ψ = (E_x, E_y, H̃_x, H̃_y).
//! ```
//!
//! Substituting them into the four x/y-equations, solved for q_z × (tangential component):
//!
//! ```text
//! q_z E_x  =  H̃_y + q_x E_z
//! q_z E_y  = −H̃_x + q_y E_z
//! q_z H̃_x  =  q_x H̃_z − (εE)_y = q_x (q_x E_y − q_y E_x) − ε_yx E_x − ε_yy E_y − ε_yz E_z
//! q_z H̃_y  =  q_y H̃_z + (εE)_x = q_y (q_x E_y − q_y E_x) + ε_xx E_x + ε_xy E_y + ε_xz E_z
//! ```
//!
//! i.e. q_z ψ = Δ ψ (equivalently dψ/dz = i k0 Δ ψ) with the real 4×4 matrix
//!
//! ```text
//!        ⎡ q_x a₁             q_x a₂             q_x a₃        1 + q_x a₄ ⎤
//!   Δ =  ⎢ q_y a₁             q_y a₂            −1 + q_y a₃     q_y a₄     ⎥
//!        ⎢ −q_x q_y − ε_yx − ε_yz a₁   q_x² − ε_yy − ε_yz a₂   −ε_yz a₃   −ε_yz a₄ ⎥
//!        ⎣ −q_y² + ε_xx + ε_xz a₁     q_x q_y + ε_xy + ε_xz a₂   ε_xz a₃    ε_xz a₄ ⎦
//! ```
//!
//! This is Berreman's elimination; we order ψ as (E_x, E_y, H̃_x, H̃_y) to match
//! `Mode::tangential`, a signed permutation of his (E_x, H̃_y, E_y, −H̃_x), so the eigenvalues are
//! the same. The four eigenvalues of Δ are the four q_z of the medium (two forward, two backward,
//! or complex-conjugate pairs when evanescent); the eigenvectors are the tangential fields.
//! Isotropic check: ε = n² I gives two 2×2 blocks, each with q_z² = n² − q_x² − q_y².
//!
//! # Numerics (why no Newton polishing)
//!
//! Eigenvalues come from nalgebra's real Schur decomposition (`Matrix4::schur`), read off the
//! quasi-triangular factor by `eigenvalues` below rather than by `complex_eigenvalues`, which in
//! nalgebra 0.35 returns NaN for a 2×2 block with real, nearly equal eigenvalues (and an SVD of the
//! resulting NaN matrix then never returns).
//!
//! A Newton polish on the quartic det(q qᵀ − |q|² I + ε) = 0 was considered and not used: at the
//! near-degenerate directions that matter most here (wave vector almost along the optic axis) the
//! quartic has a (near-)double root, which evaluating a determinant locates only to about
//! √(machine ε) ≈ 1e-8, whereas the corresponding double eigenvalue of Δ is *semisimple* (two
//! independent polarizations) and the Schur form resolves it to O(machine ε). Measured without
//! polishing, over the 6000 generated cases: worst |Δq_z| 2.1e-14 (propagating), 2.9e-14
//! (near-degenerate pairs), 2.8e-15 / 6.5e-15 (Re / Im, evanescent). Each eigenpair is also checked
//! on its own: the full fields rebuilt from the eigenvector (E_z, H̃_z from the formulas above) must
//! satisfy both curl equations (worst 1.2e-14).
//!
//! Root matching: the crate's four roots (forward o, forward e, backward o, backward e) are
//! assigned to the four eigenvalues by the permutation with the smallest largest mismatch, so every
//! eigenvalue is used exactly once, even where two roots coincide.
//!
//! Eigenvectors: the null vector of Δ − λ I, taken as the right singular vector of the smallest
//! singular value (real SVD for real λ, complex SVD otherwise). Only compared for non-degenerate
//! roots (distance to the other three eigenvalues above `GAP`), where it is well defined and
//! accurate to ~1e-16/gap.
//!
//! # What this test found (as of writing)
//!
//! The ordinary mode's field fails the wave equation when its wave vector lies within
//! ~1e-12 < θ ≲ 1e-7 rad of ±c (the "near optic axis" family and
//! `ordinary_field_near_the_optic_axis_solves_the_wave_equation`): the crate builds D_o = q × c, and
//! the rounding error of that cross product (~1e-16 |q|) is not small against |q × c| = |q| sin θ,
//! so D_o acquires a longitudinal part (D·q)/(|D||q|) ≈ 1e-16/θ, up to 2.7e-6 here. Projecting the
//! q-component out of D_o (d − q (q·d)/(q·q)) removes it (residual then ≤ 1e-15 everywhere).

use doublespar::Indices;
use doublespar::{Mode, Travel, crystal_modes};
use doublespar::{Uniaxial, axis_from_degrees};
mod common;
use common::berreman::{C, Rng, axis_unit, berreman, eigenvalues, ez_row, null_vector, permittivity};
use nalgebra::{Matrix3, Vector3, Vector4};
use std::fmt;

/// Required agreement of q_z (absolute; q_z ~ 1–3).
const QZ_TOL: f64 = 1e-10;
/// Required relative residual of the wave equation q × (q × E) + ε E = 0.
const RESIDUAL_TOL: f64 = 1e-10;
/// Required 1 − |cos angle| between the crate's and the 4×4 system's tangential fields.
const PARALLEL_TOL: f64 = 1e-9;
/// Two eigenvalues closer than this are treated as degenerate for the eigenvector comparison.
const GAP: f64 = 1e-6;
/// Number of generated cases.
const CASES: usize = 6000;

// ---------------------------------------------------------------------------------------------
// The independent method
// ---------------------------------------------------------------------------------------------

/// Full (E, H̃) rebuilt from ψ and q_z; residual of both curl equations relative to |E| + |H̃|.
fn maxwell_residual(qx: f64, qy: f64, qz: C, eps: &Matrix3<f64>, psi: &Vector4<C>) -> f64 {
    let a = ez_row(qx, qy, eps);
    let ez: C = (0..4).map(|j| psi[j] * a[j]).sum();
    let (qxc, qyc) = (C::from(qx), C::from(qy));
    let hz = qxc * psi[1] - qyc * psi[0];
    let e = Vector3::new(psi[0], psi[1], ez);
    let h = Vector3::new(psi[2], psi[3], hz);
    let q = Vector3::new(qxc, qyc, qz);
    let epsc = eps.map(C::from);
    let r1 = q.cross(&e) - h;
    let r2 = q.cross(&h) + epsc * e;
    (r1.norm() + r2.norm()) / (e.norm() + h.norm())
}

/// |⟨a, b⟩| / (|a| |b|) and the sine of the angle (|b − proj_a b| / |b|, accurate when tiny).
fn parallelism(a: &[C; 4], b: &Vector4<C>) -> (f64, f64) {
    let av = Vector4::new(a[0], a[1], a[2], a[3]);
    let ip = av.dotc(b); // Σ conj(a_i) b_i
    let cos = ip.norm() / (av.norm() * b.norm());
    let proj = av * (ip / av.norm_squared());
    let sin = (b - proj).norm() / b.norm();
    (cos, sin)
}

/// Residual of q × (q × E) + ε E relative to |ε E| (complex q allowed; no conjugation).
fn wave_equation_residual(eps: &Matrix3<f64>, m: &Mode) -> f64 {
    let epsc = eps.map(C::from);
    let r = m.q.cross(&m.q.cross(&m.e)) + epsc * m.e;
    r.norm() / (epsc * m.e).norm()
}

/// `x ≤ tol`, false for NaN (so that a NaN fails every check).
fn within(x: f64, tol: f64) -> bool {
    x <= tol
}

/// `x` is non-zero with the sign of `s`; false for zero and NaN.
fn has_sign(x: f64, s: f64) -> bool {
    x * s > 0.0
}

/// Diagnostics printed with a failing residual: the sine of the angle between Re q and the axis.
fn sin_angle_to_axis(m: &Mode, c: &Vector3<f64>) -> f64 {
    let q = m.q.map(|z| z.re);
    q.cross(c).norm() / q.norm()
}

/// |q·D| / (|q| |D|): zero for a transverse displacement, as Maxwell's ∇·D = 0 requires.
fn longitudinal_fraction(m: &Mode) -> f64 {
    m.q.dot(&m.d).norm() / (m.q.norm() * m.d.norm())
}

/// All 24 permutations of 0..4.
fn permutations() -> Vec<[usize; 4]> {
    let mut out = Vec::with_capacity(24);
    for i in 0..4 {
        for j in (0..4).filter(|&j| j != i) {
            for k in (0..4).filter(|&k| k != i && k != j) {
                out.push([i, j, k, 6 - i - j - k]);
            }
        }
    }
    out
}

/// The assignment of the crate's roots to eigenvalues (each used once) with the smallest largest
/// mismatch; returns (assignment, that mismatch).
fn best_match(roots: &[C; 4], eig: &[C; 4], perms: &[[usize; 4]]) -> ([usize; 4], f64) {
    let mut best = ([0, 1, 2, 3], f64::INFINITY);
    for p in perms {
        let worst = (0..4).map(|i| (roots[i] - eig[p[i]]).norm()).fold(0.0, f64::max);
        if worst < best.1 {
            best = (*p, worst);
        }
    }
    best
}

// ---------------------------------------------------------------------------------------------
// Generated cases
// ---------------------------------------------------------------------------------------------

fn wrap_deg(a: f64) -> f64 {
    let w = (a + 180.0).rem_euclid(360.0) - 180.0;
    w.clamp(-180.0, 180.0)
}

/// One crystal and one incidence: indices, optic axis (degrees), outside index, incidence polar and
/// azimuth (degrees).
#[derive(Clone, Copy)]
struct Case {
    family: &'static str,
    no: f64,
    ne: f64,
    tilt: f64,
    az: f64,
    n_out: f64,
    polar: f64,
    inc_az: f64,
}

impl Case {
    fn qt(&self) -> [f64; 2] {
        let (p, a) = (self.polar.to_radians(), self.inc_az.to_radians());
        [self.n_out * p.sin() * a.cos(), self.n_out * p.sin() * a.sin()]
    }
}

impl fmt::Display for Case {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "[{}] no={:?} ne={:?} tilt_deg={:?} azimuth_deg={:?} n_out={:?} polar_deg={:?} inc_az_deg={:?} qt={:?}",
            self.family,
            self.no,
            self.ne,
            self.tilt,
            self.az,
            self.n_out,
            self.polar,
            self.inc_az,
            self.qt()
        )
    }
}

/// Tilt near 0, 90 or 180 degrees: exactly, or within 1e-12..1e-7 degrees.
fn special_tilt(r: &mut Rng) -> f64 {
    let which = r.next_u64() % 3;
    let exact = r.chance(0.25);
    let d = if exact { 0.0 } else { r.log_range(-12.0, -7.0) };
    match which {
        0 => d,
        1 => 90.0 + r.sign() * d,
        _ => 180.0 - d,
    }
}

fn general_ne(r: &mut Rng, no: f64) -> f64 {
    if r.chance(0.5) {
        r.range(1.3, 2.9)
    } else {
        tiny_ne(r, no)
    }
}

/// n_e within 1e-6..1e-2 of n_o, either sign; exactly n_o once in a while.
fn tiny_ne(r: &mut Rng, no: f64) -> f64 {
    if r.chance(0.03) {
        no
    } else {
        no + r.sign() * r.log_range(-6.0, -2.0)
    }
}

fn generate(i: usize, r: &mut Rng) -> Case {
    let mut c = Case {
        family: "general",
        no: r.range(1.3, 2.9),
        ne: 0.0,
        tilt: r.range(0.0, 180.0),
        az: r.range(-180.0, 180.0),
        n_out: r.range(1.0, 1.8),
        polar: r.range(0.0, 89.0),
        inc_az: r.range(-180.0, 180.0),
    };
    c.ne = r.range(1.3, 2.9);
    match i % 8 {
        0 | 1 => {}
        2 => {
            c.family = "tiny birefringence";
            c.ne = tiny_ne(r, c.no);
        }
        3 => {
            c.family = "special tilt";
            c.tilt = special_tilt(r);
            c.ne = general_ne(r, c.no);
        }
        4 => {
            c.family = "normal or grazing incidence";
            c.polar = if r.chance(0.4) { 0.0 } else { r.range(85.0, 89.9) };
        }
        5 => {
            c.family = "immersion (evanescent)";
            c.n_out = r.range(1.6, 1.8);
            c.no = r.range(1.35, 1.4);
            c.ne = if r.chance(0.3) {
                tiny_ne(r, c.no)
            } else {
                r.range(1.35, 1.4)
            };
            c.polar = r.range(30.0, 89.9);
        }
        6 => {
            // The ordinary wave vector aimed (almost) along ±c: the two modes are degenerate or
            // nearly so. Forward o-wave direction d = ±c with d_z > 0; its tangential part is
            // n_o (d_x, d_y), reached from outside at sin p = n_o sin t / n_out.
            c.family = "near optic axis";
            c.ne = general_ne(r, c.no);
            let s89 = 89f64.to_radians().sin();
            let t_max = (c.n_out * s89 / c.no).min(1.0).asin().min(60f64.to_radians());
            let t = r.range(0.0, t_max);
            let flip = r.chance(0.5);
            c.tilt = if flip { 180.0 - t.to_degrees() } else { t.to_degrees() };
            let dir_az = if flip { c.az + 180.0 } else { c.az };
            c.polar = (c.no * t.sin() / c.n_out).min(1.0).asin().to_degrees();
            c.inc_az = wrap_deg(dir_az);
            if r.chance(0.9) {
                // Perturb the aim by 1e-13..1e-3 degrees in polar and/or azimuth.
                if r.chance(0.7) {
                    c.polar = (c.polar + r.sign() * r.log_range(-13.0, -3.0)).clamp(0.0, 89.9);
                }
                if r.chance(0.5) {
                    c.inc_az = wrap_deg(c.inc_az + r.sign() * r.log_range(-13.0, -3.0));
                }
            }
        }
        _ => {
            c.family = "combined extremes";
            c.ne = tiny_ne(r, c.no);
            c.tilt = special_tilt(r);
            c.polar = if r.chance(0.4) { 0.0 } else { r.range(85.0, 89.9) };
        }
    }
    c
}

// ---------------------------------------------------------------------------------------------
// Bookkeeping
// ---------------------------------------------------------------------------------------------

struct Worst {
    what: &'static str,
    value: f64,
    at: String,
    count: usize,
}

impl Worst {
    fn new(what: &'static str) -> Self {
        Worst {
            what,
            value: 0.0,
            at: String::new(),
            count: 0,
        }
    }
    fn see(&mut self, value: f64, case: &Case, detail: &str) {
        self.count += 1;
        if value > self.value || value.is_nan() {
            self.value = value;
            self.at = format!("{case} {detail}");
        }
    }
}

impl fmt::Display for Worst {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{:<58} worst {:.3e} over {:>6} samples; at {}",
            self.what, self.value, self.count, self.at
        )
    }
}

fn label(k: usize) -> &'static str {
    ["forward o", "forward e", "backward o", "backward e"][k]
}

// ---------------------------------------------------------------------------------------------
// Tests
// ---------------------------------------------------------------------------------------------

#[test]
fn berreman_matrix_isotropic_medium() {
    // ε = n² I: eigenvalues ±√(n² − |q_t|²), each double; imaginary beyond the critical angle.
    for &(n, qx, qy) in &[
        (1.0, 0.0, 0.0),
        (1.5, 0.3, -0.4),
        (2.4, -1.9, 0.7),
        (1.33, 1.0, 1.0),
        (1.7, 0.0, 1.69),
    ] {
        let eps = Matrix3::identity() * (n * n);
        let d = berreman(qx, qy, &eps);
        let x: f64 = n * n - qx * qx - qy * qy;
        let r = if x >= 0.0 {
            C::new(x.sqrt(), 0.0)
        } else {
            C::new(0.0, (-x).sqrt())
        };
        let mut eig = eigenvalues(&d);
        eig.sort_by(|a, b| (a.re + a.im).total_cmp(&(b.re + b.im)));
        let expected = [-r, -r, r, r];
        for k in 0..4 {
            assert!(
                (eig[k] - expected[k]).norm() < 1e-12,
                "isotropic n={n} qt=({qx}, {qy}): eigenvalue {k} expected {} got {}",
                expected[k],
                eig[k]
            );
        }
    }
}

#[test]
fn berreman_matrix_uniaxial_normal_incidence() {
    // q_t = 0: the wave vector is along z, at θ = tilt from the axis. Expected ±n_o and ±n(θ) with
    // 1/n(θ)² = cos²θ/n_o² + sin²θ/n_e² (Born & Wolf §15.3) — used here only to validate Δ.
    for &(no, ne, tilt, az) in &[
        (1.6557, 1.4849, 45.0, 0.0),
        (1.5443, 1.5534, 30.0, 77.0),
        (2.9, 1.3, 89.0, -120.0),
        (1.3, 2.9, 90.0, 10.0),
        (2.0, 2.2, 0.0, 0.0),
        (1.7, 1.5, 180.0, 33.0),
        (1.8, 1.6, 123.4, -170.0),
    ] {
        let c = axis_unit(tilt, az);
        let eps = permittivity(no, ne, &c);
        let theta = f64::to_radians(tilt);
        let n_theta = 1.0 / ((theta.cos() / no).powi(2) + (theta.sin() / ne).powi(2)).sqrt();
        let mut expected = [-no, no, -n_theta, n_theta];
        expected.sort_by(f64::total_cmp);
        let mut eig = eigenvalues(&berreman(0.0, 0.0, &eps));
        eig.sort_by(|a, b| a.re.total_cmp(&b.re));
        for k in 0..4 {
            assert!(
                (eig[k] - C::from(expected[k])).norm() < 1e-12,
                "normal incidence no={no} ne={ne} tilt={tilt} az={az}: eigenvalue {k} expected {} got {}",
                expected[k],
                eig[k]
            );
        }
    }
}

#[test]
fn ordinary_field_near_the_optic_axis_solves_the_wave_equation() {
    // A focused case of the generated "near optic axis" family: the forward ordinary wave vector
    // at a small angle δ from the optic axis (calcite-like indices, axis at tilt 30°, azimuth 40°).
    // The o-wave must satisfy the wave equation (and ∇·D = 0) here like anywhere else; the two modes
    // are nearly degenerate, but any exact mode is still an exact null vector.
    let (no, ne, tilt, az) = (1.6557, 1.4849, 30.0, 40.0);
    let crystal = Uniaxial::new(Indices::new(no, ne).unwrap(), axis_from_degrees(tilt, az).unwrap());
    let c = axis_unit(tilt, az);
    let eps = permittivity(no, ne, &c);
    let mut report = Vec::new();
    for delta in [1e-11, 1e-10, 1e-9, 1e-8, 1e-7, 1e-6] {
        let (t, a) = (f64::to_radians(tilt) + delta, f64::to_radians(az));
        let qt = [no * t.sin() * a.cos(), no * t.sin() * a.sin()];
        let [o, _] = crystal_modes(&crystal, qt, Travel::Forward);
        let res = wave_equation_residual(&eps, &o);
        if !within(res, RESIDUAL_TOL) {
            report.push(format!(
                "no={no} ne={ne} tilt_deg={tilt} azimuth_deg={az} qt={qt:?} (δ = {delta:e} rad from the axis): \
                 residual {res:.3e}, sin∠(q, c) = {:.3e}, (D·q)/(|D||q|) = {:.3e}",
                sin_angle_to_axis(&o, &c),
                longitudinal_fraction(&o)
            ));
        }
    }
    assert!(
        report.is_empty(),
        "forward ordinary mode violates q×(q×E)+εE = 0 by more than {RESIDUAL_TOL:e} (relative):\n{}",
        report.join("\n")
    );
}

#[test]
fn crate_modes_agree_with_the_general_4x4_method() {
    let perms = permutations();
    let mut rng = Rng(0x9E37_79B9_7F4A_7C15);
    let mut failures: Vec<(&'static str, String)> = Vec::new();
    let mut fail = |kind: &'static str, msg: String| failures.push((kind, msg));

    let mut w_eps = Worst::new("permittivity: own ε vs Uniaxial::permittivity (abs)");
    let mut w_self = Worst::new("4x4 self-check: curl residual of eigenpairs");
    let mut w_qz_prop = Worst::new("q_z, propagating modes (abs)");
    let mut w_qz_deg = Worst::new("q_z, propagating, near-degenerate pair (abs)");
    let mut w_qz_ev_re = Worst::new("Re q_z, evanescent modes (abs)");
    let mut w_qz_ev_im = Worst::new("Im q_z, evanescent modes (abs)");
    let mut w_res_prop = Worst::new("wave-equation residual, propagating (rel)");
    let mut w_res_ev = Worst::new("wave-equation residual, evanescent (rel, extra)");
    let mut w_par_prop = Worst::new("1 - |cos| tangential fields, propagating");
    let mut w_sin_prop = Worst::new("sin angle tangential fields, propagating");
    let mut w_par_ev = Worst::new("1 - |cos| tangential fields, evanescent (extra)");
    let mut w_sz_ev = Worst::new("|S_z|/(|E||H|) of evanescent modes (extra)");
    let mut evanescent_cases = 0usize;
    let mut mixed_cases = 0usize;
    let mut near_degenerate_cases = 0usize;
    let mut compared_vectors = 0usize;

    for i in 0..CASES {
        let case = generate(i, &mut rng);
        let qt = case.qt();
        let crystal = Uniaxial::new(
            Indices::new(case.no, case.ne).unwrap(),
            axis_from_degrees(case.tilt, case.az).unwrap(),
        );
        let c = axis_unit(case.tilt, case.az);
        let eps = permittivity(case.no, case.ne, &c);
        let de = (eps - crystal.permittivity()).abs().max();
        w_eps.see(de, &case, "");
        if de > 1e-13 || (crystal.axis.unit() - c).norm() > 1e-15 {
            fail(
                "permittivity",
                format!("ε or c differ from the crate's by {de:e}: {case}"),
            );
        }

        // The independent roots.
        let d = berreman(qt[0], qt[1], &eps);
        let eig = eigenvalues(&d);

        // The crate's modes: forward o, forward e, backward o, backward e.
        let [fo, fe] = crystal_modes(&crystal, qt, Travel::Forward);
        let [bo, be] = crystal_modes(&crystal, qt, Travel::Backward);
        let modes = [fo, fe, bo, be];
        let roots = modes.map(|m| m.qz());

        let (assign, mismatch) = best_match(&roots, &eig, &perms);
        let n_prop = modes.iter().filter(|m| m.propagating).count();
        if n_prop < 4 {
            evanescent_cases += 1;
            if n_prop > 0 {
                mixed_cases += 1;
            }
        }
        let near_degenerate = (roots[0] - roots[1]).norm() < 1e-6 && n_prop == 4;
        if near_degenerate {
            near_degenerate_cases += 1;
        }
        if !within(mismatch, QZ_TOL) {
            fail(
                "q_z",
                format!(
                    "q_z mismatch {mismatch:.3e} > {QZ_TOL:e}: {case}\n    crate [fo, fe, bo, be] = {roots:?}\n    4x4 eigenvalues          = {eig:?}"
                ),
            );
        }

        for k in 0..4 {
            let m = &modes[k];
            let lambda = eig[assign[k]];
            let diff = m.qz() - lambda;
            let detail = format!("{} crate {} vs 4x4 {}", label(k), m.qz(), lambda);
            let travel_sign = if k < 2 { 1.0 } else { -1.0 };

            // The crate's tangential wave vector is the one asked for.
            if m.q.x != C::from(qt[0]) || m.q.y != C::from(qt[1]) {
                fail(
                    "tangential q",
                    format!("{}: q_t changed to ({}, {}): {case}", label(k), m.q.x, m.q.y),
                );
            }
            if m.propagating {
                if near_degenerate {
                    w_qz_deg.see(diff.norm(), &case, &detail);
                } else {
                    w_qz_prop.see(diff.norm(), &case, &detail);
                }
                if m.qz().im != 0.0 {
                    fail(
                        "q_z",
                        format!("{}: propagating mode with complex q_z {}: {case}", label(k), m.qz()),
                    );
                }
                let sz = m.poynting().z;
                if !has_sign(sz, travel_sign) {
                    fail(
                        "Poynting sign",
                        format!("{}: Poynting S_z = {sz:e} has the wrong sign: {case}", label(k)),
                    );
                }
                let res = wave_equation_residual(&eps, m);
                w_res_prop.see(res, &case, label(k));
                if !within(res, RESIDUAL_TOL) {
                    fail(
                        "wave equation (propagating)",
                        format!(
                            "{}: wave-equation residual |q×(q×E)+εE|/|εE| = {res:.3e} > {RESIDUAL_TOL:e}: {case}\n    q = {:?}\n    E = {:?}\n    sin∠(q, c) = {:.3e}, longitudinal part of the crate's D: (D·q)/(|D||q|) = {:.3e}",
                            label(k),
                            m.q,
                            m.e,
                            sin_angle_to_axis(m, &c),
                            longitudinal_fraction(m)
                        ),
                    );
                }
            } else {
                w_qz_ev_re.see(diff.re.abs(), &case, &detail);
                w_qz_ev_im.see(diff.im.abs(), &case, &detail);
                let im = m.qz().im;
                if !has_sign(im, travel_sign) {
                    fail(
                        "decaying root",
                        format!(
                            "{}: evanescent root does not decay along its travel (Im q_z = {im:e}): {case}",
                            label(k)
                        ),
                    );
                }
                let res = wave_equation_residual(&eps, m);
                w_res_ev.see(res, &case, label(k));
                if !within(res, RESIDUAL_TOL) {
                    fail(
                        "wave equation (evanescent)",
                        format!(
                            "{}: evanescent wave-equation residual {res:.3e} > {RESIDUAL_TOL:e}: {case}",
                            label(k)
                        ),
                    );
                }
                // A single evanescent mode of a lossless medium carries no power across z.
                let sz = m.poynting().z.abs() / (m.e.norm() * m.h.norm());
                w_sz_ev.see(sz, &case, label(k));
                if !within(sz, 1e-10) {
                    fail(
                        "evanescent power",
                        format!("{}: evanescent mode carries S_z = {sz:e}: {case}", label(k)),
                    );
                }
            }

            // The 4x4 eigenpair, checked on its own and against the crate's fields.
            let gap = (0..4)
                .filter(|&j| j != assign[k])
                .map(|j| (eig[j] - lambda).norm())
                .fold(f64::INFINITY, f64::min);
            let psi = null_vector(&d, lambda);
            let self_res = maxwell_residual(qt[0], qt[1], lambda, &eps, &psi);
            if gap > GAP {
                w_self.see(self_res, &case, label(k));
                if !within(self_res, 1e-10) {
                    fail(
                        "4x4 self-check",
                        format!(
                            "4x4 eigenpair fails Maxwell's equations ({self_res:e}): {case} {}",
                            label(k)
                        ),
                    );
                }
                let (cos, sin) = parallelism(&m.tangential(), &psi);
                compared_vectors += 1;
                let w = if m.propagating { &mut w_par_prop } else { &mut w_par_ev };
                w.see(1.0 - cos, &case, label(k));
                if m.propagating {
                    w_sin_prop.see(sin, &case, label(k));
                }
                if !within(1.0 - cos, PARALLEL_TOL) {
                    fail(
                        "eigenvector",
                        format!(
                            "{}: tangential fields not parallel (|cos| = {cos:.15}, sin = {sin:.3e}, gap {gap:.3e}): {case}\n    crate (Ex, Ey, Hx, Hy) = {:?}\n    4x4 eigenvector        = {:?}",
                            label(k),
                            m.tangential(),
                            psi.as_slice()
                        ),
                    );
                }
            }
        }
    }

    println!(
        "independent_wave_equation: {CASES} cases ({evanescent_cases} with evanescent modes, {mixed_cases} mixed, {near_degenerate_cases} with o/e q_z within 1e-6), {compared_vectors} eigenvectors compared"
    );
    for w in [
        &w_eps,
        &w_self,
        &w_qz_prop,
        &w_qz_deg,
        &w_qz_ev_re,
        &w_qz_ev_im,
        &w_res_prop,
        &w_res_ev,
        &w_par_prop,
        &w_sin_prop,
        &w_par_ev,
        &w_sz_ev,
    ] {
        println!("  {w}");
    }
    assert!(
        evanescent_cases > 300 && mixed_cases > 50,
        "too few evanescent cases generated"
    );
    assert!(near_degenerate_cases > 200, "too few near-degenerate cases generated");
    if !failures.is_empty() {
        let mut kinds: Vec<(&str, usize)> = Vec::new();
        for (kind, _) in &failures {
            match kinds.iter_mut().find(|(k, _)| k == kind) {
                Some(entry) => entry.1 += 1,
                None => kinds.push((kind, 1)),
            }
        }
        let mut shown: Vec<&str> = Vec::new();
        let mut text = String::new();
        // The first three failures of each kind.
        for (kind, msg) in &failures {
            if shown.iter().filter(|k| *k == kind).count() < 3 {
                shown.push(kind);
                text.push_str(&format!("[{kind}] {msg}\n"));
            }
        }
        panic!(
            "{} failed checks by kind {kinds:?}; the first of each kind:\n{text}",
            failures.len()
        );
    }
}
