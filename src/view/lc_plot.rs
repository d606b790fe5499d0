//! A liquid-crystal cell's retardance against voltage: the first `lc_cell` of the scenario, its
//! director solved at every voltage of the sweep (`optics::lc::curve`), the retardance the
//! result reports ((1/λ) ∫ (n_eff − n_o) dz at normal incidence) at the scenario's wavelength.
//!
//! The sweep runs from 0 to the larger of 8 thresholds and 1.25 times the cell's own voltage,
//! over [`VOLTAGE_POINTS`] voltages; the cell's own voltage is marked with the retardance the
//! result reports, so the plot and the numbers agree. Without a cell the plot is empty and its
//! note says so.

use super::series::Series;
use crate::contract::scenario::{ElementKind, Scenario};
use crate::numfmt::sig;
use crate::optics::lc::curve::voltage_grid;

/// Voltages per sweep.
pub const VOLTAGE_POINTS: usize = 200;

/// The first cell's retardance (waves) against RMS voltage.
pub fn retardance_vs_voltage(sc: &Scenario) -> Series {
    let mut s = Series::new(
        [
            "Retardance against voltage",
            "voltage",
            "V (RMS)",
            "retardance",
            "waves",
        ],
        Vec::new(),
        None,
        "no liquid-crystal cell in the stack".into(),
    );
    let Some((idx, cell)) = sc.elements.iter().enumerate().find_map(|(i, e)| match e.kind {
        ElementKind::Cell(c) => Some((i, c)),
        _ => None,
    }) else {
        return s;
    };
    let (nematic, _) = cell.nematic(sc.wavelength, sc.temperature_c);
    let layout = cell.layout();
    let threshold = nematic.threshold_v(layout.twist_rad);
    let top = (8.0 * threshold).max(1.25 * cell.voltage_v);
    let top = if top.is_finite() && top > 0.0 { top } else { 10.0 };
    let voltages = voltage_grid(top, VOLTAGE_POINTS);
    let curve = cell.retardance_curve(sc.wavelength, sc.temperature_c, &voltages);
    s.points = voltages.iter().zip(&curve).map(|(&v, &r)| [v, r]).collect();
    s.current = Some([
        cell.voltage_v,
        cell.solve(sc.wavelength, sc.temperature_c).retardance_waves,
    ]);
    s.note = format!(
        "element {}, normal incidence; threshold {} V",
        idx + 1,
        sig(threshold, 3)
    );
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The curve passes through the reported retardance at the cell's own voltage (to the
    /// solver's 10⁻⁸ waves) and falls from its zero-volt value.
    #[test]
    fn the_curve_meets_the_reported_point() {
        let doc = r#"{"version": 2, "elements": [{"kind": "polarizer"},
            {"kind": "lc_cell", "thickness_um": 5, "lc": "5cb", "voltage_v": 2.5}]}"#;
        let sc = Scenario::from_json_str(doc).unwrap();
        let s = retardance_vs_voltage(&sc);
        assert_eq!(s.points.len(), VOLTAGE_POINTS);
        let [v, r] = s.current.unwrap();
        assert_eq!(v, 2.5);
        let on_grid = s.points.iter().find(|p| (p[0] - 2.5).abs() < 1e-9);
        if let Some(p) = on_grid {
            assert!((p[1] - r).abs() < 1e-8);
        }
        let (lo, hi) = s
            .points
            .windows(2)
            .map(|w| (w[0], w[1]))
            .fold(
                (0, 0),
                |(lo, hi), (a, b)| {
                    if b[1] < a[1] { (lo + 1, hi) } else { (lo, hi + 1) }
                },
            );
        assert!(lo > 150 && hi < 50, "falls with voltage: {lo} down, {hi} level");
        assert!(s.note.starts_with("element 2"));
        let none = Scenario::from_json_str(r#"{"elements": [{"kind": "polarizer"}]}"#).unwrap();
        assert!(retardance_vs_voltage(&none).points.is_empty());
    }
}
