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
            format!("must be a finite number, got {}", quote(value)),
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
        Err(Error::new(
            field,
            format!("must be greater than zero, got {}", quote(v)),
        ))
    }
}

/// Checks that `value` is finite and not negative, naming `field` otherwise.
///
/// # Errors
/// When `value` is NaN, infinite or negative.
pub fn non_negative(field: &str, value: f64) -> Result<f64, Error> {
    let v = finite(field, value)?;
    if v >= 0.0 {
        Ok(v)
    } else {
        Err(Error::new(field, format!("must not be negative, got {}", quote(v))))
    }
}

/// Checks that `value` is finite and within `[lo, hi]`, naming `field` otherwise.
///
/// # Errors
/// When `value` is NaN, infinite or outside the closed range.
pub fn in_range(field: &str, value: f64, lo: f64, hi: f64) -> Result<f64, Error> {
    let v = finite(field, value)?;
    if (lo..=hi).contains(&v) {
        Ok(v)
    } else {
        Err(Error::new(
            field,
            format!("must lie between {} and {}, got {}", quote(lo), quote(hi), quote(v)),
        ))
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
        assert!(non_negative("x", -1e-300).is_err());
        assert_eq!(non_negative("x", 0.0), Ok(0.0));
        assert!(in_range("x", 91.0, -90.0, 90.0).is_err());
    }

    #[test]
    fn messages_quote_huge_values_compactly() {
        // The Display form of 1e308 has 309 digits; the message quotes "1e308".
        let e = in_range("x", 1e308, 0.0, 1e4).unwrap_err();
        assert!(e.message.contains("1e308") && e.message.len() < 60, "{}", e.message);
        let e = positive("x", -1e-300).unwrap_err();
        assert!(e.message.ends_with("got -1e-300"), "{}", e.message);
    }
}
