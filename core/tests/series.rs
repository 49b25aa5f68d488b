//! The IEC 60063 series, checked against the standard's own facts. Every value of every series
//! is also compared with the PyPI package `eseries` in tests/reference (series_eseries.rs).

use railnote_core::series::Series;

/// The only test code that asks a series for values: the values of `series` from `low` to
/// `high` must be `expected` (exact f64 equality: each value is one exact integer scaled by one
/// exact power of ten).
fn check(series: Series, low: f64, high: f64, expected: &[f64]) {
    assert_eq!(
        series.values_in(low, high),
        expected,
        "{series:?} {low}..{high}"
    );
}

#[test]
fn e3_to_e12_keep_their_historic_values() {
    // IEC 60063 table 1: E3 1.0 2.2 4.7; E6 adds 1.5 3.3 6.8; E12 adds 1.2 1.8 2.7 3.9 5.6 8.2.
    check(Series::E3, 1.0, 9.99, &[1.0, 2.2, 4.7]);
    check(Series::E6, 1.0, 9.99, &[1.0, 1.5, 2.2, 3.3, 4.7, 6.8]);
    check(
        Series::E12,
        10.0,
        99.9,
        &[10., 12., 15., 18., 22., 27., 33., 39., 47., 56., 68., 82.],
    );
}

#[test]
fn e24_differs_from_rounded_geometric_values_where_the_standard_says() {
    // IEC 60063 table 1: 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 are not 10^(i/24) rounded
    // (2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6, 8.3).
    let e24 = Series::E24.values_in(1.0, 9.99);
    for (historic, geometric) in [
        (2.7, 2.6),
        (3.0, 2.9),
        (3.3, 3.2),
        (3.6, 3.5),
        (3.9, 3.8),
        (4.3, 4.2),
        (4.7, 4.6),
        (8.2, 8.3),
    ] {
        assert!(e24.contains(&historic), "{historic}");
        assert!(!e24.contains(&geometric), "{geometric}");
    }
    assert_eq!(e24.len(), 24);
}

#[test]
fn e192_keeps_920() {
    // IEC 60063 table 2: 9.20 in E192 where 10^(185/192) rounds to 9.19.
    assert!(Series::E192.contains(920.0));
    assert!(!Series::E192.contains(919.0));
    check(Series::E192, 900.0, 940.0, &[909., 920., 931.]);
}

#[test]
fn each_series_has_n_values_per_decade_across_decades() {
    for s in Series::ALL {
        let n = s.per_decade();
        assert_eq!(s.values_in(1.0, 9.999).len(), n, "{s:?}");
        // 1 kΩ to 1 MΩ inclusive: three decades and the closing 1 MΩ.
        assert_eq!(s.values_in(1e3, 1e6).len(), 3 * n + 1, "{s:?}");
    }
    // Coarser series are subsets of finer ones (IEC 60063: E48 ⊂ E96 ⊂ E192, E3 ⊂ … ⊂ E24).
    for pair in [
        (Series::E3, Series::E6),
        (Series::E6, Series::E12),
        (Series::E12, Series::E24),
        (Series::E48, Series::E96),
        (Series::E96, Series::E192),
    ] {
        for v in pair.0.values_in(1.0, 10.0) {
            assert!(
                pair.1.contains(v),
                "{v} of {:?} not in {:?}",
                pair.0,
                pair.1
            );
        }
    }
}

#[test]
fn membership_neighbours_and_nearest() {
    assert!(Series::E24.contains(4700.0));
    assert!(Series::E24.contains(4.7e6));
    assert!(Series::E24.contains(0.47));
    assert!(!Series::E24.contains(4750.0));
    assert!(Series::E96.contains(4750.0));
    assert!(!Series::E24.contains(f64::NAN));
    assert!(!Series::E24.contains(-4700.0));
    assert_eq!(Series::E24.neighbours(4800.0), Some((4700.0, 5100.0)));
    assert_eq!(Series::E24.neighbours(4700.0), Some((4700.0, 4700.0)));
    assert_eq!(Series::E24.neighbours(9500.0), Some((9100.0, 10_000.0)));
    assert_eq!(Series::E24.nearest(4800.0), Some(4700.0));
    assert_eq!(Series::E24.nearest(5000.0), Some(5100.0));
    assert_eq!(Series::coarsest_containing(4700.0), Some(Series::E3));
    assert_eq!(Series::coarsest_containing(3300.0), Some(Series::E6));
    assert_eq!(Series::coarsest_containing(24_000.0), Some(Series::E24));
    assert_eq!(Series::coarsest_containing(31_600.0), Some(Series::E48));
    assert_eq!(Series::coarsest_containing(32_000.0), Some(Series::E192));
    assert_eq!(Series::coarsest_containing(31_234.0), None);
    assert_eq!(Series::from_name("E96"), Some(Series::E96));
    assert_eq!(Series::from_name("E25"), None);
}
