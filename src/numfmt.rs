//! Numbers as people read them: the one place that decides significant digits, when to switch to
//! scientific notation, which length unit a view uses, and how a message quotes a value.
//!
//! Every drawn number (views, SVG and PNG export, the page's canvases, embeds) and the command
//! line's tables go through here; `www/format.js` implements the same rules for the page's text,
//! and both are tested against one table of cases, `tests/format/cases.json`, so that they cannot
//! drift apart.
//!
//! Rules (the table of cases pins each one):
//! - **Significant digits** ([`sig`]): `n` significant digits, written plainly when the decimal
//!   exponent e (after rounding) lies in −4 ≤ e ≤ 6, otherwise as `m×10ᵉ` with a superscript
//!   exponent. Either way the number (sign excluded) takes at most [`MAX_DRAWN_CHARS`] characters:
//!   a plain number drops decimals to fit, a scientific one drops mantissa digits (down to one).
//!   Minus signs are the typographic minus U+2212; zero is `0`; a rounding half-way tie may round
//!   differently in Rust (half to even on the exact binary value) and JavaScript (half up), which
//!   the shared cases avoid.
//! - **One unit per quantity per view** ([`LengthUnit::for_max`]): the largest length a view shows
//!   chooses nm, µm, mm or m so that it reads between 1 and 1000; every length of that view is
//!   then written in that unit, so "1.00 mm" never stands beside "998 µm".
//! - **Messages** ([`quote`], [`quote_text`]): a number from the input is quoted plain from 10⁻⁴
//!   up to 10⁷ and in e-notation outside (`1e308`, never 309 digits), cut to 6 significant digits
//!   beyond 12 characters, with the typographic minus; a long string is cut with an ellipsis.
//! - **No power** ([`NO_POWER`]): a ray or spot carrying less than 10⁻¹² of the input power is
//!   drawn faint and labelled "no power", not given a number.
//! - **Circular light** ([`shows_azimuth`]): when |χ| reads as 45.00° at the page's two decimals,
//!   the light is shown as circular and no azimuth is given (the azimuth of a circle is noise).
//!
//! Sources: the SI brochure (BIPM, 9th edition, 2019, §5.4) for the space between number and unit
//! and the choice of prefixes; typographic minus and superscript exponents are common practice.

/// The most characters a drawn number may take, its sign excluded ("about 8 characters").
pub const MAX_DRAWN_CHARS: usize = 8;

/// A ray or spot with less power than this (fraction of the input power) is shown as carrying no
/// power: drawn faint, labelled "no power", its polarization not plotted. Far above the trace's
/// rounding (10⁻¹⁶ of the input) and far below any power a detector would see.
pub const NO_POWER: f64 = 1e-12;

/// The page writes ellipse angles with two decimals; a state within half of the last digit of
/// |χ| = 45° reads as circular, and its azimuth is not shown.
pub const CIRCULAR_WITHIN_DEG: f64 = 0.005;

/// The longest quoted string in a message, in characters, ellipsis included.
pub const QUOTE_CHARS: usize = 40;

/// The typographic minus sign (U+2212).
pub const MINUS: char = '\u{2212}';

/// The digits (ASCII) and the decimal exponent of a number written in Rust's e-notation
/// (`1.25e-3` gives `125` and −3). Read by hand rather than with `str::parse`, which would add
/// a parser to the page's WebAssembly.
fn split_exponent(s: &str) -> (Vec<u8>, i32) {
    let (mut digits, mut exp, mut negative, mut in_exp) = (Vec::new(), 0i32, false, false);
    for b in s.bytes() {
        match b {
            b'e' => in_exp = true,
            b'-' if in_exp => negative = true,
            b'0'..=b'9' if in_exp => exp = exp.saturating_mul(10).saturating_add(i32::from(b - b'0')),
            b'0'..=b'9' => digits.push(b),
            _ => {}
        }
    }
    (digits, if negative { -exp } else { exp })
}

/// The decimal digits of `|v|` rounded to `n` significant digits, and the decimal exponent of the
/// first digit after rounding (`v` finite and non-zero, `n` ≥ 1).
fn digits_and_exponent(v: f64, n: usize) -> (Vec<u8>, i32) {
    split_exponent(&format!("{:.*e}", n.saturating_sub(1), v.abs()))
}

/// Writes digits `d` (the first at decimal exponent `e`) plainly, or as `m×10ᵉ`.
fn write_digits(d: &[u8], e: i32, plain: bool) -> String {
    let mut out = String::new();
    if !plain {
        for (i, &c) in d.iter().enumerate() {
            if i == 1 {
                out.push('.');
            }
            out.push(char::from(c));
        }
        out.push_str("×10");
        if e < 0 {
            out.push('⁻');
        }
        const SUP: [char; 10] = ['⁰', '¹', '²', '³', '⁴', '⁵', '⁶', '⁷', '⁸', '⁹'];
        let (mut rest, mut scale) = (e.unsigned_abs(), 1u32);
        while scale <= rest / 10 {
            scale *= 10;
        }
        while scale > 0 {
            out.push(SUP[(rest / scale) as usize]);
            rest %= scale;
            scale /= 10;
        }
    } else if e < 0 {
        out.push_str("0.");
        for _ in 1..-e {
            out.push('0');
        }
        out.extend(d.iter().map(|&c| char::from(c)));
    } else {
        let int_len = e as usize + 1;
        for (i, &c) in d.iter().enumerate() {
            if i == int_len {
                out.push('.');
            }
            out.push(char::from(c));
        }
        for _ in d.len()..int_len {
            out.push('0');
        }
    }
    out
}

fn signed(negative: bool, body: String) -> String {
    if negative { format!("{MINUS}{body}") } else { body }
}

/// `v` with `n` significant digits (1 to 17), plain or as `m×10ᵉ`, at most [`MAX_DRAWN_CHARS`]
/// characters besides the sign (see the module's rules).
///
/// Degenerate cases: 0 (either sign) gives `0`; NaN gives `NaN`; infinities give `∞` and `−∞`.
pub fn sig(v: f64, n: usize) -> String {
    sig_within(v, n, MAX_DRAWN_CHARS)
}

/// As `sig`, with a budget of `max_chars` characters (sign excluded) instead of
/// [`MAX_DRAWN_CHARS`]: for text tables, whose columns hold more digits than a drawing.
pub fn sig_within(v: f64, n: usize, max_chars: usize) -> String {
    if v.is_nan() {
        return "NaN".to_string();
    }
    if v.is_infinite() {
        return signed(v < 0.0, "∞".to_string());
    }
    if v == 0.0 {
        return "0".to_string();
    }
    let n = n.clamp(1, 17);
    let (_, e) = digits_and_exponent(v, n);
    let plain = (-4..=6).contains(&e);
    let mut k = n;
    loop {
        let (d, e) = digits_and_exponent(v, k);
        let body = write_digits(&d, e, plain);
        if body.chars().count() <= max_chars || k == 1 {
            return signed(v < 0.0, body);
        }
        k -= 1;
    }
}

/// `v` with `decimals` decimals (at most 12); values below `floor` in magnitude are written as 0,
/// and a negative zero loses its sign. Where that would take more than [`MAX_DRAWN_CHARS`]
/// characters (|v| ≥ 10⁷, or many decimals) it falls back to [`sig`] with `decimals` + 1 digits,
/// so that it too stays short.
pub fn fixed(v: f64, decimals: usize, floor: f64) -> String {
    fixed_within(v, decimals, floor, MAX_DRAWN_CHARS)
}

/// As [`fixed`], with a budget of `max_chars` characters (sign excluded): for text tables.
pub fn fixed_within(v: f64, decimals: usize, floor: f64, max_chars: usize) -> String {
    if !v.is_finite() || v.abs() >= 1e7 {
        return sig_within(v, decimals + 1, max_chars);
    }
    let v = if v.abs() < floor { 0.0 } else { v };
    let s = format!("{:.*}", decimals.min(12), v.abs());
    if s.chars().count() > max_chars {
        return sig_within(v, decimals + 1, max_chars);
    }
    signed(v < 0.0 && s.bytes().any(|b| (b'1'..=b'9').contains(&b)), s)
}

/// A length unit, chosen once per view from its largest length.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LengthUnit {
    /// Nanometres.
    Nm,
    /// Micrometres.
    Um,
    /// Millimetres (the interface's unit).
    Mm,
    /// Metres.
    M,
}

impl LengthUnit {
    /// The unit in which `largest_mm` (the largest magnitude the view shows) reads between 1 and
    /// 1000 (after rounding to 3 digits): nm below 1 µm, µm below 1 mm, mm below 1 m, then m.
    ///
    /// Degenerate cases: zero or a non-finite value gives mm.
    pub fn for_max(largest_mm: f64) -> LengthUnit {
        let a = largest_mm.abs();
        if !a.is_finite() || a == 0.0 {
            LengthUnit::Mm
        } else if a < 0.9995e-3 {
            LengthUnit::Nm
        } else if a < 0.9995 {
            LengthUnit::Um
        } else if a < 999.5 {
            LengthUnit::Mm
        } else {
            LengthUnit::M
        }
    }

    /// The unit for the largest magnitude among `values_mm` (mm when there is none).
    pub fn for_values(values_mm: &[f64]) -> LengthUnit {
        LengthUnit::for_max(
            values_mm
                .iter()
                .filter(|v| v.is_finite())
                .fold(0.0, |m, v| m.max(v.abs())),
        )
    }

    /// The unit's symbol.
    pub fn symbol(self) -> &'static str {
        match self {
            LengthUnit::Nm => "nm",
            LengthUnit::Um => "µm",
            LengthUnit::Mm => "mm",
            LengthUnit::M => "m",
        }
    }

    /// How many of this unit make a millimetre.
    pub fn per_mm(self) -> f64 {
        match self {
            LengthUnit::Nm => 1e6,
            LengthUnit::Um => 1e3,
            LengthUnit::Mm => 1.0,
            LengthUnit::M => 1e-3,
        }
    }

    /// The unit named by `symbol` (`nm`, `µm` or `um`, `mm`, `m`).
    #[cfg(test)]
    pub fn from_symbol(symbol: &str) -> Option<LengthUnit> {
        Some(match symbol {
            "nm" => LengthUnit::Nm,
            "µm" | "um" => LengthUnit::Um,
            "mm" => LengthUnit::Mm,
            "m" => LengthUnit::M,
            _ => return None,
        })
    }
}

/// A length given in mm, written in `unit` with `n` significant digits and the unit symbol after
/// a space: `length(0.998, LengthUnit::Mm, 3)` is `0.998 mm`.
pub fn length(mm: f64, unit: LengthUnit, n: usize) -> String {
    format!("{} {}", sig(mm * unit.per_mm(), n), unit.symbol())
}

/// A length in its own best unit (for a view that shows a single length).
pub fn length_auto(mm: f64, n: usize) -> String {
    length(mm, LengthUnit::for_max(mm), n)
}

/// A power (fraction of the input) with `n` significant digits, or `no power` below
/// [`NO_POWER`].
pub fn power(p: f64, n: usize) -> String {
    if p.abs() < NO_POWER {
        "no power".to_string()
    } else {
        sig(p, n)
    }
}

/// Whether an ellipse with ellipticity `chi_deg` has an azimuth worth showing: false for
/// circular light (|χ| within [`CIRCULAR_WITHIN_DEG`] of 45°).
pub fn shows_azimuth(chi_deg: f64) -> bool {
    chi_deg.is_nan() || 45.0 - chi_deg.abs() >= CIRCULAR_WITHIN_DEG
}

/// A tick label at `v` for ticks `step` apart: the decimals the step needs and no more, through
/// [`sig`] so that it stays short; a value within 10⁻⁹ of a step from zero is `0`.
pub fn tick(v: f64, step: f64) -> String {
    if !(step.is_finite() && step > 0.0 && v.is_finite()) {
        return sig(v, 3);
    }
    if v.abs() < 1e-9 * step {
        return "0".to_string();
    }
    // Digits: those down to the step's first digit. The exponent of v comes from its shortest
    // decimal form, not from a logarithm, so that Rust and JavaScript agree at powers of ten.
    let top = f64::from(split_exponent(&format!("{v:e}")).1);
    let bottom = (step.log10() + 1e-9).floor();
    let n = (top - bottom + 1.0).clamp(1.0, 17.0) as usize;
    sig(v, n)
}

/// A number from the input, quoted compactly for a message, whatever its size (`1e308`, not 309
/// digits; `2.5e−9`, not `0.0000000025`), with the typographic minus.
///
/// Plain decimal from 10⁻⁴ up to 10⁷ (the shortest round-trip form), e-notation outside it; a
/// form longer than 12 characters is cut to 6 significant digits (`0.333333`, `1.79769e308`).
pub fn quote(v: f64) -> String {
    let a = v.abs();
    let plain_range = v == 0.0 || !v.is_finite() || (1e-4..1e7).contains(&a);
    let text = if plain_range { format!("{v}") } else { format!("{v:e}") };
    let text = if text.len() <= 12 {
        text
    } else if plain_range {
        // Six significant digits, trailing zeros dropped.
        let decimals = (5 - a.log10().floor() as i32).max(0) as usize;
        trim_zeros(format!("{v:.decimals$}"))
    } else {
        let short = format!("{v:.5e}");
        let (mantissa, e) = short.split_at(short.find('e').unwrap_or(short.len()));
        trim_zeros(mantissa.to_string()) + e
    };
    text.replace('-', "\u{2212}")
}

/// `s` without trailing zeros after its decimal point (and without a bare point).
fn trim_zeros(mut s: String) -> String {
    if s.contains('.') {
        while s.ends_with('0') {
            s.pop();
        }
        if s.ends_with('.') {
            s.pop();
        }
    }
    s
}

/// A string from the input, quoted for a message: at most [`QUOTE_CHARS`] characters, cut with
/// an ellipsis; control characters are shown as `?` so that a message stays on one line.
pub fn quote_text(s: &str) -> String {
    let mut out = String::new();
    for (i, c) in s.chars().enumerate() {
        if i == QUOTE_CHARS {
            out.pop();
            out.push('…');
            break;
        }
        out.push(if c.is_control() { '?' } else { c });
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::Value;

    /// The digits-and-exponent old formatter of the views, kept here only so that a test can show
    /// the length check catches it.
    fn old_significant(v: f64, digits: usize) -> String {
        if v == 0.0 || !v.is_finite() {
            return format!("{v}");
        }
        let mag = v.abs().log10().floor() as i32;
        let decimals = (digits as i32 - 1 - mag).max(0) as usize;
        format!("{v:.decimals$}")
    }

    /// Values that stress a formatter: huge, tiny, negative, at rounding boundaries.
    const AWKWARD: [f64; 16] = [
        1e308,
        -1.7976931348623157e308,
        5e-324,
        1.23e-11,
        -9.996e-5,
        0.00012345,
        999_999.6,
        12_345_678.9,
        -0.0,
        1.0,
        6.189_372_512,
        1e-300,
        123_456_789_012.0,
        -2.5e-17,
        0.999_96,
        4.2e21,
    ];

    /// Every formatted number, sign excluded, fits the drawn budget.
    fn check_bounded(f: impl Fn(f64, usize) -> String) -> Result<(), String> {
        for v in AWKWARD {
            for n in 1..=8 {
                let s = f(v, n);
                let body = s.trim_start_matches(MINUS).trim_start_matches('-');
                if body.chars().count() > MAX_DRAWN_CHARS {
                    let shown: String = s.chars().take(40).collect();
                    return Err(format!("{v:e} with {n} digits gives {shown:?}…"));
                }
            }
        }
        Ok(())
    }

    #[test]
    fn drawn_numbers_stay_within_the_budget() {
        check_bounded(sig).unwrap();
        check_bounded(|v, n| fixed(v, n, 0.0)).unwrap();
        check_bounded(|v, _| tick(v, v.abs() / 7.0)).unwrap();
    }

    #[test]
    fn the_check_catches_the_old_unbounded_formatter() {
        // Planting the old formatter back must fail the length check (1.23e-11 gave 15 digits).
        let err = check_bounded(old_significant).unwrap_err();
        assert!(err.contains("e308"), "{err}");
    }

    fn value_of(v: &Value) -> f64 {
        match v {
            Value::String(s) if s == "NaN" => f64::NAN,
            Value::String(s) if s == "Infinity" => f64::INFINITY,
            Value::String(s) if s == "-Infinity" => f64::NEG_INFINITY,
            Value::String(s) if s == "-0" => -0.0,
            other => other.as_f64().expect("a number"),
        }
    }

    /// The cases shared with `www/format.js` (tested there by `tests/e2e/format.test.mjs`).
    #[test]
    fn the_shared_cases_hold() {
        let cases: Value = serde_json::from_str(include_str!("../tests/format/cases.json")).unwrap();
        let mut n_cases = 0;
        for case in cases["cases"].as_array().unwrap() {
            let v = value_of(&case["value"]);
            let n = case["digits"].as_u64().unwrap_or(3) as usize;
            let expected = case["expected"].as_str().unwrap();
            let got = match case["kind"].as_str().unwrap() {
                "sig" => sig(v, n),
                "fixed" => fixed(v, n, case["floor"].as_f64().unwrap_or(0.0)),
                "tick" => tick(v, case["step"].as_f64().unwrap()),
                "length" => {
                    let unit = match case["unit"].as_str().unwrap() {
                        "auto" => LengthUnit::for_max(v),
                        s => LengthUnit::from_symbol(s).unwrap(),
                    };
                    length(v, unit, n)
                }
                "unit_for" => LengthUnit::for_max(v).symbol().to_string(),
                "power" => power(v, n),
                "shows_azimuth" => shows_azimuth(v).to_string(),
                other => panic!("unknown kind {other}"),
            };
            assert_eq!(got, expected, "case {case}");
            n_cases += 1;
        }
        assert!(n_cases >= 40, "{n_cases} cases");
    }

    #[test]
    fn messages_quote_compactly() {
        assert_eq!(quote(1e308), "1e308");
        assert_eq!(quote(-1e-300), "\u{2212}1e\u{2212}300");
        assert_eq!(quote(2.5), "2.5");
        assert_eq!(quote(2.5e-9), "2.5e\u{2212}9");
        assert_eq!(quote(1.7976931348623157e308), "1.79769e308");
        assert_eq!(quote(123456789.0), "1.23456789e8");
        assert_eq!(quote(0.1 + 0.2), "0.3");
        assert_eq!(quote(1.0 / 3.0), "0.333333");
        assert_eq!(quote(-1234.56789012), "\u{2212}1234.57");
        assert_eq!(quote(1.2345678901234e-300), "1.23457e\u{2212}300");
        assert_eq!(quote(f64::NAN), "NaN");
        let long = "x".repeat(10_000);
        let q = quote_text(&long);
        assert_eq!(q.chars().count(), QUOTE_CHARS);
        assert!(q.ends_with('…'));
        assert_eq!(quote_text("line\nbreak"), "line?break");
    }

    #[test]
    fn one_unit_reads_between_one_and_a_thousand() {
        // 998 µm and 1.00 mm in one view: both in mm.
        let unit = LengthUnit::for_values(&[0.998, 1.0]);
        assert_eq!(length(0.998, unit, 3), "0.998 mm");
        assert_eq!(length(1.0, unit, 3), "1.00 mm");
        assert_eq!(LengthUnit::for_values(&[]), LengthUnit::Mm);
        assert_eq!(LengthUnit::for_max(f64::NAN), LengthUnit::Mm);
        assert_eq!(LengthUnit::from_symbol("um"), Some(LengthUnit::Um));
    }
}
