//! Reading a command's arguments: positional words, and flags given as `--name value` or
//! `--name=value`.
//!
//! Each command states which flags it knows and whether each takes a value; anything else is a
//! [`Usage`] error that names the offending word and points to `doublespar help COMMAND`.
//! `-` alone is a positional word (standard input).

use crate::output;
use std::process::ExitCode;

/// A mistake in how the command line was written (exit status 2), as opposed to a bad input
/// document (which prints a JSON error naming its field).
pub struct Usage {
    /// The command whose help to point to (empty for the top level).
    pub command: &'static str,
    /// What is wrong, naming the word.
    pub message: String,
}

impl Usage {
    /// A usage error of `command`.
    pub fn new(command: &'static str, message: impl Into<String>) -> Usage {
        Usage {
            command,
            message: message.into(),
        }
    }

    /// Prints the message and where to read more; exit status 2.
    pub fn report(&self) -> ExitCode {
        let help = if self.command.is_empty() || self.command == "help" {
            "doublespar help".to_string()
        } else {
            format!("doublespar help {}", self.command)
        };
        let prefix = if self.command.is_empty() {
            "doublespar".to_string()
        } else {
            format!("doublespar {}", self.command)
        };
        output::err(&format!(
            "{prefix}: {}\nSee '{help}' for what it accepts.\n",
            self.message
        ));
        ExitCode::from(2)
    }
}

/// The words of one command line, after the command name.
#[derive(Default)]
pub struct Parsed {
    /// Words that are not flags, in order.
    pub positionals: Vec<String>,
    /// Flags in order: the name with its dashes (`--size`) and its value, if it takes one.
    pub flags: Vec<(String, Option<String>)>,
}

impl Parsed {
    /// Whether the flag `name` was given.
    pub fn has(&self, name: &str) -> bool {
        self.flags.iter().any(|(n, _)| n == name)
    }

    /// The value of the flag `name` (the last one given).
    pub fn value(&self, name: &str) -> Option<&str> {
        self.flags
            .iter()
            .rev()
            .find(|(n, _)| n == name)
            .and_then(|(_, v)| v.as_deref())
    }
}

/// Whether the words ask for help (`--help` or `-h` anywhere).
pub fn wants_help(args: &[String]) -> bool {
    args.iter().any(|a| a == "--help" || a == "-h")
}

/// Splits `args` into positionals and flags. `takes_value(name)` says whether `--name` is known
/// (`Some`) and whether it takes a value (`Some(true)`).
///
/// # Errors
/// An unknown flag, a flag without its value, a value given to a switch, or a flag given twice.
pub fn scan(
    command: &'static str,
    args: &[String],
    takes_value: &dyn Fn(&str) -> Option<bool>,
) -> Result<Parsed, Usage> {
    let mut parsed = Parsed::default();
    let mut it = args.iter();
    while let Some(a) = it.next() {
        if !a.starts_with('-') || a == "-" {
            parsed.positionals.push(a.clone());
            continue;
        }
        let (name, inline) = match a.split_once('=') {
            Some((n, v)) => (n.to_string(), Some(v.to_string())),
            None => (a.clone(), None),
        };
        let Some(needs) = takes_value(&name) else {
            return Err(Usage::new(command, format!("unknown flag '{}'", quote(&name))));
        };
        if parsed.has(&name) {
            return Err(Usage::new(command, format!("the flag '{name}' is given twice")));
        }
        let value = match (needs, inline) {
            (true, Some(v)) => Some(v),
            (true, None) => match it.next() {
                Some(v) => Some(v.clone()),
                None => return Err(Usage::new(command, format!("the flag '{name}' needs a value"))),
            },
            (false, Some(_)) => return Err(Usage::new(command, format!("the flag '{name}' takes no value"))),
            (false, None) => None,
        };
        parsed.flags.push((name, value));
    }
    Ok(parsed)
}

/// A word from the command line, shortened for a message when it is very long.
pub fn quote(word: &str) -> String {
    const MAX: usize = 40;
    if word.chars().count() <= MAX {
        word.to_string()
    } else {
        let head: String = word.chars().take(MAX).collect();
        format!("{head}…")
    }
}
