//! The planned whole trace: one stack of uniaxial crystals with faces at any angle, traced at many
//! incidences with real numbers, giving what the general tracer ([`crate::optics::planar`]) gives
//! for each ray that leaves forward (its power, direction and exit point), to rounding.
//!
//! Physics: exactly the general tracer's (its header; CONVENTIONS.md, version 2). At each face,
//! in the face's own frame, the tangential wave vector is kept; the modes on both sides are the
//! closed forms of [`crate::optics::modes`] (isotropic; ordinary q_z² = n_o² − |q_t|²;
//! extraordinary q·A·q = 1 with A = I/n_e² + (1/n_o² − 1/n_e²) c cᵀ, Born & Wolf, *Principles of
//! Optics*, 7th ed., §15.2–15.3), each scaled to unit power flux across the face; the 4×4
//! boundary problem (E_x, E_y, Z0 H_x, Z0 H_y continuous; P. Yeh, *Optical Waves in Layered
//! Media*, 1988, ch. 9; D. W. Berreman, J. Opt. Soc. Am. 62, 502 (1972)) gives the transmission T,
//! here by the power orthogonality of the waves on each side ([`transmission`]: the two forward
//! waves of each side and a 2×2 inverse, without the reflected waves and the 4×4 elimination of
//! the general tracer, which took two fifths of the time), of which ideal faces take the unitary polar factor (K. Fan and A. J. Hoffman, Proc. AMS 6, 111
//! (1955); [`crate::optics::interface::lossless_part`]) and uncoated faces T itself. Rays follow
//! their Poynting direction from face to face; apertures, contacts (outside medium, cement
//! film, direct) and the screen are met as the general tracer meets them.
//!
//! Why real numbers suffice. When every mode at a face propagates (real q_z), the uniaxial and
//! isotropic modes' fields are real, so are the boundary problem, T and its polar factor. The
//! complex numbers of a ray's amplitude come only from its phase, one unit-modulus factor e^{iφ}
//! for the whole ray (the eikonal, and the re-referencing at the screen), which changes no power:
//! a ray here carries its amplitude without that factor, a real row (in a crystal: its mode's
//! amplitude as a functional of the input Jones vector) or a real 2×2 matrix (in an isotropic
//! medium: its field on its own beam basis), and its power for an input of coherency C is
//! tr(M C Mᵀ). Every face and medium is found once per stack (the plan: frames, rotated crystals
//! and their matrices, which bodies meet at which face); per incidence only the work is left:
//! seven face crossings for two wedges (one, two, four rays), each two forward mode pairs and one
//! real 2×2 inverse, no allocation.
//!
//! One kernel at any lane width. The work per incidence is written once, on a block of W
//! incidences side by side, each number held as one f64 per incidence ([`F`]): W = 1 is
//! [`PlannedTrace::trace`] (natively and in the design worker's WebAssembly; the page's module
//! has neither), W = 8 is `optics::planned_lanes::BlockedTrace` natively (W = 4 in the design
//! worker's WebAssembly), where the compiler turns every operation into vector instructions (one
//! AVX-512 instruction natively, two of WebAssembly's f64x2 in the worker, written out as such
//! by the private `pairs` module, since LLVM left many of them lane by lane there). Every branch
//! that depends on the numbers
//! is a per-lane choice: the root of the extraordinary quadratic taken without cancellation, a
//! mode's scale, the sign that matches a ray to its incident mode, the polar factor's rank-one
//! case, and whether a ray meets a plane, an aperture or the screen (one by one, a ray that
//! misses is dropped and the others kept; in blocks, its lane is left to the one-by-one trace).
//! What the structure of the plan fixes (which bodies meet at a face, which mode a ray is in, how
//! many rays there are) is the same in every lane and stays a branch. At one lane the kernel
//! takes less time than the scalar trace it replaced, at eight about as much as the lanes it
//! replaced (10⁵ splitter traces, fastest runs in interleaved pairs at load 2.8: one by one
//! 106–111 ms against 117–121 ms; in lanes 26.7–27.4 ms against 25.7–27.0 ms, medians 27.6–28.5
//! against 27.1–28.6 ms).
//!
//! One plate alone: [`parallel_plate`] gives a plane-parallel plate's two face couplings in
//! real numbers from the same modes and the same 2×2 face solve ([`transmission`], one lane wide),
//! for convergent light
//! ([`crate::optics::conoscope`]), which asks for them at every direction and wavelength.
//!
//! What is not planned. A stack with ideal elements, liquid-crystal cells or general (biaxial,
//! optically active) crystals, a plane-parallel stack (traced by [`crate::optics::parallel`]), or
//! more than [`MAX_SLABS`] crystals gets no plan. At an incidence where a mode at some face is
//! evanescent or within [`PLANNED_CRITICAL_MARGIN`] of it (total internal reflection, where the
//! general tracer reports rejected rays), where a wave runs within [`DEGENERATE_DIRECTION`] of an
//! optic axis, or where a face's boundary problem is singular, the plan declines the whole
//! incidence ([`PlannedTrace::trace`] returns `None`) and the caller traces it with the general
//! tracer.
//!
//! Rounding. The wave vectors, hence the directions in isotropic bodies and every decision to
//! decline, are rounded as the general tracer rounds them: the quotients are kept as the complex
//! ones round on purpose (written as products by reciprocals, they parted the directions by
//! 2·10⁻¹² at incidences just inside the critical margin, where q_z = √(n² − |q_t|²) magnifies a
//! last-place difference in q_t some ten-thousandfold). The fields, transmissions, amplitudes and
//! the rays' directions in crystals (which only powers and exit points read) take fewer
//! divisions and square roots, the slowest vector instructions: products by one reciprocal where
//! the general tracer divides each component, the 2×2 inverse for its 4×4 elimination, the
//! ordinary field q × c without its rounding-sized part along q. Powers and exit points so differ
//! from the general tracer's by rounding (about 10⁻¹⁴), and by the rounding of the phase factors
//! it multiplies in (|e^{iφ}| = 1 to about 10⁻¹⁶ per step) and of the order of a power's sum:
//! [`PLANNED_TRACE_AGREEMENT`] bounds the difference (`tests/planned_trace.rs` holds it over
//! generated stacks and incidences).

use crate::optics::geometry::{Plane, face_frame};
use crate::optics::interface::Losses;
use crate::optics::modes::CrystalSurfaces;
use crate::optics::stack::{Aperture, Contact, Element, Medium, Stack};
use crate::optics::uniaxial::Uniaxial;
use crate::precision::{DEGENERATE_DIRECTION, ON_PLANE, PLANNED_CRITICAL_MARGIN};
use nalgebra::{Matrix2, Matrix3, Vector3};
use std::ops::{Add, Div, Mul, Neg, Sub};

#[cfg(doc)]
use crate::precision::PLANNED_TRACE_AGREEMENT;

/// The most crystals a plan takes (2^6 = 64 rays leave such a stack).
pub const MAX_SLABS: usize = 6;

type V3 = Vector3<f64>;

/// A body at a face, seen in the face's own frame.
#[derive(Debug, Clone, Copy)]
pub(crate) enum Local {
    Isotropic(f64),
    Uniaxial(Uniaxial, CrystalSurfaces),
}

impl Local {
    /// The stack's medium `medium` seen in the frame that `to_face` rotates the lab into.
    fn crystal(medium: &Medium, to_face: &Matrix3<f64>) -> Option<Local> {
        match medium.rotated(to_face) {
            Medium::Uniaxial(u) => Some(Local::Uniaxial(u, CrystalSurfaces::of(&u))),
            Medium::Anisotropic(_) => None,
        }
    }
}

/// A face's frame (columns: its axes in the lab) and its transpose.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Frame {
    pub(crate) frame: Matrix3<f64>,
    pub(crate) to_face: Matrix3<f64>,
}

impl Frame {
    fn of(normal: V3) -> Frame {
        let frame = face_frame(normal);
        Frame {
            frame,
            to_face: frame.transpose(),
        }
    }
}

/// One crossing's bodies: where the light comes from and where it goes, in the face's frame.
#[derive(Debug, Clone, Copy)]
pub(crate) struct Crossing {
    pub(crate) frame: Frame,
    pub(crate) from: Local,
    pub(crate) into: Local,
}

impl Crossing {
    /// How many rays leave the face forward: one into an isotropic body, one per mode into a
    /// crystal.
    fn rays_beyond(&self) -> usize {
        match self.into {
            Local::Isotropic(_) => 1,
            Local::Uniaxial(..) => 2,
        }
    }
}

/// How rays reach a slab's front face.
// One per crystal of a plan, made once: boxing the larger variant would only add a pointer to
// follow at every crossing.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy)]
pub(crate) enum Entry {
    /// From the outside medium: travel to the front face (aperture), then cross.
    Outside(Crossing),
    /// Straight from the previous crystal at the front face: one crossing (direct contact) or
    /// two (into a vanishing film and out of it).
    Contact(Crossing, Option<Crossing>),
}

/// One crystal of the plan.
#[derive(Debug, Clone, Copy)]
pub(crate) struct PlannedSlab {
    pub(crate) front: Plane,
    pub(crate) back: Plane,
    pub(crate) aperture: Option<Aperture>,
    pub(crate) entry: Entry,
    /// Out of the back face into the outside medium, when the next element's contact (or the
    /// stack's end) puts it there.
    pub(crate) exit: Option<Crossing>,
}

/// One ray that left the stack forward: what the workload's checksum reads of a traced path.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PlannedRay {
    /// Its modes, crystal by crystal, as bits (first crystal highest; see
    /// [`PlannedTrace::label`]).
    pub label: u32,
    /// Power for the stack's input.
    pub power: f64,
    /// Unit direction in the outside medium.
    pub direction: V3,
    /// Where it left the last face, mm.
    pub exit_point_mm: V3,
}

/// A stack planned once and traced at many incidences (module header).
// The design worker's WebAssembly reads no labels' letters (its workload sums numbers only).
#[cfg_attr(target_arch = "wasm32", allow(dead_code))]
#[derive(Debug, Clone)]
pub struct PlannedTrace {
    outside: f64,
    losses: Losses,
    /// Coherency of the input: C₁₁, C₂₂ and Re C₁₂ (Stokes S0..S2 halved and combined).
    coherency: [f64; 3],
    slabs: Vec<PlannedSlab>,
    letters: Vec<[char; 2]>,
    screen: Plane,
    /// The kernel's buffers at one lane (taken while it runs).
    buffers: Option<LaneBuffers<1>>,
    rays: Vec<PlannedRay>,
}

impl PlannedTrace {
    /// The plan of `stack`, or `None` when the stack is not of the kind planned (module header).
    pub fn new(stack: &Stack) -> Option<PlannedTrace> {
        if stack.is_plane_parallel() || stack.layers.len() > MAX_SLABS || stack.layers.is_empty() {
            return None;
        }
        let outside = stack.outside_index;
        let mut z = 0.0;
        let mut slabs: Vec<PlannedSlab> = Vec::with_capacity(stack.layers.len());
        let mut letters = Vec::with_capacity(stack.layers.len());
        let mut previous: Option<(Medium, V3)> = None;
        for layer in &stack.layers {
            let Element::Slab(slab) = layer.element else {
                return None;
            };
            z += layer.gap_mm;
            let faces = slab.placed_faces(z);
            let front = Frame::of(faces.front.normal);
            let body = Local::crystal(&slab.medium, &front.to_face)?;
            let contact = if slab.faces.is_some() {
                faces.contact
            } else {
                Contact::Outside
            };
            let entry = match (contact, previous) {
                (Contact::Direct, Some((prev, _))) => Entry::Contact(
                    Crossing {
                        frame: front,
                        from: Local::crystal(&prev, &front.to_face)?,
                        into: body,
                    },
                    None,
                ),
                (Contact::Film(n), Some((prev, _))) => Entry::Contact(
                    Crossing {
                        frame: front,
                        from: Local::crystal(&prev, &front.to_face)?,
                        into: Local::Isotropic(n),
                    },
                    Some(Crossing {
                        frame: front,
                        from: Local::Isotropic(n),
                        into: body,
                    }),
                ),
                _ => Entry::Outside(Crossing {
                    frame: front,
                    from: Local::Isotropic(outside),
                    into: body,
                }),
            };
            // The previous crystal leaves into the outside medium unless this one's contact
            // takes its rays straight on.
            if let (Entry::Outside(_), Some((prev, back_normal))) = (entry, previous) {
                let last = slabs.len() - 1;
                slabs[last].exit = Some(exit_crossing(&prev, back_normal, outside)?);
            }
            let back_normal = if slab.faces.is_some() {
                faces.back.normal
            } else {
                V3::z()
            };
            slabs.push(PlannedSlab {
                front: faces.front,
                back: faces.back,
                aperture: faces.aperture,
                entry,
                exit: None,
            });
            letters.push(slab.medium.letters());
            previous = Some((slab.medium, back_normal));
            z += slab.thickness_mm;
        }
        let (prev, back_normal) = previous?;
        let last = slabs.len() - 1;
        slabs[last].exit = Some(exit_crossing(&prev, back_normal, outside)?);
        let s = stack.input.stokes;
        Some(PlannedTrace {
            outside,
            losses: stack.losses,
            coherency: [0.5 * (s[0] + s[1]), 0.5 * (s[0] - s[1]), 0.5 * s[2]],
            slabs,
            letters,
            screen: Plane::across_z(z + stack.screen_mm),
            buffers: Some(LaneBuffers::default()),
            rays: Vec::with_capacity(1 << MAX_SLABS),
        })
    }

    // What the kernel reads of the plan.
    pub(crate) fn ideal(&self) -> bool {
        self.losses == Losses::Ideal
    }

    pub(crate) fn outside(&self) -> f64 {
        self.outside
    }

    pub(crate) fn slabs(&self) -> &[PlannedSlab] {
        &self.slabs
    }

    pub(crate) fn coherency(&self) -> [f64; 3] {
        self.coherency
    }

    pub(crate) fn screen(&self) -> &Plane {
        &self.screen
    }

    /// The label of a ray (its modes' letters, crystal by crystal), as the general tracer
    /// writes it.
    #[cfg_attr(target_arch = "wasm32", allow(dead_code))]
    pub fn label(&self, bits: u32) -> String {
        let n = self.letters.len();
        (0..n)
            .map(|i| self.letters[i][((bits >> (n - 1 - i)) & 1) as usize])
            .collect()
    }

    /// Every ray that leaves the stack forward when it is lit along the unit direction `u`
    /// (u_z > 0), or `None` when the plan declines this incidence (module header): the caller
    /// then traces it with the general tracer.
    pub fn trace(&mut self, u: V3) -> Option<&[PlannedRay]> {
        let mut buffers = self.buffers.take().unwrap_or_default();
        trace_block::<PORTABLE, 1>(self, &mut buffers, &[u], true);
        let traced = buffers.rays.ok[0];
        if traced {
            lane_rays(&buffers.rays, 0, &mut self.rays);
        }
        self.buffers = Some(buffers);
        traced.then_some(&self.rays[..])
    }
}

/// Out of a crystal `medium` through its back face of unit normal `normal` into the outside.
fn exit_crossing(medium: &Medium, normal: V3, outside: f64) -> Option<Crossing> {
    let frame = Frame::of(normal);
    Some(Crossing {
        frame,
        from: Local::crystal(medium, &frame.to_face)?,
        into: Local::Isotropic(outside),
    })
}

/// One number per lane.
#[derive(Debug, Clone, Copy)]
pub(crate) struct F<const W: usize>(pub [f64; W]);

/// A yes or no per lane, as every bit of the lane set (yes) or clear (no): the form in which a
/// vector comparison gives it and a vector choice takes it. (As `bool`s, each comparison's lanes
/// were packed into bytes and each choice unpacked them again: in the design worker's WebAssembly
/// that took a tenth of the crossings' instructions.)
pub(crate) type Mask<const W: usize> = [u64; W];

/// The lane of a [`Mask`] that says yes.
const YES: u64 = u64::MAX;

/// A [`Mask`] as one `bool` per lane.
#[inline(always)]
fn says_yes<const W: usize>(m: &Mask<W>) -> [bool; W] {
    lanes(|i| m[i] != 0)
}

/// `[f(0), f(1), …]` by a plain loop, which is inlined into the vector builds (the standard
/// arrays' `map` and `from_fn` stayed calls, compiled without the vector instructions).
#[inline(always)]
fn lanes<T: Copy + Default, const W: usize>(f: impl Fn(usize) -> T) -> [T; W] {
    let mut out = [T::default(); W];
    for (i, o) in out.iter_mut().enumerate() {
        *o = f(i);
    }
    out
}

/// The lanes' arithmetic, comparisons and choices as explicit f64x2 instructions, two lanes to an
/// instruction, in the design worker's WebAssembly (built with 128-bit SIMD) at an even lane
/// width. Left to itself, LLVM vectorized the plain lane loops only in part there: many products
/// were computed one lane at a time and the halves put together again lane by lane
/// (`f64x2.replace_lane`), wherever a value was also read lane by lane (a comparison into a yes or
/// no per lane); a lane's maximum was a call. Written out, the four-lane crossing shrank from
/// about 17,000 lines of WebAssembly text to 9,600, with no scalar arithmetic left. IEEE
/// arithmetic rounds alike lane by lane and pair by pair: the same bits.
#[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
mod pairs {
    use core::arch::wasm32::{f64x2_splat, v128, v128_and, v128_bitselect, v128_load, v128_store};

    /// `f` on each pair of lanes of `a` and `b` (W even), numbers or masks alike: every lane
    /// 8 bytes (`f64` or `u64`, checked as the code is compiled).
    #[inline(always)]
    pub(super) fn zip<A: Copy, B: Copy, O: Copy + Default, const W: usize>(
        a: &[A; W],
        b: &[B; W],
        f: impl Fn(v128, v128) -> v128,
    ) -> [O; W] {
        const { assert!(size_of::<A>() == 8 && size_of::<B>() == 8 && size_of::<O>() == 8) };
        let mut out = [O::default(); W];
        for k in (0..W - W % 2).step_by(2) {
            // SAFETY: lanes k and k + 1 are within each array (k + 1 < W), of 8 bytes each;
            // WebAssembly's v128 loads and stores take any alignment.
            unsafe {
                let r = f(v128_load(a.as_ptr().add(k).cast()), v128_load(b.as_ptr().add(k).cast()));
                v128_store(out.as_mut_ptr().add(k).cast(), r);
            }
        }
        out
    }

    /// `f` on each pair of lanes of `a` and the number `b` in both (W even).
    #[inline(always)]
    pub(super) fn with<const W: usize>(a: &[f64; W], b: f64, f: impl Fn(v128, v128) -> v128) -> [f64; W] {
        let b = f64x2_splat(b);
        zip(a, a, |x, _| f(x, b))
    }

    /// Both masks' yes, per pair of lanes (W even).
    #[inline(always)]
    pub(super) fn both<const W: usize>(a: &[u64; W], b: &[u64; W]) -> [u64; W] {
        zip(a, b, |x, y| v128_and(x, y))
    }

    /// `a` where `m` says yes, else `b`, per pair of lanes (W even).
    #[inline(always)]
    pub(super) fn pick<const W: usize>(m: &[u64; W], a: &[f64; W], b: &[f64; W]) -> [f64; W] {
        let mut out = [0.0; W];
        for k in (0..W - W % 2).step_by(2) {
            // SAFETY: as in `zip`.
            unsafe {
                let r = v128_bitselect(
                    v128_load(a.as_ptr().add(k).cast()),
                    v128_load(b.as_ptr().add(k).cast()),
                    v128_load(m.as_ptr().add(k).cast()),
                );
                v128_store(out.as_mut_ptr().add(k).cast(), r);
            }
        }
        out
    }

    /// `f` on each pair of lanes of `a` (W even).
    #[inline(always)]
    pub(super) fn each<const W: usize>(a: &[f64; W], f: impl Fn(v128) -> v128) -> [f64; W] {
        zip(a, a, |x, _| f(x))
    }
}

/// Whether the lanes' arithmetic goes by [`pairs`] (its header).
#[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
const fn by_pairs(w: usize) -> bool {
    w.is_multiple_of(2)
}

/// The comparisons per lane, each a mask.
macro_rules! comparisons {
    ($($method:ident, $op:tt, $pair:ident;)*) => {
        impl<const W: usize> F<W> {
            $(
                #[inline(always)]
                fn $method(self, o: F<W>) -> Mask<W> {
                    #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
                    if by_pairs(W) {
                        return pairs::zip(&self.0, &o.0, |a, b| core::arch::wasm32::$pair(a, b));
                    }
                    lanes(|i| if self.0[i] $op o.0[i] { YES } else { 0 })
                }
            )*
        }
    };
}
comparisons! {
    gt, >, f64x2_gt;
    ge, >=, f64x2_ge;
    lt, <, f64x2_lt;
    le, <=, f64x2_le;
    eq, ==, f64x2_eq;
}

macro_rules! lanewise {
    ($trait:ident, $method:ident, $op:tt, $pair:ident) => {
        impl<const W: usize> $trait for F<W> {
            type Output = F<W>;
            #[inline(always)]
            fn $method(self, o: F<W>) -> F<W> {
                #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
                if by_pairs(W) {
                    return F(pairs::zip(&self.0, &o.0, |a, b| core::arch::wasm32::$pair(a, b)));
                }
                F(lanes(|i| self.0[i] $op o.0[i]))
            }
        }
        impl<const W: usize> $trait<f64> for F<W> {
            type Output = F<W>;
            #[inline(always)]
            fn $method(self, o: f64) -> F<W> {
                #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
                if by_pairs(W) {
                    return F(pairs::with(&self.0, o, |a, b| core::arch::wasm32::$pair(a, b)));
                }
                F(lanes(|i| self.0[i] $op o))
            }
        }
    };
}
lanewise!(Add, add, +, f64x2_add);
lanewise!(Sub, sub, -, f64x2_sub);
lanewise!(Mul, mul, *, f64x2_mul);
lanewise!(Div, div, /, f64x2_div);

impl<const W: usize> Neg for F<W> {
    type Output = F<W>;
    #[inline(always)]
    fn neg(self) -> F<W> {
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        if by_pairs(W) {
            return F(pairs::each(&self.0, |a| core::arch::wasm32::f64x2_neg(a)));
        }
        F(lanes(|i| -self.0[i]))
    }
}

impl<const W: usize> F<W> {
    #[inline(always)]
    fn splat(x: f64) -> F<W> {
        F([x; W])
    }
    #[inline(always)]
    fn map(self, f: impl Fn(f64) -> f64) -> F<W> {
        F(lanes(|i| f(self.0[i])))
    }
    #[inline(always)]
    fn sqrt(self) -> F<W> {
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        if by_pairs(W) {
            return F(pairs::each(&self.0, |a| core::arch::wasm32::f64x2_sqrt(a)));
        }
        self.map(f64::sqrt)
    }
    #[inline(always)]
    fn abs(self) -> F<W> {
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        if by_pairs(W) {
            return F(pairs::each(&self.0, |a| core::arch::wasm32::f64x2_abs(a)));
        }
        self.map(f64::abs)
    }
    /// max(x, 0) per lane as a comparison and a choice (0 for NaN and −0, as `f64::max` gives
    /// on WebAssembly), not `f64::max`, which was a call per lane there.
    #[inline(always)]
    fn at_least_zero(self) -> F<W> {
        let zero = F::splat(0.0);
        F::pick(self.gt(zero), self, zero)
    }
    /// `a` where `m` holds, else `b`.
    #[inline(always)]
    fn pick(m: Mask<W>, a: F<W>, b: F<W>) -> F<W> {
        #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
        if by_pairs(W) {
            return F(pairs::pick(&m, &a.0, &b.0));
        }
        F(lanes(|i| if m[i] != 0 { a.0[i] } else { b.0[i] }))
    }
}

/// `x.is_finite()` per lane as a floating-point test, x − x = 0 (NaN for ±∞ and NaN), which stays
/// a vector subtraction and comparison: `is_finite`, an integer test of the bits, was compiled
/// lane by lane in scalar registers, and so was arithmetic written inside a lane's test.
// The same operand on purpose: x − x is 0 exactly when x is finite.
#[allow(clippy::eq_op)]
#[inline(always)]
fn finite<const W: usize>(x: F<W>) -> Mask<W> {
    (x - x).eq(F::splat(0.0))
}

#[inline(always)]
fn and<const W: usize>(a: Mask<W>, b: Mask<W>) -> Mask<W> {
    #[cfg(all(target_arch = "wasm32", target_feature = "simd128"))]
    if by_pairs(W) {
        return pairs::both(&a, &b);
    }
    lanes(|i| a[i] & b[i])
}

/// A vector per lane.
#[derive(Debug, Clone, Copy)]
struct V<const W: usize> {
    x: F<W>,
    y: F<W>,
    z: F<W>,
}

impl<const W: usize> V<W> {
    #[inline(always)]
    fn splat(v: &Vector3<f64>) -> V<W> {
        V {
            x: F::splat(v.x),
            y: F::splat(v.y),
            z: F::splat(v.z),
        }
    }
    #[inline(always)]
    fn dot(&self, o: &V<W>) -> F<W> {
        self.x * o.x + self.y * o.y + self.z * o.z
    }
    #[inline(always)]
    fn cross(&self, o: &V<W>) -> V<W> {
        V {
            x: self.y * o.z - self.z * o.y,
            y: self.z * o.x - self.x * o.z,
            z: self.x * o.y - self.y * o.x,
        }
    }
    #[inline(always)]
    fn norm(&self) -> F<W> {
        self.dot(self).sqrt()
    }
    #[inline(always)]
    fn scale(&self, s: F<W>) -> V<W> {
        V {
            x: self.x * s,
            y: self.y * s,
            z: self.z * s,
        }
    }
    #[inline(always)]
    fn over(&self, s: F<W>) -> V<W> {
        V {
            x: self.x / s,
            y: self.y / s,
            z: self.z / s,
        }
    }
    #[inline(always)]
    fn sub(&self, o: &V<W>) -> V<W> {
        V {
            x: self.x - o.x,
            y: self.y - o.y,
            z: self.z - o.z,
        }
    }
    #[inline(always)]
    fn add(&self, o: &V<W>) -> V<W> {
        V {
            x: self.x + o.x,
            y: self.y + o.y,
            z: self.z + o.z,
        }
    }
    /// m·v, summed as nalgebra sums it.
    #[inline(always)]
    fn rotated(&self, m: &Matrix3<f64>) -> V<W> {
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
fn beam_basis<const W: usize>(u: &V<W>) -> (V<W>, V<W>) {
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

/// A propagating mode per lane: wave vector, field E and Z0 H (unit power flux across the face),
/// ray direction (a unit vector where asked).
#[derive(Debug, Clone, Copy)]
struct Wave<const W: usize> {
    q: V<W>,
    e: V<W>,
    h: V<W>,
    ray: V<W>,
}

#[inline(always)]
fn wave<const W: usize>(q: V<W>, e: V<W>, ray: V<W>, rays: bool) -> Wave<W> {
    let h = q.cross(&e);
    let sz = (e.x * h.y - e.y * h.x).abs();
    let zero = F::splat(0.0);
    let scale = F::pick(sz.gt(zero), F::splat(1.0) / sz.sqrt(), F::splat(1.0));
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
fn propagating_root<const W: usize>(x: F<W>, scale: f64, ok: &mut Mask<W>) -> F<W> {
    *ok = and(*ok, x.gt(F::splat(PLANNED_CRITICAL_MARGIN * scale)));
    x.sqrt()
}

/// Both forward modes of `body` at tangential wave vector `qt`, in the face frame, as
/// `isotropic_modes` and `crystal_modes_with` of [`crate::optics::modes`] find them; `ok` loses the
/// lanes where one is not safely propagating or a wave runs along an optic axis. The backward
/// modes are not made (the boundary problem is solved without them, [`transmission`]);
/// `backward` keeps the general tracer's tests of their wave vectors, so that the plan declines
/// what it declines.
#[inline(always)]
fn modes<const W: usize>(body: &Local, qt: [F<W>; 2], backward: bool, rays: bool, ok: &mut Mask<W>) -> [Wave<W>; 2] {
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
            // The general tracer's sum's products, in its order (m₀₀ q_x) q_x + ((2 m₀₁) q_x) q_y + (m₁₁ q_y) q_y.
            let c0 = qt[0] * m[(0, 0)] * qt[0] + qt[0] * (2.0 * m[(0, 1)]) * qt[1] + qt[1] * m[(1, 1)] * qt[1] - 1.0;
            let ac0 = c0 * a;
            let disc = b * b - ac0;
            *ok = and(*ok, disc.gt((b * b + ac0.abs()) * PLANNED_CRITICAL_MARGIN));
            let r = disc.sqrt();
            let c = V::splat(&crystal.axis.unit());
            let along = |z: F<W>| V { x: qt[0], y: qt[1], z };
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
fn e_root<const W: usize>(a: f64, b: F<W>, c0: F<W>, r: F<W>, s: f64) -> F<W> {
    let plain = (b * s).le(F::splat(0.0));
    let num = F::pick(plain, -b + r * s, c0);
    let den = F::pick(plain, F::splat(a), -b - r * s);
    num / den
}

/// The ordinary D ∥ q × c; `ok` loses the lanes where q runs along c. (The closed form also
/// removes its component along q, which is rounding: a field, module header.)
#[inline(always)]
fn transverse_ordinary<const W: usize>(q: &V<W>, c: &V<W>, ok: &mut Mask<W>) -> V<W> {
    let d = q.cross(c);
    let qq = q.dot(q);
    *ok = and(*ok, d.dot(&d).gt(qq * (DEGENERATE_DIRECTION * DEGENERATE_DIRECTION)));
    d
}

/// The ordinary and extraordinary waves of wave vectors `q_o`, `q_e` in the crystal of optic axis
/// `c` and matrices `surfaces` (face frame), as `crystal_modes_with` forms them.
#[inline(always)]
fn crystal_pair<const W: usize>(
    c: &V<W>,
    surfaces: &crate::optics::modes::CrystalSurfaces,
    q_o: V<W>,
    q_e: V<W>,
    rays: bool,
    ok: &mut Mask<W>,
) -> [Wave<W>; 2] {
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
/// by the flux form instead of the general tracer's 4×4 elimination.
///
/// Formula. With ⟨a, b⟩ = ẑ·(E_a × H_b + E_b × H_a) (tangential fields, face frame), waves of one
/// lossless medium at one tangential wave vector with different q_z are orthogonal, ⟨a, b⟩ = 0 (the
/// boundary problem's 4×4 system matrix for a real symmetric permittivity is self-adjoint under
/// this form: Berreman, J. Opt. Soc. Am. 62, 502 (1972); P. Yeh, *Optical Waves in Layered
/// Media*, 1988, ch. 9, for the power orthogonality of modes), and ⟨a, a⟩ = 2 for a forward wave
/// of unit power flux. Applied to the boundary condition a_k + Σ r_jk a′_j = Σ t_jk b_j (a′: the
/// reflected waves), ⟨a_i, ·⟩ leaves G t = 2 I with G_ij = ⟨a_i, b_j⟩, so T = 2 G⁻¹: two forward
/// waves per side and a 2×2 inverse, where the general tracer makes the two reflected waves too
/// and eliminates a 4×4 system (in exact arithmetic the same T; here to rounding, 10⁻¹⁵). The
/// reflected waves and the elimination took two fifths of the time (10⁵ splitter traces in
/// lanes, fastest of 15 in three interleaved pairs at load 2.8–4.4: 46–50 ms with them, 27–29 ms
/// without; one by one 191–219 ms against 115–123 ms on-CPU; the same checksum).
///
/// `ok` loses the lanes where det G is not finite or within 10⁻¹² of zero relative to |G|²: the
/// system is then singular or nearly so, as where that elimination meets a zero pivot. A
/// passive face keeps |t| ≤ 1 in these units, so |G⁻¹| ≤ ½ and a propagating face never comes near.
#[inline(always)]
fn transmission<const W: usize>(from: &[Wave<W>; 2], into: &[Wave<W>; 2], ok: &mut Mask<W>) -> M2<W> {
    let form = |a: &Wave<W>, b: &Wave<W>| a.e.x * b.h.y - a.e.y * b.h.x + (b.e.x * a.h.y - b.e.y * a.h.x);
    let g = [
        [form(&from[0], &into[0]), form(&from[0], &into[1])],
        [form(&from[1], &into[0]), form(&from[1], &into[1])],
    ];
    let det = g[0][0] * g[1][1] - g[0][1] * g[1][0];
    let size = norm2(&g);
    *ok = and(*ok, and(finite(det), det.abs().gt(size * 1e-12 * size)));
    let s = F::splat(2.0) / det;
    [[g[1][1] * s, -g[0][1] * s], [-g[1][0] * s, g[0][0] * s]]
}

/// A real 2×2 matrix per lane, rows first.
type M2<const W: usize> = [[F<W>; 2]; 2];

/// Frobenius norm, summed in nalgebra's (column) order.
#[inline(always)]
fn norm2<const W: usize>(t: &M2<W>) -> F<W> {
    (t[0][0] * t[0][0] + t[1][0] * t[1][0] + t[0][1] * t[0][1] + t[1][1] * t[1][1]).sqrt()
}

/// [`crate::optics::interface::lossless_part`] of a real T per lane.
#[inline(always)]
fn lossless_part<const W: usize>(t: &M2<W>) -> M2<W> {
    let norm = norm2(t);
    let zero = F::splat(0.0);
    // Neither NaN, nor ≤ 0, nor infinite.
    let usable = and(norm.gt(zero), finite(norm));
    let r = norm / (norm * norm);
    let t = [[t[0][0] * r, t[0][1] * r], [t[1][0] * r, t[1][1] * r]];
    let det = t[0][0] * t[1][1] - t[0][1] * t[1][0];
    let rank_one = det.abs().le(F::splat(1e-14));
    let k = (det.abs() * det) / (det * det);
    let m = [
        [t[0][0] + t[1][1] * k, t[0][1] + (-t[1][0]) * k],
        [t[1][0] + (-t[0][1]) * k, t[1][1] + t[0][0] * k],
    ];
    let s = F::splat(2f64.sqrt()) / norm2(&m);
    let entry = |r: usize, c: usize| F::pick(usable, F::pick(rank_one, t[r][c], m[r][c] * s), zero);
    [[entry(0, 0), entry(0, 1)], [entry(1, 0), entry(1, 1)]]
}

/// The outside medium's forward waves at one tangential wave vector, as [`parallel_plate`] takes
/// them: found once for every plate and wavelength of a direction.
#[derive(Debug, Clone, Copy)]
pub(crate) struct OutsideWaves([Wave<1>; 2]);

/// The forward waves of the outside medium of index `outside` at tangential wave vector `qt`, as
/// `isotropic_modes` gives them; `None` when they are not safely propagating.
pub(crate) fn outside_waves(outside: f64, qt: [f64; 2]) -> Option<OutsideWaves> {
    let mut ok = [YES];
    let waves = modes(
        &Local::Isotropic(outside),
        [F([qt[0]]), F([qt[1]])],
        true,
        false,
        &mut ok,
    );
    (ok[0] != 0).then_some(OutsideWaves(waves))
}

/// A plane-parallel plate of `crystal` (lab frame, both faces across z) between half-spaces of
/// the outside medium whose waves at tangential wave vector `qt` are `outside`, in real numbers:
/// its entry coupling (outside beam basis to the crystal's modes, o then e), its exit coupling
/// (the modes to the outside beam basis) and its forward modes' q_z, as
/// `parallel::slab_couplings` and `crystal_modes` give them for propagating modes, to rounding
/// (`optics::conoscope` tests the agreement). Each face is solved by [`transmission`], the
/// kernel's 2×2 flux-form solve, one lane wide. `None` where this module declines an incidence: a
/// wave not safely propagating (backward waves included), a wave along the optic axis, a
/// singular face.
pub(crate) fn parallel_plate(
    crystal: &Uniaxial,
    surfaces: &CrystalSurfaces,
    outside: &OutsideWaves,
    qt: [f64; 2],
    ideal: bool,
) -> Option<(Matrix2<f64>, Matrix2<f64>, [f64; 2])> {
    let mut ok = [YES];
    let inside = modes(
        &Local::Uniaxial(*crystal, *surfaces),
        [F([qt[0]]), F([qt[1]])],
        true,
        false,
        &mut ok,
    );
    let mut t_in = transmission(&outside.0, &inside, &mut ok);
    let mut t_out = transmission(&inside, &outside.0, &mut ok);
    if ideal {
        t_in = lossless_part(&t_in);
        t_out = lossless_part(&t_out);
    }
    let real = |t: &M2<1>| Matrix2::new(t[0][0].0[0], t[0][1].0[0], t[1][0].0[0], t[1][1].0[0]);
    (ok[0] != 0).then(|| (real(&t_in), real(&t_out), [inside[0].q.z.0[0], inside[1].q.z.0[0]]))
}

/// `e`/|e| per lane, as the complex quotient of zero imaginary parts rounds.
#[inline(always)]
fn unit_field<const W: usize>(e: &V<W>) -> V<W> {
    let n = e.norm();
    // One choice of the factor, not one per component: z · 1 is z.
    let r = F::pick(n.gt(F::splat(0.0)), n / (n * n), F::splat(1.0));
    e.scale(r)
}

/// Where a ray's light is, per lane (without its phase factor, module header); the kind of a ray's mode is
/// the plan's, the same in every lane.
// Made and copied by value at every crossing, in buffers kept between blocks: boxing the larger
// variant would add an allocation per ray and crossing.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy)]
enum Carrier<const W: usize> {
    Free {
        n: f64,
        u: V<W>,
        m: M2<W>,
    },
    Bound {
        q: V<W>,
        ray: V<W>,
        e: V<W>,
        kind: usize,
        amp: [F<W>; 2],
    },
}

impl<const W: usize> Carrier<W> {
    /// A place for a carrier, before a crossing writes one there.
    fn empty() -> Carrier<W> {
        let zero = F::splat(0.0);
        Carrier::Free {
            n: 1.0,
            u: V {
                x: zero,
                y: zero,
                z: zero,
            },
            m: [[zero; 2]; 2],
        }
    }
    #[inline(always)]
    fn q(&self) -> V<W> {
        match self {
            Carrier::Free { n, u, .. } => u.scale(F::splat(*n)),
            Carrier::Bound { q, .. } => *q,
        }
    }
    #[inline(always)]
    fn direction(&self) -> V<W> {
        match self {
            Carrier::Free { u, .. } | Carrier::Bound { ray: u, .. } => *u,
        }
    }
}

/// A ray in flight per lane.
#[derive(Debug, Clone, Copy)]
struct Flight<const W: usize> {
    at: V<W>,
    exit: V<W>,
    carrier: Carrier<W>,
    label: u32,
    /// The lanes where the ray is still on its way (all, unless rays are dropped).
    alive: Mask<W>,
}

impl<const W: usize> Flight<W> {
    /// A place for a flight, before a block writes one there.
    fn empty() -> Flight<W> {
        let zero = F::splat(0.0);
        let at = V {
            x: zero,
            y: zero,
            z: zero,
        };
        Flight {
            at,
            exit: at,
            carrier: Carrier::empty(),
            label: 0,
            alive: [0; W],
        }
    }
}

/// Crosses one face for one ray per lane (the general tracer's `Tracer::cross` for propagating
/// modes), writing the rays beyond it into `beyond` (one into an isotropic body, one per mode into
/// a crystal, [`Crossing::rays_beyond`]); `ok` loses the lanes where a mode is not safely
/// propagating, the carrier's modes share their wave vector, or the boundary problem is singular,
/// and every lane if `beyond` has too few places.
///
/// The rays are written where they will fly, not returned: a carrier is some 360 bytes at four
/// lanes, and in the design worker's WebAssembly each carrier returned and moved into its flight
/// was a `memory.copy`, a call out of the module (a tenth of the blocks' time, profiled).
///
/// One copy per instruction set, called (not inlined) from each crossing of the plan: inlined,
/// a block's five kinds of crossing made a kernel too large for the instruction cache.
#[inline(always)]
fn cross_with<const W: usize>(
    carrier: &Carrier<W>,
    crossing: &Crossing,
    ideal: bool,
    ok: &mut Mask<W>,
    beyond: &mut [Carrier<W>],
) {
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
            *ok = and(*ok, apart.gt(F::splat(DEGENERATE_DIRECTION)));
            let p = a_fwd[*kind].e.rotated(frame).dot(e);
            // ±amp by the sign of p, nothing where p = 0 (a choice per lane, not a branch).
            let (plus, minus) = (p.gt(zero), p.lt(zero));
            for c in 0..2 {
                a_in[*kind][c] = F::pick(plus, amp[c], F::pick(minus, -amp[c], zero));
            }
        }
    }
    let t = transmission(&a_fwd, &b_fwd, ok);
    let t = if ideal { lossless_part(&t) } else { t };
    let entry = |k: usize, c: usize| t[k][0] * a_in[0][c] + t[k][1] * a_in[1][c];
    let out: M2<W> = [[entry(0, 0), entry(0, 1)], [entry(1, 0), entry(1, 1)]];
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
            match beyond {
                [free, ..] => *free = Carrier::Free { n, u, m },
                [] => *ok = [0; W],
            }
        }
        Local::Uniaxial(..) => match beyond {
            [o, e, ..] => {
                *o = bound(&b_fwd[0], frame, 0, out[0]);
                *e = bound(&b_fwd[1], frame, 1, out[1]);
            }
            _ => *ok = [0; W],
        },
    }
}

/// A ray in mode `kind` of the wave `w` (face frame `frame`), of amplitudes `amp`.
#[inline(always)]
fn bound<const W: usize>(w: &Wave<W>, frame: &Matrix3<f64>, kind: usize, amp: [F<W>; 2]) -> Carrier<W> {
    Carrier::Bound {
        q: w.q.rotated(frame),
        ray: w.ray.rotated(frame),
        e: w.e.rotated(frame),
        kind,
        amp,
    }
}

/// [`Plane::meet`] per lane from `at` along `dir`, `at` moved there; `ok` loses the lanes where it cannot get there.
#[inline(always)]
fn travel<const W: usize>(at: &mut V<W>, dir: &V<W>, plane: &Plane, ok: &mut Mask<W>) {
    let to = V::splat(&plane.point).sub(at);
    let n = V::splat(&plane.normal);
    let gap = n.dot(&to);
    let scale = to.norm() + 1.0;
    let on = gap.abs().le(scale * ON_PLANE);
    let along = n.dot(dir);
    let s = gap / along;
    // (`|` and `&`, not `||` and `&&`: no branch per lane.)
    let steep = along.abs().ge(F::splat(1e-15));
    let forward = s.ge(scale * -ON_PLANE);
    let ahead: Mask<W> = lanes(|i| on[i] | (steep[i] & forward[i]));
    *ok = and(*ok, ahead);
    let s = F::pick(on, F::splat(0.0), s.at_least_zero());
    *at = at.add(&dir.scale(s));
}

/// [`Aperture::holds`] per lane.
#[inline(always)]
fn holds<const W: usize>(aperture: &Option<Aperture>, at: &V<W>, ok: &mut Mask<W>) {
    if let Some(a) = aperture {
        let d = at.sub(&V::splat(&a.centre));
        let axis = V::splat(&a.axis);
        let off = d.sub(&axis.scale(d.dot(&axis)));
        *ok = and(*ok, off.norm().le(F::splat(a.radius_mm * (1.0 + 1e-12))));
    }
}

/// Buffers of a lane trace, kept between blocks, and the last block's rays.
#[derive(Debug, Clone)]
pub(crate) struct LaneBuffers<const W: usize> {
    flights: Vec<Flight<W>>,
    next: Vec<Flight<W>>,
    /// The ray in a cement film, between its two crossings.
    film: [Carrier<W>; 1],
    /// The rays beyond a slab's front face (one into an isotropic body, one per mode into a
    /// crystal).
    entered: [Carrier<W>; 2],
    pub(crate) rays: Box<LaneRays<W>>,
}

impl<const W: usize> Default for LaneBuffers<W> {
    fn default() -> LaneBuffers<W> {
        LaneBuffers {
            flights: Vec::new(),
            next: Vec::new(),
            film: [Carrier::empty()],
            entered: [Carrier::empty(); 2],
            rays: Box::new(LaneRays {
                ok: [false; W],
                count: 0,
                label: [0; 64],
                alive: [[false; W]; 64],
                power: [[0.0; W]; 64],
                direction: [[Vector3::zeros(); W]; 64],
                exit: [[Vector3::zeros(); W]; 64],
            }),
        }
    }
}

/// The rays of one block: per ray (in the order [`PlannedTrace::trace`] lists them) its label,
/// and per lane whether it left (`alive`), its power, direction and exit point; `ok` marks the
/// lanes traced here.
#[derive(Debug, Clone, Copy)]
pub(crate) struct LaneRays<const W: usize> {
    pub ok: [bool; W],
    pub count: usize,
    pub label: [u32; 64],
    pub alive: [[bool; W]; 64],
    pub power: [[f64; W]; 64],
    pub direction: [[Vector3<f64>; W]; 64],
    pub exit: [[Vector3<f64>; W]; 64],
}

/// Traces one block of incidences `dirs` (unit, u_z > 0) through `plan`. A ray that misses a
/// plane, an aperture or the screen is dropped in its lane where `drop_rays` (the one-by-one
/// trace's rule, [`PlannedTrace::trace`]), else its lane is left to be traced alone.
#[inline(always)]
pub(crate) fn trace_block<const ISA: u8, const W: usize>(
    plan: &PlannedTrace,
    buffers: &mut LaneBuffers<W>,
    dirs: &[Vector3<f64>; W],
    drop_rays: bool,
) {
    let mut ok = [YES; W];
    let ideal = plan.ideal();
    let LaneBuffers {
        flights,
        next,
        film,
        entered,
        rays: out,
    } = buffers;
    // The flights are written in place, slot by slot (the vectors only grow, to the most rays a
    // block has had), and the rays beyond a face where they will fly: a flight is some 560 bytes
    // at four lanes, and copies of it took a good part of the blocks' time in the design
    // worker's WebAssembly.
    let Some(first) = slot(flights, 0) else {
        return out.ok = [false; W];
    };
    first.at = V::splat(&Vector3::zeros());
    first.exit = first.at;
    first.carrier = Carrier::Free {
        n: plan.outside(),
        u: V {
            x: F(lanes(|i| dirs[i].x)),
            y: F(lanes(|i| dirs[i].y)),
            z: F(lanes(|i| dirs[i].z)),
        },
        m: [[F::splat(1.0), F::splat(0.0)], [F::splat(0.0), F::splat(1.0)]],
    };
    first.label = 0;
    first.alive = [YES; W];
    let mut flying = 1;
    for slab in plan.slabs() {
        let mut made = 0;
        for f in flights.iter_mut().take(flying) {
            let into = match &slab.entry {
                Entry::Outside(crossing) => {
                    if !to_plane(
                        &mut f.at,
                        &mut f.alive,
                        &f.carrier.direction(),
                        &slab.front,
                        &slab.aperture,
                        drop_rays,
                        &mut ok,
                    ) {
                        continue;
                    }
                    cross_alive::<ISA, W>(&f.carrier, crossing, ideal, &f.alive, &mut ok, &mut entered[..]);
                    crossing
                }
                Entry::Contact(first, None) => {
                    cross_alive::<ISA, W>(&f.carrier, first, ideal, &f.alive, &mut ok, &mut entered[..]);
                    first
                }
                Entry::Contact(first, Some(second)) => {
                    cross_alive::<ISA, W>(&f.carrier, first, ideal, &f.alive, &mut ok, &mut film[..]);
                    cross_alive::<ISA, W>(&film[0], second, ideal, &f.alive, &mut ok, &mut entered[..]);
                    second
                }
            };
            for (k, carrier) in entered.iter().enumerate().take(into.rays_beyond()) {
                let Some(g) = slot(next, made) else {
                    return out.ok = [false; W];
                };
                g.at = f.at;
                g.label = (f.label << 1) | k as u32;
                g.alive = f.alive;
                if !to_plane(
                    &mut g.at,
                    &mut g.alive,
                    &carrier.direction(),
                    &slab.back,
                    &slab.aperture,
                    drop_rays,
                    &mut ok,
                ) {
                    continue;
                }
                match &slab.exit {
                    Some(exit) => {
                        cross_alive::<ISA, W>(
                            carrier,
                            exit,
                            ideal,
                            &g.alive,
                            &mut ok,
                            std::slice::from_mut(&mut g.carrier),
                        );
                        g.exit = g.at;
                    }
                    None => {
                        g.carrier = *carrier;
                        g.exit = f.at;
                    }
                }
                made += 1;
            }
        }
        std::mem::swap(flights, next);
        flying = made;
    }
    let [c11, c22, c12] = plan.coherency();
    let screen = plan.screen().normal;
    out.count = 0;
    for f in flights.iter().take(flying) {
        let Carrier::Free { u, m, .. } = f.carrier else {
            continue;
        };
        // The screen is met along the ray's whole line (as the general tracer meets it).
        let along = V::splat(&screen).dot(&u);
        let meets = along.abs().ge(F::splat(1e-15));
        let alive = if drop_rays {
            and(f.alive, meets)
        } else {
            ok = and(ok, meets);
            f.alive
        };
        let term = |i: usize| {
            let (a, b) = (m[i][0], m[i][1]);
            a * a * c11 + b * b * c22 + a * b * 2.0 * c12
        };
        let power = term(0) + term(1);
        let r = out.count;
        if r >= out.label.len() {
            return out.ok = [false; W];
        }
        out.label[r] = f.label;
        out.alive[r] = says_yes(&alive);
        out.power[r] = power.0;
        out.direction[r] = std::array::from_fn(|i| u.lane(i));
        out.exit[r] = std::array::from_fn(|i| f.exit.lane(i));
        out.count += 1;
    }
    out.ok = says_yes(&ok);
}

/// The flight in place `k` of `flights`, made when it is the next new one (a vector of flights
/// only grows); `None` beyond that, which a plan never asks for.
#[inline(always)]
fn slot<const W: usize>(flights: &mut Vec<Flight<W>>, k: usize) -> Option<&mut Flight<W>> {
    if k == flights.len() {
        flights.push(Flight::empty());
    }
    flights.get_mut(k)
}

/// A ray's way from `at` along `dir` to a face `plane` of a slab of aperture `aperture`: where it
/// misses, dropped from `alive` (`drop_rays`) or its lane lost; false when it is dropped in every
/// lane. (This and [`cross_alive`] are functions, not closures of [`trace_block`]: a closure
/// there was compiled apart from the kernel's build and not inlined, an eighth of the lanes'
/// time, profiled.)
#[inline(always)]
fn to_plane<const W: usize>(
    at: &mut V<W>,
    alive: &mut Mask<W>,
    dir: &V<W>,
    plane: &Plane,
    aperture: &Option<Aperture>,
    drop_rays: bool,
    ok: &mut Mask<W>,
) -> bool {
    let mut hit = *alive;
    travel(at, dir, plane, &mut hit);
    holds(aperture, at, &mut hit);
    if drop_rays {
        *alive = hit;
    } else {
        *ok = and(*ok, hit);
    }
    alive.iter().any(|&a| a != 0)
}

/// One crossing of a ray, its rays beyond written into `beyond`: the lanes it declines are lost
/// where the ray is on its way (`alive`).
#[inline(always)]
fn cross_alive<const ISA: u8, const W: usize>(
    c: &Carrier<W>,
    crossing: &Crossing,
    ideal: bool,
    alive: &Mask<W>,
    ok: &mut Mask<W>,
    beyond: &mut [Carrier<W>],
) {
    let mut fine = [YES; W];
    cross::<ISA, W>(c, crossing, ideal, &mut fine, beyond);
    *ok = lanes(|i| ok[i] & (fine[i] | !alive[i]));
}

/// The rays of lane `lane` of a block, as [`PlannedTrace::trace`] lists them, into `into`.
pub(crate) fn lane_rays<const W: usize>(rays: &LaneRays<W>, lane: usize, into: &mut Vec<PlannedRay>) {
    into.clear();
    into.extend((0..rays.count).filter(|&r| rays.alive[r][lane]).map(|r| PlannedRay {
        label: rays.label[r],
        power: rays.power[r][lane],
        direction: rays.direction[r][lane],
        exit_point_mm: rays.exit[r][lane],
    }));
}

/// The builds of the kernel, by instruction set (a const parameter of [`trace_block`]).
pub(crate) const PORTABLE: u8 = 0;
#[cfg(target_arch = "x86_64")]
pub(crate) const AVX2: u8 = 1;
#[cfg(target_arch = "x86_64")]
pub(crate) const AVX512: u8 = 2;

/// [`cross_with`] compiled for AVX2 (and FMA, which it leaves unused: no product is fused).
///
/// # Safety
/// The processor must have AVX2 and FMA.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx2,fma")]
#[inline(never)]
unsafe fn cross_avx2<const W: usize>(
    c: &Carrier<W>,
    at: &Crossing,
    ideal: bool,
    ok: &mut Mask<W>,
    beyond: &mut [Carrier<W>],
) {
    cross_with(c, at, ideal, ok, beyond)
}

/// [`cross_with`] compiled for AVX-512 (one register per lane number).
///
/// # Safety
/// The processor must have AVX-512 F, DQ and VL.
#[cfg(target_arch = "x86_64")]
#[target_feature(enable = "avx512f,avx512dq,avx512vl,avx2,fma")]
#[inline(never)]
unsafe fn cross_avx512<const W: usize>(
    c: &Carrier<W>,
    at: &Crossing,
    ideal: bool,
    ok: &mut Mask<W>,
    beyond: &mut [Carrier<W>],
) {
    cross_with(c, at, ideal, ok, beyond)
}

/// [`cross_with`] as the target's baseline instructions compile it.
#[inline(never)]
fn cross_portable<const W: usize>(
    c: &Carrier<W>,
    at: &Crossing,
    ideal: bool,
    ok: &mut Mask<W>,
    beyond: &mut [Carrier<W>],
) {
    cross_with(c, at, ideal, ok, beyond)
}

/// One crossing by the build `ISA` of the kernel that calls it.
#[inline(always)]
fn cross<const ISA: u8, const W: usize>(
    carrier: &Carrier<W>,
    crossing: &Crossing,
    ideal: bool,
    ok: &mut Mask<W>,
    beyond: &mut [Carrier<W>],
) {
    // SAFETY (both calls): a kernel of build `ISA` runs only after `trace_lanes` has found its
    // instruction sets on the processor, the one requirement of the crossing of that build.
    #[cfg(target_arch = "x86_64")]
    match ISA {
        AVX512 => return unsafe { cross_avx512(carrier, crossing, ideal, ok, beyond) },
        AVX2 => return unsafe { cross_avx2(carrier, crossing, ideal, ok, beyond) },
        _ => {}
    }
    cross_portable(carrier, crossing, ideal, ok, beyond)
}
