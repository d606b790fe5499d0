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
//! Many incidences at once: `optics::planned_lanes::BlockedTrace` traces them in blocks side by
//! side, the same operations on a vector of incidences, and hands back to
//! [`PlannedTrace::trace`] the ones a block cannot finish (natively; the design worker's
//! WebAssembly has the planned trace without the lanes, the page's module neither).
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
//! Rounding. The modes, their rotation into the lab and the polar factor are written to repeat
//! the general tracer's operations on real numbers, so that directions and exit points come out
//! equal and powers differ only by the rounding of the transmission (the 2×2 inverse for the
//! general tracer's 4×4 elimination, about 10⁻¹⁵), of the phase factors the general tracer
//! multiplies in (|e^{iφ}| = 1 to about 10⁻¹⁶ per step) and of the order of a power's sum:
//! [`PLANNED_TRACE_AGREEMENT`] bounds the difference
//! (`tests/planned_trace.rs` holds it over generated stacks and incidences). The quotients are
//! kept as the complex ones round on purpose: written as products by reciprocals, they parted the
//! directions by 2·10⁻¹² at incidences just inside the critical margin, where
//! q_z = √(n² − |q_t|²) magnifies a last-place difference in q_t some ten-thousandfold.

use crate::optics::geometry::{Plane, face_frame};
use crate::optics::interface::Losses;
use crate::optics::modes::{CrystalSurfaces, beam_basis};
use crate::optics::stack::{Aperture, Contact, Element, Medium, Stack};
use crate::optics::uniaxial::Uniaxial;
use crate::precision::{DEGENERATE_DIRECTION, PLANNED_CRITICAL_MARGIN};
use nalgebra::{Matrix2, Matrix3, Vector3};

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

/// A propagating mode in a face's frame: wave vector, field E and Z0 H (unit power flux across
/// the face), unit ray direction.
#[derive(Debug, Clone, Copy)]
struct Wave {
    q: V3,
    e: V3,
    h: V3,
    ray: V3,
}

/// `Mode::build` of [`crate::optics::modes`] for a propagating wave, in real numbers; its ray is
/// made a unit vector only when `rays` asks (the waves beyond a face: the others' rays are not read).
#[inline(always)]
fn wave(q: V3, e: V3, ray: V3, rays: bool) -> Wave {
    let h = q.cross(&e);
    let sz = (e.x * h.y - e.y * h.x).abs();
    let scale = if sz > 0.0 { 1.0 / sz.sqrt() } else { 1.0 };
    Wave {
        q,
        e: e * scale,
        h: h * scale,
        ray: if rays { ray / ray.norm() } else { ray },
    }
}

/// √x, or `None` when the wave whose q_z² is x is evanescent or within the critical margin of it
/// (`scale` is n², the size of x's terms).
#[inline(always)]
fn propagating_root(x: f64, scale: f64) -> Option<f64> {
    (x > PLANNED_CRITICAL_MARGIN * scale).then(|| x.sqrt())
}

/// Both forward modes of `body` at tangential wave vector `qt`, in the face frame, as
/// `isotropic_modes` and `crystal_modes_with` find them; `None` when one is not safely
/// propagating or a wave runs along an optic axis. The backward modes are not made (the boundary
/// problem is solved without them, [`transmission`]); `backward` keeps the general tracer's tests
/// of their wave vectors (along an optic axis: `None`), so that the plan declines what it declines.
#[inline(always)]
fn modes(body: &Local, qt: [f64; 2], backward: bool, rays: bool) -> Option<[Wave; 2]> {
    let qt_norm = (qt[0] * qt[0] + qt[1] * qt[1]).sqrt();
    match body {
        Local::Isotropic(n) => {
            let n = *n;
            let qz = propagating_root((n - qt_norm) * (n + qt_norm), n * n)?;
            let q = V3::new(qt[0], qt[1], qz);
            let (e1, e2) = beam_basis(V3::new(qt[0] / n, qt[1] / n, qz / n));
            // (The backward waves of an isotropic body meet no test of their own.)
            let _ = backward;
            Some([wave(q, e1, q, rays), wave(q, e2, q, rays)])
        }
        Local::Uniaxial(crystal, surfaces) => {
            let no = crystal.indices.no;
            let m = &surfaces.surface;
            let qz_o = propagating_root((no - qt_norm) * (no + qt_norm), no * no)?;
            let a = m[(2, 2)];
            let b = m[(2, 0)] * qt[0] + m[(2, 1)] * qt[1];
            let c0 = m[(0, 0)] * qt[0] * qt[0] + 2.0 * m[(0, 1)] * qt[0] * qt[1] + m[(1, 1)] * qt[1] * qt[1] - 1.0;
            let disc = b * b - a * c0;
            if disc <= PLANNED_CRITICAL_MARGIN * (b * b + (a * c0).abs()) {
                return None;
            }
            let r = disc.sqrt();
            // Root (−b + s·r)/a, computed without cancellation.
            let e_root = |s: f64| {
                if s * b <= 0.0 {
                    (-b + s * r) / a
                } else {
                    c0 / (-b - s * r)
                }
            };
            let c = crystal.axis.unit();
            let along = |s: f64| (V3::new(qt[0], qt[1], s * qz_o), V3::new(qt[0], qt[1], e_root(s)));
            if backward {
                let (q_o, q_e) = along(-1.0);
                ordinary_field(&c, &q_o)?;
                ordinary_field(&c, &q_e)?;
            }
            let (q_o, q_e) = along(1.0);
            crystal_pair(&c, surfaces, q_o, q_e, rays)
        }
    }
}

/// The ordinary and extraordinary waves of wave vectors `q_o`, `q_e` in the crystal of optic axis
/// `c` and matrices `surfaces` (face frame), as `crystal_modes_with` forms them; `None` when a
/// wave runs along the optic axis.
#[inline(always)]
fn crystal_pair(c: &V3, surfaces: &CrystalSurfaces, q_o: V3, q_e: V3, rays: bool) -> Option<[Wave; 2]> {
    let inv_eps = &surfaces.inverse_permittivity;
    let d_o = ordinary_field(c, &q_o)?;
    let d_e = ordinary_field(c, &q_e)?.cross(&q_e);
    Some([
        wave(q_o, inv_eps * d_o, q_o, rays),
        wave(
            q_e,
            inv_eps * d_e,
            if rays { surfaces.surface * q_e } else { q_e },
            rays,
        ),
    ])
}

/// The ordinary D ∥ q × c of wave vector `q` in a crystal of optic axis `c`, made transverse (as
/// the closed form does; the complex quotient q·d / q·q of zero imaginary parts is
/// (q·d)(q·q) / (q·q)²); `None` when q runs along c.
#[inline(always)]
fn ordinary_field(c: &V3, q: &V3) -> Option<V3> {
    let d = q.cross(c);
    let qq = q.dot(q);
    if d.dot(&d) <= DEGENERATE_DIRECTION * DEGENERATE_DIRECTION * qq {
        return None;
    }
    let qd = q.dot(&d);
    Some(d - q * ((qd * qq) / (qq * qq)))
}

/// The transmission T of a face (`T[(j, k)]`: the amplitude of the transmitted wave `j` for unit
/// amplitude of the incident wave `k`) from the forward waves on its two sides, `from` and `into`;
/// `None` when the boundary problem is singular or nearly so.
///
/// Formula. With ⟨a, b⟩ = ẑ·(E_a × H_b + E_b × H_a) (tangential fields, face frame), waves of one
/// lossless medium at one tangential wave vector with different q_z are orthogonal, ⟨a, b⟩ = 0,
/// and ⟨a, a⟩ = 2 for a forward wave of unit power flux (the power orthogonality of modes: for a
/// real symmetric permittivity the 4×4 system matrix of D. W. Berreman, J. Opt. Soc. Am. 62, 502
/// (1972), is self-adjoint under this form; P. Yeh, *Optical Waves in Layered Media*, 1988,
/// ch. 9). Applied to the boundary condition a_k + Σ r_jk a′_j = Σ t_jk b_j (a′: the reflected
/// waves), ⟨a_i, ·⟩ leaves G t = 2 I with G_ij = ⟨a_i, b_j⟩: T = 2 G⁻¹, the general tracer's
/// transmission (its 4×4 elimination, [`crate::optics::interface`]) in exact arithmetic, without
/// the reflected waves. Declined where det G is not finite or within 10⁻¹² of zero relative to
/// |G|², as where that elimination meets a zero pivot; a passive face keeps |t| ≤ 1 in these
/// units, so |G⁻¹| ≤ ½ and a propagating face never comes near.
#[inline(always)]
fn transmission(from: &[Wave; 2], into: &[Wave; 2]) -> Option<Matrix2<f64>> {
    let form = |a: &Wave, b: &Wave| a.e.x * b.h.y - a.e.y * b.h.x + (b.e.x * a.h.y - b.e.y * a.h.x);
    let g = [
        [form(&from[0], &into[0]), form(&from[0], &into[1])],
        [form(&from[1], &into[0]), form(&from[1], &into[1])],
    ];
    let det = g[0][0] * g[1][1] - g[0][1] * g[1][0];
    // |G| summed in the column order of the lanes' `norm2`.
    let size = (g[0][0] * g[0][0] + g[1][0] * g[1][0] + g[0][1] * g[0][1] + g[1][1] * g[1][1]).sqrt();
    if !(det.is_finite() && det.abs() > 1e-12 * size * size) {
        return None;
    }
    let s = 2.0 / det;
    Some(Matrix2::new(g[1][1] * s, -g[0][1] * s, -g[1][0] * s, g[0][0] * s))
}

/// [`crate::optics::interface::lossless_part`] of a real T, in real numbers.
fn lossless_part(t: &Matrix2<f64>) -> Matrix2<f64> {
    let norm = t.norm();
    if norm.is_nan() || norm <= 0.0 || norm.is_infinite() {
        return Matrix2::zeros();
    }
    let t = t.map(|z| (z * norm) / (norm * norm));
    let det = t[(0, 0)] * t[(1, 1)] - t[(0, 1)] * t[(1, 0)];
    if det.abs() <= 1e-14 {
        return t;
    }
    // |det| / conj(det) of a real det, as the complex quotient rounds.
    let k = (det.abs() * det) / (det * det);
    let adj_h = Matrix2::new(t[(1, 1)], -t[(1, 0)], -t[(0, 1)], t[(0, 0)]);
    let m = t + adj_h * k;
    m * (2f64.sqrt() / m.norm())
}

/// `e`/|e|, as the complex quotient of zero imaginary parts rounds.
fn unit_field(e: &V3) -> V3 {
    let n = e.norm();
    if n > 0.0 { e.map(|z| (z * n) / (n * n)) } else { *e }
}

/// Where a ray's light is (lab frame), without its phase factor (module header).
#[derive(Debug, Clone, Copy)]
enum Carrier {
    /// In an isotropic body of index `n` along `u`: field on the basis of `u` is M·J_in.
    Free { n: f64, u: V3, m: Matrix2<f64> },
    /// In a crystal, in mode `kind` of wave vector `q`, ray `ray` and field `e`:
    /// amplitude `amp`·J_in.
    Bound {
        q: V3,
        ray: V3,
        e: V3,
        kind: usize,
        amp: [f64; 2],
    },
}

impl Carrier {
    fn q(&self) -> V3 {
        match self {
            Carrier::Free { n, u, .. } => u * *n,
            Carrier::Bound { q, .. } => *q,
        }
    }

    fn direction(&self) -> V3 {
        match self {
            Carrier::Free { u, .. } | Carrier::Bound { ray: u, .. } => *u,
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

/// A ray in flight.
#[derive(Debug, Clone, Copy)]
struct Flight {
    at: V3,
    exit: V3,
    carrier: Carrier,
    /// Its label's letters so far as bits (mode 1 = 1), first crystal highest.
    label: u32,
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
    flights: Vec<Flight>,
    next: Vec<Flight>,
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
            flights: Vec::with_capacity(1 << MAX_SLABS),
            next: Vec::with_capacity(1 << MAX_SLABS),
            rays: Vec::with_capacity(1 << MAX_SLABS),
        })
    }

    // What the lanes (native only) read of the plan.
    #[cfg(not(target_arch = "wasm32"))]
    pub(crate) fn ideal(&self) -> bool {
        self.losses == Losses::Ideal
    }

    #[cfg(not(target_arch = "wasm32"))]
    pub(crate) fn outside(&self) -> f64 {
        self.outside
    }

    #[cfg(not(target_arch = "wasm32"))]
    pub(crate) fn slabs(&self) -> &[PlannedSlab] {
        &self.slabs
    }

    #[cfg(not(target_arch = "wasm32"))]
    pub(crate) fn coherency(&self) -> [f64; 3] {
        self.coherency
    }

    #[cfg(not(target_arch = "wasm32"))]
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
        self.flights.clear();
        self.rays.clear();
        self.flights.push(Flight {
            at: V3::zeros(),
            exit: V3::zeros(),
            carrier: Carrier::Free {
                n: self.outside,
                u,
                m: Matrix2::identity(),
            },
            label: 0,
        });
        let ideal = self.losses == Losses::Ideal;
        for slab in &self.slabs {
            self.next.clear();
            for f in &self.flights {
                let mut f = *f;
                let entered = match &slab.entry {
                    Entry::Outside(crossing) => {
                        if !travel(&mut f, &slab.front) || slab.aperture.is_some_and(|a| !a.holds(f.at)) {
                            continue;
                        }
                        cross(&f.carrier, crossing, ideal)?
                    }
                    Entry::Contact(first, None) => cross(&f.carrier, first, ideal)?,
                    Entry::Contact(first, Some(second)) => {
                        let [Some(in_film), None] = cross(&f.carrier, first, ideal)? else {
                            return None;
                        };
                        cross(&in_film, second, ideal)?
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
                    if !travel(&mut g, &slab.back) || slab.aperture.is_some_and(|a| !a.holds(g.at)) {
                        continue;
                    }
                    match &slab.exit {
                        Some(out) => {
                            let [Some(c), None] = cross(&g.carrier, out, ideal)? else {
                                return None;
                            };
                            self.next.push(Flight {
                                exit: g.at,
                                carrier: c,
                                ..g
                            });
                        }
                        None => self.next.push(g),
                    }
                }
            }
            std::mem::swap(&mut self.flights, &mut self.next);
        }
        let [c11, c22, c12] = self.coherency;
        for f in &self.flights {
            let Carrier::Free { u, m, .. } = f.carrier else {
                continue;
            };
            // The screen is met along the ray's whole line (as the general tracer meets it).
            if self.screen.normal.dot(&u).abs() < 1e-15 {
                continue;
            }
            let power = (0..2)
                .map(|i| {
                    let (a, b) = (m[(i, 0)], m[(i, 1)]);
                    a * a * c11 + b * b * c22 + 2.0 * a * b * c12
                })
                .sum();
            self.rays.push(PlannedRay {
                label: f.label,
                power,
                direction: u,
                exit_point_mm: f.exit,
            });
        }
        Some(&self.rays)
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

/// Moves a ray along its direction to `plane`; false when it cannot get there.
fn travel(f: &mut Flight, plane: &Plane) -> bool {
    let dir = f.carrier.direction();
    match plane.meet(f.at, dir) {
        Some(s) => {
            f.at += dir * s;
            true
        }
        None => false,
    }
}

/// Crosses one face for one ray (the general tracer's `Tracer::cross` for propagating modes):
/// the rays beyond it, at most one per mode (into an isotropic body, one ray in slot 0); `None`
/// when a mode is not safely propagating, the carrier's modes share their wave vector, or the
/// boundary problem is singular.
fn cross(carrier: &Carrier, crossing: &Crossing, ideal: bool) -> Option<[Option<Carrier>; 2]> {
    let Frame { frame, to_face } = &crossing.frame;
    let q_face = to_face * carrier.q();
    let qt = [q_face.x, q_face.y];
    let a_fwd = modes(&crossing.from, qt, true, false)?;
    let b_fwd = modes(&crossing.into, qt, false, true)?;
    // The carrier as amplitudes of the incident modes (rows), each a functional of J_in.
    let mut a_in = Matrix2::zeros();
    match carrier {
        Carrier::Free { u, m, .. } => {
            let (e1, e2) = beam_basis(*u);
            for (j, mode) in a_fwd.iter().enumerate() {
                let ej = unit_field(&(frame * mode.e));
                let p = [ej.dot(&e1), ej.dot(&e2)];
                for c in 0..2 {
                    a_in[(j, c)] = p[0] * m[(0, c)] + p[1] * m[(1, c)];
                }
            }
        }
        Carrier::Bound { e, kind, amp, .. } => {
            // (Their distance in the face's frame: the same as in the lab's, a rotation apart.)
            if (a_fwd[0].q - a_fwd[1].q).norm() <= DEGENERATE_DIRECTION {
                return None;
            }
            // The ray is the incident mode of its own kind, up to the sign of the projection of
            // its field on that mode's (the general tracer's unit-modulus p/|p|).
            let p = (frame * a_fwd[*kind].e).dot(e);
            if p != 0.0 {
                let s = p.signum();
                for c in 0..2 {
                    a_in[(*kind, c)] = s * amp[c];
                }
            }
        }
    }
    let t = transmission(&a_fwd, &b_fwd)?;
    let t = if ideal { lossless_part(&t) } else { t };
    let out = t * a_in;
    let lab = |w: &Wave| (frame * w.q, frame * w.ray, frame * w.e);
    match crossing.into {
        Local::Isotropic(n) => {
            let (_, u, _) = lab(&b_fwd[0]);
            let (e1, e2) = beam_basis(u);
            let mut m = Matrix2::zeros();
            for (k, w) in b_fwd.iter().enumerate() {
                let ek = unit_field(&(frame * w.e));
                let d = [e1.dot(&ek), e2.dot(&ek)];
                for i in 0..2 {
                    for c in 0..2 {
                        m[(i, c)] += d[i] * out[(k, c)];
                    }
                }
            }
            Some([Some(Carrier::Free { n, u, m }), None])
        }
        Local::Uniaxial(..) => {
            let bound = |k: usize| {
                let (q, ray, e) = lab(&b_fwd[k]);
                Carrier::Bound {
                    q,
                    ray,
                    e,
                    kind: k,
                    amp: [out[(k, 0)], out[(k, 1)]],
                }
            };
            Some([Some(bound(0)), Some(bound(1))])
        }
    }
}
