//! The wave-vector chain of one ray: where a ray of given modes goes through a stack, without
//! its fields.
//!
//! Physics. A ray's direction beyond a face depends only on its wave vector before it and on the
//! medium beyond: the tangential part of q is conserved and the normal part is the root of the
//! chosen mode that carries energy away from the face (the same roots as
//! [`crate::optics::modes`] takes in the face's own frame, by the same root function, written in
//! the lab frame: [`crate::optics::modes::wave_vector_across`]). Amplitudes, powers and phases do not enter.
//! So the chain of wave vectors face by face gives a ray's exit direction exactly, and following
//! its ray direction (q for isotropic media and ordinary waves, A·q for extraordinary ones) from
//! plane to plane gives where it meets each face and whether it stays within the apertures.
//!
//! In a general crystal (biaxial or optically active) the root is the 4×4 solver's
//! ([`crate::optics::general_modes`]) in the face's frame, the mode of the label's letter, and the
//! ray direction is that mode's.
//!
//! [`chain`] follows one labelled ray ("oe": ordinary in the first crystal, extraordinary in the
//! second; `f`/`s` in a biaxial one) through a stack exactly as [`crate::optics::planar::trace_planar`] does: gaps, ideal
//! elements, vanishing films, direct contact, apertures, total internal reflection, the screen.
//! It returns what that trace reports for the same label (tested: directions and exit points
//! agree to rounding, and the ray is missing from both or from neither). A tolerance run that
//! needs only the directions of two rays (the split of an angular splitter) uses it instead of a
//! whole trace: the same physics at a fraction of the work (see the benchmark in the README).

use crate::optics::anisotropic::Anisotropic;
use crate::optics::general_modes::general_modes;
use crate::optics::geometry::{Plane, face_frame};
use crate::optics::modes::{ModeKind, Travel, wave_vector_across};
use crate::optics::stack::{Aperture, Contact, Element, Medium, Stack};
use crate::optics::uniaxial::Uniaxial;
use nalgebra::{Matrix3, Vector3};

/// Where a labelled ray ends: what the full trace reports for it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ChainEnd {
    /// Unit direction in the outside medium after the last face.
    pub direction: Vector3<f64>,
    /// Where it left the last face it crossed, mm.
    pub exit_point_mm: Vector3<f64>,
}

/// What light is in: an isotropic medium of an index, or a crystal in one of its modes.
#[derive(Debug, Clone, Copy)]
enum In {
    Isotropic(f64),
    /// A uniaxial crystal's ordinary wave: an isotropic medium of index n_o for the wave vector.
    Ordinary(f64),
    /// A uniaxial crystal's extraordinary wave: n_o and the extraordinary surface A
    /// ([`Uniaxial::extraordinary_surface`]), found once per crystal.
    Extraordinary(f64, Matrix3<f64>),
    /// A general crystal in the mode of a slot (its wave vector and ray direction found by the
    /// 4×4 solver in each face's frame, as the whole trace finds them).
    General(Anisotropic, ModeKind),
}

impl In {
    /// The uniaxial crystal `c` in mode `kind`.
    fn crystal(c: &Uniaxial, kind: ModeKind) -> In {
        match kind {
            ModeKind::Ordinary => In::Ordinary(c.indices.no),
            ModeKind::Extraordinary => In::Extraordinary(c.indices.no, c.extraordinary_surface()),
        }
    }
}

/// A ray in flight: where it is, its wave vector (lab frame) and the medium it is in.
#[derive(Debug, Clone, Copy)]
struct Ray {
    at: Vector3<f64>,
    q: Vector3<f64>,
    medium: In,
    /// The unit ray direction in a general crystal (found with the wave vector).
    energy: Option<Vector3<f64>>,
}

impl Ray {
    /// Unit direction of travel (of energy).
    fn direction(&self) -> Vector3<f64> {
        match &self.medium {
            In::Extraordinary(_, a) => (a * self.q).normalize(),
            In::General(..) => self.energy.unwrap_or_else(|| self.q.normalize()),
            _ => self.q.normalize(),
        }
    }

    /// Moves to `plane` along the ray direction; `None` when it runs parallel to it or away.
    fn travel(mut self, plane: &Plane) -> Option<Ray> {
        let dir = self.direction();
        self.at += dir * plane.meet(self.at, dir)?;
        Some(self)
    }

    /// Crosses a face of unit normal `normal` into `into`; `None` when that mode is evanescent
    /// beyond it (total internal reflection).
    fn cross(mut self, normal: Vector3<f64>, into: &In) -> Option<Ray> {
        self.q = match into {
            In::Isotropic(n) | In::Ordinary(n) => wave_vector_across(self.q, normal, *n, None)?,
            In::Extraordinary(no, a) => wave_vector_across(self.q, normal, *no, Some(a))?,
            In::General(a, kind) => {
                // The slot's forward mode in the face's frame, brought back to the lab frame.
                let frame = face_frame(normal);
                let qf = frame.transpose() * self.q;
                let local = a.rotated(&frame.transpose());
                let modes = general_modes(&local, [qf.x, qf.y], Travel::Forward);
                let mode = modes[usize::from(*kind == ModeKind::Extraordinary)].rotated(&frame);
                if !mode.propagating {
                    return None;
                }
                self.energy = mode.ray_direction();
                mode.wave_vector()
            }
        };
        self.medium = *into;
        Some(self)
    }
}

/// The crystal of a slab's medium in the mode the label's next letter names (`None` when the
/// label has no letter left or an unknown one).
fn next_mode(medium: Medium, letters: &mut std::str::Chars) -> Option<In> {
    let letter = letters.next()?;
    let slot = medium.letters().iter().position(|&c| c == letter)?;
    let kind = [ModeKind::Ordinary, ModeKind::Extraordinary][slot];
    Some(match medium {
        Medium::Uniaxial(c) => In::crystal(&c, kind),
        Medium::Anisotropic(a) => In::General(a, kind),
    })
}

/// One step of a chain.
#[derive(Debug, Clone, Copy)]
enum Step {
    /// Across a face of this unit normal into a medium.
    Cross(Vector3<f64>, In),
    /// Along the ray to a plane, staying within an aperture (when there is one) there.
    Travel(Plane, Option<Aperture>),
}

/// The chain of one labelled ray through one stack, its steps found once (faces placed, modes
/// chosen, extraordinary surfaces formed), to be followed for any incident direction: what a
/// sweep or a benchmark over incidences needs, without the set-up per incidence.
#[derive(Debug, Clone)]
pub struct ChainPlan {
    outside_index: f64,
    steps: Vec<Step>,
    /// The screen plane z.
    screen_z: f64,
}

impl ChainPlan {
    /// The plan of the ray labelled `label` through `stack`; `None` when the label does not fit
    /// the stack (a letter no crystal's mode has, or one letter too few or too many).
    pub fn new(stack: &Stack, label: &str) -> Option<ChainPlan> {
        let outside = In::Isotropic(stack.outside_index);
        let mut letters = label.chars();
        let mut steps = Vec::with_capacity(4 * stack.layers.len() + 1);
        // The back face normal of a slab the ray waits at, its exit decided by the next element.
        let mut pending: Option<Vector3<f64>> = None;
        let mut z = 0.0;
        for layer in &stack.layers {
            z += layer.gap_mm;
            let (contact, slab) = match layer.element {
                Element::Slab(s) => (s.faces.map_or(Contact::Outside, |f| f.contact), Some(s)),
                Element::Ideal(_) | Element::Cell(_) => (Contact::Outside, None),
            };
            if let (Some(back), Contact::Outside) = (pending, contact) {
                steps.push(Step::Cross(back, outside));
                pending = None;
            }
            let Some(slab) = slab else {
                steps.push(Step::Travel(Plane::across_z(z), None));
                continue;
            };
            let faces = slab.placed_faces(z);
            let mode = next_mode(slab.medium, &mut letters)?;
            if pending.take().is_some() {
                if let Contact::Film(n) = contact {
                    steps.push(Step::Cross(faces.front.normal, In::Isotropic(n)));
                }
            } else {
                steps.push(Step::Travel(faces.front, faces.aperture));
            }
            steps.push(Step::Cross(faces.front.normal, mode));
            steps.push(Step::Travel(faces.back, faces.aperture));
            pending = Some(faces.back.normal);
            z += slab.thickness_mm;
        }
        if let Some(back) = pending {
            steps.push(Step::Cross(back, outside));
        }
        if letters.next().is_some() {
            return None;
        }
        Some(ChainPlan {
            outside_index: stack.outside_index,
            steps,
            screen_z: z + stack.screen_mm,
        })
    }

    /// Where the ray ends when the stack is lit along the unit vector `incident`; `None` when it
    /// does not leave (total internal reflection, outside an aperture, or it never meets the
    /// screen plane).
    pub fn follow(&self, incident: Vector3<f64>) -> Option<ChainEnd> {
        let mut ray = Ray {
            at: Vector3::zeros(),
            q: incident * self.outside_index,
            medium: In::Isotropic(self.outside_index),
            energy: None,
        };
        for step in &self.steps {
            ray = match step {
                Step::Cross(normal, into) => ray.cross(*normal, into)?,
                Step::Travel(plane, aperture) => {
                    ray.travel(plane).filter(|r| aperture.is_none_or(|a| a.holds(r.at)))?
                }
            };
        }
        let direction = ray.direction();
        Plane::across_z(self.screen_z).meet_line(ray.at, direction)?;
        Some(ChainEnd {
            direction,
            exit_point_mm: ray.at,
        })
    }
}

/// Follows the ray labelled `label` (one letter, `o` or `e`, per crystal) through `stack`: its
/// direction and exit point, or `None` when the trace has no such ray (a mode evanescent at a
/// face, a face or aperture missed, the screen parallel to it, a label of the wrong length).
/// The same as [`ChainPlan::new`] then [`ChainPlan::follow`] along the stack's incidence.
pub fn chain(stack: &Stack, label: &str) -> Option<ChainEnd> {
    ChainPlan::new(stack, label)?.follow(stack.input.direction)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::optics::anisotropic::orientation;
    use crate::optics::geometry::direction;
    use crate::optics::interface::Losses;
    use crate::optics::jones;
    use crate::optics::material::Indices;
    use crate::optics::planar::trace_planar;
    use crate::optics::stack::{Aperture, Faces, InputBeam, Layer, Slab};
    use crate::optics::uniaxial::OpticAxis;
    use crate::optics::wavelength::Wavelength;
    use crate::random::Rng;

    fn between(rng: &mut Rng, lo: f64, hi: f64) -> f64 {
        lo + (hi - lo) * rng.uniform()
    }

    fn random_crystal(rng: &mut Rng, general: bool) -> Medium {
        if general {
            // Biaxial, half of them optically active (κ up to 10⁻³, beyond any crystal's).
            let principal = [0; 3].map(|_| between(rng, 1.4, 2.2));
            let axes = orientation(between(rng, 0.0, 3.2), between(rng, -3.2, 3.2), between(rng, -3.2, 3.2));
            let chiral = rng.uniform() < 0.5;
            let chirality = [0; 3].map(|_| if chiral { between(rng, -1e-3, 1e-3) } else { 0.0 });
            return Medium::Anisotropic(Anisotropic::new(principal, axes, chirality).unwrap());
        }
        let (no, ne) = (between(rng, 1.4, 2.2), between(rng, 1.4, 2.2));
        let axis = OpticAxis::from_angles(between(rng, 0.0, 3.2), between(rng, -3.2, 3.2));
        Medium::Uniaxial(Uniaxial::new(Indices::new(no, ne).unwrap(), axis))
    }

    /// A face normal tilted by up to `max` radians, any azimuth.
    fn random_normal(rng: &mut Rng, max: f64) -> Vector3<f64> {
        direction(between(rng, 0.0, max), between(rng, -3.2, 3.2))
    }

    /// Two wedges (each face tilted up to 34°, apertures of 6 mm), touching in one of the three
    /// ways or apart, sometimes after two ideal elements, lit at up to 60°.
    fn random_stack(rng: &mut Rng, general: bool) -> Stack {
        let radius = 3.0;
        let slope = |n: &Vector3<f64>| (1.0 - n.z * n.z).sqrt() / n.z;
        let mut layers = Vec::new();
        let mut z = 0.0;
        if rng.uniform() < 0.3 {
            for gap_mm in [1.0, 0.5] {
                z += gap_mm;
                layers.push(Layer {
                    gap_mm,
                    element: Element::Ideal(jones::retarder(1.0, 0.3)),
                });
            }
        }
        let contact = match (rng.uniform() * 4.0) as usize {
            0 => Contact::Outside,
            1 => Contact::Film(1.0),
            2 => Contact::Film(between(rng, 1.3, 1.7)),
            _ => Contact::Direct,
        };
        let mut previous_back = None;
        for k in 0..2 {
            let apart = k == 0 || contact == Contact::Outside;
            let gap_mm = if apart { between(rng, 0.5, 2.0) } else { 0.0 };
            z += gap_mm;
            let front = match previous_back {
                Some(back) if !apart => back,
                _ => Plane {
                    normal: random_normal(rng, 0.6),
                    point: Vector3::new(0.0, 0.0, z),
                },
            };
            let back_normal = random_normal(rng, 0.6);
            let thickness_mm = 0.5 + radius * (slope(&front.normal) + slope(&back_normal));
            let back = Plane {
                normal: back_normal,
                point: Vector3::new(0.0, 0.0, z + thickness_mm),
            };
            layers.push(Layer {
                gap_mm,
                element: Element::Slab(Slab {
                    medium: random_crystal(rng, general),
                    thickness_mm,
                    faces: Some(Faces {
                        front,
                        back,
                        aperture: Some(Aperture {
                            centre: Vector3::new(0.0, 0.0, z),
                            axis: Vector3::z(),
                            radius_mm: radius,
                        }),
                        contact: if k == 0 { Contact::Outside } else { contact },
                    }),
                }),
            });
            z += thickness_mm;
            previous_back = Some(back);
        }
        stack_of(rng, layers)
    }

    fn stack_of(rng: &mut Rng, layers: Vec<Layer>) -> Stack {
        let j = jones::linear(between(rng, 0.0, 3.0));
        Stack {
            wavelength: Wavelength::from_nm(633.0).unwrap(),
            outside_index: 1.0,
            losses: if rng.uniform() < 0.5 {
                Losses::Ideal
            } else {
                Losses::Uncoated
            },
            input: InputBeam {
                direction: random_normal(rng, 1.05),
                diameter_mm: 1.0,
                jones: Some(j),
                stokes: jones::stokes(&j),
            },
            layers,
            screen_mm: between(rng, 0.0, 50.0),
            cells: Vec::new(),
        }
    }

    /// Checks that the chain and the whole trace `traced` of `stack` agree on the ray `label`:
    /// both have it, with the same direction and exit point to rounding, or neither has; counts it
    /// in `counts` as [got through, missing].
    fn same_end(
        stack: &Stack,
        traced: &crate::optics::traced::Trace,
        label: &str,
        case: usize,
        counts: &mut [usize; 2],
    ) {
        let path = traced.paths.iter().find(|p| p.label == label);
        match (chain(stack, label), path) {
            (Some(end), Some(p)) => {
                let dd = (end.direction - p.direction).norm();
                let dp = (end.exit_point_mm - Vector3::from(p.exit_point_mm)).norm();
                assert!(
                    dd < 1e-13 && dp < 1e-11,
                    "case {case} {label}: direction {dd:e}, exit {dp:e} mm"
                );
                counts[0] += 1;
            }
            (None, None) => counts[1] += 1,
            (ours, theirs) => panic!(
                "case {case} {label}: chain {ours:?}, trace {:?}",
                theirs.map(|p| &p.label)
            ),
        }
    }

    /// Independent path through the code: the whole trace (fields, boundary problems, rejected
    /// rays) and the chain agree on every ray of generated wedge pairs: the same rays get
    /// through, with the same directions and exit points, to rounding.
    #[test]
    fn the_chain_ends_where_the_whole_trace_does() {
        let mut rng = Rng::new(17);
        let mut counts = [0usize; 2];
        for case in 0..3000 {
            let stack = random_stack(&mut rng, false);
            let traced = trace_planar(&stack);
            for label in ["oo", "oe", "eo", "ee"] {
                same_end(&stack, &traced, label, case, &mut counts);
            }
            assert!(chain(&stack, "o").is_none() && chain(&stack, "oeo").is_none() && chain(&stack, "ox").is_none());
        }
        // Both outcomes are met often (12,000 rays in all; 5,589 get through with this seed).
        assert!(counts[0] > 4000 && counts[1] > 4000, "through, missing: {counts:?}");
    }

    /// The letters of each crystal's two modes, in order.
    fn letters_of(stack: &Stack) -> Vec<[char; 2]> {
        stack
            .layers
            .iter()
            .filter_map(|l| match l.element {
                Element::Slab(s) => Some(s.medium.letters()),
                Element::Ideal(_) | Element::Cell(_) => None,
            })
            .collect()
    }

    /// A plan made once and followed at many incidences gives, number for number, what the chain
    /// of the stack lit at each of them gives (which the tests above hold to the whole trace).
    #[test]
    fn a_plan_followed_at_many_incidences_is_the_chain_at_each() {
        let mut rng = Rng::new(41);
        for case in 0..300 {
            let mut stack = random_stack(&mut rng, case % 3 == 0);
            let letters = letters_of(&stack);
            let label: String = [letters[0][case % 2], letters[1][(case / 2) % 2]].iter().collect();
            let plan = ChainPlan::new(&stack, &label).unwrap();
            for k in 0..5 {
                stack.input.direction = direction(0.05 * k as f64, 1.3 * k as f64);
                assert_eq!(
                    plan.follow(stack.input.direction),
                    chain(&stack, &label),
                    "case {case} {label} {k}"
                );
            }
        }
    }

    /// The same for biaxial and optically active crystals (the 4×4 solver in each face's frame):
    /// the chain's rays, labelled with the crystals' own letters, are the whole trace's.
    #[test]
    fn the_chain_ends_where_the_whole_trace_does_in_general_crystals() {
        let mut rng = Rng::new(29);
        let mut counts = [0usize; 2];
        for case in 0..600 {
            let stack = random_stack(&mut rng, true);
            let traced = trace_planar(&stack);
            let letters = letters_of(&stack);
            for (a, b) in [(0, 0), (0, 1), (1, 0), (1, 1)] {
                let label: String = [letters[0][a], letters[1][b]].iter().collect();
                same_end(&stack, &traced, &label, case, &mut counts);
            }
        }
        assert!(counts[0] > 600 && counts[1] > 300, "through, missing: {counts:?}");
    }
}
