//! The E-series against IEC 60063's tables, and the look-ups built on them.
//! The tables below are typed independently of the crate's (IEC 60063, from memory).

use halfrail::values::{nearest, ratio_pairs, series_of, standard_value, Series};
use proptest::prelude::*;

const E6: [u16; 6] = [10, 15, 22, 33, 47, 68];
const E12: [u16; 12] = [10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82];
const E24: [u16; 24] = [
    10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
];
const E48: [u16; 48] = [
    100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237, 249, 261, 274,
    287, 301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590, 619, 649, 681, 715, 750, 787,
    825, 866, 909, 953,
];
const E96: [u16; 96] = [
    100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154, 158, 162, 165,
    169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243, 249, 255, 261, 267, 274, 280,
    287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383, 392, 402, 412, 422, 432, 442, 453, 464, 475,
    487, 499, 511, 523, 536, 549, 562, 576, 590, 604, 619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806,
    825, 845, 866, 887, 909, 931, 953, 976,
];

#[test]
fn tables_match_the_standard() {
    assert_eq!(Series::E3.mantissas(), [10, 22, 47]);
    assert_eq!(Series::E6.mantissas(), E6);
    assert_eq!(Series::E12.mantissas(), E12);
    assert_eq!(Series::E24.mantissas(), E24);
    assert_eq!(Series::E48.mantissas(), E48);
    assert_eq!(Series::E96.mantissas(), E96);
    let e192 = Series::E192.mantissas();
    assert_eq!(e192.len(), 192);
    // E96 is every other E192 value; the rest are the standard's own in-between values.
    for (i, m) in E96.iter().enumerate() {
        assert_eq!(e192[2 * i], *m);
    }
    for s in Series::ALL {
        assert_eq!(s.mantissas().len(), s.count(), "{s:?}");
        assert!(s.mantissas().windows(2).all(|w| w[0] < w[1]), "{s:?} ascends");
    }
}

/// The values of a series that differ from the rounded geometric progression
/// round(10^(i/n)), which the standard's tables do not follow everywhere.
fn departures(series: Series) -> Vec<u16> {
    let n = series.count() as f64;
    let scale = 10f64.powi(series.digits() as i32 - 1);
    series
        .mantissas()
        .into_iter()
        .enumerate()
        .filter(|&(i, m)| (10f64.powf(i as f64 / n) * scale).round() as u16 != m)
        .map(|(_, m)| m)
        .collect()
}

#[test]
fn irregular_values_are_those_of_the_standard() {
    // E24's 2.7 … 4.7 and 8.2 are not the rounded 10^(i/24) (which gives 2.6, 2.9, 3.2,
    // 3.5, 3.8, 4.2, 4.6 and 8.3); E192's 9.20 is not the rounded 9.19 (IEC 60063,
    // from memory). E48 and E96 follow the formula throughout.
    assert_eq!(departures(Series::E24), [27, 30, 33, 36, 39, 43, 47, 82]);
    assert_eq!(departures(Series::E192), [920]);
    assert_eq!(departures(Series::E96), Vec::<u16>::new());
    assert_eq!(departures(Series::E48), Vec::<u16>::new());
    assert_eq!(departures(Series::E12), [27, 33, 39, 47, 82]);
}

#[test]
fn tolerance_classes() {
    // IEC 60063 pairs E6 with ±20 %, E12 ±10 %, E24 ±5 %, E48 ±2 %, E96 ±1 %, E192 ±0.5 %
    // and tighter (from memory).
    let usual: Vec<f64> = Series::ALL.iter().map(|s| s.tolerances_pct()[0]).collect();
    assert_eq!(usual, [40.0, 20.0, 10.0, 5.0, 2.0, 1.0, 0.5]);
}

#[test]
fn nearest_either_side_and_across_decades() {
    let n = nearest(5000.0, Series::E24).unwrap();
    assert_eq!((n.below, n.nearest, n.above), (4700.0, 5100.0, 5100.0));
    assert!((n.error_pct - 2.0).abs() < 1e-12);
    // Just under a decade boundary the value above is the next decade's first.
    let n = nearest(9.6e3, Series::E12).unwrap();
    assert_eq!((n.below, n.above, n.nearest), (8.2e3, 10e3, 10e3));
    let n = nearest(0.95e-9, Series::E6).unwrap();
    assert_eq!((n.below, n.above), (0.68e-9, 1e-9));
    // Exactly on a value, all three are that value.
    let n = nearest(4.7e-6, Series::E6).unwrap();
    assert_eq!((n.below, n.nearest, n.above, n.error_pct), (4.7e-6, 4.7e-6, 4.7e-6, 0.0));
    // Nearest is by ratio: between 1.0 and 1.5 the split is the geometric mean 1.2247,
    // not the arithmetic 1.25, so 1.235 goes to 1.5 and 1.22 to 1.0.
    assert_eq!(nearest(1.235, Series::E6).unwrap().nearest, 1.5);
    assert_eq!(nearest(1.22, Series::E6).unwrap().nearest, 1.0);
}

#[test]
fn membership() {
    // 4.7 is in every series from E3 to E24, and 470 is one of E192's own values.
    assert_eq!(series_of(4700.0).unwrap(), [Series::E3, Series::E6, Series::E12, Series::E24, Series::E192]);
    assert_eq!(series_of(5.11e3).unwrap(), [Series::E48, Series::E96, Series::E192]);
    assert_eq!(series_of(9.2).unwrap(), [Series::E192]);
    assert_eq!(series_of(1.0).unwrap(), Series::ALL);
    assert!(series_of(5000.0).unwrap().is_empty());
    assert!(series_of(0.0).is_err());
    assert!(series_of(-1.0).is_err());
    assert!(series_of(f64::NAN).is_err());
}

#[test]
fn ratio_finder() {
    let pairs = ratio_pairs(2.2, Series::E12, 5).unwrap();
    assert_eq!(pairs.len(), 5);
    assert_eq!(pairs[0].error_pct, 0.0);
    assert!(pairs.windows(2).all(|w| w[0].error_pct.abs() <= w[1].error_pct.abs()), "best first");
    // Brute force over every pair in two decades agrees with the best found.
    for wanted in [0.137, 1.0, 3.7, 4.5, 12.34, 99.0] {
        for series in [Series::E6, Series::E24, Series::E96] {
            let best = ratio_pairs(wanted, series, 1).unwrap()[0];
            let decade = series.decade();
            let all: Vec<f64> = (-3..=3).flat_map(|d| decade.iter().map(move |v| v * 10f64.powi(d))).collect();
            let brute = decade
                .iter()
                .flat_map(|den| all.iter().map(move |num| ((num / den - wanted) / wanted).abs()))
                .fold(f64::INFINITY, f64::min);
            assert!((best.error_pct.abs() / 100.0 - brute).abs() < 1e-9, "{wanted} {series:?}");
        }
    }
    assert!(ratio_pairs(0.0, Series::E24, 3).is_err());
    assert!(ratio_pairs(f64::INFINITY, Series::E24, 3).is_err());
}

proptest! {
    /// Over the whole range, below ≤ value ≤ above, both are members, nearest is one
    /// of them and the nearer by ratio.
    #[test]
    fn look_up_brackets(mantissa in 1.0f64..10.0, exponent in -15i32..12, which in 0usize..7) {
        let series = Series::ALL[which];
        let value = mantissa * 10f64.powi(exponent);
        let n = nearest(value, series).unwrap();
        prop_assert!(n.below <= value && value <= n.above);
        prop_assert!(n.nearest == n.below || n.nearest == n.above);
        prop_assert!(series_of(n.below).unwrap().contains(&series));
        prop_assert!(series_of(n.above).unwrap().contains(&series));
        let other = if n.nearest == n.below { n.above } else { n.below };
        prop_assert!((value / n.nearest).ln().abs() <= (value / other).ln().abs() + 1e-12);
        // Neighbours are adjacent: nothing of the series lies strictly between them.
        let mid = (n.below * n.above).sqrt();
        if n.below < n.above {
            let m = nearest(mid, series).unwrap();
            prop_assert!(m.below == n.below || m.above == n.above);
        }
    }

    /// A standard value built from digits is found exactly.
    #[test]
    fn standard_values_are_found(index in 0usize..192, exponent in -14i32..10) {
        let mantissa = Series::E192.mantissas()[index];
        let value = standard_value(mantissa, exponent);
        prop_assert_eq!(nearest(value, Series::E192).unwrap().nearest, value);
    }
}
