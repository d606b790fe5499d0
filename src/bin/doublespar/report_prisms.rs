//! Report sections of the prism designs: the angular splitter, the prism polarizer and the
//! tilt-tuned waveplate, in the order of every design report (what to order, performance,
//! tolerances, notes and warnings). Curves are summarized by their range; the JSON holds them.

use super::{Report, medium_words, num, principal_indices, span};
use serde_json::Value;

/// The scenario's crystals, and its wavelength in words.
fn crystals_and_wavelength(r: &Report) -> (Vec<Value>, String) {
    let els: Vec<Value> =
        r.v.pointer("/scenario/elements")
            .and_then(Value::as_array)
            .cloned()
            .unwrap_or_default();
    let wl =
        r.v.pointer("/scenario/wavelength_nm")
            .and_then(Value::as_f64)
            .map_or_else(String::new, num);
    (els, wl)
}

/// How the second element meets the first, in words.
fn contact_words(el: Option<&Value>) -> String {
    match el.and_then(|e| e.get("contact")).and_then(Value::as_str) {
        Some("cement") => format!(
            "cemented (cement index {})",
            el.and_then(|e| e.get("cement_index"))
                .and_then(Value::as_f64)
                .map_or_else(String::new, num)
        ),
        Some("optical") => "optically contacted".into(),
        _ => "across a thin air gap".into(),
    }
}

/// The thin edge and the clear aperture of a pair of wedges or prisms.
fn size_lines(r: &mut Report) {
    r.quantity(
        "thin edge",
        "edge_thickness_mm",
        "mm (a tenth of the aperture, at least 1 mm)",
    );
    r.quantity("clear aperture", "clear_aperture_mm", "mm");
}

/// The angular splitter.
pub(super) fn splitter(r: &mut Report) {
    let (els, wl) = crystals_and_wavelength(r);
    let material = els.first().map_or_else(String::new, medium_words);
    r.title(&format!("Angular splitter · {material} · {wl} nm"));
    r.section("What to order");
    r.line(
        "part",
        format!(
            "two {material} wedges with crossed optic axes, {}",
            contact_words(els.get(1))
        ),
    );
    r.quantity("wedge angle", "wedge_angle_deg", "°");
    for (i, axis) in ["x", "y"].iter().enumerate() {
        if let Some(t) = r.f(&format!("thickness_mm.{i}")) {
            r.line(
                &format!("wedge {}", i + 1),
                format!("{} mm thick on its axis, optic axis in the faces along {axis}", num(t)),
            );
        }
    }
    size_lines(r);
    r.used.insert("contact".into());

    r.section("Performance");
    r.quantity("split angle", "split_angle_deg", "°");
    r.quantity(
        "wedge by the small-angle rule",
        "small_angle_wedge_deg",
        "° (2·arcsin((nₑ − nₒ)·tan α))",
    );
    for i in 0..2 {
        let label = r.s(&format!("beams.{i}.label")).unwrap_or_default();
        let pol = r.s(&format!("beams.{i}.polarization")).unwrap_or_default();
        if let (Some(d), Some(p)) = (
            r.f(&format!("beams.{i}.deviation_deg")),
            r.f(&format!("beams.{i}.power")),
        ) {
            r.line(
                &format!("beam {label} (along {pol})"),
                format!("deviated {} ° toward +x, power {}", num(d), num(p)),
            );
        }
    }
    if let (Some(split), Some(band)) = (
        span(r, "band.split_angle_deg", "°"),
        span(r, "band.wavelength_nm", "nm"),
    ) {
        r.line("split over the band", format!("{split} over {band}"));
    }
    r.used.insert("band".into());

    r.section("Tolerances (standard deviations)");
    r.quantity("wedge angle", "tolerances.wedge_deg", "°");
    r.quantity("optic axis about the beam", "tolerances.axis_deg", "° (each wedge)");
    r.quantity("incidence", "tolerances.incidence_deg", "°");
    r.quantity("Monte Carlo samples", "samples", "");
    r.quantity("seed", "seed", "");
    if let (Some(m), Some(s)) = (r.f("split_angle_spread.mean"), r.f("split_angle_spread.std")) {
        r.line(
            "split angle",
            format!("{} ± {} ° (mean ± standard deviation)", num(m), num(s)),
        );
    }
    if let (Some(a), Some(b)) = (r.f("split_angle_spread.p5"), r.f("split_angle_spread.p95")) {
        r.line("  5 % to 95 %", format!("{} to {} °", num(a), num(b)));
    }
    if let (Some(a), Some(b)) = (r.f("split_angle_spread.min"), r.f("split_angle_spread.max")) {
        r.line("  smallest to largest", format!("{} to {} °", num(a), num(b)));
    }
    r.used.insert("split_angle_spread".into());
    r.notes(&[]);
}

/// One transmission record in words.
fn transmission(r: &mut Report, label: &str, path: &str) {
    let (Some(x), Some(p), Some(l)) = (
        r.f(&format!("{path}.incidence_deg")),
        r.f(&format!("{path}.passed")),
        r.f(&format!("{path}.leaked")),
    ) else {
        return;
    };
    let ext = r
        .f(&format!("{path}.extinction"))
        .map_or_else(|| "nothing passes".to_string(), |e| format!("extinction {}", num(e)));
    r.line(
        label,
        format!("at {} °: passed {}, leaked {}, {ext}", num(x), num(p), num(l)),
    );
}

/// The prism polarizer.
pub(super) fn polarizer(r: &mut Report) {
    let (els, wl) = crystals_and_wavelength(r);
    let material = els.first().map_or_else(String::new, medium_words);
    r.title(&format!("Prism polarizer · {material} · {wl} nm"));
    r.section("What to order");
    r.line(
        "part",
        format!(
            "two {material} prisms, optic axes in the faces along y, {}",
            contact_words(els.get(1))
        ),
    );
    r.quantity("prism angle", "prism_angle_deg", "° (gap from the entrance face)");
    for i in 0..2 {
        r.quantity(
            &format!("prism {}", i + 1),
            &format!("thickness_mm.{i}"),
            "mm thick on its axis",
        );
    }
    size_lines(r);
    r.quantity("gap index", "gap_index", "");

    r.section("Performance");
    let (refl, pass) = (
        r.s("reflected_mode").unwrap_or_default(),
        r.s("passed_mode").unwrap_or_default(),
    );
    r.line("reflected at the gap", format!("{refl}-ray (the higher index)"));
    r.line("passed", format!("{pass}-ray"));
    if let (Some(a), Some(b)) = (r.f("critical_angles_deg.0"), r.f("critical_angles_deg.1")) {
        r.line(
            "critical angles at the gap",
            format!("{} ° ({refl}), {} ° ({pass})", num(a), num(b)),
        );
    }
    transmission(r, "at normal incidence", "normal");
    if let Some(s) = span(r, "curve.passed", "") {
        r.line("passed over ±1.5 fields", s.trim_end());
    }
    r.used.insert("curve".into());

    r.section("Tolerances (field of view, incidence in the plane of the gap tilt)");
    if let (Some(a), Some(b)) = (r.f("half_field_deg.0"), r.f("half_field_deg.1")) {
        r.line(
            "half-angle field",
            format!("{} ° below, {} ° above the normal", num(a), num(b)),
        );
    }
    for (name, path) in [("lower edge", "lower_edge"), ("upper edge", "upper_edge")] {
        if let (Some(x), Some(c)) = (
            r.f(&format!("{path}.incidence_deg")),
            r.f(&format!("{path}.closed_form_deg")),
        ) {
            r.line(
                name,
                format!("{} ° traced, {} ° from the critical angle", num(x), num(c)),
            );
        }
        transmission(r, "  just inside", &format!("{path}.inside"));
        transmission(r, "  just outside", &format!("{path}.outside"));
    }
    r.line("transmissions", "uncoated faces, light polarized along each mode");
    r.notes(&[]);
}

/// The tilt-tuned waveplate.
pub(super) fn tilt(r: &mut Report) {
    let (els, wl) = crystals_and_wavelength(r);
    let plate = els.first().cloned().unwrap_or_default();
    let material = medium_words(&plate);
    r.title(&format!("Tilt-tuned waveplate · {material} · {wl} nm"));
    r.section("What to order");
    r.quantity("plate thickness", "thickness_mm", "mm");
    // A biaxial plate has no optic axis in its faces: its two in-face principal axes are named,
    // the fast one first (the f-wave's polarization), each at its azimuth.
    let words = match r.s("cut") {
        Some(c) => {
            let az = |r: &mut Report, k: &str| r.f(k).map_or_else(String::new, num);
            let (slow, slow_az) = (
                r.s("slow_principal_axis").unwrap_or_default(),
                az(r, "axis_azimuth_deg"),
            );
            let (fast, fast_az) = (
                r.s("fast_principal_axis").unwrap_or_default(),
                az(r, "fast_axis_azimuth_deg"),
            );
            format!(
                "{c}-cut (light along principal {c}); fast axis principal {fast} at {fast_az} ° from x, slow axis principal {slow} at {slow_az} °"
            )
        }
        None => {
            let az = plate.pointer("/axis/azimuth_deg").and_then(Value::as_f64);
            format!(
                "optic axis in the faces at {} ° from x",
                az.map_or_else(String::new, num)
            )
        }
    };
    r.line("cut", format!("{material}, {words}"));
    let plane = plate
        .pointer("/mount/azimuth_deg")
        .and_then(Value::as_f64)
        .map_or_else(|| "0".into(), num);
    r.quantity("mount tilt", "tilt_deg", &format!("° in the plane at {plane} ° from x"));

    r.section("Performance");
    principal_indices(r);
    r.quantity("retardance at the tilt", "retardance_waves", "waves");
    r.quantity("whole waves beyond the target", "order", "");
    r.quantity("retardance untilted", "normal_retardance_waves", "waves");
    if let (Some(g), Some(t)) = (
        span(r, "curve.retardance_waves", "waves"),
        span(r, "curve.tilt_deg", "°"),
    ) {
        r.line("over tilts", format!("{g} for {t}"));
    }
    r.used.insert("curve".into());

    r.section("Tolerances");
    r.quantity("retardance per degree of tilt", "sensitivity_waves_per_deg", "waves/°");
    r.notes(&["cut_note"]);
}
