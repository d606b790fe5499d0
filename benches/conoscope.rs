//! Native benchmark of convergent light, run by `cargo bench --bench conoscope` (see
//! `scripts/bench.sh`): a 256 × 256 conoscopic figure of a 10 mm c-cut quartz plate between
//! crossed polarizers (`scripts/bench/conoscope.json`), every pixel inside the 30° cone an exact
//! plane-wave solution of the stack (`doublespar::conoscope_of`), scenario resolved each run; and
//! the figure of the twisted-nematic cell (`examples/twisted-nematic-cell.json`, its 100 slices
//! solved again at every direction) at 48 × 48 and at the cell's cap
//! (`doublespar::MAX_PIXELS_WITH_CELL`); and the plate's figure in white light at 256 × 256
//! (`doublespar::white_light_of`, 81 wavelengths a direction); and general crystals, each
//! direction's modes those of the 4×4 system: a KTP plate with its principal axes turned and the
//! same quartz plate with its optical activity, both between crossed polarizers, asked for at
//! 192 and 256 per side, and in white light at 48, 96 and 128, each reported at the side drawn
//! (the core caps a general crystal's figures: `doublespar::MAX_PIXELS_GENERAL`,
//! `doublespar::MAX_PIXELS_WHITE_GENERAL`); `-- general` runs these alone. The median of
//! 9 runs (3 in white light) is printed, with the sum of the map (of the colours' XYZ in white
//! light) as a checksum, then one JSON line. Reported, never asserted.

use doublespar::{ConoscopeQuantity, MAX_PIXELS_WITH_CELL, Scenario, conoscope_of, white_light_of};
use std::hint::black_box;
use std::time::Instant;

/// A timed figure of a scenario at a size: its median time (ms), checksum and side.
type Timer = fn(&Scenario, usize) -> (f64, f64, usize);

/// Median time (ms) of `runs` runs of `figure`, which returns its checksum and its side, and
/// the last run's checksum and side.
fn median(runs: usize, mut figure: impl FnMut() -> (f64, usize)) -> (f64, f64, usize) {
    let mut times = Vec::new();
    let (mut sum, mut side) = (0.0, 0);
    for _ in 0..runs {
        let t = Instant::now();
        (sum, side) = figure();
        times.push(t.elapsed().as_secs_f64() * 1e3);
    }
    times.sort_by(f64::total_cmp);
    (times[runs / 2], sum, side)
}

/// Median time (ms) of 9 maps of `sc` at `pixels` per side, the last map's checksum (the sum of
/// its values) and its side (below `pixels` where the core caps it).
fn time(sc: &Scenario, pixels: usize) -> (f64, f64, usize) {
    median(9, || {
        let map = conoscope_of(black_box(sc), ConoscopeQuantity::Transmission, 30.0, pixels).unwrap();
        (map.values.iter().flatten().sum::<f64>(), map.pixels)
    })
}

/// Median time (ms) of 3 white-light figures of `sc` at `pixels` per side, the last one's
/// checksum (the sum of its colours' XYZ) and its side.
fn time_white(sc: &Scenario, pixels: usize) -> (f64, f64, usize) {
    median(3, || {
        let map = white_light_of(black_box(sc), 30.0, pixels).unwrap();
        (
            map.colours.iter().flatten().flat_map(|c| c.xyz).sum::<f64>(),
            map.pixels,
        )
    })
}

/// A KTP plate with its principal axes turned, between crossed polarizers (as in
/// tests/conoscope_general.rs).
const KTP: &str = r#"{"version": 2, "wavelength_nm": 1064, "beam": {"polarization": {"kind": "linear", "azimuth_deg": 0}},
    "elements": [{"kind": "crystal", "material": "ktp", "thickness_mm": 0.2, "axes": {"tilt_deg": 30, "azimuth_deg": 20, "roll_deg": 15}},
                 {"kind": "polarizer", "transmission_axis_deg": 90}]}"#;

/// The general crystals' figures (see the header): prints each and returns their JSON fields,
/// each led by a comma.
fn general_crystals(full: bool) -> String {
    let active = Scenario::from_json_str(
        &include_str!("../scripts/bench/conoscope.json").replace(r#""optical_activity": false, "#, ""),
    )
    .unwrap();
    let ktp = Scenario::from_json_str(KTP).unwrap();
    let (mono, white): (&[usize], &[usize]) = if full {
        (&[192, 256], &[48, 96, 128])
    } else {
        (&[8], &[4])
    };
    let mut general = String::new();
    for (name, sc) in [("ktp", &ktp), ("active_quartz", &active)] {
        let kinds: [(&str, &str, &[usize], Timer); 2] = [
            ("figure", "conoscope", mono, time),
            ("white-light figure", "white", white, time_white),
        ];
        for (what, key, sizes, timer) in kinds {
            let mut done = Vec::new();
            for &pixels in sizes {
                let (ms, sum, side) = timer(sc, pixels);
                if !done.contains(&side) {
                    println!("{name} {what}, {side}x{side}: {ms:.2} ms (checksum {sum:.12e})");
                    general += &format!(",\"{name}_{key}_{side}_ms\":{ms:.4},\"{name}_{key}_checksum_{side}\":{sum:e}");
                    done.push(side);
                }
            }
        }
    }
    general
}

fn main() {
    if std::env::args().any(|a| a == "general") {
        // `cargo bench --bench conoscope -- general`: the general crystals alone.
        let full = std::env::args().any(|a| a == "--bench");
        println!(
            "{{\"bench\":\"doublespar-conoscope-general\"{}}}",
            general_crystals(full)
        );
        return;
    }
    let sc = Scenario::from_json_str(include_str!("../scripts/bench/conoscope.json")).unwrap();
    let cell = Scenario::from_json_str(include_str!("../examples/twisted-nematic-cell.json")).unwrap();
    let full = std::env::args().any(|a| a == "--bench");
    let pixels = if full { 256 } else { 16 };
    let (ms, sum, _) = time(&sc, pixels);
    println!("conoscopic figure, {pixels}x{pixels}, 30° cone: {ms:.2} ms (checksum {sum:.12e})");
    let (cell_small, cap) = if full { (48, MAX_PIXELS_WITH_CELL) } else { (8, 8) };
    let (ms48, sum48, _) = time(&cell, cell_small);
    println!("twisted-nematic cell's figure, {cell_small}x{cell_small}: {ms48:.2} ms (checksum {sum48:.12e})");
    let (ms_cap, sum_cap, _) = time(&cell, cap);
    println!("twisted-nematic cell's figure at the cap, {cap}x{cap}: {ms_cap:.2} ms (checksum {sum_cap:.12e})");
    let white = if full { 256 } else { 8 };
    let (ms_white, white_sum, _) = time_white(&sc, white);
    println!("white-light figure, {white}x{white}: {ms_white:.2} ms (checksum of XYZ {white_sum:.12e})");
    let general = general_crystals(full);
    println!(
        "{{\"bench\":\"doublespar-conoscope\",\"conoscope_{pixels}_ms\":{ms:.4},\"conoscope_checksum\":{sum:e},\
         \"cell_conoscope_{cell_small}_ms\":{ms48:.4},\"cell_conoscope_cap_{cap}_ms\":{ms_cap:.4},\"cell_checksum\":{sum_cap:e},\"white_conoscope_{white}_ms\":{ms_white:.4},\"white_checksum\":{white_sum:e}{general}}}"
    );
}
