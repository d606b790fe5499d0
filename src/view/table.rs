//! A readable, fixed-width text form of a traced result, for a person at a terminal.
//!
//! The JSON result is the contract; this table is a view of it with rounded numbers (6
//! decimals for lengths in mm, 4 for powers) and the units in the headings. Numbers come from
//! [`crate::numfmt`] with a table's budget of [`TABLE_CHARS`] characters: a huge or tiny value
//! switches to m×10ⁿ instead of widening its column; a ray or spot below
//! [`crate::numfmt::NO_POWER`] reads "no power"; circular light shows no azimuth. Elements and
//! spots are numbered from 1, as on the page. A spectrum shows its extremes and at most
//! [`SPECTRUM_ROWS`] of its wavelengths, each with the forward light's normalized Stokes vector.

use crate::contract::result::{ElementReport, TraceResult};
use crate::numfmt::{fixed_within, power, shows_azimuth};
use crate::optics::stokes::{Ellipse, Handedness};
use std::fmt::Write;

/// The most characters a number takes in the table (sign excluded).
pub const TABLE_CHARS: usize = 11;

/// `v` with `decimals` decimals, within the table's budget.
fn num(v: f64, decimals: usize) -> String {
    fixed_within(v, decimals, 0.0, TABLE_CHARS)
}

/// As [`num`], with an explicit + on positive values (angles).
fn signed(v: f64, decimals: usize) -> String {
    let s = num(v, decimals);
    if s.starts_with('\u{2212}') || s.chars().all(|c| c == '0' || c == '.') {
        s
    } else {
        format!("+{s}")
    }
}

fn opt(v: Option<f64>, decimals: usize) -> String {
    match v {
        Some(x) => num(x, decimals),
        None => "—".to_string(),
    }
}

fn ellipse_text(e: &Ellipse) -> String {
    match e.handedness {
        Handedness::Unpolarized => "unpolarized".to_string(),
        Handedness::Linear => format!("linear {}°", signed(e.azimuth_deg, 3)),
        Handedness::Right | Handedness::Left => {
            let h = if e.handedness == Handedness::Right {
                "right"
            } else {
                "left"
            };
            if shows_azimuth(e.ellipticity_deg) {
                format!(
                    "{h} ψ {}° χ {}°",
                    signed(e.azimuth_deg, 3),
                    signed(e.ellipticity_deg, 3)
                )
            } else {
                format!("{h} circular")
            }
        }
    }
}

/// A power with 4 decimals, or "no power".
fn power_text(p: f64) -> String {
    if power(p, 4) == "no power" {
        "no power".to_string()
    } else {
        num(p, 4)
    }
}

/// Renders `r` as a text table.
pub fn render(r: &TraceResult) -> String {
    let mut out = String::new();
    input(&mut out, r);
    elements(&mut out, r);
    rays(&mut out, r);
    directions(&mut out, r);
    rejected(&mut out, r);
    spots(&mut out, r);
    spectrum(&mut out, r);
    if !r.warnings.is_empty() {
        let _ = writeln!(out);
        let _ = writeln!(out, "Warnings");
        for w in &r.warnings {
            let _ = writeln!(out, "  - {w}");
        }
    }
    out
}

/// The heading: the wavelength, and the input's polarization and incidence.
fn input(out: &mut String, r: &TraceResult) {
    let d = r.input.direction;
    let polar = d[2].clamp(-1.0, 1.0).acos().to_degrees();
    let az = d[1].atan2(d[0]).to_degrees();
    let _ = writeln!(out, "Doublespar trace at {} nm", r.wavelength_nm);
    let _ = writeln!(
        out,
        "Input: {}, degree of polarization {}; incidence polar {}°, azimuth {}°",
        ellipse_text(&r.input.ellipse),
        num(r.input.degree_of_polarization, 4),
        num(polar, 4),
        num(if polar == 0.0 { 0.0 } else { az }, 4)
    );
}

/// The elements, one row each, numbered from one.
fn elements(out: &mut String, r: &TraceResult) {
    let _ = writeln!(out);
    let _ = writeln!(out, "Elements");
    let _ = writeln!(
        out,
        "{:>3}  {:<9} {:<9} {:>9} {:>9} {:>10} {:>10} {:>10} {:>12} {:>9}",
        "#", "kind", "material", "n_o", "n_e", "L/mm", "n(e-wave)", "walk-off/°", "separation/mm", "Γ/waves"
    );
    for (i, el) in r.elements.iter().enumerate() {
        element_row(out, i + 1, el);
    }
}

/// One element's row, numbered `n`: a flat match over the element kinds, each arm one row.
fn element_row(out: &mut String, n: usize, el: &ElementReport) {
    match el {
        ElementReport::Crystal {
            material,
            no,
            ne,
            thickness_mm,
            modes,
            separation_mm,
            retardance_waves,
            nx,
            ny,
            nz,
            optic_axis_angle_deg,
            rotatory_power_deg_per_mm,
            group_delay_ps,
            ..
        } => {
            let _ = writeln!(
                out,
                "{:>3}  {:<9} {:<9} {:>9} {:>9} {:>10} {:>10} {:>10} {:>13} {:>9}",
                n,
                "crystal",
                material,
                opt(*no, 6),
                opt(*ne, 6),
                num(*thickness_mm, 4),
                opt(modes.second.index, 6),
                opt(modes.second.walkoff_deg, 4),
                opt(*separation_mm, 6),
                opt(*retardance_waves, 4)
            );
            // What the columns cannot hold: a biaxial crystal's principal indices (its columns
            // name the slow mode), an active crystal's rotation, the group delay.
            if let (Some(x), Some(y), Some(z)) = (nx, ny, nz) {
                let _ = writeln!(
                    out,
                    "     biaxial: n_x {}, n_y {}, n_z {}; optic axes 2V = {}°; columns give the s-wave",
                    num(*x, 6),
                    num(*y, 6),
                    num(*z, 6),
                    opt(*optic_axis_angle_deg, 4)
                );
            }
            if let Some(r) = rotatory_power_deg_per_mm {
                let _ = writeln!(out, "     optically active: {} °/mm along the axis", num(*r, 5));
            }
            if let Some(t) = group_delay_ps {
                let _ = writeln!(out, "     group delay, second mode after first: {} ps", num(*t, 4));
            }
        }
        ElementReport::Retarder { retardance_rad, .. } => {
            let _ = writeln!(
                out,
                "{:>3}  {:<9} {:>96}",
                n,
                "retarder",
                num(retardance_rad / std::f64::consts::TAU, 4)
            );
        }
        ElementReport::Polarizer { absorbed_power, .. } => {
            let _ = writeln!(
                out,
                "{:>3}  {:<9} absorbs {} of the input power",
                n,
                "polarizer",
                num(*absorbed_power, 4)
            );
        }
        ElementReport::Rotator { angle_deg, .. } => {
            let _ = writeln!(out, "{:>3}  {:<9} turns by {}°", n, "rotator", num(*angle_deg, 4));
        }
        ElementReport::Cell {
            retardance_waves,
            threshold_voltage_v,
            ..
        } => {
            let _ = writeln!(
                out,
                "{:>3}  {:<9} retardance {} waves; threshold {} V",
                n,
                "LC cell",
                num(*retardance_waves, 5),
                num(*threshold_voltage_v, 4)
            );
        }
    }
}

/// The rays: exit point, power and normalized Stokes vector of each.
fn rays(out: &mut String, r: &TraceResult) {
    let _ = writeln!(out);
    if r.rays.is_empty() {
        let _ = writeln!(out, "Rays: none leaves the stack forward");
        return;
    }
    let _ = writeln!(
        out,
        "Rays (exit points on the last face, z = {} mm)",
        num(r.rays.first().map_or(0.0, |x| x.exit_z_mm), 4)
    );
    let _ = writeln!(
        out,
        "{:<8} {:>8} {:>12} {:>12}  {:>8} {:>8} {:>8}  ellipse",
        "label", "power", "x/mm", "y/mm", "S1", "S2", "S3"
    );
    for ray in &r.rays {
        let s0 = if ray.stokes[0] > 0.0 { ray.stokes[0] } else { 1.0 };
        let _ = writeln!(
            out,
            "{:<8} {:>8} {:>12} {:>12}  {:>8} {:>8} {:>8}  {}",
            if ray.label.is_empty() { "-" } else { &ray.label },
            power_text(ray.power),
            num(ray.exit_position_mm[0], 6),
            num(ray.exit_position_mm[1], 6),
            num(ray.stokes[1] / s0, 4),
            num(ray.stokes[2] / s0, 4),
            num(ray.stokes[3] / s0, 4),
            ellipse_text(&ray.ellipse)
        );
    }
}

/// Where rays leave at angles or meet a screen away from the last face: each ray's deviation,
/// exit point and screen position (left out for plane-parallel plates with the screen on the
/// last face, where the exit points say it all).
fn directions(out: &mut String, r: &TraceResult) {
    let apart = |a: [f64; 2], b: [f64; 2]| a != b;
    if r.rays
        .iter()
        .all(|x| x.deviation_deg <= 1e-9 && !apart(x.screen_position_mm, x.exit_position_mm))
    {
        return;
    }
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "Directions (deviation from the incident beam; where each ray meets the screen)"
    );
    let _ = writeln!(
        out,
        "{:<8} {:>12} {:>12} {:>12} {:>12} {:>12}",
        "label", "deviation/°", "exit z/mm", "screen x/mm", "screen y/mm", "power"
    );
    for ray in &r.rays {
        let _ = writeln!(
            out,
            "{:<8} {:>12} {:>12} {:>12} {:>12} {:>12}",
            if ray.label.is_empty() { "-" } else { &ray.label },
            num(ray.deviation_deg, 6),
            num(ray.exit_point_mm[2], 6),
            num(ray.screen_position_mm[0], 6),
            num(ray.screen_position_mm[1], 6),
            power_text(ray.power)
        );
    }
}

/// Rays that did not leave forward, with where, why and their power.
fn rejected(out: &mut String, r: &TraceResult) {
    if r.rejected.is_empty() {
        return;
    }
    let _ = writeln!(out);
    let _ = writeln!(out, "Rejected rays (elements numbered from 1)");
    for x in &r.rejected {
        let _ = writeln!(
            out,
            "  {:<8} element {} {} face  {}  power {}  at ({}, {}, {}) mm",
            x.label,
            x.element + 1,
            x.face,
            x.reason,
            power_text(x.power),
            num(x.point_mm[0], 6),
            num(x.point_mm[1], 6),
            num(x.point_mm[2], 6)
        );
    }
}

/// The spots, numbered from one, with their overlap where they hold more than one ray.
fn spots(out: &mut String, r: &TraceResult) {
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "Spots (rays whose beams overlap added as fields; total power {})",
        num(r.total_power, 6)
    );
    for (i, s) in r.spots.iter().enumerate() {
        let _ = writeln!(
            out,
            "{:>3}  rays {:<12} power {}  at ({}, {}) mm  {}  DoP {}{}",
            i + 1,
            s.rays.join("+"),
            power_text(s.power),
            num(s.position_mm[0], 6),
            num(s.position_mm[1], 6),
            ellipse_text(&s.ellipse),
            num(s.degree_of_polarization, 4),
            if s.rays.len() > 1 {
                format!("  overlap {}", num(s.overlap, 5))
            } else {
                String::new()
            }
        );
    }
}

/// Most wavelengths the spectrum's table lists (evenly spread over the range, both ends included).
pub const SPECTRUM_ROWS: usize = 11;

/// The spectrum in a few lines: its range, where the transmission is lowest and highest, and at
/// most [`SPECTRUM_ROWS`] wavelengths of the range with the transmission and the forward light's
/// normalized Stokes vector and degree of polarization (the JSON holds every point).
fn spectrum(out: &mut String, r: &TraceResult) {
    let Some(sp) = &r.spectrum else { return };
    let points: Vec<(f64, f64)> = sp
        .wavelength_nm
        .iter()
        .zip(&sp.transmission)
        .filter_map(|(&nm, t)| t.map(|t| (nm, t)))
        .collect();
    let (first, last) = (sp.wavelength_nm.first(), sp.wavelength_nm.last());
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "Spectrum ({} wavelengths from {} to {} nm, each a whole trace; every point in the JSON)",
        sp.wavelength_nm.len(),
        first.map_or(String::new(), |v| crate::numfmt::sig(*v, 6)),
        last.map_or(String::new(), |v| crate::numfmt::sig(*v, 6)),
    );
    let pick = |better: fn(f64, f64) -> bool| {
        points
            .iter()
            .copied()
            .reduce(|a, b| if better(b.1, a.1) { b } else { a })
    };
    if let (Some(lo), Some(hi)) = (pick(|a, b| a < b), pick(|a, b| a > b)) {
        let _ = writeln!(
            out,
            "  lowest transmission   {} at {} nm",
            num(lo.1, 6),
            crate::numfmt::sig(lo.0, 6)
        );
        let _ = writeln!(
            out,
            "  highest transmission  {} at {} nm",
            num(hi.1, 6),
            crate::numfmt::sig(hi.0, 6)
        );
    }
    let missing = sp.transmission.len() - points.len();
    if missing > 0 {
        let _ = writeln!(out, "  {missing} wavelengths could not be traced (see the warnings)");
    }
    spectrum_rows(out, sp);
    if let Some(w) = &sp.white_light {
        let _ = writeln!(
            out,
            "  in white light ({}, {} observer)  {}",
            w.illuminant,
            w.observer,
            colour_words(w)
        );
    }
}

/// The spectrum's sampled rows: wavelength, transmission, S1/S0, S2/S0, S3/S0 and the degree of
/// polarization of all the forward light ("no power" where nothing leaves, "—" where the point
/// could not be traced).
fn spectrum_rows(out: &mut String, sp: &crate::contract::spectrum::Spectrum) {
    let n = sp.wavelength_nm.len();
    let rows = n.min(SPECTRUM_ROWS);
    if rows == 0 {
        return;
    }
    // The caption and the column heads in one write.
    let _ = writeln!(
        out,
        "  forward light, {rows} of the {n} wavelengths (Stokes on the beam basis e1, e2: x, y along z; S3 > 0 right-handed):\n  {:>11} {:>12} {:>9} {:>9} {:>9} {:>9}",
        "λ/nm", "transmission", "S1/S0", "S2/S0", "S3/S0", "DoP"
    );
    for k in 0..rows {
        let i = if rows == 1 {
            0
        } else {
            (k * (n - 1) + (rows - 1) / 2) / (rows - 1)
        };
        let nm = crate::numfmt::sig(sp.wavelength_nm[i], 6);
        let cells = match (
            sp.stokes.get(i).copied().flatten(),
            sp.degree_of_polarization.get(i).copied().flatten(),
        ) {
            (Some(st), _) if power_text(st[0]) == "no power" => format!("{:>12}", "no power"),
            (Some(st), Some(p)) => format!(
                "{:>12} {:>9} {:>9} {:>9} {:>9}",
                num(st[0], 4),
                signed(st[1] / st[0], 4),
                signed(st[2] / st[0], 4),
                signed(st[3] / st[0], 4),
                num(p, 4)
            ),
            _ => format!("{:>12}", "—"),
        };
        let _ = writeln!(out, "  {nm:>11} {cells}");
    }
}

/// A white-light colour in words: its sRGB value, chromaticity and luminous transmittance.
fn colour_words(w: &crate::contract::white_light::WhiteLight) -> String {
    let chroma = w
        .chromaticity
        .map_or("black".to_string(), |[x, y]| format!("x {} y {}", num(x, 4), num(y, 4)));
    format!(
        "{}  {chroma}  luminous transmittance {}{}",
        w.srgb,
        num(w.xyz[1], 4),
        if w.outside_srgb {
            "  (outside sRGB, clipped)"
        } else {
            ""
        }
    )
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::contract::result::trace_scenario as trace;
    use crate::contract::scenario::Scenario;

    fn table(doc: &str) -> String {
        render(&trace(&Scenario::from_json_str(doc).unwrap()).unwrap())
    }

    #[test]
    fn a_spectrum_is_summarized_by_its_range_and_extremes() {
        // A half-wave-ish quartz plate at 45° before a polarizer at 0°: the transmission runs
        // between 0 and 1 over the range; the table names both ends of the range.
        let t = table(
            r#"{"version": 2, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
            "elements": [{"kind": "crystal", "material": "quartz", "optical_activity": false, "thickness_mm": 2, "axis": {"tilt_deg": 90, "azimuth_deg": 45}},
                         {"kind": "polarizer", "transmission_axis_deg": 0}],
            "spectrum": {"from_nm": 500, "to_nm": 700, "points": 201}}"#,
        );
        assert!(
            t.contains("Spectrum (201 wavelengths from 500.000 to 700.000 nm"),
            "{t}"
        );
        assert!(
            t.contains("lowest transmission   0.0000") && t.contains("highest transmission  0.9999"),
            "{t}"
        );
        // Eleven rows of the 201, every 20 nm, both ends included; behind the polarizer at 0°
        // the forward light is linear along x: S1/S0 = +1, fully polarized.
        assert!(t.contains("forward light, 11 of the 201 wavelengths"), "{t}");
        let rows: Vec<&str> = t
            .lines()
            .filter(|l| l.trim_start().starts_with(['5', '6', '7']))
            .collect();
        assert_eq!(rows.len(), 11, "{t}");
        assert!(
            rows[0].starts_with("      500.000") && rows[10].starts_with("      700.000"),
            "{t}"
        );
        assert!(
            rows.iter()
                .all(|r| r.ends_with("+1.0000    0.0000    0.0000    1.0000")),
            "{t}"
        );
        assert!(!table(include_str!("../../examples/demo.json")).contains("Spectrum"));
    }

    #[test]
    fn circular_light_shows_no_azimuth() {
        let t = table(
            r#"{"beam": {"polarization": {"kind": "circular", "handedness": "left"}}, "elements": [{"kind": "rotator", "angle_deg": 10}]}"#,
        );
        assert!(t.contains("left circular") && !t.contains('ψ'), "{t}");
    }

    #[test]
    fn elements_and_spots_are_numbered_from_one() {
        let t = table(include_str!("../../examples/demo.json"));
        assert!(t.contains("  1  crystal") && !t.contains("  0  crystal"), "{t}");
        assert!(t.contains("  1  rays ") && t.contains("  2  rays "), "{t}");
    }

    #[test]
    fn huge_values_keep_their_columns() {
        // A 9999 mm plate and a retardance of millions of waves stay within the table's budget.
        let t = table(
            r#"{"elements": [{"kind": "crystal", "material": "calcite", "thickness_mm": 9999, "axis": {"tilt_deg": 45}}]}"#,
        );
        let row = t.lines().find(|l| l.contains("crystal")).unwrap();
        assert!(
            row.split_whitespace().all(|w| w.chars().count() <= TABLE_CHARS + 1),
            "{row}"
        );
    }
}
