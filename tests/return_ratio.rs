//! The loop gain two ways: by breaking stage 1's transconductance in its own
//! circuit (`ReturnRatio`), and from the closed loop's factors by the
//! Sherman–Morrison formula (the response's `loop_gain`). The rank-one update is
//! exact algebra, so the two agree to rounding.

use halfrail::analysis::{frequencies, stability::ReturnRatio, Linearised};
use halfrail::doc::{load, DEMO};
use halfrail::part::preset;

#[test]
fn the_rank_one_loop_gain_is_the_broken_circuits() {
    let doc = load(DEMO).unwrap();
    let (demo, stage) = doc.part_and_stage().unwrap();
    for part in [demo, preset("buffered-5v").unwrap().part.clone()] {
        let lin = Linearised::new(&part, &stage, 50.0).unwrap();
        let ratio = ReturnRatio::new(&lin).unwrap();
        for f in frequencies(1e2, 1e10, 10) {
            let direct = ratio.at(f).unwrap();
            let shared = lin.at(f, &stage).unwrap().loop_gain.unwrap();
            assert!((direct - shared).norm() <= 1e-9 * direct.norm().max(1e-6), "{f} Hz: {direct} vs {shared}");
        }
    }
}
