//! Report section of the birefringent filter: the plates and polarizers to order, the pass band
//! met against the one asked, the neighbouring peaks and the centre's drift with temperature, in
//! the order of every design report. The curve is summarized by its range; the JSON holds it.

use super::{Report, num, plate_count, plate_lines, principal_indices, range_of};

/// A birefringent filter.
pub(super) fn filter(r: &mut Report) {
    let layout = r.s("layout").unwrap_or_default();
    let wl = r.f("wavelength_nm").map_or_else(String::new, num);
    let material = r
        .s("scenario.elements.1.material")
        .unwrap_or_else(|| "custom crystal".into());
    // A biaxial crystal's plates are all cut alike: the cut goes with the material.
    let material = match r.s("cut") {
        Some(c) => format!("{material} ({c}-cut)"),
        None => material,
    };
    r.title(&format!("Birefringent filter · {layout} · {material} · {wl} nm"));
    r.section("What to order");
    let n = plate_count(r);
    r.line(
        "part",
        if layout == "folded" {
            format!(
                "{n} equal plates of {material} between crossed polarizers, axes alternately at ± the folding angle"
            )
        } else {
            format!("{n} plates of {material}, thicknesses doubling, each behind a polarizer parallel to the first")
        },
    );
    plate_lines(r, false, "at the centre");
    let pols: Vec<String> =
        r.v.get("polarizers_deg")
            .and_then(serde_json::Value::as_array)
            .into_iter()
            .flatten()
            .filter_map(serde_json::Value::as_f64)
            .map(num)
            .collect();
    r.used.insert("polarizers_deg".into());
    r.line(
        "polarizers",
        format!("{} at {} ° from x, in order", pols.len(), pols.join(", ")),
    );
    r.quantity("crystal in all", "total_thickness_mm", "mm");

    r.section("Performance");
    principal_indices(r);
    r.quantity("centre wavelength", "wavelength_nm", "nm");
    width(r, "pass band (FWHM) met", "fwhm_nm");
    r.quantity("pass band asked", "bandwidth_nm", "nm");
    r.quantity(
        "thinnest plate's order",
        "order",
        if layout == "folded" {
            "(and a half) waves"
        } else {
            "waves"
        },
    );
    r.quantity(
        "peak transmission",
        "peak_transmission",
        "of light along the first polarizer (whole trace)",
    );
    let peaks: Vec<String> = (0..2)
        .map(|i| {
            r.f(&format!("neighbour_peaks_nm.{i}"))
                .map_or("none".into(), |v| format!("{} nm", num(v)))
        })
        .collect();
    r.line("neighbouring peaks", format!("{} and {}", peaks[0], peaks[1]));
    let orders: Vec<String> = (0..2)
        .filter_map(|i| {
            r.f(&format!("neighbour_orders_fwhm_nm.{i}"))
                .map(|v| format!("{} nm", num(v)))
        })
        .collect();
    r.line("next orders' pass bands", orders.join(" and "));
    air_twin(r, "neighbour_orders_fwhm_nm");
    if let Some((lo_nm, hi_nm, lo, hi)) = range_of(r.v.get("curve")) {
        r.line(
            "transmission over the curve",
            format!("{} to {}, {} nm to {} nm", num(lo), num(hi), num(lo_nm), num(hi_nm)),
        );
    }
    r.used.insert("curve".into());

    r.section("Tolerances");
    match r.f("centre_shift_nm_per_k") {
        Some(_) => {
            r.quantity("centre drift with temperature", "centre_shift_nm_per_k", "nm/K");
            air_twin(r, "centre_shift_nm_per_k");
        }
        None => r.line("centre drift with temperature", "no thermal data for this crystal"),
    }
    r.notes(&["cut_note"]);
}

/// A width `path` in nm with, for a request in standard air, its air twin beside it.
fn width(r: &mut Report, label: &str, path: &str) {
    let Some(v) = r.f(path) else { return };
    let air = r
        .f(&format!("air_{path}"))
        .map_or_else(String::new, |a| format!(" ({} nm in standard air)", num(a)));
    r.line(label, format!("{} nm{air}", num(v)));
}

/// The air twin of a width already shown in vacuum (lists and rates are stated on a line of
/// their own), as "  in standard air".
fn air_twin(r: &mut Report, path: &str) {
    let Some(v) = r.at(&format!("air_{path}")).cloned() else {
        return;
    };
    let unit = if path.ends_with("_per_k") { "nm/K" } else { "nm" };
    let text: Vec<String> = match &v {
        serde_json::Value::Array(l) => l.iter().filter_map(serde_json::Value::as_f64).map(num).collect(),
        other => other.as_f64().map(num).into_iter().collect(),
    };
    r.line("  in standard air", format!("{} {unit}", text.join(" and ")));
}
