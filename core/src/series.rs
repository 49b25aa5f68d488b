//! The preferred-number series of IEC 60063 (E3, E6, E12, E24, E48, E96, E192): the values
//! resistors are made in.
//!
//! # Method
//!
//! Each series has n values per decade. E48, E96 and E192 are 10^(i/n) rounded to three
//! significant figures, except 9.20 in E192 (the rounded geometric value would be 9.19), which
//! the standard keeps. E3 to E24 have two significant figures and keep their historic values
//! where those differ from the rounded geometric ones (2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2
//! in E24). Each coarser series is every (24/n)-th value of E24 or every (192/n)-th of E192, so
//! two tables hold all seven.
//!
//! Values are mantissas 100..=999 times a power of ten; a value is built by one exact integer
//! times (or divided by) an exact power of ten, so 4.7 kΩ is the f64 nearest 4700, and
//! membership tests compare mantissas as integers after rounding.
//!
//! # Sources
//!
//! IEC 60063:2015, "Preferred number series for resistors and capacitors", tables 1 and 2.
//! Cross-checked value by value against the PyPI package `eseries` in tests/reference.

use alloc::vec::Vec;

/// A preferred-number series of IEC 60063.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
pub enum Series {
    E3,
    E6,
    E12,
    E24,
    E48,
    E96,
    E192,
}

/// E24 as two-digit mantissas: the historic values of IEC 60063 table 1.
const E24: [u16; 24] = [
    10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30, 33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91,
];

/// E192 as three-digit mantissas: 10^(i/192) rounded, with 920 in place of 919 (table 2).
const E192: [u16; 192] = [
    100, 101, 102, 104, 105, 106, 107, 109, 110, 111, 113, 114, 115, 117, 118, 120, //
    121, 123, 124, 126, 127, 129, 130, 132, 133, 135, 137, 138, 140, 142, 143, 145, //
    147, 149, 150, 152, 154, 156, 158, 160, 162, 164, 165, 167, 169, 172, 174, 176, //
    178, 180, 182, 184, 187, 189, 191, 193, 196, 198, 200, 203, 205, 208, 210, 213, //
    215, 218, 221, 223, 226, 229, 232, 234, 237, 240, 243, 246, 249, 252, 255, 258, //
    261, 264, 267, 271, 274, 277, 280, 284, 287, 291, 294, 298, 301, 305, 309, 312, //
    316, 320, 324, 328, 332, 336, 340, 344, 348, 352, 357, 361, 365, 370, 374, 379, //
    383, 388, 392, 397, 402, 407, 412, 417, 422, 427, 432, 437, 442, 448, 453, 459, //
    464, 470, 475, 481, 487, 493, 499, 505, 511, 517, 523, 530, 536, 542, 549, 556, //
    562, 569, 576, 583, 590, 597, 604, 612, 619, 626, 634, 642, 649, 657, 665, 673, //
    681, 690, 698, 706, 715, 723, 732, 741, 750, 759, 768, 777, 787, 796, 806, 816, //
    825, 835, 845, 856, 866, 876, 887, 898, 909, 920, 931, 942, 953, 965, 976, 988, //
];

/// Powers of ten that f64 holds exactly.
const POWERS: [f64; 16] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
];

/// The lowest and highest decades values are made in: 100 mΩ–999 MΩ for resistors, with room.
const LOWEST_EXPONENT: i32 = -3;
const HIGHEST_EXPONENT: i32 = 12;

impl Series {
    /// Every series, coarsest first.
    pub const ALL: [Series; 7] = [
        Series::E3,
        Series::E6,
        Series::E12,
        Series::E24,
        Series::E48,
        Series::E96,
        Series::E192,
    ];

    /// "E24".
    pub fn name(self) -> &'static str {
        match self {
            Series::E3 => "E3",
            Series::E6 => "E6",
            Series::E12 => "E12",
            Series::E24 => "E24",
            Series::E48 => "E48",
            Series::E96 => "E96",
            Series::E192 => "E192",
        }
    }

    /// The series called `name` ("E24").
    pub fn from_name(name: &str) -> Option<Series> {
        Series::ALL.into_iter().find(|s| s.name() == name)
    }

    /// Values per decade.
    pub fn per_decade(self) -> usize {
        match self {
            Series::E3 => 3,
            Series::E6 => 6,
            Series::E12 => 12,
            Series::E24 => 24,
            Series::E48 => 48,
            Series::E96 => 96,
            Series::E192 => 192,
        }
    }

    /// The tolerance the series was made for, ± percent (IEC 60063: each series' step matches
    /// it). E3 is listed at 40 %, past the usual resistor tolerances.
    pub fn tolerance_pct(self) -> f64 {
        match self {
            Series::E3 => 40.0,
            Series::E6 => 20.0,
            Series::E12 => 10.0,
            Series::E24 => 5.0,
            Series::E48 => 2.0,
            Series::E96 => 1.0,
            Series::E192 => 0.5,
        }
    }

    /// The mantissas of one decade as three-digit integers (100 for 1.0, 470 for 4.7).
    pub fn mantissas(self) -> impl Iterator<Item = u16> {
        let n = self.per_decade();
        let (table, scale): (&'static [u16], u16) = if n <= 24 { (&E24, 10) } else { (&E192, 1) };
        let step = table.len() / n;
        table.iter().step_by(step).map(move |m| m * scale)
    }

    /// Whether the three-digit mantissa `m` is one of the series'.
    fn has_mantissa(self, m: u16) -> bool {
        self.mantissas().any(|x| x == m)
    }

    /// Every value of the series from `low` to `high` (inclusive, positive), ascending.
    pub fn values_in(self, low: f64, high: f64) -> Vec<f64> {
        let mut out = Vec::new();
        if !(low > 0.0 && high >= low && high.is_finite()) {
            return out;
        }
        for exponent in LOWEST_EXPONENT..=HIGHEST_EXPONENT {
            for m in self.mantissas() {
                let v = value_of(m, exponent - 2);
                // A value equal to a bound within rounding counts as inside it.
                if v >= low * (1.0 - 1e-12) && v <= high * (1.0 + 1e-12) {
                    out.push(v);
                }
            }
        }
        out
    }

    /// Whether `value` is a value of this series (to within 1 part in 10^9).
    pub fn contains(self, value: f64) -> bool {
        split(value).is_some_and(|(m, _)| self.has_mantissa(m))
    }

    /// The series values next to `value`: the largest at or below it and the smallest at or
    /// above it (the same value twice when it is in the series). `None` outside the decades
    /// the series is built for.
    pub fn neighbours(self, value: f64) -> Option<(f64, f64)> {
        if !(value > 0.0 && value.is_finite()) {
            return None;
        }
        let values = self.values_in(value / 10.5, value * 10.5);
        let at = values.partition_point(|v| *v < value * (1.0 - 1e-12));
        let above = *values.get(at)?;
        let below = if above <= value * (1.0 + 1e-12) {
            above
        } else {
            *values.get(at.checked_sub(1)?)?
        };
        Some((below, above))
    }

    /// The series value nearest `value` on a ratio scale (the one with the smaller relative
    /// error), the lower of two equally near.
    pub fn nearest(self, value: f64) -> Option<f64> {
        let (below, above) = self.neighbours(value)?;
        Some(if value / below <= above / value {
            below
        } else {
            above
        })
    }

    /// The coarsest series that has `value`, or `None` when no series has it.
    pub fn coarsest_containing(value: f64) -> Option<Series> {
        Series::ALL.into_iter().find(|s| s.contains(value))
    }
}

/// `m` · 10^`power`, with one rounding.
fn value_of(m: u16, power: i32) -> f64 {
    let m = f64::from(m);
    let p = power.unsigned_abs() as usize;
    if power >= 0 {
        m * POWERS[p.min(15)]
    } else {
        m / POWERS[p.min(15)]
    }
}

/// `value` as a three-digit mantissa (100..=999) and its power of ten, when it has three
/// significant figures or fewer (within 1 part in 10^9) and lies in the decades of the series.
fn split(value: f64) -> Option<(u16, i32)> {
    if !(value > 0.0 && value.is_finite()) {
        return None;
    }
    let mut power = libm::floor(libm::log10(value)) as i32 - 2;
    if !(LOWEST_EXPONENT - 2..=HIGHEST_EXPONENT - 2).contains(&power) {
        return None;
    }
    let mut scaled = if power >= 0 {
        value / POWERS[power as usize]
    } else {
        value * POWERS[(-power) as usize]
    };
    // log10 may land one decade off for values a hair below a power of ten.
    if scaled >= 999.5 {
        power += 1;
        scaled /= 10.0;
    } else if scaled < 99.5 {
        power -= 1;
        scaled *= 10.0;
    }
    let m = libm::round(scaled);
    if libm::fabs(scaled - m) > 1e-9 * scaled || !(100.0..=999.0).contains(&m) {
        return None;
    }
    Some((m as u16, power))
}

crate::output::out_words!(Series {
    E3 => "E3",
    E6 => "E6",
    E12 => "E12",
    E24 => "E24",
    E48 => "E48",
    E96 => "E96",
    E192 => "E192",
});
