//! The scenario contract (versions 1 and 2): one JSON document describing a whole set-up.
//!
//! Parsing is strict: every field is checked for type and range, an unknown field is an error, and
//! each error names the field by its path (see [`crate::error::Error`]). Fields that are not given
//! take the defaults below; [`Scenario::to_json`] writes the scenario back with every default
//! filled in, and parsing that again gives the same scenario.
//!
//! | field | default | accepted |
//! |---|---|---|
//! | `version` | 1 | 1, 2 |
//! | `wavelength_nm` | 632.8 | 1 to 1 000 000 (and inside the material formula's domain) |
//! | `wavelength_in` | `"vacuum"` | `"vacuum"`, `"air"` (standard air, converted to vacuum by Ciddor 1996) |
//! | `outside_index` | 1.0 | 1 to 5 |
//! | `temperature_c` | 20 | −200 to 500: crystal indices and thicknesses at it (thicknesses are given at 20 °C) |
//! | `interface_losses` | `"ideal"` | `"ideal"`, `"uncoated"` |
//! | `beam.diameter_mm` | 1.0 | above 0, at most 1000 |
//! | `beam.incidence.polar_deg` | 0 | above −90, below 90 (negative = the opposite azimuth) |
//! | `beam.incidence.azimuth_deg` | 0 | −360 to 360 |
//! | `beam.polarization` | linear, azimuth 45° | see [`Polarization`] |
//! | `elements` | required | 1 to [`MAX_ELEMENTS`] elements, at most [`MAX_CRYSTALS`] crystals |
//! | crystal `material`, or `no` + `ne`, or `nx` + `ny` + `nz`, or `dispersion` | required | a catalogue key (uniaxial or biaxial), indices 1 to 10, or formulas (see [`CustomDispersion`]) |
//! | crystal `thickness_mm` | required | above 0, at most 10 000 |
//! | crystal `axis.tilt_deg`, `axis.azimuth_deg` | required, 0 | 0 to 180, −360 to 360 |
//! | crystal `axes` {`tilt_deg`, `azimuth_deg`, `roll_deg`} instead of `axis` | –, 0, 0 | as `axis`; roll −360 to 360 |
//! | quartz `handedness` | `"right"` | `"right"`, `"left"` (optically active crystals only) |
//! | quartz `optical_activity` | true in version 2, false in version 1 | true, false |
//! | every element's `gap_mm` | 0 | 0 to 1 000 000: outside medium before the element |
//! | retarder `retardance_waves`, `fast_axis_deg` | required, 0 | ±1 000 000, ±360 |
//! | polarizer `transmission_axis_deg` | 0 | ±360 |
//! | rotator `angle_deg` | required | ±3600 |
//! | liquid-crystal cell (`lc_cell`) | see [`crate::contract::lc_cell`] | |
//!
//! Geometry: the incident beam's axis crosses the plane z = 0 at x = y = 0; each element is
//! preceded by `gap_mm` of the outside medium (for the first element, measured from z = 0).
//! Plates that touch (`gap_mm` = 0) are separated by a vanishing film of the outside medium, so
//! every face is a crystal–outside-medium face.

use crate::contract::custom_dispersion::{CUSTOM_DISPERSION, CustomDispersion};
use crate::contract::fields::{Fields, number_list, ranged, type_name};
use crate::contract::geometry::{self, Contact, Piece, Placement};
use crate::contract::lc_cell::{self, LcCell};
use crate::contract::spectrum::SpectrumRange;
use crate::error::{Error, above, in_range, strictly_between};
use crate::numfmt::{quote, quote_text};
use crate::optics::interface::Losses;
use crate::optics::material::{self, BiaxialMaterial, Evaluated, Indices, Material};

use crate::optics::wavelength::Wavelength;
use serde_json::{Value, json};

/// Most elements a stack may hold.
pub const MAX_ELEMENTS: usize = 64;
/// Most crystals a stack may hold: each doubles the number of rays (2¹² = 4096 rays).
pub const MAX_CRYSTALS: usize = 12;
/// Largest scenario document accepted, in bytes.
pub const MAX_DOCUMENT_BYTES: usize = 1 << 20;

/// Input polarization of the beam.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Polarization {
    /// Linear at `azimuth_deg` from e1 (x̂ at normal incidence) toward e2.
    Linear {
        /// Azimuth, degrees.
        azimuth_deg: f64,
    },
    /// Circular; `right` is right-handed (S3 > 0).
    Circular {
        /// Right-handed when true.
        right: bool,
    },
    /// Elliptical with azimuth and ellipticity angle χ (degrees, −45 to 45, positive right-handed).
    Elliptical {
        /// Azimuth of the major axis, degrees.
        azimuth_deg: f64,
        /// Ellipticity angle, degrees.
        ellipticity_deg: f64,
    },
    /// A Jones vector [[re, im], [re, im]] on (e1, e2); scaled to unit power.
    Jones([[f64; 2]; 2]),
    /// A Stokes vector [S0, S1, S2, S3], partially polarized allowed; scaled to S0 = 1.
    Stokes([f64; 4]),
    /// Unpolarized light.
    Unpolarized,
}

/// The beam entering the stack.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Beam {
    /// Beam diameter (1/e² intensity), mm; used for drawing and to decide which rays coincide.
    pub diameter_mm: f64,
    /// Polar angle of incidence from +z in the outside medium, degrees.
    pub polar_deg: f64,
    /// Azimuth of the plane of incidence from +x toward +y, degrees.
    pub azimuth_deg: f64,
    /// Input polarization.
    pub polarization: Polarization,
}

/// What a crystal plate is made of.
// A custom formula is held inline (about a kilobyte) so that a medium stays plain `Copy` data,
// as every other part of a scenario; scenarios hold at most a few dozen of them.
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Medium {
    /// A catalogued material, evaluated at the scenario's wavelength.
    Catalogue(&'static Material),
    /// Fixed indices given in the scenario.
    Custom(Indices),
    /// Fixed principal indices n_x, n_y, n_z on the principal axes (`nx`, `ny`, `nz`): biaxial, or
    /// uniaxial when two are equal (the optic axis then lies along the third).
    Principal([f64; 3]),
    /// A catalogued biaxial crystal, evaluated at the scenario's wavelength.
    Biaxial(&'static BiaxialMaterial),
    /// The document's own dispersion formulas (`dispersion`), evaluated at the scenario's
    /// wavelength.
    Formula(CustomDispersion),
}

/// A crystal's principal indices at one wavelength.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum PrincipalIndices {
    /// n_o and n_e; the optic axis is the third principal axis.
    Uniaxial(Indices),
    /// n_x, n_y, n_z on the three principal axes.
    Triple([f64; 3]),
}

impl Medium {
    /// The principal indices at `wavelength` with the catalogue's warnings (none for fixed
    /// indices).
    ///
    /// # Errors
    /// As [`Material::indices`]: where the dispersion formula breaks down.
    pub fn evaluate(&self, wavelength: Wavelength) -> Result<Evaluated, Error> {
        match self {
            Medium::Catalogue(m) => m.indices(wavelength),
            Medium::Custom(ix) => Ok(Evaluated {
                indices: *ix,
                warnings: Vec::new(),
            }),
            Medium::Formula(d) if d.is_uniaxial_form() => {
                let ([no, _, ne], warnings) = d.principal(material::Quantity::Phase, wavelength)?;
                Ok(Evaluated {
                    indices: Indices::new(no, ne)?,
                    warnings,
                })
            }
            Medium::Principal(_) | Medium::Biaxial(_) | Medium::Formula(_) => Err(Error::new(
                "material",
                "a biaxial crystal has no single pair n_o, n_e; this needs a uniaxial crystal",
            )),
        }
    }

    /// The principal indices at `wavelength` with the catalogue's warnings: every form of
    /// crystal, the one the trace reads.
    ///
    /// # Errors
    /// As [`Material::indices`]: where the dispersion formula breaks down.
    pub fn principal(&self, wavelength: Wavelength) -> Result<(PrincipalIndices, Vec<String>), Error> {
        match self {
            Medium::Principal(p) => Ok((PrincipalIndices::Triple(*p), Vec::new())),
            Medium::Biaxial(m) => {
                let p = m.principal(wavelength)?;
                Ok((PrincipalIndices::Triple(p.principal), p.warnings))
            }
            Medium::Formula(d) if !d.is_uniaxial_form() => {
                let (p, warnings) = d.principal(material::Quantity::Phase, wavelength)?;
                Ok((PrincipalIndices::Triple(p), warnings))
            }
            _ => {
                let ev = self.evaluate(wavelength)?;
                Ok((PrincipalIndices::Uniaxial(ev.indices), ev.warnings))
            }
        }
    }

    /// The principal indices at `wavelength` and `temperature_c` (°C): the catalogue's
    /// thermo-optic data applied ([`Material::indices_at`], [`BiaxialMaterial::principal_at`]);
    /// a custom formula's own dn/dT ([`CustomDispersion::principal_at`], warned where an axis
    /// has none); fixed indices are taken to hold at every temperature. At 20 °C identical to
    /// [`Medium::principal`].
    ///
    /// # Errors
    /// As [`Medium::principal`]; `temperature_c` where a temperature formula breaks down.
    pub fn principal_at(
        &self,
        wavelength: Wavelength,
        temperature_c: f64,
    ) -> Result<(PrincipalIndices, Vec<String>), Error> {
        match self {
            Medium::Catalogue(m) => {
                let ev = m.indices_at(wavelength, temperature_c)?;
                Ok((PrincipalIndices::Uniaxial(ev.indices), ev.warnings))
            }
            Medium::Biaxial(m) => {
                let p = m.principal_at(wavelength, temperature_c)?;
                Ok((PrincipalIndices::Triple(p.principal), p.warnings))
            }
            Medium::Formula(d) => {
                let (p, warnings) = d.principal_at(wavelength, temperature_c)?;
                let p = if d.is_uniaxial_form() {
                    PrincipalIndices::Uniaxial(Indices::new(p[0], p[2])?)
                } else {
                    PrincipalIndices::Triple(p)
                };
                Ok((p, warnings))
            }
            Medium::Custom(_) | Medium::Principal(_) => self.principal(wavelength),
        }
    }

    /// The linear thermal expansion coefficient (1/K) along the element's z axis for principal
    /// axes `axes` (columns, element frame; for a uniaxial crystal the optic axis is the third):
    /// α_z = Σ α_i (a_i·ẑ)² from the catalogue's data or a custom formula's own; 0 for fixed
    /// indices, which carry none.
    pub fn expansion_along_z(&self, axes: &nalgebra::Matrix3<f64>) -> f64 {
        let key = match self {
            Medium::Catalogue(m) => m.key,
            Medium::Biaxial(m) => m.key,
            Medium::Formula(d) => return d.expansion_along_z(axes),
            Medium::Custom(_) | Medium::Principal(_) => return 0.0,
        };
        material::thermal(key).map_or(0.0, |t| t.expansion_along(axes, &nalgebra::Vector3::z()))
    }

    /// Whether the crystal is optically active (chiral): crystalline quartz.
    pub fn is_chiral(&self) -> bool {
        matches!(self, Medium::Catalogue(m) if material::optical_activity(m.key).is_some())
    }

    /// The principal indices at `wavelength`.
    ///
    /// # Errors
    /// As [`Medium::evaluate`].
    pub fn indices(&self, wavelength: Wavelength) -> Result<Indices, Error> {
        Ok(self.evaluate(wavelength)?.indices)
    }

    /// The catalogue key, `"custom"` for fixed indices or `"custom dispersion"` for formulas.
    pub fn key(&self) -> &'static str {
        match self {
            Medium::Catalogue(m) => m.key,
            Medium::Biaxial(m) => m.key,
            Medium::Custom(_) | Medium::Principal(_) => "custom",
            Medium::Formula(_) => CUSTOM_DISPERSION,
        }
    }

    /// The dispersion source of a catalogue crystal (e.g. `ghosh-1999`); `None` for fixed
    /// indices.
    pub fn source(&self) -> Option<&'static str> {
        match self {
            Medium::Catalogue(m) => Some(m.source),
            Medium::Biaxial(m) => Some(m.source),
            Medium::Custom(_) | Medium::Principal(_) | Medium::Formula(_) => None,
        }
    }

    /// The citation of a catalogue crystal's dispersion source; `None` for fixed indices.
    pub fn citation(&self) -> Option<&'static str> {
        match self {
            Medium::Catalogue(m) => Some(m.citation),
            Medium::Biaxial(m) => Some(m.citation),
            Medium::Custom(_) | Medium::Principal(_) | Medium::Formula(_) => None,
        }
    }

    /// The source when it is not the crystal's default (what a document must say to choose it).
    pub fn chosen_source(&self) -> Option<&'static str> {
        let default = material::source_keys(self.key()).first().copied();
        self.source().filter(|s| Some(*s) != default)
    }
}

/// A crystal plate.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CrystalPlate {
    /// Its material.
    pub medium: Medium,
    /// Thickness along z, mm.
    pub thickness_mm: f64,
    /// Optic axis polar angle from +z, degrees.
    pub tilt_deg: f64,
    /// Optic axis azimuth from +x toward +y, degrees.
    pub azimuth_deg: f64,
    /// Roll of the principal axes about the optic axis (R·ẑ), degrees (`axes.roll_deg`; 0 when
    /// the document gives `axis`).
    pub roll_deg: f64,
    /// Handedness and optical activity of a chiral crystal (`None` for the others).
    pub chirality: Option<Chirality>,
    /// Faces, aperture and mount (version 2; the default is version 1's plate).
    pub placement: Placement,
}

/// The optical activity of a chiral crystal as the document sets it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Chirality {
    /// `handedness`: right-handed (dextrorotatory: the plane of polarization turns clockwise as
    /// seen by an observer looking toward the source, for light along the optic axis).
    pub right_handed: bool,
    /// `optical_activity`: whether the trace includes it (default: on in version-2 documents, off
    /// in version-1 documents, which had none, so that they give the same numbers).
    pub active: bool,
}

/// One element of the stack.
// A crystal's custom formulas are held inline (see `Medium`).
#[allow(clippy::large_enum_variant)]
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum ElementKind {
    /// A uniaxial crystal plate.
    Crystal(CrystalPlate),
    /// An ideal linear retarder of zero thickness.
    Retarder {
        /// Retardance in waves (slow lags fast by 2π × this).
        retardance_waves: f64,
        /// Fast axis from e1 toward e2, degrees.
        fast_axis_deg: f64,
    },
    /// An ideal linear polarizer.
    Polarizer {
        /// Transmission axis from e1 toward e2, degrees.
        transmission_axis_deg: f64,
    },
    /// An ideal polarization rotator.
    Rotator {
        /// Rotation from e1 toward e2, degrees.
        angle_deg: f64,
    },
    /// A liquid-crystal cell.
    Cell(LcCell),
}

/// An element with the gap of outside medium before it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Outside medium before this element, mm.
    pub gap_mm: f64,
    /// The element.
    pub kind: ElementKind,
    /// How it meets the element before it.
    pub contact: Contact,
}

/// A validated scenario.
#[derive(Debug, Clone, PartialEq)]
pub struct Scenario {
    /// Vacuum wavelength.
    pub wavelength: Wavelength,
    /// The wavelength as the document gave it in standard air (`"wavelength_in": "air"`), nm;
    /// `wavelength` is then its vacuum equivalent (Ciddor 1996, [`material::vacuum_from_air`]).
    pub air_wavelength_nm: Option<f64>,
    /// Refractive index of the isotropic medium around and between the elements.
    pub outside_index: f64,
    /// Treatment of the crystal faces.
    pub losses: Losses,
    /// The input beam.
    pub beam: Beam,
    /// The stack, in the order the light meets it.
    pub elements: Vec<Element>,
    /// Distance from the last element's back axis point to the observation plane, mm.
    pub screen_mm: f64,
    /// Temperature of every crystal, °C (thicknesses are given at 20 °C).
    pub temperature_c: f64,
    /// The wavelength range of a spectrum to trace as well (`spectrum`), if asked for.
    pub spectrum: Option<SpectrumRange>,
}

impl Scenario {
    /// Parses a scenario document.
    ///
    /// # Errors
    /// The path of the first offending field, or `""` when the document is not JSON at all.
    pub fn from_json_str(text: &str) -> Result<Scenario, Error> {
        if text.len() > MAX_DOCUMENT_BYTES {
            return Err(Error::new(
                "",
                format!(
                    "the document is {} bytes; at most {MAX_DOCUMENT_BYTES} bytes are accepted",
                    text.len()
                ),
            ));
        }
        let value: Value = crate::contract::fields::parse_text(text)?;
        Scenario::from_json(&value)
    }

    /// Reads a scenario from a parsed JSON value.
    ///
    /// # Errors
    /// The path of the first offending field.
    pub fn from_json(value: &Value) -> Result<Scenario, Error> {
        let mut f = Fields::new("", value)?;
        let version = match f.get("version") {
            None => 1,
            Some(v) => match v.as_u64() {
                Some(n @ (1 | 2)) => n,
                _ => {
                    return Err(Error::new(
                        "version",
                        format!("versions 1 and 2 are understood, got {}", quote_text(&v.to_string())),
                    ));
                }
            },
        };
        let wl_nm = in_range("wavelength_nm", f.number_or("wavelength_nm", 632.8)?, 1.0, 1e6)?;
        let (wavelength, air_wavelength_nm) = match f.string("wavelength_in")? {
            None | Some("vacuum") => (Wavelength::from_nm(wl_nm)?, None),
            Some("air") => (material::vacuum_from_air(wl_nm)?.vacuum, Some(wl_nm)),
            Some(other) => {
                return Err(Error::new(
                    "wavelength_in",
                    format!("unknown value '{}'; expected \"vacuum\" or \"air\"", quote_text(other)),
                ));
            }
        };
        let outside_index = in_range("outside_index", f.number_or("outside_index", 1.0)?, 1.0, 5.0)?;
        let losses = match f.string("interface_losses")? {
            None | Some("ideal") => Losses::Ideal,
            Some("uncoated") => Losses::Uncoated,
            Some(other) => {
                return Err(Error::new(
                    "interface_losses",
                    format!(
                        "unknown value '{}'; expected \"ideal\" or \"uncoated\"",
                        quote_text(other)
                    ),
                ));
            }
        };
        let beam = match f.get("beam") {
            None => Beam {
                diameter_mm: 1.0,
                polar_deg: 0.0,
                azimuth_deg: 0.0,
                polarization: Polarization::Linear { azimuth_deg: 45.0 },
            },
            Some(v) => parse_beam(v)?,
        };
        let elements = match f.get("elements") {
            None => return Err(Error::new("elements", "is required: a list of at least one element")),
            Some(v) => parse_elements(v, version)?,
        };
        let screen_mm = ranged(&mut f, "screen_mm", Some(0.0), 0.0, 1e6)?;
        let temperature_c = ranged(&mut f, "temperature_c", Some(material::REFERENCE_C), -200.0, 500.0)?;
        let spectrum = match f.get("spectrum") {
            None => None,
            Some(v) => Some(SpectrumRange::from_json("spectrum", v)?),
        };
        f.finish()?;
        Ok(Scenario {
            wavelength,
            air_wavelength_nm,
            outside_index,
            losses,
            beam,
            elements,
            screen_mm,
            temperature_c,
            spectrum,
        })
    }

    /// The scenario as a contract document with every default written out.
    pub fn to_json(&self) -> Value {
        let b = &self.beam;
        let mut doc = json!({
            "version": 2,
            "wavelength_nm": self.air_wavelength_nm.unwrap_or(self.wavelength.nm()),
            "outside_index": self.outside_index,
            "interface_losses": match self.losses { Losses::Ideal => "ideal", Losses::Uncoated => "uncoated" },
            "beam": {
                "diameter_mm": b.diameter_mm,
                "incidence": {"polar_deg": b.polar_deg, "azimuth_deg": b.azimuth_deg},
                "polarization": polarization_json(&b.polarization),
            },
            "elements": self.elements.iter().map(element_json).collect::<Vec<_>>(),
        });
        if self.screen_mm > 0.0 {
            doc["screen_mm"] = json!(self.screen_mm);
        }
        if self.air_wavelength_nm.is_some() {
            doc["wavelength_in"] = json!("air");
        }
        // Written when it differs from its default, as `screen_mm`, so that documents echoed
        // before temperatures existed read the same.
        if self.temperature_c != material::REFERENCE_C {
            doc["temperature_c"] = json!(self.temperature_c);
        }
        if let Some(r) = &self.spectrum {
            doc["spectrum"] = r.to_json();
        }
        doc
    }
}

/// A polarization as its document (the `beam.polarization` object).
pub fn polarization_json(p: &Polarization) -> Value {
    match *p {
        Polarization::Linear { azimuth_deg } => json!({"kind": "linear", "azimuth_deg": azimuth_deg}),
        Polarization::Circular { right } => {
            json!({"kind": "circular", "handedness": if right { "right" } else { "left" }})
        }
        Polarization::Elliptical {
            azimuth_deg,
            ellipticity_deg,
        } => {
            json!({"kind": "elliptical", "azimuth_deg": azimuth_deg, "ellipticity_deg": ellipticity_deg})
        }
        Polarization::Jones(j) => json!({"kind": "jones", "jones": j}),
        Polarization::Stokes(s) => json!({"kind": "stokes", "stokes": s}),
        Polarization::Unpolarized => json!({"kind": "unpolarized"}),
    }
}

/// An element as its document, `gap_mm` included.
pub fn element_json(e: &Element) -> Value {
    let mut v = match e.kind {
        ElementKind::Crystal(c) => {
            let mut v = json!({
                "kind": "crystal",
                "thickness_mm": c.thickness_mm,
            });
            if c.roll_deg == 0.0 {
                v["axis"] = json!({"tilt_deg": c.tilt_deg, "azimuth_deg": c.azimuth_deg});
            } else {
                v["axes"] = json!({"tilt_deg": c.tilt_deg, "azimuth_deg": c.azimuth_deg, "roll_deg": c.roll_deg});
            }
            match c.medium {
                Medium::Catalogue(_) | Medium::Biaxial(_) => {
                    v["material"] = json!(c.medium.key());
                    if let Some(source) = c.medium.chosen_source() {
                        v["source"] = json!(source);
                    }
                }
                Medium::Custom(ix) => {
                    v["no"] = json!(ix.no);
                    v["ne"] = json!(ix.ne);
                }
                Medium::Principal([x, y, z]) => {
                    v["nx"] = json!(x);
                    v["ny"] = json!(y);
                    v["nz"] = json!(z);
                }
                Medium::Formula(d) => v["dispersion"] = d.document(),
            }
            if let Some(ch) = c.chirality {
                v["handedness"] = json!(if ch.right_handed { "right" } else { "left" });
                v["optical_activity"] = json!(ch.active);
            }
            c.placement.write(&mut v);
            v
        }
        ElementKind::Retarder {
            retardance_waves,
            fast_axis_deg,
        } => {
            json!({"kind": "retarder", "retardance_waves": retardance_waves, "fast_axis_deg": fast_axis_deg})
        }
        ElementKind::Polarizer { transmission_axis_deg } => {
            json!({"kind": "polarizer", "transmission_axis_deg": transmission_axis_deg})
        }
        ElementKind::Rotator { angle_deg } => json!({"kind": "rotator", "angle_deg": angle_deg}),
        ElementKind::Cell(c) => c.document(),
    };
    v["gap_mm"] = json!(e.gap_mm);
    e.contact.write(&mut v);
    v
}

fn parse_beam(v: &Value) -> Result<Beam, Error> {
    let mut f = Fields::new("beam", v)?;
    let diameter_mm = above("beam.diameter_mm", f.number_or("diameter_mm", 1.0)?, 0.0, 1000.0)?;
    let (polar_deg, azimuth_deg) = match f.get("incidence") {
        None => (0.0, 0.0),
        Some(iv) => {
            let mut g = Fields::new("beam.incidence", iv)?;
            let p = strictly_between(
                "beam.incidence.polar_deg",
                g.number_or("polar_deg", 0.0)?,
                -90.0,
                90.0,
                "grazing light never enters",
            )?;
            let a = ranged(&mut g, "azimuth_deg", Some(0.0), -360.0, 360.0)?;
            g.finish()?;
            (p, a)
        }
    };
    let polarization = match f.get("polarization") {
        None => Polarization::Linear { azimuth_deg: 45.0 },
        Some(pv) => parse_polarization(pv)?,
    };
    f.finish()?;
    Ok(Beam {
        diameter_mm,
        polar_deg,
        azimuth_deg,
        polarization,
    })
}

fn parse_polarization(v: &Value) -> Result<Polarization, Error> {
    const P: &str = "beam.polarization";
    let mut f = Fields::new(P, v)?;
    let kind = f.string("kind")?.ok_or_else(|| {
        Error::new(
            format!("{P}.kind"),
            "is required: linear, circular, elliptical, jones, stokes or unpolarized",
        )
    })?;
    let p = match kind {
        "linear" => Polarization::Linear {
            azimuth_deg: ranged(&mut f, "azimuth_deg", Some(0.0), -360.0, 360.0)?,
        },
        "circular" => match f.string("handedness")? {
            Some("right") => Polarization::Circular { right: true },
            Some("left") => Polarization::Circular { right: false },
            Some(other) => {
                return Err(Error::new(
                    format!("{P}.handedness"),
                    format!("unknown value '{}'; expected \"right\" or \"left\"", quote_text(other)),
                ));
            }
            None => {
                return Err(Error::new(
                    format!("{P}.handedness"),
                    "is required for circular light: \"right\" or \"left\"",
                ));
            }
        },
        "elliptical" => Polarization::Elliptical {
            azimuth_deg: ranged(&mut f, "azimuth_deg", Some(0.0), -360.0, 360.0)?,
            ellipticity_deg: ranged(&mut f, "ellipticity_deg", None, -45.0, 45.0)?,
        },
        "jones" => {
            let path = format!("{P}.jones");
            let jv = f
                .get("jones")
                .ok_or_else(|| Error::new(&path, "is required: [[re, im], [re, im]]"))?;
            let Value::Array(items) = jv else {
                return Err(Error::new(
                    &path,
                    format!("must be [[re, im], [re, im]], got {}", type_name(jv)),
                ));
            };
            if items.len() != 2 {
                return Err(Error::new(
                    &path,
                    format!("must hold two components, got {}", items.len()),
                ));
            }
            let a = number_list(&format!("{path}[0]"), &items[0], 2)?;
            let b = number_list(&format!("{path}[1]"), &items[1], 2)?;
            let power = a[0] * a[0] + a[1] * a[1] + b[0] * b[0] + b[1] * b[1];
            if !(power > 0.0 && power.is_finite()) {
                return Err(Error::new(&path, "must not be zero (and must not overflow)"));
            }
            Polarization::Jones([[a[0], a[1]], [b[0], b[1]]])
        }
        "stokes" => {
            let path = format!("{P}.stokes");
            let sv = f
                .get("stokes")
                .ok_or_else(|| Error::new(&path, "is required: [S0, S1, S2, S3]"))?;
            let s = number_list(&path, sv, 4)?;
            if s[0].is_nan() || s[0] <= 0.0 {
                return Err(Error::new(
                    format!("{path}[0]"),
                    format!("must be above 0 (S0 is the total power), got {}", quote(s[0])),
                ));
            }
            let pol = (s[1] * s[1] + s[2] * s[2] + s[3] * s[3]).sqrt();
            if !pol.is_finite() || pol > s[0] * (1.0 + crate::precision::STOKES_PHYSICAL) {
                return Err(Error::new(
                    &path,
                    format!(
                        "is not physical: √(S1² + S2² + S3²) = {} exceeds S0 = {}",
                        quote(pol),
                        quote(s[0])
                    ),
                ));
            }
            Polarization::Stokes([s[0], s[1], s[2], s[3]])
        }
        "unpolarized" => Polarization::Unpolarized,
        other => {
            return Err(Error::new(
                format!("{P}.kind"),
                format!(
                    "unknown kind '{}'; expected linear, circular, elliptical, jones, stokes or unpolarized",
                    quote_text(other)
                ),
            ));
        }
    };
    f.finish()?;
    Ok(p)
}

fn parse_elements(v: &Value, version: u64) -> Result<Vec<Element>, Error> {
    let Value::Array(items) = v else {
        return Err(Error::new("elements", format!("must be a list, got {}", type_name(v))));
    };
    if items.is_empty() {
        return Err(Error::new("elements", "the stack is empty; give at least one element"));
    }
    if items.len() > MAX_ELEMENTS {
        return Err(Error::new(
            "elements",
            format!("{} elements given; at most {MAX_ELEMENTS} are allowed", items.len()),
        ));
    }
    let elements = items
        .iter()
        .enumerate()
        .map(|(i, item)| parse_element(i, item, version))
        .collect::<Result<Vec<_>, _>>()?;
    let crystals = elements
        .iter()
        .filter(|e| matches!(e.kind, ElementKind::Crystal(_)))
        .count();
    if crystals > MAX_CRYSTALS {
        return Err(Error::new(
            "elements",
            format!(
                "{crystals} crystals given; at most {MAX_CRYSTALS} are allowed (each doubles the rays: 2^{MAX_CRYSTALS} = {} rays)",
                1usize << MAX_CRYSTALS
            ),
        ));
    }
    let pieces: Vec<Piece> = elements
        .iter()
        .map(|e| Piece {
            gap_mm: e.gap_mm,
            contact: e.contact,
            crystal: match e.kind {
                ElementKind::Crystal(c) => Some((c.thickness_mm, c.placement)),
                _ => None,
            },
        })
        .collect();
    geometry::check(&pieces)?;
    Ok(elements)
}

fn parse_element(index: usize, v: &Value, version: u64) -> Result<Element, Error> {
    let path = &format!("elements[{index}]");
    let mut f = Fields::new(path, v)?;
    let kind_path = f.path_of("kind");
    let kind = f.string("kind")?.ok_or_else(|| {
        Error::new(
            &kind_path,
            "is required: crystal, retarder, polarizer, rotator or lc_cell",
        )
    })?;
    let gap_mm = ranged(&mut f, "gap_mm", Some(0.0), 0.0, 1e6)?;
    let contact = Contact::read(&mut f, index, gap_mm)?;
    if kind != "crystal" {
        geometry::refuse_on_ideal(&f)?;
    }
    let kind = match kind {
        "crystal" => ElementKind::Crystal(parse_crystal(&mut f, version)?),
        "retarder" => ElementKind::Retarder {
            retardance_waves: ranged(&mut f, "retardance_waves", None, -1e6, 1e6)?,
            fast_axis_deg: ranged(&mut f, "fast_axis_deg", Some(0.0), -360.0, 360.0)?,
        },
        "polarizer" => ElementKind::Polarizer {
            transmission_axis_deg: ranged(&mut f, "transmission_axis_deg", Some(0.0), -360.0, 360.0)?,
        },
        "rotator" => ElementKind::Rotator {
            angle_deg: ranged(&mut f, "angle_deg", None, -3600.0, 3600.0)?,
        },
        "lc_cell" => {
            if contact != Contact::Air {
                return Err(Error::new(
                    f.path_of("contact"),
                    "a liquid-crystal cell sits in the outside medium (its light is solved between isotropic media); leave contact out or give \"air\"",
                ));
            }
            ElementKind::Cell(lc_cell::parse(&mut f)?)
        }
        other => {
            return Err(Error::new(
                kind_path,
                format!(
                    "unknown element kind '{}'; expected crystal, retarder, polarizer, rotator or lc_cell",
                    quote_text(other)
                ),
            ));
        }
    };
    f.finish()?;
    Ok(Element { gap_mm, kind, contact })
}

fn parse_crystal(f: &mut Fields, version: u64) -> Result<CrystalPlate, Error> {
    let medium = parse_medium(f)?;
    let thickness_path = f.path_of("thickness_mm");
    let thickness_mm = above(&thickness_path, f.required_number("thickness_mm")?, 0.0, 1e4)?;
    let (tilt_deg, azimuth_deg, roll_deg) = parse_orientation(f)?;
    let chirality = parse_chirality(f, &medium, version)?;
    let placement = Placement::read(f)?;
    Ok(CrystalPlate {
        medium,
        thickness_mm,
        tilt_deg,
        azimuth_deg,
        roll_deg,
        chirality,
        placement,
    })
}

/// The crystal's material: a catalogue key, `no` + `ne`, `nx` + `ny` + `nz`, or `dispersion`.
fn parse_medium(f: &mut Fields) -> Result<Medium, Error> {
    let material_path = f.path_of("material");
    let forms = [
        f.has("material"),
        f.has("no") || f.has("ne"),
        f.has("nx") || f.has("ny") || f.has("nz"),
    ];
    let dispersion_path = f.path_of("dispersion");
    if let Some(d) = f.get("dispersion") {
        if forms.contains(&true) {
            return Err(Error::new(
                dispersion_path,
                "give either \"dispersion\" or one of \"material\", \"no\" and \"ne\", or \"nx\", \"ny\" and \"nz\", not several",
            ));
        }
        return Ok(Medium::Formula(CustomDispersion::read(&dispersion_path, d)?));
    }
    // Mark every alternative as known so that `finish` accepts whichever form was used.
    for name in ["material", "no", "ne", "nx", "ny", "nz"] {
        let _ = f.get(name);
    }
    let medium = match forms {
        [true, false, false] => {
            let key = f.string("material")?.unwrap_or_default().to_string();
            match (material::find(&key), material::find_biaxial(&key)) {
                (Some(m), _) => Medium::Catalogue(m),
                (None, Some(m)) => Medium::Biaxial(m),
                (None, None) => {
                    return Err(Error::new(
                        &material_path,
                        format!(
                            "unknown material '{}'; known: {}",
                            quote_text(&key),
                            material::all_keys().join(", ")
                        ),
                    ));
                }
            }
        }
        [false, true, false] => {
            let no = ranged(f, "no", None, 1.0, 10.0)?;
            let ne = ranged(f, "ne", None, 1.0, 10.0)?;
            Medium::Custom(Indices::new(no, ne).map_err(|e| e.within(&f.path_of("")))?)
        }
        [false, false, true] => Medium::Principal([
            ranged(f, "nx", None, 1.0, 10.0)?,
            ranged(f, "ny", None, 1.0, 10.0)?,
            ranged(f, "nz", None, 1.0, 10.0)?,
        ]),
        [false, false, false] => {
            return Err(Error::new(
                material_path,
                format!(
                    "is required (or give \"no\" and \"ne\", \"nx\", \"ny\" and \"nz\", or \"dispersion\"); known materials: {}",
                    material::all_keys().join(", ")
                ),
            ));
        }
        _ => {
            return Err(Error::new(
                material_path,
                "give one of \"material\", \"no\" and \"ne\", or \"nx\", \"ny\" and \"nz\", not several",
            ));
        }
    };
    parse_source(f, medium)
}

/// `source`: which published dispersion formula of a catalogue crystal to use (default: the
/// catalogue's); an error on `source` for an unknown one or for a crystal not from the catalogue.
pub(crate) fn parse_source(f: &mut Fields, medium: Medium) -> Result<Medium, Error> {
    let path = f.path_of("source");
    let Some(name) = f.string("source")? else {
        return Ok(medium);
    };
    let key = match medium {
        Medium::Catalogue(m) => m.key,
        Medium::Biaxial(m) => m.key,
        Medium::Custom(_) | Medium::Principal(_) | Medium::Formula(_) => {
            return Err(Error::new(
                path,
                "a dispersion source is chosen only for a catalogue \"material\"",
            ));
        }
    };
    let found = match medium {
        Medium::Biaxial(_) => material::find_biaxial_source(key, name).map(Medium::Biaxial),
        _ => material::find_uniaxial_source(key, name).map(Medium::Catalogue),
    };
    found.ok_or_else(|| {
        Error::new(
            path,
            format!(
                "unknown source '{}' for {key}; known: {} (the first is the default)",
                quote_text(name),
                material::source_keys(key).join(", ")
            ),
        )
    })
}

/// Orientation from `axis` {tilt, azimuth} or `axes` {tilt, azimuth, roll}: (tilt, azimuth, roll)
/// in degrees, with R = Rz(azimuth)·Ry(tilt)·Rz(roll) (CONVENTIONS.md, "More media").
fn parse_orientation(f: &mut Fields) -> Result<(f64, f64, f64), Error> {
    let axis_path = f.path_of("axis");
    let (name, with_roll) = match (f.has("axis"), f.has("axes")) {
        (true, true) => {
            return Err(Error::new(axis_path, "give either \"axis\" or \"axes\", not both"));
        }
        (false, true) => ("axes", true),
        _ => ("axis", false),
    };
    let path = f.path_of(name);
    let _ = f.get(if with_roll { "axis" } else { "axes" });
    let av = f.get(name).ok_or_else(|| {
        Error::new(
            &axis_path,
            "is required: {\"tilt_deg\": …, \"azimuth_deg\": …} (or \"axes\" with \"roll_deg\" too)",
        )
    })?;
    let mut a = Fields::new(&path, av)?;
    let tilt_deg = ranged(&mut a, "tilt_deg", None, 0.0, 180.0)?;
    let azimuth_deg = ranged(&mut a, "azimuth_deg", Some(0.0), -360.0, 360.0)?;
    let roll_deg = if with_roll {
        ranged(&mut a, "roll_deg", Some(0.0), -360.0, 360.0)?
    } else {
        0.0
    };
    a.finish()?;
    Ok((tilt_deg, azimuth_deg, roll_deg))
}

/// `handedness` and `optical_activity` of a chiral crystal; an error on either for any other.
fn parse_chirality(f: &mut Fields, medium: &Medium, version: u64) -> Result<Option<Chirality>, Error> {
    let handedness_path = f.path_of("handedness");
    let handedness = f.string("handedness")?;
    let activity_path = f.path_of("optical_activity");
    let active = f.boolean("optical_activity")?;
    if !medium.is_chiral() {
        let path = if handedness.is_some() {
            handedness_path
        } else if active.is_some() {
            activity_path
        } else {
            return Ok(None);
        };
        return Err(Error::new(
            path,
            format!(
                "applies to optically active crystals (quartz) only; '{}' is not one",
                quote_text(medium.key())
            ),
        ));
    }
    let right_handed = match handedness {
        None | Some("right") => true,
        Some("left") => false,
        Some(other) => {
            return Err(Error::new(
                handedness_path,
                format!("unknown value '{}'; expected \"right\" or \"left\"", quote_text(other)),
            ));
        }
    };
    Ok(Some(Chirality {
        right_handed,
        active: active.unwrap_or(version >= 2),
    }))
}

#[cfg(test)]
mod tests {
    use super::*;

    const DEMO: &str = r#"{
      "version": 1, "wavelength_nm": 632.8, "outside_index": 1.0, "interface_losses": "ideal",
      "beam": {"diameter_mm": 1.0, "incidence": {"polar_deg": 0, "azimuth_deg": 0},
               "polarization": {"kind": "linear", "azimuth_deg": 45}},
      "elements": [
        {"kind": "crystal", "material": "calcite", "thickness_mm": 10, "axis": {"tilt_deg": 45, "azimuth_deg": 0}, "gap_mm": 0},
        {"kind": "retarder", "retardance_waves": 0.5, "fast_axis_deg": 22.5},
        {"kind": "polarizer", "transmission_axis_deg": 0},
        {"kind": "rotator", "angle_deg": 45}
      ]}"#;

    #[test]
    fn the_conventions_example_parses_and_round_trips() {
        let s = Scenario::from_json_str(DEMO).unwrap();
        assert_eq!(s.elements.len(), 4);
        let again = Scenario::from_json(&s.to_json()).unwrap();
        assert_eq!(again, s);
    }

    #[test]
    fn defaults_fill_what_is_missing() {
        let s = Scenario::from_json_str(
            r#"{"elements": [{"kind": "crystal", "no": 1.6, "ne": 1.5, "thickness_mm": 1, "axis": {"tilt_deg": 45}}]}"#,
        )
        .unwrap();
        assert_eq!(s.wavelength.nm(), 632.8);
        assert_eq!(s.outside_index, 1.0);
        assert_eq!(s.losses, Losses::Ideal);
        assert_eq!(s.beam.polarization, Polarization::Linear { azimuth_deg: 45.0 });
        assert_eq!(s.elements[0].gap_mm, 0.0);
    }

    #[test]
    fn bad_values_name_their_field() {
        let cases = [
            (r#"{"elements": []}"#, "elements"),
            (
                r#"{"elements": [{"kind": "crystal", "material": "unobtainium", "thickness_mm": 1, "axis": {"tilt_deg": 45}}]}"#,
                "elements[0].material",
            ),
            (
                r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": -1, "axis": {"tilt_deg": 45}}]}"#,
                "elements[0].thickness_mm",
            ),
            (
                r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 1, "axis": {"tilt_deg": 45, "tilt": 3}}]}"#,
                "elements[0].axis.tilt",
            ),
            (
                r#"{"elements": [{"kind": "crystal", "material": "calcite", "no": 1.5, "thickness_mm": 1, "axis": {"tilt_deg": 45}}]}"#,
                "elements[0].material",
            ),
            (
                r#"{"wavelength_nm": "633", "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "wavelength_nm",
            ),
            (
                r#"{"wavelength_nm": -5, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "wavelength_nm",
            ),
            (
                r#"{"colour": 1, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "colour",
            ),
            (
                r#"{"version": 3, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "version",
            ),
            (
                r#"{"beam": {"incidence": {"polar_deg": 90}}, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "beam.incidence.polar_deg",
            ),
            (
                r#"{"beam": {"polarization": {"kind": "stokes", "stokes": [1, 1, 1, 0]}}, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "beam.polarization.stokes",
            ),
            (
                r#"{"beam": {"polarization": {"kind": "jones", "jones": [[0, 0], [0, 0]]}}, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "beam.polarization.jones",
            ),
            (
                r#"{"beam": {"polarization": {"kind": "circular"}}, "elements": [{"kind": "rotator", "angle_deg": 1}]}"#,
                "beam.polarization.handedness",
            ),
            (r#"{"elements": [{"kind": "lens"}]}"#, "elements[0].kind"),
            (
                r#"{"elements": [{"kind": "retarder"}]}"#,
                "elements[0].retardance_waves",
            ),
            (r#"[1, 2]"#, ""),
            (r#"{"elements": [{"kind": "rotator", "angle_deg": 1}"#, "elements[0]"),
        ];
        for (doc, field) in cases {
            let e = Scenario::from_json_str(doc).unwrap_err();
            assert_eq!(e.field, field, "{doc}: {e}");
            assert!(!e.message.is_empty());
        }
    }

    #[test]
    fn limits_are_enforced_with_clear_messages() {
        let crystal = r#"{"kind": "crystal", "no": 1.6, "ne": 1.5, "thickness_mm": 1, "axis": {"tilt_deg": 45}}"#;
        let many = vec![crystal; MAX_CRYSTALS + 1].join(",");
        let e = Scenario::from_json_str(&format!(r#"{{"elements": [{many}]}}"#)).unwrap_err();
        assert_eq!(e.field, "elements");
        assert!(e.message.contains("at most 12"), "{}", e.message);
        let rot = r#"{"kind": "rotator", "angle_deg": 1}"#;
        let many = vec![rot; MAX_ELEMENTS + 1].join(",");
        assert_eq!(
            Scenario::from_json_str(&format!(r#"{{"elements": [{many}]}}"#))
                .unwrap_err()
                .field,
            "elements"
        );
    }

    fn crystal(fields: &str, version: u32) -> Result<CrystalPlate, Error> {
        let doc =
            format!(r#"{{"version": {version}, "elements": [{{"kind": "crystal", "thickness_mm": 1, {fields}}}]}}"#);
        let s = Scenario::from_json_str(&doc)?;
        let ElementKind::Crystal(c) = s.elements[0].kind else {
            unreachable!()
        };
        assert_eq!(Scenario::from_json(&s.to_json())?, s, "round trip of {doc}");
        Ok(c)
    }

    #[test]
    fn principal_axes_and_indices_parse_and_round_trip() {
        let c = crystal(
            r#""nx": 1.74, "ny": 1.75, "nz": 1.83, "axes": {"tilt_deg": 90, "azimuth_deg": 10, "roll_deg": -30}"#,
            2,
        )
        .unwrap();
        assert_eq!(c.medium, Medium::Principal([1.74, 1.75, 1.83]));
        assert_eq!((c.tilt_deg, c.azimuth_deg, c.roll_deg), (90.0, 10.0, -30.0));
        assert_eq!(c.chirality, None);
        // `axis` is `axes` with roll 0, for any crystal.
        let c = crystal(r#""nx": 1.74, "ny": 1.75, "nz": 1.83, "axis": {"tilt_deg": 90}"#, 2).unwrap();
        assert_eq!(c.roll_deg, 0.0);
        let c = crystal(r#""material": "calcite", "axes": {"tilt_deg": 45}"#, 1).unwrap();
        assert_eq!((c.tilt_deg, c.roll_deg), (45.0, 0.0));
    }

    #[test]
    fn quartz_is_active_by_default_in_version_2_only() {
        let v1 = crystal(r#""material": "quartz", "axis": {"tilt_deg": 0}"#, 1).unwrap();
        assert_eq!(
            v1.chirality,
            Some(Chirality {
                right_handed: true,
                active: false
            })
        );
        let v2 = crystal(r#""material": "quartz", "axis": {"tilt_deg": 0}"#, 2).unwrap();
        assert_eq!(
            v2.chirality,
            Some(Chirality {
                right_handed: true,
                active: true
            })
        );
        let left = crystal(
            r#""material": "quartz", "axis": {"tilt_deg": 0}, "handedness": "left", "optical_activity": true"#,
            1,
        )
        .unwrap();
        assert_eq!(
            left.chirality,
            Some(Chirality {
                right_handed: false,
                active: true
            })
        );
        let off = crystal(
            r#""material": "quartz", "axis": {"tilt_deg": 0}, "optical_activity": false"#,
            2,
        )
        .unwrap();
        assert_eq!(
            off.chirality,
            Some(Chirality {
                right_handed: true,
                active: false
            })
        );
    }

    #[test]
    fn new_crystal_fields_name_their_errors() {
        let cases = [
            (
                r#""material": "calcite", "nx": 1.5, "ny": 1.6, "nz": 1.7, "axis": {"tilt_deg": 0}"#,
                "elements[0].material",
            ),
            (
                r#""no": 1.5, "ne": 1.6, "nz": 1.7, "axis": {"tilt_deg": 0}"#,
                "elements[0].material",
            ),
            (r#""nx": 1.5, "ny": 1.6, "axis": {"tilt_deg": 0}"#, "elements[0].nz"),
            (
                r#""nx": 0.5, "ny": 1.6, "nz": 1.7, "axis": {"tilt_deg": 0}"#,
                "elements[0].nx",
            ),
            (
                r#""material": "calcite", "axis": {"tilt_deg": 0}, "axes": {"tilt_deg": 0}"#,
                "elements[0].axis",
            ),
            (
                r#""material": "calcite", "axes": {"tilt_deg": 0, "roll_deg": 400}"#,
                "elements[0].axes.roll_deg",
            ),
            (
                r#""material": "calcite", "axis": {"tilt_deg": 0, "roll_deg": 10}"#,
                "elements[0].axis.roll_deg",
            ),
            (r#""material": "calcite""#, "elements[0].axis"),
            (
                r#""material": "calcite", "axis": {"tilt_deg": 0}, "handedness": "right""#,
                "elements[0].handedness",
            ),
            (
                r#""nx": 1.5, "ny": 1.6, "nz": 1.7, "axis": {"tilt_deg": 0}, "optical_activity": true"#,
                "elements[0].optical_activity",
            ),
            (
                r#""material": "quartz", "axis": {"tilt_deg": 0}, "handedness": "dextro""#,
                "elements[0].handedness",
            ),
            (
                r#""material": "quartz", "axis": {"tilt_deg": 0}, "optical_activity": "yes""#,
                "elements[0].optical_activity",
            ),
        ];
        for (fields, path) in cases {
            let e = crystal(fields, 2).unwrap_err();
            assert_eq!(e.field, path, "{fields}: {}", e.message);
        }
    }
}
