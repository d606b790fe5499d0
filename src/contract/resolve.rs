//! Resolving a scenario: the document becomes a [`Stack`] of plain physics data.
//!
//! Done once, before the trace: each catalogue material is evaluated at the wavelength (its
//! dispersion formula, with a warning outside the formula's range and an error where it breaks
//! down), degrees become radians, unit vectors and Jones matrices, and the input polarization
//! becomes a unit-power Jones vector (when fully polarized) and a Stokes vector with S0 = 1.
//! Every error names its field by its path in the document.
//!
//! Conventions (CONVENTIONS.md): the incident direction is u = (sin p cos a, sin p sin a, cos p)
//! for polar angle p and azimuth a; polarization angles are measured on the beam basis (e1, e2)
//! from e1 toward e2; a right-handed circular state has S3 > 0.

use crate::contract::geometry::Contact;
use crate::contract::scenario::{CrystalPlate, ElementKind, Polarization, PrincipalIndices, Scenario};
use crate::error::{Error, in_range};
use crate::optics::anisotropic::{Anisotropic, orientation};
use crate::optics::geometry::direction;
use crate::optics::jones::{self, Jones};
use crate::optics::lc::stratified::layered_jones;
use crate::optics::material::{self, Indices};
use crate::optics::stack::{CellLayer, Element, InputBeam, Layer, Medium, Slab, Stack};
use crate::optics::uniaxial::{OpticAxis, Uniaxial};
use crate::optics::wavelength::Wavelength;
use nalgebra::Vector3;
use num_complex::Complex64;
use std::f64::consts::TAU;

/// A warning found while resolving, about one element.
#[derive(Debug, Clone, PartialEq)]
pub struct Warning {
    /// Index of the element in the document's `elements`.
    pub element: usize,
    /// The text, starting with the element's path (`elements[2]: …`).
    pub text: String,
}

impl Scenario {
    /// The stack this scenario describes, and the warnings met on the way.
    ///
    /// # Errors
    /// `wavelength_nm` when a material's dispersion formula breaks down at the wavelength (the
    /// message names the element); `elements[i].axis` for an axis a hand-built scenario got
    /// out of range (parsed documents are checked already).
    pub fn resolve(&self) -> Result<(Stack, Vec<Warning>), Error> {
        self.resolve_at(self.wavelength, self.temperature_c)
    }

    /// The stack this scenario describes at another vacuum `wavelength` and `temperature_c`,
    /// and the warnings met on the way: what [`Scenario::resolve`] gives for a copy of the
    /// scenario with those two changed, without the copy (spectra and curves resolve a
    /// scenario at many wavelengths or temperatures).
    ///
    /// # Errors
    /// As [`Scenario::resolve`].
    pub fn resolve_at(&self, wavelength: Wavelength, temperature_c: f64) -> Result<(Stack, Vec<Warning>), Error> {
        let mut warnings = Vec::new();
        let mut layers = Vec::with_capacity(self.elements.len());
        let mut cells = Vec::new();
        let mut z = 0.0;
        let (p, a) = (self.beam.polar_deg.to_radians(), self.beam.azimuth_deg.to_radians());
        let u = direction(p, a);
        let qt = [self.outside_index * u.x, self.outside_index * u.y];
        // A filter repeats one crystal, cut alike, plate after plate, and a spectrum resolves the
        // scenario at every wavelength: a plate cut as the last crystal was (the same material,
        // axes and activity; any thickness and placement) takes its medium as solved for that
        // one, the same numbers to the bit.
        let mut last: Option<(CrystalPlate, Medium, f64, Vec<String>)> = None;
        for (idx, el) in self.elements.iter().enumerate() {
            z += el.gap_mm;
            let element = match el.kind {
                ElementKind::Crystal(plate) => {
                    let (mut medium, expansion, found) = match &last {
                        Some((cut, medium, expansion, found)) if cut_alike(cut, &plate) => {
                            (*medium, *expansion, found.clone())
                        }
                        _ => {
                            let solved = crystal_medium(&plate, wavelength, temperature_c).map_err(|e| {
                                match e.field.as_str() {
                                    "wavelength_nm" | "temperature_c" => {
                                        Error::new(e.field, format!("{} (elements[{idx}])", e.message))
                                    }
                                    _ => e.within(&format!("elements[{idx}]")),
                                }
                            })?;
                            last = Some((plate, solved.0, solved.1, solved.2.clone()));
                            solved
                        }
                    };
                    let thickness_mm = plate.thickness_mm * expansion;
                    warnings.extend(found.into_iter().map(|w| Warning {
                        element: idx,
                        text: format!("elements[{idx}]: {w}"),
                    }));
                    // Version 1's plate keeps the shared-tangential trace; any placement or contact
                    // places its faces in the lab frame, the mount turning the optic axis too.
                    let faces = if plate.placement.is_default() && el.contact == Contact::Air {
                        None
                    } else {
                        let (faces, mount) = plate.placement.place(z, thickness_mm, el.contact);
                        medium = medium.rotated(&mount);
                        Some(faces)
                    };
                    z += thickness_mm;
                    Element::Slab(Slab {
                        medium,
                        thickness_mm,
                        faces,
                    })
                }
                ElementKind::Retarder {
                    retardance_waves,
                    fast_axis_deg,
                } => Element::Ideal(jones::retarder(retardance_waves * TAU, fast_axis_deg.to_radians())),
                ElementKind::Polarizer { transmission_axis_deg } => {
                    Element::Ideal(jones::polarizer(transmission_axis_deg.to_radians()))
                }
                ElementKind::Rotator { angle_deg } => Element::Ideal(jones::rotator(angle_deg.to_radians())),
                ElementKind::Cell(cell) => {
                    let hot = cell.temperature_check(temperature_c).map_err(|e| {
                        Error::new("temperature_c", format!("elements[{idx}] (lc_cell): {}", e.message))
                    })?;
                    let (_, fit) = cell.nematic(wavelength, temperature_c);
                    warnings.extend(hot.into_iter().chain(fit).chain(cell.data_warning()).map(|w| Warning {
                        element: idx,
                        text: format!("elements[{idx}].lc: {w}"),
                    }));
                    let solved = cell.solve(wavelength, temperature_c);
                    let optics = cell.layered(solved, wavelength, self.losses);
                    let at_input = layered_jones(&optics, self.outside_index, qt);
                    cells.push(optics);
                    Element::Cell(CellLayer {
                        at_input,
                        optics: cells.len() - 1,
                    })
                }
            };
            layers.push(Layer {
                gap_mm: el.gap_mm,
                element,
            });
        }
        let (jones, stokes) = input_state(&self.beam.polarization);
        let stack = Stack {
            wavelength,
            outside_index: self.outside_index,
            losses: self.losses,
            input: InputBeam {
                direction: u,
                diameter_mm: self.beam.diameter_mm,
                jones,
                stokes,
            },
            layers,
            screen_mm: self.screen_mm,
            cells,
        };
        Ok((stack, warnings))
    }
}

/// Whether two plates are cut alike: the same material, axes and optical activity, so the same
/// medium at any wavelength and temperature and the same expansion along z (their thickness and
/// placement may differ).
fn cut_alike(a: &CrystalPlate, b: &CrystalPlate) -> bool {
    a.medium == b.medium
        && a.tilt_deg == b.tilt_deg
        && a.azimuth_deg == b.azimuth_deg
        && a.roll_deg == b.roll_deg
        && a.chirality == b.chirality
}

/// A crystal's medium at `wavelength` and `temperature_c` in its element frame, the factor its
/// thickness takes at that temperature and the catalogue's warnings. The thickness is the
/// document's (at 20 °C) times 1 + α_z (T − 20 °C), α_z the expansion coefficient along the
/// element's z axis from the principal axes (CONVENTIONS.md, "Temperature"; exactly the
/// document's at 20 °C). The medium is: the uniaxial closed form for a uniaxial crystal without optical activity (catalogued, `no` + `ne`,
/// or `nx`/`ny`/`nz` with two equal), the general crystal otherwise (biaxial, or quartz with its
/// optical activity). Orientation R = Rz(azimuth)·Ry(tilt)·Rz(roll) (CONVENTIONS.md, "More
/// media"); a chiral crystal's gyration [g11, g11, g33] is negated for a left-handed one and
/// becomes its chirality by [`Anisotropic::chirality_from_gyration`].
///
/// # Errors
/// `wavelength_nm` where a dispersion or rotatory formula breaks down, `temperature_c` where a
/// temperature formula does; `axis.tilt_deg`, `axis.azimuth_deg` for a hand-built plate out of
/// range.
fn crystal_medium(
    plate: &CrystalPlate,
    wavelength: Wavelength,
    temperature_c: f64,
) -> Result<(Medium, f64, Vec<String>), Error> {
    let (principal, mut warnings) = plate.medium.principal_at(wavelength, temperature_c)?;
    let axis = axis_from_degrees(plate.tilt_deg, plate.azimuth_deg).map_err(|e| e.within("axis"))?;
    let rotation = orientation(
        plate.tilt_deg.to_radians(),
        plate.azimuth_deg.to_radians(),
        plate.roll_deg.to_radians(),
    );
    let alpha = plate.medium.expansion_along_z(&rotation);
    let expansion = 1.0 + alpha * (temperature_c - material::REFERENCE_C);
    let medium = match principal {
        PrincipalIndices::Uniaxial(ix) => match plate.chirality.filter(|c| c.active) {
            None => Medium::Uniaxial(Uniaxial::new(ix, axis)),
            Some(chirality) => {
                let activity = material::optical_activity(plate.medium.key())
                    .ok_or_else(|| Error::new("optical_activity", "this crystal has no optical activity data"))?
                    .at_temperature(wavelength, temperature_c)?;
                warnings.extend(activity.warnings);
                let sign = if chirality.right_handed { 1.0 } else { -1.0 };
                let kappa = Anisotropic::chirality_from_gyration(activity.gyration.map(|g| sign * g));
                Medium::Anisotropic(Anisotropic::new([ix.no, ix.no, ix.ne], rotation, kappa)?)
            }
        },
        PrincipalIndices::Triple(p) => {
            let general = Anisotropic::new(p, rotation, [0.0; 3])?;
            match general.uniaxial_axis() {
                // Two equal indices: uniaxial, its optic axis along the third principal axis.
                Some(k) => {
                    let c: Vector3<f64> = rotation.column(k).into();
                    Medium::Uniaxial(Uniaxial::new(
                        Indices::new(p[(k + 1) % 3], p[k])?,
                        OpticAxis::from_vector(c)?,
                    ))
                }
                None => Medium::Anisotropic(general),
            }
        }
    };
    Ok((medium, expansion, warnings))
}

/// The optic axis from its tilt from +z (`tilt_deg`, 0–180°) and the azimuth of its projection
/// from +x toward +y (`azimuth_deg`, −360° to 360°), as the contract gives them.
///
/// # Errors
/// `tilt_deg` or `azimuth_deg` when not finite or out of range.
pub fn axis_from_degrees(tilt_deg: f64, azimuth_deg: f64) -> Result<OpticAxis, Error> {
    let t = in_range("tilt_deg", tilt_deg, 0.0, 180.0)?.to_radians();
    let a = in_range("azimuth_deg", azimuth_deg, -360.0, 360.0)?.to_radians();
    Ok(OpticAxis::from_angles(t, a))
}

/// The input polarization as a unit-power Jones vector (if fully polarized) and a Stokes vector
/// with S0 = 1.
fn input_state(p: &Polarization) -> (Option<Jones>, [f64; 4]) {
    let j = match *p {
        Polarization::Linear { azimuth_deg } => jones::linear(azimuth_deg.to_radians()),
        Polarization::Circular { right } => {
            let chi = if right { 45f64 } else { -45f64 };
            jones::elliptical(0.0, chi.to_radians())
        }
        Polarization::Elliptical {
            azimuth_deg,
            ellipticity_deg,
        } => jones::elliptical(azimuth_deg.to_radians(), ellipticity_deg.to_radians()),
        Polarization::Jones(v) => {
            let j = Jones::new(Complex64::new(v[0][0], v[0][1]), Complex64::new(v[1][0], v[1][1]));
            let n = j.norm();
            j / Complex64::from(n)
        }
        Polarization::Stokes(s) => return (None, [1.0, s[1] / s[0], s[2] / s[0], s[3] / s[0]]),
        Polarization::Unpolarized => return (None, [1.0, 0.0, 0.0, 0.0]),
    };
    (Some(j), jones::stokes(&j))
}

#[cfg(test)]
mod tests {
    use super::*;
    use nalgebra::Vector3;

    /// Plates cut alike share the medium solved for the first of them; each plate's medium and
    /// thickness are still exactly what solving it alone gives, warmed away from 20 °C too, and
    /// a plate cut otherwise between them is solved for itself.
    #[test]
    fn plates_cut_alike_resolve_as_each_alone() {
        let sc = Scenario::from_json_str(
            r#"{"version": 2, "wavelength_nm": 633, "temperature_c": 61.5,
                "elements": [{"kind": "crystal", "material": "quartz", "thickness_mm": 1.3, "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
                             {"kind": "crystal", "material": "quartz", "thickness_mm": 2.7, "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
                             {"kind": "crystal", "material": "quartz", "thickness_mm": 2.7, "axis": {"tilt_deg": 90, "azimuth_deg": 30}},
                             {"kind": "polarizer", "transmission_axis_deg": 0},
                             {"kind": "crystal", "material": "quartz", "thickness_mm": 0.4, "axis": {"tilt_deg": 90, "azimuth_deg": 30}}]}"#,
        )
        .unwrap();
        let wavelength = Wavelength::from_nm(633.0).unwrap();
        let (stack, _) = sc.resolve_at(wavelength, 61.5).unwrap();
        let mut plates = 0;
        for (el, layer) in sc.elements.iter().zip(&stack.layers) {
            let (ElementKind::Crystal(plate), Element::Slab(slab)) = (el.kind, layer.element) else {
                continue;
            };
            let (medium, expansion, _) = crystal_medium(&plate, wavelength, 61.5).unwrap();
            assert!(slab.medium == medium, "plate {plates}: its medium");
            assert_eq!(slab.thickness_mm.to_bits(), (plate.thickness_mm * expansion).to_bits());
            assert!(expansion != 1.0, "warmed plates expand");
            plates += 1;
        }
        assert_eq!(plates, 4);
    }

    #[test]
    fn axis_validation_names_the_field() {
        assert_eq!(axis_from_degrees(f64::NAN, 0.0).unwrap_err().field, "tilt_deg");
        assert_eq!(axis_from_degrees(181.0, 0.0).unwrap_err().field, "tilt_deg");
        assert_eq!(axis_from_degrees(10.0, 1e9).unwrap_err().field, "azimuth_deg");
        let c = axis_from_degrees(90.0, 90.0).unwrap().unit();
        assert!((c - Vector3::y()).norm() < 1e-15);
    }

    #[test]
    fn resolving_at_another_wavelength_and_temperature_is_resolving_a_changed_copy() {
        // A crystal (thermal expansion, dispersion), a quartz plate with optical activity, a cell
        // (solved at the wavelength and temperature) and an ideal element.
        let sc = Scenario::from_json_str(
            r#"{"wavelength_nm": 633, "temperature_c": 20, "elements": [
                {"kind": "crystal", "material": "calcite", "thickness_mm": 1, "axis": {"tilt_deg": 45, "azimuth_deg": 10}},
                {"kind": "crystal", "material": "quartz", "thickness_mm": 0.5, "axis": {"tilt_deg": 3, "azimuth_deg": 0}},
                {"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "rubbing_azimuth_deg": 45, "voltage_v": 2},
                {"kind": "polarizer", "transmission_axis_deg": 30}]}"#,
        )
        .unwrap();
        let wavelength = Wavelength::from_nm(701.5).unwrap();
        let copy = Scenario {
            wavelength,
            temperature_c: 31.0,
            ..sc.clone()
        };
        let (a, wa) = sc.resolve_at(wavelength, 31.0).unwrap();
        let (b, wb) = copy.resolve().unwrap();
        assert_eq!(a, b);
        assert_eq!(wa, wb);
    }
}
