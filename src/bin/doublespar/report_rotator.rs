//! Report section of the quartz rotator: a c-cut quartz plate of one hand and thickness, its
//! rotation and dispersion, its thickness tolerance and angular acceptance, in the order of every
//! design report. The curves are summarized by their range; the JSON holds them.

use super::{Report, num, span};

/// The quartz rotator.
pub(super) fn rotator(r: &mut Report) {
    let wl = r.f("wavelength_nm").map_or_else(String::new, num);
    let rotation = r.f("requested_rotation_deg").map_or_else(String::new, num);
    r.title(&format!("Quartz rotator · {rotation} ° · {wl} nm"));
    r.section("What to order");
    let hand = r.s("handedness").unwrap_or_default();
    r.line(
        "part",
        format!("{hand}-handed crystalline quartz, c-cut (optic axis along the face normal)"),
    );
    r.quantity("thickness", "thickness_mm", "mm");
    r.quantity(
        "thickness tolerance",
        "thickness_tolerance_mm",
        "mm (± the rotation tolerance)",
    );

    r.section("Performance");
    r.quantity("rotation", "rotation_deg", "° from x toward y (the plate's own)");
    if r.f("half_turns_added").is_some_and(|k| k != 0.0) {
        r.quantity("half turns beyond the request", "half_turns_added", "× 180 °");
    } else {
        r.used.insert("half_turns_added".into());
    }
    r.quantity("rotation by the exact trace", "traced_rotation_deg", "°");
    r.quantity("ellipticity by the exact trace", "traced_ellipticity_deg", "°");
    r.quantity("rotatory power", "rotatory_power_deg_per_mm", "°/mm");
    r.text_line("rotatory power from", "rotatory_power_source");
    r.text_line("its change with temperature", "rotatory_power_temperature_source");
    r.quantity("dispersion dθ/dλ", "dispersion_deg_per_nm", "°/nm");
    if let (Some(th), Some(band)) = (span(r, "band.rotation_deg", "°"), span(r, "band.wavelength_nm", "nm")) {
        r.line("rotation over the band", format!("{th} over {band}"));
    }
    r.used.insert("band".into());

    r.section("Tolerances");
    r.quantity("rotation tolerance", "rotation_tolerance_deg", "°");
    r.quantity("ellipticity tolerance", "ellipticity_tolerance_deg", "°");
    if let Some(acc) = r.f("acceptance_deg") {
        let ge = if r.s("acceptance_bound").as_deref() == Some("at_least") {
            "≥ "
        } else {
            ""
        };
        let by = r.s("acceptance_limited_by").map_or_else(
            || "neither tolerance reached".to_string(),
            |b| format!("set by the {b}"),
        );
        r.line("acceptance angle", format!("{ge}{} ° ({by})", num(acc)));
    }
    r.used.insert("acceptance_limited_by".into());
    if let Some(e) = span(r, "acceptance_curve.ellipticity_deg", "°") {
        let t = span(r, "acceptance_curve.incidence_deg", "°").unwrap_or_default();
        r.line("worst ellipticity", format!("{e} for incidences {t}"));
    }
    r.used.insert("acceptance_curve".into());
    r.line(
        "acceptance means",
        "every linear input leaves within both tolerances (exact trace, any plane of incidence)",
    );
    r.notes(&[]);
}
