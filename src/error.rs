//! The one error type of Doublespar: a message and the input field it concerns.
//!
//! Every fallible entry point of the core returns [`Error`]. The `field` is a path into the
//! scenario document in the contract's own spelling (`elements[2].thickness_mm`,
//! `beam.polarization.azimuth_deg`), so that the command line can print it and the page can show
//! the message beside the control that holds the bad value. Functions below the scenario layer fill
//! in the leaf name; the scenario layer prefixes the path with [`Error::within`].

use crate::numfmt::quote;
use std::fmt;

/// An input that Doublespar cannot use, with the field that holds it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Error {
    /// Path of the offending field, e.g. `elements[0].axis.tilt_deg`; empty for the whole document.
    pub field: String,
    /// A sentence a person can act on, naming the value and the accepted range.
    pub message: String,
}

impl Error {
    /// An error about `field`.
    pub fn new(field: impl Into<String>, message: impl Into<String>) -> Self {
        Error {
            field: field.into(),
            message: message.into(),
        }
    }

    /// The same error seen from an enclosing object: `thickness_mm` within `elements[1]` becomes
    /// `elements[1].thickness_mm`.
    pub fn within(mut self, prefix: &str) -> Self {
        self.field = join_path(prefix, &self.field);
        self
    }

    /// The error as the contract sends it: `{"field": …, "message": …}`. The command line wraps
    /// it as `{"error": …}`; the page's bindings hand it over as it is.
    pub fn to_json(&self) -> serde_json::Value {
        serde_json::json!({"field": self.field, "message": self.message})
    }
}

/// Joins a field path and a child name with the contract's separators (`.` for names, none before
/// an index).
pub fn join_path(prefix: &str, child: &str) -> String {
    match (prefix.is_empty(), child.is_empty()) {
        (true, _) => child.to_string(),
        (_, true) => prefix.to_string(),
        _ if child.starts_with('[') => format!("{prefix}{child}"),
        _ => format!("{prefix}.{child}"),
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.field.is_empty() {
            write!(f, "{}", self.message)
        } else {
            write!(f, "{}: {}", self.field, self.message)
        }
    }
}

impl std::error::Error for Error {}

/// The unit a field's value is given in, as a message writes it after a number (` mm`, `°`;
/// a plain space, which JSON and terminals show as it is),
/// read from the contract's suffix of the field's last name (`band_nm[1]` counts as `band_nm`);
/// empty for a plain number.
pub fn unit_after(field: &str) -> &'static str {
    let name = field.trim_end_matches(|c: char| c == ']' || c == '[' || c.is_ascii_digit());
    let name = name.rsplit('.').next().unwrap_or(name);
    if name.ends_with("_mm") {
        " mm"
    } else if name.ends_with("_nm") {
        " nm"
    } else if name.ends_with("_deg") {
        "°"
    } else if name.ends_with("_waves") {
        " waves"
    } else {
        ""
    }
}

/// What a field wants, in words a person acts on (`a number in millimetres, such as 2.5`),
/// read from the contract's unit suffix of its last name.
pub fn number_wanted(field: &str) -> &'static str {
    match unit_after(field) {
        " mm" => "a number in millimetres, such as 2.5",
        " nm" => "a number in nanometres, such as 632.8",
        "°" => "a number in degrees, such as 45",
        " waves" => "a number of waves, such as 0.25",
        _ => "a number, such as 1.5",
    }
}

/// Checks that `value` is a finite number, naming `field` otherwise.
///
/// # Errors
/// When `value` is NaN or infinite.
pub fn finite(field: &str, value: f64) -> Result<f64, Error> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(Error::new(
            field,
            format!("enter {}, not {value}", number_wanted(field)),
        ))
    }
}

/// Checks that `value` is finite and strictly positive, naming `field` otherwise.
///
/// # Errors
/// When `value` is NaN, infinite, zero or negative.
pub fn positive(field: &str, value: f64) -> Result<f64, Error> {
    let v = finite(field, value)?;
    if v > 0.0 {
        Ok(v)
    } else {
        let u = unit_after(field);
        Err(Error::new(field, format!("must be above 0{u}, got {}{u}", quote(v))))
    }
}

/// The message of a value outside a range, `must be <lo words> lo <hi words> hi (why), got v`,
/// each number with the field's unit, so that the words say which ends belong to the range.
fn range_error(field: &str, v: f64, (lo_words, lo): (&str, f64), (hi_words, hi): (&str, f64), why: &str) -> Error {
    let u = unit_after(field);
    let why = if why.is_empty() {
        String::new()
    } else {
        format!(" ({why})")
    };
    let (lo, hi, v) = (quote(lo), quote(hi), quote(v));
    Error::new(
        field,
        format!("must be {lo_words} {lo}{u} {hi_words} {hi}{u}{why}, got {v}{u}"),
    )
}

/// Checks that `value` is finite and within `[lo, hi]` (both ends included), naming `field`
/// otherwise.
///
/// # Errors
/// When `value` is NaN, infinite or outside the closed range.
pub fn in_range(field: &str, value: f64, lo: f64, hi: f64) -> Result<f64, Error> {
    let v = finite(field, value)?;
    if (lo..=hi).contains(&v) {
        Ok(v)
    } else {
        Err(range_error(field, v, ("from", lo), ("to", hi), ""))
    }
}

/// Checks that `value` is finite, above `lo` (excluded) and at most `hi` (included): a length,
/// a diameter, anything that must not be zero. Names `field` otherwise.
///
/// # Errors
/// When `value` is NaN, infinite, at or below `lo`, or above `hi`.
pub fn above(field: &str, value: f64, lo: f64, hi: f64) -> Result<f64, Error> {
    let v = finite(field, value)?;
    if v > lo && v <= hi {
        Ok(v)
    } else {
        Err(range_error(field, v, ("above", lo), ("and at most", hi), ""))
    }
}

/// Checks that `value` is finite and strictly between `lo` and `hi` (both ends excluded), naming
/// `field` otherwise; `why` (may be empty) says why the ends are excluded.
///
/// # Errors
/// When `value` is NaN, infinite, or at or beyond either end.
pub fn strictly_between(field: &str, value: f64, lo: f64, hi: f64, why: &str) -> Result<f64, Error> {
    let v = finite(field, value)?;
    if v > lo && v < hi {
        Ok(v)
    } else {
        Err(range_error(field, v, ("above", lo), ("and below", hi), why))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn paths_join_with_dots_and_brackets() {
        assert_eq!(join_path("elements", "[2]"), "elements[2]");
        assert_eq!(join_path("elements[2]", "thickness_mm"), "elements[2].thickness_mm");
        assert_eq!(join_path("", "beam"), "beam");
        assert_eq!(join_path("beam", ""), "beam");
        let e = Error::new("tilt_deg", "bad").within("elements[0].axis");
        assert_eq!(e.field, "elements[0].axis.tilt_deg");
    }

    #[test]
    fn validators_reject_nonsense_and_name_the_field() {
        for bad in [f64::NAN, f64::INFINITY, f64::NEG_INFINITY] {
            assert_eq!(finite("x", bad).unwrap_err().field, "x");
        }
        assert!(positive("x", 0.0).is_err());
        assert!(positive("x", -1.0).is_err());
        assert!(in_range("x", 91.0, -90.0, 90.0).is_err());
        assert!(above("x_mm", 0.0, 0.0, 1.0).is_err());
        assert_eq!(above("x_mm", 1.0, 0.0, 1.0), Ok(1.0));
        assert!(strictly_between("x_deg", 90.0, -90.0, 90.0, "").is_err());
    }

    /// Each message says whether an end belongs to the range (a range that excludes an end says
    /// "above" or "below"; one that includes it says "from", "to", "at most"), with the unit the
    /// field's name carries, and quotes a huge value compactly.
    #[test]
    fn range_messages_say_which_ends_are_included() {
        let m = |r: Result<f64, Error>| r.unwrap_err().message;
        assert_eq!(m(positive("a.length", -1.0)), "must be above 0, got \u{2212}1");
        assert_eq!(
            m(above("elements[1].thickness_mm", 0.0, 0.0, 1e4)),
            "must be above 0 mm and at most 10000 mm, got 0 mm"
        );
        assert_eq!(
            m(in_range("axis.tilt_deg", 200.0, 0.0, 180.0)),
            "must be from 0° to 180°, got 200°"
        );
        assert_eq!(
            m(strictly_between(
                "polar_deg",
                90.0,
                -90.0,
                90.0,
                "grazing light never enters"
            )),
            "must be above \u{2212}90° and below 90° (grazing light never enters), got 90°"
        );
        let huge = m(in_range("wavelength_nm", 1e308, 1.0, 1e6));
        assert!(huge.ends_with("got 1e308 nm") && huge.chars().count() < 60, "{huge}");
        assert_eq!(
            m(finite("gap_mm", f64::NAN)),
            "enter a number in millimetres, such as 2.5, not NaN"
        );
        assert_eq!(quote(2.5e-9), "2.5e\u{2212}9");
        assert_eq!(quote(0.5), "0.5");
    }

    #[test]
    fn units_come_from_the_field_name() {
        assert_eq!(unit_after("elements[0].axis.tilt_deg"), "°");
        assert_eq!(unit_after("band_nm[1]"), " nm");
        assert_eq!(unit_after("wavelength_nm"), " nm");
        assert_eq!(unit_after("outside_index"), "");
        assert_eq!(unit_after("beam.polarization.jones[0][1]"), "");
        assert_eq!(unit_after(""), "");
    }

    #[test]
    fn messages_quote_huge_values_compactly() {
        // The Display form of 1e308 has 309 digits; the message quotes "1e308".
        let e = in_range("x", 1e308, 0.0, 1e4).unwrap_err();
        assert!(e.message.contains("1e308") && e.message.len() < 60, "{}", e.message);
        let e = positive("x", -1e-300).unwrap_err();
        assert!(e.message.ends_with("got \u{2212}1e\u{2212}300"), "{}", e.message);
    }
}
