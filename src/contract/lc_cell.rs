//! The liquid-crystal cell element (`"kind": "lc_cell"`): read from the document, written back
//! with its defaults, resolved into the cell's Jones matrix, and reported.
//!
//! | field | default | accepted |
//! |---|---|---|
//! | `thickness_um` | required | above 0, at most 1000 |
//! | `lc` | required | a catalogue key (`5cb`) or {`ne`, `no`, `k11_pn`, `k22_pn`, `k33_pn`, `eps_parallel`, `eps_perpendicular`} |
//! | `rubbing_azimuth_deg` | 0 | −360 to 360: the director's azimuth at the entrance |
//! | `twist_deg` | 0 | −360 to 360 |
//! | `pretilt_deg` | 2 | 0 to 89 |
//! | `voltage_v` | 0 | 0 to 1000, RMS |
//!
//! Custom constants: indices 1 to 5, elastic constants above 0 and at most 1000 pN,
//! permittivities 1 to 1000 with `eps_parallel` above `eps_perpendicular` (a nematic the field
//! turns toward z). The cell has zero thickness in the stack's geometry and no placement fields.
//! Its director profile is solved on [`LC_SUBLAYERS`] sublayers and its Jones matrix found at the
//! input beam's tangential wave vector, which every ray of a plane-parallel stack shares; rays
//! that a tilted face has turned, and the directions of a conoscopic figure, get it solved at
//! their own (`optics::lc::stratified`).
//!
//! Cells work alike on the command line and in the page (whose WebAssembly module carries the
//! director solver and the 4×4 transfer: about 29 KB).

use crate::contract::fields::{Fields, ranged};
use crate::error::Error;
use crate::numfmt::quote_text;
use crate::optics::interface::Losses;
use crate::optics::jones::JonesMatrix;
use crate::optics::lc::catalogue::{self, NematicEntry};
use crate::optics::lc::director::{CellLayout, Profile, solve};
use crate::optics::lc::nematic::Nematic;
use crate::optics::lc::slice::Slices;
use crate::optics::lc::stratified::cell_jones;
use crate::optics::stack::LayeredCell;
use crate::optics::wavelength::Wavelength;
use crate::precision::LC_SUBLAYERS;
use serde_json::{Value, json};

/// The nematic of a cell.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum LcMaterial {
    /// A catalogued nematic.
    Catalogue(&'static NematicEntry),
    /// Constants given in the document (indices at every wavelength alike).
    Custom(Nematic),
}

/// A liquid-crystal cell as the document gives it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LcCell {
    /// Thickness of the nematic layer, µm.
    pub thickness_um: f64,
    /// Its nematic.
    pub lc: LcMaterial,
    /// Director azimuth at the entrance face, degrees.
    pub rubbing_azimuth_deg: f64,
    /// Twist from entrance to exit, degrees.
    pub twist_deg: f64,
    /// Pretilt at both faces, degrees.
    pub pretilt_deg: f64,
    /// RMS voltage across the cell, volts.
    pub voltage_v: f64,
}

/// A cell's numbers at the scenario's wavelength: what the trace uses and the result reports.
#[derive(Debug, Clone, PartialEq)]
pub struct SolvedCell {
    /// The nematic's constants at the wavelength.
    pub nematic: Nematic,
    /// The director profile.
    pub profile: Profile,
    /// Retardance at normal incidence, waves: (1/λ) ∫ (n_eff − n_o) dz.
    pub retardance_waves: f64,
    /// Freedericksz threshold of this twist, RMS volts.
    pub threshold_voltage_v: f64,
}

/// Reads the fields of an `lc_cell` element (its `kind`, `gap_mm` and contact already read).
///
/// # Errors
/// The offending field by its path: `thickness_um`, `lc` (unknown key, wrong type),
/// `lc.k11_pn` and the other constants, `rubbing_azimuth_deg`, `twist_deg`, `pretilt_deg`,
/// `voltage_v`.
pub fn parse(f: &mut Fields) -> Result<LcCell, Error> {
    let thickness_um = ranged_above(f, "thickness_um", 1000.0)?;
    let lc_path = f.path_of("lc");
    let lc = match f.get("lc") {
        None => {
            return Err(Error::new(
                lc_path,
                format!(
                    "is required: a catalogue key ({}) or custom constants {{\"ne\", \"no\", \"k11_pn\", \"k22_pn\", \"k33_pn\", \"eps_parallel\", \"eps_perpendicular\"}}",
                    catalogue::keys().join(", ")
                ),
            ));
        }
        Some(Value::String(key)) => LcMaterial::Catalogue(catalogue::find(key).ok_or_else(|| {
            Error::new(
                &lc_path,
                format!(
                    "unknown liquid crystal '{}'; the catalogue holds {}",
                    quote_text(key),
                    catalogue::keys().join(", ")
                ),
            )
        })?),
        Some(v @ Value::Object(_)) => LcMaterial::Custom(parse_custom(&lc_path, v)?),
        Some(_) => {
            return Err(Error::new(
                lc_path,
                "must be a catalogue key (text) or an object of constants",
            ));
        }
    };
    Ok(LcCell {
        thickness_um,
        lc,
        rubbing_azimuth_deg: ranged(f, "rubbing_azimuth_deg", Some(0.0), -360.0, 360.0)?,
        twist_deg: ranged(f, "twist_deg", Some(0.0), -360.0, 360.0)?,
        pretilt_deg: ranged(f, "pretilt_deg", Some(2.0), 0.0, 89.0)?,
        voltage_v: ranged(f, "voltage_v", Some(0.0), 0.0, 1000.0)?,
    })
}

/// A number above 0 and at most `hi`, required.
fn ranged_above(f: &mut Fields, name: &'static str, hi: f64) -> Result<f64, Error> {
    let path = f.path_of(name);
    crate::error::above(&path, f.required_number(name)?, 0.0, hi)
}

fn parse_custom(path: &str, v: &Value) -> Result<Nematic, Error> {
    let mut c = Fields::new(path, v)?;
    let ne = ranged(&mut c, "ne", None, 1.0, 5.0)?;
    let no = ranged(&mut c, "no", None, 1.0, 5.0)?;
    let k11_pn = ranged_above(&mut c, "k11_pn", 1000.0)?;
    let k22_pn = ranged_above(&mut c, "k22_pn", 1000.0)?;
    let k33_pn = ranged_above(&mut c, "k33_pn", 1000.0)?;
    let eps_parallel = ranged(&mut c, "eps_parallel", None, 1.0, 1000.0)?;
    let eps_perpendicular = ranged(&mut c, "eps_perpendicular", None, 1.0, 1000.0)?;
    if eps_parallel <= eps_perpendicular {
        return Err(Error::new(
            c.path_of("eps_parallel"),
            format!(
                "must exceed eps_perpendicular ({eps_perpendicular}): the cell switches a nematic of positive dielectric anisotropy"
            ),
        ));
    }
    c.finish()?;
    Ok(Nematic {
        no,
        ne,
        k11_pn,
        k22_pn,
        k33_pn,
        eps_parallel,
        eps_perpendicular,
    })
}

impl LcCell {
    /// The same cell at another voltage.
    pub fn with_voltage(self, voltage_v: f64) -> LcCell {
        LcCell { voltage_v, ..self }
    }

    /// The element's document, defaults written out (without `gap_mm`).
    pub fn document(&self) -> Value {
        let lc = match self.lc {
            LcMaterial::Catalogue(e) => json!(e.key),
            LcMaterial::Custom(n) => json!({
                "ne": n.ne, "no": n.no, "k11_pn": n.k11_pn, "k22_pn": n.k22_pn, "k33_pn": n.k33_pn,
                "eps_parallel": n.eps_parallel, "eps_perpendicular": n.eps_perpendicular,
            }),
        };
        json!({
            "kind": "lc_cell",
            "thickness_um": self.thickness_um,
            "lc": lc,
            "rubbing_azimuth_deg": self.rubbing_azimuth_deg,
            "twist_deg": self.twist_deg,
            "pretilt_deg": self.pretilt_deg,
            "voltage_v": self.voltage_v,
        })
    }

    /// Its nematic's constants at `wavelength` and `temperature_c` (°C; a catalogued nematic's
    /// move with its order parameter, custom constants are taken as given), and a warning when
    /// the catalogue's index fit does not cover the wavelength.
    pub fn nematic(&self, wavelength: Wavelength, temperature_c: f64) -> (Nematic, Option<String>) {
        match self.lc {
            LcMaterial::Catalogue(e) => {
                let warning = (!e.covers(wavelength.nm())).then(|| {
                    format!(
                        "{}'s indices are fitted from {} to {} nm; {} nm lies outside",
                        e.key,
                        e.range_nm.0,
                        e.range_nm.1,
                        wavelength.nm()
                    )
                });
                (e.at(wavelength.um(), temperature_c), warning)
            }
            LcMaterial::Custom(n) => (n, None),
        }
    }

    /// The warning or error for a cell at `temperature_c`: a catalogued nematic's constants
    /// follow a temperature model fitted to a measurement over a band (`optics::lc::catalogue`);
    /// outside that band the answer says the model is extrapolated, and at or above the clearing
    /// point the nematic is an isotropic liquid, which the catalogue does not describe. Custom
    /// constants are taken as given, at whatever temperature they were measured.
    ///
    /// # Errors
    /// `temperature_c` at or above a catalogued nematic's clearing point.
    pub fn temperature_check(&self, temperature_c: f64) -> Result<Option<String>, Error> {
        let LcMaterial::Catalogue(e) = self.lc else {
            return Ok(None);
        };
        if temperature_c >= e.clearing_c {
            return Err(Error::new(
                "temperature_c",
                format!(
                    "{temperature_c} °C is at or above {}'s clearing point, about {} °C: it is an isotropic \
                     liquid there, not a nematic, and no cell of it can be traced",
                    e.key, e.clearing_c
                ),
            ));
        }
        let (lo, hi) = e.quiet_c;
        Ok((!(lo..=hi).contains(&temperature_c)).then(|| {
            format!(
                "{}'s temperature model (its order parameter, which moves Δn, Δε and the elastic \
                 constants) is fitted from {lo} to {hi} °C and extrapolated to {temperature_c} °C",
                e.key
            )
        }))
    }

    /// The warning a cell of a catalogued nematic whose elastic and dielectric constants are
    /// recalled rather than cited carries (its entry's `constants_note`); `None` otherwise.
    pub fn data_warning(&self) -> Option<String> {
        match self.lc {
            LcMaterial::Catalogue(e) => e.constants_note.map(str::to_string),
            LcMaterial::Custom(_) => None,
        }
    }

    /// The substrates' layout in radians.
    pub fn layout(&self) -> CellLayout {
        CellLayout {
            thickness_um: self.thickness_um,
            rubbing_rad: self.rubbing_azimuth_deg.to_radians(),
            twist_rad: self.twist_deg.to_radians(),
            pretilt_rad: self.pretilt_deg.to_radians(),
        }
    }

    /// The director profile at this cell's voltage, retardance and threshold at `wavelength`
    /// and `temperature_c` (°C).
    pub fn solve(&self, wavelength: Wavelength, temperature_c: f64) -> SolvedCell {
        self.solve_at(wavelength, temperature_c, self.voltage_v, None)
    }

    /// As [`LcCell::solve`] at another voltage, starting from a neighbouring profile when given.
    pub fn solve_at(
        &self,
        wavelength: Wavelength,
        temperature_c: f64,
        voltage_v: f64,
        start: Option<&Profile>,
    ) -> SolvedCell {
        let (nematic, _) = self.nematic(wavelength, temperature_c);
        let layout = self.layout();
        let profile = solve(&nematic, &layout, voltage_v, LC_SUBLAYERS, start);
        SolvedCell {
            retardance_waves: profile.retardance_waves(&nematic, self.thickness_um, wavelength.um()),
            threshold_voltage_v: nematic.threshold_v(layout.twist_rad),
            nematic,
            profile,
        }
    }

    /// Its retardance (waves) at each of `voltages` at `wavelength` and `temperature_c` (°C),
    /// solved by continuation (`optics::lc::curve`).
    pub fn retardance_curve(&self, wavelength: Wavelength, temperature_c: f64, voltages: &[f64]) -> Vec<f64> {
        let (nematic, _) = self.nematic(wavelength, temperature_c);
        crate::optics::lc::curve::retardance_curve(&nematic, &self.layout(), wavelength.um(), voltages, LC_SUBLAYERS)
    }

    /// This solve's layered optics, which give the cell's Jones matrix at any direction.
    pub fn layered(&self, solved: SolvedCell, wavelength: Wavelength, losses: Losses) -> LayeredCell {
        LayeredCell {
            slices: Slices::new(&solved.nematic, &solved.profile, self.thickness_um),
            nematic: solved.nematic,
            profile: solved.profile,
            thickness_um: self.thickness_um,
            k0_per_um: std::f64::consts::TAU / wavelength.um(),
            losses,
        }
    }

    /// The cell's Jones matrix at tangential wave vector `qt` in an outside medium of index
    /// `outside_index`, for this solve.
    pub fn jones(
        &self,
        solved: &SolvedCell,
        wavelength: Wavelength,
        outside_index: f64,
        qt: [f64; 2],
        losses: Losses,
    ) -> JonesMatrix {
        cell_jones(
            &solved.nematic,
            &solved.profile,
            self.thickness_um,
            std::f64::consts::TAU / wavelength.um(),
            outside_index,
            qt,
            losses,
        )
    }
}
