//! Reading and writing quantities, checked against the standards that define the spellings.
//!
//! Tolerance: parsing is exact up to the rounding of one multiplication by a power of ten, so
//! values are compared with a relative error of 1e-12.

use railnote_core::units::{format_quantity, parse_quantity, ParseProblem, QuantityKind};
use QuantityKind::*;

/// The only test code that calls the parser: `text` read as `kind` must give `expected`.
fn check(text: &str, kind: QuantityKind, expected: Result<f64, ParseProblem>) {
    let got = parse_quantity(text, kind);
    match (got, expected) {
        (Ok(v), Ok(want)) => {
            let err = if want == 0.0 {
                v.abs()
            } else {
                ((v - want) / want).abs()
            };
            assert!(err <= 1e-12, "{text:?} as {kind:?}: got {v}, want {want}");
            assert!(!(v == 0.0 && v.is_sign_negative()), "{text:?} gave -0");
        }
        (Err(e), Err(want)) => assert_eq!(e.problem, want, "{text:?} as {kind:?}: {e}"),
        (got, want) => panic!("{text:?} as {kind:?}: got {got:?}, want {want:?}"),
    }
}

#[test]
fn iec_60062_rkm_code() {
    // IEC 60062, letter-and-digit code: the letter stands for the decimal point and gives the
    // multiplier (R = 1 for ohms, k = 10^3, M = 10^6, G = 10^9; p, n, µ, m for capacitors).
    // The examples are the standard's own style of marking.
    let cases: &[(&str, QuantityKind, f64)] = &[
        ("R47", Resistance, 0.47),
        ("0R1", Resistance, 0.1),
        ("4R7", Resistance, 4.7),
        ("47R", Resistance, 47.0),
        ("4k7", Resistance, 4700.0),
        ("4K7", Resistance, 4700.0),
        ("47k", Resistance, 47_000.0),
        ("2M2", Resistance, 2.2e6),
        ("1G0", Resistance, 1.0e9),
        ("4n7", Capacitance, 4.7e-9),
        ("2p2", Capacitance, 2.2e-12),
        ("4µ7", Capacitance, 4.7e-6),
        ("6m8", Capacitance, 6.8e-3),
        // The same idea carried to voltages, as schematics write rail names (common practice).
        ("3V3", Voltage, 3.3),
        ("1V8", Voltage, 1.8),
        ("0V9", Voltage, 0.9),
        ("2A5", Current, 2.5),
    ];
    for &(text, kind, value) in cases {
        check(text, kind, Ok(value));
    }
}

#[test]
fn charges_tempcos_and_counts() {
    // Gate charge in coulombs with SI prefixes (SI Brochure table 7); TCR in ppm/K, where
    // 1 ppm/K = 1 ppm/°C because a kelvin step is a degree-Celsius step; counts are whole.
    let cases: &[(&str, QuantityKind, f64)] = &[
        ("8 nC", Charge, 8e-9),
        ("12n", Charge, 12e-9),
        ("1.5 µC", Charge, 1.5e-6),
        ("100 ppm/K", Tempco, 100.0),
        ("25 ppm/°C", Tempco, 25.0),
        ("50ppm", Tempco, 50.0),
        ("-200", Tempco, -200.0),
        ("10000", Count, 10_000.0),
        ("100k", Count, 100_000.0),
        ("1M", Count, 1_000_000.0),
        ("1e6", Count, 1_000_000.0),
        ("0", Count, 0.0),
    ];
    for &(text, kind, value) in cases {
        check(text, kind, Ok(value));
    }
}

#[test]
fn si_prefixes_and_units() {
    // SI Brochure (BIPM, 9th edition), table 7: the prefixes and their powers of ten.
    let cases: &[(&str, QuantityKind, f64)] = &[
        ("4.7k", Resistance, 4700.0),
        ("4.7 kΩ", Resistance, 4700.0),
        ("4.7 k\u{2126}", Resistance, 4700.0),
        ("10 ohm", Resistance, 10.0),
        ("2.2 µF", Capacitance, 2.2e-6),
        ("2.2 μF", Capacitance, 2.2e-6),
        ("2.2uF", Capacitance, 2.2e-6),
        ("100n", Capacitance, 100e-9),
        ("500mA", Current, 0.5),
        ("1e-3 A", Current, 1e-3),
        ("1E-3A", Current, 1e-3),
        ("50 µA", Current, 50e-6),
        (".5", Current, 0.5),
        ("+3.3", Voltage, 3.3),
        ("12 V", Voltage, 12.0),
        ("0.5 W", Power, 0.5),
        ("500 mW", Power, 0.5),
        ("2.2 MHz", Frequency, 2.2e6),
        ("4.7 µH", Inductance, 4.7e-6),
        ("20 ns", Time, 20e-9),
        ("1.5 ms", Time, 1.5e-3),
        ("1 T", Voltage, 1e12),
        ("3 f", Capacitance, 3e-15),
        ("-40 °C", Temperature, -40.0),
        ("\u{2212}40 °C", Temperature, -40.0),
        ("85C", Temperature, 85.0),
        ("85 ℃", Temperature, 85.0),
        ("100 K/W", ThermalResistance, 100.0),
        ("45 °C/W", ThermalResistance, 45.0),
        ("45", ThermalResistance, 45.0),
        ("15 K", TemperatureDifference, 15.0),
        ("2 %", Percent, 2.0),
        ("2%", Percent, 2.0),
        ("0.5", Percent, 0.5),
        ("-0", Voltage, 0.0),
        ("  3.3  ", Voltage, 3.3),
    ];
    for &(text, kind, value) in cases {
        check(text, kind, Ok(value));
    }
}

#[test]
fn everything_else_is_refused_with_a_reason() {
    use ParseProblem::*;
    let long = "1".repeat(100);
    let cases: &[(&str, QuantityKind, ParseProblem)] = &[
        ("", Voltage, Empty),
        ("   ", Voltage, Empty),
        ("abc", Voltage, NotANumber),
        ("NaN", Voltage, NotANumber),
        ("nan", Voltage, NotANumber),
        ("Infinity", Voltage, NotANumber),
        ("inf", Voltage, NotANumber),
        ("-inf", Voltage, NotANumber),
        ("1e400", Voltage, OutOfRange),
        ("-1e400", Voltage, OutOfRange),
        ("1e-400", Voltage, OutOfRange),
        ("1e308 k", Voltage, OutOfRange),
        ("1e", Voltage, NotANumber),
        ("1.2.3", Voltage, NotANumber),
        ("3,3", Voltage, NotANumber),
        ("0x10", Voltage, NotANumber),
        ("٣", Voltage, NotANumber),
        ("３.３", Voltage, NotANumber),
        ("3.3 Ѵ", Voltage, NotANumber),
        ("3.3 VV", Voltage, NotANumber),
        ("4k7k", Resistance, NotANumber),
        ("k", Resistance, NotANumber),
        ("500 mA", Voltage, OtherKind(Current)),
        ("3.3 V", Current, OtherKind(Voltage)),
        ("3V3", Current, NotANumber),
        ("10 W", Temperature, OtherKind(Power)),
        ("2.2 µF", Inductance, OtherKind(Capacitance)),
        ("5 mK/W", ThermalResistance, PrefixNotAllowed),
        ("2 k%", Percent, PrefixNotAllowed),
        ("85 m°C", Temperature, PrefixNotAllowed),
        ("5 kppm/K", Tempco, PrefixNotAllowed),
        ("2.5", Count, NotWhole),
        ("-3", Count, NotWhole),
        ("10m", Count, NotWhole),
        ("10 V", Count, OtherKind(Voltage)),
        ("<script>alert(1)</script>", Voltage, NotANumber),
        ("<img src=x onerror=alert(1)>", Voltage, NotANumber),
        (&long, Voltage, TooLong),
    ];
    for &(text, kind, problem) in cases {
        check(text, kind, Err(problem));
    }
}

#[test]
fn messages_say_what_was_expected() {
    let e = parse_quantity("500 mA", Voltage).unwrap_err();
    assert_eq!(
        e.to_string(),
        "that is a current; expected a voltage such as 3.3 V, 3V3 or 500 mV"
    );
    let e = parse_quantity("", Resistance).unwrap_err();
    assert_eq!(e.to_string(), "enter a resistance such as 4.7k, 4k7 or 0R1");
}

#[test]
fn engineering_notation_output() {
    // Engineering notation: exponent a multiple of three, written as an SI prefix (SI Brochure
    // table 7), mantissa from 1 to 999 with the asked-for significant figures.
    let cases: &[(f64, QuantityKind, u32, &str)] = &[
        (0.0123, Current, 3, "12.3 mA"),
        (0.25, Current, 3, "250 mA"),
        (50e-6, Current, 2, "50 µA"),
        (4700.0, Resistance, 2, "4.7 kΩ"),
        (2.2e6, Resistance, 3, "2.20 MΩ"),
        (0.4921325, Power, 3, "492 mW"),
        (999.96, Voltage, 3, "1.00 kV"),
        (0.99996, Voltage, 3, "1.00 V"),
        (9.996, Voltage, 3, "10.0 V"),
        (-0.0004, Current, 3, "-400 µA"),
        (-1e-9, Current, 1, "-1 nA"),
        (0.0, Voltage, 3, "0 V"),
        (-0.0, Voltage, 3, "0 V"),
        (109.21325, Temperature, 3, "109 °C"),
        (-40.0, Temperature, 2, "-40 °C"),
        (15.78675, TemperatureDifference, 3, "15.8 K"),
        (65.3336, Percent, 3, "65.3 %"),
        (100.0, ThermalResistance, 3, "100 K/W"),
        (2.2e6, Frequency, 2, "2.2 MHz"),
        (1e-13, Current, 3, "100 fA"),
        (1e-18, Current, 3, "0.00100 fA"),
        (5e15, Voltage, 2, "5000 TV"),
        (8e-9, Charge, 2, "8.0 nC"),
        (100.0, Tempco, 3, "100 ppm/K"),
        (12345.0, Count, 3, "12345"),
        (1_000_000.0, Count, 1, "1000000"),
        (0.0, Count, 3, "0"),
        (f64::NAN, Voltage, 3, "—"),
        (f64::INFINITY, Voltage, 3, "—"),
    ];
    for &(value, kind, digits, want) in cases {
        assert_eq!(
            format_quantity(value, kind, digits),
            want,
            "{value} {kind:?}"
        );
    }
}

#[test]
fn tiny_values_print_with_a_power_of_ten() {
    // Regression (found by the browser's hostile corpus: "1e-308" typed as a load current):
    // a magnitude below what the prefixes cover printed as "0." and hundreds of zeros, in a
    // message, and not even the right digits. Now a power of ten, as for huge values.
    let cases: &[(f64, QuantityKind, u32, &str)] = &[
        (1e-21, Current, 3, "1.00e-6 fA"),
        (1e-308, Current, 3, "1.00e-293 fA"),
        (-2.5e-300, Voltage, 2, "-2.5e-285 fV"),
        (1e-308, Temperature, 3, "1.00e-308 °C"),
        (4.9e-324, TemperatureDifference, 1, "5e-324 K"),
        (9.9996e-5, Percent, 3, "1.00e-4 %"),
        (0.0005, ThermalResistance, 3, "5.00e-4 K/W"),
        // Still fixed decimals from a thousandth up (the existing cases above).
        (0.001, ThermalResistance, 3, "0.00100 K/W"),
        (1e-18, Current, 3, "0.00100 fA"),
    ];
    for &(value, kind, digits, want) in cases {
        let text = format_quantity(value, kind, digits);
        assert_eq!(text, want, "{value} {kind:?}");
        assert!(text.len() < 24, "{text}");
        // And it reads back (to its printed precision).
        let back = parse_quantity(&text, kind).unwrap_or_else(|e| panic!("{text}: {e}"));
        assert!(
            ((back - value) / value).abs() < 0.05,
            "{text} read back as {back}"
        );
    }
}

#[test]
fn every_magnitude_prints_short_and_reads_back() {
    // A sweep over the whole f64 range, subnormals included: each kind, each precision, both
    // signs. Nothing panics, nothing is longer than a value anyone reads, and the text reads back
    // to its printed precision (a count: non-negative whole values only, as it is parsed).
    for kind in QuantityKind::ALL {
        for e in -324..=308 {
            for m in [1.0, 2.5, 9.9996] {
                let value = m * 10f64.powi(e);
                if value == 0.0 || !value.is_finite() {
                    continue;
                }
                for digits in [1, 3, 12] {
                    for v in [value, -value] {
                        let text = format_quantity(v, kind, digits);
                        assert!(text.chars().count() <= 32, "{v} {kind:?} {digits}: {text}");
                        if kind == Count && (v < 0.0 || v.fract() != 0.0 || v >= 1e15) {
                            continue;
                        }
                        let back = parse_quantity(&text, kind)
                            .unwrap_or_else(|err| panic!("{v} {kind:?}: {text}: {err}"));
                        let tol = if digits == 1 { 0.5 } else { 0.01 };
                        assert!(
                            ((back - v) / v).abs() <= tol,
                            "{v} {kind:?} {digits}: {text} read back as {back}"
                        );
                    }
                }
            }
        }
    }
}

#[test]
fn formatted_values_read_back() {
    // Whatever railnote prints, it must accept again: a value copied from a result into a
    // field keeps its meaning (to the printed precision).
    for &(value, kind) in &[
        (0.0123, Current),
        (4700.0, Resistance),
        (2.2e-6, Capacitance),
        (109.2, Temperature),
        (15.8, TemperatureDifference),
        (65.3, Percent),
        (100.0, ThermalResistance),
        (-0.0004, Current),
        (8.2e-9, Charge),
        (25.0, Tempco),
        (4096.0, Count),
    ] {
        let text = format_quantity(value, kind, 6);
        let back = parse_quantity(&text, kind).unwrap_or_else(|e| panic!("{text}: {e}"));
        assert!(
            ((back - value) / value).abs() < 1e-6,
            "{text} read back as {back}"
        );
    }
}

#[test]
fn kinds_round_trip_by_name() {
    for kind in QuantityKind::ALL {
        assert_eq!(QuantityKind::from_name(kind.name()), Some(kind));
    }
    assert_eq!(QuantityKind::from_name("volts"), None);
}

#[test]
fn battery_capacity_in_ampere_hours_and_watt_hours() {
    use QuantityKind::{BatteryCharge, Charge, Energy, Power};
    // Batteries are rated in Ah and Wh (common practice); SI prefixes apply to both.
    check("7000 mAh", BatteryCharge, Ok(7.0));
    check("7 Ah", BatteryCharge, Ok(7.0));
    check("7", BatteryCharge, Ok(7.0));
    check("84 Wh", Energy, Ok(84.0));
    check("500 mWh", Energy, Ok(0.5));
    check("1.2 kWh", Energy, Ok(1200.0));
    // Each kind refuses the other's unit, and neither is a coulomb or a watt.
    check("84 Wh", Power, Err(ParseProblem::OtherKind(Energy)));
    check("84 Wh", BatteryCharge, Err(ParseProblem::OtherKind(Energy)));
    check(
        "7000 mAh",
        Charge,
        Err(ParseProblem::OtherKind(BatteryCharge)),
    );
    assert_eq!(format_quantity(0.5, BatteryCharge, 3), "500 mAh");
    assert_eq!(format_quantity(84.0, Energy, 3), "84.0 Wh");
}

#[test]
fn tiny_values_print_with_a_power_of_ten_and_read_back() {
    // Found by the `units` fuzz target (fuzz/, input [44, 32, 47, 41, 2, 62, 250, 41, 51]):
    // 3.157…e-62 V at two figures printed as "0.000…000 fV" (48 zeros), which reads back as 0;
    // and below 10^-22 the fixed form was scaled wrongly (5e-23 K printed as 1e-23 K). A
    // mantissa below 10^-3 of the smallest prefix (of the unit, without prefixes) is written
    // with a power of ten, like the large end (`1.2e18 °C`).
    let crash = f64::from_bits(u64::from_le_bytes([32, 47, 41, 2, 62, 250, 41, 51]));
    let cases: &[(f64, QuantityKind, u32, &str)] = &[
        (crash, Voltage, 2, "3.2e-47 fV"),
        (5e-23, TemperatureDifference, 1, "5e-23 K"),
        (5e-7, Percent, 2, "5.0e-7 %"),
        (-2.5e-30, Current, 3, "-2.50e-15 fA"),
        // A mantissa from 10^-3 up keeps its fixed form.
        (1e-18, Current, 3, "0.00100 fA"),
        (0.0004, TemperatureDifference, 3, "4.00e-4 K"),
    ];
    for &(value, kind, digits, want) in cases {
        let text = format_quantity(value, kind, digits);
        assert_eq!(text, want, "{value:e} {kind:?}");
        let back = parse_quantity(&text, kind).unwrap_or_else(|e| panic!("{text}: {e}"));
        let rel = 0.51 * 10f64.powi(1 - digits as i32);
        assert!(
            ((back - value) / value).abs() <= rel,
            "{text} read back as {back:e}, not {value:e}"
        );
    }
}
