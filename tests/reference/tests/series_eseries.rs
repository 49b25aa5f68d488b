//! Core's IEC 60063 series against the PyPI package `eseries` (1.2.1), value by value.
//!
//! `eseries` is a separate implementation of the standard's tables; a Python process prints
//! every value of every series from 1 Ω to 10 MΩ (`eseries.erange`), and each must equal core's
//! `Series::values_in` for the same range, in order, to 1e-12 relative (the package builds values
//! in floating point, e.g. 4.7 × 1000). `cargo xtask test` installs the package with pip; without
//! it this test fails and says how to install it.

use railnote_core::series::Series;
use std::process::Command;

#[test]
fn every_value_of_every_series_equals_eseries() {
    let script = [
        "import eseries",
        "for name in ['E3', 'E6', 'E12', 'E24', 'E48', 'E96', 'E192']:",
        "    s = getattr(eseries, name)",
        "    print(name, ' '.join(repr(float(v)) for v in eseries.erange(s, 1.0, 10e6)))",
    ]
    .join("\n");
    let out = Command::new("python3")
        .arg("-c")
        .arg(script)
        .output()
        .expect("python3 runs");
    assert!(
        out.status.success(),
        "the PyPI package eseries is needed: `python3 -m pip install eseries==1.2.1` \
         (cargo xtask test installs it):\n{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let mut compared = 0;
    for line in text.lines() {
        let (name, values) = line.split_once(' ').unwrap();
        let series = Series::from_name(name).unwrap();
        let theirs: Vec<f64> = values.split(' ').map(|v| v.parse().unwrap()).collect();
        // Both ranges include their ends.
        let ours = series.values_in(1.0, 10e6);
        assert_eq!(ours.len(), theirs.len(), "{name}: count");
        for (a, b) in ours.iter().zip(&theirs) {
            assert!(
                ((a - b) / b).abs() <= 1e-12,
                "{name}: core {a}, eseries {b}"
            );
        }
        println!("{name}: {} values from 1 Ω to 10 MΩ agree", ours.len());
        compared += ours.len();
    }
    // Seven decades (1 Ω to 10 MΩ) of each of the seven series, and 10 MΩ itself.
    assert_eq!(
        compared,
        7 * (3 + 6 + 12 + 24 + 48 + 96 + 192) + 7,
        "all seven series"
    );
}
