//! The general trace: faces at any angle, wedges, tilted and mounted plates, cemented and
//! directly contacted pairs, total internal reflection and apertures.
//!
//! Physics (CONVENTIONS.md, version 2). Each ray is a plane wave of one mode with a real wave
//! vector q = k/k0 and a ray (Poynting) direction S. At a face of unit normal n:
//! - the face is solved in its own frame (z along n, see [`crate::optics::geometry`]): the
//!   tangential part of q is conserved, both modes of the medium beyond are found at it (the
//!   uniaxial closed form of [`crate::optics::modes`], with the optic axis rotated into the
//!   frame, or the general crystal's 4×4 solver of [`crate::optics::general_modes`]), the root whose energy flows away from the face is taken, and the 4×4 boundary
//!   problem of [`crate::optics::interface`] gives power-normalized transmission and reflection;
//! - ideal faces take the lossless part of the transmission, uncoated faces the bare one;
//! - a mode beyond the face that is evanescent reflects what would have gone into it: when that
//!   happens (total internal reflection of one or both modes) the reflected light is reported as
//!   rejected rays, one per reflected mode, with the reflected direction, point and power; without
//!   it, light reflected at an uncoated face is counted in the element's reflected power, as in
//!   version 1;
//! - a ray follows S to the next face; one that meets a face outside the element's aperture is
//!   rejected there.
//!
//! Amplitudes are power amplitudes: a ray's power is |a|² (or tr(M C Mᴴ) for partly polarized
//! input), unchanged between faces. In an isotropic medium a ray carries a 2×2 matrix M from the
//! input Jones vector to its field on its own basis (e1, e2) of [`crate::optics::modes::beam_basis`];
//! in a crystal, one row: its mode's amplitude. The phase is the eikonal Σ k0 q·Δr along the ray;
//! at the screen it is referred to the screen's axis point (0, 0, z_screen) by subtracting
//! k0 n u_t·r_t, the plane-wave phase across the screen, so that for plane-parallel plates it is
//! exactly version 1's Σ k0 q_z L (tested against [`crate::optics::trace`]).
//!
//! Vanishing films (the default "air" contact and cement) are crossed as two faces at one point:
//! into the film and out of it, with no phase in between and no multiple reflection, so that total
//! internal reflection at an air gap or a cement layer rejects a mode as in a prism polarizer.

use crate::optics::anisotropic::Anisotropic;
use crate::optics::general_modes::general_modes;
use crate::optics::geometry::{Plane, face_frame};
use crate::optics::interface::{CMatrix2, Losses, bare_face, lossless_part};
use crate::optics::jones::JonesMatrix;
use crate::optics::lc::stratified::cell_jones_at;
use crate::optics::modes::{CrystalSurfaces, Mode, Travel, beam_basis, crystal_modes_with, isotropic_modes};
use crate::optics::spots::{coherency, power_of};
use crate::optics::stack::{CellLayer, Contact, Element, Faces, Medium, Slab, Stack};
use crate::optics::traced::{LayerTrace, Path, RejectReason, Rejected, Side, Trace};
use crate::optics::uniaxial::Uniaxial;
use crate::precision::{DEGENERATE_DIRECTION, POWER_ROUNDING};
use nalgebra::{Matrix3, RowVector2, Vector3};
use num_complex::Complex64;
use std::cell::RefCell;

/// What light meets at a face: an isotropic body of some index, or a crystal.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Body {
    Isotropic(f64),
    Crystal(Medium),
}

/// A body seen in a face's own frame, with what its modes need formed once.
#[derive(Debug, Clone, Copy)]
enum Local {
    Isotropic(f64),
    Uniaxial(Uniaxial, CrystalSurfaces),
    General(Anisotropic),
}

impl Local {
    /// `body` in the frame that `to_face` (the transposed face frame) rotates the lab into.
    fn of(body: Body, to_face: &Matrix3<f64>) -> Local {
        match body {
            Body::Isotropic(n) => Local::Isotropic(n),
            Body::Crystal(c) => match c.rotated(to_face) {
                Medium::Uniaxial(u) => Local::Uniaxial(u, CrystalSurfaces::of(&u)),
                Medium::Anisotropic(a) => Local::General(a),
            },
        }
    }

    /// Both modes (face frame) at tangential wave vector `qt`.
    fn modes(&self, qt: [f64; 2], travel: Travel) -> [Mode; 2] {
        match self {
            Local::Isotropic(n) => isotropic_modes(*n, qt, travel),
            Local::Uniaxial(u, surfaces) => crystal_modes_with(u, surfaces, qt, travel),
            Local::General(a) => general_modes(a, qt, travel),
        }
    }
}

/// A body at a face: the face's frame (columns: its axes in the lab), its transpose and the
/// body seen in it. Found once per face and body and kept while a stack is traced (and, by a
/// [`PlanarTracer`], from one trace to the next).
#[derive(Debug, Clone, Copy)]
struct Seen {
    normal: Vector3<f64>,
    body: Body,
    frame: Matrix3<f64>,
    to_face: Matrix3<f64>,
    local: Local,
}

/// At most this many bodies at faces are kept from one trace to the next: a stack has a handful;
/// a tracer that has met more (stacks that change from trace to trace) starts the next afresh.
const SEEN_KEPT: usize = 32;

/// The index in `seen` of `body` at the face of unit normal `normal`, added when new.
fn seen_at(seen: &mut Vec<Seen>, normal: Vector3<f64>, body: Body) -> usize {
    if let Some(i) = seen.iter().position(|s| s.normal == normal && s.body == body) {
        return i;
    }
    let frame = face_frame(normal);
    let to_face = frame.transpose();
    seen.push(Seen {
        normal,
        body,
        frame,
        to_face,
        local: Local::of(body, &to_face),
    });
    seen.len() - 1
}

/// Where a ray's light is.
#[derive(Debug, Clone)]
enum Carrier {
    /// In an isotropic body of index `n`, along `u`: field on the basis of `u` is M·J_in.
    Free { n: f64, u: Vector3<f64>, m: JonesMatrix },
    /// In a crystal, in one mode (lab frame): its amplitude is `amp`·J_in.
    Bound { mode: Mode, amp: RowVector2<Complex64> },
}

impl Carrier {
    /// Normalized wave vector (real: rays are propagating waves).
    fn q(&self) -> Vector3<f64> {
        match self {
            Carrier::Free { n, u, .. } => u * *n,
            Carrier::Bound { mode, .. } => mode.wave_vector(),
        }
    }

    /// Direction of travel (of energy).
    fn direction(&self) -> Vector3<f64> {
        match self {
            Carrier::Free { u, .. } => *u,
            Carrier::Bound { mode, .. } => mode.ray_direction().unwrap_or_else(|| mode.wave_vector().normalize()),
        }
    }

    /// Power for an input of Stokes vector `s_in`.
    fn power(&self, s_in: &[f64; 4]) -> f64 {
        match self {
            Carrier::Free { m, .. } => power_of(m, s_in),
            Carrier::Bound { amp, .. } => (amp * coherency(s_in) * amp.adjoint())[(0, 0)].re,
        }
    }

    /// Multiplies the amplitude by e^{iφ}.
    fn advance_phase(&mut self, phi: f64) {
        let f = Complex64::from_polar(1.0, phi);
        match self {
            Carrier::Free { m, .. } => *m *= f,
            Carrier::Bound { amp, .. } => *amp *= f,
        }
    }
}

/// Where rays have been, kept once for all of them: each ray holds the index of its last point
/// and of the last letter of its label, and rays that split share what came before, so that a
/// crossing copies no list.
#[derive(Debug, Default)]
struct Trails {
    /// (the point before, point in mm).
    points: Vec<(u32, [f64; 3])>,
    /// (the letter before, letter).
    letters: Vec<(u32, char)>,
}

/// The index before the first point or letter.
const START: u32 = u32::MAX;

impl Trails {
    fn point(&mut self, before: u32, p: [f64; 3]) -> u32 {
        self.points.push((before, p));
        (self.points.len() - 1) as u32
    }

    fn letter(&mut self, before: u32, c: char) -> u32 {
        self.letters.push((before, c));
        (self.letters.len() - 1) as u32
    }

    /// The points up to and including `last`, first to last.
    fn points_to(&self, mut last: u32) -> Vec<[f64; 3]> {
        let mut out = Vec::new();
        while let Some(&(before, p)) = self.points.get(last as usize) {
            out.push(p);
            last = before;
        }
        out.reverse();
        out
    }

    /// The label ending in letter `last`.
    fn label_to(&self, mut last: u32) -> String {
        let mut out = Vec::new();
        while let Some(&(before, c)) = self.letters.get(last as usize) {
            out.push(c);
            last = before;
        }
        out.iter().rev().collect()
    }
}

/// One ray in flight.
#[derive(Debug, Clone)]
struct Flight {
    /// Its label's last letter in [`Trails`].
    label: u32,
    at: Vector3<f64>,
    phase: f64,
    /// Its last point in [`Trails`].
    points: u32,
    carrier: Carrier,
    /// Set while the ray waits at a slab's back face for its exit to be decided (by the next
    /// element's contact): the slab's index and body.
    pending: Option<(usize, Body)>,
    /// Where it left the last face it crossed.
    exit: Vector3<f64>,
}

fn arr(v: Vector3<f64>) -> [f64; 3] {
    [v.x, v.y, v.z]
}

/// Unit real part of a (propagating) field vector.
fn unit_field(mode: &Mode) -> Vector3<Complex64> {
    let n = mode.e.norm();
    if n > 0.0 { mode.e / Complex64::from(n) } else { mode.e }
}

/// The share of the unit-power wave `own` in the mode `onto` of a flux-orthonormal pair across
/// the face of unit normal `normal` (both lab frame): F(own, onto)/√F(own, own), with
/// F(a, b) = ½ (a.E × b.h* + b.E* × a.h)·n the cross flux, so that the two shares' squares add
/// to 1.
fn flux_share(own: &Mode, onto: &Mode, normal: Vector3<f64>) -> Complex64 {
    let n = normal.map(Complex64::from);
    let f = |a: &Mode, b: &Mode| {
        let hb = b.h.map(|z| z.conj());
        let eb = b.e.map(|z| z.conj());
        (a.e.cross(&hb) + eb.cross(&a.h)).dot(&n) * 0.5
    };
    let own_flux = f(own, own).re.abs().sqrt();
    if own_flux > 0.0 {
        f(own, onto) / own_flux
    } else {
        Complex64::ZERO
    }
}

/// The result of one face crossing.
struct Crossed {
    /// Rays beyond the face (at most one per mode), with the letter of their mode ('o'/'e') when
    /// beyond is a crystal.
    onward: [Option<(Carrier, Option<char>)>; 2],
    /// Rays reflected back by total internal reflection (at most one per mode): (direction,
    /// power share weight).
    reflected: [Option<(Vector3<f64>, f64)>; 2],
    /// Whether a mode beyond the face is evanescent (total internal reflection).
    tir: bool,
}

/// The general tracer's state: the stack and the input's coherency, shared by every crossing.
struct Tracer<'a> {
    stack: &'a Stack,
    k0: f64,
    s_in: [f64; 4],
    trails: RefCell<Trails>,
    seen: RefCell<Vec<Seen>>,
}

impl Tracer<'_> {
    /// Crosses a face of unit normal `normal` from `from` (the carrier's body) into `into`.
    fn cross(&self, carrier: &Carrier, from: Body, into: Body, normal: Vector3<f64>) -> Crossed {
        let (a_fwd, a_back, b_fwd, frame) = {
            let mut seen = self.seen.borrow_mut();
            let (i, j) = (seen_at(&mut seen, normal, from), seen_at(&mut seen, normal, into));
            let (a, b) = (&seen[i], &seen[j]);
            let q_face = a.to_face * carrier.q();
            let qt = [q_face.x, q_face.y];
            (
                a.local.modes(qt, Travel::Forward),
                a.local.modes(qt, Travel::Backward),
                b.local.modes(qt, Travel::Forward),
                a.frame,
            )
        };
        let lab = |m: &Mode| m.rotated(&frame);
        let (a_fwd_lab, b_lab) = (a_fwd.map(|m| lab(&m)), b_fwd.map(|m| lab(&m)));
        // The carrier as amplitudes of the incident modes (rows), each a functional of J_in.
        let mut a_in = CMatrix2::zeros();
        for (j, mode) in a_fwd_lab.iter().enumerate() {
            if !mode.propagating {
                continue;
            }
            let ej = unit_field(mode);
            match carrier {
                Carrier::Free { u, m, .. } => {
                    let (e1, e2) = beam_basis(*u);
                    let p = [e1, e2].map(|e| ej.dot(&e.map(Complex64::from)).conj());
                    for c in 0..2 {
                        a_in[(j, c)] = p[0] * m[(0, c)] + p[1] * m[(1, c)];
                    }
                }
                Carrier::Bound { mode: own, amp } => {
                    // The ray is one plane wave: it is the incident mode of its own kind, or, where
                    // the two modes share their wave vector (along an optic axis), its projection
                    // on both. Modes of different wave vectors are not orthogonal in E.
                    let shared = (a_fwd_lab[0].q - a_fwd_lab[1].q).norm() <= DEGENERATE_DIRECTION;
                    let p = ej.dotc(&unit_field(own));
                    let p = if shared && matches!(from, Body::Crystal(Medium::Anisotropic(_))) {
                        // A general crystal's degenerate pair is flux-orthonormal across this face
                        // but its fields need not be orthogonal: the share of each is the flux
                        // product with the ray's wave, itself brought to unit flux here.
                        flux_share(own, mode, normal)
                    } else if shared {
                        p
                    } else if mode.kind == own.kind && p.norm() > 0.0 {
                        p / Complex64::from(p.norm())
                    } else {
                        Complex64::ZERO
                    };
                    for c in 0..2 {
                        a_in[(j, c)] = p * amp[c];
                    }
                }
            }
        }
        let Some(coupling) = bare_face(&a_fwd, &a_back, &b_fwd) else {
            return Crossed {
                onward: [None, None],
                reflected: [None, None],
                tir: false,
            };
        };
        let mut t_prop = coupling.propagating_t();
        // An evanescent incident wave brings no power: its column (normalized to unit field, not
        // unit flux) has no place in the lossless part, which maps incident powers to
        // transmitted ones. Left in, it took a share of the normalization of a rank-one T.
        for (j, mode) in a_fwd.iter().enumerate() {
            if !mode.propagating {
                t_prop[(0, j)] = Complex64::ZERO;
                t_prop[(1, j)] = Complex64::ZERO;
            }
        }
        let t = match self.stack.losses {
            Losses::Ideal => lossless_part(&t_prop),
            Losses::Uncoated => t_prop,
        };
        let out = t * a_in;
        let tir = b_fwd.iter().any(|m| !m.propagating);
        let mut onward = [None, None];
        match into {
            Body::Isotropic(n) => {
                if let Some(u) = b_lab[0].ray_direction() {
                    let (e1, e2) = beam_basis(u);
                    let mut m = JonesMatrix::zeros();
                    for (k, mode) in b_lab.iter().enumerate() {
                        let ek = unit_field(mode);
                        let d = [e1, e2].map(|e| e.map(Complex64::from).dot(&ek));
                        for i in 0..2 {
                            for c in 0..2 {
                                m[(i, c)] += d[i] * out[(k, c)];
                            }
                        }
                    }
                    onward[0] = Some((Carrier::Free { n, u, m }, None));
                }
            }
            Body::Crystal(medium) => {
                let letters = medium.letters();
                for (k, mode) in b_lab.iter().enumerate() {
                    if mode.propagating {
                        let letter = letters[k];
                        let amp = RowVector2::new(out[(k, 0)], out[(k, 1)]);
                        onward[k] = Some((Carrier::Bound { mode: *mode, amp }, Some(letter)));
                    }
                }
            }
        }
        let reflected = if tir {
            let r_out = coupling.r * a_in;
            let c = coherency(&self.s_in);
            let mut out = [None, None];
            for (k, m) in a_back.iter().enumerate().filter(|(_, m)| m.propagating) {
                let row = RowVector2::new(r_out[(k, 0)], r_out[(k, 1)]);
                let w = (row * c * row.adjoint())[(0, 0)].re;
                out[k] = lab(m).ray_direction().map(|d| (d, w));
            }
            // Back into an isotropic medium both reflected waves leave along one direction: they
            // are one ray, whatever basis splits them.
            if let (Body::Isotropic(_), [Some((d, w0)), Some((_, w1))]) = (from, out) {
                out = [Some((d, w0 + w1)), None];
            }
            out
        } else {
            [None, None]
        };
        Crossed { onward, reflected, tir }
    }

    /// Moves a ray along its direction to `plane`, adding the eikonal phase; false when it
    /// cannot get there (it runs parallel to the plane or away from it).
    fn travel(&self, f: &mut Flight, plane: &Plane) -> bool {
        let dir = f.carrier.direction();
        match plane.meet(f.at, dir) {
            Some(s) => self.advance(f, dir * s),
            None => false,
        }
    }

    /// Moves a ray by `step` (mm) along a straight line, with the eikonal phase k0 q·step.
    fn advance(&self, f: &mut Flight, step: Vector3<f64>) -> bool {
        let phi = self.k0 * f.carrier.q().dot(&step);
        f.carrier.advance_phase(phi);
        f.phase += phi;
        f.at += step;
        f.points = self.trails.borrow_mut().point(f.points, arr(f.at));
        true
    }
}

/// Bookkeeping of one element while rays pass.
#[derive(Debug, Clone, Copy, Default)]
struct Tally {
    power_in: f64,
    power_out: f64,
    reflected: f64,
}

/// Traces a stack whose faces may lie at any angle (every stack can be traced so; plane-parallel
/// stacks take [`crate::optics::trace::trace`], which agrees with this to rounding).
pub fn trace_planar(stack: &Stack) -> Trace {
    PlanarTracer::default().trace(stack)
}

/// The face-by-face tracer kept from one trace to the next: each face's frame and the media seen
/// in it (rotated crystals with their matrices) are found once, and the trails' lists keep their
/// room, so that tracing one stack at many incidences (a sweep, a tolerance run, a spectrum's
/// points at one wavelength's media) sets none of it up again. The traces are those of
/// [`trace_planar`], number for number.
#[derive(Debug, Default)]
pub struct PlanarTracer {
    trails: Trails,
    seen: Vec<Seen>,
}

impl PlanarTracer {
    /// Traces `stack` as [`trace_planar`] does.
    pub fn trace(&mut self, stack: &Stack) -> Trace {
        let mut trails = std::mem::take(&mut self.trails);
        trails.points.clear();
        trails.letters.clear();
        let mut seen = std::mem::take(&mut self.seen);
        if seen.len() > SEEN_KEPT {
            seen.clear();
        }
        let (traced, tracer) = trace_with(stack, trails, seen);
        self.trails = tracer.trails.into_inner();
        self.seen = tracer.seen.into_inner();
        traced
    }
}

/// The trace of `stack` with `trails` (empty, their room kept) and the bodies `seen` at faces so
/// far; returns the trace and the tracer, whose lists the next trace takes over.
fn trace_with(stack: &Stack, mut trails: Trails, seen: Vec<Seen>) -> (Trace, Tracer<'_>) {
    let first_point = trails.point(START, [0.0; 3]);
    let mut run = Run {
        tracer: Tracer {
            stack,
            k0: stack.wavelength.k0_per_mm(),
            s_in: stack.input.stokes,
            trails: RefCell::new(trails),
            seen: RefCell::new(seen),
        },
        rejected: Vec::new(),
        tallies: vec![Tally::default(); stack.layers.len()],
        layers: Vec::with_capacity(stack.layers.len()),
    };
    let mut flights = vec![Flight {
        label: START,
        at: Vector3::zeros(),
        phase: 0.0,
        points: first_point,
        carrier: Carrier::Free {
            n: stack.outside_index,
            u: stack.input.direction,
            m: JonesMatrix::identity(),
        },
        pending: None,
        exit: Vector3::zeros(),
    }];
    let mut z = 0.0;
    for (idx, layer) in stack.layers.iter().enumerate() {
        z += layer.gap_mm;
        let contact = match layer.element {
            Element::Slab(Slab { faces: Some(f), .. }) => f.contact,
            _ => Contact::Outside,
        };
        // Rays waiting at the previous slab's back face leave it now, into whatever this
        // element's contact puts there.
        let into_next = match (contact, layer.element) {
            (Contact::Direct, Element::Slab(s)) => Some(body_of(&s)),
            (Contact::Film(n), _) => Some(Body::Isotropic(n)),
            _ => None,
        };
        if into_next.is_none() {
            flights = run.leave_pending(flights);
        }
        run.tallies[idx].power_in = run.power(&flights);
        flights = match layer.element {
            Element::Ideal(jm) => run.through_ideal(idx, z, Thin::Ideal(jm), flights),
            Element::Cell(c) => run.through_ideal(idx, z, Thin::Cell(c), flights),
            Element::Slab(slab) => {
                let through = run.through_slab(idx, z, &slab, into_next, flights);
                z += slab.thickness_mm;
                through
            }
        };
    }
    flights = run.leave_pending(flights);
    run.close_slabs();
    let paths = run.onto_screen(flights, z + stack.screen_mm);
    let traced = Trace {
        paths,
        layers: run.layers,
        exit_z_mm: z,
        rejected: run.rejected,
        reflected: run.tallies.iter().map(|t| t.reflected).collect(),
    };
    (traced, run.tracer)
}

/// One trace in progress: the tracer and what it has booked so far.
/// A zero-thickness element as the face-by-face trace meets it.
#[derive(Clone, Copy)]
enum Thin {
    /// An ideal element: one Jones matrix for every ray.
    Ideal(JonesMatrix),
    /// A liquid-crystal cell: its matrix at each ray's direction.
    Cell(CellLayer),
}

struct Run<'a> {
    tracer: Tracer<'a>,
    rejected: Vec<Rejected>,
    tallies: Vec<Tally>,
    layers: Vec<LayerTrace>,
}

impl Run<'_> {
    /// The power the rays carry.
    fn power(&self, flights: &[Flight]) -> f64 {
        flights.iter().map(|f| f.carrier.power(&self.tracer.s_in)).sum()
    }

    /// Rays waiting at a slab's back face leave it into the outside medium.
    fn leave_pending(&mut self, flights: Vec<Flight>) -> Vec<Flight> {
        let outside = Body::Isotropic(self.tracer.stack.outside_index);
        leave_pending(&self.tracer, flights, outside, &mut self.rejected, &mut self.tallies)
    }

    /// Ideal element or cell `idx` at z: each ray travels to the plane z, where its Jones matrix
    /// takes the element's (a cell's at the ray's own direction, [`cell_jones_at`]) and
    /// a cell's ray its label letter `c`.
    fn through_ideal(&mut self, idx: usize, z: f64, thin: Thin, flights: Vec<Flight>) -> Vec<Flight> {
        let plane = Plane::across_z(z);
        let mut next = Vec::with_capacity(flights.len());
        for mut f in flights {
            if !self.tracer.travel(&mut f, &plane) {
                reject_here(
                    &mut self.rejected,
                    &f,
                    idx,
                    Side::Front,
                    RejectReason::OutsideAperture,
                    &self.tracer,
                );
                continue;
            }
            if let Carrier::Free { n, u, m } = &mut f.carrier {
                let jm = match thin {
                    Thin::Ideal(jm) => jm,
                    Thin::Cell(c) => cell_jones_at(self.tracer.stack, &c, [*n * u.x, *n * u.y]),
                };
                *m = jm * *m;
            }
            if let Thin::Cell(_) = thin {
                f.label = self.tracer.trails.borrow_mut().letter(f.label, 'c');
            }
            next.push(f);
        }
        self.tallies[idx].power_out = self.power(&next);
        self.layers.push(LayerTrace::Ideal {
            power_in: self.tallies[idx].power_in,
            power_out: self.tallies[idx].power_out,
        });
        next
    }

    /// Slab `idx` whose axis point is at z: the rays enter it (from outside, or through the
    /// contact `into_next` from the slab before) and cross it to its back face, where they wait
    /// for the next element to decide their exit.
    fn through_slab(
        &mut self,
        idx: usize,
        z: f64,
        slab: &Slab,
        into_next: Option<Body>,
        flights: Vec<Flight>,
    ) -> Vec<Flight> {
        let faces = slab.placed_faces(z);
        let body = body_of(slab);
        let mut inside = Vec::with_capacity(flights.len() * 2);
        for f in flights {
            enter(
                &self.tracer,
                f,
                (idx, body, &faces, into_next),
                &mut inside,
                &mut self.rejected,
                &mut self.tallies,
            );
        }
        let mut waiting = Vec::with_capacity(inside.len());
        for mut f in inside {
            if !self.tracer.travel(&mut f, &faces.back) || faces.aperture.is_some_and(|a| !a.holds(f.at)) {
                reject_here(
                    &mut self.rejected,
                    &f,
                    idx,
                    Side::Back,
                    RejectReason::OutsideAperture,
                    &self.tracer,
                );
                continue;
            }
            f.pending = Some((idx, body));
            waiting.push(f);
        }
        self.layers.push(LayerTrace::Slab {
            modes: front_modes(&self.tracer, &faces, body),
            shifts_mm: [[0.0; 2]; 2],
            z_front_mm: z,
            z_back_mm: z + slab.thickness_mm,
            power_in: self.tallies[idx].power_in,
            power_out: 0.0,
            faces_solved: true,
        });
        waiting
    }

    /// Per slab, what went on past it: its input less what its faces reflected and what it
    /// rejected.
    fn close_slabs(&mut self) {
        for (idx, lt) in self.layers.iter_mut().enumerate() {
            if let LayerTrace::Slab { power_out, .. } = lt {
                let lost: f64 = self.rejected.iter().filter(|r| r.element == idx).map(|r| r.power).sum();
                *power_out = self.tallies[idx].power_in - self.tallies[idx].reflected - lost;
            }
        }
    }

    /// The rays that left the stack, carried to the screen plane z = `screen_z` (module header:
    /// the phase referred to the screen's axis point).
    fn onto_screen(&mut self, flights: Vec<Flight>, screen_z: f64) -> Vec<Path> {
        let screen = Plane::across_z(screen_z);
        let mut paths = Vec::with_capacity(flights.len());
        for mut f in flights {
            let exit = f.exit;
            // The screen may lie behind a ray that left a mounted crystal beyond the stack's last
            // axis point: its straight continuation meets it all the same.
            let dir = f.carrier.direction();
            let met = screen
                .meet_line(f.at, dir)
                .is_some_and(|s| self.tracer.advance(&mut f, dir * s));
            if !met {
                let last = self.tracer.stack.layers.len().saturating_sub(1);
                reject_here(
                    &mut self.rejected,
                    &f,
                    last,
                    Side::Back,
                    RejectReason::OutsideAperture,
                    &self.tracer,
                );
                continue;
            }
            let Carrier::Free { n, u, m } = f.carrier else { continue };
            let across = self.tracer.k0 * n * (u.x * f.at.x + u.y * f.at.y);
            let trails = self.tracer.trails.borrow();
            paths.push(Path {
                label: trails.label_to(f.label),
                matrix: m * Complex64::from_polar(1.0, -across),
                phase_rad: f.phase - across,
                points_mm: trails.points_to(f.points),
                direction: u,
                exit_point_mm: arr(exit),
                screen_mm: [f.at.x, f.at.y],
            });
        }
        paths
    }
}

/// A slab on its own at its place, lit by the stack's incident beam from the outside medium: for
/// its o- and e-ray (when each gets through), where it leaves the back face and along which
/// direction. What a crystal reports as its separation and split angle.
pub fn alone(stack: &Stack, slab: &Slab, z_front: f64) -> [Option<(Vector3<f64>, Vector3<f64>)>; 2] {
    let faces = slab.placed_faces(z_front);
    let single = Stack {
        layers: vec![crate::optics::stack::Layer {
            gap_mm: z_front,
            element: Element::Slab(Slab {
                faces: Some(Faces {
                    contact: Contact::Outside,
                    ..faces
                }),
                ..*slab
            }),
        }],
        screen_mm: 0.0,
        ..stack.clone()
    };
    let traced = trace_planar(&single);
    slab.medium.letters().map(|letter| {
        traced
            .paths
            .iter()
            .find(|p| p.label.len() == 1 && p.label.starts_with(letter))
            .map(|p| (Vector3::from(p.exit_point_mm), p.direction))
    })
}

fn body_of(slab: &Slab) -> Body {
    Body::Crystal(slab.medium)
}

/// The slab's two modes just inside its front face for the incident beam (lab frame): what the
/// element reports for its modes.
fn front_modes(tracer: &Tracer, faces: &Faces, body: Body) -> [Mode; 2] {
    let mut seen = tracer.seen.borrow_mut();
    let i = seen_at(&mut seen, faces.front.normal, body);
    let at = &seen[i];
    let q = at.to_face * (tracer.stack.input.direction * tracer.stack.outside_index);
    at.local
        .modes([q.x, q.y], Travel::Forward)
        .map(|m| m.rotated(&at.frame))
}

/// Records `f` as rejected at element `idx` with its whole power.
fn reject_here(out: &mut Vec<Rejected>, f: &Flight, idx: usize, side: Side, reason: RejectReason, tracer: &Tracer) {
    let trails = tracer.trails.borrow();
    out.push(Rejected {
        label: trails.label_to(f.label),
        element: idx,
        face: side,
        reason,
        power: f.carrier.power(&tracer.s_in),
        point_mm: arr(f.at),
        direction: arr(f.carrier.direction()),
        points_mm: trails.points_to(f.points),
    });
}

/// Crosses one face for one ray: the onward rays, with total internal reflection and face losses
/// booked on element `idx` at `side`.
fn cross_booked(
    tracer: &Tracer,
    f: Flight,
    (from, into, normal): (Body, Body, Vector3<f64>),
    (idx, side): (usize, Side),
    rejected: &mut Vec<Rejected>,
    tallies: &mut [Tally],
    onward: &mut Vec<Flight>,
) {
    let s_in = &tracer.s_in;
    let p_in = f.carrier.power(s_in);
    let crossed = tracer.cross(&f.carrier, from, into, normal);
    let mut p_out = 0.0;
    for (carrier, letter) in crossed.onward.into_iter().flatten() {
        p_out += carrier.power(s_in);
        let label = match letter {
            Some(c) => tracer.trails.borrow_mut().letter(f.label, c),
            None => f.label,
        };
        onward.push(Flight {
            label,
            carrier,
            pending: None,
            exit: f.at,
            ..f
        });
    }
    let reflected: Vec<&(Vector3<f64>, f64)> = crossed.reflected.iter().flatten().collect();
    let lost = (p_in - p_out).max(0.0);
    let weights: f64 = reflected.iter().map(|r| r.1).sum();
    if crossed.tir && !reflected.is_empty() {
        for (dir, w) in &reflected {
            let share = if weights > 0.0 {
                w / weights
            } else {
                1.0 / reflected.len() as f64
            };
            // A reflected mode the light does not couple into is no ray.
            if share <= POWER_ROUNDING {
                continue;
            }
            let trails = tracer.trails.borrow();
            rejected.push(Rejected {
                label: trails.label_to(f.label),
                element: idx,
                face: side,
                reason: RejectReason::TotalInternalReflection,
                power: lost * share,
                point_mm: arr(f.at),
                direction: arr(*dir),
                points_mm: trails.points_to(f.points),
            });
        }
    } else {
        tallies[idx].reflected += lost;
    }
}

/// Takes a ray into slab `idx`: from the outside medium (travelling to the front face) or, for
/// a ray waiting at the previous slab's back face, through the contact `into_next` (a film or
/// this slab directly).
fn enter(
    tracer: &Tracer,
    mut f: Flight,
    (idx, body, faces, into_next): (usize, Body, &Faces, Option<Body>),
    next: &mut Vec<Flight>,
    rejected: &mut Vec<Rejected>,
    tallies: &mut [Tally],
) {
    let normal = faces.front.normal;
    let outside = Body::Isotropic(tracer.stack.outside_index);
    // Where the light comes from: the previous slab through a contact (whose interface belongs
    // to this slab's front face), or the outside medium, crossed up to the front face.
    let (from, film) = match f.pending.take() {
        Some((_, prev_body)) => (prev_body, into_next.filter(|b| matches!(b, Body::Isotropic(_)))),
        None => {
            if !tracer.travel(&mut f, &faces.front) || faces.aperture.is_some_and(|a| !a.holds(f.at)) {
                reject_here(rejected, &f, idx, Side::Front, RejectReason::OutsideAperture, tracer);
                return;
            }
            (outside, None)
        }
    };
    let faces = (idx, Side::Front);
    match film {
        // Into the film and out of it at one point (module header).
        Some(film) => {
            let mut in_film = Vec::with_capacity(1);
            cross_booked(tracer, f, (from, film, normal), faces, rejected, tallies, &mut in_film);
            for g in in_film {
                cross_booked(tracer, g, (film, body, normal), faces, rejected, tallies, next);
            }
        }
        None => cross_booked(tracer, f, (from, body, normal), faces, rejected, tallies, next),
    }
}

/// Rays waiting at a slab's back face leave it into `into` (the outside medium).
fn leave_pending(
    tracer: &Tracer,
    flights: Vec<Flight>,
    into: Body,
    rejected: &mut Vec<Rejected>,
    tallies: &mut [Tally],
) -> Vec<Flight> {
    let mut out = Vec::with_capacity(flights.len());
    for mut f in flights {
        let Some((idx, body)) = f.pending.take() else {
            out.push(f);
            continue;
        };
        let normal = match tracer.stack.layers[idx].element {
            Element::Slab(Slab { faces: Some(faces), .. }) => faces.back.normal,
            _ => Vector3::z(),
        };
        cross_booked(
            tracer,
            f,
            (body, into, normal),
            (idx, Side::Back),
            rejected,
            tallies,
            &mut out,
        );
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::geometry::direction;
    use crate::optics::jones;
    use crate::optics::material::Indices;
    use crate::optics::parallel::trace_parallel;
    use crate::optics::stack::{Aperture, InputBeam, Layer};
    use crate::optics::uniaxial::{OpticAxis, Uniaxial};
    use crate::optics::wavelength::Wavelength;
    use crate::precision::assert_close;
    use std::f64::consts::FRAC_PI_4;

    fn crystal(no: f64, ne: f64, tilt_deg: f64, az_deg: f64) -> Medium {
        Medium::Uniaxial(Uniaxial::new(
            Indices::new(no, ne).unwrap(),
            OpticAxis::from_angles(tilt_deg.to_radians(), az_deg.to_radians()),
        ))
    }

    fn stack(polar_deg: f64, azimuth_deg: f64, losses: Losses, layers: Vec<Layer>) -> Stack {
        let j = jones::linear(0.3);
        Stack {
            wavelength: Wavelength::from_nm(633.0).unwrap(),
            outside_index: 1.0,
            losses,
            input: InputBeam {
                direction: direction(polar_deg.to_radians(), azimuth_deg.to_radians()),
                diameter_mm: 1.0,
                jones: Some(j),
                stokes: jones::stokes(&j),
            },
            layers,
            screen_mm: 0.0,
            cells: Vec::new(),
        }
    }

    fn slab(medium: Medium, thickness_mm: f64, gap_mm: f64, faces: Option<Faces>) -> Layer {
        Layer {
            gap_mm,
            element: Element::Slab(Slab {
                medium,
                thickness_mm,
                faces,
            }),
        }
    }

    /// The same stack with every slab's faces written out as planes: traced face by face.
    fn placed(st: &Stack) -> Stack {
        let mut out = st.clone();
        let mut z = 0.0;
        for layer in &mut out.layers {
            z += layer.gap_mm;
            if let Element::Slab(s) = &mut layer.element {
                s.faces = Some(s.placed_faces(z));
                z += s.thickness_mm;
            }
        }
        out
    }

    /// Two optically contacted wedges 5 mm thick on axis: the first has its back face tilted by
    /// `alpha` toward +x, the second its back face across z, both within an aperture of `radius`.
    fn contacted_wedges(alpha: f64, radius: f64) -> (Faces, Faces) {
        let ap = Some(Aperture {
            centre: Vector3::zeros(),
            axis: Vector3::z(),
            radius_mm: radius,
        });
        let first = Faces {
            front: Plane::across_z(0.0),
            back: Plane {
                normal: direction(alpha, 0.0),
                point: Vector3::new(0.0, 0.0, 5.0),
            },
            aperture: ap,
            contact: Contact::Outside,
        };
        let second = Faces {
            front: first.back,
            back: Plane::across_z(10.0),
            aperture: ap,
            contact: Contact::Direct,
        };
        (first, second)
    }

    fn total_power(t: &Trace, s_in: &[f64; 4]) -> f64 {
        let rays: f64 = t.paths.iter().map(|p| power_of(&p.matrix, s_in)).sum();
        let rejected: f64 = t.rejected.iter().map(|r| r.power).sum();
        rays + rejected + t.reflected.iter().sum::<f64>()
    }

    /// Independent path through the code: version 1's shared-tangential trace and the face-by-face
    /// trace agree on every ray of plane-parallel stacks (oblique, uncoated, with gaps and ideal
    /// elements), to rounding.
    #[test]
    fn plane_parallel_stacks_trace_alike_both_ways() {
        traced_alike_both_ways(crystal(1.6557, 1.4849, 45.0, 0.0), crystal(1.5426, 1.5517, 90.0, 30.0));
    }

    /// The same for general crystals: a biaxial one (KTP-like indices) and an optically active
    /// uniaxial one (quartz-like, its chirality magnified a hundredfold), through version 1's
    /// trace with the general solver against the face-by-face one.
    #[test]
    fn plane_parallel_general_crystals_trace_alike_both_ways() {
        use crate::optics::anisotropic::{Anisotropic, orientation};
        let biaxial = Anisotropic::new([1.74, 1.75, 1.83], orientation(0.4, 1.1, -0.6), [0.0; 3]).unwrap();
        let chiral = Anisotropic::new(
            [1.5443, 1.5443, 1.5534],
            orientation(0.2, 0.5, 0.0),
            [3.5e-3, 3.5e-3, -2e-3],
        );
        traced_alike_both_ways(Medium::Anisotropic(biaxial), Medium::Anisotropic(chiral.unwrap()));
    }

    /// Traces a stack of `calcite`, an ideal retarder, `quartz` and `calcite` again both ways
    /// (version 1's shared-tangential trace and the face-by-face one) at several incidences, with
    /// ideal and uncoated faces: every ray alike to rounding, every watt accounted.
    fn traced_alike_both_ways(calcite: Medium, quartz: Medium) {
        for losses in [Losses::Ideal, Losses::Uncoated] {
            for (polar, az) in [(0.0, 0.0), (12.0, 35.0), (40.0, -100.0)] {
                let st = stack(
                    polar,
                    az,
                    losses,
                    vec![
                        slab(calcite, 2.0, 0.5, None),
                        Layer {
                            gap_mm: 1.0,
                            element: Element::Ideal(jones::retarder(1.1, 0.4)),
                        },
                        slab(quartz, 0.7, 0.0, None),
                        slab(calcite, 1.3, 2.0, None),
                    ],
                );
                let a = trace_parallel(&st);
                let b = trace_planar(&placed(&st));
                assert_eq!(a.paths.len(), b.paths.len());
                for (p, q) in a.paths.iter().zip(&b.paths) {
                    assert_eq!(p.label, q.label);
                    for k in 0..2 {
                        assert_close(q.exit_xy()[k], p.exit_xy()[k], 1e-12, 1.0, "exit point");
                    }
                    assert!(
                        (p.matrix - q.matrix).norm() < 1e-11,
                        "{polar} {az} {losses:?} {}: {} vs {}, phase {} vs {}",
                        p.label,
                        p.matrix,
                        q.matrix,
                        p.phase_rad,
                        q.phase_rad
                    );
                    assert!((p.direction - q.direction).norm() < 1e-14);
                }
                assert_close(total_power(&b, &st.input.stokes), 1.0, 1e-12, 0.0, "power accounted");
            }
        }
    }

    /// Snell's law and the textbook lateral shift of a tilted plate (no = ne: an isotropic plate):
    /// d = L sin θ (1 − cos θ / √(n² − sin² θ)) for a plate of normal thickness L at incidence θ
    /// (Hecht, Optics, §5.2, from memory); the ray leaves parallel to itself.
    #[test]
    fn a_tilted_isotropic_plate_shifts_the_beam_by_the_textbook_amount() {
        let n = 1.5;
        let theta = 25f64.to_radians();
        let normal = direction(theta, 0.0);
        let l = 3.0;
        // Faces through the axis points z = 1 and z = 1 + L/cos θ: normal thickness L.
        let faces = Faces {
            front: Plane {
                normal,
                point: Vector3::new(0.0, 0.0, 1.0),
            },
            back: Plane {
                normal,
                point: Vector3::new(0.0, 0.0, 1.0 + l / theta.cos()),
            },
            aperture: None,
            contact: Contact::Outside,
        };
        let st = stack(
            0.0,
            0.0,
            Losses::Ideal,
            vec![slab(crystal(n, n, 0.0, 0.0), l / theta.cos(), 1.0, Some(faces))],
        );
        let t = trace_planar(&st);
        assert_eq!(t.paths.len(), 2, "two degenerate modes, two rays");
        let expected = l * theta.sin() * (1.0 - theta.cos() / (n * n - theta.sin().powi(2)).sqrt());
        for p in &t.paths {
            assert!((p.direction - Vector3::z()).norm() < 1e-14, "{}", p.direction);
            // The beam travels along z; the ray bends toward the face normal, which leans to +x.
            assert_close(p.exit_xy()[0], expected, 1e-12, 0.0, "lateral shift of a tilted plate");
        }
        assert_close(total_power(&t, &st.input.stokes), 1.0, 1e-12, 0.0, "power accounted");
    }

    /// A wedge of apex angle A at normal incidence deviates a beam by asin(n sin A) − A (exact
    /// prism formula, Hecht §5.5, from memory).
    #[test]
    fn an_isotropic_wedge_deviates_by_the_prism_formula() {
        let n = 1.6;
        let apex = 10f64.to_radians();
        let faces = Faces {
            front: Plane::across_z(0.0),
            back: Plane {
                normal: direction(apex, 0.0),
                point: Vector3::new(0.0, 0.0, 2.0),
            },
            aperture: Some(Aperture {
                centre: Vector3::zeros(),
                axis: Vector3::z(),
                radius_mm: 5.0,
            }),
            contact: Contact::Outside,
        };
        let st = stack(
            0.0,
            0.0,
            Losses::Ideal,
            vec![slab(crystal(n, n, 0.0, 0.0), 2.0, 0.0, Some(faces))],
        );
        let t = trace_planar(&st);
        let expected = (n * apex.sin()).asin() - apex;
        for p in &t.paths {
            let dev = p.direction.z.acos();
            assert_close(dev, expected, 1e-12, 0.0, "prism deviation");
            // Toward the thick end (−x, the wedge leans its back face toward +x).
            assert!(p.direction.x < 0.0);
        }
    }

    /// An air-spaced pair of calcite prisms with the optic axis perpendicular to the plane of
    /// incidence: the ordinary index 1.6557 makes the o-ray meet the air gap beyond its critical
    /// angle asin(1/n_o) = 37.14°, while the e-ray (n = 1.4849, critical 42.33°) passes, at a gap
    /// tilted 40° (common practice for prism polarizers). Power is accounted to 1e-12 and the
    /// rejected o-ray leaves along the mirror image of its direction.
    #[test]
    fn an_air_gap_rejects_the_ordinary_ray_by_total_internal_reflection() {
        let cal = crystal(1.6557, 1.4849, 90.0, 90.0);
        let gap_normal = direction(40f64.to_radians(), 0.0);
        let ap = |z: f64| {
            Some(Aperture {
                centre: Vector3::new(0.0, 0.0, z),
                axis: Vector3::z(),
                radius_mm: 3.0,
            })
        };
        let first = Faces {
            front: Plane::across_z(0.0),
            back: Plane {
                normal: gap_normal,
                point: Vector3::new(0.0, 0.0, 5.0),
            },
            aperture: ap(0.0),
            contact: Contact::Outside,
        };
        let second = Faces {
            front: Plane {
                normal: gap_normal,
                point: Vector3::new(0.0, 0.0, 5.0),
            },
            back: Plane::across_z(10.0),
            aperture: ap(5.0),
            contact: Contact::Outside,
        };
        for losses in [Losses::Ideal, Losses::Uncoated] {
            let st = stack(
                0.0,
                0.0,
                losses,
                vec![slab(cal, 5.0, 0.0, Some(first)), slab(cal, 5.0, 0.0, Some(second))],
            );
            let t = trace_planar(&st);
            // The e-ray leaves the gap polarized along the axis (y): the second prism takes it
            // into its e-mode alone ("eo" carries nothing).
            let carrying: Vec<&str> = t
                .paths
                .iter()
                .filter(|p| power_of(&p.matrix, &st.input.stokes) > 1e-24)
                .map(|p| p.label.as_str())
                .collect();
            assert_eq!(carrying, ["ee"], "only the e-ray passes");
            let tir: Vec<&Rejected> = t
                .rejected
                .iter()
                .filter(|r| r.reason == RejectReason::TotalInternalReflection)
                .collect();
            assert!(
                !tir.is_empty()
                    && tir
                        .iter()
                        .all(|r| r.label == "o" && r.element == 0 && r.face == Side::Back)
            );
            // Mirror image of +z in a face of normal n: z − 2 (z·n) n.
            let mirror = Vector3::z() - gap_normal * (2.0 * gap_normal.z);
            let o_back = tir
                .iter()
                .find(|r| (Vector3::from(r.direction) - mirror).norm() < 1e-12);
            assert!(
                o_back.is_some(),
                "{:?}",
                tir.iter().map(|r| r.direction).collect::<Vec<_>>()
            );
            assert_close(
                total_power(&t, &st.input.stokes),
                1.0,
                1e-12,
                0.0,
                "rays + rejected + reflected",
            );
            if losses == Losses::Ideal {
                // Ideal faces: the o-ray's whole share is rejected, the e-ray's passes.
                let e_share: f64 = t.paths.iter().map(|p| power_of(&p.matrix, &st.input.stokes)).sum();
                let o_share: f64 = tir.iter().map(|r| r.power).sum();
                assert_close(e_share + o_share, 1.0, 1e-12, 0.0, "ideal faces lose nothing");
                // Input linear at 0.3 rad from x: the o-mode (D along x) takes cos², the e-mode
                // (D along the axis, y) sin² (Malus's law).
                assert_close(o_share, 0.3f64.cos().powi(2), 1e-12, 0.0, "o share, Malus");
            }
        }
    }

    /// A two-wedge splitter whose first wedge has its axis along z (both modes index n_o at
    /// normal incidence) and whose second has it along y, perpendicular to the plane of
    /// incidence: the o-ray goes straight through, the e-ray (D along the axis, index n_e in every
    /// direction of that plane) refracts at the internal face n_o sin α = n_e sin β (β > α: it bends away from the normal,
    /// leaning at α − β from z) and at the exit face sin δ = n_e sin(α − β). An exact two-step Snell calculation, independent of the
    /// mode solver; the wedges are optically contacted.
    #[test]
    fn a_straight_through_splitter_deviates_only_the_e_ray_by_snell_twice() {
        let (no, ne) = (1.6557, 1.4849);
        let alpha = 20f64.to_radians();
        let (first, second) = contacted_wedges(alpha, 4.0);
        let st = stack(
            0.0,
            0.0,
            Losses::Ideal,
            vec![
                slab(crystal(no, ne, 0.0, 0.0), 5.0, 0.0, Some(first)),
                slab(crystal(no, ne, 90.0, 90.0), 5.0, 0.0, Some(second)),
            ],
        );
        let t = trace_planar(&st);
        let beta = (no * alpha.sin() / ne).asin();
        let delta = (ne * (alpha - beta).sin()).asin();
        let carrying: Vec<&Path> = t
            .paths
            .iter()
            .filter(|p| power_of(&p.matrix, &st.input.stokes) > 1e-20)
            .collect();
        assert_eq!(
            carrying.len(),
            2,
            "{:?}",
            t.paths.iter().map(|p| &p.label).collect::<Vec<_>>()
        );
        for p in carrying {
            let angle = p.direction.x.atan2(p.direction.z);
            if p.label.ends_with('o') {
                assert!(angle.abs() < 1e-14, "{}: {angle}", p.label);
            } else {
                assert_close(angle, delta, 1e-12, 0.0, "e-ray deviation by Snell twice");
            }
        }
        assert_close(total_power(&t, &st.input.stokes), 1.0, 1e-12, 0.0, "power accounted");
    }

    /// A tracer kept from trace to trace (faces' frames and media found once) traces every stack
    /// exactly as a fresh one, bit for bit, also when the stacks change between traces (wedge
    /// angles, axes, incidences, losses) and its list of faces starts afresh.
    #[test]
    fn a_kept_tracer_traces_as_a_fresh_one() {
        let mut kept = PlanarTracer::default();
        for k in 0..40 {
            let (first, second) = contacted_wedges((5.0 + k as f64).to_radians(), 4.0);
            let losses = if k % 2 == 0 { Losses::Ideal } else { Losses::Uncoated };
            let st = stack(
                0.5 * (k % 7) as f64,
                30.0 * k as f64,
                losses,
                vec![
                    slab(crystal(1.6557, 1.4849, 90.0, 0.0), 5.0, 0.0, Some(first)),
                    slab(
                        crystal(1.6557, 1.4849, 90.0, 90.0 - (k % 3) as f64),
                        5.0,
                        0.0,
                        Some(second),
                    ),
                ],
            );
            for _ in 0..2 {
                let (a, b) = (kept.trace(&st), trace_planar(&st));
                assert_eq!(format!("{a:?}"), format!("{b:?}"), "stack {k}");
            }
        }
    }

    #[test]
    fn rays_outside_an_aperture_are_rejected_with_their_power() {
        let cal = crystal(1.6557, 1.4849, 45.0, 0.0);
        let faces = Faces {
            front: Plane::across_z(0.0),
            back: Plane::across_z(10.0),
            aperture: Some(Aperture {
                centre: Vector3::zeros(),
                axis: Vector3::z(),
                radius_mm: 0.5,
            }),
            contact: Contact::Outside,
        };
        // Walk-off of about 1 mm over 10 mm: the e-ray leaves the 0.5 mm radius.
        let st = stack(0.0, 0.0, Losses::Ideal, vec![slab(cal, 10.0, 0.0, Some(faces))]);
        let t = trace_planar(&st);
        assert_eq!(t.paths.len(), 1);
        assert_eq!(t.paths[0].label, "o");
        assert_eq!(t.rejected.len(), 1);
        let r = &t.rejected[0];
        assert_eq!(
            (r.label.as_str(), r.reason, r.face),
            ("e", RejectReason::OutsideAperture, Side::Back)
        );
        assert_close(total_power(&t, &st.input.stokes), 1.0, 1e-12, 0.0, "power accounted");
        let _ = FRAC_PI_4;
    }

    /// An ideal face is lossless (DEVELOPERS.md: the lossless part of the Fresnel coupling), also
    /// where the medium the ray comes from has its other wave evanescent: a ray of a strongly
    /// birefringent crystal (n_o = 2.0, n_e = 1.5) meets a 60° contacted face with q_t = 1.73,
    /// beyond its own e-wave's reach, and enters a crystal of which one wave can take it (the
    /// other, n_o = 1.6, is evanescent there): all of it goes on, nothing is reflected.
    /// The evanescent wave's column (normalized to unit field, not to unit power) once took part in
    /// the polar factor and turned 42% of the power back as totally reflected (found by the
    /// independent face solver, tests/independent_faces.rs).
    #[test]
    fn an_ideal_face_loses_nothing_when_the_other_incident_wave_is_evanescent() {
        let (first, second) = contacted_wedges(60f64.to_radians(), 1.0);
        // Input along x: the first crystal's o-wave (its axis lies along y).
        let mut st = stack(
            0.0,
            0.0,
            Losses::Ideal,
            vec![
                slab(crystal(2.0, 1.5, 90.0, 90.0), 5.0, 0.0, Some(first)),
                slab(crystal(1.6, 1.95, 70.0, 60.0), 5.0, 0.0, Some(second)),
            ],
        );
        let j = jones::linear(0.0);
        st.input.jones = Some(j);
        st.input.stokes = jones::stokes(&j);
        let t = trace_planar(&st);
        let rays: f64 = t.paths.iter().map(|p| power_of(&p.matrix, &st.input.stokes)).sum();
        assert!(
            t.reflected.iter().all(|r| r.abs() < 1e-12),
            "reflected {:?}",
            t.reflected
        );
        assert_close(rays, 1.0, 1e-12, 0.0, "all of it leaves");
        assert_close(total_power(&t, &st.input.stokes), 1.0, 1e-12, 0.0, "power accounted");
    }
}
