//! Reading a JSON object field by field, with the path of every field kept for error messages.
//!
//! The scenario contract demands that an unknown field or a wrongly typed value be reported with
//! the full path of the field (`elements[1].axis.tilt_deg`). A derived deserializer reports only
//! a line and column, so the contract is read here by hand: each object is wrapped in a [`Fields`]
//! that hands out its members by name and, when done, names any member nobody asked for.

use crate::error::{Error, in_range, join_path, number_wanted};
use serde_json::{Map, Value};

/// A JSON object being read, with its path.
pub struct Fields<'a> {
    path: String,
    map: &'a Map<String, Value>,
    taken: Vec<&'static str>,
}

/// The JSON type name of a value, for messages.
pub fn type_name(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "a boolean",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "a list",
        Value::Object(_) => "an object",
    }
}

impl<'a> Fields<'a> {
    /// Wraps `value`, which must be an object, found at `path`.
    ///
    /// # Errors
    /// `path` when the value is not an object.
    pub fn new(path: &str, value: &'a Value) -> Result<Self, Error> {
        match value {
            Value::Object(map) => Ok(Fields {
                path: path.to_string(),
                map,
                taken: Vec::new(),
            }),
            other => Err(Error::new(path, format!("must be an object, got {}", type_name(other)))),
        }
    }

    /// The path of a member of this object.
    pub fn path_of(&self, name: &str) -> String {
        join_path(&self.path, name)
    }

    /// The member `name`, if present (JSON `null` counts as absent).
    pub fn get(&mut self, name: &'static str) -> Option<&'a Value> {
        self.taken.push(name);
        self.map.get(name).filter(|v| !v.is_null())
    }

    /// Whether the member `name` is present and not null (does not mark it as read).
    pub fn has(&self, name: &str) -> bool {
        self.map.get(name).is_some_and(|v| !v.is_null())
    }

    /// The member `name` as a number, if present.
    ///
    /// # Errors
    /// The member's path when it is present but not a number.
    pub fn number(&mut self, name: &'static str) -> Result<Option<f64>, Error> {
        let path = self.path_of(name);
        self.get(name).map(|v| as_number(&path, v)).transpose()
    }

    /// The member `name` as a number, or `default` when absent.
    ///
    /// # Errors
    /// The member's path when it is present but not a number.
    pub fn number_or(&mut self, name: &'static str, default: f64) -> Result<f64, Error> {
        Ok(self.number(name)?.unwrap_or(default))
    }

    /// The member `name` as a number, which must be present.
    ///
    /// # Errors
    /// The member's path when it is absent or not a number.
    pub fn required_number(&mut self, name: &'static str) -> Result<f64, Error> {
        let path = self.path_of(name);
        self.number(name)?
            .ok_or_else(|| Error::new(&path, format!("is required: enter {}", number_wanted(&path))))
    }

    /// The member `name` as a string, if present.
    ///
    /// # Errors
    /// The member's path when it is present but not a string.
    pub fn string(&mut self, name: &'static str) -> Result<Option<&'a str>, Error> {
        let path = self.path_of(name);
        match self.get(name) {
            None => Ok(None),
            Some(Value::String(s)) => Ok(Some(s.as_str())),
            Some(other) => Err(Error::new(path, format!("must be a string, got {}", type_name(other)))),
        }
    }

    /// The member `name` as `true` or `false`, if present.
    ///
    /// # Errors
    /// The member's path when it is present but not a boolean.
    pub fn boolean(&mut self, name: &'static str) -> Result<Option<bool>, Error> {
        let path = self.path_of(name);
        match self.get(name) {
            None => Ok(None),
            Some(Value::Bool(b)) => Ok(Some(*b)),
            Some(other) => Err(Error::new(
                path,
                format!("must be true or false, got {}", type_name(other)),
            )),
        }
    }

    /// Fails on the first member that was never asked for, naming it.
    ///
    /// # Errors
    /// The unknown member's path, with the names this object accepts.
    pub fn finish(self) -> Result<(), Error> {
        for key in self.map.keys() {
            if !self.taken.iter().any(|t| t == key) {
                let mut known: Vec<&str> = self.taken.clone();
                crate::small_sort::sort_by_less(&mut known, |a, b| a < b);
                known.dedup();
                return Err(Error::new(
                    self.path_of(key),
                    format!(
                        "unknown field '{}'; expected one of: {}",
                        crate::numfmt::quote_text(key),
                        known.join(", ")
                    ),
                ));
            }
        }
        Ok(())
    }
}

/// A value as a finite number.
///
/// # Errors
/// `path` when the value is not a JSON number (strings such as "10" are refused, not guessed).
pub fn as_number(path: &str, v: &Value) -> Result<f64, Error> {
    match v.as_f64() {
        Some(x) if v.is_number() && x.is_finite() => Ok(x),
        _ => Err(Error::new(
            path,
            format!("enter {} (got {})", number_wanted(path), type_name(v)),
        )),
    }
}

/// A value as a list of exactly `n` numbers.
///
/// # Errors
/// `path` (or `path[i]`) when the value is not a list of `n` numbers.
pub fn number_list(path: &str, v: &Value, n: usize) -> Result<Vec<f64>, Error> {
    let Value::Array(items) = v else {
        return Err(Error::new(
            path,
            format!("must be a list of {n} numbers, got {}", type_name(v)),
        ));
    };
    if items.len() != n {
        return Err(Error::new(
            path,
            format!("must be a list of {n} numbers, got {} items", items.len()),
        ));
    }
    items
        .iter()
        .enumerate()
        .map(|(i, x)| as_number(&format!("{path}[{i}]"), x))
        .collect()
}

/// A number field in [lo, hi], `default` when absent (required when `None`).
///
/// # Errors
/// The field's path when absent and required, not a number, or out of range.
pub fn ranged(f: &mut Fields, name: &'static str, default: Option<f64>, lo: f64, hi: f64) -> Result<f64, Error> {
    let path = f.path_of(name);
    let v = match default {
        Some(d) => f.number_or(name, d)?,
        None => f.required_number(name)?,
    };
    in_range(&path, v, lo, hi)
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn unknown_members_are_named_with_their_path() {
        let v = json!({"a": 1, "typo": 2});
        let mut f = Fields::new("beam", &v).unwrap();
        assert_eq!(f.number("a").unwrap(), Some(1.0));
        let e = f.finish().unwrap_err();
        assert_eq!(e.field, "beam.typo");
        assert!(e.message.contains("expected one of: a"), "{}", e.message);
    }

    #[test]
    fn types_are_checked() {
        let v = json!({"x": "10", "l": [1, 2]});
        let mut f = Fields::new("", &v).unwrap();
        assert_eq!(f.number("x").unwrap_err().field, "x");
        assert_eq!(number_list("l", &v["l"], 3).unwrap_err().field, "l");
        assert_eq!(number_list("l", &json!([1, "a"]), 2).unwrap_err().field, "l[1]");
        assert!(Fields::new("beam", &json!([1])).is_err());
    }
}

/// Parses JSON text, and when it is not valid JSON names the field at which it went wrong.
///
/// serde_json reports a line and column; the path of the member being read there is recovered
/// by a small scan of the text up to that point (strings, keys, objects and arrays), so that a
/// number out of range, a truncated document or a stray character is reported at
/// `elements[0].thickness_mm` rather than at line 1, column 93 alone.
///
/// # Errors
/// The path at the error (empty for the top level) with serde_json's message.
pub fn parse_text(text: &str) -> Result<Value, crate::error::Error> {
    serde_json::from_str(text).map_err(|e| {
        // At the end of a truncated document, everything read so far counts.
        let offset = if e.is_eof() {
            text.len()
        } else {
            byte_offset(text, e.line(), e.column())
        };
        crate::error::Error::new(path_at(text, offset), format!("not valid JSON: {e}"))
    })
}

fn byte_offset(text: &str, line: usize, column: usize) -> usize {
    let mut offset = 0;
    for (i, l) in text.split_inclusive('\n').enumerate() {
        if i + 1 == line {
            return (offset + column.saturating_sub(1)).min(text.len());
        }
        offset += l.len();
    }
    text.len()
}

/// The path of the member being read at byte `offset` of JSON text (best effort: the text is
/// only scanned, not validated).
pub fn path_at(text: &str, offset: usize) -> String {
    enum Frame {
        Object(Option<String>),
        Array(usize),
    }
    let bytes = text.as_bytes();
    let mut stack: Vec<Frame> = Vec::new();
    let mut i = 0;
    let end = offset.min(bytes.len());
    while i < end {
        match bytes[i] {
            b'"' => {
                let start = i + 1;
                i += 1;
                while i < bytes.len() && bytes[i] != b'"' {
                    i += if bytes[i] == b'\\' { 2 } else { 1 };
                }
                let s = text.get(start..i.min(text.len())).unwrap_or("").to_string();
                // A string directly followed by ':' is a key.
                let mut j = i + 1;
                while j < bytes.len() && bytes[j].is_ascii_whitespace() {
                    j += 1;
                }
                if j < bytes.len()
                    && bytes[j] == b':'
                    && let Some(Frame::Object(key)) = stack.last_mut()
                {
                    *key = Some(s);
                }
            }
            b'{' => stack.push(Frame::Object(None)),
            b'[' => stack.push(Frame::Array(0)),
            b'}' | b']' => {
                stack.pop();
            }
            b',' => match stack.last_mut() {
                Some(Frame::Array(n)) => *n += 1,
                Some(Frame::Object(key)) => *key = None,
                None => {}
            },
            _ => {}
        }
        i += 1;
    }
    // Name at most the first eight levels: deeper than that the path names no field of the
    // contract anyway (a document nested hundreds deep is refused for its depth).
    let mut path = String::new();
    for f in stack.iter().take(8) {
        match f {
            Frame::Object(Some(k)) => path = crate::error::join_path(&path, k),
            Frame::Object(None) => {}
            Frame::Array(n) => path.push_str(&format!("[{n}]")),
        }
    }
    path
}

#[cfg(test)]
mod path_tests {
    use super::*;

    #[test]
    fn syntax_errors_name_the_member_being_read() {
        let cases = [
            (
                r#"{"elements": [{"kind": "crystal", "thickness_mm": 1e999}]}"#,
                "elements[0].thickness_mm",
            ),
            (r#"{"elements": [{"kind": "crystal", "thick"#, "elements[0]"),
            (r#"{"beam": {"diameter_mm": NaN}}"#, "beam.diameter_mm"),
            (r#"{"elements": [1, 2, {"a": [0, }]}"#, "elements[2].a[1]"),
            (r#"{"a": "x\"y", "b": tru}"#, "b"),
            ("", ""),
        ];
        for (doc, field) in cases {
            let e = parse_text(doc).unwrap_err();
            assert_eq!(e.field, field, "{doc}: {}", e.message);
        }
    }
}
