//! Plot series of one crystal against temperature: a plate's retardance and the separation of its
//! two rays over a band of temperatures that holds the scenario's own.
//!
//! Each point is the exact trace of the plate alone at that temperature ([`super::series`]'s
//! `traced_plate`): its indices from the catalogue's thermo-optic data and its thickness grown by
//! its expansion along z, both applied when the scenario is resolved (`contract::resolve`), so
//! the curve passes through the traced operating point. The band is −40 °C to 100 °C (a common
//! sign-off range for instruments; common practice), widened to 20 K beyond the scenario's
//! temperature and held within the contract's −200 °C to 500 °C. Points where a mode is
//! evanescent or a formula breaks down are left out; crystals given by fixed indices have no
//! thermal data, which the note says.

use super::series::{Series, no_crystal, plate_alone, setting, sweep_pair, traced_plate};
use crate::contract::scenario::{Medium, Scenario};
use std::f64::consts::TAU;

/// Points per temperature sweep.
pub const TEMPERATURE_POINTS: usize = 71;

/// The band plotted around `t` (°C).
fn band(t: f64) -> (f64, f64) {
    ((t - 20.0).clamp(-200.0, -40.0), (t + 20.0).clamp(100.0, 500.0))
}

/// The retardance (waves) and separation (mm) series of crystal number `crystal` against
/// temperature, from one sweep: both read the same traced plate at each temperature.
#[inline(never)] // one copy in the page's WebAssembly, not one per caller
pub fn temperature_sweeps(sc: &Scenario, crystal: usize) -> [Series; 2] {
    let words = [
        ["Retardance against temperature", "retardance", "waves"],
        ["Separation against temperature", "separation", "mm"],
    ];
    let Some(st) = setting(sc, crystal) else {
        let none = |[title, y_label, y_unit]: [&str; 3]| no_crystal(title, "temperature", "°C", y_label, y_unit);
        return [none(words[0]), none(words[1])];
    };
    let note = match st.plate.medium {
        Medium::Custom(_) | Medium::Principal(_) => {
            "custom indices: no thermal data, the plate is the same at every temperature".to_string()
        }
        Medium::Formula(_) => {
            "custom dispersion: no thermal data, the plate is the same at every temperature".to_string()
        }
        _ => format!(
            "{} at {} nm, thickness given at 20 °C",
            st.plate.medium.key(),
            sc.wavelength.nm()
        ),
    };
    // (retardance in waves, separation) of the plate alone at `t`.
    let value = |t: f64| -> Option<[f64; 2]> {
        let at = Scenario {
            temperature_c: t,
            ..sc.clone()
        };
        traced_plate(&plate_alone(&at, &st.plate)).map(|(_, s, r)| [r / TAU, s])
    };
    let (now, x) = (sc.temperature_c, ["temperature", "°C"]);
    sweep_pair(x, words, band(now), TEMPERATURE_POINTS, now, &value, note)
}

/// Retardance (waves) of crystal number `crystal` against temperature.
pub fn retardance_vs_temperature(sc: &Scenario, crystal: usize) -> Series {
    let [retardance, _] = temperature_sweeps(sc, crystal);
    retardance
}

/// Separation (mm) of crystal number `crystal`'s two rays against temperature.
pub fn separation_vs_temperature(sc: &Scenario, crystal: usize) -> Series {
    let [_, separation] = temperature_sweeps(sc, crystal);
    separation
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::{ElementReport, trace_scenario};

    fn doc(t: f64) -> Scenario {
        Scenario::from_json_str(&format!(
            r#"{{"version": 2, "temperature_c": {t}, "elements": [{{"kind": "crystal", "material": "quartz", "optical_activity": false,
                "thickness_mm": 2, "axis": {{"tilt_deg": 90}}}}]}}"#
        ))
        .unwrap()
    }

    #[test]
    fn the_curves_pass_through_the_traced_point_and_follow_whole_traces() {
        let sc = doc(35.0);
        let r = trace_scenario(&sc).unwrap();
        let ElementReport::Crystal { retardance_waves, .. } = &r.elements[0] else {
            panic!()
        };
        let g = retardance_vs_temperature(&sc, 0);
        assert!((g.current.unwrap()[1] - retardance_waves.unwrap()).abs() < 1e-9);
        assert_eq!(g.points.len(), TEMPERATURE_POINTS);
        assert_eq!((g.points[0][0], g.points[TEMPERATURE_POINTS - 1][0]), (-40.0, 100.0));
        // Any point equals the whole trace at its temperature.
        let p = g.points[10];
        let at = trace_scenario(&doc(p[0])).unwrap();
        let ElementReport::Crystal { retardance_waves, .. } = &at.elements[0] else {
            panic!()
        };
        assert!((p[1] - retardance_waves.unwrap()).abs() < 1e-9);
        // An a-cut plate at normal incidence does not separate its rays at any temperature.
        let s = separation_vs_temperature(&sc, 0);
        assert!(s.points.iter().all(|p| p[1].abs() < 1e-12));
    }

    #[test]
    fn the_band_widens_around_a_far_temperature() {
        assert_eq!(band(20.0), (-40.0, 100.0));
        assert_eq!(band(300.0), (-40.0, 320.0));
        assert_eq!(band(-190.0), (-200.0, 100.0));
    }
}
