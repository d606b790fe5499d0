//! A readable, fixed-width text form of a traced result, for a person at a terminal.
//!
//! The JSON result is the contract; this table is a view of it with rounded numbers (6
//! significant decimals for lengths in mm, 4 for powers) and the units in the headings.

use crate::stokes::{Ellipse, Handedness};
use crate::trace::{ElementReport, TraceResult};
use std::fmt::Write;

fn opt(v: Option<f64>, decimals: usize) -> String {
    match v {
        Some(x) => format!("{x:.decimals$}"),
        None => "—".to_string(),
    }
}

fn ellipse_text(e: &Ellipse) -> String {
    match e.handedness {
        Handedness::Unpolarized => "unpolarized".to_string(),
        Handedness::Linear => format!("linear {:+.3}°", e.azimuth_deg),
        Handedness::Right | Handedness::Left => {
            let h = if e.handedness == Handedness::Right {
                "right"
            } else {
                "left"
            };
            format!("{h} ψ {:+.3}° χ {:+.3}°", e.azimuth_deg, e.ellipticity_deg)
        }
    }
}

/// Renders `r` as a text table.
pub fn render(r: &TraceResult) -> String {
    let mut out = String::new();
    let d = r.input.direction;
    let polar = d[2].clamp(-1.0, 1.0).acos().to_degrees();
    let az = d[1].atan2(d[0]).to_degrees();
    let _ = writeln!(out, "Doublespar trace at {} nm", r.wavelength_nm);
    let _ = writeln!(
        out,
        "Input: {}, degree of polarization {:.4}; incidence polar {:.4}°, azimuth {:.4}°",
        ellipse_text(&r.input.ellipse),
        r.input.degree_of_polarization,
        polar,
        if polar == 0.0 { 0.0 } else { az }
    );
    let _ = writeln!(out);
    let _ = writeln!(out, "Elements");
    let _ = writeln!(
        out,
        "{:>3}  {:<9} {:<9} {:>9} {:>9} {:>10} {:>10} {:>10} {:>12} {:>9}",
        "#", "kind", "material", "n_o", "n_e", "L/mm", "n(e-wave)", "walk-off/°", "separation/mm", "Γ/waves"
    );
    for (i, el) in r.elements.iter().enumerate() {
        match el {
            ElementReport::Crystal {
                material,
                no,
                ne,
                thickness_mm,
                e,
                separation_mm,
                retardance_waves,
                ..
            } => {
                let _ = writeln!(
                    out,
                    "{:>3}  {:<9} {:<9} {:>9.6} {:>9.6} {:>10.4} {:>10} {:>10} {:>13} {:>9}",
                    i,
                    "crystal",
                    material,
                    no,
                    ne,
                    thickness_mm,
                    opt(e.index, 6),
                    opt(e.walkoff_deg, 4),
                    opt(*separation_mm, 6),
                    opt(*retardance_waves, 4)
                );
            }
            ElementReport::Retarder { retardance_rad, .. } => {
                let _ = writeln!(
                    out,
                    "{:>3}  {:<9} {:>96}",
                    i,
                    "retarder",
                    format!("{:.4}", retardance_rad / std::f64::consts::TAU)
                );
            }
            ElementReport::Polarizer { absorbed_power, .. } => {
                let _ = writeln!(
                    out,
                    "{:>3}  {:<9} absorbs {:.4} of the input power",
                    i, "polarizer", absorbed_power
                );
            }
            ElementReport::Rotator { angle_deg, .. } => {
                let _ = writeln!(out, "{:>3}  {:<9} turns by {:.4}°", i, "rotator", angle_deg);
            }
        }
    }
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "Rays (exit points on the last face, z = {:.4} mm)",
        r.rays.first().map_or(0.0, |x| x.exit_z_mm)
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
            "{:<8} {:>8.4} {:>12.6} {:>12.6}  {:>8.4} {:>8.4} {:>8.4}  {}",
            if ray.label.is_empty() { "-" } else { &ray.label },
            ray.power,
            ray.exit_position_mm[0],
            ray.exit_position_mm[1],
            ray.stokes[1] / s0,
            ray.stokes[2] / s0,
            ray.stokes[3] / s0,
            ellipse_text(&ray.ellipse)
        );
    }
    let _ = writeln!(out);
    let _ = writeln!(
        out,
        "Spots (rays whose beams overlap added as fields; total power {:.6})",
        r.total_power
    );
    for (i, s) in r.spots.iter().enumerate() {
        let _ = writeln!(
            out,
            "{:>3}  rays {:<12} power {:.4}  at ({:.6}, {:.6}) mm  {}  DoP {:.4}{}",
            i,
            s.rays.join("+"),
            s.power,
            s.position_mm[0],
            s.position_mm[1],
            ellipse_text(&s.ellipse),
            s.degree_of_polarization,
            if s.rays.len() > 1 {
                format!("  overlap {:.5}", s.overlap)
            } else {
                String::new()
            }
        );
    }
    if !r.warnings.is_empty() {
        let _ = writeln!(out);
        let _ = writeln!(out, "Warnings");
        for w in &r.warnings {
            let _ = writeln!(out, "  - {w}");
        }
    }
    out
}
