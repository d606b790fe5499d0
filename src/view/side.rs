//! The side view: the stack in the x–z plane, to scale, with every ray through it.
//!
//! World coordinates are millimetres with z along world x (to the right) and the lab x along
//! world y (up), as `../shared/CONVENTIONS.md` asks; +y of the lab points out of the screen.
//! The same drawing can be made in another plane that holds z ([`SidePlane`]): the y–z plane
//! (y up, lab x into the screen), or the plane of z and the first crystal's e-ray walk-off
//! direction w (w up), so that a walk-off out of the x–z plane is seen. Such a view draws each
//! lab point's component along the chosen direction where the x–z view draws its x.
//! Plates are drawn to scale. When the stack is much longer than it is wide, the transverse
//! direction is drawn stretched by a round factor ([`Scene::y_stretch`]), said in the caption and
//! shown by a second scale bar; all coordinates in the scene stay physical.
//!
//! What it shows: each crystal with its optic axis (the projection on x–z as a double arrow, and
//! ⊙ or ⊗ with the out-of-plane component when the axis leaves the plane), each ideal element as a
//! thin bar, the incident beam, o-rays solid and e-rays dashed in every crystal (rays in the
//! outside medium keep the style of their last crystal), a label at the end of each ray, a
//! dimension line across the exit spots, the walk-off angle of the first crystal marked with its
//! value, and scale bars. Every length of the view is written in one unit, chosen from the largest
//! ([`LengthUnit::for_values`]); rays that carry no power ([`NO_POWER`]) are drawn thin and grey
//! and their spot is labelled "no power".
//!
//! Faces at any angle (contract version 2): a crystal is drawn as the section of its slab by the
//! view's plane, its faces at their true angles (mount included) between the edges of its
//! aperture; each ray leaves along its own direction; a rejected ray (total internal reflection
//! or outside an aperture) is a short marked stub along its direction with its power written.

use crate::contract::geometry::Contact;
use crate::contract::result::{DirectorReport, ElementReport, Ray, TraceResult};
use crate::contract::scenario::{CrystalPlate, ElementKind, Scenario};
use crate::numfmt::{LengthUnit, NO_POWER, length, sig};
use crate::optics::geometry::Plane;
use crate::view::scene::{Anchor, Aspect, Item, Point, Priority, Rect, Role, Scene, nice_step};
use nalgebra::Vector3;

/// Dash pattern of e-rays (px).
pub const E_DASH: [f64; 2] = [7.0, 4.0];
/// Depths at which a liquid-crystal cell's director is drawn, entrance to exit.
pub const DIRECTOR_DASHES: usize = 9;

fn mode_style(letter: Option<char>) -> (Role, Vec<f64>) {
    match letter {
        Some('o') => (Role::ORay, vec![]),
        Some('e') => (Role::ERay, E_DASH.to_vec()),
        _ => (Role::Incident, vec![]),
    }
}

/// The z intervals of the crystals, in stack order.
fn crystal_spans(result: &TraceResult) -> Vec<(f64, f64)> {
    result
        .elements
        .iter()
        .filter_map(|e| match e {
            ElementReport::Crystal {
                z_front_mm, z_back_mm, ..
            } => Some((*z_front_mm, *z_back_mm)),
            _ => None,
        })
        .collect()
}

/// Builds the side view of a traced scenario, in the x–z plane.
pub fn side_view(scenario: &Scenario, result: &TraceResult) -> Scene {
    side_view_in(scenario, result, SidePlane::Xz)
}

/// Builds the side view of a traced scenario in `plane`.
pub fn side_view_in(scenario: &Scenario, result: &TraceResult, plane: SidePlane) -> Scene {
    draw(scenario, result, &plane.frame(result))
}

fn draw(scenario: &Scenario, result: &TraceResult, names: &PlaneNames) -> Scene {
    let f = Frame::new(scenario, result, names);
    let mut scene = Scene::new(&names.title, "", Aspect::Equal);
    scene.y_stretch = f.s;
    scene.caption = if f.s > 1.0 {
        format!("{}; transverse scale ×{}", names.axes, sig(f.s, 2))
    } else {
        format!("{}; to scale", names.axes)
    };
    f.elements(&mut scene, scenario, result);
    f.incident(&mut scene);
    f.rays(&mut scene, result);
    f.rejected(&mut scene, result);
    f.spot_labels(&mut scene, result);
    f.walkoff(&mut scene, result);
    f.dimension(&mut scene, result);
    let yb = f.scale_bars(&mut scene);
    scene.bounds = Rect {
        x0: f.z_min,
        y0: yb,
        x1: f.z_max,
        y1: f.px1,
    }
    .padded(0.03, 0.12);
    scene
}

/// Where a side view puts things: its z range, transverse range and stretch, the beam's slope
/// outside the stack, the exit points' spread and the one length unit of the view.
struct Frame<'a> {
    names: &'a PlaneNames,
    /// The beam diameter (mm).
    d: f64,
    /// The crystals' z intervals.
    spans: Vec<(f64, f64)>,
    /// The z of the last face.
    z_end_stack: f64,
    /// The z of the screen, where the spots lie.
    z_screen: f64,
    /// The length of outside medium drawn before and after the stack.
    lead: f64,
    z_min: f64,
    z_max: f64,
    z_extent: f64,
    /// Drawn transverse offset per unit of z of every ray outside the stack.
    slope: f64,
    /// The plates' transverse extent.
    px0: f64,
    px1: f64,
    /// The transverse stretch ([`Scene::y_stretch`]).
    s: f64,
    /// The z scale bar's length and the transverse one's.
    bar: f64,
    transverse_bar: f64,
    /// The lowest and highest exit point, and the distance between them (0 for one ray).
    lo: f64,
    hi: f64,
    spread: f64,
    unit: LengthUnit,
}

impl<'a> Frame<'a> {
    /// Measures the stack, the rays and the lengths the view will write.
    fn new(scenario: &Scenario, result: &TraceResult, names: &'a PlaneNames) -> Frame<'a> {
        let d = scenario.beam.diameter_mm;
        let u = result.input.direction;
        let spans = crystal_spans(result);
        let z_end_stack = result.rays.first().map_or(0.0, |r| r.exit_z_mm);
        let stack_len = z_end_stack.max(1e-9);
        let lead = (0.3 * stack_len).max(2.0 * d).max(1.0);
        let (z_min, z_max) = (-lead, z_end_stack + lead);
        let across3 = |p: &[f64; 3]| names.turn([p[0], p[1]])[0];
        let slope = if u[2] > 0.0 { across3(&u) / u[2] } else { 0.0 };
        let (mut px0, mut px1) = transverse_extent(result, names, slope, z_min, lead, d);
        // Apertures are drawn whole.
        for el in &scenario.elements {
            if let ElementKind::Crystal(c) = el.kind
                && let Some(a) = c.placement.aperture_mm
            {
                px0 = px0.min(-0.55 * a);
                px1 = px1.max(0.55 * a);
            }
        }
        let z_extent = z_max - z_min;
        let s = stretch_for(z_extent, px1 - px0);

        // The lengths the view writes, and the one unit they share.
        // The dimension spans the rays' exit points, not the spots' centres: rays whose beams
        // overlap form one spot, yet their separation is still the figure a reader looks for.
        let exit_xs: Vec<f64> = result.rays.iter().map(|p| names.turn(p.exit_position_mm)[0]).collect();
        let lo = exit_xs.iter().cloned().fold(f64::INFINITY, f64::min);
        let hi = exit_xs.iter().cloned().fold(f64::NEG_INFINITY, f64::max);
        let spread = if exit_xs.len() >= 2 { hi - lo } else { 0.0 };
        let bar = nice_step(z_extent / 5.0);
        let transverse_bar = nice_step((px1 - px0) / 3.0);
        let mut lengths: Vec<f64> = spans.iter().map(|(z0, z1)| z1 - z0).collect();
        lengths.extend([spread, bar, if s > 1.0 { transverse_bar } else { 0.0 }]);
        let unit = LengthUnit::for_values(&lengths);
        Frame {
            names,
            d,
            spans,
            z_end_stack,
            z_screen: z_end_stack + scenario.screen_mm,
            lead,
            z_min,
            z_max,
            z_extent,
            slope,
            px0,
            px1,
            s,
            bar,
            transverse_bar,
            lo,
            hi,
            spread,
            unit,
        }
    }

    /// The drawn transverse coordinate of a lab point (x, y).
    fn across(&self, p: [f64; 2]) -> f64 {
        self.names.turn(p)[0]
    }

    /// The drawn transverse coordinate of a lab point (x, y, z).
    fn across3(&self, p: &[f64; 3]) -> f64 {
        self.across([p[0], p[1]])
    }

    /// Draws each crystal as a plate with its name, thickness and optic axis, and each ideal
    /// element as a bar with its setting.
    fn elements(&self, scene: &mut Scene, scenario: &Scenario, result: &TraceResult) {
        let mut crystal_index = 0usize;
        let mut z_cursor = 0.0;
        for (i, (el, rep)) in scenario.elements.iter().zip(result.elements.iter()).enumerate() {
            z_cursor += el.gap_mm;
            match (&el.kind, rep) {
                (
                    ElementKind::Crystal(plate),
                    ElementReport::Crystal {
                        z_front_mm,
                        z_back_mm,
                        material,
                        optic_axes,
                        ..
                    },
                ) => {
                    let (z0, z1) = (*z_front_mm, *z_back_mm);
                    self.plate(
                        scene,
                        plate,
                        el.contact,
                        (z0, z1),
                        material,
                        crystal_index,
                        optic_axes.as_ref(),
                    );
                    crystal_index += 1;
                    z_cursor = z1;
                }
                (ElementKind::Cell(cell), ElementReport::Cell { director_profile, .. }) => {
                    self.director(scene, cell.rubbing_azimuth_deg, director_profile, z_cursor, i);
                    self.ideal_element(scene, &el.kind, z_cursor, i);
                }
                (kind, _) => self.ideal_element(scene, kind, z_cursor, i),
            }
        }
    }

    /// The section of a placed crystal (front axis point at `z0`) by the view's plane: its four
    /// corners [z, across], faces at their true angles between its aperture's edges (the view's
    /// transverse extent when unlimited).
    fn outline(&self, plate: &CrystalPlate, contact: Contact, z0: f64) -> Vec<Point> {
        let (faces, mount) = plate.placement.place(z0, plate.thickness_mm, contact);
        let (c, s) = self.names.up;
        let up = mount * Vector3::new(c, s, 0.0);
        let along = mount * Vector3::z();
        let at = Vector3::new(0.0, 0.0, z0);
        let (a0, a1) = match faces.aperture {
            Some(a) => (-a.radius_mm, a.radius_mm),
            None => (self.px0, self.px1),
        };
        let corner = |a: f64, plane: &Plane| {
            let base = at + up * a;
            let s = plane.normal.dot(&(plane.point - base)) / plane.normal.dot(&along);
            let p = base + along * s;
            [p.z, self.across3(&[p.x, p.y, p.z])]
        };
        vec![
            corner(a0, &faces.front),
            corner(a0, &faces.back),
            corner(a1, &faces.back),
            corner(a1, &faces.front),
        ]
    }

    /// Draws one crystal between `z0` and `z1`: the plate, its name and thickness, its optic axis
    /// (or a biaxial crystal's two, `optic_axes` from its report).
    #[allow(clippy::too_many_arguments)] // one crystal's drawing inputs, each used once
    fn plate(
        &self,
        scene: &mut Scene,
        plate: &CrystalPlate,
        contact: Contact,
        (z0, z1): (f64, f64),
        material: &str,
        index: usize,
        optic_axes: Option<&[[f64; 3]; 2]>,
    ) {
        let (px0, px1) = (self.px0, self.px1);
        let points = if plate.placement.is_default() {
            vec![[z0, px0], [z1, px0], [z1, px1], [z0, px1]]
        } else {
            self.outline(plate, contact, z0)
        };
        scene.items.push(Item::Polygon {
            points,
            role: Role::Crystal,
            tag: format!("plate {index}"),
        });
        scene.text(
            [0.5 * (z0 + z1), px1],
            format!("{material} {}", length(z1 - z0, self.unit, 3)),
            11.0,
            Anchor::Middle,
            Role::Caption,
        );
        let centre = [0.5 * (z0 + z1), 0.5 * (px0 + px1)];
        let len = (z1 - z0).min((px1 - px0) * self.s) * 0.3;
        match optic_axes {
            // A biaxial crystal: its two optic axes (lab frame), turned into the drawn plane.
            Some(axes) => {
                let (s, c) = (-self.names.turn_deg).to_radians().sin_cos();
                for (k, a) in axes.iter().enumerate() {
                    let v = Vector3::new(c * a[0] - s * a[1], s * a[0] + c * a[1], a[2]);
                    let name = if k == 0 { "c₁" } else { "c₂" };
                    axis_mark(scene, v, name, centre, len, self.s, &format!("{index}.{}", k + 1));
                }
            }
            None => {
                if let Ok(axis) =
                    crate::contract::resolve::axis_from_degrees(plate.tilt_deg, plate.azimuth_deg - self.names.turn_deg)
                {
                    axis_mark(scene, axis.unit(), "c", centre, len, self.s, &index.to_string());
                }
            }
        }
    }

    /// Draws a liquid-crystal cell's director (element `i`, at `z`) as short dashes in a slot
    /// around its bar: [`DIRECTOR_DASHES`] depths from entrance to exit across the slot, in three
    /// rows, each dash the director's projection on the drawn plane at that depth (a director
    /// along the plane's normal shows as a dot), drawn at its true screen angle.
    fn director(&self, scene: &mut Scene, rubbing_deg: f64, profile: &DirectorReport, z: f64, i: usize) {
        let nodes = profile.tilt_deg.len();
        if nodes < 2 {
            return;
        }
        let half_slot = 0.02 * self.z_extent;
        let step = 2.0 * half_slot / (DIRECTOR_DASHES - 1) as f64;
        let half = 0.4 * step;
        for k in 0..DIRECTOR_DASHES {
            let j = ((k * (nodes - 1)) as f64 / (DIRECTOR_DASHES - 1) as f64).round() as usize;
            let tilt = profile.tilt_deg[j].to_radians();
            let azimuth = (rubbing_deg + profile.twist_deg[j] - self.names.turn_deg).to_radians();
            let (pz, px) = (tilt.sin(), tilt.cos() * azimuth.cos());
            let (dz, dx) = (pz * half, px * half / self.s);
            let zk = z - half_slot + step * k as f64;
            for row in [0.25, 0.5, 0.75] {
                let x = self.px0 + (self.px1 - self.px0) * row;
                scene.line(
                    vec![[zk - dz, x - dx], [zk + dz, x + dx]],
                    Role::Axis,
                    vec![],
                    1.5,
                    format!("director {i}"),
                );
            }
        }
    }

    /// Draws an ideal element (element `i`) as a bar at `z` with its setting below.
    fn ideal_element(&self, scene: &mut Scene, kind: &ElementKind, z: f64, i: usize) {
        let (name, tag) = match kind {
            ElementKind::Retarder {
                retardance_waves,
                fast_axis_deg,
            } => (
                format!("Γ {} λ @ {}°", sig(*retardance_waves, 3), sig(*fast_axis_deg, 3)),
                "retarder",
            ),
            ElementKind::Polarizer { transmission_axis_deg } => {
                (format!("pol. {}°", sig(*transmission_axis_deg, 3)), "polarizer")
            }
            ElementKind::Rotator { angle_deg } => (format!("rot. {}°", sig(*angle_deg, 3)), "rotator"),
            ElementKind::Cell(c) => (format!("LC {} V", sig(c.voltage_v, 3)), "lc_cell"),
            ElementKind::Crystal(_) => (String::new(), "crystal"),
        };
        scene.items.push(Item::Polyline {
            points: vec![[z, self.px0], [z, self.px1]],
            role: Role::Element,
            dash: vec![],
            width: 3.0,
            tag: format!("{tag} {i}"),
        });
        scene.label(
            [z, self.px0],
            name,
            11.0,
            Anchor::Middle,
            Role::Caption,
            Priority::Detail,
        );
    }

    /// Draws the incident beam up to the first face, with its label.
    fn incident(&self, scene: &mut Scene) {
        let (z_min, slope) = (self.z_min, self.slope);
        scene.line(
            vec![[z_min, slope * z_min], [0.0, 0.0]],
            Role::Incident,
            vec![],
            2.0,
            "incident",
        );
        scene.label(
            [z_min, slope * z_min],
            "in",
            12.0,
            Anchor::Start,
            Role::Label,
            Priority::Detail,
        );
    }

    /// Draws every ray, segment by segment, with its line after the stack and its exit dot.
    ///
    /// Each ray's items go to a bucket by kind and role (segments, exit lines, exit dots; o, e,
    /// other), appended in bucket order after the loop: the canvas strokes each run of one style
    /// as one path, which keeps thousands of rays cheap.
    fn rays(&self, scene: &mut Scene, result: &TraceResult) {
        let mut buckets: [Vec<Item>; 9] = Default::default();
        for ray in &result.rays {
            let last = self.segments(&mut buckets, ray);
            self.exit(&mut buckets, ray, last);
        }
        for b in &mut buckets {
            scene.items.append(b);
        }
    }

    /// Puts a ray's segments through the stack in `buckets`; returns the letter of its last
    /// crystal.
    fn segments(&self, buckets: &mut [Vec<Item>; 9], ray: &Ray) -> Option<char> {
        let letters: Vec<char> = ray.label.chars().collect();
        let mut last: Option<char> = None;
        for w in ray.points_mm.windows(2) {
            let (a, b) = (w[0], w[1]);
            let mid = 0.5 * (a[2] + b[2]);
            let inside = self.spans.iter().position(|(z0, z1)| mid > *z0 && mid < *z1);
            let letter = match inside {
                Some(k) => letters.get(k).copied(),
                None => last,
            };
            if inside.is_some() {
                last = letter;
            }
            // Rays that agree on their first c letters share this segment (c = crystals crossed
            // by its end): draw it once, for the ray whose remaining letters are all "o".
            let crossed = self.spans.iter().filter(|(_, z1)| *z1 <= b[2] + 1e-12).count();
            if letters.iter().skip(crossed).any(|&l| l != 'o') {
                continue;
            }
            let (role, dash) = mode_style(letter);
            buckets[bucket(role)].push(Item::Polyline {
                points: vec![[a[2], self.across3(&a)], [b[2], self.across3(&b)]],
                role,
                dash,
                width: 2.0,
                tag: format!("ray {} segment", ray.label),
            });
        }
        last
    }

    /// Puts a ray's line from its exit point to the view's edge and its exit dot in `buckets`,
    /// in the style of its last crystal's mode `last`.
    fn exit(&self, buckets: &mut [Vec<Item>; 9], ray: &Ray, last: Option<char>) {
        let exit: Point = [ray.exit_point_mm[2], self.across(ray.exit_position_mm)];
        let slope = if ray.direction[2] > 0.0 {
            self.across3(&ray.direction) / ray.direction[2]
        } else {
            self.slope
        };
        let end: Point = [self.z_max, exit[1] + slope * (self.z_max - exit[0])];
        let (role, dash) = mode_style(last);
        // A ray that carries no power (blocked by a polarizer, or emptied by a half-wave plate)
        // is still shown, thin and grey, so that the reader sees where it would go.
        let (role, width) = if ray.power < NO_POWER {
            (Role::Grid, 1.0)
        } else {
            (role, 2.0)
        };
        buckets[3 + bucket(role)].push(Item::Polyline {
            points: vec![exit, end],
            role,
            dash,
            width,
            tag: format!("ray {}", ray.label),
        });
        buckets[6 + bucket(role)].push(Item::Dot {
            center: exit,
            radius_px: 3.0,
            role,
            filled: true,
            tag: format!("exit {}", ray.label),
        });
    }

    /// Draws each rejected ray as a short stub from where it stopped along its direction (the
    /// reflected one for total internal reflection), marked and labelled with its power.
    fn rejected(&self, scene: &mut Scene, result: &TraceResult) {
        let len = 0.08 * self.z_extent;
        for (k, r) in result.rejected.iter().enumerate() {
            // Its path up to where it stopped, in the style of its last mode.
            let (role, dash) = mode_style(r.label.chars().last());
            let path: Vec<Point> = r.points_mm.iter().map(|p| [p[2], self.across3(p)]).collect();
            if path.len() >= 2 {
                scene.items.push(Item::Polyline {
                    points: path,
                    role,
                    dash,
                    width: 2.0,
                    tag: format!("rejected {k} path"),
                });
            }
            let from: Point = [r.point_mm[2], self.across3(&r.point_mm)];
            let d = r.direction;
            let dz = d[2];
            let dx = self.across3(&d);
            let norm = dz.hypot(dx).max(f64::MIN_POSITIVE);
            let to: Point = [from[0] + len * dz / norm, from[1] + len * dx / norm / self.s];
            scene.items.push(Item::Polyline {
                points: vec![from, to],
                role: Role::Warning,
                dash: vec![2.0, 2.0],
                width: 1.5,
                tag: format!("rejected {k} {}", r.label),
            });
            scene.items.push(Item::Dot {
                center: from,
                radius_px: 3.5,
                role: Role::Warning,
                filled: false,
                tag: format!("rejected {k} at"),
            });
            let why = if r.reason == "outside aperture" {
                "clipped"
            } else {
                "reflected"
            };
            scene.text(
                to,
                format!("{} {why} {}", r.label, crate::numfmt::power(r.power, 3)),
                10.0,
                Anchor::Start,
                Role::Warning,
            );
        }
    }

    /// Writes one label per spot, at the end of its rays.
    fn spot_labels(&self, scene: &mut Scene, result: &TraceResult) {
        for spot in &result.spots {
            let name = spot.name();
            // The spot lies on the screen; its label goes where its beam crosses the view's edge.
            let d = spot.direction;
            let slope = if d[2] > 0.0 {
                self.across3(&d) / d[2]
            } else {
                self.slope
            };
            let x = self.across(spot.position_mm) + slope * (self.z_max - self.z_screen);
            let name = if spot.power < NO_POWER {
                format!("{name} (no power)")
            } else {
                name
            };
            scene.text([self.z_max, x], name, 12.0, Anchor::Start, Role::Label);
        }
    }

    /// Marks the walk-off of the first crystal with a propagating e-wave.
    fn walkoff(&self, scene: &mut Scene, result: &TraceResult) {
        let Some((rep_e, z0)) = result.elements.iter().find_map(|e| match e {
            ElementReport::Crystal { modes, z_front_mm, .. } if modes.second.ray_direction.is_some() => {
                Some((modes.second.clone(), *z_front_mm))
            }
            _ => None,
        }) else {
            return;
        };
        let x_entry = result
            .rays
            .first()
            .and_then(|r| r.points_mm.iter().find(|p| (p[2] - z0).abs() < 1e-12))
            .map_or(0.0, |p| self.across3(p));
        // A walk-off at the level of rounding (an axis across the beam) is no walk-off to mark.
        let w = rep_e.walkoff_deg.filter(|w| w.abs() > 1e-9);
        if let (Some(k), Some(ray), Some(w)) = (rep_e.wave_vector, rep_e.ray_direction, w) {
            walkoff_mark(
                scene,
                [z0, x_entry],
                self.names.turn3(k),
                self.names.turn3(ray),
                w,
                0.4 * self.spans.first().map_or(1.0, |s| s.1 - s.0).min(0.25 * self.z_extent),
                self.s,
            );
        }
    }

    /// Draws the dimension across the exit points (where it is long enough on screen).
    fn dimension(&self, scene: &mut Scene, result: &TraceResult) {
        if self.spread <= 0.0 {
            return;
        }
        let zd = self.z_end_stack + 0.35 * self.lead;
        let has_y = result
            .rays
            .iter()
            .any(|p| self.names.turn(p.exit_position_mm)[1].abs() > 1e-9 * self.d);
        let label = if has_y {
            format!("Δ{} {}", self.names.up_name, length(self.spread, self.unit, 3))
        } else {
            length(self.spread, self.unit, 3)
        };
        scene.dimension([zd, self.lo], [zd, self.hi], label, "dimension");
    }

    /// Draws the z scale bar and, when the view is stretched, the transverse one; returns the
    /// bars' height.
    fn scale_bars(&self, scene: &mut Scene) -> f64 {
        let (z_min, z_max, z_extent, bar, unit) = (self.z_min, self.z_max, self.z_extent, self.bar, self.unit);
        let yb = self.px0 - 0.12 * (self.px1 - self.px0);
        scene.line(
            vec![[z_min, yb], [z_min + bar, yb]],
            Role::ScaleBar,
            vec![],
            3.0,
            "scale z",
        );
        // The scale is read before any name: placed first.
        scene.label(
            [z_min + 0.5 * bar, yb],
            length(bar, unit, 3),
            11.0,
            Anchor::Middle,
            Role::ScaleBar,
            Priority::Key,
        );
        if self.s > 1.0 {
            let tb = self.transverse_bar;
            let zb = z_max - 0.02 * z_extent;
            scene.line(vec![[zb, yb], [zb, yb + tb]], Role::ScaleBar, vec![], 3.0, "scale x");
            scene.label(
                [zb - 0.01 * z_extent, yb + 0.5 * tb],
                format!("{} ({})", length(tb, unit, 3), self.names.up_name),
                11.0,
                Anchor::End,
                Role::ScaleBar,
                Priority::Detail,
            );
        }
        yb
    }
}

/// The bucket of a ray item's role within its kind: o, e, other.
fn bucket(role: Role) -> usize {
    match role {
        Role::ORay => 0,
        Role::ERay => 1,
        _ => 2,
    }
}

/// The plates' transverse extent: every ray point, the beam around them, and the lead-in/out.
fn transverse_extent(
    result: &TraceResult,
    names: &PlaneNames,
    slope: f64,
    z_min: f64,
    lead: f64,
    d: f64,
) -> (f64, f64) {
    let across = |p: [f64; 2]| names.turn(p)[0];
    let across3 = |p: &[f64; 3]| across([p[0], p[1]]);
    let mut xs: Vec<f64> = vec![slope * z_min];
    for ray in &result.rays {
        xs.extend(ray.points_mm.iter().map(across3));
        let own = if ray.direction[2] > 0.0 {
            across3(&ray.direction) / ray.direction[2]
        } else {
            slope
        };
        xs.push(across(ray.exit_position_mm) + own * lead);
    }
    xs.extend(result.rejected.iter().map(|r| across3(&r.point_mm)));
    let x_lo = xs.iter().cloned().fold(f64::INFINITY, f64::min) - d;
    let x_hi = xs.iter().cloned().fold(f64::NEG_INFINITY, f64::max) + d;
    let half = x_lo.abs().max(x_hi.abs());
    (x_lo.min(-half * 0.6), x_hi.max(half * 0.6))
}

/// The transverse stretch: a round factor when the view would be a thin strip, else 1.
fn stretch_for(z_extent: f64, transverse: f64) -> f64 {
    let x_extent = transverse.max(1e-9);
    let wanted = z_extent / x_extent / 2.5;
    if wanted > 1.5 {
        nice_step(wanted.min(1000.0)).max(1.0)
    } else {
        1.0
    }
}

/// The plane of a side view: z to the right and one transverse lab direction up.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SidePlane {
    /// x up, lab y out of the page (the contract's side view).
    Xz,
    /// y up, lab x into the page.
    Yz,
    /// The e-ray walk-off direction w of the first crystal with a propagating e-wave up
    /// (its projection on x–y); the x–z plane when no crystal walks off.
    Walkoff,
}

/// A side view's plane: its upward lab direction (cos φ, sin φ, 0) and its words.
struct PlaneNames {
    /// (cos φ, sin φ).
    up: (f64, f64),
    /// φ in degrees: crystal axes are drawn at their azimuth minus φ.
    turn_deg: f64,
    title: String,
    /// The upward direction's name, for "Δx" and the transverse scale bar.
    up_name: &'static str,
    /// The caption's orientation phrase.
    axes: String,
}

impl PlaneNames {
    /// Lab (x, y) in the drawing's frame: [along the upward direction, out of the page]
    /// (x' = x c + y s, y' = −x s + y c); x–z is left exactly as it is.
    fn turn(&self, p: [f64; 2]) -> [f64; 2] {
        let (c, s) = self.up;
        if s == 0.0 && c == 1.0 {
            p
        } else {
            [p[0] * c + p[1] * s, -p[0] * s + p[1] * c]
        }
    }

    fn turn3(&self, p: [f64; 3]) -> [f64; 3] {
        let [x, y] = self.turn([p[0], p[1]]);
        [x, y, p[2]]
    }
}

impl SidePlane {
    /// The plane's upward direction and words, for this result.
    fn frame(self, result: &TraceResult) -> PlaneNames {
        let xz = || PlaneNames {
            up: (1.0, 0.0),
            turn_deg: 0.0,
            title: "Side view (x–z)".into(),
            up_name: "x",
            axes: "z → right, x ↑ (lab y out of the page)".into(),
        };
        match self {
            SidePlane::Xz => xz(),
            SidePlane::Yz => PlaneNames {
                up: (0.0, 1.0),
                turn_deg: 90.0,
                title: "Side view (y–z)".into(),
                up_name: "y",
                axes: "z → right, y ↑ (lab x into the page)".into(),
            },
            SidePlane::Walkoff => match walkoff_azimuth(result) {
                None => PlaneNames {
                    title: "Side view (x–z: no walk-off to follow)".into(),
                    ..xz()
                },
                Some((c, s)) => {
                    let turn_deg = s.atan2(c).to_degrees();
                    // To 0.1°, without a decimal tail for whole degrees and without "-0".
                    let deg = (turn_deg * 10.0).round() / 10.0 + 0.0;
                    let phi = if deg.fract() == 0.0 {
                        format!("{deg:.0}")
                    } else {
                        format!("{deg:.1}")
                    };
                    PlaneNames {
                        up: (c, s),
                        turn_deg,
                        title: format!("Side view along the walk-off ({phi}° from x)"),
                        up_name: "w",
                        axes: format!("z → right, w ↑ (e walk-off, {phi}° from x toward y)"),
                    }
                }
            },
        }
    }
}

/// (cos φ, sin φ) of the first crystal's e-ray walk-off direction projected on x–y.
fn walkoff_azimuth(result: &TraceResult) -> Option<(f64, f64)> {
    result.elements.iter().find_map(|e| match e {
        ElementReport::Crystal { modes, .. } => {
            let w = modes.second.walkoff_direction?;
            let n = w[0].hypot(w[1]);
            (n > 1e-12).then(|| (w[0] / n, w[1] / n))
        }
        _ => None,
    })
}

/// Draws the optic-axis mark of a crystal centred at `c` (world), `len` long on screen.
fn axis_mark(scene: &mut Scene, v: Vector3<f64>, name: &str, c: Point, len: f64, stretch: f64, index: &str) {
    // In-plane projection (z, x), drawn at its true screen angle despite the stretch.
    let (pz, px) = (v.z, v.x);
    let n = pz.hypot(px);
    if n > 1e-6 {
        let half = 0.5 * len * n;
        let (dz, dx) = (pz / n * half, px / n * half / stretch);
        scene.items.push(Item::Arrow {
            from: [c[0] - dz, c[1] - dx],
            to: [c[0] + dz, c[1] + dx],
            role: Role::Axis,
            head_px: 6.0,
            tag: format!("axis {index}"),
        });
        scene.items.push(Item::Arrow {
            from: [c[0] + dz, c[1] + dx],
            to: [c[0] - dz, c[1] - dx],
            role: Role::Axis,
            head_px: 6.0,
            tag: format!("axis {index} back"),
        });
        scene.label(
            [c[0] + dz, c[1] + dx],
            name,
            12.0,
            Anchor::Start,
            Role::Axis,
            Priority::Detail,
        );
    }
    // Out-of-plane part: +y of the lab points toward the viewer.
    if v.y.abs() > 0.02 {
        let glyph = if v.y > 0.0 { "⊙" } else { "⊗" };
        scene.label(
            [c[0], c[1]],
            format!("{glyph} {name}_y {}", sig(v.y, 2)),
            12.0,
            Anchor::Middle,
            Role::Axis,
            Priority::Detail,
        );
    }
}

/// Marks the walk-off angle between wave vector `k` and ray `ray` at `at`.
fn walkoff_mark(scene: &mut Scene, at: Point, k: [f64; 3], ray: [f64; 3], walkoff_deg: f64, radius: f64, stretch: f64) {
    // Screen angles of the projections on the x–z plane.
    let ak = (k[0] * stretch).atan2(k[2]);
    let ar = (ray[0] * stretch).atan2(ray[2]);
    let r = radius.max(1e-9);
    let to_world = |a: f64, rr: f64| -> Point { [at[0] + rr * a.cos(), at[1] + rr * a.sin() / stretch] };
    scene.line(
        vec![at, to_world(ak, 1.3 * r)],
        Role::Angle,
        vec![2.0, 3.0],
        1.0,
        "wave vector",
    );
    let steps = 24;
    let arc: Vec<Point> = (0..=steps)
        .map(|i| to_world(ak + (ar - ak) * i as f64 / steps as f64, r))
        .collect();
    scene.line(arc, Role::Angle, vec![], 1.5, "walk-off arc");
    let mid = to_world(0.5 * (ak + ar) + if ar >= ak { 0.15 } else { -0.15 }, 1.15 * r);
    scene.text(
        mid,
        format!("ρ = {}°", sig(walkoff_deg, 3)),
        12.0,
        Anchor::Start,
        Role::Angle,
    );
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::trace_scenario as trace;

    fn build(doc: &str) -> (TraceResult, Scene) {
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let scene = side_view(&sc, &r);
        (r, scene)
    }

    /// An air-spaced calcite pair with its gap tilted 40°: the gap is drawn at its true angle
    /// (tan 40° = Δz/Δx across the aperture), and the o-ray, totally reflected there, is a
    /// marked stub labelled with its power.
    #[test]
    fn tilted_faces_are_drawn_at_their_angle_and_rejected_rays_as_stubs() {
        let prism = |faces: &str| {
            format!(
                r#"{{"kind": "crystal", "material": "calcite", "thickness_mm": 5, "axis": {{"tilt_deg": 90, "azimuth_deg": 90}}, "aperture_mm": 6, "faces": {faces}}}"#
            )
        };
        let doc = format!(
            r#"{{"version": 2, "elements": [{}, {}]}}"#,
            prism(r#"{"back": {"tilt_deg": 40}}"#),
            prism(r#"{"front": {"tilt_deg": 40}}"#)
        );
        let (r, scene) = build(&doc);
        let Some(Item::Polygon { points, .. }) = scene.tagged("plate 0").next() else {
            panic!("plate 0")
        };
        // Corners: front at x = ∓3, back at x = ±3 (in order); the back face's two corners.
        let (b0, b1) = (points[1], points[2]);
        assert!((b1[1] - b0[1] - 6.0).abs() < 1e-12, "{points:?}");
        assert!(
            ((b0[0] - b1[0]) / (b1[1] - b0[1]) - 40f64.to_radians().tan()).abs() < 1e-12,
            "{points:?}"
        );
        assert_eq!(r.rejected.len(), 1);
        assert!(scene.tagged("rejected 0 o").next().is_some());
        assert!(
            scene.texts().iter().any(|t| t.starts_with("o reflected 0.5")),
            "{:?}",
            scene.texts()
        );
    }

    fn first_point(scene: &Scene, tag: &str) -> Point {
        match scene.tagged(tag).next() {
            Some(Item::Polyline { points, .. }) => points[0],
            Some(Item::Dot { center, .. }) => *center,
            other => panic!("no {tag}: {other:?}"),
        }
    }

    #[test]
    fn exit_points_in_the_view_are_the_traced_ones() {
        let (r, scene) = build(include_str!("../../examples/demo.json"));
        assert!(scene.is_finite());
        for ray in &r.rays {
            let p = first_point(&scene, &format!("ray {}", ray.label));
            assert_eq!(p, [ray.exit_z_mm, ray.exit_position_mm[0]], "ray {}", ray.label);
            assert_eq!(first_point(&scene, &format!("exit {}", ray.label)), p);
        }
        // o solid, e dashed.
        let style = |tag: &str| match scene.tagged(tag).next() {
            Some(Item::Polyline { role, dash, .. }) => (*role, dash.clone()),
            _ => panic!(),
        };
        assert_eq!(style("ray o"), (Role::ORay, vec![]));
        assert_eq!(style("ray e"), (Role::ERay, E_DASH.to_vec()));
    }

    #[test]
    fn the_dimension_spans_the_separation_and_says_it() {
        let (r, scene) = build(include_str!("../../examples/demo.json"));
        let ElementReport::Crystal { separation_mm, .. } = r.elements[0] else {
            panic!()
        };
        let Some(Item::Dimension { from, to, .. }) = scene.tagged("dimension").next() else {
            panic!("no dimension")
        };
        let span = (to[1] - from[1]).abs();
        assert!((span - separation_mm.unwrap()).abs() < 1e-12, "{span}");
        assert!(
            scene.texts().iter().any(|t| t.contains("1.36 mm")),
            "{:?}",
            scene.texts()
        );
        assert!(
            scene.texts().iter().any(|t| t.starts_with("ρ = 6.19")),
            "{:?}",
            scene.texts()
        );
    }

    #[test]
    fn the_plate_is_drawn_to_scale_and_the_axis_shown() {
        let (_, scene) = build(include_str!("../../examples/demo.json"));
        let Some(Item::Polygon { points, .. }) = scene.tagged("plate 0").next() else {
            panic!()
        };
        assert_eq!(points[0][0], 5.0);
        assert_eq!(points[1][0], 17.5);
        // The demo's axis lies in the x–z plane at 45° from z.
        let Some(Item::Arrow { from, to, .. }) = scene.tagged("axis 0").next() else {
            panic!()
        };
        let screen_angle = ((to[1] - from[1]) * scene.y_stretch)
            .atan2(to[0] - from[0])
            .to_degrees();
        assert!((screen_angle - 45.0).abs() < 1e-9, "{screen_angle}");
        assert!(scene.caption.contains("transverse scale") || scene.caption.contains("to scale"));
    }

    /// A calcite plate whose optic axis leans toward +y (azimuth 90°) walks the e-ray off along
    /// −y (away from the axis: calcite is negative): invisible in the x–z plane, the full separation in the y–z plane and along the
    /// walk-off. Independent check: the trace's own `separation_mm` (and its vector along y).
    #[test]
    fn a_walkoff_along_y_shows_in_the_yz_and_walkoff_planes_only() {
        let doc = r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45, "azimuth_deg": 90}}]}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let ElementReport::Crystal {
            separation_mm,
            separation_vector_mm,
            ..
        } = &r.elements[0]
        else {
            panic!()
        };
        let sep = separation_mm.unwrap();
        let v = separation_vector_mm.unwrap();
        assert!(sep > 0.5 && v[0].abs() < 1e-12 * sep, "a walk-off along y: {v:?}");
        let span = |scene: &Scene| {
            let xs: Vec<f64> = r
                .rays
                .iter()
                .map(|ray| first_point(scene, &format!("exit {}", ray.label))[1])
                .collect();
            xs.iter().cloned().fold(f64::NEG_INFINITY, f64::max) - xs.iter().cloned().fold(f64::INFINITY, f64::min)
        };
        let xz = side_view_in(&sc, &r, SidePlane::Xz);
        assert_eq!(xz, side_view(&sc, &r));
        assert!(span(&xz) < 1e-12 * sep, "x–z shows {} mm", span(&xz));
        // (A dimension across rounding noise, if any, spans ~0 too.)
        if let Some(Item::Dimension { from, to, .. }) = xz.tagged("dimension").next() {
            assert!((to[1] - from[1]).abs() < 1e-12 * sep, "x–z dimension {from:?} {to:?}");
        }
        for (plane, title) in [
            (SidePlane::Yz, "Side view (y–z)"),
            (SidePlane::Walkoff, "Side view along the walk-off (-90° from x)"),
        ] {
            let scene = side_view_in(&sc, &r, plane);
            assert!(scene.is_finite(), "{plane:?}");
            assert_eq!(scene.title, title);
            assert!(
                (span(&scene) - sep).abs() < 1e-12 * sep,
                "{plane:?}: {} vs {sep}",
                span(&scene)
            );
            let Some(Item::Dimension { from, to, .. }) = scene.tagged("dimension").next() else {
                panic!("{plane:?}: no dimension")
            };
            let dim = (to[1] - from[1]).abs();
            assert!(
                (dim - sep).abs() < 1e-12 * sep,
                "{plane:?}: dimension {dim} vs separation {sep}"
            );
        }
        // The axis leans toward +y: in the y–z view it is drawn in the plane at 45° from z.
        let yz = side_view_in(&sc, &r, SidePlane::Yz);
        let Some(Item::Arrow { from, to, .. }) = yz.tagged("axis 0").next() else {
            panic!()
        };
        let angle = ((to[1] - from[1]) * yz.y_stretch).atan2(to[0] - from[0]).to_degrees();
        assert!((angle - 45.0).abs() < 1e-9, "{angle}");
    }

    /// Rays whose beams overlap form one spot (0.05 mm apart in a 1 mm beam), yet the side view
    /// still dimensions their separation: it spans the rays' exit points, not the spots'.
    #[test]
    fn rays_in_one_spot_still_get_their_separation_dimensioned() {
        let doc = r#"{"beam": {"diameter_mm": 1}, "elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 0.5, "axis": {"tilt_deg": 45, "azimuth_deg": 0}}]}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        assert_eq!(r.spots.len(), 1, "one spot");
        let ElementReport::Crystal { separation_mm, .. } = &r.elements[0] else {
            panic!()
        };
        let sep = separation_mm.unwrap();
        let scene = side_view(&sc, &r);
        let Some(Item::Dimension { from, to, .. }) = scene.tagged("dimension").next() else {
            panic!("no dimension")
        };
        assert!(
            ((to[1] - from[1]).abs() - sep).abs() < 1e-12,
            "{from:?} {to:?} vs {sep}"
        );
    }

    #[test]
    fn the_walkoff_plane_follows_any_azimuth_and_falls_back_without_walkoff() {
        let doc = r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45, "azimuth_deg": 30}}]}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let scene = side_view_in(&sc, &r, SidePlane::Walkoff);
        let ElementReport::Crystal { separation_mm, .. } = &r.elements[0] else {
            panic!()
        };
        let Some(Item::Dimension { from, to, .. }) = scene.tagged("dimension").next() else {
            panic!("no dimension")
        };
        let dim = (to[1] - from[1]).abs();
        assert!((dim - separation_mm.unwrap()).abs() < 1e-12, "{dim}");
        // Calcite is negative: the e-ray leans away from the optic axis (azimuth 30° − 180°).
        assert!(scene.title.contains("(-150° from x)"), "{}", scene.title);
        // Along z the crystal does not walk off: the x–z plane, said so.
        let doc = r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 0, "azimuth_deg": 0}}]}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let r = trace(&sc).unwrap();
        let scene = side_view_in(&sc, &r, SidePlane::Walkoff);
        assert!(scene.title.contains("no walk-off"), "{}", scene.title);
        assert!(scene.is_finite());
    }

    #[test]
    fn out_of_plane_axes_get_a_mark() {
        let (_, scene) = build(
            r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 5, "axis": {"tilt_deg": 45, "azimuth_deg": 90}}]}"#,
        );
        assert!(scene.texts().iter().any(|t| t.starts_with("⊙")), "{:?}", scene.texts());
        let (_, scene) = build(
            r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 5, "axis": {"tilt_deg": 45, "azimuth_deg": -90}}]}"#,
        );
        assert!(scene.texts().iter().any(|t| t.starts_with("⊗")));
    }

    /// A cell's director is drawn in its slot: flat dashes (along z's normal, the faces) below
    /// threshold, standing dashes (along z) far above it.
    #[test]
    fn the_cells_director_stands_up_with_voltage() {
        let slope = |v: f64| {
            let doc = format!(
                r#"{{"version": 2, "elements": [{{"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "pretilt_deg": 0, "voltage_v": {v}}}]}}"#
            );
            let (_, scene) = build(&doc);
            let dashes: Vec<&Item> = scene.tagged("director 0").collect();
            assert_eq!(dashes.len(), 3 * DIRECTOR_DASHES);
            // The middle dash of the middle row: its extent along z against across.
            let Item::Polyline { points, .. } = dashes[3 * (DIRECTOR_DASHES / 2) + 1] else {
                panic!("a line")
            };
            ((points[1][0] - points[0][0]).abs(), (points[1][1] - points[0][1]).abs())
        };
        let (dz0, dx0) = slope(0.0);
        assert!(dz0 < 1e-12 && dx0 > 0.0, "flat at 0 V: {dz0} {dx0}");
        let (dz, dx) = slope(20.0);
        assert!(dz > 0.0 && dx < 0.1 * dx0, "standing at 20 V: {dz} {dx}");
    }
}
