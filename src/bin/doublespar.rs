//! The `doublespar` command line: scenario JSON in, traced JSON or a readable table out.
//!
//! ```text
//! doublespar trace FILE|- [--table] [--pretty]   trace a scenario (FILE or standard input)
//! doublespar materials [--at NM] [--json]         the crystal catalogue, with citations
//! doublespar draw VIEW FILE|- [--size WxH] [--dark]  one view as an SVG document
//! doublespar design FILE|- [--table]               solve a design request (displacer, waveplate,
//!                                                  achromat, recombiner)
//! doublespar demo                                  print the demo scenario
//! ```
//! Errors print `{"error": {"field": …, "message": …}}` on standard output (a readable line on
//! standard error with `--table`) and exit with status 2.

use doublespar::error::Error;
use doublespar::material;
use doublespar::scenario::Scenario;
use doublespar::wavelength::Wavelength;
use doublespar::{design, svg, table, trace, views};
use serde_json::json;
use std::io::Read;
use std::process::ExitCode;

const DEMO: &str = include_str!("../../examples/demo.json");

const USAGE: &str = "usage:
  doublespar trace FILE|- [--table] [--pretty]   trace a scenario (JSON file, or - for standard input)
  doublespar materials [--at NM] [--json]         list the crystal catalogue with citations
  doublespar draw VIEW FILE|- [--size WxH] [--dark]  draw one view as SVG; VIEW is one of
        side, end, poincare, walkoff-tilt, separation-wavelength, retardance-wavelength
  doublespar design FILE|- [--table]               solve a design request; its kind is one of
        displacer, waveplate, achromat, recombiner (see DEVELOPERS.md)
  doublespar demo                                  print the demo scenario
  doublespar --version | --help

Results are design guidance; laser work follows local regulations and licensed practice.";

enum Output {
    Json { pretty: bool },
    Table,
}

fn fail(err: &Error, table: bool) -> ExitCode {
    if table {
        eprintln!("error: {err}");
    } else {
        println!("{}", json!({"error": {"field": err.field, "message": err.message}}));
    }
    ExitCode::from(2)
}

fn read_input(path: &str) -> Result<String, Error> {
    let mut text = String::new();
    let limit = doublespar::scenario::MAX_DOCUMENT_BYTES as u64 + 1;
    let res = if path == "-" {
        std::io::stdin().take(limit).read_to_string(&mut text)
    } else {
        std::fs::File::open(path).and_then(|f| f.take(limit).read_to_string(&mut text))
    };
    res.map_err(|e| Error::new("", format!("cannot read {path}: {e}")))?;
    Ok(text)
}

fn cmd_trace(args: &[String]) -> ExitCode {
    let mut file = None;
    let mut output = Output::Json { pretty: false };
    for a in args {
        match a.as_str() {
            "--table" => output = Output::Table,
            "--pretty" => {
                if let Output::Json { .. } = output {
                    output = Output::Json { pretty: true }
                }
            }
            s if file.is_none() && (s == "-" || !s.starts_with("--")) => file = Some(s.to_string()),
            other => return usage_error(&format!("unexpected argument '{other}'")),
        }
    }
    let is_table = matches!(output, Output::Table);
    let Some(file) = file else {
        return usage_error("trace needs a scenario file, or - for standard input");
    };
    let result = read_input(&file)
        .and_then(|t| Scenario::from_json_str(&t))
        .and_then(|s| trace::trace(&s));
    match result {
        Err(e) => fail(&e, is_table),
        Ok(r) => {
            match output {
                Output::Table => print!("{}", table::render(&r)),
                Output::Json { pretty } => {
                    let text = if pretty {
                        serde_json::to_string_pretty(&r)
                    } else {
                        serde_json::to_string(&r)
                    };
                    match text {
                        Ok(t) => println!("{t}"),
                        Err(e) => return fail(&Error::new("", format!("cannot write the result: {e}")), false),
                    }
                }
            }
            ExitCode::SUCCESS
        }
    }
}

fn cmd_design(args: &[String]) -> ExitCode {
    let (mut file, mut table) = (None, false);
    for a in args {
        match a.as_str() {
            "--table" => table = true,
            s if file.is_none() && (s == "-" || !s.starts_with("--")) => file = Some(s.to_string()),
            other => return usage_error(&format!("unexpected argument '{other}'")),
        }
    }
    let Some(file) = file else {
        return usage_error("design needs a request file, or - for standard input");
    };
    match read_input(&file).and_then(|t| design::solve_str(&t)) {
        Err(e) => fail(&e, table),
        Ok(v) => {
            if table {
                print!("{}", design::summary_text(&v));
            } else {
                println!("{v}");
            }
            ExitCode::SUCCESS
        }
    }
}

fn cmd_materials(args: &[String]) -> ExitCode {
    let mut at = None;
    let mut as_json = false;
    let mut it = args.iter();
    while let Some(a) = it.next() {
        match a.as_str() {
            "--json" => as_json = true,
            "--at" => {
                let Some(v) = it.next() else {
                    return usage_error("--at needs a wavelength in nm");
                };
                match v
                    .parse::<f64>()
                    .map_err(|_| Error::new("wavelength_nm", format!("'{v}' is not a number")))
                    .and_then(Wavelength::from_nm)
                {
                    Ok(w) => at = Some(w),
                    Err(e) => return fail(&e, !as_json),
                }
            }
            other => return usage_error(&format!("unexpected argument '{other}'")),
        }
    }
    let mut rows = Vec::new();
    for m in material::catalogue() {
        let mut row = json!({
            "key": m.key, "name": m.name,
            "sign": match m.sign { material::OpticalSign::Positive => "positive", material::OpticalSign::Negative => "negative" },
            "range_nm": [m.range_nm.0, m.range_nm.1], "citation": m.citation,
            "verified": m.verified, "warnings": m.data_warning().into_iter().collect::<Vec<_>>(),
        });
        if let Some(w) = at {
            match m.indices(w) {
                Ok(ev) => {
                    row["no"] = json!(ev.indices.no);
                    row["ne"] = json!(ev.indices.ne);
                    row["warnings"] = json!(ev.warnings);
                }
                // No index is listed where the formula breaks down: null, and the reason.
                Err(e) => {
                    row["no"] = serde_json::Value::Null;
                    row["ne"] = serde_json::Value::Null;
                    row["error"] = json!({"field": e.field, "message": e.message});
                }
            }
        }
        rows.push(row);
    }
    if as_json {
        println!("{}", json!({ "materials": rows }));
    } else {
        for r in &rows {
            let idx = match (r.get("no"), r.get("ne")) {
                _ if r.get("error").is_some() => "  n/a: formula breaks down".to_string(),
                (Some(no), Some(ne)) => format!(
                    "  n_o {:.6}  n_e {:.6}",
                    no.as_f64().unwrap_or(f64::NAN),
                    ne.as_f64().unwrap_or(f64::NAN)
                ),
                _ => String::new(),
            };
            println!(
                "{:<10} {:<38} {} {}–{} nm{}",
                r["key"].as_str().unwrap_or(""),
                r["name"].as_str().unwrap_or(""),
                r["sign"].as_str().unwrap_or(""),
                r["range_nm"][0],
                r["range_nm"][1],
                idx
            );
            println!("           {}", r["citation"].as_str().unwrap_or(""));
            if let Some(m) = r["error"]["message"].as_str() {
                println!("           n/a: {m}");
            }
            for w in r["warnings"].as_array().into_iter().flatten() {
                println!("           warning: {}", w.as_str().unwrap_or(""));
            }
        }
    }
    ExitCode::SUCCESS
}

fn cmd_draw(args: &[String]) -> ExitCode {
    let (mut view, mut file, mut size, mut dark) = (None, None, (900.0, 420.0), false);
    let mut it = args.iter();
    while let Some(a) = it.next() {
        match a.as_str() {
            "--dark" => dark = true,
            "--size" => {
                let parsed = it.next().and_then(|v| {
                    let (w, h) = v.split_once('x')?;
                    Some((w.parse::<f64>().ok()?, h.parse::<f64>().ok()?))
                });
                match parsed {
                    Some((w, h)) if (50.0..=10000.0).contains(&w) && (50.0..=10000.0).contains(&h) => size = (w, h),
                    _ => return usage_error("--size takes WIDTHxHEIGHT in pixels, 50 to 10000 each"),
                }
            }
            s if view.is_none() && !s.starts_with("--") => view = Some(s.to_string()),
            s if file.is_none() && (s == "-" || !s.starts_with("--")) => file = Some(s.to_string()),
            other => return usage_error(&format!("unexpected argument '{other}'")),
        }
    }
    let (Some(view), Some(file)) = (view, file) else {
        return usage_error("draw needs a view name and a scenario file");
    };
    let result = read_input(&file)
        .and_then(|t| Scenario::from_json_str(&t))
        .and_then(|s| {
            let r = trace::trace(&s)?;
            views::build(&view, &s, &r)
        });
    match result {
        Err(e) => fail(&e, false),
        Ok(scene) => {
            let palette = if dark {
                svg::Palette::dark()
            } else {
                svg::Palette::light()
            };
            print!("{}", svg::to_svg(&scene, size.0, size.1, &palette));
            ExitCode::SUCCESS
        }
    }
}

fn usage_error(msg: &str) -> ExitCode {
    eprintln!("doublespar: {msg}\n\n{USAGE}");
    ExitCode::from(2)
}

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    match args.first().map(String::as_str) {
        Some("trace") => cmd_trace(&args[1..]),
        Some("materials") => cmd_materials(&args[1..]),
        Some("draw") => cmd_draw(&args[1..]),
        Some("design") => cmd_design(&args[1..]),
        Some("demo") => {
            print!("{DEMO}");
            ExitCode::SUCCESS
        }
        Some("--version") => {
            println!("doublespar {}", env!("CARGO_PKG_VERSION"));
            ExitCode::SUCCESS
        }
        Some("--help" | "-h" | "help") => {
            println!("{USAGE}");
            ExitCode::SUCCESS
        }
        Some(other) => usage_error(&format!("unknown command '{other}'")),
        None => usage_error("no command given"),
    }
}
