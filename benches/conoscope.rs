//! Native benchmark of convergent light, run by `cargo bench --bench conoscope` (see
//! `scripts/bench.sh`): a 256 × 256 conoscopic figure of a 10 mm c-cut quartz plate between
//! crossed polarizers (`scripts/bench/conoscope.json`), every pixel inside the 30° cone an exact
//! plane-wave solution of the stack (`doublespar::conoscope_of`), scenario resolved each run; and
//! the figure of the twisted-nematic cell (`examples/twisted-nematic-cell.json`, its 100 slices
//! solved again at every direction) at 48 × 48 and at the cell's cap
//! (`doublespar::MAX_PIXELS_WITH_CELL`); and the plate's figure in white light at 256 × 256
//! (`doublespar::white_light_of`, 81 wavelengths a direction). The median of 9 runs (3 in white
//! light) is printed, with the sum of the map (of the colours' XYZ in white light) as a checksum, then one JSON line. Reported, never
//! asserted.

use doublespar::{ConoscopeQuantity, MAX_PIXELS_WITH_CELL, Scenario, conoscope_of, white_light_of};
use std::hint::black_box;
use std::time::Instant;

/// Median time (ms) of 9 maps of `sc` at `pixels` per side, and the last map's checksum.
fn time(sc: &Scenario, pixels: usize) -> (f64, f64) {
    let mut times = Vec::new();
    let mut sum = 0.0;
    for _ in 0..9 {
        let t = Instant::now();
        let map = conoscope_of(black_box(sc), ConoscopeQuantity::Transmission, 30.0, pixels).unwrap();
        times.push(t.elapsed().as_secs_f64() * 1e3);
        sum = map.values.iter().flatten().sum::<f64>();
    }
    times.sort_by(f64::total_cmp);
    (times[times.len() / 2], sum)
}

fn main() {
    let sc = Scenario::from_json_str(include_str!("../scripts/bench/conoscope.json")).unwrap();
    let cell = Scenario::from_json_str(include_str!("../examples/twisted-nematic-cell.json")).unwrap();
    let full = std::env::args().any(|a| a == "--bench");
    let pixels = if full { 256 } else { 16 };
    let (ms, sum) = time(&sc, pixels);
    println!("conoscopic figure, {pixels}x{pixels}, 30° cone: {ms:.2} ms (checksum {sum:.12e})");
    let (cell_small, cap) = if full { (48, MAX_PIXELS_WITH_CELL) } else { (8, 8) };
    let (ms48, sum48) = time(&cell, cell_small);
    println!("twisted-nematic cell's figure, {cell_small}x{cell_small}: {ms48:.2} ms (checksum {sum48:.12e})");
    let (ms_cap, sum_cap) = time(&cell, cap);
    println!("twisted-nematic cell's figure at the cap, {cap}x{cap}: {ms_cap:.2} ms (checksum {sum_cap:.12e})");
    let white = if full { 256 } else { 8 };
    let mut times = Vec::new();
    let mut white_sum = 0.0;
    for _ in 0..3 {
        let t = Instant::now();
        let map = white_light_of(black_box(&sc), 30.0, white).unwrap();
        times.push(t.elapsed().as_secs_f64() * 1e3);
        white_sum = map.colours.iter().flatten().flat_map(|c| c.xyz).sum::<f64>();
    }
    times.sort_by(f64::total_cmp);
    let ms_white = times[1];
    println!("white-light figure, {white}x{white}: {ms_white:.2} ms (checksum of XYZ {white_sum:.12e})");
    println!(
        "{{\"bench\":\"doublespar-conoscope\",\"conoscope_{pixels}_ms\":{ms:.4},\"conoscope_checksum\":{sum:e},\
         \"cell_conoscope_{cell_small}_ms\":{ms48:.4},\"cell_conoscope_cap_{cap}_ms\":{ms_cap:.4},\"cell_checksum\":{sum_cap:e},\"white_conoscope_{white}_ms\":{ms_white:.4},\"white_checksum\":{white_sum:e}}}"
    );
}
