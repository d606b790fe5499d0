//! Native benchmark of convergent light, run by `cargo bench --bench conoscope` (see
//! `scripts/bench.sh`): a 256 × 256 conoscopic figure of a 10 mm c-cut quartz plate between
//! crossed polarizers (`scripts/bench/conoscope.json`), every pixel inside the 30° cone an exact
//! plane-wave solution of the stack (`doublespar::conoscope_of`), scenario resolved each run.
//! The median of 9 runs is printed, with the sum of the map as a checksum, then one JSON line.
//! Reported, never asserted.

use doublespar::{ConoscopeQuantity, Scenario, conoscope_of};
use std::hint::black_box;
use std::time::Instant;

fn main() {
    let sc = Scenario::from_json_str(include_str!("../scripts/bench/conoscope.json")).unwrap();
    let pixels = if std::env::args().any(|a| a == "--bench") {
        256
    } else {
        16
    };
    let mut times = Vec::new();
    let mut sum = 0.0;
    for _ in 0..9 {
        let t = Instant::now();
        let map = conoscope_of(black_box(&sc), ConoscopeQuantity::Transmission, 30.0, pixels).unwrap();
        times.push(t.elapsed().as_secs_f64() * 1e3);
        sum = map.values.iter().flatten().sum::<f64>();
    }
    times.sort_by(f64::total_cmp);
    let ms = times[times.len() / 2];
    println!("conoscopic figure, {pixels}x{pixels}, 30° cone: {ms:.2} ms (checksum {sum:.12e})");
    println!("{{\"bench\":\"doublespar-conoscope\",\"conoscope_{pixels}_ms\":{ms:.4},\"conoscope_checksum\":{sum:e}}}");
}
