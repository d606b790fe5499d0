//! A designed part as a typed scenario, and how a design answer writes it.
//!
//! Solvers build a [`Part`]: a [`Scenario`] value (the designed crystals, and a recombiner's
//! middle element, lit by a beam linearly polarized at 45° at normal incidence), which they trace
//! without writing or reading JSON. The answer's `scenario` document is written from it once, in
//! the short form a reader loads into the page: version, wavelength, the beam's polarization (and
//! its diameter when the request gave a beam), and every element with its gap; everything else
//! is left to the contract's defaults (outside index 1, ideal faces, normal incidence).

use crate::contract::geometry::{Contact, Placement};
use crate::contract::scenario::{
    Beam, CrystalPlate, Element, ElementKind, Medium, Polarization, Scenario, element_json, polarization_json,
};
use crate::optics::interface::Losses;
use crate::optics::wavelength::Wavelength;
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
            },
            states_beam: beam_diameter_mm.is_some(),
        }
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
        json!({
            "version": 1,
            "wavelength_nm": sc.wavelength.nm(),
            "beam": beam,
            "elements": sc.elements.iter().map(element_json).collect::<Vec<_>>(),
        })
    }
}

impl Serialize for Part {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        self.document().serialize(s)
    }
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
            placement: Placement::default(),
        }),
        contact: Contact::Air,
    }
}
