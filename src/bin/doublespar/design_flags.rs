//! Design requests written as flags: `doublespar design displacer --material yvo4
//! --wavelength-nm 1064 --separation-mm 1`.
//!
//! Each flag stands for one field of the JSON request (DEVELOPERS.md, "Design requests"); the
//! flags build exactly the document a person would write, which then goes through the same
//! solver, so the two forms give byte-identical answers. Numbers are read as JSON reads them
//! (`1` stays the integer 1, `1e308` a double), with Rust's float syntax as a fallback
//! (`.5`, `+2`). A value that cannot be read is an error on the request field that names the flag
//! too; so is any error the solver finds in a field that came from a flag.

use crate::args::{Parsed, Usage, quote};
use doublespar::Error;
use serde_json::{Map, Number, Value};

/// How a flag's value becomes JSON.
#[derive(Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// A number.
    Number,
    /// A word (a material key, an order, a middle element).
    Text,
    /// Two numbers, `A,B`.
    Pair,
}

/// One flag: its name (without dashes), the request path it fills, how it is read and what it
/// means.
#[derive(Clone, Copy)]
pub struct Flag {
    /// Name after `--`.
    pub name: &'static str,
    /// Path in the request, `.` between names.
    pub path: &'static str,
    /// How the value is read.
    pub kind: Kind,
    /// One line of help, with unit and default.
    pub help: &'static str,
}

const fn flag(name: &'static str, path: &'static str, kind: Kind, help: &'static str) -> Flag {
    Flag { name, path, kind, help }
}

use Kind::{Number as N, Pair as P, Text as T};

const MEDIUM_HELP: [Flag; 3] = [
    flag(
        "material",
        "material",
        T,
        "catalogue key, any case (see doublespar materials)",
    ),
    flag("no", "no", N, "ordinary index, instead of --material (with --ne)"),
    flag("ne", "ne", N, "extraordinary index, instead of --material (with --no)"),
];

/// A biaxial crystal's principal indices, instead of `--material` (design requests that take
/// biaxial crystals).
const PRINCIPAL_HELP: [Flag; 3] = [
    flag(
        "nx",
        "nx",
        N,
        "principal index n_x, instead of --material (with --ny, --nz)",
    ),
    flag(
        "ny",
        "ny",
        N,
        "principal index n_y, instead of --material (with --nx, --nz)",
    ),
    flag(
        "nz",
        "nz",
        N,
        "principal index n_z, instead of --material (with --nx, --ny)",
    ),
];

const DESIGN_WAVELENGTH: Flag = flag("wavelength-nm", "wavelength_nm", N, "design wavelength, nm [632.8]");

/// The basis of every wavelength the request gives (DEVELOPERS.md, "Design requests").
const WAVELENGTH_IN: Flag = flag(
    "wavelength-in",
    "wavelength_in",
    T,
    "vacuum or air: the request's wavelengths are in vacuum or in standard air (Ciddor 1996) [vacuum]",
);

const DESIGN_TEMPERATURE: Flag = flag(
    "temperature-c",
    "temperature_c",
    N,
    "temperature the part works at, °C, −200 to 500 (thicknesses quoted at 20) [20]",
);

const TOL_INCIDENCE: Flag = flag(
    "tol-incidence-deg",
    "tolerances.incidence_deg",
    N,
    "incidence error, standard deviation, ° [0.1]",
);

const SEED: Flag = flag("seed", "seed", N, "Monte Carlo seed, a whole number [1]");

const DISPLACER: [Flag; 22] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    PRINCIPAL_HELP[0],
    PRINCIPAL_HELP[1],
    PRINCIPAL_HELP[2],
    flag(
        "plane",
        "plane",
        T,
        "biaxial crystal: principal plane holding the normal, xy, xz or yz [largest walk-off]",
    ),
    DESIGN_WAVELENGTH,
    flag(
        "band-nm",
        "band_nm",
        P,
        "band to check, SHORTEST,LONGEST in nm [the wavelength]",
    ),
    flag(
        "separation-mm",
        "separation_mm",
        N,
        "o–e separation wanted, mm (required)",
    ),
    flag("beam-diameter-mm", "beam_diameter_mm", N, "beam diameter, mm [1]"),
    flag(
        "cut-tilt-deg",
        "cut_tilt_deg",
        N,
        "optic axis from the face normal, ° [cut of maximum walk-off]",
    ),
    flag(
        "aperture-factor",
        "aperture_factor",
        N,
        "clear aperture = separation + factor × beam [2]",
    ),
    flag(
        "tol-tilt-deg",
        "tolerances.tilt_deg",
        N,
        "cut-angle error, standard deviation, ° [0.1]",
    ),
    TOL_INCIDENCE,
    flag(
        "tol-thickness-mm",
        "tolerances.thickness_mm",
        N,
        "length error, standard deviation, mm [0.05]",
    ),
    flag(
        "tol-wavelength-nm",
        "tolerances.wavelength_nm",
        N,
        "wavelength error, standard deviation, nm [0.5]",
    ),
    flag("samples", "samples", N, "Monte Carlo samples, 0 to 1000000 [100000]"),
    SEED,
    flag("bins", "bins", N, "histogram bins [40]"),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

/// A biaxial plate's principal axis along its normal (waveplate, tilt-tuning; every plate of a
/// birefringent filter or of a broadband retarder of one crystal).
const CUT: Flag = flag(
    "cut",
    "cut",
    T,
    "biaxial crystal: principal axis along the normal, x, y or z [largest birefringence]",
);

const WAVEPLATE: [Flag; 17] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    PRINCIPAL_HELP[0],
    PRINCIPAL_HELP[1],
    PRINCIPAL_HELP[2],
    CUT,
    DESIGN_WAVELENGTH,
    flag(
        "retardance-waves",
        "retardance_waves",
        N,
        "retardance wanted, waves (required)",
    ),
    flag("order", "order", T, "zero, multiple or compound [zero]"),
    flag(
        "order-number",
        "order_number",
        N,
        "whole waves added, with --order multiple [1]",
    ),
    flag(
        "base-mm",
        "base_mm",
        N,
        "thickness of the compensating plate, with --order compound, mm [1]",
    ),
    flag("band-nm", "band_nm", P, "band to plot, SHORTEST,LONGEST in nm [±20 %]"),
    flag(
        "max-incidence-deg",
        "max_incidence_deg",
        N,
        "largest incidence checked, ° [10]",
    ),
    flag(
        "acceptance-error-waves",
        "acceptance_error_waves",
        N,
        "retardance error that ends the acceptance, waves [0.01]",
    ),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const ACHROMAT: [Flag; 13] = [
    flag("first-material", "first.material", T, "first plate's catalogue key"),
    flag(
        "first-no",
        "first.no",
        N,
        "first plate's ordinary index, instead of a material",
    ),
    flag(
        "first-ne",
        "first.ne",
        N,
        "first plate's extraordinary index, instead of a material",
    ),
    flag(
        "first-cut",
        "first.cut",
        T,
        "first plate (biaxial): principal axis along its normal, x, y or z [largest Δn]",
    ),
    flag("second-material", "second.material", T, "second plate's catalogue key"),
    flag(
        "second-no",
        "second.no",
        N,
        "second plate's ordinary index, instead of a material",
    ),
    flag(
        "second-ne",
        "second.ne",
        N,
        "second plate's extraordinary index, instead of a material",
    ),
    flag(
        "second-cut",
        "second.cut",
        T,
        "second plate (biaxial): principal axis along its normal, x, y or z [largest Δn]",
    ),
    flag(
        "retardance-waves",
        "retardance_waves",
        N,
        "retardance wanted, waves (required)",
    ),
    flag(
        "wavelengths-nm",
        "wavelengths_nm",
        P,
        "the two wavelengths made exact, A,B in nm (required)",
    ),
    flag("band-nm", "band_nm", P, "band to plot, SHORTEST,LONGEST in nm"),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const ATHERMAL: [Flag; 13] = [
    ACHROMAT[0],
    ACHROMAT[1],
    ACHROMAT[2],
    ACHROMAT[3],
    ACHROMAT[4],
    ACHROMAT[5],
    ACHROMAT[6],
    ACHROMAT[7],
    ACHROMAT[8],
    flag("wavelength-nm", "wavelength_nm", N, "design wavelength, nm [632.8]"),
    flag(
        "acceptance-error-waves",
        "acceptance_error_waves",
        N,
        "retardance error that bounds the temperature band, waves [0.01]",
    ),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const LC_VOLTAGE: [Flag; 11] = [
    flag("thickness-um", "thickness_um", N, "cell gap, µm (required)"),
    flag("lc", "lc", T, "nematic, a catalogue key: 5cb (required)"),
    flag(
        "rubbing-azimuth-deg",
        "rubbing_azimuth_deg",
        N,
        "director azimuth at the entrance, ° [0]",
    ),
    flag("twist-deg", "twist_deg", N, "twist from entrance to exit, ° [0]"),
    flag("pretilt-deg", "pretilt_deg", N, "pretilt at both faces, ° [2]"),
    DESIGN_WAVELENGTH,
    flag(
        "retardance-waves",
        "retardance_waves",
        N,
        "retardance wanted, waves (required)",
    ),
    flag(
        "retardance-range-waves",
        "retardance_range_waves",
        P,
        "range LOW,HIGH in waves the thinnest cell must span [none]",
    ),
    flag("max-voltage-v", "max_voltage_v", N, "highest RMS drive voltage, V [20]"),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const RECOMBINER: [Flag; 13] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    flag("wavelength-nm", "wavelength_nm", N, "wavelength, nm [632.8]"),
    flag("length-mm", "length_mm", N, "length of each displacer, mm (required)"),
    flag(
        "cut-tilt-deg",
        "cut_tilt_deg",
        N,
        "optic axis from the face normal, ° [cut of maximum walk-off]",
    ),
    flag("beam-diameter-mm", "beam_diameter_mm", N, "beam diameter, mm [1]"),
    flag("middle", "middle", T, "half-wave or rotator [half-wave]"),
    flag(
        "rotator-deg",
        "rotator_deg",
        N,
        "rotation of the middle rotator, ° [90]",
    ),
    flag(
        "length-mismatch-mm",
        "length_mismatch_mm",
        N,
        "second displacer longer by, mm [0]",
    ),
    flag(
        "tilt-mismatch-deg",
        "tilt_mismatch_deg",
        N,
        "second displacer's cut off by, ° [0]",
    ),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const SPLITTER: [Flag; 15] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    DESIGN_WAVELENGTH,
    flag(
        "band-nm",
        "band_nm",
        P,
        "band of the split curve, SHORTEST,LONGEST in nm [±10 %]",
    ),
    flag(
        "split-angle-deg",
        "split_angle_deg",
        N,
        "angle between the two beams, ° (required)",
    ),
    flag("aperture-mm", "aperture_mm", N, "clear aperture, mm [10]"),
    flag(
        "cement-index",
        "cement_index",
        N,
        "cement between the wedges [optical contact]",
    ),
    flag(
        "tol-wedge-deg",
        "tolerances.wedge_deg",
        N,
        "wedge-angle error, standard deviation, ° [0.05]",
    ),
    flag(
        "tol-axis-deg",
        "tolerances.axis_deg",
        N,
        "axis-orientation error per wedge, standard deviation, ° [0.5]",
    ),
    TOL_INCIDENCE,
    flag("samples", "samples", N, "Monte Carlo samples, 0 to 200000 [2000]"),
    SEED,
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const POLARIZER: [Flag; 8] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    DESIGN_WAVELENGTH,
    flag("cement-index", "cement_index", N, "cement in the gap [air]"),
    flag("aperture-mm", "aperture_mm", N, "clear aperture, mm [10]"),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const TILT: [Flag; 17] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    PRINCIPAL_HELP[0],
    PRINCIPAL_HELP[1],
    PRINCIPAL_HELP[2],
    CUT,
    flag("wavelength-nm", "wavelength_nm", N, "wavelength wanted, nm [632.8]"),
    flag(
        "retardance-waves",
        "retardance_waves",
        N,
        "target, waves modulo whole waves, 0 to 1 (required)",
    ),
    flag(
        "thickness-mm",
        "thickness_mm",
        N,
        "plate thickness, mm (or --order-number)",
    ),
    flag(
        "order-number",
        "order_number",
        N,
        "whole waves of a plate made for --made-for-nm",
    ),
    flag(
        "made-for-nm",
        "made_for_nm",
        N,
        "wavelength the plate was made for, nm [the wavelength]",
    ),
    flag(
        "axis-azimuth-deg",
        "axis_azimuth_deg",
        N,
        "optic axis (biaxial: slow axis) in the plate, ° from x [0]",
    ),
    flag(
        "tilt-azimuth-deg",
        "tilt_azimuth_deg",
        N,
        "plane of the mount tilt, ° from x [0]",
    ),
    flag("max-tilt-deg", "max_tilt_deg", N, "largest tilt searched, ° [30]"),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const ROTATOR: [Flag; 10] = [
    flag(
        "rotation-deg",
        "rotation_deg",
        N,
        "rotation, ° from x toward y (positive: a left-handed plate), up to ±3600 (required)",
    ),
    DESIGN_WAVELENGTH,
    flag(
        "band-nm",
        "band_nm",
        P,
        "band of the rotation curve, SHORTEST,LONGEST in nm [±10 %]",
    ),
    flag(
        "handedness",
        "handedness",
        T,
        "right or left: force one hand, reaching the rotation modulo 180° [the rotation's own]",
    ),
    flag(
        "min-thickness-mm",
        "min_thickness_mm",
        N,
        "thinnest plate accepted, mm [0]",
    ),
    flag(
        "rotation-tolerance-deg",
        "rotation_tolerance_deg",
        N,
        "rotation tolerance, ° (thickness tolerance, acceptance) [0.5]",
    ),
    flag(
        "ellipticity-tolerance-deg",
        "ellipticity_tolerance_deg",
        N,
        "ellipticity tolerance of the output, ° (acceptance) [0.5]",
    ),
    flag(
        "max-incidence-deg",
        "max_incidence_deg",
        N,
        "largest incidence searched, ° [10]",
    ),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const FILTER: [Flag; 14] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    PRINCIPAL_HELP[0],
    PRINCIPAL_HELP[1],
    PRINCIPAL_HELP[2],
    CUT,
    flag(
        "layout",
        "layout",
        T,
        "stage-doubling (plates d, 2d, 4d… between parallel polarizers) or folded (equal plates at ±45°/N between crossed ones) [stage-doubling]",
    ),
    flag(
        "stages",
        "stages",
        N,
        "number of plates: 1 to 8 stage-doubling, 2 to 10 folded [4 or 6]",
    ),
    flag("wavelength-nm", "wavelength_nm", N, "centre wavelength, nm [632.8]"),
    flag(
        "bandwidth-nm",
        "bandwidth_nm",
        N,
        "width of the pass band (full width at half maximum), nm (required)",
    ),
    flag(
        "band-nm",
        "band_nm",
        P,
        "band of the transmission curve, SHORTEST,LONGEST in nm [out to the neighbouring peaks]",
    ),
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

const BROADBAND: [Flag; 16] = [
    MEDIUM_HELP[0],
    MEDIUM_HELP[1],
    MEDIUM_HELP[2],
    PRINCIPAL_HELP[0],
    PRINCIPAL_HELP[1],
    PRINCIPAL_HELP[2],
    CUT,
    flag("plates", "plates", N, "number of plates of --material, 2 to 7 [3]"),
    flag(
        "retardance-waves",
        "retardance_waves",
        N,
        "target retardance, waves, above 0 and at most 0.5 (required)",
    ),
    flag("fast-axis-deg", "fast_axis_deg", N, "target fast axis, ° from x [0]"),
    flag(
        "band-nm",
        "band_nm",
        P,
        "band to hold the retardance over, SHORTEST,LONGEST in nm (required)",
    ),
    flag(
        "max-thickness-mm",
        "max_thickness_mm",
        N,
        "thickest plate searched, mm [two full waves of its crystal at the band's centre]",
    ),
    flag(
        "generations",
        "generations",
        N,
        "generations of the search, 10 to 5000 [1000]",
    ),
    SEED,
    WAVELENGTH_IN,
    DESIGN_TEMPERATURE,
];

/// The flags of a design kind, or `None` for an unknown kind.
pub fn flags_of(kind: &str) -> Option<&'static [Flag]> {
    match kind {
        "displacer" => Some(&DISPLACER),
        "waveplate" => Some(&WAVEPLATE),
        "achromat" => Some(&ACHROMAT),
        "recombiner" => Some(&RECOMBINER),
        "angular-splitter" => Some(&SPLITTER),
        "prism-polarizer" => Some(&POLARIZER),
        "tilt-tuning" => Some(&TILT),
        "quartz-rotator" => Some(&ROTATOR),
        "athermal-waveplate" => Some(&ATHERMAL),
        "birefringent-filter" => Some(&FILTER),
        "broadband-retarder" => Some(&BROADBAND),
        "lc-voltage" => Some(&LC_VOLTAGE),
        _ => None,
    }
}

/// The flag of `kind` called `--name`, if any.
pub fn find(kind: &str, name: &str) -> Option<&'static Flag> {
    let bare = name.strip_prefix("--")?;
    flags_of(kind)?.iter().find(|f| f.name == bare)
}

fn number(text: &str) -> Option<Number> {
    if let Ok(Value::Number(n)) = serde_json::from_str::<Value>(text.trim()) {
        return Some(n);
    }
    text.trim().parse::<f64>().ok().and_then(Number::from_f64)
}

fn bad_value(f: &Flag, text: &str, what: &str) -> Error {
    Error::new(
        f.path,
        format!(
            "'{}' is not {what} (flag --{}, request field {})",
            quote(text),
            f.name,
            f.path
        ),
    )
}

fn value_of(f: &Flag, text: &str) -> Result<Value, Error> {
    match f.kind {
        Kind::Text => Ok(Value::String(text.to_string())),
        Kind::Number => number(text)
            .map(Value::Number)
            .ok_or_else(|| bad_value(f, text, "a finite number")),
        Kind::Pair => {
            let parts: Vec<&str> = text.split(',').collect();
            match parts.as_slice() {
                [a, b] => match (number(a), number(b)) {
                    (Some(a), Some(b)) => Ok(Value::Array(vec![Value::Number(a), Value::Number(b)])),
                    _ => Err(bad_value(f, text, "two finite numbers A,B")),
                },
                _ => Err(bad_value(f, text, "two numbers separated by a comma, A,B")),
            }
        }
    }
}

/// The JSON request that the flags of `parsed` describe, for design `kind`.
///
/// # Errors
/// A value that cannot be read (an [`Error`] on its request field naming the flag); an unknown
/// kind or a flag that does not belong to the kind is a [`Usage`] error, as are positional words
/// after the kind.
pub fn request(kind: &str, parsed: &Parsed) -> Result<Result<Value, Error>, Usage> {
    let Some(flags) = flags_of(kind) else {
        return Err(Usage::new("design", format!("unknown design kind '{}'", quote(kind))));
    };
    if let Some(extra) = parsed.positionals.get(1) {
        return Err(Usage::new(
            "design",
            format!("unexpected word '{}' after the kind {kind}", quote(extra)),
        ));
    }
    let mut doc = Map::new();
    doc.insert("kind".into(), Value::String(kind.to_string()));
    for (name, value) in &parsed.flags {
        if name == "--table" {
            continue;
        }
        let Some(f) = flags.iter().find(|f| name.strip_prefix("--") == Some(f.name)) else {
            return Err(Usage::new(
                "design",
                format!("the flag '{}' is not a field of a {kind} request", quote(name)),
            ));
        };
        let v = match value_of(f, value.as_deref().unwrap_or_default()) {
            Ok(v) => v,
            Err(e) => return Ok(Err(e)),
        };
        insert(&mut doc, f.path, v);
    }
    Ok(Ok(Value::Object(doc)))
}

fn insert(doc: &mut Map<String, Value>, path: &str, v: Value) {
    match path.split_once('.') {
        None => {
            doc.insert(path.to_string(), v);
        }
        Some((head, rest)) => {
            let child = doc.entry(head.to_string()).or_insert_with(|| Value::Object(Map::new()));
            if let Value::Object(m) = child {
                insert(m, rest, v);
            }
        }
    }
}

/// A solver's error on a field that a flag filled, with the flag named in the message.
pub fn name_the_flag(kind: &str, parsed: &Parsed, mut e: Error) -> Error {
    let given = |f: &&Flag| parsed.has(&format!("--{}", f.name));
    let hit = flags_of(kind).and_then(|flags| {
        flags.iter().filter(given).find(|f| {
            e.field == f.path
                || e.field
                    .strip_prefix(f.path)
                    .is_some_and(|rest| rest.starts_with('[') || rest.starts_with('.'))
        })
    });
    if let Some(f) = hit {
        e.message = format!("{} (flag --{})", e.message, f.name);
    }
    e
}
