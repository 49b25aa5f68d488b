//! The divider picker: two resistors from standard series that put a regulator's output (or an
//! enable / undervoltage threshold) inside its window once every tolerance is counted.
//!
//! # Method
//!
//! Every divider here sets a voltage of one form,
//!
//!   V = V_x·(1 + R_set/R_sense) + I_pin·R_set,
//!
//! where R_sense carries the reference (or pin threshold) V_x and R_set carries the sense current
//! V_x/R_sense plus the pin current I_pin, signed the way datasheets give it, so that a positive
//! pin current raises V:
//!
//! - feedback pin, reference to ground: R_sense = R_bot, R_set = R_top:
//!   V_out = V_ref·(1 + R_top/R_bot) + I_fb·R_top, I_fb positive flowing into the FB pin;
//! - reference between the output and an adjust pin: R_sense = R1 (output to adjust, the upper
//!   resistor), R_set = R2 (adjust to ground): V_out = V_ref·(1 + R2/R1) + I_adj·R2, I_adj
//!   positive flowing out of the ADJ pin into R2;
//! - threshold divider from the input to an enable / undervoltage pin (R_top input to pin,
//!   R_bot pin to ground): V_start = V_rise·(1 + R_top/R_bot) + I_off·R_top and
//!   V_stop = V_fall·(1 + R_top/R_bot) + I_on·R_top, with I_off and I_on the pin currents while
//!   the part is off and on (a switched hysteresis current makes them differ).
//!
//! These follow from Kirchhoff's current law at the divider node and Ohm's law.
//!
//! **Search.** For each series value of R_sense in the resistance range, the ideal R_set is solved
//! from the target, and a binary search in the sorted values of R_set's series finds its two
//! neighbours; so an E192 search over three decades evaluates about 1 150 pairs, not 330 000.
//! A pair is a candidate when its sense current lies in the wanted current range and its nominal
//! output lies inside the window. Candidates are ranked by |nominal error|, then by how far the
//! sense current is from the middle of the wanted range (on a log scale), then by the coarser
//! (cheaper) series the two values belong to.
//!
//! **Worst case.** V is affine in V_x, in R_set and in I_pin, and monotone in R_sense, so its
//! extremes over the box of tolerances lie on the box's corners: all 16 corners of (V_x, R_top,
//! R_bot, I_pin) are evaluated and the lowest and highest kept with the corner that gives each.
//! Each resistor's half-range is its tolerance plus its drift |TCR|·ΔT, with ΔT the larger
//! distance from 25 °C to either end of the temperature range. The root-sum-square spread takes
//! each of the six terms (V_x, each resistor's tolerance, each resistor's drift, I_pin) alone at
//! the ends of its range, and adds the half-swings in quadrature.
//!
//! **Monte Carlo.** Each of the six terms is drawn independently: normal with σ = half-range/3,
//! truncated at ±3σ (resistors are sorted against their tolerance, so no part lies outside it),
//! or uniform over its range. The drift term stands for an unknown TCR within its bound at the
//! temperature extreme, so the yield is the yield at that extreme. The generator is PCG-64 (MCG
//! variant, `rand_pcg`) seeded from the given seed, so the same link gives the same numbers;
//! normal deviates come from Marsaglia's polar method.
//!
//! # Assumptions
//!
//! The reference tolerance covers its whole temperature range; the pin current lies anywhere in
//! its range, independent of temperature; resistors drift linearly with temperature; the
//! regulator's loop holds the pin exactly at the reference; no leakage other than the pin
//! current loads the divider node.
//!
//! # Sources
//!
//! Series values: IEC 60063 (see [`crate::series`]). Extreme-value and root-sum-square
//! tolerance analysis: the usual practice of worst-case circuit analysis. Truncation at ±3σ for a
//! tolerance band: common practice. Marsaglia and Bray, "A convenient method for generating
//! normal variables", SIAM Review 6 (1964). PCG: M. E. O'Neill, "PCG: A family of simple fast
//! space-efficient statistically good algorithms for random number generation" (2014).

use crate::error::check::figure as show;
use crate::error::check::needed;
use crate::error::{check, InputError};
use crate::fields::{count, numbers, optional_choice, FieldSource, ReadError};
use crate::series::Series;
use crate::units::{format_quantity, QuantityKind};
use crate::verdict::{overall, titles_with, Status};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;
use rand_core::{Rng, SeedableRng};

/// The temperature at which resistors are at their nominal value.
pub const REFERENCE_TEMP_C: f64 = 25.0;
/// Bins of the Monte Carlo histogram.
pub const HISTOGRAM_BINS: usize = 40;
/// The most Monte Carlo samples one check draws.
pub const MAX_SAMPLES: u32 = 1_000_000;
/// The most candidates one check returns.
pub const MAX_CANDIDATES: u32 = 200;
const DEFAULT_CANDIDATES: u32 = 25;
/// Yield that passes: the share of a normal population within ±3σ, 99.73 % (common practice).
const YIELD_PASS_PCT: f64 = 99.73;
/// Yield below which the check fails.
const YIELD_FAIL_PCT: f64 = 95.0;
/// Power in one resistor above which a warning asks for its rating: half of the 100 mW that a
/// small (0603) chip resistor is usually rated for (common practice).
const POWER_WARNING_W: f64 = 0.05;

/// What the calculator does.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum Mode {
    /// Search the series for a feedback divider that sets V_out.
    Feedback,
    /// Two given resistors: what V_out, and how far it spreads.
    Reverse,
    /// Search for an enable / undervoltage divider with given start and stop voltages.
    Threshold,
}

/// Where the reference sits.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Topology {
    /// At a ground-referenced feedback pin: R_bot carries V_ref.
    Feedback,
    /// Between the output and an adjust pin: R_top (R1) carries V_ref.
    Adjust,
}

/// How Monte Carlo draws each term.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum Distribution {
    /// Normal with σ = half-range / 3, truncated at ±3σ.
    Normal,
    /// Uniform over the range.
    Uniform,
}

/// What the engineer asks. Voltages in V, currents in A (pin currents signed: positive into a
/// feedback or enable pin, out of an adjust pin, the directions that raise V), resistances in Ω, temperatures in °C, tolerances in ± percent, TCR in ± ppm/K.
/// Keys are the camelCase forms; every key is read in every mode and the keys a mode does not
/// use are ignored, so a page can send all its fields.
#[derive(Clone, Debug, PartialEq)]
pub struct DividerInput {
    pub mode: Mode,
    pub topology: Option<Topology>,
    pub series_top: Option<Series>,
    pub series_bottom: Option<Series>,
    pub tol_top_pct: Option<f64>,
    pub tol_bottom_pct: Option<f64>,
    pub tcr_top_ppm: Option<f64>,
    pub tcr_bottom_ppm: Option<f64>,
    pub temp_min: Option<f64>,
    pub temp_max: Option<f64>,
    pub r_min: Option<f64>,
    pub r_max: Option<f64>,
    pub current_min: Option<f64>,
    pub current_max: Option<f64>,
    pub window_pct: Option<f64>,
    pub vout_min: Option<f64>,
    pub vout_max: Option<f64>,
    pub limit: Option<u32>,
    pub pick: Option<u32>,
    pub vref: Option<f64>,
    pub vref_tol_pct: Option<f64>,
    pub pin_current_min: Option<f64>,
    pub pin_current_max: Option<f64>,
    pub vout_target: Option<f64>,
    pub r_top: Option<f64>,
    pub r_bottom: Option<f64>,
    pub mc_samples: Option<u32>,
    pub mc_seed: Option<u32>,
    pub mc_distribution: Option<Distribution>,
    pub pin_rise: Option<f64>,
    pub pin_fall: Option<f64>,
    pub pin_tol_pct: Option<f64>,
    pub current_off: Option<f64>,
    pub current_on: Option<f64>,
    pub current_tol_pct: Option<f64>,
    pub v_start: Option<f64>,
    pub v_stop: Option<f64>,
}

const SERIES_NAMES: [(&str, Series); 7] = [
    ("E3", Series::E3),
    ("E6", Series::E6),
    ("E12", Series::E12),
    ("E24", Series::E24),
    ("E48", Series::E48),
    ("E96", Series::E96),
    ("E192", Series::E192),
];

impl DividerInput {
    /// Read the input from named fields (`mode`, `voutTarget`, …).
    pub fn read(f: &mut dyn FieldSource) -> Result<DividerInput, ReadError> {
        let mode = crate::fields::choice(
            f,
            "mode",
            &[
                ("feedback", Mode::Feedback),
                ("reverse", Mode::Reverse),
                ("threshold", Mode::Threshold),
            ],
        )?;
        let topology = optional_choice(
            f,
            "topology",
            &[
                ("feedback", Topology::Feedback),
                ("adjust", Topology::Adjust),
            ],
        )?;
        let series_top = optional_choice(f, "seriesTop", &SERIES_NAMES)?;
        let series_bottom = optional_choice(f, "seriesBottom", &SERIES_NAMES)?;
        let mc_distribution = optional_choice(
            f,
            "mcDistribution",
            &[
                ("normal", Distribution::Normal),
                ("uniform", Distribution::Uniform),
            ],
        )?;
        let [limit, pick, mc_samples, mc_seed] = [
            count(f, "limit")?,
            count(f, "pick")?,
            count(f, "mcSamples")?,
            count(f, "mcSeed")?,
        ];
        let [tol_top_pct, tol_bottom_pct, tcr_top_ppm, tcr_bottom_ppm, temp_min, temp_max, r_min, r_max, current_min, current_max, window_pct, vout_min, vout_max, vref, vref_tol_pct, pin_current_min, pin_current_max, vout_target, r_top, r_bottom, pin_rise, pin_fall, pin_tol_pct, current_off, current_on, current_tol_pct, v_start, v_stop] =
            numbers(
                f,
                &[
                    "tolTopPct",
                    "tolBottomPct",
                    "tcrTopPpm",
                    "tcrBottomPpm",
                    "tempMin",
                    "tempMax",
                    "rMin",
                    "rMax",
                    "currentMin",
                    "currentMax",
                    "windowPct",
                    "voutMin",
                    "voutMax",
                    "vref",
                    "vrefTolPct",
                    "pinCurrentMin",
                    "pinCurrentMax",
                    "voutTarget",
                    "rTop",
                    "rBottom",
                    "pinRise",
                    "pinFall",
                    "pinTolPct",
                    "currentOff",
                    "currentOn",
                    "currentTolPct",
                    "vStart",
                    "vStop",
                ],
            )?;
        Ok(DividerInput {
            mode,
            topology,
            series_top,
            series_bottom,
            tol_top_pct,
            tol_bottom_pct,
            tcr_top_ppm,
            tcr_bottom_ppm,
            temp_min,
            temp_max,
            r_min,
            r_max,
            current_min,
            current_max,
            window_pct,
            vout_min,
            vout_max,
            limit,
            pick,
            vref,
            vref_tol_pct,
            pin_current_min,
            pin_current_max,
            vout_target,
            r_top,
            r_bottom,
            mc_samples,
            mc_seed,
            mc_distribution,
            pin_rise,
            pin_fall,
            pin_tol_pct,
            current_off,
            current_on,
            current_tol_pct,
            v_start,
            v_stop,
        })
    }
}

/// Which check a [`Check`] reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum CheckId {
    /// The worst case inside the window.
    Window,
    /// The divider current inside the wanted range.
    Current,
    /// The Monte Carlo yield.
    Yield,
    /// Start and stop ranges apart (threshold dividers).
    Hysteresis,
}

/// One check of the divider, its outcome and the reason in words.
pub type Check = crate::verdict::Check<CheckId>;

/// Where a divider current sits against the wanted range.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum CurrentFit {
    Low,
    In,
    High,
}

/// One pair of resistors for a feedback divider.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Candidate {
    pub r_top: f64,
    pub r_bottom: f64,
    /// The coarsest series that has each value; `None` for a value in no series.
    pub series_top: Option<Series>,
    pub series_bottom: Option<Series>,
    /// Nominal output (pin current at the middle of its range).
    pub vout: f64,
    /// Nominal output against the target, percent.
    pub error_pct: f64,
    /// Current in the resistor across the reference, V_ref/R_sense.
    pub sense_current: f64,
    /// Current in the other resistor: sense current plus pin current.
    pub set_current: f64,
    /// Dissipation of both resistors together.
    pub power_w: f64,
    pub worst_min: f64,
    pub worst_max: f64,
    /// Root-sum-square spread, ± volts.
    pub rss: f64,
    /// The worst case lies inside the window.
    pub fits_window: bool,
    pub current_fit: CurrentFit,
}

/// One end of a term's range.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum End {
    Low,
    High,
}

/// The corner of the tolerance box where an extreme lies (pin current low = its minimum).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Corner {
    pub vref: End,
    pub r_top: End,
    pub r_bottom: End,
    pub pin_current: End,
}

/// Which term a [`Contribution`] is.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum Term {
    Vref,
    RTopTol,
    RTopDrift,
    RBottomTol,
    RBottomDrift,
    PinCurrent,
}

/// The output with one term alone at the low and at the high end of its range.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Contribution {
    pub id: Term,
    pub title: String,
    pub low: f64,
    pub high: f64,
}

/// The picked candidate's worst case, term by term.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Detail {
    pub contributions: Vec<Contribution>,
    pub min_corner: Corner,
    pub max_corner: Corner,
    /// The temperature distance over which drift is counted, K.
    pub delta_t: f64,
    pub drift_top_pct: f64,
    pub drift_bottom_pct: f64,
}

/// Equal-width bins over `lo..=hi`.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Histogram {
    pub lo: f64,
    pub hi: f64,
    pub counts: Vec<u32>,
}

/// A seeded Monte Carlo run of the picked candidate.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct MonteCarlo {
    pub samples: u32,
    pub seed: u32,
    pub distribution: Distribution,
    pub mean: f64,
    pub sigma: f64,
    pub min: f64,
    pub max: f64,
    /// Samples inside the window.
    pub inside: u32,
    pub yield_pct: f64,
    pub histogram: Histogram,
}

/// One pair of resistors for a threshold divider.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ThresholdCandidate {
    pub r_top: f64,
    pub r_bottom: f64,
    pub series_top: Option<Series>,
    pub series_bottom: Option<Series>,
    pub start: f64,
    pub stop: f64,
    pub start_error_pct: f64,
    pub stop_error_pct: f64,
    pub start_low: f64,
    pub start_high: f64,
    pub stop_low: f64,
    pub stop_high: f64,
    /// Divider current at the start voltage.
    pub current_at_start: f64,
    /// Dissipation at the start voltage.
    pub power_w: f64,
    /// Both worst-case ranges inside their windows.
    pub fits: bool,
}

/// The threshold divider's search.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ThresholdResult {
    /// The exact resistances that meet both voltages; `None` when the pin currents do not set
    /// start and stop apart (then only the ratio is fixed, from the start voltage).
    pub ideal_top: Option<f64>,
    pub ideal_bottom: Option<f64>,
    pub start_min: f64,
    pub start_max: f64,
    pub stop_min: f64,
    pub stop_max: f64,
    pub candidates: Vec<ThresholdCandidate>,
}

/// Everything the divider picker found.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct DividerReport {
    pub mode: Mode,
    pub verdict: Status,
    pub summary: String,
    pub checks: Vec<Check>,
    pub warnings: Vec<String>,
    /// Pairs evaluated by the search.
    pub searched: u32,
    /// The window on V_out (feedback and reverse; zero in threshold mode).
    pub window_min: f64,
    pub window_max: f64,
    /// Feedback and reverse candidates, best first (reverse: the given pair).
    pub candidates: Vec<Candidate>,
    /// The candidate the detail and Monte Carlo describe.
    pub pick: u32,
    pub detail: Option<Detail>,
    pub monte_carlo: Option<MonteCarlo>,
    pub threshold: Option<ThresholdResult>,
}

/// The resistor parts: tolerance and drift as fractions.
#[derive(Clone, Copy, Debug, PartialEq)]
struct Parts {
    tol_top: f64,
    tol_bottom: f64,
    drift_top: f64,
    drift_bottom: f64,
    delta_t: f64,
}

#[derive(Clone, Copy, Debug, PartialEq)]
struct McSpec {
    samples: u32,
    seed: u32,
    distribution: Distribution,
}

#[derive(Clone, Copy, Debug, PartialEq)]
struct ThresholdSpec {
    rise: f64,
    fall: f64,
    pin_tol: f64,
    current_off: f64,
    current_on: f64,
    current_tol: f64,
    start: f64,
    stop: f64,
    window: f64,
}

/// A [`DividerInput`] whose every value the mode uses has been checked.
#[derive(Clone, Debug, PartialEq)]
pub struct ValidDivider {
    mode: Mode,
    topology: Topology,
    parts: Parts,
    series_top: Series,
    series_bottom: Series,
    r_min: f64,
    r_max: f64,
    current_min: f64,
    current_max: f64,
    limit: usize,
    pick: usize,
    vref: f64,
    vref_tol: f64,
    pin_min: f64,
    pin_max: f64,
    target: f64,
    window_min: f64,
    window_max: f64,
    r_top: f64,
    r_bottom: f64,
    monte_carlo: Option<McSpec>,
    threshold: Option<ThresholdSpec>,
    found: Found,
}

/// What the search found, kept by validation so that the report cannot fail.
#[derive(Clone, Debug, PartialEq)]
struct Found {
    candidates: Vec<Candidate>,
    threshold: Vec<ThresholdCandidate>,
    ideal: Option<(f64, f64)>,
    searched: u32,
    warnings: Vec<String>,
}

/// Four figures, for voltages that a window of a few percent separates.
#[inline(never)]
fn show4(value: f64) -> String {
    format_quantity(value, QuantityKind::Voltage, 4)
}

/// Finite and within `low..=high`, for ranges wider than [`check::LIMIT`] (resistances).
#[inline(never)]
fn in_range(
    field: &'static str,
    label: &str,
    value: f64,
    low: f64,
    high: f64,
    kind: QuantityKind,
) -> Result<f64, InputError> {
    if value.is_finite() && (low..=high).contains(&value) {
        Ok(value)
    } else {
        Err(InputError::new(
            field,
            format!(
                "{label} must be between {} and {}",
                check::show(low, kind),
                check::show(high, kind)
            ),
        ))
    }
}

/// The smallest and largest resistance searched or given.
const R_LOWEST: f64 = 0.1;
const R_HIGHEST: f64 = 1.0e9;
/// The largest pin current magnitude: far above any feedback, adjust or enable pin.
const PIN_CURRENT_LIMIT: f64 = 1.0e-3;

impl DividerInput {
    /// Check every value the mode uses, in the order the fields appear on the page, and return
    /// the first problem.
    pub fn validate(&self) -> Result<ValidDivider, InputError> {
        use QuantityKind::{Current, Percent, Resistance, Tempco, Temperature, Voltage};
        let mode = self.mode;
        let tol = |field, label, v: Option<f64>| -> Result<f64, InputError> {
            Ok(check::within(field, label, needed(field, label, v)?, 0.0, 20.0, Percent)? / 100.0)
        };
        let tcr = |field, label, v: Option<f64>| -> Result<f64, InputError> {
            let v = check::within(
                field,
                label,
                needed(field, label, v)?,
                -5000.0,
                5000.0,
                Tempco,
            )?;
            Ok(libm::fabs(v) * 1e-6)
        };
        let tol_top = tol("tolTopPct", "R_top's tolerance", self.tol_top_pct)?;
        let tol_bottom = tol("tolBottomPct", "R_bot's tolerance", self.tol_bottom_pct)?;
        let tcr_top = tcr("tcrTopPpm", "R_top's TCR", self.tcr_top_ppm)?;
        let tcr_bottom = tcr("tcrBottomPpm", "R_bot's TCR", self.tcr_bottom_ppm)?;
        let temp_min = check::within(
            "tempMin",
            "The lowest temperature",
            needed("tempMin", "The lowest temperature", self.temp_min)?,
            -100.0,
            250.0,
            Temperature,
        )?;
        let temp_max = check::within(
            "tempMax",
            "The highest temperature",
            needed("tempMax", "The highest temperature", self.temp_max)?,
            -100.0,
            250.0,
            Temperature,
        )?;
        if temp_max < temp_min {
            return Err(InputError::new(
                "tempMax",
                format!(
                    "The highest temperature must not be below the lowest ({})",
                    show(temp_min, Temperature)
                ),
            ));
        }
        let delta_t = (temp_max - REFERENCE_TEMP_C)
            .max(REFERENCE_TEMP_C - temp_min)
            .max(0.0);
        let parts = Parts {
            tol_top,
            tol_bottom,
            drift_top: tcr_top * delta_t,
            drift_bottom: tcr_bottom * delta_t,
            delta_t,
        };
        for (field, label, total) in [
            ("tcrTopPpm", "R_top", tol_top + parts.drift_top),
            ("tcrBottomPpm", "R_bot", tol_bottom + parts.drift_bottom),
        ] {
            if total >= 0.5 {
                return Err(InputError::new(
                    field,
                    format!(
                        "{label}'s tolerance plus drift over the temperature range comes to {}; \
                         it must stay below 50 %",
                        show(total * 100.0, Percent)
                    ),
                ));
            }
        }

        let searching = mode != Mode::Reverse;
        let (mut series_top, mut series_bottom) = (Series::E24, Series::E24);
        let (mut r_min, mut r_max) = (1.0, 1.0);
        // Reverse mode has no range to meet unless one is given.
        let (mut current_min, mut current_max) = (0.0, f64::INFINITY);
        let range_given = self.current_min.is_some() || self.current_max.is_some();
        if searching {
            series_top = self.series_top.ok_or_else(|| {
                InputError::new("seriesTop", "Choose R_top's series (E3 to E192)")
            })?;
            series_bottom = self.series_bottom.ok_or_else(|| {
                InputError::new("seriesBottom", "Choose R_bot's series (E3 to E192)")
            })?;
            r_min = in_range(
                "rMin",
                "The smallest resistance",
                needed("rMin", "The smallest resistance", self.r_min)?,
                R_LOWEST,
                R_HIGHEST,
                Resistance,
            )?;
            r_max = in_range(
                "rMax",
                "The largest resistance",
                needed("rMax", "The largest resistance", self.r_max)?,
                R_LOWEST,
                R_HIGHEST,
                Resistance,
            )?;
            if r_max < r_min {
                return Err(InputError::new(
                    "rMax",
                    format!(
                        "The largest resistance must not be below the smallest ({})",
                        show(r_min, Resistance)
                    ),
                ));
            }
        }
        if searching || range_given {
            current_min = check::within(
                "currentMin",
                "The least divider current",
                needed("currentMin", "The least divider current", self.current_min)?,
                1e-9,
                1.0,
                Current,
            )?;
            current_max = check::within(
                "currentMax",
                "The most divider current",
                needed("currentMax", "The most divider current", self.current_max)?,
                1e-9,
                1.0,
                Current,
            )?;
            if current_max < current_min {
                return Err(InputError::new(
                    "currentMax",
                    format!(
                        "The most divider current must not be below the least ({})",
                        show(current_min, Current)
                    ),
                ));
            }
        }
        let limit = match self.limit {
            None => DEFAULT_CANDIDATES,
            Some(n) if (1..=MAX_CANDIDATES).contains(&n) => n,
            Some(_) => {
                return Err(InputError::new(
                    "limit",
                    "The number of candidates must be between 1 and 200",
                ))
            }
        } as usize;
        let pick = self.pick.unwrap_or(0) as usize;

        let mut valid = ValidDivider {
            mode,
            topology: Topology::Feedback,
            parts,
            series_top,
            series_bottom,
            r_min,
            r_max,
            current_min,
            current_max,
            limit,
            pick,
            vref: 0.0,
            vref_tol: 0.0,
            pin_min: 0.0,
            pin_max: 0.0,
            target: 0.0,
            window_min: 0.0,
            window_max: 0.0,
            r_top: 0.0,
            r_bottom: 0.0,
            monte_carlo: None,
            threshold: None,
            found: Found {
                candidates: Vec::new(),
                threshold: Vec::new(),
                ideal: None,
                searched: 0,
                warnings: Vec::new(),
            },
        };
        if mode == Mode::Threshold {
            let spec = self.validate_threshold()?;
            valid.threshold = Some(spec);
            valid.found = valid.find_threshold(&spec)?;
            return Ok(valid);
        }

        valid.topology = self.topology.ok_or_else(|| {
            InputError::new(
                "topology",
                "Choose where the reference sits: a feedback pin or an adjust pin",
            )
        })?;
        valid.vref = check::within(
            "vref",
            "V_ref",
            needed("vref", "V_ref", self.vref)?,
            0.01,
            1000.0,
            Voltage,
        )?;
        valid.vref_tol = check::within(
            "vrefTolPct",
            "V_ref's tolerance",
            needed("vrefTolPct", "V_ref's tolerance", self.vref_tol_pct)?,
            0.0,
            20.0,
            Percent,
        )? / 100.0;
        let pin = |field, label, v: Option<f64>| {
            check::within(
                field,
                label,
                v.unwrap_or(0.0),
                -PIN_CURRENT_LIMIT,
                PIN_CURRENT_LIMIT,
                Current,
            )
        };
        valid.pin_min = pin(
            "pinCurrentMin",
            "The least pin current",
            self.pin_current_min,
        )?;
        valid.pin_max = pin(
            "pinCurrentMax",
            "The most pin current",
            self.pin_current_max,
        )?;
        if valid.pin_max < valid.pin_min {
            return Err(InputError::new(
                "pinCurrentMax",
                format!(
                    "The most pin current must not be below the least ({})",
                    show(valid.pin_min, Current)
                ),
            ));
        }

        if mode == Mode::Reverse {
            for (field, label, value) in [
                ("rTop", "R_top", self.r_top),
                ("rBottom", "R_bot", self.r_bottom),
            ] {
                let r = in_range(
                    field,
                    label,
                    needed(field, label, value)?,
                    R_LOWEST,
                    R_HIGHEST,
                    Resistance,
                )?;
                if field == "rTop" {
                    valid.r_top = r;
                } else {
                    valid.r_bottom = r;
                }
            }
        }
        let target = match (mode, self.vout_target) {
            (Mode::Reverse, None) => valid.nominal_of(valid.r_top, valid.r_bottom),
            (_, value) => {
                let v = check::above(
                    "voutTarget",
                    "The V_out target",
                    needed("voutTarget", "The V_out target", value)?,
                    0.0,
                    Voltage,
                )?;
                if mode == Mode::Feedback && v <= valid.vref {
                    return Err(InputError::new(
                        "voutTarget",
                        format!(
                            "The V_out target must be above V_ref ({}): a divider can only set \
                             the output above its reference",
                            show4(valid.vref)
                        ),
                    ));
                }
                v
            }
        };
        valid.target = target;
        (valid.window_min, valid.window_max) = match (self.vout_min, self.vout_max) {
            (Some(lo), Some(hi)) => {
                let lo = check::above("voutMin", "The lowest V_out", lo, 0.0, Voltage)?;
                let hi = check::finite("voutMax", "The highest V_out", hi, Voltage)?;
                if hi <= lo {
                    return Err(InputError::new(
                        "voutMax",
                        format!(
                            "The highest V_out must be above the lowest ({}): the window is empty",
                            show4(lo)
                        ),
                    ));
                }
                if !(lo..=hi).contains(&target) {
                    return Err(InputError::new(
                        "voutTarget",
                        format!(
                            "The V_out target must lie inside the window ({} to {})",
                            show4(lo),
                            show4(hi)
                        ),
                    ));
                }
                (lo, hi)
            }
            (Some(_), None) => {
                return Err(InputError::new(
                    "voutMax",
                    "Give the highest V_out with the lowest, or neither and a ± % window",
                ))
            }
            (None, Some(_)) => {
                return Err(InputError::new(
                    "voutMin",
                    "Give the lowest V_out with the highest, or neither and a ± % window",
                ))
            }
            (None, None) => {
                let pct = needed("windowPct", "The window (± %)", self.window_pct)?;
                if pct == 0.0 {
                    return Err(InputError::new(
                        "windowPct",
                        "A window of ± 0 % is empty: no divider can land in it",
                    ));
                }
                let w = check::within("windowPct", "The window", pct, 0.0, 50.0, Percent)? / 100.0;
                (target * (1.0 - w), target * (1.0 + w))
            }
        };
        let samples = self.mc_samples.unwrap_or(0);
        if samples > MAX_SAMPLES {
            return Err(InputError::new(
                "mcSamples",
                "Monte Carlo takes at most 1000000 samples",
            ));
        }
        if samples > 0 {
            valid.monte_carlo = Some(McSpec {
                samples,
                seed: self.mc_seed.unwrap_or(1),
                distribution: self.mc_distribution.unwrap_or(Distribution::Normal),
            });
        }
        valid.found = if mode == Mode::Reverse {
            Found {
                candidates: alloc::vec![valid.candidate(valid.r_top, valid.r_bottom)],
                threshold: Vec::new(),
                ideal: None,
                searched: 1,
                warnings: Vec::new(),
            }
        } else {
            let (mut all, searched) = valid.search()?;
            let mut warnings = Vec::new();
            if all.len() > valid.limit {
                warnings.push(format!(
                    "Showing the best {} of {} candidates",
                    valid.limit,
                    all.len()
                ));
                all.truncate(valid.limit);
            }
            Found {
                candidates: all,
                threshold: Vec::new(),
                ideal: None,
                searched,
                warnings,
            }
        };
        Ok(valid)
    }

    fn validate_threshold(&self) -> Result<ThresholdSpec, InputError> {
        use QuantityKind::{Current, Percent, Voltage};
        let rise = check::within(
            "pinRise",
            "The pin's rising threshold",
            needed("pinRise", "The pin's rising threshold", self.pin_rise)?,
            0.01,
            1000.0,
            Voltage,
        )?;
        let fall = check::within(
            "pinFall",
            "The pin's falling threshold",
            needed("pinFall", "The pin's falling threshold", self.pin_fall)?,
            0.01,
            1000.0,
            Voltage,
        )?;
        if fall > rise {
            return Err(InputError::new(
                "pinFall",
                format!(
                    "The pin's falling threshold must not be above its rising one ({})",
                    show4(rise)
                ),
            ));
        }
        let pct = |field, label, v: Option<f64>| -> Result<f64, InputError> {
            Ok(check::within(field, label, v.unwrap_or(0.0), 0.0, 50.0, Percent)? / 100.0)
        };
        let pin_tol = pct("pinTolPct", "The threshold tolerance", self.pin_tol_pct)?;
        let current_tol = pct(
            "currentTolPct",
            "The pin-current tolerance",
            self.current_tol_pct,
        )?;
        let current = |field, label, v: Option<f64>| {
            check::within(
                field,
                label,
                v.unwrap_or(0.0),
                -PIN_CURRENT_LIMIT,
                PIN_CURRENT_LIMIT,
                Current,
            )
        };
        let current_off = current("currentOff", "The pin current while off", self.current_off)?;
        let current_on = current("currentOn", "The pin current while on", self.current_on)?;
        let start = check::above(
            "vStart",
            "The start voltage",
            needed("vStart", "The start voltage", self.v_start)?,
            0.0,
            Voltage,
        )?;
        if start <= rise {
            return Err(InputError::new(
                "vStart",
                format!(
                    "The start voltage must be above the pin's rising threshold ({})",
                    show4(rise)
                ),
            ));
        }
        let stop = check::above(
            "vStop",
            "The stop voltage",
            needed("vStop", "The stop voltage", self.v_stop)?,
            0.0,
            Voltage,
        )?;
        if stop >= start {
            return Err(InputError::new(
                "vStop",
                format!(
                    "The stop voltage must be below the start voltage ({})",
                    show4(start)
                ),
            ));
        }
        if stop <= fall {
            return Err(InputError::new(
                "vStop",
                format!(
                    "The stop voltage must be above the pin's falling threshold ({})",
                    show4(fall)
                ),
            ));
        }
        let window = needed("windowPct", "The window (± %)", self.window_pct)?;
        if window == 0.0 {
            return Err(InputError::new(
                "windowPct",
                "A window of ± 0 % is empty: no divider can land in it",
            ));
        }
        let window = check::within("windowPct", "The window", window, 0.0, 50.0, Percent)? / 100.0;
        Ok(ThresholdSpec {
            rise,
            fall,
            pin_tol,
            current_off,
            current_on,
            current_tol,
            start,
            stop,
            window,
        })
    }
}

/// Check and compute in one step.
pub fn check_divider(input: &DividerInput) -> Result<DividerReport, InputError> {
    Ok(input.validate()?.report())
}

/// A divider with all its tolerances: V = v·(1 + R_set/R_sense) + i·R_set.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Spread {
    pub v: f64,
    /// Half-range of v, volts.
    pub v_half: f64,
    pub i_mid: f64,
    pub i_half: f64,
    pub top: f64,
    pub bottom: f64,
    /// Tolerance and drift of each resistor, as fractions.
    pub top_tol: f64,
    pub top_drift: f64,
    pub bottom_tol: f64,
    pub bottom_drift: f64,
    /// R_top is R_set (feedback pin, threshold); otherwise R_bot is (adjust pin).
    pub set_is_top: bool,
}

impl Spread {
    /// The voltage the divider sets with these values.
    pub fn level(&self, v: f64, i: f64, top: f64, bottom: f64) -> f64 {
        let (set, sense) = if self.set_is_top {
            (top, bottom)
        } else {
            (bottom, top)
        };
        v * (1.0 + set / sense) + i * set
    }

    pub fn nominal(&self) -> f64 {
        self.level(self.v, self.i_mid, self.top, self.bottom)
    }

    /// The level at a corner of the tolerance box.
    pub fn at_corner(&self, c: Corner) -> f64 {
        let sign = |e: End| if e == End::High { 1.0 } else { -1.0 };
        self.level(
            self.v + sign(c.vref) * self.v_half,
            self.i_mid + sign(c.pin_current) * self.i_half,
            self.top * (1.0 + sign(c.r_top) * (self.top_tol + self.top_drift)),
            self.bottom * (1.0 + sign(c.r_bottom) * (self.bottom_tol + self.bottom_drift)),
        )
    }

    /// The lowest and highest level over the 16 corners, with their corners.
    pub fn extremes(&self) -> ((f64, Corner), (f64, Corner)) {
        let end = |bit: u32| if bit == 1 { End::High } else { End::Low };
        let mut low = (f64::INFINITY, Corner::ALL_LOW);
        let mut high = (f64::NEG_INFINITY, Corner::ALL_LOW);
        for k in 0..16u32 {
            let c = Corner {
                vref: end(k & 1),
                r_top: end((k >> 1) & 1),
                r_bottom: end((k >> 2) & 1),
                pin_current: end((k >> 3) & 1),
            };
            let v = self.at_corner(c);
            if v < low.0 {
                low = (v, c);
            }
            if v > high.0 {
                high = (v, c);
            }
        }
        (low, high)
    }

    /// The level with each term alone at the low and high end of its range.
    fn one_at_a_time(&self) -> [(Term, f64, f64); 6] {
        let n = *self;
        let at = |f: &dyn Fn(&mut Spread, f64)| {
            let mut lo = n;
            f(&mut lo, -1.0);
            let mut hi = n;
            f(&mut hi, 1.0);
            (lo.nominal(), hi.nominal())
        };
        let vref = at(&|s, k| s.v += k * n.v_half);
        let top_tol = at(&|s, k| s.top *= 1.0 + k * n.top_tol);
        let top_drift = at(&|s, k| s.top *= 1.0 + k * n.top_drift);
        let bottom_tol = at(&|s, k| s.bottom *= 1.0 + k * n.bottom_tol);
        let bottom_drift = at(&|s, k| s.bottom *= 1.0 + k * n.bottom_drift);
        let pin = at(&|s, k| s.i_mid += k * n.i_half);
        [
            (Term::Vref, vref.0, vref.1),
            (Term::RTopTol, top_tol.0, top_tol.1),
            (Term::RTopDrift, top_drift.0, top_drift.1),
            (Term::RBottomTol, bottom_tol.0, bottom_tol.1),
            (Term::RBottomDrift, bottom_drift.0, bottom_drift.1),
            (Term::PinCurrent, pin.0, pin.1),
        ]
    }

    /// Root-sum-square of the one-at-a-time half-swings.
    pub fn rss(&self) -> f64 {
        let sum: f64 = self
            .one_at_a_time()
            .iter()
            .map(|(_, lo, hi)| {
                let half = (hi - lo) / 2.0;
                half * half
            })
            .sum();
        libm::sqrt(sum)
    }

    /// A seeded Monte Carlo run; `lo..=hi` is the histogram's span (it must hold the worst
    /// case, which every sample respects) and `window` the range counted as inside.
    pub fn monte_carlo(
        &self,
        samples: u32,
        seed: u32,
        distribution: Distribution,
        window: (f64, f64),
        span: (f64, f64),
    ) -> MonteCarlo {
        let mut draw = Draw::new(seed, distribution);
        let (lo, mut hi) = span;
        if hi <= lo {
            hi = lo + libm::fabs(lo) * 1e-9 + 1e-12;
        }
        let width = (hi - lo) / HISTOGRAM_BINS as f64;
        let mut counts = alloc::vec![0u32; HISTOGRAM_BINS];
        let (mut mean, mut m2) = (0.0, 0.0);
        let (mut min, mut max) = (f64::INFINITY, f64::NEG_INFINITY);
        let mut inside = 0u32;
        for n in 1..=samples {
            let v = self.v + self.v_half * draw.next();
            let top = self.top * (1.0 + self.top_tol * draw.next() + self.top_drift * draw.next());
            let bottom = self.bottom
                * (1.0 + self.bottom_tol * draw.next() + self.bottom_drift * draw.next());
            let i = self.i_mid + self.i_half * draw.next();
            let x = self.level(v, i, top, bottom);
            // Welford's running mean and sum of squared deviations.
            let delta = x - mean;
            mean += delta / f64::from(n);
            m2 += delta * (x - mean);
            min = min.min(x);
            max = max.max(x);
            if x >= window.0 && x <= window.1 {
                inside += 1;
            }
            let bin = libm::floor((x - lo) / width);
            let bin = if bin < 0.0 {
                0
            } else {
                (bin as usize).min(HISTOGRAM_BINS - 1)
            };
            counts[bin] += 1;
        }
        let sigma = if samples > 1 {
            libm::sqrt(m2 / f64::from(samples - 1))
        } else {
            0.0
        };
        MonteCarlo {
            samples,
            seed,
            distribution,
            mean,
            sigma,
            min,
            max,
            inside,
            yield_pct: 100.0 * f64::from(inside) / f64::from(samples.max(1)),
            histogram: Histogram { lo, hi, counts },
        }
    }
}

impl Corner {
    const ALL_LOW: Corner = Corner {
        vref: End::Low,
        r_top: End::Low,
        r_bottom: End::Low,
        pin_current: End::Low,
    };
}

/// Deviates in −1..=1 (a fraction of a term's half-range), from a seeded PCG-64.
struct Draw {
    rng: rand_pcg::Pcg64Mcg,
    distribution: Distribution,
    spare: Option<f64>,
}

impl Draw {
    fn new(seed: u32, distribution: Distribution) -> Draw {
        Draw {
            rng: rand_pcg::Pcg64Mcg::seed_from_u64(u64::from(seed)),
            distribution,
            spare: None,
        }
    }

    /// Uniform in [0, 1): the top 53 bits of one output.
    fn unit(&mut self) -> f64 {
        (self.rng.next_u64() >> 11) as f64 * (1.0 / 9_007_199_254_740_992.0)
    }

    fn next(&mut self) -> f64 {
        match self.distribution {
            Distribution::Uniform => 2.0 * self.unit() - 1.0,
            Distribution::Normal => loop {
                let z = self.normal();
                // Truncate at ±3σ: redraw the 0.27 % outside.
                if libm::fabs(z) <= 3.0 {
                    return z / 3.0;
                }
            },
        }
    }

    /// A standard normal deviate, Marsaglia's polar method (two per accepted pair).
    fn normal(&mut self) -> f64 {
        if let Some(z) = self.spare.take() {
            return z;
        }
        loop {
            let x = 2.0 * self.unit() - 1.0;
            let y = 2.0 * self.unit() - 1.0;
            let s = x * x + y * y;
            if s > 0.0 && s < 1.0 {
                let f = libm::sqrt(-2.0 * libm::log(s) / s);
                self.spare = Some(y * f);
                return x * f;
            }
        }
    }
}

fn term_title(t: Term) -> &'static str {
    match t {
        Term::Vref => "V_ref tolerance",
        Term::RTopTol => "R_top tolerance",
        Term::RTopDrift => "R_top drift",
        Term::RBottomTol => "R_bot tolerance",
        Term::RBottomDrift => "R_bot drift",
        Term::PinCurrent => "Pin current",
    }
}

/// Where `current` sits against `min..=max`, and how far from the range's middle on a log
/// scale (0 at the geometric middle).
fn current_fit(current: f64, min: f64, max: f64) -> (CurrentFit, f64) {
    let fit = if current < min {
        CurrentFit::Low
    } else if current > max {
        CurrentFit::High
    } else {
        CurrentFit::In
    };
    (fit, libm::fabs(libm::log(current / libm::sqrt(min * max))))
}

/// What candidates are ranked by: |error|, distance of the current from the middle of its
/// range, series rank; ties keep the order of discovery.
type RankKey = (f64, f64, usize);

/// `items` sorted by `keys` (one key per item). One sort of indices serves every kind of
/// candidate, so the module carries one sort routine, not one per candidate type.
fn in_rank_order<T>(items: Vec<T>, keys: &[RankKey]) -> Vec<T> {
    let mut order: Vec<usize> = (0..items.len()).collect();
    order.sort_unstable_by(|&a, &b| {
        let (x, y) = (keys[a], keys[b]);
        x.0.total_cmp(&y.0)
            .then(x.1.total_cmp(&y.1))
            .then(x.2.cmp(&y.2))
            .then(a.cmp(&b))
    });
    let mut slots: Vec<Option<T>> = items.into_iter().map(Some).collect();
    order.into_iter().filter_map(|k| slots[k].take()).collect()
}

/// The coarser of the two values' series, for ranking: E3 first, none last.
fn series_rank(a: Option<Series>, b: Option<Series>) -> usize {
    let rank = |s: Option<Series>| s.map_or(Series::ALL.len(), |s| s as usize);
    rank(a).max(rank(b))
}

impl ValidDivider {
    fn spread(&self, top: f64, bottom: f64) -> Spread {
        Spread {
            v: self.vref,
            v_half: self.vref * self.vref_tol,
            i_mid: (self.pin_min + self.pin_max) / 2.0,
            i_half: (self.pin_max - self.pin_min) / 2.0,
            top,
            bottom,
            top_tol: self.parts.tol_top,
            top_drift: self.parts.drift_top,
            bottom_tol: self.parts.tol_bottom,
            bottom_drift: self.parts.drift_bottom,
            set_is_top: self.topology == Topology::Feedback,
        }
    }

    fn nominal_of(&self, top: f64, bottom: f64) -> f64 {
        self.spread(top, bottom).nominal()
    }

    fn candidate(&self, top: f64, bottom: f64) -> Candidate {
        let s = self.spread(top, bottom);
        let vout = s.nominal();
        let sense = if s.set_is_top { bottom } else { top };
        let sense_current = self.vref / sense;
        let set_current = sense_current + s.i_mid;
        let ((worst_min, _), (worst_max, _)) = s.extremes();
        Candidate {
            r_top: top,
            r_bottom: bottom,
            series_top: Series::coarsest_containing(top),
            series_bottom: Series::coarsest_containing(bottom),
            vout,
            error_pct: percent_error(vout, self.target),
            sense_current,
            set_current,
            power_w: self.vref * sense_current + (vout - self.vref) * set_current,
            worst_min,
            worst_max,
            rss: s.rss(),
            fits_window: worst_min >= self.window_min && worst_max <= self.window_max,
            current_fit: current_fit(sense_current, self.current_min, self.current_max).0,
        }
    }

    /// Every pair worth a look: for each value of R_sense, the neighbours of the ideal R_set.
    /// Returns the candidates (current in range, nominal inside the window), best first, and
    /// the number of pairs evaluated; the error when none qualifies says why.
    pub fn search(&self) -> Result<(Vec<Candidate>, u32), InputError> {
        let set_is_top = self.topology == Topology::Feedback;
        let (sense_series, set_series) = if set_is_top {
            (self.series_bottom, self.series_top)
        } else {
            (self.series_top, self.series_bottom)
        };
        let sense_values = sense_series.values_in(self.r_min, self.r_max);
        let set_values = set_series.values_in(self.r_min, self.r_max);
        if sense_values.is_empty() || set_values.is_empty() {
            let empty = if sense_values.is_empty() {
                sense_series
            } else {
                set_series
            };
            return Err(InputError::new(
                "rMin",
                format!(
                    "No {} value lies between {} and {}",
                    empty.name(),
                    show(self.r_min, QuantityKind::Resistance),
                    show(self.r_max, QuantityKind::Resistance)
                ),
            ));
        }
        let i_mid = (self.pin_min + self.pin_max) / 2.0;
        let mut searched = 0u32;
        let mut ranked: Vec<Candidate> = Vec::new();
        let mut keys: Vec<RankKey> = Vec::new();
        // The closest pair seen whatever its current, and the closest in current, for the
        // message when nothing qualifies.
        let mut closest: Option<Candidate> = None;
        let mut any_current = false;
        for &sense in &sense_values {
            let sense_current = self.vref / sense;
            let drive = sense_current + i_mid;
            if drive <= 0.0 {
                continue;
            }
            let ideal = (self.target - self.vref) / drive;
            let at = set_values.partition_point(|v| *v < ideal);
            for set in [at.checked_sub(1), Some(at)]
                .into_iter()
                .flatten()
                .filter_map(|k| set_values.get(k).copied())
            {
                searched += 1;
                let (top, bottom) = if set_is_top {
                    (set, sense)
                } else {
                    (sense, set)
                };
                let c = self.candidate(top, bottom);
                let in_current = c.current_fit == CurrentFit::In;
                let in_window = c.vout >= self.window_min && c.vout <= self.window_max;
                if in_current {
                    any_current = true;
                    if closest
                        .as_ref()
                        .is_none_or(|b| libm::fabs(c.error_pct) < libm::fabs(b.error_pct))
                    {
                        closest = Some(c.clone());
                    }
                }
                if in_current && in_window {
                    let (_, distance) =
                        current_fit(c.sense_current, self.current_min, self.current_max);
                    keys.push((
                        libm::fabs(c.error_pct),
                        distance,
                        series_rank(c.series_top, c.series_bottom),
                    ));
                    ranked.push(c);
                }
            }
        }
        if ranked.is_empty() {
            return Err(self.why_no_candidate(any_current, closest));
        }
        Ok((in_rank_order(ranked, &keys), searched))
    }

    fn why_no_candidate(&self, any_current: bool, closest: Option<Candidate>) -> InputError {
        use QuantityKind::{Current, Percent};
        let series = if self.series_top == self.series_bottom {
            format!("{} values", self.series_top.name())
        } else {
            format!(
                "{} (R_top) and {} (R_bot) values",
                self.series_top.name(),
                self.series_bottom.name()
            )
        };
        match closest {
            Some(c) if any_current => InputError::new(
                "windowPct",
                format!(
                    "No pair of {series} puts the nominal V_out inside the window ({} to {}); \
                     the closest gives {} ({}): try a finer series or a wider window",
                    show4(self.window_min),
                    show4(self.window_max),
                    show4(c.vout),
                    show(c.error_pct, Percent)
                ),
            ),
            _ => InputError::new(
                "currentMin",
                format!(
                    "No pair of {series} between {} and {} gives a divider current from {} to \
                     {}: widen the resistance range or the current range",
                    show(self.r_min, QuantityKind::Resistance),
                    show(self.r_max, QuantityKind::Resistance),
                    show(self.current_min, Current),
                    show(self.current_max, Current)
                ),
            ),
        }
    }

    /// Compute the report (validation has already searched, so this cannot fail).
    pub fn report(&self) -> DividerReport {
        if let Some(spec) = self.threshold {
            return self.threshold_report(&spec);
        }
        let mut warnings = self.found.warnings.clone();
        let candidates = self.found.candidates.clone();
        let searched = self.found.searched;
        let mut pick = self.pick;
        if pick >= candidates.len() {
            warnings.push(format!(
                "Candidate {} does not exist (there are {}); showing the first",
                pick + 1,
                candidates.len()
            ));
            pick = 0;
        }
        // Validation guarantees at least one candidate.
        let Some(chosen) = candidates.get(pick) else {
            return self.empty_report(warnings);
        };
        let s = self.spread(chosen.r_top, chosen.r_bottom);
        let ((_, min_corner), (_, max_corner)) = s.extremes();
        let contributions = s
            .one_at_a_time()
            .iter()
            .map(|&(id, low, high)| Contribution {
                id,
                title: String::from(term_title(id)),
                low,
                high,
            })
            .collect();
        let detail = Detail {
            contributions,
            min_corner,
            max_corner,
            delta_t: self.parts.delta_t,
            drift_top_pct: 100.0 * self.parts.drift_top,
            drift_bottom_pct: 100.0 * self.parts.drift_bottom,
        };
        let monte_carlo = self.monte_carlo.map(|m| {
            s.monte_carlo(
                m.samples,
                m.seed,
                m.distribution,
                (self.window_min, self.window_max),
                (
                    chosen.worst_min.min(self.window_min),
                    chosen.worst_max.max(self.window_max),
                ),
            )
        });
        let checks = self.checks(chosen, monte_carlo.as_ref());
        for (label, r, i) in [
            (
                "R_top",
                chosen.r_top,
                if s.set_is_top {
                    chosen.set_current
                } else {
                    chosen.sense_current
                },
            ),
            (
                "R_bot",
                chosen.r_bottom,
                if s.set_is_top {
                    chosen.sense_current
                } else {
                    chosen.set_current
                },
            ),
        ] {
            let p = i * i * r;
            if p > POWER_WARNING_W {
                warnings.push(format!(
                    "{label} dissipates {}: check its power rating",
                    show(p, QuantityKind::Power)
                ));
            }
        }
        let verdict = overall(&checks);
        let summary = format!(
            "R_top {}, R_bot {}: V_out {} ({}), worst case {} to {}; {}",
            show(chosen.r_top, QuantityKind::Resistance),
            show(chosen.r_bottom, QuantityKind::Resistance),
            show4(chosen.vout),
            show(chosen.error_pct, QuantityKind::Percent),
            show4(chosen.worst_min),
            show4(chosen.worst_max),
            verdict_words(&checks, verdict)
        );
        DividerReport {
            mode: self.mode,
            verdict,
            summary,
            checks,
            warnings,
            searched,
            window_min: self.window_min,
            window_max: self.window_max,
            pick: pick as u32,
            detail: Some(detail),
            monte_carlo,
            threshold: None,
            candidates,
        }
    }

    /// Never reached (validation refuses a search with no candidate); kept so that no index
    /// can panic.
    fn empty_report(&self, warnings: Vec<String>) -> DividerReport {
        DividerReport {
            mode: self.mode,
            verdict: Status::Fail,
            summary: String::from("No candidate"),
            checks: Vec::new(),
            warnings,
            searched: self.found.searched,
            window_min: self.window_min,
            window_max: self.window_max,
            candidates: Vec::new(),
            pick: 0,
            detail: None,
            monte_carlo: None,
            threshold: None,
        }
    }

    fn checks(&self, c: &Candidate, mc: Option<&MonteCarlo>) -> Vec<Check> {
        use QuantityKind::{Current, Percent};
        let mut checks = Vec::new();
        let window = format!("{} to {}", show4(self.window_min), show4(self.window_max));
        let (status, text) = if c.fits_window {
            (
                Status::Pass,
                format!(
                    "The worst case, {} to {}, stays inside the window, {window}",
                    show4(c.worst_min),
                    show4(c.worst_max)
                ),
            )
        } else if c.vout - c.rss >= self.window_min && c.vout + c.rss <= self.window_max {
            (
                Status::Marginal,
                format!(
                    "The worst case, {} to {}, leaves the window, {window}; the RSS spread \
                     (± {}) stays inside",
                    show4(c.worst_min),
                    show4(c.worst_max),
                    show(c.rss, QuantityKind::Voltage)
                ),
            )
        } else {
            (
                Status::Fail,
                format!(
                    "The worst case, {} to {}, and the RSS spread (± {}) leave the window, \
                     {window}",
                    show4(c.worst_min),
                    show4(c.worst_max),
                    show(c.rss, QuantityKind::Voltage)
                ),
            )
        };
        checks.push(Check {
            id: CheckId::Window,
            title: String::from("Window"),
            status,
            text,
        });
        // Reverse mode without a current range has nothing to check here.
        if self.current_max.is_finite() {
            let inside = c.current_fit == CurrentFit::In;
            checks.push(Check {
                id: CheckId::Current,
                title: String::from("Divider current"),
                status: if inside {
                    Status::Pass
                } else {
                    Status::Marginal
                },
                text: format!(
                    "The divider current, {}, is {} the wanted range, {} to {}",
                    show(c.sense_current, Current),
                    match c.current_fit {
                        CurrentFit::In => "inside",
                        CurrentFit::Low => "below",
                        CurrentFit::High => "above",
                    },
                    show(self.current_min, Current),
                    show(self.current_max, Current)
                ),
            });
        }
        if let Some(mc) = mc {
            let status = if mc.yield_pct >= YIELD_PASS_PCT {
                Status::Pass
            } else if mc.yield_pct >= YIELD_FAIL_PCT {
                Status::Marginal
            } else {
                Status::Fail
            };
            checks.push(Check {
                id: CheckId::Yield,
                title: String::from("Yield"),
                status,
                text: format!(
                    "{} of {} samples ({}) land inside the window",
                    mc.inside,
                    mc.samples,
                    show(mc.yield_pct, Percent)
                ),
            });
        }
        checks
    }

    fn threshold_spreads(&self, spec: &ThresholdSpec, top: f64, bottom: f64) -> (Spread, Spread) {
        let base = Spread {
            v: spec.rise,
            v_half: spec.rise * spec.pin_tol,
            i_mid: spec.current_off,
            i_half: libm::fabs(spec.current_off) * spec.current_tol,
            top,
            bottom,
            top_tol: self.parts.tol_top,
            top_drift: self.parts.drift_top,
            bottom_tol: self.parts.tol_bottom,
            bottom_drift: self.parts.drift_bottom,
            set_is_top: true,
        };
        let stop = Spread {
            v: spec.fall,
            v_half: spec.fall * spec.pin_tol,
            i_mid: spec.current_on,
            i_half: libm::fabs(spec.current_on) * spec.current_tol,
            ..base
        };
        (base, stop)
    }

    fn threshold_candidate(
        &self,
        spec: &ThresholdSpec,
        top: f64,
        bottom: f64,
    ) -> ThresholdCandidate {
        let (start_s, stop_s) = self.threshold_spreads(spec, top, bottom);
        let start = start_s.nominal();
        let stop = stop_s.nominal();
        let ((start_low, _), (start_high, _)) = start_s.extremes();
        let ((stop_low, _), (stop_high, _)) = stop_s.extremes();
        let w = spec.window;
        let current_at_start = start / (top + bottom);
        ThresholdCandidate {
            r_top: top,
            r_bottom: bottom,
            series_top: Series::coarsest_containing(top),
            series_bottom: Series::coarsest_containing(bottom),
            start,
            stop,
            start_error_pct: percent_error(start, spec.start),
            stop_error_pct: percent_error(stop, spec.stop),
            start_low,
            start_high,
            stop_low,
            stop_high,
            current_at_start,
            power_w: start * current_at_start,
            fits: start_low >= spec.start * (1.0 - w)
                && start_high <= spec.start * (1.0 + w)
                && stop_low >= spec.stop * (1.0 - w)
                && stop_high <= spec.stop * (1.0 + w),
        }
    }

    /// The exact resistors for both voltages, when the pin currents make them independent:
    /// the two relations are linear in R_top and in k = R_top/R_bot.
    fn threshold_ideal(spec: &ThresholdSpec) -> Option<(f64, f64)> {
        let d = spec.rise * spec.current_on - spec.fall * spec.current_off;
        let scale =
            spec.rise * libm::fabs(spec.current_on) + spec.fall * libm::fabs(spec.current_off);
        if scale == 0.0 || libm::fabs(d) <= 1e-9 * scale {
            return None;
        }
        let a = spec.start - spec.rise;
        let b = spec.stop - spec.fall;
        let k = (a * spec.current_on - b * spec.current_off) / d;
        let top = (spec.rise * b - spec.fall * a) / d;
        Some((top, top / k))
    }

    fn find_threshold(&self, spec: &ThresholdSpec) -> Result<Found, InputError> {
        use QuantityKind::{Current, Resistance};
        let mut warnings = Vec::new();
        let top_values = self.series_top.values_in(self.r_min, self.r_max);
        let bottom_values = self.series_bottom.values_in(self.r_min, self.r_max);
        if top_values.is_empty() || bottom_values.is_empty() {
            return Err(InputError::new(
                "rMin",
                format!(
                    "No series value lies between {} and {}",
                    show(self.r_min, Resistance),
                    show(self.r_max, Resistance)
                ),
            ));
        }
        let neighbours = |values: &[f64], ideal: f64, reach: usize| -> Vec<f64> {
            let at = values.partition_point(|v| *v < ideal);
            let from = at.saturating_sub(reach);
            let to = (at + reach).min(values.len());
            values[from..to].to_vec()
        };
        let mut searched = 0u32;
        let mut found = Vec::new();
        let ideal = Self::threshold_ideal(spec);
        match ideal {
            Some((top, bottom)) => {
                if !(top > 0.0 && bottom > 0.0 && top.is_finite() && bottom.is_finite()) {
                    return Err(InputError::new(
                        "vStop",
                        format!(
                            "With these pin thresholds and currents, start at {} and stop at {} \
                             cannot both be met (they would need a negative resistor): move the \
                             stop voltage or check the pin currents' signs",
                            show4(spec.start),
                            show4(spec.stop)
                        ),
                    ));
                }
                if top < self.r_min
                    || top > self.r_max
                    || bottom < self.r_min
                    || bottom > self.r_max
                {
                    warnings.push(format!(
                        "The exact divider, R_top {} and R_bot {}, lies outside the resistance \
                         range; the nearest values in range are shown",
                        show(top, Resistance),
                        show(bottom, Resistance)
                    ));
                }
                for &t in &neighbours(&top_values, top, 2) {
                    for &b in &neighbours(&bottom_values, bottom, 2) {
                        searched += 1;
                        found.push(self.threshold_candidate(spec, t, b));
                    }
                }
            }
            None => {
                // Only the ratio is set: choose it for the start voltage, in every decade whose
                // current at the start is in the wanted range.
                warnings.push(String::from(
                    "The pin currents do not set start and stop apart, so only the ratio is \
                     chosen (for the start voltage); the stop voltage follows from the pin's \
                     hysteresis",
                ));
                for &b in &bottom_values {
                    let drive = spec.rise / b + spec.current_off;
                    if drive <= 0.0 {
                        continue;
                    }
                    let ideal_top = (spec.start - spec.rise) / drive;
                    for &t in &neighbours(&top_values, ideal_top, 1) {
                        searched += 1;
                        let c = self.threshold_candidate(spec, t, b);
                        let fit =
                            current_fit(c.current_at_start, self.current_min, self.current_max);
                        if fit.0 == CurrentFit::In {
                            found.push(c);
                        }
                    }
                }
                if found.is_empty() {
                    return Err(InputError::new(
                        "currentMin",
                        format!(
                            "No pair in the resistance range gives a divider current from {} to \
                             {} at the start voltage",
                            show(self.current_min, Current),
                            show(self.current_max, Current)
                        ),
                    ));
                }
            }
        }
        let keys: Vec<RankKey> = found
            .iter()
            .map(|c| {
                (
                    libm::fabs(c.start_error_pct).max(libm::fabs(c.stop_error_pct)),
                    current_fit(c.current_at_start, self.current_min, self.current_max).1,
                    series_rank(c.series_top, c.series_bottom),
                )
            })
            .collect();
        let mut found = in_rank_order(found, &keys);
        // As in the feedback search, a candidate's nominal start and stop must lie inside their
        // windows; when none does, say how close the best one comes.
        let w = spec.window;
        let inside = |c: &ThresholdCandidate| {
            libm::fabs(c.start_error_pct) <= 100.0 * w && libm::fabs(c.stop_error_pct) <= 100.0 * w
        };
        if !found.iter().any(inside) {
            let (start, stop) = found.first().map_or((0.0, 0.0), |c| (c.start, c.stop));
            return Err(InputError::new(
                "windowPct",
                format!(
                    "No pair of series values puts both the start and the stop inside their \
                     windows; the closest starts at {} and stops at {}: try finer series or a \
                     wider window",
                    show4(start),
                    show4(stop)
                ),
            ));
        }
        found.retain(inside);
        found.truncate(self.limit);
        Ok(Found {
            candidates: Vec::new(),
            threshold: found,
            ideal,
            searched,
            warnings,
        })
    }

    fn threshold_report(&self, spec: &ThresholdSpec) -> DividerReport {
        use QuantityKind::{Current, Resistance};
        let mut warnings = self.found.warnings.clone();
        let found = self.found.threshold.clone();
        let ideal = self.found.ideal;
        let searched = self.found.searched;
        let mut pick = self.pick;
        if pick >= found.len() {
            warnings.push(format!(
                "Candidate {} does not exist (there are {}); showing the first",
                pick + 1,
                found.len()
            ));
            pick = 0;
        }
        let Some(c) = found.get(pick) else {
            return self.empty_report(warnings);
        };
        let w = spec.window;
        let mut checks = Vec::new();
        checks.push(Check {
            id: CheckId::Window,
            title: String::from("Window"),
            status: if c.fits { Status::Pass } else { Status::Fail },
            text: format!(
                "Start {} to {} (wanted {} to {}); stop {} to {} (wanted {} to {})",
                show4(c.start_low),
                show4(c.start_high),
                show4(spec.start * (1.0 - w)),
                show4(spec.start * (1.0 + w)),
                show4(c.stop_low),
                show4(c.stop_high),
                show4(spec.stop * (1.0 - w)),
                show4(spec.stop * (1.0 + w))
            ),
        });
        let apart = c.start_low > c.stop_high;
        checks.push(Check {
            id: CheckId::Hysteresis,
            title: String::from("Hysteresis"),
            status: if apart { Status::Pass } else { Status::Fail },
            text: if apart {
                format!(
                    "The lowest start, {}, stays above the highest stop, {}",
                    show4(c.start_low),
                    show4(c.stop_high)
                )
            } else {
                format!(
                    "The lowest start, {}, is not above the highest stop, {}: the part may \
                     chatter on and off",
                    show4(c.start_low),
                    show4(c.stop_high)
                )
            },
        });
        let (fit, _) = current_fit(c.current_at_start, self.current_min, self.current_max);
        checks.push(Check {
            id: CheckId::Current,
            title: String::from("Divider current"),
            status: if fit == CurrentFit::In {
                Status::Pass
            } else {
                Status::Marginal
            },
            text: format!(
                "{} at the start voltage ({} wanted from {} to {})",
                show(c.current_at_start, Current),
                match fit {
                    CurrentFit::In => "in range:",
                    CurrentFit::Low => "below the range:",
                    CurrentFit::High => "above the range:",
                },
                show(self.current_min, Current),
                show(self.current_max, Current)
            ),
        });
        let verdict = overall(&checks);
        let summary = format!(
            "R_top {}, R_bot {}: starts at {}, stops at {}; {}",
            show(c.r_top, Resistance),
            show(c.r_bottom, Resistance),
            show4(c.start),
            show4(c.stop),
            verdict_words(&checks, verdict)
        );
        DividerReport {
            mode: Mode::Threshold,
            verdict,
            summary,
            checks,
            warnings,
            searched,
            window_min: 0.0,
            window_max: 0.0,
            candidates: Vec::new(),
            pick: pick as u32,
            detail: None,
            monte_carlo: None,
            threshold: Some(ThresholdResult {
                ideal_top: ideal.map(|i| i.0),
                ideal_bottom: ideal.map(|i| i.1),
                start_min: spec.start * (1.0 - w),
                start_max: spec.start * (1.0 + w),
                stop_min: spec.stop * (1.0 - w),
                stop_max: spec.stop * (1.0 + w),
                candidates: found.clone(),
            }),
        }
    }
}

/// (value − target)/target in percent, with rounding noise below 10⁻⁹ % written as 0 (an exact
/// ratio such as 75 k/24 k for 3.3 V from 0.8 V computes to 1e-14 %).
fn percent_error(value: f64, target: f64) -> f64 {
    let e = 100.0 * (value - target) / target;
    if libm::fabs(e) < 1e-9 {
        0.0
    } else {
        e
    }
}

fn verdict_words(checks: &[Check], verdict: Status) -> String {
    match verdict {
        Status::Pass => String::from("passes every check"),
        Status::Marginal => format!("marginal on {}", titles_with(checks, Status::Marginal)),
        Status::Fail => format!("fails on {}", titles_with(checks, Status::Fail)),
    }
}

mod out {
    use super::*;
    use crate::output::{out_object, out_words, Out, ToOut};

    out_words!(Mode { Feedback => "feedback", Reverse => "reverse", Threshold => "threshold" });
    out_words!(Distribution { Normal => "normal", Uniform => "uniform" });
    out_words!(CheckId {
        Window => "window",
        Current => "current",
        Yield => "yield",
        Hysteresis => "hysteresis",
    });
    out_words!(CurrentFit { Low => "low", In => "in", High => "high" });
    out_words!(End { Low => "low", High => "high" });
    out_words!(Term {
        Vref => "vref",
        RTopTol => "rTopTol",
        RTopDrift => "rTopDrift",
        RBottomTol => "rBottomTol",
        RBottomDrift => "rBottomDrift",
        PinCurrent => "pinCurrent",
    });

    impl ToOut for Candidate {
        fn to_out(&self) -> Out {
            out_object! {
                "rTop": self.r_top,
                "rBottom": self.r_bottom,
                "seriesTop": self.series_top,
                "seriesBottom": self.series_bottom,
                "vout": self.vout,
                "errorPct": self.error_pct,
                "senseCurrent": self.sense_current,
                "setCurrent": self.set_current,
                "powerW": self.power_w,
                "worstMin": self.worst_min,
                "worstMax": self.worst_max,
                "rss": self.rss,
                "fitsWindow": self.fits_window,
                "currentFit": self.current_fit,
            }
        }
    }

    impl ToOut for Corner {
        fn to_out(&self) -> Out {
            out_object! {
                "vref": self.vref,
                "rTop": self.r_top,
                "rBottom": self.r_bottom,
                "pinCurrent": self.pin_current,
            }
        }
    }

    impl ToOut for Contribution {
        fn to_out(&self) -> Out {
            out_object! { "id": self.id, "title": self.title, "low": self.low, "high": self.high }
        }
    }

    impl ToOut for Detail {
        fn to_out(&self) -> Out {
            out_object! {
                "contributions": self.contributions,
                "minCorner": self.min_corner,
                "maxCorner": self.max_corner,
                "deltaT": self.delta_t,
                "driftTopPct": self.drift_top_pct,
                "driftBottomPct": self.drift_bottom_pct,
            }
        }
    }

    impl ToOut for Histogram {
        fn to_out(&self) -> Out {
            out_object! { "lo": self.lo, "hi": self.hi, "counts": self.counts }
        }
    }

    impl ToOut for MonteCarlo {
        fn to_out(&self) -> Out {
            out_object! {
                "samples": self.samples,
                "seed": self.seed,
                "distribution": self.distribution,
                "mean": self.mean,
                "sigma": self.sigma,
                "min": self.min,
                "max": self.max,
                "inside": self.inside,
                "yieldPct": self.yield_pct,
                "histogram": self.histogram,
            }
        }
    }

    impl ToOut for ThresholdCandidate {
        fn to_out(&self) -> Out {
            out_object! {
                "rTop": self.r_top,
                "rBottom": self.r_bottom,
                "seriesTop": self.series_top,
                "seriesBottom": self.series_bottom,
                "start": self.start,
                "stop": self.stop,
                "startErrorPct": self.start_error_pct,
                "stopErrorPct": self.stop_error_pct,
                "startLow": self.start_low,
                "startHigh": self.start_high,
                "stopLow": self.stop_low,
                "stopHigh": self.stop_high,
                "currentAtStart": self.current_at_start,
                "powerW": self.power_w,
                "fits": self.fits,
            }
        }
    }

    impl ToOut for ThresholdResult {
        fn to_out(&self) -> Out {
            out_object! {
                "idealTop": self.ideal_top,
                "idealBottom": self.ideal_bottom,
                "startMin": self.start_min,
                "startMax": self.start_max,
                "stopMin": self.stop_min,
                "stopMax": self.stop_max,
                "candidates": self.candidates,
            }
        }
    }

    impl ToOut for DividerReport {
        fn to_out(&self) -> Out {
            out_object! {
                "mode": self.mode,
                "verdict": self.verdict,
                "summary": self.summary,
                "checks": self.checks,
                "warnings": self.warnings,
                "searched": self.searched,
                "windowMin": self.window_min,
                "windowMax": self.window_max,
                "candidates": self.candidates,
                "pick": self.pick,
                "detail": self.detail,
                "monteCarlo": self.monte_carlo,
                "threshold": self.threshold,
            }
        }
    }
}
