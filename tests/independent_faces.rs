//! Independent check of faces at any angle: a face solver written apart from the library (the
//! general 4×4 system of each medium, solved in the face's own frame) traces generated set-ups of
//! one crystal with two arbitrary faces, or two crystals in air, cement or optical contact, and
//! is compared with `doublespar trace` (the public `trace_scenario`) ray by ray.
//!
//! # The reference, face by face
//!
//! At a face of unit normal n (pointing downstream) between media A (where the light is) and B,
//! for a plane wave of real wave vector q = k/k0:
//! - the face frame has z along n and x along the tangential part of q, so q_t = (q_x, 0);
//! - each medium's four waves are the eigen-solutions of Berreman's Δ at that q_x
//!   (`tests/common/berreman.rs`): a real eigenvalue is a propagating wave, travelling forward
//!   when its Poynting flux across the face, Re(E × H*)·n, is positive (energy, not the wave
//!   vector, decides); a complex one is evanescent, "forward" when it decays into +z. A mode
//!   beyond the face whose normal component has become complex is how total internal
//!   reflection shows;
//! - waves are normalized to unit flux across the face with the Hermitian flux form
//!   F(a, b) = ½ (E_a × H_b* + E_b* × H_a)·n, and the two polarizations of an isotropic medium
//!   (a double eigenvalue) are made F-orthonormal, so squared amplitudes are powers and
//!   F-projections are amplitudes;
//! - continuity of (E_x, E_y, H_x, H_y) gives, per incident mode, four linear equations for the
//!   two reflected and two transmitted amplitudes (the bare-face, Fresnel, transmission T and
//!   reflection R); the power transmittance of a mode is |t|², the normal Poynting flux ratio;
//! - ideal faces ("interface_losses": "ideal", CONVENTIONS.md) take the lossless part of T, its
//!   polar factor W Vᴴ from the SVD T = W Σ Vᴴ, over the propagating incident and transmitted
//!   modes only (the project's documented rule, DEVELOPERS.md; K. Fan and A. J. Hoffman, Proc.
//!   AMS 6, 111 (1955) for the closest unitary map);
//! - a crystal mode is ordinary when its E is perpendicular to the optic axis (the smaller
//!   |E·c|/|E| of the pair); in a biaxial crystal the fast mode `f` is the wave on the inner sheet
//!   of the index surface (its index below the mean of the two indices along its own wave normal,
//!   the contract's convention), the other `s`.
//!
//! A share of the one-crystal and pair set-ups is traced a second time with biaxial crystals
//! (random principal indices 1.4–2.2 on randomly oriented axes) in place of the uniaxial ones:
//! the library's general 4×4 mode solver against this one, to the same tolerances.
//!
//! Rays follow the Poynting direction from face to face; the rest (apertures as circles about
//! the element's z axis, rejected rays, the screen) is the contract's geometry (CONVENTIONS.md,
//! version 2), written here from the text. Sources for the physics: D. W. Berreman, J. Opt. Soc.
//! Am. 62, 502 (1972); P. Yeh, *Optical Waves in Layered Media* (1988), ch. 9; Born & Wolf,
//! *Principles of Optics*, §1.5 and §15.2.
//!
//! # What is compared, and how closely
//!
//! Per output ray (matched by label): power, Stokes vector on the ray's own basis (which carries
//! the polarization through every face), direction, exit point, screen position; per face, the
//! rejected rays (total internal reflection: reflected direction and power; aperture) summed by
//! label, element, face, reason and direction; per element, the reflected power. All to
//! `TOL` = 1e-10 (lengths relative to 1 mm plus the path length), except the screen position,
//! which is a straight continuation at the ray's angle to the screen: its error is the direction
//! error times the distance, so the bound there is `TOL` × (1 + distance to the screen).
//!
//! Near-critical cases put a face within 1e-8..1e-6 rad of a critical angle, on both sides
//! (behind a crystal's face into the outside medium, a cement film, or a contacted crystal).
//! Directions and points are compared there at `TOL`; powers at `TOL` plus the conditioning of
//! the critical face itself (`NEAR_CRITICAL`: q_n² = n² − q_t² cancels, in any method that starts
//! from the same rounded q_t). Exactly critical faces (to the last bit of the input's degrees) are
//! different: q_n² is then rounding, ±1e-16, and whether the grazing mode propagates (carrying
//! power ∝ q_n ≈ 1e-8 through a bare face, and, through an ideal face, all of it, since the
//! lossless part of a nearly singular T is unitary) or is totally reflected is decided by that
//! rounding, in the library and in any reference alike. For those cases the path through the
//! critical mode is checked for accounting (rays + rejected + reflected = 1 to `TOL`) and
//! finiteness only; the other mode's path is compared in full.
//!
//! # What this check found
//!
//! What this check found in the library, and where it stands:
//! - fixed: at an ideal face the lossless part took in the column of an evanescent incident
//!   wave, and light was lost when a wave beyond was evanescent too (a unit test in the library's
//!   planar trace holds the minimal case);
//! - fixed: when a crystal's face totally reflected into an isotropic medium (air, cement), the
//!   library split the reflected power between the crystal's two reflected waves differently
//!   from this solver, by up to tens of percent of it (the total was right): its evanescent waves
//!   of an isotropic medium had real grazing-basis fields, whereas an evanescent wave of complex q
//!   must have q·E = 0. They are now E_s = ẑ × q̂_t and q × E_s / n, and every case here compares
//!   each reflected wave on its own (`total_reflection_splits_between_the_reflected_waves_as_the_
//!   reference_does` is the first case found);
//! - settled: a ray that leaves a face within ~1e-6 rad of grazing into a vanishing air film (air
//!   contact, coinciding faces) was rejected "outside aperture" or passed by rounding (26 of 300
//!   generated cases disagreed): meeting the next face divided a rounding-sized offset by the
//!   tiny normal component, in the library and here alike. Both now take one stated rule: a point
//!   on a face to rounding meets it where it is, so a vanishing gap is crossed where the ray
//!   leaves (`grazing_rays_cross_a_vanishing_air_film_where_they_leave`). The main test's
//!   near-critical air contacts keep a real gap, which the rule does not touch.
//!
//! Cases whose crystal modes are near-degenerate (wave vector within ~1e-5 of an optic axis, where
//! the o/e labels are a convention) are skipped and counted, with the rare matrices on which
//! nalgebra's Schur or SVD iteration does not settle; so are documents the contract refuses (faces
//! crossing inside the aperture). Both counts are asserted small.

mod common;
use common::berreman::{C, Rng, berreman, ez_row, null_space, permittivity, try_eigenvalues};
use doublespar::{
    Anisotropic, ElementReport, Scenario, StackElement, StackMedium, TraceResult, orientation, report_trace,
    trace_scenario, trace_stack,
};
use nalgebra::{DMatrix, Matrix3, Matrix4, Vector2, Vector3, Vector4};

/// Agreement required of every compared number (see the module header).
const TOL: f64 = 1e-10;
/// Two eigenvalues of Δ closer than this (relative) are one double eigenvalue: both
/// polarizations of an isotropic medium. Crystal mode pairs closer than `DEGENERATE_GAP` are
/// skipped, so nothing in between is ever met.
const CLUSTER: f64 = 1e-9;
/// Crystal mode pairs whose normal components differ by less than this are near-degenerate
/// (wave vector almost along the optic axis): their eigenvectors are resolved only to ~1e-16/gap,
/// and which one is "o" is a convention. Such cases are skipped and counted.
const DEGENERATE_GAP: f64 = 1e-5;
/// Near a critical angle, q_n² = n² − |q_t|² loses to cancellation what the rounding of q_t
/// (≈ 1e-16 · n) leaves: a relative error ≈ 1e-16 / q_n² in q_n, hence in the power of the
/// grazing wave and, through the boundary problem, in the powers of its neighbours; with
/// q_n² ≈ 2 n² sin β cos β · δ ≳ 0.4 δ this is P · 2.5e-16/δ, in the library and in the reference
/// alike. Powers at a face δ rad from its critical angle are therefore compared to
/// `TOL` + P · `NEAR_CRITICAL` / |δ| (1e-7 P at δ = 1e-8, 1e-9 P at δ = 1e-6); directions and
/// points keep `TOL`, since q_n's absolute error is only ~1e-16/q_n.
const NEAR_CRITICAL: f64 = 1e-15;
/// Generated set-ups (each traced by the library and by the reference); about 14 s in debug.
const CASES: usize = 1500;

// ---------------------------------------------------------------------------------------------
// The face solver
// ---------------------------------------------------------------------------------------------

/// A homogeneous medium.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Body {
    Isotropic(f64),
    Crystal {
        no: f64,
        ne: f64,
        c: Vector3<f64>,
    },
    /// A biaxial crystal by its permittivity (lab frame).
    Biaxial {
        eps: Matrix3<f64>,
    },
}

impl Body {
    fn eps(&self) -> Matrix3<f64> {
        match *self {
            Body::Isotropic(n) => Matrix3::identity() * (n * n),
            Body::Crystal { no, ne, c } => permittivity(no, ne, &c),
            Body::Biaxial { eps } => eps,
        }
    }
}

/// One wave of a medium at a face, in the face frame.
#[derive(Debug, Clone, Copy)]
struct Wave {
    psi: Vector4<C>,
    q: Vector3<C>,
    e: Vector3<C>,
    h: Vector3<C>,
    propagating: bool,
}

impl Wave {
    /// Unit Poynting direction (face frame), for a propagating wave.
    fn ray(&self) -> Vector3<f64> {
        let s = self.e.cross(&self.h.map(|z| z.conj())).map(|z| z.re);
        s / s.norm()
    }
}

/// F(a, b) = ½ (E_a × H_b* + E_b* × H_a)_z from the tangential fields; F(a, a) is the flux
/// Re(E × H*)_z.
fn flux(a: &Vector4<C>, b: &Vector4<C>) -> C {
    (a[0] * b[3].conj() - a[1] * b[2].conj() + b[0].conj() * a[3] - b[1].conj() * a[2]) * 0.5
}

/// The full fields of tangential field ψ at q = (q_x, 0, q_z): E_z from the z-equation of
/// Maxwell's curl of H, H_z = q_x E_y.
fn wave(qx: f64, qz: C, eps: &Matrix3<f64>, psi: Vector4<C>, propagating: bool) -> Wave {
    let a = ez_row(qx, 0.0, eps);
    let ez: C = (0..4).map(|j| psi[j] * a[j]).sum();
    Wave {
        psi,
        q: Vector3::new(C::from(qx), C::from(0.0), qz),
        e: Vector3::new(psi[0], psi[1], ez),
        h: Vector3::new(psi[2], psi[3], psi[1] * qx),
        propagating,
    }
}

/// The forward and backward waves of a medium at q_x (face frame), and the smallest distance
/// between the normal components of two different waves of one travel (infinite for an
/// isotropic medium's double eigenvalue).
struct Modes {
    fwd: Vec<Wave>,
    back: Vec<Wave>,
    gap: f64,
}

fn solve_medium(eps: &Matrix3<f64>, qx: f64) -> Result<Modes, String> {
    let d: Matrix4<f64> = berreman(qx, 0.0, eps);
    if !d.iter().all(|x| x.is_finite()) {
        return Err(format!("non-finite Δ at q_x = {qx}"));
    }
    let eig = try_eigenvalues(&d).ok_or("unsolved: the Schur iteration does not converge")?;
    let mut used = [false; 4];
    let mut clusters: Vec<(C, usize)> = Vec::new();
    for i in 0..4 {
        if used[i] {
            continue;
        }
        used[i] = true;
        let mut members = vec![eig[i]];
        for j in i + 1..4 {
            if !used[j] && (eig[i] - eig[j]).norm() <= CLUSTER * (1.0 + eig[i].norm()) {
                used[j] = true;
                members.push(eig[j]);
            }
        }
        if members.len() > 2 {
            return Err(format!("four waves merge (exactly critical): {eig:?}"));
        }
        let mean = members.iter().sum::<C>() / members.len() as f64;
        clusters.push((mean, members.len()));
    }
    let (mut fwd, mut back) = (Vec::new(), Vec::new());
    for &(lambda, m) in &clusters {
        let propagating = lambda.im == 0.0;
        let mut waves: Vec<Wave> = null_space(&d, lambda, m)
            .ok_or("unsolved: the SVD does not converge")?
            .into_iter()
            .map(|psi| wave(qx, lambda, eps, psi, propagating))
            .collect();
        // Gram–Schmidt with the flux form inside a double eigenvalue; unit flux (or unit field
        // for an evanescent wave).
        for k in 0..waves.len() {
            let mut psi = waves[k].psi;
            if propagating {
                for pj in waves[..k].iter().map(|w| w.psi) {
                    psi -= pj * (flux(&psi, &pj) / flux(&pj, &pj));
                }
                psi /= C::from(flux(&psi, &psi).re.abs().sqrt());
            } else {
                psi /= C::from(psi.norm());
            }
            waves[k] = wave(qx, lambda, eps, psi, propagating);
        }
        for w in waves {
            let forward = if propagating {
                flux(&w.psi, &w.psi).re > 0.0
            } else {
                lambda.im > 0.0
            };
            if forward { fwd.push(w) } else { back.push(w) }
        }
    }
    if fwd.len() != 2 || back.len() != 2 {
        return Err(format!("not two waves each way: {eig:?}"));
    }
    let gap = if clusters.len() == 4 {
        (fwd[0].q.z - fwd[1].q.z).norm().min((back[0].q.z - back[1].q.z).norm())
    } else {
        f64::INFINITY
    };
    Ok(Modes { fwd, back, gap })
}

/// Face frame: columns x (along the tangential wave vector), y, z = n, in the lab.
fn face_frame(n: &Vector3<f64>, q: &Vector3<f64>) -> Matrix3<f64> {
    let qt = q - n * n.dot(q);
    let x = if qt.norm() > 1e-13 * q.norm() {
        qt.normalize()
    } else {
        let t = if n.x.abs() < 0.9 { Vector3::x() } else { Vector3::y() };
        (t - n * n.dot(&t)).normalize()
    };
    Matrix3::from_columns(&[x, n.cross(&x), *n])
}

fn to_c(m: &Matrix3<f64>) -> Matrix3<C> {
    m.map(C::from)
}

/// The light a ray carries: in an isotropic medium, its field J (transverse, |J|² = power); in a
/// crystal, one mode by its wave vector, letter and power.
#[derive(Debug, Clone)]
enum Carrier {
    Free {
        n: f64,
        u: Vector3<f64>,
        field: Vector3<C>,
    },
    Bound {
        q: Vector3<f64>,
        ray: Vector3<f64>,
        power: f64,
    },
}

impl Carrier {
    fn q(&self) -> Vector3<f64> {
        match self {
            Carrier::Free { n, u, .. } => u * *n,
            Carrier::Bound { q, .. } => *q,
        }
    }
    fn direction(&self) -> Vector3<f64> {
        match self {
            Carrier::Free { u, .. } => *u,
            Carrier::Bound { ray, .. } => *ray,
        }
    }
    fn power(&self) -> f64 {
        match self {
            Carrier::Free { field, .. } => field.norm_squared(),
            Carrier::Bound { power, .. } => *power,
        }
    }
}

/// What a face does to one ray.
struct Crossed {
    onward: Vec<(Carrier, Option<char>)>,
    /// Reflected waves when a wave beyond is evanescent: (lab ray direction, power weight).
    reflected: Vec<(Vector3<f64>, f64)>,
    tir: bool,
    p_in: f64,
}

/// The lossless part of `t` over the propagating rows and columns: Σ w_i v_iᴴ over its non-zero
/// singular values (the partial isometry of its polar decomposition).
fn lossless(t: &nalgebra::Matrix2<C>, rows: [bool; 2], cols: [bool; 2]) -> nalgebra::Matrix2<C> {
    let ri: Vec<usize> = (0..2).filter(|&i| rows[i]).collect();
    let ci: Vec<usize> = (0..2).filter(|&j| cols[j]).collect();
    let mut out = nalgebra::Matrix2::<C>::zeros();
    if ri.is_empty() || ci.is_empty() {
        return out;
    }
    let sub = DMatrix::from_fn(ri.len(), ci.len(), |i, j| t[(ri[i], ci[j])]);
    assert!(
        sub.iter().all(|z| z.re.is_finite() && z.im.is_finite()),
        "non-finite transmission {t}"
    );
    let svd = sub
        .try_svd(true, true, f64::EPSILON, common::berreman::MAX_SWEEPS)
        .expect("the SVD converges");
    let (w, vt) = (svd.u.unwrap(), svd.v_t.unwrap());
    let top = svd.singular_values.max();
    let mut u = DMatrix::<C>::zeros(ri.len(), ci.len());
    for k in 0..svd.singular_values.len() {
        if svd.singular_values[k] > 1e-14 * top {
            u += w.column(k) * vt.row(k);
        }
    }
    for (i, &r) in ri.iter().enumerate() {
        for (j, &c) in ci.iter().enumerate() {
            out[(r, c)] = u[(i, j)];
        }
    }
    out
}

/// Crosses one face of unit normal `n` from `from` into `into`.
fn cross(carrier: &Carrier, from: Body, into: Body, n: Vector3<f64>, ideal: bool) -> Result<Crossed, String> {
    let q = carrier.q();
    if !q.iter().all(|x| x.is_finite()) || carrier.power().is_nan() {
        return Err(format!("non-finite ray {carrier:?}"));
    }
    let frame = face_frame(&n, &q);
    let qf = frame.transpose() * q;
    let qx = qf.x;
    let (eps_a, eps_b) = (
        frame.transpose() * from.eps() * frame,
        frame.transpose() * into.eps() * frame,
    );
    let a = solve_medium(&eps_a, qx)?;
    let b = solve_medium(&eps_b, qx)?;
    for (body, m) in [(from, &a), (into, &b)] {
        if !matches!(body, Body::Isotropic(_)) && m.gap < DEGENERATE_GAP {
            return Err("degenerate".into());
        }
    }
    let rc = to_c(&frame);
    let lab_q = |w: &Wave| frame * w.q.map(|z| z.re);
    // The incident amplitudes on A's forward waves.
    let mut amp = Vector2::<C>::zeros();
    match carrier {
        Carrier::Free { field, .. } => {
            let e_lab = field / C::from(q.dot(&n).sqrt());
            let e = rc.transpose() * e_lab;
            let qc = Vector3::new(C::from(qx), C::from(0.0), C::from(qf.z));
            let h = qc.cross(&e);
            let psi = Vector4::new(e.x, e.y, h.x, h.y);
            let mut rebuilt = Vector4::<C>::zeros();
            for k in 0..2 {
                amp[k] = flux(&psi, &a.fwd[k].psi);
                rebuilt += a.fwd[k].psi * amp[k];
            }
            // Near grazing the waves' normal components carry the rounding of q_t over q_n²
            // (module header): the self-check allows for it.
            let grazing = (qf.z / q.norm()).powi(2);
            if grazing < 1e-12 {
                return Err(format!("a grazing wave, q_n = {:e}, is beyond this method", qf.z));
            }
            assert!(
                (rebuilt - psi).norm() <= 1e-13 * (1.0 + 1.0 / grazing) * psi.norm(),
                "the incident field is not spanned by the forward waves ({:.1e}) at {qf:?}",
                (rebuilt - psi).norm() / psi.norm()
            );
        }
        Carrier::Bound { power, .. } => {
            let k = (0..2)
                .min_by(|&i, &j| (lab_q(&a.fwd[i]) - q).norm().total_cmp(&(lab_q(&a.fwd[j]) - q).norm()))
                .unwrap();
            if (lab_q(&a.fwd[k]) - q).norm() > 1e-9 * q.norm() || !a.fwd[k].propagating {
                return Err(format!("the ray's mode is not a wave of its medium at {q:?}"));
            }
            amp[k] = C::from(power.sqrt());
        }
    }
    // The bare face: −r₁ψ_A1 − r₂ψ_A2 + t₁ψ_B1 + t₂ψ_B2 = ψ_inc, per incident wave.
    let mut m = Matrix4::<C>::zeros();
    for k in 0..2 {
        m.set_column(k, &(-a.back[k].psi));
        m.set_column(2 + k, &b.fwd[k].psi);
    }
    let lu = m.lu();
    let (mut t, mut r) = (nalgebra::Matrix2::<C>::zeros(), nalgebra::Matrix2::<C>::zeros());
    for k in 0..2 {
        let x = lu.solve(&a.fwd[k].psi).ok_or("singular boundary problem")?;
        for i in 0..2 {
            r[(i, k)] = x[i];
            t[(i, k)] = x[2 + i];
        }
    }
    let rows = [b.fwd[0].propagating, b.fwd[1].propagating];
    let cols = [a.fwd[0].propagating, a.fwd[1].propagating];
    let t_used = if ideal {
        lossless(&t, rows, cols)
    } else {
        let mut tp = t;
        for (i, _) in rows.iter().enumerate().filter(|(_, p)| !**p) {
            tp.set_row(i, &nalgebra::RowVector2::zeros());
        }
        tp
    };
    let out = t_used * amp;
    let mut onward = Vec::new();
    match into {
        Body::Isotropic(nb) => {
            if rows[0] {
                let psi = b.fwd[0].psi * out[0] + b.fwd[1].psi * out[1];
                let qz = b.fwd[0].q.z;
                let w = wave(qx, qz, &eps_b, psi, true);
                let qb = lab_q(&b.fwd[0]);
                let u = qb / qb.norm();
                let field = rc * w.e * C::from(qb.dot(&n).sqrt());
                onward.push((Carrier::Free { n: nb, u, field }, None));
            }
        }
        Body::Crystal { c, .. } => {
            let cf = frame.transpose() * c;
            let along = |w: &Wave| w.e.dot(&cf.map(C::from)).norm() / w.e.norm();
            let o = if along(&b.fwd[0]) <= along(&b.fwd[1]) { 0 } else { 1 };
            for i in 0..2 {
                if rows[i] {
                    let letter = if i == o { 'o' } else { 'e' };
                    let carrier = Carrier::Bound {
                        q: lab_q(&b.fwd[i]),
                        ray: frame * b.fwd[i].ray(),
                        power: out[i].norm_sqr(),
                    };
                    onward.push((carrier, Some(letter)));
                }
            }
        }
        Body::Biaxial { .. } => {
            // `f` is the wave on the inner sheet of the index surface: its index below the mean
            // of the two indices along its own wave normal (the documented convention,
            // CONVENTIONS.md "More media"), from the eigenvalues 1/n² of the transverse part of
            // ε⁻¹ (Born & Wolf §15.2).
            let inv = eps_b.try_inverse().ok_or("singular permittivity")?;
            let inner = |w: &Wave| {
                let q = w.q.map(|z| z.re);
                let s = q / q.norm();
                let t1 = s.cross(&Vector3::new(0.3, -0.8, 0.52)).normalize();
                let t2 = s.cross(&t1);
                let (a, b, c) = (t1.dot(&(inv * t1)), t1.dot(&(inv * t2)), t2.dot(&(inv * t2)));
                let (mean, half) = (0.5 * (a + c), (0.25 * (a - c) * (a - c) + b * b).sqrt());
                let mid = 0.5 * (1.0 / (mean + half).sqrt() + 1.0 / (mean - half).sqrt());
                q.norm() < mid
            };
            let fast = match (rows[0], rows[1]) {
                (true, true) if inner(&b.fwd[0]) == inner(&b.fwd[1]) => return Err("degenerate".into()),
                (true, _) => usize::from(!inner(&b.fwd[0])),
                (false, true) => usize::from(inner(&b.fwd[1])),
                _ => 0,
            };
            for i in 0..2 {
                if rows[i] {
                    let carrier = Carrier::Bound {
                        q: lab_q(&b.fwd[i]),
                        ray: frame * b.fwd[i].ray(),
                        power: out[i].norm_sqr(),
                    };
                    onward.push((carrier, Some(if i == fast { 'f' } else { 's' })));
                }
            }
        }
    }
    let tir = !(rows[0] && rows[1]);
    let mut reflected = Vec::new();
    if tir {
        let r_out = r * amp;
        for k in 0..2 {
            if a.back[k].propagating {
                reflected.push((frame * a.back[k].ray(), r_out[k].norm_sqr()));
            }
        }
    }
    Ok(Crossed {
        onward,
        reflected,
        tir,
        p_in: amp.norm_squared(),
    })
}

// ---------------------------------------------------------------------------------------------
// The set-ups and their reference trace
// ---------------------------------------------------------------------------------------------

fn unit(tilt_deg: f64, az_deg: f64) -> Vector3<f64> {
    let (t, a) = (tilt_deg.to_radians(), az_deg.to_radians());
    Vector3::new(t.sin() * a.cos(), t.sin() * a.sin(), t.cos())
}

#[derive(Debug, Clone, Copy, PartialEq)]
enum Contact {
    Air,
    Cement(f64),
    Optical,
}

/// A biaxial crystal put in place of an element's uniaxial one after the document is resolved:
/// principal indices on the axes R = Rz(azimuth)·Ry(tilt)·Rz(roll) (CONVENTIONS.md, "More
/// media"; angles in degrees).
#[derive(Debug, Clone, Copy)]
struct Biaxial {
    principal: [f64; 3],
    angles: (f64, f64, f64),
}

impl Biaxial {
    fn rotation(&self) -> Matrix3<f64> {
        let rz = |deg: f64| {
            let (s, c) = deg.to_radians().sin_cos();
            Matrix3::new(c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0)
        };
        let (s, c) = self.angles.0.to_radians().sin_cos();
        let ry = Matrix3::new(c, 0.0, s, 0.0, 1.0, 0.0, -s, 0.0, c);
        rz(self.angles.1) * ry * rz(self.angles.2)
    }

    fn permittivity(&self) -> Matrix3<f64> {
        let r = self.rotation();
        let [a, b, c] = self.principal;
        r * Matrix3::from_diagonal(&Vector3::new(a * a, b * b, c * c)) * r.transpose()
    }

    /// The library's crystal.
    fn medium(&self) -> StackMedium {
        let (t, a, r) = self.angles;
        let axes = orientation(t.to_radians(), a.to_radians(), r.to_radians());
        StackMedium::Anisotropic(Anisotropic::new(self.principal, axes, [0.0; 3]).expect("valid crystal"))
    }
}

/// One crystal element as the document gives it.
#[derive(Debug, Clone)]
struct Elem {
    /// When set, the element's crystal is this biaxial one instead (see [`Biaxial`]).
    biaxial: Option<Biaxial>,
    no: f64,
    ne: f64,
    axis: (f64, f64),
    thickness: f64,
    front: (f64, f64),
    back: (f64, f64),
    aperture: f64,
    gap: f64,
    contact: Contact,
}

#[derive(Debug, Clone)]
struct Setup {
    n_out: f64,
    ideal: bool,
    polar: f64,
    azimuth: f64,
    jones: [C; 2],
    screen: f64,
    elems: Vec<Elem>,
    family: &'static str,
    /// For an exactly critical case: the label prefix of the path through the critical wave.
    critical_path: Option<String>,
    /// For a near-critical case: how far past the critical angle (rad; > 0 evanescent).
    near_delta: Option<f64>,
}

impl Setup {
    /// The bound on a power P: `TOL`, and near a critical angle also P·`NEAR_CRITICAL`/|δ|,
    /// the conditioning of q_n² = n² − q_t² (module header).
    fn power_tol(&self, p: f64) -> f64 {
        TOL + self.near_delta.map_or(0.0, |d| p.abs() * NEAR_CRITICAL / d.abs())
    }
}

impl Setup {
    fn document(&self) -> String {
        let els: Vec<String> = self
            .elems
            .iter()
            .map(|e| {
                let contact = match e.contact {
                    Contact::Air => String::new(),
                    Contact::Cement(n) => format!(r#", "contact": "cement", "cement_index": {n:?}"#),
                    Contact::Optical => r#", "contact": "optical""#.to_string(),
                };
                format!(
                    r#"{{"kind": "crystal", "no": {:?}, "ne": {:?}, "thickness_mm": {:?}, "gap_mm": {:?},
                        "axis": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}, "aperture_mm": {:?},
                        "faces": {{"front": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}, "back": {{"tilt_deg": {:?}, "azimuth_deg": {:?}}}}}{contact}}}"#,
                    e.no, e.ne, e.thickness, e.gap, e.axis.0, e.axis.1, e.aperture, e.front.0, e.front.1, e.back.0, e.back.1
                )
            })
            .collect();
        let j = self.jones;
        format!(
            r#"{{"version": 2, "wavelength_nm": 633, "outside_index": {:?}, "interface_losses": "{}", "screen_mm": {:?},
                "beam": {{"incidence": {{"polar_deg": {:?}, "azimuth_deg": {:?}}},
                          "polarization": {{"kind": "jones", "jones": [[{:?}, {:?}], [{:?}, {:?}]]}}}},
                "elements": [{}]}}"#,
            self.n_out,
            if self.ideal { "ideal" } else { "uncoated" },
            self.screen,
            self.polar,
            self.azimuth,
            j[0].re,
            j[0].im,
            j[1].re,
            j[1].im,
            els.join(", ")
        )
    }
}

/// x̂ and ŷ carried onto the plane across `u` by the smallest rotation taking ẑ to `u`
/// (Rodrigues' formula about ẑ × u): a ray's Jones basis (CONVENTIONS.md, version 2).
fn ray_basis(u: &Vector3<f64>) -> (Vector3<f64>, Vector3<f64>) {
    let k = Vector3::z().cross(u);
    let kx = k.cross_matrix();
    let rot = Matrix3::identity() + kx + kx * kx / (1.0 + u.z);
    (rot * Vector3::x(), rot * Vector3::y())
}

#[derive(Debug, Clone)]
struct RefRay {
    label: String,
    power: f64,
    stokes: [f64; 4],
    direction: Vector3<f64>,
    exit: Vector3<f64>,
    screen: [f64; 2],
    screen_distance: f64,
    path_length: f64,
}

#[derive(Debug, Clone)]
struct RefRejected {
    label: String,
    element: usize,
    face: &'static str,
    reason: &'static str,
    power: f64,
    point: Vector3<f64>,
    direction: Vector3<f64>,
}

#[derive(Debug, Default)]
struct Reference {
    rays: Vec<RefRay>,
    rejected: Vec<RefRejected>,
    reflected: Vec<f64>,
}

#[derive(Debug, Clone)]
struct Flight {
    label: String,
    at: Vector3<f64>,
    exit: Vector3<f64>,
    length: f64,
    carrier: Carrier,
    pending: bool,
}

/// A placed face: unit normal and a point.
#[derive(Debug, Clone, Copy)]
struct Face {
    n: Vector3<f64>,
    p: Vector3<f64>,
}

/// Distance along `dir` from `from` to the face, ahead only (a hair behind counts as here); 0
/// for a point on the face to rounding, however the ray runs (a vanishing gap between coinciding
/// faces is crossed where the ray leaves the first: the rule the contract gives an air contact).
fn meet(face: &Face, from: Vector3<f64>, dir: Vector3<f64>) -> Option<f64> {
    let gap = face.n.dot(&(face.p - from));
    let scale = 1.0 + (face.p - from).norm();
    if gap.abs() <= 1e-12 * scale {
        return Some(0.0);
    }
    let along = face.n.dot(&dir);
    if along.abs() < 1e-15 {
        return None;
    }
    let s = gap / along;
    (s >= -1e-12 * scale).then_some(s.max(0.0))
}

struct RefTracer<'a> {
    setup: &'a Setup,
    out: Reference,
}

impl RefTracer<'_> {
    fn reject(&mut self, f: &Flight, element: usize, face: &'static str, reason: &'static str) {
        self.out.rejected.push(RefRejected {
            label: f.label.clone(),
            element,
            face,
            reason,
            power: f.carrier.power(),
            point: f.at,
            direction: f.carrier.direction(),
        });
    }

    /// One face crossing with the contract's booking: light a face sends back is rejected when a
    /// wave beyond is evanescent, otherwise counted as the element's reflected power.
    fn cross_booked(
        &mut self,
        f: &Flight,
        (from, into, n): (Body, Body, Vector3<f64>),
        (element, face): (usize, &'static str),
    ) -> Result<Vec<Flight>, String> {
        let c = cross(&f.carrier, from, into, n, self.setup.ideal)?;
        let mut next = Vec::new();
        let mut p_out = 0.0;
        for (carrier, letter) in c.onward {
            p_out += carrier.power();
            let mut label = f.label.clone();
            label.extend(letter);
            next.push(Flight {
                label,
                exit: f.at,
                carrier,
                pending: false,
                ..f.clone()
            });
        }
        let lost = (c.p_in - p_out).max(0.0);
        let weights: f64 = c.reflected.iter().map(|r| r.1).sum();
        if c.tir && !c.reflected.is_empty() {
            for (dir, w) in &c.reflected {
                let share = if weights > 0.0 {
                    w / weights
                } else {
                    1.0 / c.reflected.len() as f64
                };
                self.out.rejected.push(RefRejected {
                    label: f.label.clone(),
                    element,
                    face,
                    reason: "total internal reflection",
                    power: lost * share,
                    point: f.at,
                    direction: *dir,
                });
            }
        } else {
            self.out.reflected[element] += lost;
        }
        Ok(next)
    }

    fn travel(f: &mut Flight, face: &Face) -> bool {
        let dir = f.carrier.direction();
        match meet(face, f.at, dir) {
            Some(s) => {
                f.at += dir * s;
                f.length += s;
                true
            }
            None => false,
        }
    }

    fn trace(mut self) -> Result<Reference, String> {
        let s = self.setup;
        let outside = Body::Isotropic(s.n_out);
        let u_in = unit(s.polar, s.azimuth);
        let (e1, e2) = ray_basis(&u_in);
        let field = e1.map(C::from) * s.jones[0] + e2.map(C::from) * s.jones[1];
        let mut flights = vec![Flight {
            label: String::new(),
            at: Vector3::zeros(),
            exit: Vector3::zeros(),
            length: 0.0,
            carrier: Carrier::Free {
                n: s.n_out,
                u: u_in,
                field,
            },
            pending: false,
        }];
        self.out.reflected = vec![0.0; s.elems.len()];
        let mut z = 0.0;
        let mut prev: Option<(usize, Body, Vector3<f64>)> = None;
        for (i, e) in s.elems.iter().enumerate() {
            z += e.gap;
            let body = match e.biaxial {
                Some(b) => Body::Biaxial { eps: b.permittivity() },
                None => Body::Crystal {
                    no: e.no,
                    ne: e.ne,
                    c: unit(e.axis.0, e.axis.1),
                },
            };
            let front = Face {
                n: unit(e.front.0, e.front.1),
                p: Vector3::new(0.0, 0.0, z),
            };
            let back = Face {
                n: unit(e.back.0, e.back.1),
                p: Vector3::new(0.0, 0.0, z + e.thickness),
            };
            let radius = e.aperture / 2.0;
            let inside = |p: &Vector3<f64>| p.x.hypot(p.y) <= radius * (1.0 + 1e-12);
            // Rays waiting at the previous back face leave into the outside medium unless this
            // element is cemented or contacted to it.
            let mut arrived = Vec::new();
            for f in std::mem::take(&mut flights) {
                if !f.pending {
                    arrived.push(f);
                    continue;
                }
                let (pi, pbody, pn) = prev.unwrap();
                if e.contact == Contact::Air {
                    let mut out = self.cross_booked(&f, (pbody, outside, pn), (pi, "back"))?;
                    arrived.append(&mut out);
                } else {
                    arrived.push(f);
                }
            }
            let mut inside_body = Vec::new();
            for mut f in arrived {
                let sequence: Vec<Body> = if f.pending {
                    match e.contact {
                        Contact::Cement(nc) => vec![Body::Isotropic(nc), body],
                        _ => vec![body],
                    }
                } else {
                    if !Self::travel(&mut f, &front) || !inside(&f.at) {
                        self.reject(&f, i, "front", "outside aperture");
                        continue;
                    }
                    vec![body]
                };
                let mut from = if f.pending { prev.unwrap().1 } else { outside };
                f.pending = false;
                let mut here = vec![f];
                for into in sequence {
                    let mut next = Vec::new();
                    for g in here {
                        next.append(&mut self.cross_booked(&g, (from, into, front.n), (i, "front"))?);
                    }
                    here = next;
                    from = into;
                }
                inside_body.append(&mut here);
            }
            for mut f in inside_body {
                if !Self::travel(&mut f, &back) || !inside(&f.at) {
                    self.reject(&f, i, "back", "outside aperture");
                    continue;
                }
                f.pending = true;
                flights.push(f);
            }
            prev = Some((i, body, back.n));
            z += e.thickness;
        }
        let (pi, pbody, pn) = prev.unwrap();
        let mut leaving = Vec::new();
        for f in std::mem::take(&mut flights) {
            leaving.append(&mut self.cross_booked(&f, (pbody, outside, pn), (pi, "back"))?);
        }
        let z_screen = z + s.screen;
        for f in leaving {
            let Carrier::Free { u, field, .. } = &f.carrier else {
                unreachable!()
            };
            let t = (z_screen - f.at.z) / u.z;
            let at_screen = f.at + u * t;
            let (b1, b2) = ray_basis(u);
            let j = [b1.map(C::from).dot(field), b2.map(C::from).dot(field)];
            let (p1, p2, x) = (j[0].norm_sqr(), j[1].norm_sqr(), j[0] * j[1].conj());
            self.out.rays.push(RefRay {
                label: f.label.clone(),
                power: p1 + p2,
                stokes: [p1 + p2, p1 - p2, 2.0 * x.re, 2.0 * x.im],
                direction: *u,
                exit: f.exit,
                screen: [at_screen.x, at_screen.y],
                screen_distance: t.abs(),
                path_length: f.length,
            });
        }
        Ok(self.out)
    }
}

// ---------------------------------------------------------------------------------------------
// Comparison
// ---------------------------------------------------------------------------------------------

#[derive(Default)]
struct Tally {
    cases: usize,
    compared_rays: usize,
    compared_rejected: usize,
    tir_cases: usize,
    refused: usize,
    degenerate: usize,
    critical_paths: usize,
    /// Biaxial copies of generated set-ups compared.
    biaxial: usize,
    worst_power: f64,
    worst_direction: f64,
    worst_point: f64,
}

fn v3(a: [f64; 3]) -> Vector3<f64> {
    Vector3::new(a[0], a[1], a[2])
}

fn check(setup: &Setup, got: &TraceResult, want: &Reference, split_tir: bool, tally: &mut Tally) -> Result<(), String> {
    let skip = |label: &str| setup.critical_path.as_deref().is_some_and(|p| label.starts_with(p));
    // Every watt: rays, rejected and reflected add to 1 (nothing absorbs).
    let total: f64 = got.rays.iter().map(|r| r.power).sum::<f64>()
        + got.rejected.iter().map(|r| r.power).sum::<f64>()
        + got
            .elements
            .iter()
            .map(|e| match e {
                ElementReport::Crystal { reflected_power, .. } => *reflected_power,
                _ => 0.0,
            })
            .sum::<f64>();
    if (total - 1.0).abs() > TOL {
        return Err(format!("power accounted {total}"));
    }
    for r in &got.rays {
        let finite = r.power.is_finite()
            && r.direction
                .iter()
                .chain(&r.exit_point_mm)
                .chain(&r.screen_position_mm)
                .all(|x| x.is_finite())
            && r.stokes.iter().all(|x| x.is_finite());
        if !finite {
            return Err(format!("ray {} not finite", r.label));
        }
    }
    let mut got_labels: Vec<&str> = got.rays.iter().map(|r| r.label.as_str()).filter(|l| !skip(l)).collect();
    let mut want_labels: Vec<&str> = want
        .rays
        .iter()
        .map(|r| r.label.as_str())
        .filter(|l| !skip(l))
        .collect();
    got_labels.sort();
    want_labels.sort();
    if got_labels != want_labels {
        return Err(format!("rays {got_labels:?}, reference {want_labels:?}"));
    }
    for w in want.rays.iter().filter(|r| !skip(&r.label)) {
        let g = got.rays.iter().find(|r| r.label == w.label).unwrap();
        let dp = (g.power - w.power).abs();
        let ds = (0..4).map(|k| (g.stokes[k] - w.stokes[k]).abs()).fold(0.0, f64::max);
        let dd = (v3(g.direction) - w.direction).norm();
        let scale = 1.0 + w.path_length;
        let de = (v3(g.exit_point_mm) - w.exit).norm() / scale;
        let dsc = (g.screen_position_mm[0] - w.screen[0]).hypot(g.screen_position_mm[1] - w.screen[1])
            / (scale + w.screen_distance);
        tally.worst_power = tally.worst_power.max(dp).max(ds);
        tally.worst_direction = tally.worst_direction.max(dd);
        tally.worst_point = tally.worst_point.max(de).max(dsc);
        let tp = setup.power_tol(w.power);
        if dp > tp || ds > tp || dd > TOL || de > TOL || dsc > TOL {
            return Err(format!(
                "ray {}: power {} vs {} (Δ {dp:.2e}), Stokes {:?} vs {:?} (Δ {ds:.2e}), direction {:?} vs {:?} (Δ {dd:.2e}), exit {:?} vs {:?} (Δ {de:.2e}), screen {:?} vs {:?} (Δ {dsc:.2e})",
                w.label,
                g.power,
                w.power,
                g.stokes,
                w.stokes,
                g.direction,
                w.direction,
                g.exit_point_mm,
                w.exit,
                g.screen_position_mm,
                w.screen
            ));
        }
        tally.compared_rays += 1;
    }
    // Rejected rays, summed over entries that share label, place, reason and direction (an
    // isotropic medium's reflection is one direction in two polarizations, split by basis).
    // Unless `split_tir`, the light a face totally reflects is summed over its reflected waves
    // and their directions are compared as a set (the form this check took while the library
    // split it wrongly; see the module header).
    type Key = (String, usize, String, String, Vector3<f64>, Vector3<f64>);
    let mut groups: Vec<(Key, f64, f64)> = Vec::new();
    let mut directions: [Vec<Vector3<f64>>; 2] = [Vec::new(), Vec::new()];
    let mut add = |mut k: Key, p: f64, which: usize| {
        if k.3 == "total internal reflection" && !split_tir {
            if p > 1e-12 {
                directions[which].push(k.4);
            }
            k.4 = Vector3::zeros();
        }
        let found = groups.iter_mut().find(|(g, _, _)| {
            g.0 == k.0
                && g.1 == k.1
                && g.2 == k.2
                && g.3 == k.3
                && (g.4 - k.4).norm() < 1e-9
                && (g.5 - k.5).norm() < 1e-9 * (1.0 + k.5.norm())
        });
        match found {
            Some(g) => {
                if which == 0 {
                    g.1 += p
                } else {
                    g.2 += p
                }
            }
            None => groups.push(if which == 0 { (k, p, 0.0) } else { (k, 0.0, p) }),
        }
    };
    for r in got.rejected.iter().filter(|r| !skip(&r.label)) {
        let k = (
            r.label.clone(),
            r.element,
            r.face.to_string(),
            r.reason.to_string(),
            v3(r.direction),
            v3(r.point_mm),
        );
        add(k, r.power, 0);
    }
    for r in want.rejected.iter().filter(|r| !skip(&r.label)) {
        let k = (
            r.label.clone(),
            r.element,
            r.face.to_string(),
            r.reason.to_string(),
            r.direction,
            r.point,
        );
        add(k, r.power, 1);
    }
    for d in &directions[0] {
        if !directions[1].iter().any(|w| (w - d).norm() <= TOL) {
            return Err(format!(
                "a totally reflected ray along {d:?} that the reference does not have: {:?}",
                directions[1]
            ));
        }
    }
    for (k, g, w) in &groups {
        if (g - w).abs() > setup.power_tol(*w) {
            return Err(format!(
                "rejected {} at element {} {} ({}) along {:?} at {:?}: power {g} vs reference {w}",
                k.0, k.1, k.2, k.3, k.4, k.5
            ));
        }
        tally.worst_power = tally.worst_power.max((g - w).abs());
        tally.compared_rejected += 1;
    }
    if setup.critical_path.is_none() {
        for (i, e) in got.elements.iter().enumerate() {
            if let ElementReport::Crystal { reflected_power, .. } = e {
                let d = (reflected_power - want.reflected[i]).abs();
                if d > setup.power_tol(want.reflected[i]) {
                    return Err(format!(
                        "element {i} reflected {reflected_power} vs {}",
                        want.reflected[i]
                    ));
                }
            }
        }
    }
    if want.rejected.iter().any(|r| r.reason == "total internal reflection") {
        tally.tir_cases += 1;
    }
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// Generated set-ups
// ---------------------------------------------------------------------------------------------

/// Polar angle and azimuth (degrees) of a unit vector with n_z > 0.
fn angles_of(n: &Vector3<f64>) -> (f64, f64) {
    (n.z.clamp(-1.0, 1.0).acos().to_degrees(), n.y.atan2(n.x).to_degrees())
}

fn indices(r: &mut Rng) -> (f64, f64) {
    let no = r.range(1.4, 2.7);
    let ne = match r.next_u64() % 3 {
        0 => no + r.sign() * r.range(0.005, 0.02), // weak, quartz-like
        1 => no + r.sign() * r.range(0.1, 0.3),    // strong, calcite- or rutile-like
        _ => no + r.sign() * r.range(0.02, 0.1),
    };
    (no, ne.max(1.3))
}

fn jones(r: &mut Rng) -> [C; 2] {
    let (th, ph) = (
        r.range(0.0, std::f64::consts::PI),
        r.range(-std::f64::consts::PI, std::f64::consts::PI),
    );
    [C::from(th.cos()), C::from_polar(th.sin(), ph)]
}

/// A thickness that keeps two faces of tilts `t1`, `t2` (degrees) apart across an aperture of
/// radius `rad` mm: their planes close in by at most rad·(tan t1 + tan t2).
fn thickness(r: &mut Rng, rad: f64, t1: f64, t2: f64) -> f64 {
    rad * (t1.to_radians().tan() + t2.to_radians().tan()) + r.range(1.0, 8.0)
}

fn element(r: &mut Rng, front: (f64, f64), back: (f64, f64), aperture: f64) -> Elem {
    let (no, ne) = indices(r);
    Elem {
        biaxial: None,
        no,
        ne,
        axis: (r.range(0.0, 180.0), r.range(-180.0, 180.0)),
        thickness: thickness(r, aperture / 2.0, front.0, back.0),
        front,
        back,
        aperture,
        gap: 0.0,
        contact: Contact::Air,
    }
}

fn random_face(r: &mut Rng, max_tilt: f64) -> (f64, f64) {
    (r.range(0.0, max_tilt), r.range(-180.0, 180.0))
}

fn base(r: &mut Rng, family: &'static str) -> Setup {
    Setup {
        n_out: if r.chance(0.6) { 1.0 } else { r.range(1.0, 1.9) },
        ideal: r.chance(0.5),
        polar: r.range(0.0, 45.0),
        azimuth: r.range(-180.0, 180.0),
        jones: jones(r),
        screen: r.range(0.0, 50.0),
        elems: Vec::new(),
        family,
        critical_path: None,
        near_delta: None,
    }
}

/// Two crystals: the second's front face is the first's back face (cement, optical contact, or
/// a vanishing air film), or a face of its own across an air gap.
fn pair(r: &mut Rng, s: &mut Setup, contact_face: (f64, f64)) {
    let ap = 16.0;
    let front = random_face(r, 25.0);
    let mut a = element(r, front, contact_face, ap);
    a.gap = r.range(0.0, 2.0);
    let back = random_face(r, 25.0);
    let mut b = element(r, contact_face, back, ap);
    b.contact = match r.next_u64() % 4 {
        0 => Contact::Cement(r.range(1.35, 1.9)),
        1 => Contact::Optical,
        2 => Contact::Air,
        _ => {
            b.front = random_face(r, 25.0);
            b.thickness = thickness(r, ap / 2.0, b.front.0, b.back.0);
            b.gap = ap / 2.0 * (contact_face.0.to_radians().tan() + b.front.0.to_radians().tan()) + r.range(0.1, 3.0);
            Contact::Air
        }
    };
    s.elems = vec![a, b];
}

/// Turns the back face of element 0 (and the front of element 1 when they touch, or with
/// `vanishing_film` an air contact on coinciding faces) so that the
/// tangential wave vector of the chosen wave at it is `delta` rad past the critical angle of
/// the medium beyond (δ > 0: evanescent). Returns false when that medium has no critical angle
/// for this wave.
fn make_critical(r: &mut Rng, s: &mut Setup, delta: f64, vanishing_film: bool) -> Result<bool, String> {
    // The chosen wave inside element 0, from the reference's own front-face solution.
    let e0 = s.elems[0].clone();
    let body0 = Body::Crystal {
        no: e0.no,
        ne: e0.ne,
        c: unit(e0.axis.0, e0.axis.1),
    };
    let u = unit(s.polar, s.azimuth);
    let inc = Carrier::Free {
        n: s.n_out,
        u,
        field: ray_basis(&u).0.map(C::from),
    };
    let c = cross(
        &inc,
        Body::Isotropic(s.n_out),
        body0,
        unit(e0.front.0, e0.front.1),
        s.ideal,
    )?;
    if c.onward.is_empty() {
        return Ok(false);
    }
    let pick = (r.next_u64() % c.onward.len() as u64) as usize;
    let (Carrier::Bound { q, .. }, Some(letter)) = &c.onward[pick] else {
        unreachable!()
    };
    let beyond = match (s.elems.len(), s.elems.get(1).map(|e| e.contact)) {
        (1, _) | (_, Some(Contact::Air)) => Body::Isotropic(s.n_out),
        (_, Some(Contact::Cement(n))) => Body::Isotropic(n),
        _ => {
            let e1 = &s.elems[1];
            Body::Crystal {
                no: e1.no,
                ne: e1.ne,
                c: unit(e1.axis.0, e1.axis.1),
            }
        }
    };
    // Normals n(β) = cos β q̂ + sin β p̂, β from q̂; the count of waves beyond that propagate
    // changes at the critical angle, found by bisection.
    let qh = q.normalize();
    let v = Vector3::new(r.range(-1.0, 1.0), r.range(-1.0, 1.0), r.range(-1.0, 1.0));
    let p = (v - qh * v.dot(&qh)).normalize();
    let normal = |beta: f64| qh * beta.cos() + p * beta.sin();
    let count = |beta: f64| -> Result<usize, String> {
        let n = normal(beta);
        let frame = face_frame(&n, q);
        let qx = (frame.transpose() * q).x;
        let m = solve_medium(&(frame.transpose() * beyond.eps() * frame), qx)?;
        Ok(m.fwd.iter().filter(|w| w.propagating).count())
    };
    let (mut lo, mut hi) = (0.0f64, 75f64.to_radians());
    let (c_lo, c_hi) = (count(lo)?, count(hi)?);
    if c_lo == c_hi {
        return Ok(false);
    }
    for _ in 0..60 {
        let mid = 0.5 * (lo + hi);
        if count(mid)? == c_lo { lo = mid } else { hi = mid }
    }
    let beta = 0.5 * (lo + hi) + delta;
    let n = normal(beta);
    if n.z < 0.2 {
        return Ok(false);
    }
    let (t, a) = angles_of(&n);
    s.elems[0].back = (t, a);
    s.elems[0].thickness = thickness(r, s.elems[0].aperture / 2.0, s.elems[0].front.0, t);
    if s.elems.len() > 1 && (s.elems[1].contact != Contact::Air || vanishing_film) {
        s.elems[1].front = (t, a);
        s.elems[1].thickness = thickness(r, s.elems[1].aperture / 2.0, t, s.elems[1].back.0);
    } else if s.elems.len() > 1 {
        // An air gap of its own (vanishing films near grazing have a test of their own,
        // `grazing_rays_cross_a_vanishing_air_film_where_they_leave`).
        s.elems[1].gap =
            s.elems[1].aperture / 2.0 * (t.to_radians().tan() + s.elems[1].front.0.to_radians().tan()) + 1.0;
    }
    if delta == 0.0 {
        s.critical_path = Some(letter.to_string());
    } else {
        s.near_delta = Some(delta);
    }
    Ok(true)
}

fn generate(i: usize, r: &mut Rng) -> Result<Setup, String> {
    let kind = i % 6;
    let family = [
        "one crystal",
        "one crystal",
        "pair",
        "pair",
        "near critical",
        "exactly critical",
    ][kind];
    let mut s = base(r, family);
    let ap = 16.0;
    let single = kind < 2 || (kind >= 4 && r.chance(0.5));
    if single {
        let (front, back) = (random_face(r, 30.0), random_face(r, 35.0));
        s.elems = vec![element(r, front, back, ap)];
        s.elems[0].gap = r.range(0.0, 2.0);
    } else {
        let face = random_face(r, 30.0);
        pair(r, &mut s, face);
    }
    if kind >= 4 {
        // Near the axis so that the grazing rays stay inside the aperture.
        s.polar = r.range(0.0, 12.0);
        s.elems[0].front = random_face(r, 8.0);
        s.elems[0].gap = 0.0;
        let delta = if kind == 5 {
            0.0
        } else {
            r.sign() * r.log_range(-8.0, -6.0)
        };
        if !make_critical(r, &mut s, delta, false)? {
            s.family = "critical angle not reached";
        }
    }
    Ok(s)
}

/// Traces `setup` with the library and the reference and compares them; skipped cases are
/// counted in `tally`.
fn compare(setup: &Setup, split_tir: bool, tally: &mut Tally) -> Result<(), String> {
    let doc = setup.document();
    let scenario = match Scenario::from_json_str(&doc) {
        Ok(s) => s,
        Err(e) => {
            assert!(e.field.starts_with("elements["), "{e}\n{doc}");
            tally.refused += 1;
            return Ok(());
        }
    };
    let got = if setup.elems.iter().any(|e| e.biaxial.is_some()) {
        // The document holds uniaxial stand-ins; the resolved stack takes the biaxial crystals.
        let (mut stack, warnings) = scenario.resolve().unwrap_or_else(|e| panic!("{e}\n{doc}"));
        let slabs = stack.layers.iter_mut().filter_map(|l| match &mut l.element {
            StackElement::Slab(s) => Some(s),
            StackElement::Ideal(_) | StackElement::Cell(_) => None,
        });
        for (slab, e) in slabs.zip(&setup.elems) {
            if let Some(b) = e.biaxial {
                slab.medium = b.medium();
            }
        }
        report_trace(&scenario, &stack, &trace_stack(&stack), warnings)
    } else {
        trace_scenario(&scenario).unwrap_or_else(|e| panic!("{e}\n{doc}"))
    };
    let fail = |msg: String| Err(format!("[{}] {msg}\n{doc}", setup.family));
    tally.cases += 1;
    match (RefTracer {
        setup,
        out: Reference::default(),
    })
    .trace()
    {
        Ok(want) => {
            tally.critical_paths += usize::from(setup.critical_path.is_some());
            check(setup, &got, &want, split_tir, tally).or_else(fail)
        }
        Err(e) if e == "degenerate" || e.starts_with("unsolved") => {
            tally.cases -= 1;
            tally.degenerate += 1;
            Ok(())
        }
        Err(_) if setup.critical_path.is_some() => {
            // The reference cannot resolve the waves that merge at an exactly critical face; the
            // library's answer must still be finite and account for every watt.
            tally.critical_paths += 1;
            let reference = Reference {
                reflected: vec![0.0; setup.elems.len()],
                ..Reference::default()
            };
            let only_accounting = Setup {
                critical_path: Some(String::new()),
                ..setup.clone()
            };
            check(&only_accounting, &got, &reference, split_tir, tally).or_else(fail)
        }
        Err(e) => panic!("the reference failed: {e}\n{doc}"),
    }
}

/// Thousands of generated faces, axes, incidences, polarizations and contacts, near-critical and
/// exactly critical angles included: the library agrees with the independent face solver
/// (`FACE_CASE=i` runs case i alone, after generating the ones before it).
#[test]
fn faces_at_any_angle_agree_with_an_independent_face_solver() {
    let mut r = Rng(0x5DEE_CE66_D1CE_4E5B);
    let mut tally = Tally::default();
    let mut biaxial = Tally::default();
    let mut failures = Vec::new();
    let only: Option<usize> = std::env::var("FACE_CASE").ok().and_then(|v| v.parse().ok());
    for i in 0..CASES {
        let Ok(setup) = generate(i, &mut r) else {
            tally.degenerate += 1;
            continue;
        };
        if only.is_some_and(|k| k != i) {
            continue;
        }
        if let Err(msg) = compare(&setup, true, &mut tally) {
            failures.push(format!("case {i} {msg}"));
        }
        // A share of the one-crystal and pair set-ups again with biaxial crystals in place of the
        // uniaxial ones (from a stream of their own, so the cases above stay as they were).
        let mut rb = Rng(0x9E37_79B9_7F4A_7C15 ^ (i as u64 + 1));
        if i % 6 < 4 && rb.chance(0.4) {
            let mut b = setup.clone();
            for e in &mut b.elems {
                e.biaxial = Some(Biaxial {
                    principal: [rb.range(1.4, 2.2), rb.range(1.4, 2.2), rb.range(1.4, 2.2)],
                    angles: (rb.range(0.0, 180.0), rb.range(-180.0, 180.0), rb.range(-180.0, 180.0)),
                });
            }
            b.family = "biaxial";
            if let Err(msg) = compare(&b, true, &mut biaxial) {
                failures.push(format!("case {i} (biaxial) {msg}"));
            }
        }
    }
    println!(
        "biaxial: {} cases compared ({} rays, {} with total internal reflection), {} near-degenerate skipped; worst differences: power/Stokes {:.1e}, direction {:.1e}, points {:.1e}",
        biaxial.cases,
        biaxial.compared_rays,
        biaxial.tir_cases,
        biaxial.degenerate,
        biaxial.worst_power,
        biaxial.worst_direction,
        biaxial.worst_point
    );
    tally.biaxial = biaxial.cases;
    println!(
        "{} uniaxial cases compared ({} rays, {} rejected groups, {} with total internal reflection, {} exactly critical paths checked for accounting only); {} refused by the contract, {} near-degenerate or unsolved skipped; worst differences: power/Stokes {:.1e}, direction {:.1e}, points {:.1e}",
        tally.cases,
        tally.compared_rays,
        tally.compared_rejected,
        tally.tir_cases,
        tally.critical_paths,
        tally.refused,
        tally.degenerate,
        tally.worst_power,
        tally.worst_direction,
        tally.worst_point
    );
    assert!(
        failures.is_empty(),
        "{} of {} cases disagree; first:\n{}",
        failures.len(),
        CASES,
        failures.iter().take(4).cloned().collect::<Vec<_>>().join("\n\n")
    );
    if only.is_none() {
        assert!(tally.refused + tally.degenerate < CASES / 20, "too few cases compared");
        assert!(tally.biaxial > CASES / 5, "too few biaxial cases ({})", tally.biaxial);
        assert!(
            tally.tir_cases > CASES / 20,
            "too few cases with total internal reflection"
        );
    }
}

/// A calcite-like crystal's back face at 45° to a normally incident beam totally reflects both
/// waves: the reflected power is split between the crystal's two reflected waves as the
/// reference splits it (the first finding of the module header, fixed).
#[test]
fn total_reflection_splits_between_the_reflected_waves_as_the_reference_does() {
    let mut tally = Tally::default();
    let split = Setup {
        n_out: 1.0,
        ideal: true,
        polar: 0.0,
        azimuth: 0.0,
        jones: [C::from(1.0), C::from(0.0)],
        screen: 0.0,
        elems: vec![Elem {
            biaxial: None,
            no: 1.6557,
            ne: 1.4849,
            axis: (45.0, 30.0),
            thickness: 5.0,
            front: (0.0, 0.0),
            back: (45.0, 0.0),
            aperture: 4.0,
            gap: 0.0,
            contact: Contact::Air,
        }],
        family: "total internal reflection into two waves",
        critical_path: None,
        near_delta: None,
    };
    compare(&split, true, &mut tally).unwrap();
}

/// Faces within 1e-8..1e-6 rad of critical into a vanishing air film (the last finding of the
/// module header): the rays that get through, and where, agree with the reference.
#[test]
fn grazing_rays_cross_a_vanishing_air_film_where_they_leave() {
    let mut tally = Tally::default();
    // 2. Faces within 1e-8..1e-6 rad of critical into a vanishing air film.
    let mut r = Rng(0x0DD_BA11);
    let mut film = Vec::new();
    for _ in 0..300 {
        let mut s = base(&mut r, "near critical into a vanishing air film");
        let face = random_face(&mut r, 30.0);
        pair(&mut r, &mut s, face);
        s.elems[1].contact = Contact::Air;
        s.elems[1].gap = 0.0;
        s.polar = r.range(0.0, 12.0);
        s.elems[0].front = random_face(&mut r, 8.0);
        s.elems[0].gap = 0.0;
        let delta = r.sign() * r.log_range(-8.0, -6.0);
        if matches!(make_critical(&mut r, &mut s, delta, true), Ok(true))
            && let Err(msg) = compare(&s, false, &mut tally)
        {
            film.push(msg);
        }
    }
    assert!(
        film.is_empty(),
        "vanishing air film: {} cases disagree, first: {:?}",
        film.len(),
        film.first()
    );
}
