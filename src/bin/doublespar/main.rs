//! The `doublespar` command line: scenario JSON in, traced JSON, a table or a drawing out;
//! design requests from a file or from flags.
//!
//! ```text
//! doublespar trace FILE|- [--table] [--pretty]
//! doublespar draw VIEW FILE|- [--size WxH] [--dark]
//! doublespar design KIND [FLAGS] [--table]  |  doublespar design FILE|- [--table]
//! doublespar materials [--at NM] [--temperature C] [--json]
//! doublespar demo
//! doublespar help [COMMAND]      (and --help / -h on every command)
//! ```
//! A bad document prints `{"error": {"field": …, "message": …}}` on standard output (a readable
//! line on standard error with `--table`) and exits with status 2; a mistake on the command line
//! (an unknown command or flag, a missing word) names itself on standard error, points to
//! `doublespar help COMMAND` and exits with status 2. Help goes to standard output, status 0.
//! Output into a pipe that the reader has closed ends quietly (see [`output`]).

mod args;
mod design_flags;
mod help;
mod output;
mod report;

use args::{Parsed, Usage, scan};
use doublespar::Error;
use doublespar::Scenario;
use doublespar::Wavelength;
use serde_json::{Value, json};
use std::io::Read;
use std::process::ExitCode;

const DEMO: &str = include_str!("../../../examples/demo.json");

/// Prints a document error: JSON on standard output, or a line on standard error for tables.
fn fail(err: &Error, table: bool) -> ExitCode {
    if table {
        output::err(&format!("error: {err}\n"));
    } else {
        let _ = output::out(&format!("{}\n", json!({"error": err.to_json()})));
    }
    ExitCode::from(2)
}

fn read_input(path: &str) -> Result<String, Error> {
    let mut text = String::new();
    let limit = doublespar::MAX_DOCUMENT_BYTES as u64 + 1;
    let res = if path == "-" {
        std::io::stdin().take(limit).read_to_string(&mut text)
    } else {
        std::fs::File::open(path).and_then(|f| f.take(limit).read_to_string(&mut text))
    };
    res.map_err(|e| Error::new("", format!("cannot read {}: {e}", args::quote(path))))?;
    Ok(text)
}

/// The one input file of a command, from its positional words.
fn one_file(command: &'static str, parsed: &Parsed, what: &str) -> Result<String, Usage> {
    match parsed.positionals.as_slice() {
        [f] => Ok(f.clone()),
        [] => Err(Usage::new(command, format!("needs {what}, or - for standard input"))),
        [_, extra, ..] => Err(Usage::new(command, format!("unexpected word '{}'", args::quote(extra)))),
    }
}

fn cmd_trace(a: &[String]) -> Result<ExitCode, Usage> {
    let p = scan("trace", a, &|f| match f {
        "--table" | "--pretty" => Some(false),
        _ => None,
    })?;
    let file = one_file("trace", &p, "a scenario file")?;
    let is_table = p.has("--table");
    let result = read_input(&file)
        .and_then(|t| Scenario::from_json_str(&t))
        .and_then(|s| doublespar::trace_scenario(&s));
    Ok(match result {
        Err(e) => fail(&e, is_table),
        Ok(r) if is_table => output::out(&doublespar::render_table(&r)),
        Ok(r) => {
            let text = if p.has("--pretty") {
                serde_json::to_string_pretty(&r)
            } else {
                serde_json::to_string(&r)
            };
            match text {
                Ok(t) => output::out(&(t + "\n")),
                Err(e) => fail(&Error::new("", format!("cannot write the result: {e}")), false),
            }
        }
    })
}

fn cmd_design(a: &[String]) -> Result<ExitCode, Usage> {
    // The flags a design accepts depend on its kind, the first word (after --table, if that
    // comes first).
    let kind = a
        .iter()
        .find(|w| *w != "--table")
        .filter(|w| !w.starts_with('-') || *w == "-")
        .cloned();
    let by_kind = kind.as_deref().filter(|k| doublespar::DESIGN_KINDS.contains(k));
    let p = scan("design", a, &|f| match f {
        "--table" => Some(false),
        _ => by_kind.and_then(|k| design_flags::find(k, f)).map(|_| true),
    })
    .map_err(|u| match (&kind, by_kind) {
        _ if !u.message.starts_with("unknown flag") => u,
        (_, Some(k)) => Usage::new("design", format!("{} for a {k} request", u.message)),
        _ => Usage::new(
            "design",
            format!(
                "{}; request flags follow a design kind ({})",
                u.message,
                doublespar::DESIGN_KINDS.join(", ")
            ),
        ),
    })?;
    let table = p.has("--table");
    let answer = match by_kind {
        Some(k) => match design_flags::request(k, &p)? {
            Err(e) => return Ok(fail(&e, table)),
            Ok(request) => doublespar::solve_design(&request).map_err(|e| design_flags::name_the_flag(k, &p, e)),
        },
        None => {
            let wanted = format!(
                "a design kind ({}) or a request file",
                doublespar::DESIGN_KINDS.join(", ")
            );
            let file = one_file("design", &p, &wanted)?;
            read_input(&file).and_then(|t| doublespar::solve_design_str(&t))
        }
    };
    Ok(match answer {
        Err(e) => fail(&e, table),
        Ok(v) if table => output::out(&report::render(&v)),
        Ok(v) => output::out(&format!("{v}\n")),
    })
}

fn cmd_materials(a: &[String]) -> Result<ExitCode, Usage> {
    let p = scan("materials", a, &|f| match f {
        "--json" => Some(false),
        "--at" | "--temperature" => Some(true),
        _ => None,
    })?;
    if let Some(extra) = p.positionals.first() {
        return Err(Usage::new(
            "materials",
            format!("unexpected word '{}'", args::quote(extra)),
        ));
    }
    let as_json = p.has("--json");
    let mut at = None;
    if let Some(v) = p.value("--at") {
        match v
            .trim()
            .parse::<f64>()
            .map_err(|_| {
                Error::new(
                    "wavelength_nm",
                    format!("'{}' is not a number (flag --at)", args::quote(v)),
                )
            })
            .and_then(Wavelength::from_nm)
        {
            Ok(w) => at = Some(w),
            Err(e) => return Ok(fail(&e, !as_json)),
        }
    }
    let mut t_c = doublespar::REFERENCE_C;
    if let Some(v) = p.value("--temperature") {
        let parsed = v.trim().parse::<f64>().ok().filter(|t| (-200.0..=500.0).contains(t));
        match parsed {
            Some(t) => t_c = t,
            None => {
                let why = format!(
                    "'{}' is not a temperature from -200 to 500 °C (flag --temperature)",
                    args::quote(v)
                );
                return Ok(fail(&Error::new("temperature_c", why), !as_json));
            }
        }
    }
    let mut rows = Vec::new();
    for m in doublespar::materials() {
        let mut row = doublespar::describe_material(m);
        if let Some(w) = at {
            let pair = |i: doublespar::Indices| vec![i.no, i.ne];
            let indices = m.indices_at(w, t_c).map(|e| (pair(e.indices), e.warnings));
            let group = m.group_indices_at(w, t_c).map(|e| pair(e.indices));
            list_indices(&mut row, &["no", "ne"], indices, group);
            list_sources(&mut row, m.key, w, |s| {
                let m = doublespar::find_uniaxial_source(m.key, s)?;
                let e = m.indices_at(w, t_c).ok()?;
                Some(vec![e.indices.no, e.indices.ne])
            });
            // Optically active crystals (quartz): the rotation along the optic axis of a
            // right-handed crystal, °/mm.
            if let Some(a) = doublespar::optical_activity(m.key) {
                row["rotatory_power_deg_per_mm"] = match a.at(w) {
                    Ok(act) => json!(act.rotatory_power_rad_per_mm.to_degrees()),
                    Err(_) => Value::Null,
                };
            }
        }
        rows.push(row);
    }
    for m in doublespar::biaxial_materials() {
        let mut row = doublespar::describe_biaxial(m);
        if let Some(w) = at {
            let indices = m.principal_at(w, t_c).map(|p| (p.principal.to_vec(), p.warnings));
            let group = m.group_principal_at(w, t_c).map(|p| p.principal.to_vec());
            list_indices(&mut row, &["nx", "ny", "nz"], indices, group);
            list_sources(&mut row, m.key, w, |s| {
                let p = doublespar::find_biaxial_source(m.key, s)?.principal_at(w, t_c).ok()?;
                Some(p.principal.to_vec())
            });
        }
        rows.push(row);
    }
    if as_json {
        return Ok(output::out(&format!("{}\n", json!({ "materials": rows }))));
    }
    let mut text = String::new();
    for r in &rows {
        let n = |k: &str| r.get(k).and_then(Value::as_f64);
        let idx = match (n("no"), n("ne"), n("nx"), n("ny"), n("nz")) {
            _ if r.get("error").is_some() => "  n/a: formula breaks down".to_string(),
            (Some(no), Some(ne), ..) => format!("  n_o {no:.6}  n_e {ne:.6}"),
            (_, _, Some(x), Some(y), Some(z)) => format!("  n_x {x:.6}  n_y {y:.6}  n_z {z:.6}"),
            _ => String::new(),
        };
        text.push_str(&format!(
            "{:<10} {:<38} {:<8} {}–{} nm{}\n           {}\n",
            r["key"].as_str().unwrap_or(""),
            r["name"].as_str().unwrap_or(""),
            r["sign"].as_str().or(r["kind"].as_str()).unwrap_or(""),
            r["range_nm"][0],
            r["range_nm"][1],
            idx,
            r["citation"].as_str().unwrap_or("")
        ));
        if let Some(t) = r["temperature"].as_object() {
            text.push_str(&format!(
                "           temperature data {}–{} °C: {}\n",
                t["range_c"][0],
                t["range_c"][1],
                t["thermo_optic_source"].as_str().unwrap_or("")
            ));
        }
        let sources = r["sources"].as_array().map_or(&[][..], Vec::as_slice);
        let listed: Vec<String> = sources
            .iter()
            .map(|s| {
                let default = if s["default"] == json!(true) { ", default" } else { "" };
                format!(
                    "{} ({}–{} nm, wavelengths fitted in: {}{default})",
                    s["key"].as_str().unwrap_or(""),
                    s["range_nm"][0],
                    s["range_nm"][1],
                    s["fitted_in"].as_str().unwrap_or("")
                )
            })
            .collect();
        if !listed.is_empty() {
            let noun = if listed.len() > 1 { "sources" } else { "source" };
            text.push_str(&format!("           {noun}: {}\n", listed.join("; ")));
        }
        if let Some(sp) = r["source_spread"].as_object() {
            let d: Vec<String> = sp["indices"]
                .as_array()
                .into_iter()
                .flatten()
                .filter_map(Value::as_f64)
                .map(|d| format!("{d:.1e}"))
                .collect();
            text.push_str(&format!(
                "           sources disagree by {} (indices), {:.1e} (birefringence)\n",
                d.join("  "),
                sp["birefringence"].as_f64().unwrap_or(0.0)
            ));
        }
        if let Some(g) = r["group_indices"].as_array() {
            let g: Vec<String> = g.iter().filter_map(Value::as_f64).map(|n| format!("{n:.6}")).collect();
            text.push_str(&format!("           group indices {}\n", g.join("  ")));
        }
        if let Some(rho) = r["rotatory_power_deg_per_mm"].as_f64() {
            text.push_str(&format!(
                "           rotatory power {rho:.3} °/mm along the optic axis (right-handed crystal)\n"
            ));
        }
        if let Some(m) = r["error"]["message"].as_str() {
            text.push_str(&format!("           n/a: {m}\n"));
        }
        for w in r["warnings"].as_array().into_iter().flatten() {
            text.push_str(&format!("           warning: {}\n", w.as_str().unwrap_or("")));
        }
    }
    Ok(output::out(&text))
}

/// Adds a material's principal indices at the listing's wavelength to its row, one field per
/// name, with `group_indices` in the same order and the evaluation's warnings. Where a formula
/// breaks down no index is listed: null, and the reason under `error`; where only the group index
/// has none (at wavelengths so extreme that λ² overflows), `group_indices` is null.
/// Adds each dispersion source's principal indices at the listing's wavelength (`indices` in
/// its entry of `sources`, null where its formula breaks down) and the sources' disagreement
/// there (`source_spread`: `{sources, indices, birefringence}`, null with fewer than two sources
/// whose range holds the wavelength).
fn list_sources(row: &mut Value, key: &str, w: Wavelength, indices_of: impl Fn(&str) -> Option<Vec<f64>>) {
    if let Some(sources) = row["sources"].as_array_mut() {
        for s in sources {
            let values = s["key"].as_str().and_then(&indices_of);
            s["indices"] = values.map_or(Value::Null, |v| json!(v));
        }
    }
    row["source_spread"] = match doublespar::source_spread(key, w) {
        Some(sp) => json!({"sources": sp.sources, "indices": sp.principal, "birefringence": sp.birefringence}),
        None => Value::Null,
    };
}

fn list_indices(
    row: &mut Value,
    names: &[&str],
    indices: Result<(Vec<f64>, Vec<String>), Error>,
    group: Result<Vec<f64>, Error>,
) {
    match indices {
        Ok((values, warnings)) => {
            for (name, n) in names.iter().zip(values) {
                row[*name] = json!(n);
            }
            row["group_indices"] = group.map_or(Value::Null, |g| json!(g));
            row["warnings"] = json!(warnings);
        }
        Err(e) => {
            for name in names {
                row[*name] = Value::Null;
            }
            row["group_indices"] = Value::Null;
            row["error"] = e.to_json();
        }
    }
}

fn cmd_draw(a: &[String]) -> Result<ExitCode, Usage> {
    let p = scan("draw", a, &|f| match f {
        "--dark" => Some(false),
        "--size" => Some(true),
        _ => None,
    })?;
    let (view, file) = match p.positionals.as_slice() {
        [v, f] => (v.clone(), f.clone()),
        [_, _, extra, ..] => return Err(Usage::new("draw", format!("unexpected word '{}'", args::quote(extra)))),
        _ => return Err(Usage::new("draw", "needs a view name and a scenario file (or -)")),
    };
    if !doublespar::VIEW_NAMES.contains(&view.as_str()) {
        return Err(Usage::new(
            "draw",
            format!(
                "unknown view '{}'; views: {}",
                args::quote(&view),
                doublespar::VIEW_NAMES.join(", ")
            ),
        ));
    }
    let mut size = (900.0, 420.0);
    if let Some(v) = p.value("--size") {
        let parsed = v
            .split_once('x')
            .and_then(|(w, h)| Some((w.parse::<f64>().ok()?, h.parse::<f64>().ok()?)));
        match parsed {
            Some((w, h)) if (50.0..=10000.0).contains(&w) && (50.0..=10000.0).contains(&h) => size = (w, h),
            _ => {
                return Err(Usage::new(
                    "draw",
                    format!(
                        "--size takes WIDTHxHEIGHT in pixels, 50 to 10000 each, not '{}'",
                        args::quote(v)
                    ),
                ));
            }
        }
    }
    let result = read_input(&file)
        .and_then(|t| Scenario::from_json_str(&t))
        .and_then(|s| {
            let r = doublespar::trace_scenario(&s)?;
            doublespar::build_view(&view, &s, &r)
        });
    Ok(match result {
        Err(e) => fail(&e, false),
        Ok(scene) => {
            let palette = doublespar::Palette::for_scheme(p.has("--dark"));
            output::out(&doublespar::to_svg(&scene, size.0, size.1, &palette))
        }
    })
}

fn cmd_demo(a: &[String]) -> Result<ExitCode, Usage> {
    let p = scan("demo", a, &|_| None)?;
    if let Some(extra) = p.positionals.first() {
        return Err(Usage::new("demo", format!("unexpected word '{}'", args::quote(extra))));
    }
    Ok(output::out(DEMO))
}

fn cmd_help(a: &[String]) -> Result<ExitCode, Usage> {
    match a {
        [] => Ok(output::out(&help::text(None).unwrap_or_default())),
        [c] => match help::text(Some(c)) {
            Some(t) => Ok(output::out(&t)),
            None => Err(Usage::new(
                "help",
                format!(
                    "unknown command '{}'; commands: {}",
                    args::quote(c),
                    help::COMMANDS.join(", ")
                ),
            )),
        },
        [_, extra, ..] => Err(Usage::new("help", format!("unexpected word '{}'", args::quote(extra)))),
    }
}

fn main() -> ExitCode {
    let all: Vec<String> = std::env::args().skip(1).collect();
    let Some(command) = all.first() else {
        output::err(&help::text(None).unwrap_or_default());
        return Usage::new("", "no command given").report();
    };
    let rest = &all[1..];
    let run: fn(&[String]) -> Result<ExitCode, Usage> = match command.as_str() {
        "--help" | "-h" => return output::out(&help::text(None).unwrap_or_default()),
        "--version" | "-V" => return output::out(&format!("doublespar {}\n", env!("CARGO_PKG_VERSION"))),
        "trace" => cmd_trace,
        "draw" => cmd_draw,
        "design" => cmd_design,
        "materials" => cmd_materials,
        "demo" => cmd_demo,
        "help" => cmd_help,
        other => {
            return Usage::new(
                "",
                format!(
                    "unknown command '{}'; commands: {}",
                    args::quote(other),
                    help::COMMANDS.join(", ")
                ),
            )
            .report();
        }
    };
    if args::wants_help(rest) {
        return output::out(&help::text(Some(command)).unwrap_or_default());
    }
    run(rest).unwrap_or_else(|u| u.report())
}
