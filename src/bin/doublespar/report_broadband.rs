//! Report section of the broadband retarder: the plates to order, the worst departures from the
//! target over the band beside the published classic and a single plate, and how the search ran,
//! in the order of every design report. The curves are summarized by their worst values; the
//! JSON holds them.

use super::{Report, num, plate_count, plate_cuts, plate_lines};

/// The departures at `path` in one line.
fn departures(r: &mut Report, path: &str) -> String {
    let ret = r.f(&format!("{path}.retardance_waves")).map_or_else(String::new, num);
    let axis = r.f(&format!("{path}.fast_axis_deg")).map_or_else(String::new, num);
    let rotation = r
        .f(&format!("{path}.rotation_deg"))
        .map_or_else(String::new, |v| format!(", rotation ≤ {} °", num(v)));
    r.used.insert(format!("{path}.rotation_deg"));
    r.used.insert(format!("{path}.distance"));
    format!("retardance within ±{ret} waves, fast axis within ±{axis} °{rotation}")
}

/// A broadband retarder.
pub(super) fn broadband(r: &mut Report) {
    let target = r.f("target_retardance_waves").map_or_else(String::new, num);
    let lo = r.f("band_nm.0").map_or_else(String::new, num);
    let hi = r.f("band_nm.1").map_or_else(String::new, num);
    r.title(&format!("Broadband retarder · {target} waves · {lo} to {hi} nm"));
    r.section("What to order");
    let n = plate_count(r);
    let faces = if (0..n).any(|i| r.v.pointer(&format!("/plates/{i}/cut")).is_some()) {
        "each plate's optic axis or slow axis in its faces"
    } else {
        "optic axes in the faces"
    };
    r.line("part", format!("{n} plates stacked in this order, {faces}"));
    plate_lines(r, true, "at the band's centre");
    r.section("Performance");
    let cut_notes = plate_cuts(r);
    r.quantity("target fast axis", "target_fast_axis_deg", "° from x");
    let this = departures(r, "departures");
    r.line("over the band", this);
    if r.v.get("classic").is_some() {
        let name = r.s("classic.name").unwrap_or_default();
        let classic = departures(r, "classic.departures");
        r.line("the classic design", format!("{name}: {classic}"));
        r.used.insert("classic.plates".into());
    }
    let single = departures(r, "single_plate.departures");
    r.line("a single zero-order plate", single);
    r.used.insert("single_plate".into());
    r.used.insert("curve".into());
    r.section("Tolerances");
    let method = r.s("search.method").unwrap_or_default();
    let pop = r.f("search.population").map_or_else(String::new, num);
    let gens = r.f("search.generations").map_or_else(String::new, num);
    let seed = r.f("search.seed").map_or_else(String::new, num);
    r.line(
        "found by",
        format!("{method}, {pop} candidates over {gens} generations, seed {seed}"),
    );
    r.notes(&cut_notes.iter().map(String::as_str).collect::<Vec<_>>());
}
