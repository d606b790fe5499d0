//! The planned whole trace in lanes: [`LANES`] incidences of one plan traced side by side, each
//! number of the scalar planned trace ([`crate::optics::planned_trace`]) held as one f64 per
//! incidence, so that the compiler turns every operation into one vector instruction.
//!
//! Physics: the planned trace's (its header), but for one step: a face's transmission comes from
//! the forward waves on its two sides alone, by their power orthogonality ([`transmission`]: a
//! 2×2 inverse), where the scalar trace also makes the two reflected waves and eliminates a 4×4
//! system. The same T in exact arithmetic; the reflected waves, their fields and the 4×4
//! elimination took two fifths of the lanes' time (10⁵ traces of the two-wedge splitter on one
//! thread, fastest of 15 in three interleaved pairs at load 2.8–4.4: 46–50 ms with them, 27–29 ms
//! without, the same checksum).
//!
//! Rounding: the wave vectors, hence every direction and every decision to decline, operation
//! for operation as the scalar trace rounds them; the fields, transmissions and amplitudes
//! (which only powers read) with fewer divisions and square roots, the slowest vector
//! instructions: products by one reciprocal where the scalar trace divides each component, the
//! 2×2 inverse for the 4×4 elimination, the ordinary field q × c without its rounding-sized part
//! along q. They agree with the scalar trace to rounding (10⁻¹⁵; tests hold them to
//! [`crate::precision::PLANNED_TRACE_AGREEMENT`]), and rays come out in its order. The lanes
//! decline every incidence the scalar trace declines (the reflected waves' wave vectors are still
//! tested as it tests them) and, in principle, a nearly singular face that it would solve.
//! Every branch of the scalar trace that depends on the numbers becomes a per-lane choice: the
//! root of the extraordinary quadratic taken without cancellation, a mode's scale, the sign that
//! matches a ray to its incident mode, the polar factor's rank-one case. What the structure of
//! the plan fixes (which bodies meet at a face, which mode a ray is in, how many rays there are)
//! is the same in every lane and stays a branch.
//!
//! What is left to the scalar trace. A lane is marked and traced again by
//! [`PlannedTrace::trace`] (which may in turn decline it to the general tracer) when anything
//! would make the scalar trace leave its straight path: a mode evanescent or within
//! [`PLANNED_CRITICAL_MARGIN`] of it, a wave along an optic axis, a singular boundary problem,
//! and also a ray that misses a plane or an aperture (the scalar trace drops that ray and keeps
//! the others; the lanes keep only incidences where every ray goes through). So the lanes give
//! the rays of the scalar trace for the incidences they keep, in the same order, to rounding.
//!
//! Rust does not fuse a product and a sum unless asked (no `mul_add` here), and IEEE division and
//! square root are correctly rounded on every instruction set: the kernel compiled for AVX2 or
//! AVX-512 ([`trace_lanes`] picks one at run time) and the portable build give the same bits.
//! Eight lanes rather than four: one AVX-512 register per number took about a tenth less time
//! than one AVX2 register on this kind of processor, and sixteen (two registers) no less.

use crate::optics::geometry::Plane;
use crate::optics::planned_trace::{Crossing, Entry, Local, PlannedRay, PlannedTrace};
use crate::optics::stack::Aperture;
use crate::precision::{DEGENERATE_DIRECTION, ON_PLANE, PLANNED_CRITICAL_MARGIN};
use nalgebra::{Matrix3, Vector3};
use std::ops::{Add, Div, Mul, Neg, Sub};

/// Incidences per block: eight f64 fill one AVX-512 register (two AVX2 registers).
pub const LANES: usize = 8;

/// One number per lane.
#[derive(Debug, Clone, Copy)]
pub(crate) struct F(pub [f64; LANES]);

/// A yes or no per lane.
type Mask = [bool; LANES];

/// `[f(0), f(1), …]` by a plain loop, which is inlined into the vector builds (the standard
/// arrays' `map` and `from_fn` stayed calls, compiled without the vector instructions).
#[inline(always)]
fn lanes<T: Copy + Default>(f: impl Fn(usize) -> T) -> [T; LANES] {
    let mut out = [T::default(); LANES];
    for (i, o) in out.iter_mut().enumerate() {
        *o = f(i);
    }
    out
}

macro_rules! lanewise {
    ($trait:ident, $method:ident, $op:tt) => {
        impl $trait for F {
            type Output = F;
            #[inline(always)]
            fn $method(self, o: F) -> F {
                F(lanes(|i| self.0[i] $op o.0[i]))
            }
        }
        impl $trait<f64> for F {
            type Output = F;
            #[inline(always)]
            fn $method(self, o: f64) -> F {
                F(lanes(|i| self.0[i] $op o))
            }
        }
    };
}
lanewise!(Add, add, +);
lanewise!(Sub, sub, -);
lanewise!(Mul, mul, *);
lanewise!(Div, div, /);

impl Neg for F {
    type Output = F;
    #[inline(always)]
    fn neg(self) -> F {
        F(lanes(|i| -self.0[i]))
    }
}

impl F {
    #[inline(always)]
    fn splat(x: f64) -> F {
        F([x; LANES])
    }
    #[inline(always)]
    fn map(self, f: impl Fn(f64) -> f64) -> F {
        F(lanes(|i| f(self.0[i])))
    }
    #[inline(always)]
    fn sqrt(self) -> F {
        self.map(f64::sqrt)
    }
    #[inline(always)]
    fn abs(self) -> F {
        self.map(f64::abs)
    }
    #[inline(always)]
    fn test(self, o: F, f: impl Fn(f64, f64) -> bool) -> Mask {
        lanes(|i| f(self.0[i], o.0[i]))
    }
    /// `a` where `m` holds, else `b`.
    #[inline(always)]
    fn pick(m: Mask, a: F, b: F) -> F {
        F(lanes(|i| if m[i] { a.0[i] } else { b.0[i] }))
    }
}

/// `x.is_finite()` as a floating-point test, x − x = 0 (NaN for ±∞ and NaN), which stays a
/// vector subtraction and comparison: `is_finite`, an integer test of the bits, was compiled
/// lane by lane in scalar registers.
// The same operand on purpose: x − x is 0 exactly when x is finite.
#[allow(clippy::eq_op)]
#[inline(always)]
fn finite(x: f64) -> bool {
    x - x == 0.0
}

#[inline(always)]
fn and(a: Mask, b: Mask) -> Mask {
    lanes(|i| a[i] & b[i])
}

/// A vector per lane.
#[derive(Debug, Clone, Copy)]
struct V {
    x: F,
    y: F,
    z: F,
}

impl V {
    #[inline(always)]
    fn splat(v: &Vector3<f64>) -> V {
        V {
            x: F::splat(v.x),
            y: F::splat(v.y),
            z: F::splat(v.z),
        }
    }
    #[inline(always)]
    fn dot(&self, o: &V) -> F {
        self.x * o.x + self.y * o.y + self.z * o.z
    }
    #[inline(always)]
    fn cross(&self, o: &V) -> V {
        V {
            x: self.y * o.z - self.z * o.y,
            y: self.z * o.x - self.x * o.z,
            z: self.x * o.y - self.y * o.x,
        }
    }
    #[inline(always)]
    fn norm(&self) -> F {
        self.dot(self).sqrt()
    }
    #[inline(always)]
    fn scale(&self, s: F) -> V {
        V {
            x: self.x * s,
            y: self.y * s,
            z: self.z * s,
        }
    }
    #[inline(always)]
    fn over(&self, s: F) -> V {
        V {
            x: self.x / s,
            y: self.y / s,
            z: self.z / s,
        }
    }
    #[inline(always)]
    fn sub(&self, o: &V) -> V {
        V {
            x: self.x - o.x,
            y: self.y - o.y,
            z: self.z - o.z,
        }
    }
    #[inline(always)]
    fn add(&self, o: &V) -> V {
        V {
            x: self.x + o.x,
            y: self.y + o.y,
            z: self.z + o.z,
        }
    }
    /// m·v, summed as nalgebra sums it.
    #[inline(always)]
    fn rotated(&self, m: &Matrix3<f64>) -> V {
        let row = |i: usize| self.x * m[(i, 0)] + self.y * m[(i, 1)] + self.z * m[(i, 2)];
        V {
            x: row(0),
            y: row(1),
            z: row(2),
        }
    }
    #[inline(always)]
    fn lane(&self, i: usize) -> Vector3<f64> {
        Vector3::new(self.x.0[i], self.y.0[i], self.z.0[i])
    }
}

/// [`crate::optics::modes::beam_basis`] per lane.
#[inline(always)]
fn beam_basis(u: &V) -> (V, V) {
    // Fields only (module header): products by one reciprocal.
    let r = F::splat(1.0) / (u.z + 1.0);
    let one = F::splat(1.0);
    let xy = -u.x * u.y * r;
    (
        V {
            x: one - u.x * u.x * r,
            y: xy,
            z: -u.x,
        },
        V {
            x: xy,
            y: one - u.y * u.y * r,
            z: -u.y,
        },
    )
}

/// A propagating mode per lane (the scalar trace's `Wave`).
#[derive(Debug, Clone, Copy)]
struct Wave {
    q: V,
    e: V,
    h: V,
    ray: V,
}

#[inline(always)]
fn wave(q: V, e: V, ray: V, rays: bool) -> Wave {
    let h = q.cross(&e);
    let sz = (e.x * h.y - e.y * h.x).abs();
    let zero = F::splat(0.0);
    let scale = F::pick(sz.test(zero, |a, b| a > b), F::splat(1.0) / sz.sqrt(), F::splat(1.0));
    Wave {
        q,
        e: e.scale(scale),
        h: h.scale(scale),
        ray: if rays {
            ray.scale(F::splat(1.0) / ray.norm())
        } else {
            ray
        },
    }
}

/// √x where the wave is safely propagating; `ok` loses the lanes where it is not.
#[inline(always)]
fn propagating_root(x: F, scale: f64, ok: &mut Mask) -> F {
    *ok = and(*ok, x.test(F::splat(PLANNED_CRITICAL_MARGIN * scale), |a, b| a > b));
    x.sqrt()
}

/// The forward waves of the scalar trace's `modes` per lane. The backward ones are not made (the
/// boundary problem is solved without them, [`transmission`]); `backward` keeps the scalar
/// trace's tests of their wave vectors, so that the lanes decline what it declines.
#[inline(always)]
fn modes(body: &Local, qt: [F; 2], backward: bool, rays: bool, ok: &mut Mask) -> [Wave; 2] {
    let qt_norm = (qt[0] * qt[0] + qt[1] * qt[1]).sqrt();
    match body {
        Local::Isotropic(n) => {
            let n = *n;
            let nn = F::splat(n);
            let qz = propagating_root((nn - qt_norm) * (qt_norm + n), n * n, ok);
            let q = V {
                x: qt[0],
                y: qt[1],
                z: qz,
            };
            let (e1, e2) = beam_basis(&q.scale(F::splat(1.0 / n)));
            // Both waves run along q: its unit vector made once.
            let ray = if rays { q.over(q.norm()) } else { q };
            // (The backward waves of an isotropic body meet no test of their own.)
            let _ = backward;
            [wave(q, e1, ray, false), wave(q, e2, ray, false)]
        }
        Local::Uniaxial(crystal, surfaces) => {
            let no = crystal.indices.no;
            let m = &surfaces.surface;
            let qz_o = propagating_root((F::splat(no) - qt_norm) * (qt_norm + no), no * no, ok);
            let a = m[(2, 2)];
            let b = qt[0] * m[(2, 0)] + qt[1] * m[(2, 1)];
            // The scalar sum's products, in its order (m₀₀ q_x) q_x + ((2 m₀₁) q_x) q_y + (m₁₁ q_y) q_y.
            let c0 = qt[0] * m[(0, 0)] * qt[0] + qt[0] * (2.0 * m[(0, 1)]) * qt[1] + qt[1] * m[(1, 1)] * qt[1] - 1.0;
            let ac0 = c0 * a;
            let disc = b * b - ac0;
            *ok = and(
                *ok,
                disc.test((b * b + ac0.abs()) * PLANNED_CRITICAL_MARGIN, |d, t| d > t),
            );
            let r = disc.sqrt();
            let c = V::splat(&crystal.axis.unit());
            let along = |z: F| V { x: qt[0], y: qt[1], z };
            if backward {
                transverse_ordinary(&along(-qz_o), &c, ok);
                transverse_ordinary(&along(e_root(a, b, c0, r, -1.0)), &c, ok);
            }
            crystal_pair(&c, surfaces, along(qz_o), along(e_root(a, b, c0, r, 1.0)), rays, ok)
        }
    }
}

/// The extraordinary root (−b + s·r)/a of a q_z² + 2 b q_z + c0 = 0 (r² = b² − a c0), computed
/// without cancellation: one quotient per lane.
#[inline(always)]
fn e_root(a: f64, b: F, c0: F, r: F, s: f64) -> F {
    let plain = (b * s).test(F::splat(0.0), |x, z| x <= z);
    let num = F::pick(plain, -b + r * s, c0);
    let den = F::pick(plain, F::splat(a), -b - r * s);
    num / den
}

/// The ordinary D ∥ q × c; `ok` loses the lanes where q runs along c. (The scalar trace also
/// removes its component along q, which is rounding: a field, module header.)
#[inline(always)]
fn transverse_ordinary(q: &V, c: &V, ok: &mut Mask) -> V {
    let d = q.cross(c);
    let qq = q.dot(q);
    *ok = and(
        *ok,
        d.dot(&d)
            .test(qq * (DEGENERATE_DIRECTION * DEGENERATE_DIRECTION), |a, b| a > b),
    );
    d
}

/// The scalar trace's `crystal_pair` per lane.
#[inline(always)]
fn crystal_pair(
    c: &V,
    surfaces: &crate::optics::modes::CrystalSurfaces,
    q_o: V,
    q_e: V,
    rays: bool,
    ok: &mut Mask,
) -> [Wave; 2] {
    let inv_eps = &surfaces.inverse_permittivity;
    let d_o = transverse_ordinary(&q_o, c, ok);
    let d_e = transverse_ordinary(&q_e, c, ok).cross(&q_e);
    [
        wave(q_o, d_o.rotated(inv_eps), q_o, rays),
        wave(
            q_e,
            d_e.rotated(inv_eps),
            if rays { q_e.rotated(&surfaces.surface) } else { q_e },
            rays,
        ),
    ]
}

/// The transmission T of a face (`T[j][k]`: the amplitude of the transmitted wave `j` for unit
/// amplitude of the incident wave `k`) from the forward waves on its two sides, `from` and `into`,
/// by the flux form instead of the scalar trace's 4×4 elimination.
///
/// Formula. With ⟨a, b⟩ = ẑ·(E_a × H_b + E_b × H_a) (tangential fields, face frame), waves of one
/// lossless medium at one tangential wave vector with different q_z are orthogonal, ⟨a, b⟩ = 0 (the
/// boundary problem's 4×4 system matrix for a real symmetric permittivity is self-adjoint under
/// this form: Berreman, J. Opt. Soc. Am. 62, 502 (1972); P. Yeh, *Optical Waves in Layered
/// Media*, 1988, ch. 9, for the power orthogonality of modes), and ⟨a, a⟩ = 2 for a forward wave
/// of unit power flux. Applied to the boundary condition a_k + Σ r_jk a′_j = Σ t_jk b_j (a′: the
/// reflected waves), ⟨a_i, ·⟩ leaves G t = 2 I with G_ij = ⟨a_i, b_j⟩, so T = 2 G⁻¹: two forward
/// waves per side and a 2×2 inverse, where the scalar trace makes the two reflected waves too and
/// eliminates a 4×4 system (in exact arithmetic the same T; here to rounding, 10⁻¹⁵).
///
/// `ok` loses the lanes where det G is not finite or within 10⁻¹² of zero relative to |G|²: the
/// system is then singular or nearly so, as where the scalar elimination meets a zero pivot. A
/// passive face keeps |t| ≤ 1 in these units, so |G⁻¹| ≤ ½ and a propagating face never comes near.
#[inline(always)]
fn transmission(from: &[Wave; 2], into: &[Wave; 2], ok: &mut Mask) -> M2 {
    let form = |a: &Wave, b: &Wave| a.e.x * b.h.y - a.e.y * b.h.x + (b.e.x * a.h.y - b.e.y * a.h.x);
    let g = [
        [form(&from[0], &into[0]), form(&from[0], &into[1])],
        [form(&from[1], &into[0]), form(&from[1], &into[1])],
    ];
    let det = g[0][0] * g[1][1] - g[0][1] * g[1][0];
    let size = norm2(&g);
    *ok = and(
        *ok,
        lanes(|i| finite(det.0[i]) & (det.0[i].abs() > 1e-12 * size.0[i] * size.0[i])),
    );
    let s = F::splat(2.0) / det;
    [[g[1][1] * s, -g[0][1] * s], [-g[1][0] * s, g[0][0] * s]]
}

/// A real 2×2 matrix per lane, rows first.
type M2 = [[F; 2]; 2];

/// Frobenius norm, summed in nalgebra's (column) order.
#[inline(always)]
fn norm2(t: &M2) -> F {
    (t[0][0] * t[0][0] + t[1][0] * t[1][0] + t[0][1] * t[0][1] + t[1][1] * t[1][1]).sqrt()
}

/// The scalar trace's `lossless_part` per lane.
#[inline(always)]
fn lossless_part(t: &M2) -> M2 {
    let norm = norm2(t);
    let zero = F::splat(0.0);
    let usable: Mask = lanes(|i| {
        let n = norm.0[i];
        // Neither NaN, nor ≤ 0, nor infinite.
        (n > 0.0) & finite(n)
    });
    let r = norm / (norm * norm);
    let t = [[t[0][0] * r, t[0][1] * r], [t[1][0] * r, t[1][1] * r]];
    let det = t[0][0] * t[1][1] - t[0][1] * t[1][0];
    let rank_one = det.abs().test(F::splat(1e-14), |a, b| a <= b);
    let k = (det.abs() * det) / (det * det);
    let m = [
        [t[0][0] + t[1][1] * k, t[0][1] + (-t[1][0]) * k],
        [t[1][0] + (-t[0][1]) * k, t[1][1] + t[0][0] * k],
    ];
    let s = F::splat(2f64.sqrt()) / norm2(&m);
    let entry = |r: usize, c: usize| F::pick(usable, F::pick(rank_one, t[r][c], m[r][c] * s), zero);
    [[entry(0, 0), entry(0, 1)], [entry(1, 0), entry(1, 1)]]
}

/// `e`/|e| per lane, as the scalar trace's `unit_field`.
#[inline(always)]
fn unit_field(e: &V) -> V {
    let n = e.norm();
    let r = n / (n * n);
    let has = n.test(F::splat(0.0), |a, b| a > b);
    let f = |z: F| F::pick(has, z * r, z);
    V {
        x: f(e.x),
        y: f(e.y),
        z: f(e.z),
    }
}

/// Where a ray's light is, per lane (the scalar trace's `Carrier`); the kind of a ray's mode is
/// the plan's, the same in every lane.
// Made and copied by value at every crossing, in buffers kept between blocks: boxing the larger
// variant would add an allocation per ray and crossing.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy)]
enum Carrier {
    Free {
        n: f64,
        u: V,
        m: M2,
    },
    Bound {
        q: V,
        ray: V,
        e: V,
        kind: usize,
        amp: [F; 2],
    },
}

impl Carrier {
    #[inline(always)]
    fn q(&self) -> V {
        match self {
            Carrier::Free { n, u, .. } => u.scale(F::splat(*n)),
            Carrier::Bound { q, .. } => *q,
        }
    }
    #[inline(always)]
    fn direction(&self) -> V {
        match self {
            Carrier::Free { u, .. } | Carrier::Bound { ray: u, .. } => *u,
        }
    }
}

/// A ray in flight per lane.
#[derive(Debug, Clone, Copy)]
struct Flight {
    at: V,
    exit: V,
    carrier: Carrier,
    label: u32,
}

/// The scalar trace's `cross` per lane: the rays beyond the face (one into an isotropic body,
/// one per mode into a crystal); `ok` loses the lanes the scalar trace would decline.
///
/// One copy per instruction set, called (not inlined) from each crossing of the plan: inlined,
/// a block's five kinds of crossing made a kernel too large for the instruction cache.
#[inline(always)]
fn cross_with(carrier: &Carrier, crossing: &Crossing, ideal: bool, ok: &mut Mask) -> [Option<Carrier>; 2] {
    let frame = &crossing.frame.frame;
    let q_face = carrier.q().rotated(&crossing.frame.to_face);
    let qt = [q_face.x, q_face.y];
    let a_fwd = modes(&crossing.from, qt, true, false, ok);
    let b_fwd = modes(&crossing.into, qt, false, true, ok);
    let zero = F::splat(0.0);
    let mut a_in = [[zero; 2]; 2];
    match carrier {
        Carrier::Free { u, m, .. } => {
            let (e1, e2) = beam_basis(u);
            for (j, mode) in a_fwd.iter().enumerate() {
                let ej = unit_field(&mode.e.rotated(frame));
                let p = [ej.dot(&e1), ej.dot(&e2)];
                for c in 0..2 {
                    a_in[j][c] = p[0] * m[0][c] + p[1] * m[1][c];
                }
            }
        }
        Carrier::Bound { e, kind, amp, .. } => {
            let apart = a_fwd[0].q.sub(&a_fwd[1].q).norm();
            *ok = and(*ok, apart.test(F::splat(DEGENERATE_DIRECTION), |a, b| a > b));
            let p = a_fwd[*kind].e.rotated(frame).dot(e);
            // ±amp by the sign of p, nothing where p = 0 (a choice per lane, not a branch).
            let (plus, minus) = (p.test(zero, |a, b| a > b), p.test(zero, |a, b| a < b));
            for c in 0..2 {
                a_in[*kind][c] = F::pick(plus, amp[c], F::pick(minus, -amp[c], zero));
            }
        }
    }
    let t = transmission(&a_fwd, &b_fwd, ok);
    let t = if ideal { lossless_part(&t) } else { t };
    let entry = |k: usize, c: usize| t[k][0] * a_in[0][c] + t[k][1] * a_in[1][c];
    let out: M2 = [[entry(0, 0), entry(0, 1)], [entry(1, 0), entry(1, 1)]];
    match crossing.into {
        Local::Isotropic(n) => {
            let u = b_fwd[0].ray.rotated(frame);
            let (e1, e2) = beam_basis(&u);
            let mut m = [[zero; 2]; 2];
            for (k, w) in b_fwd.iter().enumerate() {
                let ek = unit_field(&w.e.rotated(frame));
                let d = [e1.dot(&ek), e2.dot(&ek)];
                for i in 0..2 {
                    for c in 0..2 {
                        m[i][c] = m[i][c] + d[i] * out[k][c];
                    }
                }
            }
            [Some(Carrier::Free { n, u, m }), None]
        }
        Local::Uniaxial(..) => [
            Some(bound(&b_fwd[0], frame, 0, out[0])),
            Some(bound(&b_fwd[1], frame, 1, out[1])),
        ],
    }
}

/// A ray in mode `kind` of the wave `w` (face frame `frame`), of amplitudes `amp`.
#[inline(always)]
fn bound(w: &Wave, frame: &Matrix3<f64>, kind: usize, amp: [F; 2]) -> Carrier {
    Carrier::Bound {
        q: w.q.rotated(frame),
        ray: w.ray.rotated(frame),
        e: w.e.rotated(frame),
        kind,
        amp,
    }
}

/// [`Plane::meet`] per lane, the ray moved there; `ok` loses the lanes where it cannot get there.
#[inline(always)]
fn travel(f: &mut Flight, plane: &Plane, ok: &mut Mask) {
    let dir = f.carrier.direction();
    let to = V::splat(&plane.point).sub(&f.at);
    let n = V::splat(&plane.normal);
    let gap = n.dot(&to);
    let scale = to.norm() + 1.0;
    let on = gap.abs().test(scale * ON_PLANE, |a, b| a <= b);
    let along = n.dot(&dir);
    let s = gap / along;
    // (`|` and `&`, not `||` and `&&`: no branch per lane.)
    let ahead: Mask = lanes(|i| on[i] | ((along.0[i].abs() >= 1e-15) & (s.0[i] >= -ON_PLANE * scale.0[i])));
    *ok = and(*ok, ahead);
    let s = F::pick(on, F::splat(0.0), s.map(|s| s.max(0.0)));
    f.at = f.at.add(&dir.scale(s));
}

/// [`Aperture::holds`] per lane.
#[inline(always)]
fn holds(aperture: &Option<Aperture>, at: &V, ok: &mut Mask) {
    if let Some(a) = aperture {
        let d = at.sub(&V::splat(&a.centre));
        let axis = V::splat(&a.axis);
        let off = d.sub(&axis.scale(d.dot(&axis)));
        *ok = and(
            *ok,
            off.norm().test(F::splat(a.radius_mm * (1.0 + 1e-12)), |a, b| a <= b),
        );
    }
}

/// Buffers of a lane trace, kept between blocks, and the last block's rays.
#[derive(Debug, Clone)]
pub(crate) struct LaneBuffers {
    flights: Vec<Flight>,
    next: Vec<Flight>,
    pub(crate) rays: Box<LaneRays>,
}

impl Default for LaneBuffers {
    fn default() -> LaneBuffers {
        LaneBuffers {
            flights: Vec::new(),
            next: Vec::new(),
            rays: Box::new(LaneRays {
                ok: [false; LANES],
                count: 0,
                label: [0; 64],
                power: [[0.0; LANES]; 64],
                direction: [[Vector3::zeros(); LANES]; 64],
                exit: [[Vector3::zeros(); LANES]; 64],
            }),
        }
    }
}

/// The rays of one block: per ray (in the scalar trace's order) its label, and per lane its
/// power, direction and exit point; `ok` marks the lanes traced here.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LaneRays {
    pub ok: Mask,
    pub count: usize,
    pub label: [u32; 64],
    pub power: [[f64; LANES]; 64],
    pub direction: [[Vector3<f64>; LANES]; 64],
    pub exit: [[Vector3<f64>; LANES]; 64],
}

/// Traces one block of incidences `dirs` (unit, u_z > 0) through `plan`.
#[inline(always)]
fn trace_block<const ISA: u8>(plan: &PlannedTrace, buffers: &mut LaneBuffers, dirs: &[Vector3<f64>; LANES]) {
    let mut ok = [true; LANES];
    let ideal = plan.ideal();
    let identity = [[F::splat(1.0), F::splat(0.0)], [F::splat(0.0), F::splat(1.0)]];
    let LaneBuffers {
        flights,
        next,
        rays: out,
    } = buffers;
    flights.clear();
    flights.push(Flight {
        at: V::splat(&Vector3::zeros()),
        exit: V::splat(&Vector3::zeros()),
        carrier: Carrier::Free {
            n: plan.outside(),
            u: V {
                x: F(lanes(|i| dirs[i].x)),
                y: F(lanes(|i| dirs[i].y)),
                z: F(lanes(|i| dirs[i].z)),
            },
            m: identity,
        },
        label: 0,
    });
    for slab in plan.slabs() {
        next.clear();
        for f in flights.iter() {
            let mut f = *f;
            let entered = match &slab.entry {
                Entry::Outside(crossing) => {
                    travel(&mut f, &slab.front, &mut ok);
                    holds(&slab.aperture, &f.at, &mut ok);
                    cross::<ISA>(&f.carrier, crossing, ideal, &mut ok)
                }
                Entry::Contact(first, None) => cross::<ISA>(&f.carrier, first, ideal, &mut ok),
                Entry::Contact(first, Some(second)) => {
                    let [Some(in_film), None] = cross::<ISA>(&f.carrier, first, ideal, &mut ok) else {
                        return out.ok = [false; LANES];
                    };
                    cross::<ISA>(&in_film, second, ideal, &mut ok)
                }
            };
            for (k, carrier) in entered.into_iter().enumerate() {
                let Some(carrier) = carrier else { continue };
                let mut g = Flight {
                    exit: f.at,
                    carrier,
                    label: (f.label << 1) | k as u32,
                    ..f
                };
                travel(&mut g, &slab.back, &mut ok);
                holds(&slab.aperture, &g.at, &mut ok);
                match &slab.exit {
                    Some(exit) => {
                        let [Some(c), None] = cross::<ISA>(&g.carrier, exit, ideal, &mut ok) else {
                            return out.ok = [false; LANES];
                        };
                        next.push(Flight {
                            exit: g.at,
                            carrier: c,
                            ..g
                        });
                    }
                    None => next.push(g),
                }
            }
        }
        std::mem::swap(flights, next);
    }
    let [c11, c22, c12] = plan.coherency();
    let screen = plan.screen().normal;
    out.count = 0;
    for f in flights.iter() {
        let Carrier::Free { u, m, .. } = f.carrier else {
            continue;
        };
        let along = V::splat(&screen).dot(&u);
        ok = and(ok, along.abs().test(F::splat(1e-15), |a, b| a >= b));
        let term = |i: usize| {
            let (a, b) = (m[i][0], m[i][1]);
            a * a * c11 + b * b * c22 + a * b * 2.0 * c12
        };
        let power = term(0) + term(1);
        let r = out.count;
        out.label[r] = f.label;
        out.power[r] = power.0;
        out.direction[r] = std::array::from_fn(|i| u.lane(i));
        out.exit[r] = std::array::from_fn(|i| f.exit.lane(i));
        out.count += 1;
    }
    out.ok = ok;
}

/// The builds of the kernel, by instruction set (a const parameter of [`trace_block`]).
const PORTABLE: u8 = 0;
const AVX2: u8 = 1;
const AVX512: u8 = 2;

/// [`cross_with`] compiled for AVX2 (and FMA, which it leaves unused: no product is fused).
///
/// # Safety
/// The processor must have AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
#[inline(never)]
unsafe fn cross_avx2(carrier: &Carrier, crossing: &Crossing, ideal: bool, ok: &mut Mask) -> [Option<Carrier>; 2] {
    cross_with(carrier, crossing, ideal, ok)
}

/// [`cross_with`] compiled for AVX-512 (one register per lane number).
///
/// # Safety
/// The processor must have AVX-512 F, DQ and VL.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx512dq,avx512vl,avx2,fma")]
#[inline(never)]
unsafe fn cross_avx512(carrier: &Carrier, crossing: &Crossing, ideal: bool, ok: &mut Mask) -> [Option<Carrier>; 2] {
    cross_with(carrier, crossing, ideal, ok)
}

/// [`cross_with`] as the target's baseline instructions compile it.
#[inline(never)]
fn cross_portable(carrier: &Carrier, crossing: &Crossing, ideal: bool, ok: &mut Mask) -> [Option<Carrier>; 2] {
    cross_with(carrier, crossing, ideal, ok)
}

/// One crossing by the build `ISA` of the kernel that calls it.
#[inline(always)]
fn cross<const ISA: u8>(carrier: &Carrier, crossing: &Crossing, ideal: bool, ok: &mut Mask) -> [Option<Carrier>; 2] {
    // SAFETY (both calls): a kernel of build `ISA` runs only after `trace_lanes` has found its
    // instruction sets on the processor, the one requirement of the crossing of that build.
    #[cfg(target_arch = "x86_64")]
    match ISA {
        AVX512 => return unsafe { cross_avx512(carrier, crossing, ideal, ok) },
        AVX2 => return unsafe { cross_avx2(carrier, crossing, ideal, ok) },
        _ => {}
    }
    cross_portable(carrier, crossing, ideal, ok)
}

/// [`trace_block`] compiled for AVX2.
///
/// # Safety
/// The processor must have AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
unsafe fn trace_block_avx2(plan: &PlannedTrace, buffers: &mut LaneBuffers, dirs: &[Vector3<f64>; LANES]) {
    trace_block::<AVX2>(plan, buffers, dirs)
}

/// [`trace_block`] compiled for AVX-512.
///
/// # Safety
/// The processor must have AVX-512 F, DQ and VL.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx512dq,avx512vl,avx2,fma")]
unsafe fn trace_block_avx512(plan: &PlannedTrace, buffers: &mut LaneBuffers, dirs: &[Vector3<f64>; LANES]) {
    trace_block::<AVX512>(plan, buffers, dirs)
}

/// Which build of the lane kernel traces the blocks: all give the same bits (module header).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LaneBuild {
    /// The widest the processor runs: AVX-512, else AVX2 with FMA, else the portable one.
    Widest,
    /// AVX2 with FMA where the processor has them, else the portable one.
    Avx2,
    /// The target's baseline instructions.
    Portable,
}

/// A planned trace with the buffers its blocks reuse: traces many incidences, [`LANES`] side by
/// side, and hands a lane the block cannot finish to [`PlannedTrace::trace`].
pub struct BlockedTrace {
    plan: PlannedTrace,
    lanes: LaneBuffers,
    build: LaneBuild,
    rays: Vec<PlannedRay>,
}

impl BlockedTrace {
    /// Blocks of `plan`'s trace, by the widest build this processor has.
    pub fn new(plan: PlannedTrace) -> BlockedTrace {
        BlockedTrace {
            plan,
            lanes: LaneBuffers::default(),
            build: LaneBuild::Widest,
            rays: Vec::new(),
        }
    }

    /// The plan, to trace one incidence alone.
    pub fn plan(&mut self) -> &mut PlannedTrace {
        &mut self.plan
    }

    /// Which build of the lane kernel [`BlockedTrace::trace_each`] uses ([`LaneBuild::Widest`]
    /// unless set): all give the same bits (module header); tests compare them.
    pub fn use_lane_build(&mut self, build: LaneBuild) {
        self.build = build;
    }

    /// Traces every incidence of `dirs` (unit directions, u_z > 0) and hands each one's rays to
    /// `each` in order, with its index: what [`PlannedTrace::trace`] gives for it, `None` where
    /// the plan declines it (the caller then traces it with the general tracer). Incidences go
    /// through in blocks of [`LANES`] side by side; a lane the block cannot take to its end is
    /// traced again by [`PlannedTrace::trace`] alone (`each`'s third argument true). Returns how
    /// many were traced so, declined ones included.
    pub fn trace_each(
        &mut self,
        dirs: &[Vector3<f64>],
        mut each: impl FnMut(usize, Option<&[PlannedRay]>, bool),
    ) -> usize {
        let mut alone = 0;
        for (b, chunk) in dirs.chunks(LANES).enumerate() {
            // A short last block repeats its last incidence; the repeats are not handed on.
            let block: [Vector3<f64>; LANES] = std::array::from_fn(|i| chunk[i.min(chunk.len() - 1)]);
            trace_lanes(&self.plan, &mut self.lanes, &block, self.build);
            for (i, &u) in chunk.iter().enumerate() {
                if self.lanes.rays.ok[i] {
                    lane_rays(&self.lanes.rays, i, &mut self.rays);
                    each(b * LANES + i, Some(&self.rays), false);
                } else {
                    alone += 1;
                    each(b * LANES + i, self.plan.trace(u), true);
                }
            }
        }
        alone
    }
}

/// Traces one block of [`LANES`] incidences by `build`; `buffers.rays.ok` marks the lanes taken
/// to their end.
pub(crate) fn trace_lanes(
    plan: &PlannedTrace,
    buffers: &mut LaneBuffers,
    dirs: &[Vector3<f64>; LANES],
    build: LaneBuild,
) {
    #[cfg(target_arch = "x86_64")]
    {
        use std::arch::is_x86_feature_detected as has;
        let avx2 = build != LaneBuild::Portable && has!("avx2") && has!("fma");
        if build == LaneBuild::Widest && avx2 && has!("avx512f") && has!("avx512dq") && has!("avx512vl") {
            // SAFETY: the processor has just been found to have every instruction set that
            // `trace_block_avx512` is compiled for, its one requirement.
            return unsafe { trace_block_avx512(plan, buffers, dirs) };
        }
        if avx2 {
            // SAFETY: as above, for `trace_block_avx2`.
            return unsafe { trace_block_avx2(plan, buffers, dirs) };
        }
    }
    let _ = build;
    trace_block::<PORTABLE>(plan, buffers, dirs)
}

/// The rays of lane `lane` of a block, as [`PlannedTrace::trace`] lists them, into `into`.
pub(crate) fn lane_rays(rays: &LaneRays, lane: usize, into: &mut Vec<PlannedRay>) {
    into.clear();
    into.extend((0..rays.count).map(|r| PlannedRay {
        label: rays.label[r],
        power: rays.power[r][lane],
        direction: rays.direction[r][lane],
        exit_point_mm: rays.exit[r][lane],
    }));
}
