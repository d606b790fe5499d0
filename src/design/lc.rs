//! The liquid-crystal voltage design: the RMS voltage at which a cell gives a target retardance
//! at a wavelength, and the thinnest cell of the same construction whose retardance spans a range
//! between 0 V and the drive's highest voltage.
//!
//! Physics. Above threshold a cell's retardance falls monotonically with voltage as the director
//! stands up (de Gennes & Prost §3.2), so the voltage is found by bisection on the solved
//! retardance ([`BISECTION_STEPS`] halvings, to 10⁻¹⁵ of the range) once the target is known to lie
//! between the retardance at the highest voltage and at 0 V. At a fixed voltage the director
//! profile depends on depth only through z/d (both the elastic and the electric energy per area
//! scale as 1/d at constant voltage), so the retardance is proportional to the thickness: the
//! thinnest cell spanning [low, high] has d = d₀ · high / Γ(0 V), and it reaches `low` when
//! d · Γ(V_max)/d₀ ≤ low.

use crate::contract::geometry::Contact;
use crate::contract::request::LcVoltageRequest;
use crate::contract::scenario::{Element, ElementKind};
use crate::design::part::Part;
use crate::error::Error;
use crate::numfmt::sig;
use crate::optics::lc::curve::voltage_grid;
use crate::precision::BISECTION_STEPS;
use serde::Serialize;

/// Points of the answer's retardance-against-voltage curve.
pub const CURVE_POINTS: usize = 61;

/// The thinnest cell spanning the requested range.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RangeCell {
    /// The range asked, waves.
    pub range_waves: [f64; 2],
    /// The thinnest cell whose retardance at 0 V reaches the top of the range, µm.
    pub thickness_um: f64,
    /// That cell's retardance at 0 V and at the highest voltage, waves.
    pub retardance_span_waves: [f64; 2],
    /// Whether the highest voltage brings it down to the bottom of the range.
    pub spans_range: bool,
}

/// The answer.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LcVoltageDesign {
    /// The RMS voltage that gives the target, volts.
    pub voltage_v: f64,
    /// The retardance the solved cell gives there, waves.
    pub retardance_waves: f64,
    /// The retardance asked, waves.
    pub requested_retardance_waves: f64,
    /// The cell's Freedericksz threshold, volts.
    pub threshold_voltage_v: f64,
    /// The retardance at 0 V and at the highest voltage, waves.
    pub retardance_span_waves: [f64; 2],
    /// d Γ/dV at the found voltage, waves per volt (central difference).
    pub slope_waves_per_v: f64,
    /// The design wavelength, nm.
    pub wavelength_nm: f64,
    /// The temperature the cell works at, °C (a catalogued nematic's constants do not change with
    /// it; see `warnings`).
    pub temperature_c: f64,
    /// The solver's own warnings (the cell's at its temperature); the answer lists them first.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub warnings: Vec<String>,
    /// Retardance against voltage from 0 to the highest voltage, [V, waves].
    pub curve: Vec<[f64; 2]>,
    /// The thinnest cell for the range, when a range was asked.
    #[serde(skip_serializing_if = "Option::is_none")]
    pub range: Option<RangeCell>,
    /// The cell at the found voltage, as a set-up to load.
    pub scenario: Part,
}

/// Solves an lc-voltage request.
///
/// # Errors
/// `retardance_waves` when the target lies outside what the cell gives between 0 V and
/// `max_voltage_v` (the message gives that span).
pub fn design(r: &LcVoltageRequest) -> Result<LcVoltageDesign, Error> {
    let at = |v: f64| r.cell.solve_at(r.wavelength, r.temperature_c, v, None).retardance_waves;
    let (top, bottom) = (at(0.0), at(r.max_voltage_v));
    let target = r.retardance_waves;
    if !(bottom..=top).contains(&target) {
        return Err(Error::new(
            "retardance_waves",
            format!(
                "this cell gives {} to {} waves between 0 and {} V at {} nm; choose a target inside, a thicker cell or a higher max_voltage_v",
                sig(bottom, 4),
                sig(top, 4),
                sig(r.max_voltage_v, 4),
                sig(r.wavelength.nm(), 5)
            ),
        ));
    }
    let (mut lo, mut hi) = (0.0, r.max_voltage_v);
    for _ in 0..BISECTION_STEPS {
        let mid = 0.5 * (lo + hi);
        if at(mid) > target {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    let voltage_v = 0.5 * (lo + hi);
    let solved = r.cell.solve_at(r.wavelength, r.temperature_c, voltage_v, None);
    let h = 1e-4 * r.max_voltage_v;
    let slope = (at(voltage_v + h) - at((voltage_v - h).max(0.0))) / (voltage_v + h - (voltage_v - h).max(0.0));
    let volts = voltage_grid(r.max_voltage_v, CURVE_POINTS);
    let curve = r.cell.retardance_curve(r.wavelength, r.temperature_c, &volts);
    let range = r.range_waves.map(|(low, high)| {
        let scale = high / top;
        let thickness_um = r.cell.thickness_um * scale;
        RangeCell {
            range_waves: [low, high],
            thickness_um,
            retardance_span_waves: [high, bottom * scale],
            spans_range: bottom * scale <= low,
        }
    });
    let cell = r.cell.with_voltage(voltage_v);
    let part = Part::new(
        r.wavelength,
        None,
        vec![Element {
            gap_mm: 0.0,
            kind: ElementKind::Cell(cell),
            contact: Contact::Air,
        }],
    )
    .at_temperature(r.temperature_c);
    Ok(LcVoltageDesign {
        voltage_v,
        retardance_waves: solved.retardance_waves,
        requested_retardance_waves: target,
        threshold_voltage_v: solved.threshold_voltage_v,
        retardance_span_waves: [top, bottom],
        slope_waves_per_v: slope,
        wavelength_nm: r.wavelength.nm(),
        temperature_c: r.temperature_c,
        warnings: r
            .temperature_warning
            .iter()
            .cloned()
            .chain(r.cell.data_warning())
            .collect(),
        curve: volts.iter().zip(&curve).map(|(&v, &g)| [v, g]).collect(),
        range,
        scenario: part,
    })
}

#[cfg(test)]
mod tests {
    use crate::design::solve_str;
    use crate::precision::assert_within;

    /// The voltage found gives the target when the part is traced again through the contract
    /// (an independent path: the scenario document, parsed and reported), and a quarter-wave
    /// cell between crossed polarizers at 45° passes half the light (sin²(π/4), common practice).
    #[test]
    fn the_voltage_gives_the_target_when_retraced() {
        let d = solve_str(
            r#"{"kind": "lc-voltage", "thickness_um": 5, "lc": "5cb", "rubbing_azimuth_deg": 45,
                "wavelength_nm": 633, "retardance_waves": 0.25, "retardance_range_waves": [0.05, 1]}"#,
        )
        .unwrap();
        let v = d["voltage_v"].as_f64().unwrap();
        assert_eq!(d["scenario"]["version"], 2);
        assert!(v > d["threshold_voltage_v"].as_f64().unwrap() && v < 20.0, "{v}");
        let mut doc = d["scenario"].clone();
        doc["beam"] = serde_json::json!({"polarization": {"kind": "linear", "azimuth_deg": 0}});
        doc["elements"]
            .as_array_mut()
            .unwrap()
            .push(serde_json::json!({"kind": "polarizer", "transmission_axis_deg": 90}));
        let sc = crate::contract::scenario::Scenario::from_json(&doc).unwrap();
        let r = crate::contract::result::trace_scenario(&sc).unwrap();
        let crate::contract::result::ElementReport::Cell { retardance_waves, .. } = r.elements[0] else {
            panic!("a cell")
        };
        assert_within(retardance_waves, 0.25, 1e-9, "retraced retardance");
        assert_within(r.total_power, 0.5, 2e-3, "quarter wave between crossed polarizers");
        // The range: thinnest cell reaching 1 wave at 0 V is 1/Γ(0) of 5 µm.
        let span = d["retardance_span_waves"][0].as_f64().unwrap();
        let range = &d["range"];
        assert_within(
            range["thickness_um"].as_f64().unwrap(),
            5.0 / span,
            1e-12,
            "range thickness",
        );
        assert_eq!(range["spans_range"], true);
        // Out of reach: the message gives the span.
        let e =
            solve_str(r#"{"kind": "lc-voltage", "thickness_um": 2, "lc": "5cb", "retardance_waves": 3}"#).unwrap_err();
        assert_eq!(e.field, "retardance_waves");
    }

    /// The design works at its `temperature_c`: quiet from 20 to 34.8 °C, where 5CB's order
    /// parameter model is fitted; warmer, Δn is lower and a quarter wave of a thick cell needs
    /// less voltage, and the part, traced at its own temperature, gives the quarter wave; warned
    /// at 15 °C (extrapolated); refused at 5CB's clearing point (about 35 °C, common practice,
    /// from memory); the part carries the temperature.
    #[test]
    fn the_cell_s_temperature_is_checked_and_carried() {
        let at = |t: f64| {
            solve_str(&format!(
                r#"{{"kind": "lc-voltage", "thickness_um": 5, "lc": "5cb", "retardance_waves": 0.25, "temperature_c": {t}}}"#
            ))
        };
        let (quiet, warm, cold) = (at(25.0).unwrap(), at(32.0).unwrap(), at(15.0).unwrap());
        assert_eq!(quiet["warnings"], serde_json::json!([]));
        assert_eq!(warm["warnings"], serde_json::json!([]));
        assert!(warm["voltage_v"].as_f64().unwrap() < quiet["voltage_v"].as_f64().unwrap());
        let w = cold["warnings"][0].as_str().unwrap();
        assert!(
            w.starts_with("temperature_c: 5cb's temperature model") && w.contains("extrapolated"),
            "{w}"
        );
        assert_eq!(warm["temperature_c"], 32.0);
        assert_eq!(warm["scenario"]["temperature_c"], 32.0);
        let part = crate::contract::scenario::Scenario::from_json_str(&warm["scenario"].to_string()).unwrap();
        let traced = serde_json::to_value(crate::contract::result::trace_scenario(&part).unwrap()).unwrap();
        let gamma = traced["elements"][0]["retardance_waves"].as_f64().unwrap();
        assert!((gamma - 0.25).abs() < 1e-6, "{gamma}");
        assert_eq!(at(35.0).unwrap_err().field, "temperature_c");
    }
}
