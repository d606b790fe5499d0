//! The set of views and how to build each one from a scenario and its traced result.
//!
//! One name per view, shared by the page, the command line and the tests: `side` (the x–z
//! plane), `side-yz` (the y–z plane), `side-walkoff` (the plane of z and the first crystal's
//! e-ray walk-off direction, so a walk-off along y is seen; see [`side::SidePlane`]),
//! `end`, `poincare`, `walkoff-tilt`, `separation-wavelength`, `retardance-wavelength` (plots of
//! the first crystal of the stack), `split-wavelength`, `split-incidence` (plots of the whole
//! set-up's split angle, [`split_series`]), `retardance-temperature`, `separation-temperature`
//! ([`temperature_series`]), `transmission-wavelength` (the result's spectrum,
//! [`spectrum_plot`]), `retardance-voltage` (the first liquid-crystal cell, [`lc_plot`]), and
//! `conoscope` and `acceptance` (the set-up in convergent light, [`conoscope`]).

use crate::contract::result::TraceResult;
use crate::contract::scenario::Scenario;
use crate::error::Error;
use crate::view::scene::Scene;
pub mod conoscope;
pub mod end;
pub mod label_layout;
pub mod lc_plot;
pub mod palette;
pub mod plot;
pub mod png;
pub mod poincare;
pub mod scene;
pub mod series;
pub mod side;
pub mod spectrum_plot;
pub mod split_series;
pub mod svg;
pub mod table;
pub mod temperature_series;

/// Every view, by name.
pub const VIEW_NAMES: [&str; 16] = [
    "side",
    "side-yz",
    "side-walkoff",
    "end",
    "poincare",
    "walkoff-tilt",
    "separation-wavelength",
    "retardance-wavelength",
    "split-wavelength",
    "split-incidence",
    "retardance-temperature",
    "separation-temperature",
    "transmission-wavelength",
    "retardance-voltage",
    "conoscope",
    "acceptance",
];

/// Builds the view called `name`.
///
/// # Errors
/// `view` for an unknown name; `wavelength_nm` if a plot's formula breaks down.
pub fn build(name: &str, scenario: &Scenario, result: &TraceResult) -> Result<Scene, Error> {
    Ok(match name {
        "side" => side::side_view(scenario, result),
        "side-yz" => side::side_view_in(scenario, result, side::SidePlane::Yz),
        "side-walkoff" => side::side_view_in(scenario, result, side::SidePlane::Walkoff),
        "end" => end::end_view(result, scenario.beam.diameter_mm, scenario.screen_mm),
        "poincare" => poincare::poincare_view(result),
        "walkoff-tilt" => plot::plot(&series::walkoff_vs_tilt(scenario, 0)?),
        "separation-wavelength" => plot::plot(&series::separation_vs_wavelength(scenario, 0)),
        "retardance-wavelength" => plot::plot(&series::retardance_vs_wavelength(scenario, 0)),
        "split-wavelength" => plot::plot(&split_series::split_vs_wavelength(scenario)),
        "split-incidence" => plot::plot(&split_series::split_vs_incidence(scenario)),
        "retardance-temperature" => plot::plot(&temperature_series::retardance_vs_temperature(scenario, 0)),
        "separation-temperature" => plot::plot(&temperature_series::separation_vs_temperature(scenario, 0)),
        "transmission-wavelength" => spectrum_plot::transmission_plot(scenario, result),
        "retardance-voltage" => plot::plot(&lc_plot::retardance_vs_voltage(scenario)),
        "conoscope" => conoscope::conoscope_view(scenario),
        "acceptance" => conoscope::acceptance_view(scenario),
        other => {
            return Err(Error::new(
                "view",
                format!(
                    "unknown view '{}'; expected one of: {}",
                    crate::numfmt::quote_text(other),
                    VIEW_NAMES.join(", ")
                ),
            ));
        }
    })
}

/// A view's scene with, where another view was built alongside it, that view's name and scene.
#[cfg(any(test, target_arch = "wasm32"))]
pub type WithPartner = (Scene, Option<(&'static str, Scene)>);

/// Builds the view called `name` as [`build`] does and, where another view shares its work,
/// that view too, with its name: the first crystal's two plots against wavelength read one
/// sweep of the plate ([`series::wavelength_sweeps`]), its two against temperature another
/// ([`temperature_series::temperature_sweeps`]). The page draws both of a pair, so it builds
/// them together.
///
/// # Errors
/// As [`build`].
#[cfg(any(test, target_arch = "wasm32"))]
pub fn build_with_partner(name: &str, scenario: &Scenario, result: &TraceResult) -> Result<WithPartner, Error> {
    let (pair, names) = match name {
        "separation-wavelength" | "retardance-wavelength" => (
            series::wavelength_sweeps(scenario, 0),
            ["separation-wavelength", "retardance-wavelength"],
        ),
        "retardance-temperature" | "separation-temperature" => (
            temperature_series::temperature_sweeps(scenario, 0),
            ["retardance-temperature", "separation-temperature"],
        ),
        _ => return Ok((build(name, scenario, result)?, None)),
    };
    let [a, b] = &pair;
    let (a, b) = (plot::plot(a), plot::plot(b));
    Ok(if name == names[0] {
        (a, Some((names[1], b)))
    } else {
        (b, Some((names[0], a)))
    })
}

/// The data behind a plot view (`walkoff-tilt`, `separation-wavelength`,
/// `retardance-wavelength`), for export; `None` for views that are not plots.
///
/// # Errors
/// `wavelength_nm` if the formula breaks down.
#[cfg(target_arch = "wasm32")]
pub fn series(name: &str, scenario: &Scenario) -> Result<Option<series::Series>, Error> {
    Ok(match name {
        "walkoff-tilt" => Some(series::walkoff_vs_tilt(scenario, 0)?),
        "separation-wavelength" => Some(series::separation_vs_wavelength(scenario, 0)),
        "retardance-wavelength" => Some(series::retardance_vs_wavelength(scenario, 0)),
        "split-wavelength" => Some(split_series::split_vs_wavelength(scenario)),
        "split-incidence" => Some(split_series::split_vs_incidence(scenario)),
        "retardance-temperature" => Some(temperature_series::retardance_vs_temperature(scenario, 0)),
        "separation-temperature" => Some(temperature_series::separation_vs_temperature(scenario, 0)),
        "transmission-wavelength" => crate::contract::result::trace_scenario(scenario)
            .ok()
            .map(|r| spectrum_plot::transmission_vs_wavelength(scenario, &r)),
        "retardance-voltage" => Some(lc_plot::retardance_vs_voltage(scenario)),
        _ => None,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::trace_scenario as trace;

    #[test]
    fn every_view_of_every_example_is_drawable() {
        for doc in [
            include_str!("../../examples/demo.json"),
            include_str!("../../examples/recombiner.json"),
            include_str!("../../examples/quarter-wave.json"),
        ] {
            let sc = Scenario::from_json_str(doc).unwrap();
            let r = trace(&sc).unwrap();
            for name in VIEW_NAMES {
                let scene = build(name, &sc, &r).unwrap();
                assert!(scene.is_finite(), "{name}");
                assert!(!scene.items.is_empty(), "{name}");
            }
        }
        // A view built with its partner is the view built alone, and so is the partner.
        let sc = Scenario::from_json_str(include_str!("../../examples/crossed-calcite-splitter.json")).unwrap();
        let r = trace(&sc).unwrap();
        for name in VIEW_NAMES {
            let (scene, partner) = build_with_partner(name, &sc, &r).unwrap();
            assert_eq!(scene, build(name, &sc, &r).unwrap(), "{name}");
            if let Some((other, scene)) = partner {
                assert_ne!(other, name);
                assert_eq!(scene, build(other, &sc, &r).unwrap(), "{other}, partner of {name}");
            }
        }
        assert_eq!(
            build(
                "top",
                &Scenario::from_json_str(include_str!("../../examples/demo.json")).unwrap(),
                &trace(&Scenario::from_json_str(include_str!("../../examples/demo.json")).unwrap()).unwrap()
            )
            .unwrap_err()
            .field,
            "view"
        );
    }
}
