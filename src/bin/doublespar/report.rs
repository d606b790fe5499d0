//! The design answer as a report a person reads from the top: what to order, how it performs,
//! what it tolerates, then notes and warnings. Every number carries its unit.
//!
//! The report reads the JSON answer of [`doublespar::solve_design`] (the contract), so it shows
//! exactly what the JSON holds, rounded: 4 significant digits (whole numbers as they are),
//! scientific notation below 10⁻³ and from 10⁶ up. A figure the JSON holds but the report does not yet place is listed at the
//! end under "Other figures" with its JSON name, so that nothing is ever hidden; curves,
//! histograms and the scenario are left to the JSON and the page.

use doublespar::{RECOMBINER_MAX_PHASE_ERROR as MAX_PHASE_ERROR, RECOMBINER_MIN_OVERLAP as MIN_OVERLAP};
use serde_json::Value;
use std::collections::BTreeSet;

#[path = "report_broadband.rs"]
mod broadband;
#[path = "report_filter.rs"]
mod filter;
#[path = "report_prisms.rs"]
mod prisms;
#[path = "report_rotator.rs"]
mod rotator;

const LABEL_WIDTH: usize = 30;

/// A number with 4 significant digits by the one formatter (`numfmt`: plain for everyday
/// magnitudes, m×10ⁿ beyond them, up to 12 characters since a report is not a drawing); whole
/// numbers (counts, round inputs such as 45 ° or 1064 nm) without a decimal tail.
fn num(x: f64) -> String {
    if !x.is_finite() {
        return "not defined".into();
    }
    if x.fract() == 0.0 && x.abs() < 1e6 {
        return format!("{x:.0}").replace('-', "\u{2212}");
    }
    doublespar::sig_within(x, 4, 12)
}

struct Report<'a> {
    v: &'a Value,
    out: String,
    used: BTreeSet<String>,
    section_open: bool,
}

impl<'a> Report<'a> {
    fn new(v: &'a Value) -> Self {
        let mut used = BTreeSet::new();
        for k in [
            "kind",
            "scenario",
            "band.curve",
            "wavelength_curve",
            "temperature_curve",
            "angular",
            "monte_carlo.histogram",
        ] {
            used.insert(k.to_string());
        }
        Report {
            v,
            out: String::new(),
            used,
            section_open: false,
        }
    }

    fn at(&mut self, path: &str) -> Option<&'a Value> {
        self.used.insert(path.to_string());
        let mut cur = self.v;
        for part in path.split('.') {
            cur = match part.parse::<usize>() {
                Ok(i) => cur.get(i)?,
                Err(_) => cur.get(part)?,
            };
        }
        if cur.is_null() { None } else { Some(cur) }
    }

    fn f(&mut self, path: &str) -> Option<f64> {
        self.at(path).and_then(Value::as_f64)
    }

    fn s(&mut self, path: &str) -> Option<String> {
        self.at(path).and_then(Value::as_str).map(str::to_string)
    }

    fn title(&mut self, text: &str) {
        self.out.push_str(text);
        self.out.push('\n');
        self.out.push_str(&"=".repeat(text.chars().count()));
        self.out.push('\n');
    }

    fn section(&mut self, name: &str) {
        self.out.push('\n');
        self.out.push_str(name);
        self.out.push('\n');
        self.section_open = true;
    }

    fn line(&mut self, label: &str, value: impl AsRef<str>) {
        let pad = LABEL_WIDTH.saturating_sub(label.chars().count());
        self.out
            .push_str(&format!("  {label}{} {}\n", " ".repeat(pad), value.as_ref()));
    }

    /// A line with a number and unit, skipped when the JSON lacks the number.
    fn quantity(&mut self, label: &str, path: &str, unit: &str) {
        if let Some(x) = self.f(path) {
            let text = if unit.is_empty() {
                num(x)
            } else {
                format!("{} {unit}", num(x))
            };
            self.line(label, text);
        }
    }

    fn text_line(&mut self, label: &str, path: &str) {
        if let Some(t) = self.s(path) {
            self.line(label, t);
        }
    }

    /// Each mode's group index (`modes.o.group_index` …), under the trace's mode letters.
    fn group_indices(&mut self) {
        for m in ["o", "e", "f", "s"] {
            self.quantity(&format!("group index, {m}"), &format!("modes.{m}.group_index"), "");
        }
    }

    /// The request's wavelength basis (`wavelength_in`): for standard air, each wavelength as
    /// given beside its vacuum equivalent, which the rest of the report quotes. The vacuum
    /// echoes of the request's wavelength fields are the request's own numbers and are not
    /// repeated.
    fn basis(&mut self) -> Option<String> {
        let air = self.s("wavelength_in").as_deref() == Some("air");
        let fields = [
            "wavelength_nm",
            "band_nm",
            "wavelengths_nm",
            "made_for_nm",
            "bandwidth_nm",
        ];
        let mut given = Vec::new();
        for f in fields.into_iter().chain(["tolerances.wavelength_nm"]) {
            let (parent, name) = f.rsplit_once('.').map_or(("", f), |(p, n)| (p, n));
            let twin = if parent.is_empty() {
                format!("air_{name}")
            } else {
                format!("{parent}.air_{name}")
            };
            let Some(a) = self.at(&twin).cloned() else {
                self.used.insert(f.to_string());
                continue;
            };
            // To 0.1 pm: air and vacuum wavelengths differ in the fourth significant digit.
            let nm = |x: f64| format!("{}", (x * 1e4).round() / 1e4);
            let words = |v: Option<&Value>| match v {
                Some(Value::Array(l)) => l
                    .iter()
                    .filter_map(Value::as_f64)
                    .map(nm)
                    .collect::<Vec<_>>()
                    .join(" to "),
                Some(v) => v.as_f64().map_or_else(String::new, nm),
                None => String::new(),
            };
            let vacuum = words(self.at(f));
            given.push(format!("{f} {} nm in air is {vacuum} nm in vacuum", words(Some(&a))));
        }
        if !air {
            return None;
        }
        let n = self
            .f("air_index")
            .map_or_else(String::new, |n| format!(" (n = {})", doublespar::sig_within(n, 9, 14)));
        Some(format!(
            "wavelengths given in standard air{n}, converted to vacuum by Ciddor (1996): {}; every other wavelength here is in vacuum",
            given.join("; ")
        ))
    }

    /// The design temperature, the lengths at it and each figure's change per kelvin
    /// (`temperature.per_kelvin`), the unit read from the figure's name; a figure a kind's own
    /// lines have shown is not repeated.
    fn temperature(&mut self) {
        let Some(t0) = self.f("temperature.design_temperature_c") else {
            return;
        };
        self.used.insert("temperature.step_k".into());
        self.section("Temperature");
        self.line("designed for", format!("{} °C (lengths made at 20 °C)", num(t0)));
        let mut grown: Vec<(String, String)> = self
            .v
            .as_object()
            .map(|m| {
                m.keys()
                    .filter(|k| k.ends_with("_at_temperature_mm"))
                    .map(|k| (k.trim_end_matches("_at_temperature_mm").replace('_', " "), k.clone()))
                    .collect()
            })
            .unwrap_or_default();
        let plates = self.v.get("plates").and_then(Value::as_array).map_or(0, Vec::len);
        grown.extend((0..plates).map(|i| {
            (
                format!("plate {} thickness", i + 1),
                format!("plates.{i}.thickness_at_temperature_mm"),
            )
        }));
        for (label, k) in grown {
            // At 20 °C the length at temperature is the length made, shown above.
            if t0 == doublespar::REFERENCE_C {
                self.used.insert(k);
                continue;
            }
            match self.at(&k).and_then(Value::as_array) {
                // A pair of prisms or wedges: both thicknesses on one line.
                Some(list) => {
                    let text: Vec<String> = list.iter().filter_map(Value::as_f64).map(num).collect();
                    self.line(&format!("{label} at {} °C", num(t0)), format!("{} mm", text.join(", ")));
                }
                None => self.quantity(&format!("{label} at {} °C", num(t0)), &k, "mm"),
            }
        }
        let figures: Vec<String> = self
            .v
            .pointer("/temperature/per_kelvin")
            .and_then(Value::as_object)
            .map(|m| m.keys().cloned().collect())
            .unwrap_or_default();
        for k in figures {
            let path = format!("temperature.per_kelvin.{k}");
            if self.used.contains(&path) {
                continue;
            }
            let (name, unit) = per_kelvin_words(&k);
            self.quantity(&format!("{name} per kelvin"), &path, &format!("{unit}/K"));
        }
    }

    /// Notes and warnings, after the temperature section: the dispersion source of each crystal
    /// (`sources`), the listed text fields and any `warnings` / `notes` list.
    fn notes(&mut self, texts: &[&str]) {
        self.temperature();
        let mut items: Vec<String> = self.basis().into_iter().collect();
        for s in self.at("sources").and_then(Value::as_array).into_iter().flatten() {
            let text = |k: &str| s.get(k).and_then(Value::as_str).unwrap_or_default();
            items.push(format!(
                "indices of {} from its {} formula: {}",
                text("material"),
                text("source"),
                text("citation")
            ));
        }
        for key in ["warnings", "notes"] {
            if let Some(list) = self.at(key).and_then(Value::as_array) {
                for w in list {
                    match w {
                        Value::String(s) => items.push(s.clone()),
                        Value::Object(m) => {
                            let msg = m.get("message").and_then(Value::as_str).unwrap_or_default();
                            match m.get("field").and_then(Value::as_str) {
                                Some(f) if !f.is_empty() => items.push(format!("{f}: {msg}")),
                                _ => items.push(msg.to_string()),
                            }
                        }
                        other => items.push(other.to_string()),
                    }
                }
            }
        }
        for t in texts {
            if let Some(s) = self.s(t) {
                items.push(s);
            }
        }
        self.section("Notes and warnings");
        if items.is_empty() {
            self.out.push_str("  none\n");
        }
        for i in items {
            self.out.push_str(&format!("  - {i}\n"));
        }
    }

    /// Figures of the JSON that no line above has shown, by their JSON names.
    fn others(&mut self) {
        let mut rest = Vec::new();
        collect(self.v, "", &self.used, &mut rest);
        if rest.is_empty() {
            return;
        }
        self.section("Other figures (JSON names)");
        for (k, v) in rest {
            self.line(&k, v);
        }
    }
}

/// The words and unit of a `per_kelvin` figure from its JSON name (`separation_um` → separation,
/// µm).
fn per_kelvin_words(key: &str) -> (String, &'static str) {
    for (suffix, unit) in [
        ("_um", "µm"),
        ("_mm", "mm"),
        ("_deg", "°"),
        ("_waves", "waves"),
        ("_rad", "rad"),
        ("_nm", "nm"),
    ] {
        if let Some(name) = key.strip_suffix(suffix) {
            return (name.replace('_', " "), unit);
        }
    }
    (key.replace('_', " "), "")
}

fn collect(v: &Value, prefix: &str, used: &BTreeSet<String>, out: &mut Vec<(String, String)>) {
    if used.contains(prefix) {
        return;
    }
    match v {
        Value::Object(m) => {
            for (k, x) in m {
                let p = if prefix.is_empty() {
                    k.clone()
                } else {
                    format!("{prefix}.{k}")
                };
                collect(x, &p, used, out);
            }
        }
        Value::Array(a) if a.iter().any(|x| x.is_object() || x.is_array()) => {
            for (i, x) in a.iter().enumerate() {
                collect(x, &format!("{prefix}.{i}"), used, out);
            }
        }
        // A short list of numbers counts as shown when any of its items is.
        Value::Array(_)
            if used
                .range(format!("{prefix}.")..)
                .next()
                .is_some_and(|u| u.starts_with(&format!("{prefix}."))) => {}
        Value::Array(a) => {
            let items: Vec<String> = a.iter().map(scalar).collect();
            out.push((prefix.to_string(), format!("[{}]", items.join(", "))));
        }
        other => out.push((prefix.to_string(), scalar(other))),
    }
}

fn scalar(v: &Value) -> String {
    match v {
        Value::Number(n) => n.as_f64().map_or_else(|| n.to_string(), num),
        Value::String(s) => s.clone(),
        other => other.to_string(),
    }
}

/// The material of a crystal element of the answer's scenario, in words.
fn medium_words(el: &Value) -> String {
    match (el.get("material").and_then(Value::as_str), el.get("no"), el.get("ne")) {
        (Some(m), _, _) => m.to_string(),
        (None, Some(no), Some(ne)) => format!(
            "custom crystal, n_o {}, n_e {}",
            no.as_f64().map_or_else(String::new, num),
            ne.as_f64().map_or_else(String::new, num)
        ),
        _ if el.get("nz").is_some() => {
            let n = |k: &str| el.get(k).and_then(Value::as_f64).map_or_else(String::new, num);
            format!(
                "custom biaxial crystal, n_x {}, n_y {}, n_z {}",
                n("nx"),
                n("ny"),
                n("nz")
            )
        }
        _ => "—".into(),
    }
}

fn axis_words(el: &Value) -> String {
    let tilt = el.pointer("/axis/tilt_deg").and_then(Value::as_f64).unwrap_or(f64::NAN);
    let az = el.pointer("/axis/azimuth_deg").and_then(Value::as_f64).unwrap_or(0.0);
    if (tilt - 90.0).abs() < 1e-12 {
        format!("optic axis in the faces, at {} ° from x", num(az))
    } else {
        format!(
            "optic axis {} ° from the face normal, toward {} ° from x",
            num(tilt),
            num(az)
        )
    }
}

/// "n1 to n2 unit" for the smallest and largest of a list of numbers at `path`.
fn span(r: &mut Report, path: &str, unit: &str) -> Option<String> {
    let xs: Vec<f64> = r.at(path)?.as_array()?.iter().filter_map(Value::as_f64).collect();
    let lo = xs.iter().copied().fold(f64::INFINITY, f64::min);
    let hi = xs.iter().copied().fold(f64::NEG_INFINITY, f64::max);
    xs.first().map(|_| format!("{} to {} {unit}", num(lo), num(hi)))
}

fn range_of(curve: Option<&Value>) -> Option<(f64, f64, f64, f64)> {
    let pts: Vec<(f64, f64)> = curve?
        .as_array()?
        .iter()
        .filter_map(|p| Some((p.get(0)?.as_f64()?, p.get(1)?.as_f64()?)))
        .collect();
    let (first, last) = (pts.first()?.0, pts.last()?.0);
    let lo = pts.iter().map(|p| p.1).fold(f64::INFINITY, f64::min);
    let hi = pts.iter().map(|p| p.1).fold(f64::NEG_INFINITY, f64::max);
    Some((first, last, lo, hi))
}

/// A beam displacer's report: what to order, then its performance and tolerances.
fn displacer(r: &mut Report) {
    let material = r
        .s("material")
        .filter(|m| m != "custom")
        .unwrap_or_else(|| "custom crystal".into());
    let wl = r.f("wavelength_nm").map_or_else(String::new, num);
    r.title(&format!("Beam displacer · {material} · {wl} nm"));
    r.section("What to order");
    r.line("part", "beam displacer, one plate, faces parallel");
    let el = r.v.pointer("/scenario/elements/0").cloned().unwrap_or(Value::Null);
    r.line("material", medium_words(&el));
    r.quantity("length along the beam", "length_mm", "mm");
    if let (Some(t), Some(plane)) = (r.f("cut_tilt_deg"), r.s("plane")) {
        let letters: Vec<char> = plane.chars().collect();
        let normal = ['x', 'y', 'z']
            .into_iter()
            .find(|c| !letters.contains(c))
            .unwrap_or('?');
        r.line(
            "cut",
            format!(
                "in the {plane} principal plane: principal {} {} ° from the face normal, toward x; principal {normal} along y",
                letters.get(1).copied().unwrap_or('?'),
                num(t)
            ),
        );
    } else if let Some(t) = r.f("cut_tilt_deg") {
        let az = el.pointer("/axis/azimuth_deg").and_then(Value::as_f64).unwrap_or(0.0);
        r.line(
            "cut",
            format!(
                "optic axis {} ° from the face normal, in the plane at {} ° from x",
                num(t),
                num(az)
            ),
        );
    }
    r.quantity("clear aperture", "clear_aperture_mm", "mm diameter");
    displacer_performance(r);
    displacer_tolerances(r);
    r.notes(&["cut_note"]);
}

/// A displacer's performance: indices, separation and walk-off, and how clean the two beams are.
fn displacer_performance(r: &mut Report) {
    r.section("Performance");
    r.quantity("wavelength", "wavelength_nm", "nm");
    let plane: Option<Vec<char>> = r.s("plane").map(|p| p.chars().collect());
    if let Some(p) = &plane {
        principal_indices(r);
        r.quantity(&format!("in-plane index n_{}", p[0]), "no", "");
        r.quantity(&format!("in-plane index n_{}", p[1]), "ne", "");
        r.quantity("index of the straight mode", "straight_index", "");
    } else {
        r.quantity("index n_o", "no", "");
        r.quantity("index n_e", "ne", "");
    }
    if let Some(s) = r.f("separation_mm") {
        let walker = if plane.is_some() { "in-plane ray" } else { "e-ray" };
        let dir = r
            .s("displacement_direction")
            .map(|d| format!(", {walker} toward {d}"))
            .unwrap_or_default();
        r.line("separation", format!("{} mm{dir}", num(s)));
    }
    r.quantity("walk-off angle", "walkoff_deg", "°");
    r.quantity("cut of maximum walk-off", "max_walkoff_cut_deg", "°");
    if let (Some(a), Some(b), Some(lo), Some(hi)) = (
        r.f("band.min_at_nm"),
        r.f("band.max_at_nm"),
        r.f("band.min_mm"),
        r.f("band.max_mm"),
    ) && a != b
    {
        r.line(
            "separation over the band",
            format!("{} mm at {} nm to {} mm at {} nm", num(lo), num(a), num(hi), num(b)),
        );
    }
    r.quantity("separation / beam", "clearance_ratio", "(ratio)");
    r.quantity("crosstalk", "crosstalk", "(power overlap of the beams)");
    r.quantity("clipping per beam", "clipping_per_beam", "(power outside the aperture)");
    let (phase, delay) = match plane {
        Some(_) => ("f–s phase at the exit", "group delay, s after f"),
        None => ("o–e phase at the exit", "group delay, e after o"),
    };
    r.quantity(phase, "exit_phase_rad", "rad");
    r.quantity("  the same, modulo 2π", "exit_phase_mod_2pi_rad", "rad");
    r.quantity(delay, "group_delay_ps", "ps");
    r.group_indices();
}

/// A biaxial design's principal indices at the design wavelength, on one line.
fn principal_indices(r: &mut Report) {
    let n: Vec<String> = (0..3)
        .filter_map(|k| r.f(&format!("principal_indices.{k}")).map(num))
        .collect();
    if let [x, y, z] = n.as_slice() {
        r.line("principal indices", format!("n_x {x}, n_y {y}, n_z {z}"));
    }
}

/// A displacer's tolerances: the separation's sensitivities, the errors assumed and the spread
/// they give, linear and by Monte Carlo.
fn displacer_tolerances(r: &mut Report) {
    r.section("Tolerances");
    r.quantity("separation per cut error", "sensitivities.tilt_mm_per_deg", "mm/°");
    r.quantity(
        "  second order",
        "sensitivities.tilt_second_order_mm_per_deg2",
        "mm/°² (times the error squared)",
    );
    r.quantity("  walk-off per cut error", "walkoff_slope", "°/°");
    r.quantity(
        "    second order",
        "walkoff_second_order_per_deg2",
        "°/°² (times the error squared)",
    );
    r.quantity("separation per incidence", "sensitivities.incidence_mm_per_deg", "mm/°");
    r.quantity("separation per length", "sensitivities.thickness_mm_per_mm", "mm/mm");
    r.quantity(
        "separation per wavelength",
        "sensitivities.wavelength_mm_per_nm",
        "mm/nm",
    );
    let tol: Vec<String> = [
        ("tolerances.tilt_deg", "° cut"),
        ("tolerances.incidence_deg", "° incidence"),
        ("tolerances.thickness_mm", "mm length"),
        ("tolerances.wavelength_nm", "nm wavelength"),
    ]
    .iter()
    .filter_map(|(p, u)| r.f(p).map(|x| format!("{} {u}", num(x))))
    .collect();
    if !tol.is_empty() {
        r.line("errors assumed (1 σ)", tol.join(", "));
    }
    r.quantity("separation spread, linear", "sensitivities.linear_std_mm", "mm (1 σ)");
    if let Some(n) = r.f("monte_carlo.n") {
        r.line("Monte Carlo", format!("{} samples", num(n)));
        r.quantity("  mean", "monte_carlo.mean", "mm");
        r.quantity("  standard deviation", "monte_carlo.std", "mm");
        if let (Some(a), Some(b)) = (r.f("monte_carlo.p5"), r.f("monte_carlo.p95")) {
            r.line("  5 % to 95 %", format!("{} mm to {} mm", num(a), num(b)));
        }
        if let (Some(a), Some(b)) = (r.f("monte_carlo.min"), r.f("monte_carlo.max")) {
            r.line("  smallest to largest", format!("{} mm to {} mm", num(a), num(b)));
        }
    }
}

/// One line per plate of `plates`: its crystal (when `material`), thickness, optic-axis azimuth
/// and its retardance in waves `where_` (at the centre wavelength, say).
fn plate_lines(r: &mut Report, material: bool, where_: &str) {
    let n = plate_count(r);
    for i in 0..n {
        let m = if material {
            format!("{}, ", plate_material(r, i))
        } else {
            String::new()
        };
        let t = r.f(&format!("plates.{i}.thickness_mm")).map_or_else(String::new, num);
        let a = r
            .f(&format!("plates.{i}.axis_azimuth_deg"))
            .map_or_else(String::new, num);
        let w = r
            .f(&format!("plates.{i}.retardance_waves"))
            .map_or_else(String::new, num);
        let axis = plate_axis_words(r, i, &a);
        r.line(
            &format!("plate {}", i + 1),
            format!("{m}{t} mm, {axis}, {w} waves {where_}"),
        );
    }
}

/// Plate `i`'s orientation in words, its azimuth `a` in degrees: a biaxial plate's cut (its own
/// `plates.i.cut`, or the answer's one `cut`) and slow axis, or a uniaxial plate's optic axis in
/// the faces.
fn plate_axis_words(r: &mut Report, i: usize, a: &str) -> String {
    match r.s(&format!("plates.{i}.cut")).or_else(|| r.s("cut")) {
        Some(c) => format!("{c}-cut (light along principal {c}), slow axis at {a} ° from x"),
        None => format!("optic axis in the faces at {a} ° from x"),
    }
}

/// The cuts of the biaxial plates that carry their own (a two-crystal pair's, a broadband
/// retarder's): a line of principal indices for each crystal, once, and the paths of their cut
/// notes, each text once, for [`Report::notes`].
fn plate_cuts(r: &mut Report) -> Vec<String> {
    let (mut crystals, mut notes, mut paths) = (Vec::new(), Vec::new(), Vec::new());
    for i in 0..plate_count(r) {
        let Some(note) = r.s(&format!("plates.{i}.cut_note")) else {
            continue;
        };
        let m = plate_material(r, i);
        let n: Vec<String> = (0..3)
            .filter_map(|k| r.f(&format!("plates.{i}.principal_indices.{k}")).map(num))
            .collect();
        r.used.insert(format!("plates.{i}.principal_indices"));
        if let [x, y, z] = n.as_slice()
            && !crystals.contains(&m)
        {
            r.line("principal indices", format!("{m}: n_x {x}, n_y {y}, n_z {z}"));
            crystals.push(m);
        }
        if !notes.contains(&note) {
            notes.push(note);
            paths.push(format!("plates.{i}.cut_note"));
        }
    }
    paths
}

/// How many plates the answer's `plates` lists.
fn plate_count(r: &Report) -> usize {
    r.v.get("plates").and_then(Value::as_array).map_or(0, Vec::len)
}

/// Plate `i`'s catalogue key, or "custom crystal" for one given by its indices.
fn plate_material(r: &mut Report, i: usize) -> String {
    match r.s(&format!("plates.{i}.material")) {
        Some(m) if m != "custom" => m,
        _ => "custom crystal".into(),
    }
}

fn plates(r: &mut Report) {
    let n = r.v.get("plates").and_then(Value::as_array).map_or(0, Vec::len);
    for i in 0..n {
        let label = if n == 1 {
            "plate".to_string()
        } else {
            format!("plate {}", i + 1)
        };
        let m = plate_material(r, i);
        let t = r.f(&format!("plates.{i}.thickness_mm")).map_or_else(String::new, num);
        let a = r
            .f(&format!("plates.{i}.axis_azimuth_deg"))
            .map_or_else(String::new, num);
        let axis = plate_axis_words(r, i, &a);
        r.line(&label, format!("{m}, {t} mm thick, {axis}"));
    }
}

/// A waveplate's report: what to order, its performance, and its tolerances.
fn waveplate(r: &mut Report) {
    let material = plate_material(r, 0);
    let order = r.s("order").unwrap_or_default();
    let ret = r.f("retardance_waves").map_or_else(String::new, |x| num(x.abs()));
    let wl = r.f("wavelength_nm").map_or_else(String::new, num);
    r.title(&format!(
        "Waveplate · {material} · {ret} waves at {wl} nm · {order} order"
    ));
    r.section("What to order");
    let part = match (order.as_str(), r.f("order_number")) {
        ("multiple", Some(m)) => format!("multiple-order waveplate, order {}", num(m)),
        ("compound", _) => "compound zero-order waveplate: two plates, axes crossed".to_string(),
        (o, _) => format!("{o}-order waveplate"),
    };
    r.line("part", part);
    plates(r);
    r.line("aperture", "as the beam needs (not set by this design)");

    r.section("Performance");
    r.quantity("wavelength", "wavelength_nm", "nm");
    r.quantity("retardance", "retardance_waves", "waves");
    if r.s("cut").is_some() {
        principal_indices(r);
        r.quantity("index of the fast axis", "no", "");
        r.quantity("index of the slow axis", "ne", "");
        r.quantity("birefringence n_slow − n_fast", "birefringence", "");
    } else {
        r.quantity("index n_o", "no", "");
        r.quantity("index n_e", "ne", "");
        r.quantity("birefringence n_e − n_o", "birefringence", "");
    }
    r.quantity("net retarding thickness", "effective_thickness_mm", "mm");
    r.text_line("fast axis", "fast_axis");
    let delay = if r.s("cut").is_some() {
        "group delay, s after f"
    } else {
        "group delay, e after o"
    };
    r.quantity(delay, "group_delay_ps", "ps");
    r.group_indices();
    if let Some((a, b, lo, hi)) = range_of(r.v.get("wavelength_curve")) {
        r.line(
            "retardance over the band",
            format!("{} to {} waves, {} nm to {} nm", num(lo), num(hi), num(a), num(b)),
        );
    }
    waveplate_tolerances(r);
    r.notes(&["cut_note"]);
}

/// A waveplate's tolerances: its acceptance angle, in each plane of incidence, and its
/// retardance per thickness.
fn waveplate_tolerances(r: &mut Report) {
    r.section("Tolerances");
    let err = r.f("acceptance_error_waves").map_or_else(String::new, num);
    let max = r.f("max_incidence_deg");
    let planes =
        r.v.get("angular")
            .and_then(Value::as_array)
            .cloned()
            .unwrap_or_default();
    if let Some(acc) = r.f("acceptance_deg") {
        // The answer flags a figure that is only a bound (the curve never left the error band).
        let ge = if r.s("acceptance_bound").as_deref() == Some("at_least") {
            "≥ "
        } else {
            ""
        };
        r.line(
            "acceptance angle",
            format!("{ge}{} ° (smallest over the planes of incidence)", num(acc)),
        );
    }
    for p in &planes {
        let plane = p
            .get("plane_azimuth_deg")
            .and_then(Value::as_f64)
            .map_or_else(String::new, num);
        let acc = p
            .get("acceptance_deg")
            .and_then(Value::as_f64)
            .map_or_else(String::new, num);
        let bound = if p.get("acceptance_bound").and_then(Value::as_str) == Some("at_least") {
            "≥ "
        } else {
            ""
        };
        r.line(&format!("  in the plane at {plane} °"), format!("{bound}{acc} °"));
    }
    let from = if r.s("cut").is_some() {
        "slow axis"
    } else {
        "optic axis"
    };
    r.line(
        "acceptance means",
        format!("retardance within ±{err} waves of its value at normal incidence; planes measured from the {from}"),
    );
    if let Some(m) = max {
        r.line("incidence checked", format!("up to {} °", num(m)));
    }
    // dΓ/dL = Δn/λ: the thickness tolerance to ask for follows from the retardance one.
    if let (Some(dn), Some(wl)) = (r.f("birefringence"), r.f("wavelength_nm")) {
        r.line(
            "retardance per thickness",
            format!("{} waves/µm (Δn/λ, for each plate)", num(dn.abs() / (wl * 1e-3))),
        );
    }
    waveplate_temperature(r, &err);
}

/// A waveplate's retardance per kelvin and the temperature band that keeps it within the
/// acceptance error (an edge at the contract's limit is marked as reaching at least that far).
fn waveplate_temperature(r: &mut Report, err: &str) {
    temperature_lines(r, err, "temperature", "");
}

/// The lines of one temperature sensitivity at `path` (`temperature`, `single_plate.temperature`),
/// their labels prefixed by `who`.
fn temperature_lines(r: &mut Report, err: &str, path: &str, who: &str) {
    // The common per-kelvin form repeats the line below.
    r.used.insert(format!("{path}.per_kelvin.retardance_waves"));
    r.used.insert(format!("{path}.step_k"));
    let t0 = r
        .f(&format!("{path}.design_temperature_c"))
        .map_or_else(String::new, num);
    if let (Some(k), Some(rel)) = (
        r.f(&format!("{path}.retardance_per_kelvin_waves")),
        r.f(&format!("{path}.relative_per_kelvin")),
    ) {
        r.line(
            &format!("{who}retardance per kelvin"),
            format!("{} waves/K ((1/Γ) dΓ/dT = {} /K, at {t0} °C)", num(k), num(rel)),
        );
    }
    let (Some(band), Some(bounds)) = (r.at(&format!("{path}.band_c")), r.at(&format!("{path}.band_bound"))) else {
        return;
    };
    let edge = |i: usize, open_mark: &str| {
        let t = band.get(i)?.as_f64()?;
        let mark = if bounds.get(i)?.as_str() == Some("at_least") {
            open_mark
        } else {
            ""
        };
        Some(format!("{mark}{} °C", num(t)))
    };
    if let (Some(lo), Some(hi)) = (edge(0, "≤ "), edge(1, "≥ ")) {
        r.line(
            &format!("{who}temperature band"),
            format!("{lo} to {hi}: retardance within ±{err} waves of its value at {t0} °C"),
        );
    }
}

/// An athermal pair's report: the plates, the retardance and its temperature behaviour, against
/// a zero-order plate of the first crystal alone.
fn athermal(r: &mut Report) {
    let (a, b) = (plate_material(r, 0), plate_material(r, 1));
    r.title(&format!("Athermal waveplate · {a} and {b}"));
    r.section("What to order");
    r.line(
        "part",
        "athermal waveplate: two plates of different crystals, in contact",
    );
    plates(r);
    r.line("aperture", "as the beam needs (not set by this design)");
    r.section("Performance");
    r.quantity("wavelength", "wavelength_nm", "nm");
    let t0 = r
        .f("temperature.design_temperature_c")
        .unwrap_or(doublespar::REFERENCE_C);
    r.quantity(
        &format!("retardance at {} °C", num(t0)),
        "retardance_waves",
        "waves (positive: the first plate's axis is slow)",
    );
    r.quantity("curvature d²Γ/dT²", "curvature_waves_per_k2", "waves/K²");
    let cut_notes = plate_cuts(r);
    if let Some((lo_t, hi_t, lo, hi)) = range_of(r.v.get("temperature_curve")) {
        r.line(
            "retardance over temperature",
            format!("{} to {} waves, {} °C to {} °C", num(lo), num(hi), num(lo_t), num(hi_t)),
        );
    }
    r.section("Tolerances");
    let err = r.f("acceptance_error_waves").map_or_else(String::new, num);
    temperature_lines(r, &err, "temperature", "");
    let single = r.f("single_plate.thickness_mm").map_or_else(String::new, num);
    let alone = r.s("single_plate.material").unwrap_or(a.clone());
    r.line(
        "compared with",
        format!("a zero-order plate of {alone} alone, {single} mm"),
    );
    temperature_lines(r, &err, "single_plate.temperature", "  alone: ");
    r.notes(&cut_notes.iter().map(String::as_str).collect::<Vec<_>>());
}

fn achromat(r: &mut Report) {
    let (a, b) = (plate_material(r, 0), plate_material(r, 1));
    r.title(&format!("Achromatic waveplate · {a} and {b}"));
    r.section("What to order");
    r.line(
        "part",
        "achromatic waveplate: two plates of different crystals, in contact",
    );
    plates(r);
    r.line("aperture", "as the beam needs (not set by this design)");

    r.section("Performance");
    let cut_notes = plate_cuts(r);
    let n =
        r.v.get("at_design_wavelengths")
            .and_then(Value::as_array)
            .map_or(0, Vec::len);
    for i in 0..n {
        if let (Some(w), Some(g)) = (
            r.f(&format!("at_design_wavelengths.{i}.0")),
            r.f(&format!("at_design_wavelengths.{i}.1")),
        ) {
            r.line(&format!("retardance at {} nm", num(w)), format!("{} waves", num(g)));
        }
    }
    if let Some((lo_nm, hi_nm, lo, hi)) = range_of(r.v.get("wavelength_curve")) {
        r.line(
            "retardance over the band",
            format!(
                "{} to {} waves, {} nm to {} nm",
                num(lo),
                num(hi),
                num(lo_nm),
                num(hi_nm)
            ),
        );
    }

    r.section("Tolerances");
    r.quantity("largest error over the band", "max_error_waves", "waves");
    r.notes(&cut_notes.iter().map(String::as_str).collect::<Vec<_>>());
}

/// A recombiner check's report: the parts, whether the beams recombine, and the mismatches it
/// tolerates.
fn recombiner(r: &mut Report) {
    let els =
        r.v.pointer("/scenario/elements")
            .and_then(Value::as_array)
            .cloned()
            .unwrap_or_default();
    let crystals: Vec<&Value> = els
        .iter()
        .filter(|e| e.get("kind").and_then(Value::as_str) == Some("crystal"))
        .collect();
    let middle = els
        .iter()
        .find(|e| e.get("kind").and_then(Value::as_str) != Some("crystal"));
    let material = crystals
        .first()
        .and_then(|e| e.get("material"))
        .and_then(Value::as_str)
        .unwrap_or("custom crystal")
        .to_string();
    let wl =
        r.v.pointer("/scenario/wavelength_nm")
            .and_then(Value::as_f64)
            .map_or_else(String::new, num);
    r.title(&format!("Recombiner check · {material} · {wl} nm"));
    r.section("What to order");
    r.line("part", "two beam displacers with a polarization swap between them");
    recombiner_displacers(r, &crystals);
    if let Some(m) = middle {
        r.line("between them", middle_words(m));
    }
    if let Some(d) = r.v.pointer("/scenario/beam/diameter_mm").and_then(Value::as_f64) {
        r.line("beam", format!("{} mm diameter", num(d)));
    }
    recombiner_performance(r);
    recombiner_tolerances(r);
    r.notes(&[]);
}

/// One line per displacer of a recombiner: medium, length (a mismatch said apart) and axis.
fn recombiner_displacers(r: &mut Report, crystals: &[&Value]) {
    let first_length = crystals
        .first()
        .and_then(|c| c.get("thickness_mm"))
        .and_then(Value::as_f64);
    for (i, c) in crystals.iter().enumerate() {
        let l = c.get("thickness_mm").and_then(Value::as_f64);
        // A mismatch of micrometres hides in 4 digits of the length: say it apart.
        let diff = match (i, l, first_length) {
            (1.., Some(l), Some(l0)) if l != l0 => {
                let d = l - l0;
                let sign = if d > 0.0 { "+" } else { "" };
                format!(" ({sign}{} mm against displacer 1)", num(d))
            }
            _ => String::new(),
        };
        let t = l.map_or_else(String::new, num);
        r.line(
            &format!("displacer {}", i + 1),
            format!("{}, {t} mm long{diff}, {}", medium_words(c), axis_words(c)),
        );
    }
}

/// The words for the element between a recombiner's displacers.
fn middle_words(m: &Value) -> String {
    match m.get("kind").and_then(Value::as_str) {
        Some("retarder") => format!(
            "half-wave plate, fast axis at {} ° from x",
            m.get("fast_axis_deg")
                .and_then(Value::as_f64)
                .map_or_else(String::new, num)
        ),
        Some("rotator") => format!(
            "polarization rotator by {} °",
            m.get("angle_deg").and_then(Value::as_f64).map_or_else(String::new, num)
        ),
        Some(other) => other.to_string(),
        None => String::new(),
    }
}

/// A recombiner's performance: the verdict, the overlap and phase of the two beams, the power
/// where it should be and elsewhere.
fn recombiner_performance(r: &mut Report) {
    r.section("Performance");
    r.text_line("verdict", "verdict");
    if let Some(b) = r.at("recombined").and_then(Value::as_bool) {
        r.line("one spot", if b { "yes" } else { "no" });
    }
    r.quantity("overlap of the two beams", "overlap", "(1 = perfect)");
    r.quantity("phase difference", "phase_difference_rad", "rad");
    r.quantity("power recombined", "recombined_power", "(of the input)");
    r.quantity("power elsewhere", "stray_power", "(of the input)");
    r.quantity("residual separation", "residual_separation_mm", "mm");
    if let (Some(x), Some(y)) = (r.f("residual_vector_mm.0"), r.f("residual_vector_mm.1")) {
        r.line("  as (x, y)", format!("({}, {}) mm", num(x), num(y)));
    }
    r.used.insert("broken".into());
}

/// A recombiner's tolerances: the second displacer's length and cut mismatches, per unit and
/// where they break the recombination.
fn recombiner_tolerances(r: &mut Report) {
    r.section("Tolerances (second displacer against the first)");
    let pair = |r: &mut Report, label: &str, path: &str, units: [&str; 2]| {
        if let (Some(a), Some(b)) = (r.f(&format!("{path}.0")), r.f(&format!("{path}.1"))) {
            r.line(label, format!("{} {}, phase {} {}", num(a), units[0], num(b), units[1]));
        }
    };
    pair(
        r,
        "per length mismatch",
        "length_sensitivity",
        ["mm/mm offset", "rad/mm"],
    );
    pair(r, "per cut mismatch", "tilt_sensitivity", ["mm/° offset", "rad/°"]);
    let breaks = |r: &mut Report, label: &str, path: &str, unit: &str, limit: &str| {
        let words = |x: Option<f64>| x.map_or_else(|| format!("not within {limit}"), |v| format!("{} {unit}", num(v)));
        let (a, b) = (r.f(&format!("{path}.0")), r.f(&format!("{path}.1")));
        r.line(label, format!("overlap at {}, phase at {}", words(a), words(b)));
    };
    breaks(
        r,
        "length mismatch that breaks",
        "length_mismatch_to_break_mm",
        "mm",
        "± the length",
    );
    breaks(
        r,
        "cut mismatch that breaks",
        "tilt_mismatch_to_break_deg",
        "°",
        "±10 °",
    );
    r.line(
        "breaks means",
        format!(
            "overlap below {}, or phase off by more than {} rad (π/10)",
            num(MIN_OVERLAP),
            num(MAX_PHASE_ERROR)
        ),
    );
}

/// The report of a design answer (any kind).
pub fn render(answer: &Value) -> String {
    let mut r = Report::new(answer);
    match answer.get("kind").and_then(Value::as_str) {
        Some("displacer") => displacer(&mut r),
        Some("waveplate") => waveplate(&mut r),
        Some("achromat") => achromat(&mut r),
        Some("recombiner") => recombiner(&mut r),
        Some("angular-splitter") => prisms::splitter(&mut r),
        Some("prism-polarizer") => prisms::polarizer(&mut r),
        Some("tilt-tuning") => prisms::tilt(&mut r),
        Some("quartz-rotator") => rotator::rotator(&mut r),
        Some("athermal-waveplate") => athermal(&mut r),
        Some("birefringent-filter") => filter::filter(&mut r),
        Some("broadband-retarder") => broadband::broadband(&mut r),
        _ => r.title("Design"),
    }
    r.others();
    r.out
        .push_str("\nEvery figure at full precision: the same command without --table (JSON).\n");
    r.out
}
