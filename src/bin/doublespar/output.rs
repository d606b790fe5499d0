//! Writing to the terminal without panicking: a reader that stops early (`doublespar … | head -1`)
//! closes the pipe, and the rest of the output is simply not wanted.
//!
//! Rust ignores SIGPIPE, so a write into a closed pipe returns `BrokenPipe`; `println!` would
//! turn that into a panic. Every byte the command line writes goes through [`out`] or [`err`],
//! which treat a closed pipe as success (the reader got what it asked for) and any other write
//! failure as exit status 1, with a message on standard error if that still works.

use std::io::{ErrorKind, Write};
use std::process::ExitCode;

fn write_to(mut w: impl Write, text: &str) -> std::io::Result<()> {
    w.write_all(text.as_bytes())?;
    w.flush()
}

/// Writes `text` to standard output; `SUCCESS` also when the reader has closed the pipe.
pub fn out(text: &str) -> ExitCode {
    match write_to(std::io::stdout().lock(), text) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) if e.kind() == ErrorKind::BrokenPipe => ExitCode::SUCCESS,
        Err(e) => {
            err(&format!("doublespar: cannot write the output: {e}\n"));
            ExitCode::from(1)
        }
    }
}

/// Writes `text` to standard error, ignoring any failure (there is nowhere left to report it).
pub fn err(text: &str) {
    let _ = write_to(std::io::stderr().lock(), text);
}
