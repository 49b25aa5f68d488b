//! Quantities as engineers type them, and as reviewers want to read them.
//!
//! # Method
//!
//! [`parse_quantity`] accepts three spellings, tried in this order:
//!
//! 1. Engineering notation: a decimal number with an optional exponent (`4.7`, `1e-3`, `-40`),
//!    optional spaces, an optional SI prefix (`p n u µ μ m k K M G T`; `u`, `µ` U+00B5 and `μ`
//!    U+03BC all mean micro) and an optional unit symbol of the expected kind (`4.7k`, `2.2 µF`,
//!    `500mA`, `1e-3 A`).
//! 2. The RKM code of IEC 60062: the prefix letter, or the unit letter (`R` for ohms, `V`, `A`,
//!    `W`, `F`, `H`), stands where the decimal point would be: `4k7` = 4.7 k, `3V3` = 3.3 V,
//!    `0R1` = 0.1 Ω, `R47` = 0.47 Ω, `2M2` = 2.2 M.
//! 3. Nothing else. Words such as `NaN` or `inf`, digits outside ASCII, look-alike letters,
//!    numbers that overflow (`1e400`) or underflow to zero (`1e-400`) are rejected with a
//!    [`ParseError`] that says what was expected.
//!
//! A unit that belongs to another kind (`500 mA` typed where a voltage belongs) is reported as
//! such, so the message can say "that is a current".
//!
//! [`format_quantity`] writes a value in engineering notation: a mantissa between 1 and 999 with
//! the chosen number of significant figures, an SI prefix stepping in powers of 1000, and the
//! unit symbol (`12.3 mA`). Temperatures, percentages, thermal resistances and temperature
//! coefficients take no prefix; a count is written whole, without a prefix.
//!
//! # Sources
//!
//! SI prefixes: the SI Brochure (BIPM, 9th edition), table 7. RKM code: IEC 60062, "Marking codes
//! for resistors and capacitors", clause on the letter-and-digit code.

use alloc::string::String;
use core::fmt;

/// What a number measures; decides which unit symbols are accepted and printed.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum QuantityKind {
    Voltage,
    Current,
    Resistance,
    Power,
    /// Degrees Celsius.
    Temperature,
    /// A difference of temperatures (a margin, a rise), in kelvin.
    TemperatureDifference,
    /// Kelvin per watt, the same number as °C per watt.
    ThermalResistance,
    Frequency,
    Capacitance,
    Inductance,
    Time,
    /// A percentage: "2 %" and "2" both give 2.0, not 0.02.
    Percent,
    /// Electric charge in coulombs (gate charge, output-capacitance charge).
    Charge,
    /// A temperature coefficient in parts per million per kelvin (a resistor's TCR).
    Tempco,
    /// A whole number of things (samples, a seed): no unit, no fraction, not negative.
    Count,
}

impl QuantityKind {
    /// Every kind, in a fixed order.
    pub const ALL: [QuantityKind; 15] = [
        QuantityKind::Voltage,
        QuantityKind::Current,
        QuantityKind::Resistance,
        QuantityKind::Power,
        QuantityKind::Temperature,
        QuantityKind::TemperatureDifference,
        QuantityKind::ThermalResistance,
        QuantityKind::Frequency,
        QuantityKind::Capacitance,
        QuantityKind::Inductance,
        QuantityKind::Time,
        QuantityKind::Percent,
        QuantityKind::Charge,
        QuantityKind::Tempco,
        QuantityKind::Count,
    ];

    /// The kind's name as used across the API (`"voltage"`, `"thermalResistance"`).
    pub fn name(self) -> &'static str {
        match self {
            QuantityKind::Voltage => "voltage",
            QuantityKind::Current => "current",
            QuantityKind::Resistance => "resistance",
            QuantityKind::Power => "power",
            QuantityKind::Temperature => "temperature",
            QuantityKind::TemperatureDifference => "temperatureDifference",
            QuantityKind::ThermalResistance => "thermalResistance",
            QuantityKind::Frequency => "frequency",
            QuantityKind::Capacitance => "capacitance",
            QuantityKind::Inductance => "inductance",
            QuantityKind::Time => "time",
            QuantityKind::Percent => "percent",
            QuantityKind::Charge => "charge",
            QuantityKind::Tempco => "tempco",
            QuantityKind::Count => "count",
        }
    }

    /// The kind for a name given by [`QuantityKind::name`].
    pub fn from_name(name: &str) -> Option<QuantityKind> {
        QuantityKind::ALL.into_iter().find(|k| k.name() == name)
    }

    /// The symbol printed after a value.
    pub fn symbol(self) -> &'static str {
        match self {
            QuantityKind::Voltage => "V",
            QuantityKind::Current => "A",
            QuantityKind::Resistance => "Ω",
            QuantityKind::Power => "W",
            QuantityKind::Temperature => "°C",
            QuantityKind::TemperatureDifference => "K",
            QuantityKind::ThermalResistance => "K/W",
            QuantityKind::Frequency => "Hz",
            QuantityKind::Capacitance => "F",
            QuantityKind::Inductance => "H",
            QuantityKind::Time => "s",
            QuantityKind::Percent => "%",
            QuantityKind::Charge => "C",
            QuantityKind::Tempco => "ppm/K",
            QuantityKind::Count => "",
        }
    }

    /// Unit spellings accepted on input. The first is the printed symbol.
    fn unit_spellings(self) -> &'static [&'static str] {
        match self {
            QuantityKind::Voltage => &["V"],
            QuantityKind::Current => &["A"],
            // U+03A9 Greek capital omega and U+2126 ohm sign look the same; accept both.
            QuantityKind::Resistance => &["Ω", "\u{2126}", "ohm", "ohms", "Ohm", "Ohms"],
            QuantityKind::Power => &["W"],
            QuantityKind::Temperature => &["°C", "℃", "C", "degC"],
            // A difference of 1 K is a difference of 1 °C.
            QuantityKind::TemperatureDifference => &["K", "°C", "℃", "C"],
            QuantityKind::ThermalResistance => &["K/W", "°C/W", "℃/W", "C/W"],
            QuantityKind::Frequency => &["Hz"],
            QuantityKind::Capacitance => &["F"],
            QuantityKind::Inductance => &["H"],
            QuantityKind::Time => &["s"],
            QuantityKind::Percent => &["%"],
            QuantityKind::Charge => &["C"],
            QuantityKind::Tempco => &["ppm/K", "ppm/°C", "ppm/℃", "ppm/C", "ppm"],
            QuantityKind::Count => &[],
        }
    }

    /// The letter that may stand for the decimal point in the RKM code (IEC 60062).
    fn rkm_unit_letter(self) -> Option<char> {
        match self {
            QuantityKind::Voltage => Some('V'),
            QuantityKind::Current => Some('A'),
            QuantityKind::Resistance => Some('R'),
            QuantityKind::Power => Some('W'),
            QuantityKind::Capacitance => Some('F'),
            QuantityKind::Inductance => Some('H'),
            _ => None,
        }
    }

    /// Whether SI prefixes make sense for this kind.
    pub fn takes_prefix(self) -> bool {
        !matches!(
            self,
            QuantityKind::Temperature
                | QuantityKind::TemperatureDifference
                | QuantityKind::ThermalResistance
                | QuantityKind::Percent
                | QuantityKind::Tempco
        )
    }

    /// "a voltage", for messages.
    fn noun(self) -> &'static str {
        match self {
            QuantityKind::Voltage => "a voltage",
            QuantityKind::Current => "a current",
            QuantityKind::Resistance => "a resistance",
            QuantityKind::Power => "a power",
            QuantityKind::Temperature => "a temperature",
            QuantityKind::TemperatureDifference => "a temperature difference",
            QuantityKind::ThermalResistance => "a thermal resistance",
            QuantityKind::Frequency => "a frequency",
            QuantityKind::Capacitance => "a capacitance",
            QuantityKind::Inductance => "an inductance",
            QuantityKind::Time => "a time",
            QuantityKind::Percent => "a percentage",
            QuantityKind::Charge => "a charge",
            QuantityKind::Tempco => "a temperature coefficient",
            QuantityKind::Count => "a whole number",
        }
    }

    /// Examples of accepted input, for messages.
    fn examples(self) -> &'static str {
        match self {
            QuantityKind::Voltage => "3.3 V, 3V3 or 500 mV",
            QuantityKind::Current => "250 mA, 0.25 A or 50 µA",
            QuantityKind::Resistance => "4.7k, 4k7 or 0R1",
            QuantityKind::Power => "0.5 W or 500 mW",
            QuantityKind::Temperature => "60 °C or -40 C",
            QuantityKind::TemperatureDifference => "15 K or 10 °C",
            QuantityKind::ThermalResistance => "100 K/W or 45 °C/W",
            QuantityKind::Frequency => "500 kHz or 2.2 MHz",
            QuantityKind::Capacitance => "22 µF, 100n or 4n7",
            QuantityKind::Inductance => "4.7 µH or 10u",
            QuantityKind::Time => "20 ns or 1.5 ms",
            QuantityKind::Percent => "2 % or 0.5",
            QuantityKind::Charge => "8 nC or 12n",
            QuantityKind::Tempco => "100 ppm/K or 25",
            QuantityKind::Count => "10000 or 100k",
        }
    }
}

/// Why a text is not a quantity of the wanted kind.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ParseProblem {
    /// Nothing but spaces.
    Empty,
    /// Longer than any value anyone types.
    TooLong,
    /// Not a number in any accepted spelling.
    NotANumber,
    /// The number overflows to infinity or underflows to zero.
    OutOfRange,
    /// The unit belongs to another kind of quantity.
    OtherKind(QuantityKind),
    /// An SI prefix on a kind that takes none (°C, %, K/W).
    PrefixNotAllowed,
    /// A count with a fraction or a sign.
    NotWhole,
}

/// A text that could not be read as a quantity.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ParseError {
    pub expected: QuantityKind,
    pub problem: ParseProblem,
}

impl fmt::Display for ParseError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let want = self.expected;
        match self.problem {
            ParseProblem::Empty => {
                write!(f, "enter {} such as {}", want.noun(), want.examples())
            }
            ParseProblem::TooLong => write!(
                f,
                "too long to be a value; expected {} such as {}",
                want.noun(),
                want.examples()
            ),
            ParseProblem::NotANumber => {
                write!(f, "expected {} such as {}", want.noun(), want.examples())
            }
            ParseProblem::OutOfRange => write!(
                f,
                "the number is too large or too small to use; expected {} such as {}",
                want.noun(),
                want.examples()
            ),
            ParseProblem::OtherKind(found) => write!(
                f,
                "that is {}; expected {} such as {}",
                found.noun(),
                want.noun(),
                want.examples()
            ),
            ParseProblem::NotWhole => write!(
                f,
                "a count has no fraction and no sign; expected {} such as {}",
                want.noun(),
                want.examples()
            ),
            ParseProblem::PrefixNotAllowed => write!(
                f,
                "{} takes no SI prefix; expected {} such as {}",
                want.noun(),
                want.noun(),
                want.examples()
            ),
        }
    }
}

impl core::error::Error for ParseError {}

/// The longest text worth reading as a value; anything longer is rejected before it is scanned.
pub const MAX_INPUT_CHARS: usize = 64;

/// SI prefixes accepted on input, with their powers of ten. `K` is accepted for kilo because
/// resistor markings and parts lists use it (IEC 60062 writes `4K7`).
const PREFIXES: [(char, i32); 12] = [
    ('p', -12),
    ('n', -9),
    ('u', -6),
    ('µ', -6),
    ('μ', -6),
    ('m', -3),
    ('k', 3),
    ('K', 3),
    ('M', 6),
    ('G', 9),
    ('T', 12),
    ('f', -15),
];

fn prefix_power(c: char) -> Option<i32> {
    PREFIXES.iter().find(|(p, _)| *p == c).map(|(_, e)| *e)
}

/// Read `text` as a quantity of `kind`, in SI base units (volts, amperes, ohms, …; degrees
/// Celsius; K/W; percent as a number of percent).
pub fn parse_quantity(text: &str, kind: QuantityKind) -> Result<f64, ParseError> {
    let fail = |problem| ParseError {
        expected: kind,
        problem,
    };
    if text.chars().count() > MAX_INPUT_CHARS {
        return Err(fail(ParseProblem::TooLong));
    }
    let trimmed = text.trim();
    if trimmed.is_empty() {
        return Err(fail(ParseProblem::Empty));
    }
    // The typographic minus (U+2212) is what word processors paste for "-40 °C".
    let mut owned = String::new();
    let text = if trimmed.starts_with('\u{2212}') {
        owned.push('-');
        owned.push_str(&trimmed['\u{2212}'.len_utf8()..]);
        owned.as_str()
    } else {
        trimmed
    };

    let value = match parse_engineering(text, kind) {
        Ok(v) => v,
        // A unit of another kind or a forbidden prefix is a clear answer; RKM cannot fix it.
        Err(p @ (ParseProblem::OtherKind(_) | ParseProblem::PrefixNotAllowed)) => {
            return Err(fail(p))
        }
        Err(first) => match parse_rkm(text, kind) {
            Some(v) => v.map_err(fail)?,
            None => return Err(fail(first)),
        },
    };
    if kind == QuantityKind::Count && (value < 0.0 || value != libm::floor(value)) {
        return Err(fail(ParseProblem::NotWhole));
    }
    // Normalise -0 to 0 so that nothing downstream prints "-0".
    Ok(if value == 0.0 { 0.0 } else { value })
}

/// The leading decimal number of `s` (sign, digits, point, exponent), as its byte length.
/// Only ASCII digits count; `inf` and `NaN` are not numbers here.
fn scan_number(s: &str) -> Option<usize> {
    let b = s.as_bytes();
    let mut i = 0;
    if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
        i += 1;
    }
    let int_start = i;
    while i < b.len() && b[i].is_ascii_digit() {
        i += 1;
    }
    let mut digits = i - int_start;
    if i < b.len() && b[i] == b'.' {
        i += 1;
        let frac_start = i;
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
        digits += i - frac_start;
    }
    if digits == 0 {
        return None;
    }
    // An exponent only counts when digits follow; "1e" is left for the unit check to refuse.
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        let mut j = i + 1;
        if j < b.len() && (b[j] == b'+' || b[j] == b'-') {
            j += 1;
        }
        let exp_start = j;
        while j < b.len() && b[j].is_ascii_digit() {
            j += 1;
        }
        if j > exp_start {
            i = j;
        }
    }
    Some(i)
}

/// Powers of ten that an f64 holds exactly (10^22 is the last one: 5^22 < 2^53).
const EXACT_POWERS_OF_TEN: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// Turn a scanned decimal number (sign, digits, point, digits, exponent: see [`scan_number`])
/// and an extra power of ten into a finite value, refusing overflow and underflow to zero.
///
/// This is written here rather than calling `str::parse::<f64>` because core's parser brings
/// about 15 KB of tables and code into the WebAssembly module, a quarter of railnote's size
/// budget. When the digits fit 2^53 and the power of ten is at most 22 (every value anyone types
/// into a rail check) the result is one correctly rounded multiplication or division of two
/// exact values (Clinger's fast path, "How to read floating point numbers accurately", 1990),
/// so it equals the correctly rounded parse. Beyond that it is within a few units in the last
/// place, which no engineering input can notice.
fn finite_value(number: &str, power: i32) -> Result<f64, ParseProblem> {
    let (mantissa_text, exponent_text) = match number.find(['e', 'E']) {
        Some(at) => (&number[..at], &number[at + 1..]),
        None => (number, ""),
    };
    let (negative, digits) = match mantissa_text.as_bytes().first() {
        Some(b'-') => (true, &mantissa_text[1..]),
        Some(b'+') => (false, &mantissa_text[1..]),
        _ => (false, mantissa_text),
    };
    let mut mantissa: u64 = 0;
    let mut exponent: i64 = i64::from(power);
    let mut significant = 0;
    let mut after_point = false;
    for c in digits.bytes() {
        if c == b'.' {
            after_point = true;
            continue;
        }
        let d = u64::from(c - b'0');
        if significant < 19 {
            if mantissa > 0 || d > 0 {
                significant += 1;
            }
            mantissa = mantissa * 10 + d;
            if after_point {
                exponent -= 1;
            }
        } else if !after_point {
            // Digits past the 19th only scale the value.
            exponent += 1;
        }
    }
    if !exponent_text.is_empty() {
        let (sign, body) = match exponent_text.as_bytes()[0] {
            b'-' => (-1, &exponent_text[1..]),
            b'+' => (1, &exponent_text[1..]),
            _ => (1, exponent_text),
        };
        // Saturate: any exponent beyond a few hundred overflows or underflows anyway.
        let mut e: i64 = 0;
        for c in body.bytes() {
            e = (e * 10 + i64::from(c - b'0')).min(100_000);
        }
        exponent += sign * e;
    }
    let magnitude = if mantissa == 0 {
        0.0
    } else if mantissa < (1 << 53) && exponent.abs() <= 22 {
        let m = mantissa as f64;
        let p = EXACT_POWERS_OF_TEN[exponent.unsigned_abs() as usize];
        if exponent >= 0 {
            m * p
        } else {
            m / p
        }
    } else {
        let e = exponent.clamp(-1000, 1000) as f64;
        // Split the power so that 10^e itself does not underflow before the multiplication.
        (mantissa as f64) * libm::pow(10.0, e / 2.0) * libm::pow(10.0, e - e / 2.0)
    };
    if !magnitude.is_finite() || (magnitude == 0.0 && mantissa != 0) {
        return Err(ParseProblem::OutOfRange);
    }
    Ok(if negative { -magnitude } else { magnitude })
}

/// Which kind, if any, uses `unit` as a spelling.
fn kind_of_unit(unit: &str) -> Option<QuantityKind> {
    QuantityKind::ALL
        .into_iter()
        .find(|k| k.unit_spellings().contains(&unit))
}

/// Split a unit text into an optional prefix and the rest, and say what it means for `kind`.
/// Returns the power of ten on success.
fn read_suffix(suffix: &str, kind: QuantityKind) -> Result<i32, ParseProblem> {
    if suffix.is_empty() || kind.unit_spellings().contains(&suffix) {
        return Ok(0);
    }
    if let Some(other) = kind_of_unit(suffix) {
        return Err(ParseProblem::OtherKind(other));
    }
    let mut chars = suffix.chars();
    let Some(first) = chars.next() else {
        return Ok(0);
    };
    let Some(power) = prefix_power(first) else {
        return Err(ParseProblem::NotANumber);
    };
    let unit = chars.as_str();
    if unit.is_empty() || kind.unit_spellings().contains(&unit) {
        if kind.takes_prefix() {
            Ok(power)
        } else {
            Err(ParseProblem::PrefixNotAllowed)
        }
    } else if let Some(other) = kind_of_unit(unit) {
        Err(ParseProblem::OtherKind(other))
    } else {
        Err(ParseProblem::NotANumber)
    }
}

fn parse_engineering(text: &str, kind: QuantityKind) -> Result<f64, ParseProblem> {
    let end = scan_number(text).ok_or(ParseProblem::NotANumber)?;
    let (number, rest) = text.split_at(end);
    let power = read_suffix(rest.trim_start(), kind)?;
    finite_value(number, power)
}

/// The RKM code: `[sign] digits letter digits [unit]`, at least one digit in all. `None` when
/// the text does not have that shape at all.
fn parse_rkm(text: &str, kind: QuantityKind) -> Option<Result<f64, ParseProblem>> {
    let (sign, body) = match text.strip_prefix('-') {
        Some(rest) => ("-", rest),
        None => ("", text.strip_prefix('+').unwrap_or(text)),
    };
    let letter_at = body.find(|c: char| !c.is_ascii_digit())?;
    let (int_part, rest) = body.split_at(letter_at);
    let mut chars = rest.chars();
    let letter = chars.next()?;
    let after = chars.as_str();
    let frac_len = after
        .find(|c: char| !c.is_ascii_digit())
        .unwrap_or(after.len());
    let (frac_part, unit) = after.split_at(frac_len);
    if int_part.is_empty() && frac_part.is_empty() {
        return None;
    }
    let unit = unit.trim_start();
    let power = if kind.rkm_unit_letter() == Some(letter) {
        0
    } else if let Some(p) = prefix_power(letter) {
        if !kind.takes_prefix() {
            return Some(Err(ParseProblem::PrefixNotAllowed));
        }
        p
    } else {
        return None;
    };
    if !(unit.is_empty() || kind.unit_spellings().contains(&unit)) {
        return Some(Err(match kind_of_unit(unit) {
            Some(other) => ParseProblem::OtherKind(other),
            None => ParseProblem::NotANumber,
        }));
    }
    // Rebuild the decimal number the code stands for, then read it like any other.
    let mut number = String::with_capacity(text.len() + 2);
    number.push_str(sign);
    number.push_str(if int_part.is_empty() { "0" } else { int_part });
    if !frac_part.is_empty() {
        number.push('.');
        number.push_str(frac_part);
    }
    Some(finite_value(&number, power))
}

/// Decimals that give `digits` significant figures for `magnitude` (> 0), and `magnitude`
/// rounded to them, allowing for rounding up to the next power of ten (9.996 to 3 figures is
/// "10.0", not "10.00").
fn decimals_for(magnitude: f64, digits: u32) -> (usize, f64) {
    let mut exponent = libm::floor(libm::log10(magnitude)) as i32;
    let mut decimals = digits as i32 - 1 - exponent;
    let scale = libm::pow(10.0, f64::from(decimals));
    let rounded = libm::round(magnitude * scale) / scale;
    // Rounding may carry into the next power of ten; then one decimal fewer is needed.
    if rounded >= libm::pow(10.0, f64::from(exponent + 1)) {
        exponent += 1;
        decimals = digits as i32 - 1 - exponent;
    }
    (decimals.max(0) as usize, rounded)
}

/// Write a non-negative `value` with exactly `decimals` digits after the point.
///
/// Written with integer arithmetic instead of `format!("{:.*}")` because core's float
/// formatting brings about 15 KB of code and tables into the WebAssembly module. The caller
/// keeps `value · 10^decimals` below 10^15, where an f64 holds every integer exactly, so the
/// only rounding is the one `libm::round` does.
fn push_fixed(out: &mut String, value: f64, decimals: usize) {
    use core::fmt::Write;
    let scale = EXACT_POWERS_OF_TEN[decimals.min(22)];
    let scaled = libm::round(value * scale) as u64;
    let whole = scaled / scale as u64;
    let _ = write!(out, "{whole}");
    if decimals > 0 {
        let fraction = scaled % scale as u64;
        let _ = write!(out, ".{fraction:0decimals$}");
    }
}

/// The smallest mantissa written in fixed form: its 12 figures need at most 17 decimals, which
/// [`push_fixed`] writes exactly (it scales by at most 10^22).
const SMALLEST_FIXED: f64 = 1e-6;

/// `value · 10^power` for any power an f64 can need (|power| ≤ 400), in two steps so that
/// neither power of ten overflows or goes subnormal on its own.
fn times_power_of_ten(value: f64, power: i32) -> f64 {
    let half = power / 2;
    value * libm::pow(10.0, f64::from(half)) * libm::pow(10.0, f64::from(power - half))
}

/// SI prefix symbols for powers of 1000 from femto to tera, as printed.
const PRINT_PREFIXES: [(i32, &str); 10] = [
    (-15, "f"),
    (-12, "p"),
    (-9, "n"),
    (-6, "µ"),
    (-3, "m"),
    (0, ""),
    (3, "k"),
    (6, "M"),
    (9, "G"),
    (12, "T"),
];

/// Write `value` of `kind` with `digits` significant figures (clamped to 1..=12) in engineering
/// notation: `format_quantity(0.0123, QuantityKind::Current, 3)` is `"12.3 mA"`. A value that is
/// not finite prints as an em dash, so nothing shows "NaN". Magnitudes beyond what the prefixes
/// (or, for kinds without prefix, 10^15) cover are written with a power of ten, `1.2e18 °C`, and
/// so are those below 10^-6 of the smallest prefix (10^-6 of the unit without one):
/// `3.2e-47 fV`, `5.0e-7 %`.
pub fn format_quantity(value: f64, kind: QuantityKind, digits: u32) -> String {
    let digits = digits.clamp(1, 12);
    let mut out = String::new();
    if !value.is_finite() {
        out.push('—');
        return out;
    }
    let symbol = kind.symbol();
    let magnitude = libm::fabs(value);
    // A count is written whole, every digit, without a prefix ("12345", not "12.3 k"), up to
    // where an f64 stops holding every integer.
    if kind == QuantityKind::Count && magnitude < 1e15 {
        if value < 0.0 && libm::round(magnitude) != 0.0 {
            out.push('-');
        }
        push_fixed(&mut out, magnitude, 0);
        return out;
    }
    if magnitude == 0.0 {
        out.push('0');
    } else {
        let (mut power, mut mantissa) = (0, magnitude);
        if kind.takes_prefix() {
            power = (libm::floor(libm::log10(magnitude) / 3.0) as i32 * 3).clamp(-15, 12);
            mantissa = magnitude / libm::pow(10.0, f64::from(power));
            if decimals_for(mantissa, digits).1 >= 1000.0 && power < 12 {
                power += 3;
                mantissa /= 1000.0;
            }
        }
        let mut exponent = 0;
        // Beyond 10^15, and below 10^-6 of the smallest prefix (a fixed form would need more
        // decimals than `push_fixed` writes exactly: 3e-62 V printed as "0.000…0 fV"), a power
        // of ten.
        if !(SMALLEST_FIXED..1e15).contains(&mantissa) {
            exponent = libm::floor(libm::log10(mantissa)) as i32;
            mantissa = times_power_of_ten(mantissa, -exponent);
            if decimals_for(mantissa, digits).1 >= 10.0 {
                exponent += 1;
                mantissa /= 10.0;
            }
        }
        let (decimals, rounded) = decimals_for(mantissa, digits);
        // A value that rounds to zero at this precision is printed without a sign.
        if value < 0.0 && rounded != 0.0 {
            out.push('-');
        }
        push_fixed(&mut out, mantissa, decimals);
        if exponent != 0 {
            use core::fmt::Write;
            let _ = write!(out, "e{exponent}");
        }
        let prefix = PRINT_PREFIXES
            .iter()
            .find(|(p, _)| *p == power)
            .map_or("", |(_, s)| *s);
        if !(prefix.is_empty() && symbol.is_empty()) {
            out.push(' ');
        }
        out.push_str(prefix);
        out.push_str(symbol);
        return out;
    }
    if !symbol.is_empty() {
        out.push(' ');
    }
    out.push_str(symbol);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scan_number_stops_at_the_unit() {
        assert_eq!(scan_number("4.7k"), Some(3));
        assert_eq!(scan_number("1e-3 A"), Some(4));
        assert_eq!(scan_number("1e"), Some(1));
        assert_eq!(scan_number(".5"), Some(2));
        assert_eq!(scan_number("-."), None);
        assert_eq!(scan_number("NaN"), None);
    }

    #[test]
    fn decimals_round_up_across_a_power_of_ten() {
        assert_eq!(decimals_for(9.996, 3).0, 1);
        assert_eq!(decimals_for(1.234, 3).0, 2);
        assert_eq!(decimals_for(123.4, 3).0, 0);
    }
}
