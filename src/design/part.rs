//! A designed part as a typed scenario, and how a design answer writes it.
//!
//! Solvers build a [`Part`]: a [`Scenario`] value (the designed crystals, and a recombiner's
//! middle element, lit by a beam linearly polarized at 45° at normal incidence), which they trace
//! without writing or reading JSON. The answer's `scenario` document is written from it once, in
//! the short form a reader loads into the page: version, wavelength, the beam's polarization (and
//! its diameter when the request gave a beam), and every element with its gap; everything else
//! is left to the contract's defaults (outside index 1, ideal faces, normal incidence, and the
//! screen at the last face unless the part sets it). A part
//! with faces at an angle, an aperture, a mount or a contact is written as version 2 with those
//! fields, as is a part designed for a temperature other than 20 °C (with its `temperature_c`);
//! plane-parallel plates in air at 20 °C stay version 1.

use crate::contract::geometry::{Contact, Placement};
use crate::contract::group::{Group, groups};
use crate::contract::request::principal::is_principal;
use crate::contract::scenario::{
    Beam, Chirality, CrystalPlate, Element, ElementKind, Medium, Polarization, Scenario, element_json,
    polarization_json,
};
use crate::design::principal::Oriented;
use crate::error::Error;
use crate::optics::interface::Losses;
use crate::optics::spots::power_of;
use crate::optics::stack::{Element as StackElement, Stack};
use crate::optics::trace::{Trace, trace};
use crate::optics::traced::Path;
use crate::optics::wavelength::Wavelength;
use nalgebra::Vector3;
use serde::{Serialize, Serializer};
use serde_json::{Value, json};

/// Beam diameter of a part whose request gives no beam, mm (the contract's default).
const DEFAULT_BEAM_MM: f64 = 1.0;

/// A designed part in its set-up.
#[derive(Debug, Clone, PartialEq)]
pub struct Part {
    /// The set-up, ready to trace.
    pub scenario: Scenario,
    /// Whether the request gave a beam, whose diameter the answer then states.
    pub states_beam: bool,
}

impl Part {
    /// `elements` at `wavelength`, lit by a beam of `beam_diameter_mm` (the default when `None`)
    /// linearly polarized at 45°, at normal incidence.
    pub fn new(wavelength: Wavelength, beam_diameter_mm: Option<f64>, elements: Vec<Element>) -> Part {
        Part {
            scenario: Scenario {
                wavelength,
                air_wavelength_nm: None,
                outside_index: 1.0,
                losses: Losses::Ideal,
                beam: Beam {
                    diameter_mm: beam_diameter_mm.unwrap_or(DEFAULT_BEAM_MM),
                    polar_deg: 0.0,
                    azimuth_deg: 0.0,
                    polarization: Polarization::Linear { azimuth_deg: 45.0 },
                },
                elements,
                screen_mm: 0.0,
                temperature_c: crate::optics::material::REFERENCE_C,
                spectrum: None,
            },
            states_beam: beam_diameter_mm.is_some(),
        }
    }

    /// The part working at `temperature_c` °C (its thicknesses stay those at 20 °C; a trace grows
    /// them). The document then carries `temperature_c` unless it is 20.
    pub fn at_temperature(mut self, temperature_c: f64) -> Part {
        self.scenario.temperature_c = temperature_c;
        self
    }

    /// The crystals of the part with their thicknesses, in stack order.
    pub fn crystals(&self) -> Vec<(Medium, f64)> {
        self.scenario
            .elements
            .iter()
            .filter_map(|e| match e.kind {
                ElementKind::Crystal(p) => Some((p.medium, p.thickness_mm)),
                _ => None,
            })
            .collect()
    }

    /// The answer's `scenario` document (see the module header).
    pub fn document(&self) -> Value {
        let sc = &self.scenario;
        let mut beam = json!({"polarization": polarization_json(&sc.beam.polarization)});
        if self.states_beam {
            beam["diameter_mm"] = json!(sc.beam.diameter_mm);
        }
        // Version 1 while the part is plane-parallel plates in air, so that those answers read as
        // before; version 2 as soon as an element needs its geometry.
        // An optically active crystal is version 2 too: version 1 had no optical activity.
        // So is a part designed for a temperature other than 20 °C, which carries it, one holding
        // a biaxial crystal (the contract's "More media") and one holding a liquid-crystal cell.
        let at_reference = sc.temperature_c == crate::optics::material::REFERENCE_C;
        let plain = at_reference
            && sc.elements.iter().all(|e| {
                e.contact == Contact::Air
                    && !matches!(e.kind, ElementKind::Cell(_))
                    && !matches!(e.kind, ElementKind::Crystal(c)
                    if !c.placement.is_default() || c.chirality.is_some_and(|ch| ch.active) || is_principal(&c.medium))
            });
        let mut doc = json!({
            "version": if plain { 1 } else { 2 },
            "wavelength_nm": sc.wavelength.nm(),
            "beam": beam,
            "elements": sc.elements.iter().map(part_element_json).collect::<Vec<_>>(),
        });
        if sc.screen_mm != 0.0 {
            doc["screen_mm"] = json!(sc.screen_mm);
        }
        if !at_reference {
            doc["temperature_c"] = json!(sc.temperature_c);
        }
        doc
    }
}

/// An element's document, a biaxial crystal's orientation always as `axes` (its roll included
/// when 0, as CONVENTIONS.md "More media" orients principal axes).
fn part_element_json(e: &Element) -> Value {
    let v = element_json(e);
    match (e.kind, &v) {
        (ElementKind::Crystal(c), Value::Object(o)) if is_principal(&c.medium) && c.roll_deg == 0.0 => {
            // Rebuilt by insertion rather than edited in place: the page's module then carries no
            // map removal.
            let mut out = serde_json::Map::new();
            for (k, x) in o {
                if k != "axis" {
                    out.insert(k.clone(), x.clone());
                }
            }
            out.insert(
                "axes".into(),
                json!({"tilt_deg": c.tilt_deg, "azimuth_deg": c.azimuth_deg, "roll_deg": 0.0}),
            );
            Value::Object(out)
        }
        _ => v,
    }
}

impl Serialize for Part {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        self.document().serialize(s)
    }
}

impl Part {
    /// The part resolved into a stack and traced by the general tracer.
    ///
    /// # Errors
    /// As [`Scenario::resolve`].
    pub fn traced(&self) -> Result<(Stack, Trace), Error> {
        let (stack, _) = self.scenario.resolve()?;
        let t = trace(&stack);
        Ok((stack, t))
    }
}

impl Part {
    /// The part resolved, with each element's group indices and delay
    /// ([`crate::contract::group::groups`], as a trace of the part reports them); `None` when the
    /// part does not resolve.
    fn groups(&self) -> Option<(Stack, Vec<Option<Group>>)> {
        let (stack, _) = self.scenario.resolve().ok()?;
        let g = groups(&self.scenario, &stack);
        Some((stack, g))
    }

    /// Group delay between the part's two polarizations, picoseconds: the delay of the
    /// e-polarization of its first crystal after the o-polarization, summed over crystals whose
    /// axes lie along or across the first's (a crossed plate's e is the first's o), each from
    /// [`crate::contract::group`]. `None` when a crystal has no single delay (a wedge, an
    /// evanescent mode) or its axis is neither along nor across the first's.
    pub fn group_delay_ps(&self) -> Option<f64> {
        let (_, delays) = self.groups()?;
        let mut first_azimuth = None;
        let mut total = 0.0;
        for (el, group) in self.scenario.elements.iter().zip(delays) {
            let ElementKind::Crystal(c) = el.kind else { continue };
            let delay = group?.delay_ps?;
            let first = *first_azimuth.get_or_insert(c.azimuth_deg);
            let turn = (c.azimuth_deg - first).rem_euclid(180.0);
            total += if turn.abs() < 1e-9 || (180.0 - turn).abs() < 1e-9 {
                delay
            } else if (turn - 90.0).abs() < 1e-9 {
                -delay
            } else {
                return None;
            };
        }
        first_azimuth.map(|_| total)
    }

    /// The group index of each mode of the part's first crystal at its wavelength and
    /// temperature, for its incident beam, labelled by the mode letters a trace gives them; the
    /// very numbers a trace of the part's `scenario` reports as `elements[i].o.group_index` and
    /// so on. `None` when the part holds no crystal or does not resolve.
    pub fn mode_groups(&self) -> Option<ModeGroups> {
        let (stack, groups) = self.groups()?;
        stack
            .layers
            .iter()
            .zip(groups)
            .find_map(|(layer, group)| match (&layer.element, group) {
                (StackElement::Slab(slab), Some(g)) => Some(ModeGroups {
                    letters: slab.medium.letters(),
                    group_index: g.indices,
                }),
                _ => None,
            })
    }
}

/// The group indices of a crystal's two modes, first mode first (o then e; f then s for a
/// biaxial crystal), written as a trace's element report writes them per mode:
/// `{"o": {"group_index": …}, "e": {"group_index": …}}` (null where a mode is evanescent).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ModeGroups {
    /// The modes' letters, as in ray labels and element reports.
    pub letters: [char; 2],
    /// Group index g = ξ − λ dξ/dλ of each mode along the face normal (n − λ dn/dλ at normal
    /// incidence; [`crate::contract::group`]).
    pub group_index: [Option<f64>; 2],
}

impl Serialize for ModeGroups {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        use serde::ser::SerializeMap;
        let mut map = s.serialize_map(Some(2))?;
        for (letter, g) in self.letters.iter().zip(self.group_index) {
            map.serialize_entry(&letter.to_string(), &json!({ "group_index": g }))?;
        }
        map.end()
    }
}

/// The power a path carries for the stack's input beam.
pub fn path_power(stack: &Stack, path: &Path) -> f64 {
    power_of(&path.matrix, &stack.input.stokes)
}

/// The angle between two directions, degrees (0 to 180; robust near 0 and 180).
pub fn angle_between_deg(a: &Vector3<f64>, b: &Vector3<f64>) -> f64 {
    a.cross(b).norm().atan2(a.dot(b)).to_degrees()
}

/// Thickness (mm) left at the thin edge of a wedge or prism of clear aperture `aperture_mm`: a
/// tenth of the aperture, at least 1 mm (common practice, approximate: thinner edges chip when
/// the part is polished and mounted).
pub fn min_edge_mm(aperture_mm: f64) -> f64 {
    (0.1 * aperture_mm).max(1.0)
}

/// A crystal with faces, aperture or mount (`placement`), meeting the element before by
/// `contact`; otherwise as [`crystal`].
pub fn placed_crystal(
    medium: Medium,
    thickness_mm: f64,
    tilt_deg: f64,
    azimuth_deg: f64,
    gap_mm: f64,
    placement: Placement,
    contact: Contact,
) -> Element {
    placed(
        crystal(medium, thickness_mm, tilt_deg, azimuth_deg, gap_mm),
        placement,
        contact,
    )
}

/// A crystal element `e` given its `placement` and `contact` with the element before it.
pub fn placed(mut e: Element, placement: Placement, contact: Contact) -> Element {
    if let ElementKind::Crystal(c) = &mut e.kind {
        c.placement = placement;
    }
    e.contact = contact;
    e
}

/// A crystal plate whose principal axes are `axes` (a biaxial part), after `gap_mm` of the
/// outside medium; written with `axes` in the part's document.
pub fn oriented_crystal(medium: Medium, thickness_mm: f64, axes: Oriented, gap_mm: f64) -> Element {
    let mut e = crystal(medium, thickness_mm, axes.tilt_deg, axes.azimuth_deg, gap_mm);
    if let ElementKind::Crystal(c) = &mut e.kind {
        c.roll_deg = axes.roll_deg;
    }
    e
}

/// A crystal plate of `medium`, `thickness_mm` thick, its axis at `tilt_deg` from z and
/// `azimuth_deg` from x, after `gap_mm` of the outside medium.
pub fn crystal(medium: Medium, thickness_mm: f64, tilt_deg: f64, azimuth_deg: f64, gap_mm: f64) -> Element {
    Element {
        gap_mm,
        kind: ElementKind::Crystal(CrystalPlate {
            medium,
            thickness_mm,
            tilt_deg,
            azimuth_deg,
            roll_deg: 0.0,
            // The design solvers use the crystal without optical activity; the part says so.
            chirality: medium.is_chiral().then_some(Chirality {
                right_handed: true,
                active: false,
            }),
            placement: Placement::default(),
        }),
        contact: Contact::Air,
    }
}
