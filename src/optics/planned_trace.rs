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
//! of which ideal faces take the unitary polar factor (K. Fan and A. J. Hoffman, Proc. AMS 6, 111
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
//! seven face crossings for two wedges (one, two, four rays), each three mode pairs and one real
//! 4×4 solve, no allocation.
//!
//! Many incidences at once: `optics::planned_lanes::BlockedTrace` traces them in blocks side by
//! side, the same operations on a vector of incidences, and hands back to
//! [`PlannedTrace::trace`] the ones a block cannot finish (natively; the design worker's
//! WebAssembly has the planned trace without the lanes, the page's module neither).
//!
//! One plate alone: [`parallel_plate`] gives a plane-parallel plate's two face couplings in
//! real numbers from the same modes (the faces solved by eliminating the reflected waves, a 2×2
//! inverse, rather than by the 4×4 elimination), for convergent light
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
//! Rounding. The modes, their rotation into the lab, the 4×4 elimination (same pivots) and the
//! polar factor are written to repeat the general tracer's operations on real numbers, so that
//! directions and exit points come out equal and powers differ only by the rounding of the
//! phase factors the general tracer multiplies in (|e^{iφ}| = 1 to about 10⁻¹⁶ per step) and of
//! the order of a power's sum: [`PLANNED_TRACE_AGREEMENT`] bounds the difference
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

/// Both modes of `body` at tangential wave vector `qt`, travelling forward (`[0]`) and backward
/// (`[1]`), in the face frame, as `isotropic_modes` and `crystal_modes_with` find them (the roots
/// shared by the two travels taken once); `None` when one is not safely propagating or a wave
/// runs along an optic axis. `backward` false leaves the backward pair out (a copy of the forward
/// one).
#[inline(always)]
fn modes(body: &Local, qt: [f64; 2], backward: bool, rays: bool) -> Option<[[Wave; 2]; 2]> {
    let qt_norm = (qt[0] * qt[0] + qt[1] * qt[1]).sqrt();
    match body {
        Local::Isotropic(n) => {
            let n = *n;
            let qz = propagating_root((n - qt_norm) * (n + qt_norm), n * n)?;
            let q = V3::new(qt[0], qt[1], qz);
            let (e1, e2) = beam_basis(V3::new(qt[0] / n, qt[1] / n, qz / n));
            let forward = [wave(q, e1, q, rays), wave(q, e2, q, rays)];
            if !backward {
                return Some([forward, forward]);
            }
            let mirror = |e: V3| V3::new(e.x, e.y, -e.z);
            let qb = V3::new(qt[0], qt[1], -qz);
            Some([
                forward,
                [wave(qb, mirror(e1), qb, rays), wave(qb, mirror(e2), qb, rays)],
            ])
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
            let pair = |s: f64| {
                crystal_pair(
                    &c,
                    surfaces,
                    V3::new(qt[0], qt[1], s * qz_o),
                    V3::new(qt[0], qt[1], e_root(s)),
                    rays,
                )
            };
            let forward = pair(1.0)?;
            Some([forward, if backward { pair(-1.0)? } else { forward }])
        }
    }
}

/// The ordinary and extraordinary waves of wave vectors `q_o`, `q_e` in the crystal of optic axis
/// `c` and matrices `surfaces` (face frame), as `crystal_modes_with` forms them; `None` when a
/// wave runs along the optic axis.
#[inline(always)]
fn crystal_pair(c: &V3, surfaces: &CrystalSurfaces, q_o: V3, q_e: V3, rays: bool) -> Option<[Wave; 2]> {
    // Ordinary D ∥ q × c made transverse (as the closed form does; the complex quotient q·d / q·q
    // of zero imaginary parts is (q·d)(q·q) / (q·q)²).
    let d_o_of = |q: &V3| -> Option<V3> {
        let d = q.cross(c);
        let qq = q.dot(q);
        if d.dot(&d) <= DEGENERATE_DIRECTION * DEGENERATE_DIRECTION * qq {
            return None;
        }
        let qd = q.dot(&d);
        Some(d - q * ((qd * qq) / (qq * qq)))
    };
    let inv_eps = &surfaces.inverse_permittivity;
    let d_o = d_o_of(&q_o)?;
    let d_e = d_o_of(&q_e)?.cross(&q_e);
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

/// Solves m·x = b for two right-hand sides by the elimination of `interface::solve4` (the
/// largest pivot, the last of equals; the quotients of complex numbers with zero imaginary
/// parts written as they round); `None` when a pivot is zero or a result is not finite.
// Written with indices as the elimination it repeats is, row and column alike.
#[allow(clippy::needless_range_loop)]
fn solve4(mut m: [[f64; 4]; 4], b: [[f64; 4]; 2]) -> Option<[[f64; 4]; 2]> {
    let mut x = b;
    for col in 0..4 {
        let mut pivot = col;
        for row in col + 1..4 {
            if m[row][col].abs() >= m[pivot][col].abs() {
                pivot = row;
            }
        }
        if m[pivot][col] == 0.0 {
            return None;
        }
        if pivot != col {
            m.swap(pivot, col);
            for v in &mut x {
                v.swap(pivot, col);
            }
        }
        let p = m[col][col];
        let inv = p / (p * p);
        for row in col + 1..4 {
            let f = m[row][col] * inv;
            if f == 0.0 {
                continue;
            }
            for k in col + 1..4 {
                let a = m[col][k];
                m[row][k] -= f * a;
            }
            for v in &mut x {
                let a = v[col];
                v[row] -= f * a;
            }
        }
    }
    for v in &mut x {
        for row in (0..4).rev() {
            let mut acc = v[row];
            for k in row + 1..4 {
                acc -= m[row][k] * v[k];
            }
            let d = m[row][row];
            v[row] = (acc * d) / (d * d);
        }
    }
    x.iter().flatten().all(|z| z.is_finite()).then_some(x)
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

/// The transmission of a face in real numbers (entry (i, j) the amplitude of transmitted wave i
/// for unit incident wave j; its unitary polar factor when `ideal`, as `parallel::slab_couplings`
/// takes it), by eliminating the reflected waves instead of the 4×4 elimination of [`cross`]:
/// with the tangential fields of each pair of waves as 2×2 matrices (columns the waves, E = (E_x,
/// E_y), H = (Z0 H_x, Z0 H_y)), continuity E_I + E_R r = E_T t and H_I + H_R r = H_T t give, with
/// the reflected waves' admittance Y = H_R E_R⁻¹,
///
/// ```text
/// t = (H_T − Y E_T)⁻¹ (H_I − Y E_I),
/// ```
///
/// the same t to rounding (`optics::conoscope` tests it against the complex 4×4 solve), at a
/// fraction of the work. `None` when E_R or H_T − Y E_T is singular or nearly so (a determinant
/// under 10⁻⁹ of its columns' norms' product), where the pivoted elimination is the safer one.
#[inline(always)]
fn block_transmission(
    incident: &[Wave; 2],
    reflected: &[Wave; 2],
    transmitted: &[Wave; 2],
    ideal: bool,
) -> Option<Matrix2<f64>> {
    let e = |w: &[Wave; 2]| Matrix2::new(w[0].e.x, w[1].e.x, w[0].e.y, w[1].e.y);
    let h = |w: &[Wave; 2]| Matrix2::new(w[0].h.x, w[1].h.x, w[0].h.y, w[1].h.y);
    let y = h(reflected) * safe_inverse(&e(reflected))?;
    let t = safe_inverse(&(h(transmitted) - y * e(transmitted)))? * (h(incident) - y * e(incident));
    Some(if ideal { lossless_part(&t) } else { t })
}

/// The inverse of a 2×2 matrix by its adjugate, `None` when its determinant is under 10⁻⁹ of the
/// product of its columns' norms (nearly parallel columns).
#[inline(always)]
fn safe_inverse(m: &Matrix2<f64>) -> Option<Matrix2<f64>> {
    let det = m[(0, 0)] * m[(1, 1)] - m[(0, 1)] * m[(1, 0)];
    let scale = m.column(0).norm() * m.column(1).norm();
    (det.abs() > 1e-9 * scale).then(|| Matrix2::new(m[(1, 1)], -m[(0, 1)], -m[(1, 0)], m[(0, 0)]) / det)
}

/// The outside medium's waves at one tangential wave vector, forward then backward, as
/// [`parallel_plate`] takes them: found once for every plate and wavelength of a direction.
#[derive(Debug, Clone, Copy)]
pub(crate) struct OutsideWaves([[Wave; 2]; 2]);

/// The waves of the outside medium of index `outside` at tangential wave vector `qt`, as
/// `isotropic_modes` gives them; `None` when they are not safely propagating.
pub(crate) fn outside_waves(outside: f64, qt: [f64; 2]) -> Option<OutsideWaves> {
    modes(&Local::Isotropic(outside), qt, true, false).map(OutsideWaves)
}

/// A plane-parallel plate of `crystal` (lab frame, both faces across z) between half-spaces of
/// the outside medium whose waves at tangential wave vector `qt` are `outside`, in real numbers:
/// its entry coupling (outside beam basis to the crystal's modes, o then e), its exit coupling
/// (the modes to the outside beam basis) and its forward modes' q_z, as
/// `parallel::slab_couplings` and `crystal_modes` give them for propagating modes, to rounding
/// (`optics::conoscope` tests the agreement). `None` where this module declines an incidence: a
/// wave not safely propagating, a wave along the optic axis, a singular face.
pub(crate) fn parallel_plate(
    crystal: &Uniaxial,
    surfaces: &CrystalSurfaces,
    outside: &OutsideWaves,
    qt: [f64; 2],
    ideal: bool,
) -> Option<(Matrix2<f64>, Matrix2<f64>, [f64; 2])> {
    let [out_fwd, out_back] = &outside.0;
    let [fwd, back] = modes(&Local::Uniaxial(*crystal, *surfaces), qt, true, false)?;
    let t_in = block_transmission(out_fwd, out_back, &fwd, ideal)?;
    let t_out = block_transmission(&fwd, &back, out_fwd, ideal)?;
    Some((t_in, t_out, [fwd[0].q.z, fwd[1].q.z]))
}

/// Crosses one face for one ray (the general tracer's `Tracer::cross` for propagating modes):
/// the rays beyond it, at most one per mode (into an isotropic body, one ray in slot 0); `None`
/// when a mode is not safely propagating, the carrier's modes share their wave vector, or the
/// boundary problem is singular.
fn cross(carrier: &Carrier, crossing: &Crossing, ideal: bool) -> Option<[Option<Carrier>; 2]> {
    let Frame { frame, to_face } = &crossing.frame;
    let q_face = to_face * carrier.q();
    let qt = [q_face.x, q_face.y];
    let [a_fwd, a_back] = modes(&crossing.from, qt, true, false)?;
    let [b_fwd, _] = modes(&crossing.into, qt, false, true)?;
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
    let tangential = |w: &Wave| [w.e.x, w.e.y, w.h.x, w.h.y];
    let mut m = [[0.0; 4]; 4];
    for (col, w) in [(0, &a_back[0]), (1, &a_back[1]), (2, &b_fwd[0]), (3, &b_fwd[1])] {
        let f = tangential(w);
        let sign = if col < 2 { -1.0 } else { 1.0 };
        for row in 0..4 {
            m[row][col] = sign * f[row];
        }
    }
    let x = solve4(m, [tangential(&a_fwd[0]), tangential(&a_fwd[1])])?;
    let t = Matrix2::new(x[0][2], x[1][2], x[0][3], x[1][3]);
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
