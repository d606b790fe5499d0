//! The help texts: `doublespar help`, `doublespar help COMMAND` and `COMMAND --help`.
//!
//! Each command has one text: what it does, its words and flags with units and defaults, and an
//! example that works as written. The design flags are listed from the same table that reads
//! them ([`crate::design_flags`]), so the help cannot drift from what is accepted.

use crate::design_flags;
use doublespar::VIEW_NAMES;

/// The commands, in the order the overview lists them.
pub const COMMANDS: [&str; 6] = ["trace", "draw", "design", "materials", "demo", "help"];

const OVERVIEW: &str = "doublespar — exact double refraction in birefringent crystals

usage: doublespar COMMAND [ARGUMENTS]

commands:
  trace FILE|-       trace a scenario; JSON result, or a table with --table
  draw VIEW FILE|-   draw one view of a scenario as an SVG document
  design KIND ...    design a part (displacer, waveplate, achromat, recombiner,
                     angular-splitter, prism-polarizer, tilt-tuning, quartz-rotator,
                     athermal-waveplate, birefringent-filter, broadband-retarder,
                     lc-voltage)
                     from flags or from a JSON request file
  materials          the crystal catalogue with citations, optionally indices at --at NM
  demo               print the demo scenario (a starting point for your own)
  help [COMMAND]     this overview, or the help of one command

  doublespar --version   the version

A scenario is one JSON document (see README.md); '-' reads it from standard input.
Errors in a document print {\"error\": {\"field\", \"message\"}} and exit with status 2;
so does a mistake on the command line, with a message on standard error.

Try:
  doublespar demo > demo.json && doublespar trace demo.json --table
  doublespar design displacer --material calcite --separation-mm 1 --table

Results are design guidance; laser work follows local regulations and licensed practice.
";

const TRACE: &str = "usage: doublespar trace FILE|- [--table] [--pretty]

Traces a scenario (a JSON file, or - for standard input) through its stack and prints the
result as JSON on one line: every output ray with its power, position, direction and
polarization, the spots where rays coincide, per-element reports and warnings.

  --table    a readable table instead of JSON (errors then go to standard error as text)
  --pretty   indented JSON

Example:
  doublespar demo | doublespar trace - --table
";

const MATERIALS: &str = "usage: doublespar materials [--at NM] [--temperature C] [--json]

Lists the crystal catalogue: key, name, optical sign (uniaxial crystals) or the word biaxial,
the wavelength range of its dispersion formula and the publication it comes from. Keys may be
written in any case in scenarios, design requests and flags (\"YVO4\" is yvo4); results echo
the lower-case key.

  --at NM    also the principal indices at NM nanometres: n_o and n_e (uniaxial), or
             n_x < n_y < n_z on the formula's dielectric axes (biaxial), and the group
             indices n - λ dn/dλ of the same principal axes, in the same order; for
             quartz also its rotatory power along the optic axis (°/mm, right-handed)
  --temperature C
             those indices at C °C (default 20; -200 to 500), from each crystal's
             temperature data (its range, source and thermal expansion are listed)
  --json     the list as JSON

Example:
  doublespar materials --at 1064
";

const DEMO: &str = "usage: doublespar demo

Prints the demo scenario (a 12.5 mm calcite beam displacer lit at 632.8 nm by light
polarized at 45°) as JSON: a starting point to edit and trace.

Example:
  doublespar demo > mine.json
";

const HELP: &str = "usage: doublespar help [COMMAND]

Prints the overview, or the help of COMMAND (one of trace, draw, design, materials, demo,
help). Every command also takes --help or -h.
";

fn draw() -> String {
    format!(
        "usage: doublespar draw VIEW FILE|- [--size WIDTHxHEIGHT] [--dark]

Traces a scenario and prints one view as an SVG document on standard output.

VIEW is one of:
  {}
  side            the stack seen from the side: the x–z plane (z to the right, x up)
  side-yz         the y–z plane (z to the right, y up): shows walk-off along y
  side-walkoff    the plane holding z and the first crystal's e-ray walk-off direction,
                  so the first crystal's separation is always in the drawing
  end             the output spots as seen looking back toward the source
  poincare        input and output polarization states on the Poincaré sphere
  walkoff-tilt, separation-wavelength, retardance-wavelength
                  plots for the first crystal of the stack
  split-wavelength, split-incidence
                  the whole set-up's split angle (largest angle between output beams)
  retardance-temperature, separation-temperature
                  plots for the first crystal of the stack alone, −40 to 100 °C or wider
  conoscope       the set-up in convergent light: its transmission over a 30° cone
                  (isogyres and isochromes), each direction an exact plane-wave solution
  acceptance      the first crystal's retardance error against direction over that cone

  --size WxH   picture size in pixels, 50 to 10000 each [900x420]
  --dark       the dark palette

Example:
  doublespar demo | doublespar draw side-walkoff - > side.svg
",
        VIEW_NAMES.join(", ")
    )
}

fn design() -> String {
    let mut s = String::from(
        "usage: doublespar design KIND [FLAGS] [--table]
       doublespar design FILE|- [--table]

Solves a design request and prints the answer as JSON: the part to order, how it performs,
its tolerances and notes, and a scenario that loads the part into trace and the page.
The request comes from flags after the kind, or from a JSON file (fields in DEVELOPERS.md,
\"Design requests\"); the flags fill the same fields, so both forms give the same answer.
A flag's value may follow it or an = sign: --separation-mm 1 or --separation-mm=1.

  --table    a report to read top-down (what to order, performance, tolerances, notes)
             instead of JSON

KIND is displacer, waveplate, achromat, recombiner, angular-splitter, prism-polarizer,
tilt-tuning, quartz-rotator, athermal-waveplate, birefringent-filter, broadband-retarder or
lc-voltage. A file named like a kind is read as ./NAME. A broadband retarder of plates of
different crystals, or of biaxial plates cut each its own way, is asked in a JSON file
(\"materials\": [\"quartz\", {\"material\": \"ktp\", \"cut\": \"x\"}, \"quartz\"]).
",
    );
    for kind in doublespar::DESIGN_KINDS {
        s.push_str(&format!("\n{kind} flags:\n"));
        for f in design_flags::flags_of(kind).unwrap_or_default() {
            let head = match f.kind {
                design_flags::Kind::Number => format!("--{} X", f.name),
                design_flags::Kind::Text => format!("--{} WORD", f.name),
                design_flags::Kind::Pair => format!("--{} A,B", f.name),
            };
            s.push_str(&format!("  {head:<30} {}\n", f.help));
        }
    }
    s.push_str(
        "
Examples:
  doublespar design displacer --material yvo4 --wavelength-nm 1064 --separation-mm 1 --table
  doublespar design waveplate --material quartz --retardance-waves 0.25 --order zero
  doublespar design achromat --first-material quartz --second-material mgf2 \\
      --retardance-waves 0.25 --wavelengths-nm 500,900
  doublespar design recombiner --material yvo4 --wavelength-nm 1064 --length-mm 8
  doublespar design angular-splitter --material calcite --split-angle-deg 10 --table
  doublespar design prism-polarizer --material calcite --aperture-mm 10
  doublespar design tilt-tuning --material quartz --thickness-mm 0.5 --retardance-waves 0.25 \\
      --tilt-azimuth-deg 90
  doublespar design quartz-rotator --rotation-deg 90 --wavelength-nm 632.8 --table
  doublespar design athermal-waveplate --first-material quartz --second-material mgf2 \\
      --retardance-waves 0.5 --acceptance-error-waves 0.001 --table
  doublespar design birefringent-filter --material quartz --wavelength-nm 656.3 \\
      --bandwidth-nm 0.5 --stages 5 --table
  doublespar design broadband-retarder --material quartz --plates 3 --retardance-waves 0.5 \\
      --band-nm 450,800 --table
  doublespar design request.json --table
",
    );
    s
}

/// The help text of `command` (the overview for `None`), or `None` for an unknown command.
pub fn text(command: Option<&str>) -> Option<String> {
    Some(match command {
        None => OVERVIEW.to_string(),
        Some("trace") => TRACE.to_string(),
        Some("draw") => draw(),
        Some("design") => design(),
        Some("materials") => MATERIALS.to_string(),
        Some("demo") => DEMO.to_string(),
        Some("help") => HELP.to_string(),
        Some(_) => return None,
    })
}
