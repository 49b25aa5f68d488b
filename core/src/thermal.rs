//! The thermal path: how hot the junction gets, what heat sink it needs, what a measured case or
//! board temperature says about it, how much power it may take at each ambient, and how hot it
//! peaks under pulsed loads.
//!
//! # Method
//!
//! Steady state. Heat flows from the junction to the ambient through thermal resistances in
//! series, so T_j = T_a + θ·P with θ = θJA, or θ = θJC + θCS + θSA for a part on a heat sink.
//! Solved back with the wanted margin m: the largest power (T_j,max − m − T_a)/θ, the hottest
//! ambient T_j,max − m − θ·P, and the largest heat-sink resistance that still keeps the margin,
//! θSA = (T_j,max − m − T_a)/P − θJC − θCS.
//!
//! Measured temperatures. A thermocouple on the package top or the board beside the part reads
//! T_t or T_b; the characterisation parameters ΨJT and ΨJB turn that into a junction estimate:
//! T_j = T_t + ΨJT·P and T_j = T_b + ΨJB·P, with P the part's total dissipation. Ψ is not a
//! thermal resistance (most of the heat does not flow through the top), which is why it can be
//! small and still give the right junction temperature.
//!
//! Derating. The largest power at ambient T_a is (T_j,max − T_a)/θ, at most the package's power
//! rating, falling to zero at T_a = T_j,max.
//!
//! Transient. A Foster network of n stages (R_i, τ_i) describes the junction's step response:
//! Z_th(t) = Σ R_i·(1 − e^(−t/τ_i)). Each stage is a first-order system driven by the same power,
//! so the stages add. One pulse of power P and length t_on from cold peaks at P·Z_th(t_on). A
//! periodic train (P for t_on every T) settles, stage by stage, to a peak
//! P·R_i·(1 − e^(−t_on/τ_i)) / (1 − e^(−T/τ_i)) at the end of each pulse and a valley of that
//! peak times e^(−(T − t_on)/τ_i) just before the next; the junction's peak and valley are the
//! sums. A piecewise-constant power profile is followed exactly: over a step of power P and
//! length Δt each stage's rise θ_i moves to P·R_i + (θ_i − P·R_i)·e^(−Δt/τ_i).
//!
//! # Assumptions
//!
//! Thermal resistances and the Foster network are constant (no change with temperature or
//! airflow); the ambient is fixed; the transient starts cold at T_a,max. A Foster network is a
//! fit of the measured step response at the junction only: its internal nodes have no physical
//! meaning, so only the junction temperature it gives is used.
//!
//! # Sources
//!
//! θJA, θJC, ΨJT: JEDEC JESD51-2A (integrated-circuit thermal test method, natural convection)
//! and JESD51-1; ΨJB: JEDEC JESD51-12 (guidelines for reporting and using thermal data). Foster
//! networks and Z_th(t): the standard RC-ladder representation of a thermal impedance curve (as
//! in JEDEC JESD51-14 for transient measurement). The first-order update is the exact solution of
//! C·dθ/dt = P − θ/R over a step of constant P.

use crate::error::check::figure as show;
use crate::error::check::needed;
use crate::error::{check, InputError};
use crate::fields::{choice, count, numbers, required, required_numbers, FieldSource, ReadError};
use crate::units::QuantityKind;
use crate::verdict::{grade, overall, titles_with, Status};
use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// The most Foster stages a network may have.
pub const MAX_STAGES: usize = 8;
/// The most steps a power profile may have.
pub const MAX_PROFILE_STEPS: usize = 64;
/// The most repeats of the profile in the time series.
pub const MAX_PERIODS: u32 = 1000;
/// Repeats of the profile when none is asked for.
pub const DEFAULT_PERIODS: u32 = 10;
/// The longest time series returned; longer runs are computed in full but sampled.
pub const MAX_SERIES_POINTS: usize = 4000;
/// The most parts a profile step is split into for the plotted series.
const MAX_PARTS_PER_STEP: usize = 12;
/// Points of the Z_th(t) curve.
const ZTH_POINTS: usize = 61;

/// Which path the heat takes to the ambient.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum HeatPath {
    /// θJA alone: the part on its board.
    Ja,
    /// θJC + θCS + θSA: the part on a heat sink.
    Chain,
}

/// One stage of a Foster network.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FosterStage {
    /// K/W.
    pub r: f64,
    /// s.
    pub tau: f64,
}

/// One step of a piecewise-constant power profile.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ProfileStep {
    pub power_w: f64,
    pub duration_s: f64,
}

/// What the engineer knows about the part's heat. W, °C, K, K/W, s. Read from named fields by
/// [`ThermalInput::read`]; the names are the camelCase forms of these.
#[derive(Clone, Debug, PartialEq)]
pub struct ThermalInput {
    pub power_w: f64,
    pub ta_max: f64,
    pub ta_min: f64,
    pub tj_max: f64,
    pub margin_c: f64,
    pub path: HeatPath,
    pub theta_ja: Option<f64>,
    pub theta_jc: Option<f64>,
    pub theta_cs: Option<f64>,
    pub theta_sa: Option<f64>,
    pub power_rating_w: Option<f64>,
    pub psi_jt: Option<f64>,
    pub case_top_c: Option<f64>,
    pub psi_jb: Option<f64>,
    pub board_c: Option<f64>,
    pub foster: Vec<FosterStage>,
    pub pulse_power_w: Option<f64>,
    pub pulse_on_s: Option<f64>,
    pub pulse_period_s: Option<f64>,
    pub profile: Vec<ProfileStep>,
    pub profile_periods: Option<u32>,
}

impl ThermalInput {
    /// Read the input from named fields (`powerW`, `foster` as a list of `{r, tau}`, …).
    pub fn read(f: &mut dyn FieldSource) -> Result<ThermalInput, ReadError> {
        let mut foster = Vec::new();
        f.each_object("foster", &mut |stage| {
            foster.push(FosterStage {
                r: required(stage, "r")?,
                tau: required(stage, "tau")?,
            });
            Ok(())
        })?;
        let mut profile = Vec::new();
        f.each_object("profile", &mut |step| {
            profile.push(ProfileStep {
                power_w: required(step, "powerW")?,
                duration_s: required(step, "durationS")?,
            });
            Ok(())
        })?;
        let path = choice(
            f,
            "path",
            &[("ja", HeatPath::Ja), ("chain", HeatPath::Chain)],
        )?;
        let [power_w, ta_max, ta_min, tj_max, margin_c] =
            required_numbers(f, &["powerW", "taMax", "taMin", "tjMax", "marginC"])?;
        let [theta_ja, theta_jc, theta_cs, theta_sa, power_rating_w, psi_jt, case_top_c, psi_jb, board_c, pulse_power_w, pulse_on_s, pulse_period_s] =
            numbers(
                f,
                &[
                    "thetaJa",
                    "thetaJc",
                    "thetaCs",
                    "thetaSa",
                    "powerRatingW",
                    "psiJt",
                    "caseTopC",
                    "psiJb",
                    "boardC",
                    "pulsePowerW",
                    "pulseOnS",
                    "pulsePeriodS",
                ],
            )?;
        Ok(ThermalInput {
            power_w,
            ta_max,
            ta_min,
            tj_max,
            margin_c,
            path,
            theta_ja,
            theta_jc,
            theta_cs,
            theta_sa,
            power_rating_w,
            psi_jt,
            case_top_c,
            psi_jb,
            board_c,
            foster,
            pulse_power_w,
            pulse_on_s,
            pulse_period_s,
            profile,
            profile_periods: count(f, "profilePeriods")?,
        })
    }
}

/// Which check a [`ThermalCheck`] reports.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum ThermalCheckId {
    Steady,
    HeatSink,
    Pulse,
    CaseTop,
    Board,
}

/// One check of the thermal path, its outcome and the reason in words.
pub type ThermalCheck = crate::verdict::Check<ThermalCheckId>;

/// Steady-state results.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Steady {
    /// θJA, or θJC + θCS + θSA; `None` for a chain without a chosen heat sink.
    pub theta_total: Option<f64>,
    pub tj_c: Option<f64>,
    pub margin_c: Option<f64>,
    pub max_power_w: Option<f64>,
    pub hottest_ambient_c: Option<f64>,
    /// The largest θSA keeping the margin (chain only); negative when no heat sink can.
    pub theta_sa_needed_k_per_w: Option<f64>,
    /// T_j,max − margin: the line the junction should stay under.
    pub limit_with_margin_c: f64,
}

/// Junction estimates from measured temperatures.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Measured {
    pub from_case_top_c: Option<f64>,
    pub from_board_c: Option<f64>,
}

/// The derating curves: largest power against ambient.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Derating {
    pub limit: Vec<[f64; 2]>,
    pub with_margin: Vec<[f64; 2]>,
    pub rating_w: Option<f64>,
    pub power_w: f64,
    pub ta_max: f64,
}

/// A periodic pulse train's temperatures.
#[derive(Clone, Copy, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct PulseResult {
    pub duty_pct: f64,
    pub single_peak_c: f64,
    pub train_peak_c: f64,
    pub train_valley_c: f64,
    pub average_c: f64,
}

/// Transient results from the Foster network.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Transient {
    pub r_total: f64,
    pub zth: Vec<[f64; 2]>,
    pub pulse: Option<PulseResult>,
    /// T_j(t) from a cold start at T_a,max.
    pub series: Vec<[f64; 2]>,
    pub series_peak_c: f64,
}

/// Everything the thermal check found.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct ThermalReport {
    pub verdict: Status,
    pub summary: String,
    pub checks: Vec<ThermalCheck>,
    pub warnings: Vec<String>,
    pub steady: Steady,
    pub measured: Measured,
    pub derating: Option<Derating>,
    pub transient: Option<Transient>,
}

/// A [`ThermalInput`] whose every value has been checked; computing from it cannot fail.
#[derive(Clone, Debug, PartialEq)]
pub struct ValidThermal {
    input: ThermalInput,
    /// The path's total θ, when it is known.
    theta: Option<f64>,
    /// The profile the time series follows (the pulse when no profile is given).
    profile: Vec<ProfileStep>,
    periods: u32,
}

/// A required optional: present, or an error naming the field.
impl ThermalInput {
    /// Check every value and return the first problem.
    pub fn validate(&self) -> Result<ValidThermal, InputError> {
        use QuantityKind::{Power, Temperature, TemperatureDifference, ThermalResistance, Time};
        check::at_least("powerW", "The dissipation P", self.power_w, 0.0, Power)?;
        let ta_max = check::above("taMax", "T_a,max", self.ta_max, -273.15, Temperature)?;
        let tj_max = check::finite("tjMax", "T_j,max", self.tj_max, Temperature)?;
        if tj_max <= ta_max {
            return Err(InputError::new(
                "taMax",
                format!(
                    "T_a,max must be below T_j,max ({})",
                    check::show(tj_max, Temperature)
                ),
            ));
        }
        let ta_min = check::above("taMin", "T_a,min", self.ta_min, -273.15, Temperature)?;
        if ta_min > ta_max {
            return Err(InputError::new(
                "taMin",
                format!(
                    "T_a,min must not be above T_a,max ({})",
                    check::show(ta_max, Temperature)
                ),
            ));
        }
        let margin = check::at_least(
            "marginC",
            "The thermal margin",
            self.margin_c,
            0.0,
            TemperatureDifference,
        )?;
        if margin >= tj_max - ta_max {
            return Err(InputError::new(
                "marginC",
                format!(
                    "The thermal margin must be less than T_j,max − T_a,max ({})",
                    check::show(tj_max - ta_max, TemperatureDifference)
                ),
            ));
        }
        // Every resistance is at least 1 mK/W: below that nothing on a board conducts heat,
        // and the bound keeps P = ΔT/θ finite.
        let resistance = |field: &'static str, label: &str, v: f64| {
            check::at_least(field, label, v, 1e-3, ThermalResistance)
        };
        let theta = match self.path {
            HeatPath::Ja => Some(resistance(
                "thetaJa",
                "θJA",
                needed("thetaJa", "θJA", self.theta_ja)?,
            )?),
            HeatPath::Chain => {
                let jc = resistance("thetaJc", "θJC", needed("thetaJc", "θJC", self.theta_jc)?)?;
                let cs = check::at_least(
                    "thetaCs",
                    "θCS",
                    needed("thetaCs", "θCS", self.theta_cs)?,
                    0.0,
                    ThermalResistance,
                )?;
                match self.theta_sa {
                    Some(sa) => Some(jc + cs + resistance("thetaSa", "θSA", sa)?),
                    None => None,
                }
            }
        };
        if let Some(rating) = self.power_rating_w {
            check::above("powerRatingW", "The power rating", rating, 0.0, Power)?;
        }
        match (self.psi_jt, self.case_top_c) {
            (Some(psi), Some(t)) => {
                check::at_least("psiJt", "ΨJT", psi, 0.0, ThermalResistance)?;
                check::above(
                    "caseTopC",
                    "The case-top temperature",
                    t,
                    -273.15,
                    Temperature,
                )?;
            }
            (Some(_), None) => {
                return Err(InputError::new(
                    "caseTopC",
                    "The measured case-top temperature is needed with ΨJT",
                ))
            }
            (None, Some(_)) => {
                return Err(InputError::new(
                    "psiJt",
                    "ΨJT is needed with a measured case-top temperature",
                ))
            }
            (None, None) => {}
        }
        match (self.psi_jb, self.board_c) {
            (Some(psi), Some(t)) => {
                check::at_least("psiJb", "ΨJB", psi, 0.0, ThermalResistance)?;
                check::above("boardC", "The board temperature", t, -273.15, Temperature)?;
            }
            (Some(_), None) => {
                return Err(InputError::new(
                    "boardC",
                    "The measured board temperature is needed with ΨJB",
                ))
            }
            (None, Some(_)) => {
                return Err(InputError::new(
                    "psiJb",
                    "ΨJB is needed with a measured board temperature",
                ))
            }
            (None, None) => {}
        }

        if self.foster.len() > MAX_STAGES {
            return Err(InputError::new(
                "foster",
                format!(
                    "A Foster network may have at most {MAX_STAGES} stages, not {}",
                    self.foster.len()
                ),
            ));
        }
        for (i, stage) in self.foster.iter().enumerate() {
            let r_field = STAGE_FIELDS[i].0;
            let tau_field = STAGE_FIELDS[i].1;
            check::above(r_field, "A stage's R", stage.r, 0.0, ThermalResistance)?;
            // τ below 1 ns is no thermal time constant and would make e^(−t/τ) meaningless.
            check::at_least(tau_field, "A stage's τ", stage.tau, 1e-9, Time)?;
        }

        let pulse = match (self.pulse_power_w, self.pulse_on_s, self.pulse_period_s) {
            (None, None, None) => None,
            (Some(p), Some(on), Some(period)) => {
                check::at_least("pulsePowerW", "The pulse power", p, 0.0, Power)?;
                let on = check::at_least("pulseOnS", "The pulse on-time", on, 1e-9, Time)?;
                let period =
                    check::at_least("pulsePeriodS", "The pulse period", period, 1e-9, Time)?;
                if on > period {
                    return Err(InputError::new(
                        "pulseOnS",
                        format!(
                            "The pulse on-time must not exceed the period ({})",
                            check::show(period, Time)
                        ),
                    ));
                }
                Some((p, on, period))
            }
            (p, on, _) => {
                let field = if p.is_none() {
                    "pulsePowerW"
                } else if on.is_none() {
                    "pulseOnS"
                } else {
                    "pulsePeriodS"
                };
                return Err(InputError::new(
                    field,
                    "A pulse train needs its power, on-time and period together",
                ));
            }
        };
        if pulse.is_some() && self.foster.is_empty() {
            return Err(InputError::new(
                "foster",
                "A pulse train needs a Foster network (at least one stage) for the transient",
            ));
        }

        if self.profile.len() > MAX_PROFILE_STEPS {
            return Err(InputError::new(
                "profile",
                format!(
                    "A power profile may have at most {MAX_PROFILE_STEPS} steps, not {}",
                    self.profile.len()
                ),
            ));
        }
        for (i, step) in self.profile.iter().enumerate() {
            // The field names carry the step's position for the page; they are built once.
            let (p_field, d_field) = PROFILE_FIELDS
                .get(i)
                .copied()
                .unwrap_or(("profile", "profile"));
            check::at_least(p_field, "A profile step's power", step.power_w, 0.0, Power)?;
            check::at_least(
                d_field,
                "A profile step's duration",
                step.duration_s,
                1e-9,
                Time,
            )?;
        }
        let periods = self.profile_periods.unwrap_or(DEFAULT_PERIODS);
        if periods == 0 || periods > MAX_PERIODS {
            return Err(InputError::new(
                "profilePeriods",
                format!("The number of repeats must be from 1 to {MAX_PERIODS}"),
            ));
        }
        let profile = if !self.profile.is_empty() {
            self.profile.clone()
        } else if let Some((p, on, period)) = pulse {
            let mut steps = Vec::from([ProfileStep {
                power_w: p,
                duration_s: on,
            }]);
            if period > on {
                steps.push(ProfileStep {
                    power_w: 0.0,
                    duration_s: period - on,
                });
            }
            steps
        } else {
            Vec::new()
        };
        Ok(ValidThermal {
            input: self.clone(),
            theta,
            profile,
            periods,
        })
    }
}

/// Field names of the Foster stages, as the serialised input names them.
const STAGE_FIELDS: [(&str, &str); MAX_STAGES] = [
    ("foster[0].r", "foster[0].tau"),
    ("foster[1].r", "foster[1].tau"),
    ("foster[2].r", "foster[2].tau"),
    ("foster[3].r", "foster[3].tau"),
    ("foster[4].r", "foster[4].tau"),
    ("foster[5].r", "foster[5].tau"),
    ("foster[6].r", "foster[6].tau"),
    ("foster[7].r", "foster[7].tau"),
];

/// Field names of the first profile steps; later steps are named as the whole profile (an
/// `InputError` field is a static name).
const PROFILE_FIELDS: [(&str, &str); 8] = [
    ("profile[0].powerW", "profile[0].durationS"),
    ("profile[1].powerW", "profile[1].durationS"),
    ("profile[2].powerW", "profile[2].durationS"),
    ("profile[3].powerW", "profile[3].durationS"),
    ("profile[4].powerW", "profile[4].durationS"),
    ("profile[5].powerW", "profile[5].durationS"),
    ("profile[6].powerW", "profile[6].durationS"),
    ("profile[7].powerW", "profile[7].durationS"),
];

/// Validate, then compute.
pub fn check_thermal(input: &ThermalInput) -> Result<ThermalReport, InputError> {
    Ok(input.validate()?.report())
}

/// Z_th(t) = Σ R_i·(1 − e^(−t/τ_i)).
pub fn zth(stages: &[FosterStage], t: f64) -> f64 {
    stages
        .iter()
        .map(|s| s.r * (1.0 - libm::exp(-t / s.tau)))
        .sum()
}

/// The periodic steady state of a pulse train (P for t_on every period) through the network:
/// (peak rise, valley rise) above ambient, K.
pub fn pulse_train_rise(stages: &[FosterStage], p: f64, t_on: f64, period: f64) -> (f64, f64) {
    let mut peak = 0.0;
    let mut valley = 0.0;
    for s in stages {
        // 1 − e^(−T/τ) is positive for T ≥ 1 ns and τ ≤ 10^6 s; for T ≪ τ use the expm1
        // form so the ratio stays accurate.
        let rise = -libm::expm1(-t_on / s.tau);
        let settle = -libm::expm1(-period / s.tau);
        let stage_peak = p * s.r * rise / settle;
        peak += stage_peak;
        valley += stage_peak * libm::exp(-(period - t_on) / s.tau);
    }
    (peak, valley)
}

/// Follow a piecewise-constant power profile through the network from a cold start, exactly,
/// stage by stage. Returns (t, rise above ambient) after each step, starting with (0, 0).
pub fn rise_series(stages: &[FosterStage], profile: &[ProfileStep], periods: u32) -> Vec<[f64; 2]> {
    let mut rise: [f64; MAX_STAGES] = [0.0; MAX_STAGES];
    let n = stages.len().min(MAX_STAGES);
    let mut out = Vec::with_capacity(profile.len() * periods as usize + 1);
    let mut t = 0.0;
    out.push([0.0, 0.0]);
    for _ in 0..periods {
        for step in profile {
            t += step.duration_s;
            let mut total = 0.0;
            for (theta, s) in rise[..n].iter_mut().zip(stages) {
                let target = step.power_w * s.r;
                *theta = target + (*theta - target) * libm::exp(-step.duration_s / s.tau);
                total += *theta;
            }
            out.push([t, total]);
        }
    }
    out
}

impl ValidThermal {
    pub fn input(&self) -> &ThermalInput {
        &self.input
    }

    /// The largest power at ambient `ta` keeping `margin`, clamped at the rating.
    fn power_at(&self, theta: f64, ta: f64, margin: f64) -> f64 {
        let p = ((self.input.tj_max - margin - ta) / theta).max(0.0);
        match self.input.power_rating_w {
            Some(rating) => p.min(rating),
            None => p,
        }
    }

    fn derating_curve(&self, theta: f64, margin: f64) -> Vec<[f64; 2]> {
        let x = &self.input;
        let end = x.tj_max - margin;
        let mut points = Vec::from([[x.ta_min, self.power_at(theta, x.ta_min, margin)]]);
        if let Some(rating) = x.power_rating_w {
            // The knee where the thermal limit meets the rating.
            let knee = end - rating * theta;
            if knee > x.ta_min && knee < end {
                points.push([knee, rating]);
            }
        }
        if end > x.ta_min {
            points.push([end, 0.0]);
        }
        points
    }

    fn transient(&self) -> Option<Transient> {
        let x = &self.input;
        if x.foster.is_empty() {
            return None;
        }
        let stages = &x.foster;
        let r_total = stages.iter().map(|s| s.r).sum();
        let tau_min = stages.iter().map(|s| s.tau).fold(f64::INFINITY, f64::min);
        let tau_max = stages.iter().map(|s| s.tau).fold(0.0, f64::max);
        let (t_from, t_to) = (tau_min / 100.0, tau_max * 10.0);
        let ratio = libm::log10(t_to / t_from);
        let zth_curve = (0..ZTH_POINTS)
            .map(|k| {
                let t = t_from * libm::pow(10.0, ratio * k as f64 / (ZTH_POINTS - 1) as f64);
                [t, zth(stages, t)]
            })
            .collect();
        let pulse = match (x.pulse_power_w, x.pulse_on_s, x.pulse_period_s) {
            (Some(p), Some(on), Some(period)) => {
                let (peak, valley) = pulse_train_rise(stages, p, on, period);
                let duty = on / period;
                Some(PulseResult {
                    duty_pct: 100.0 * duty,
                    single_peak_c: x.ta_max + p * zth(stages, on),
                    train_peak_c: x.ta_max + peak,
                    train_valley_c: x.ta_max + valley,
                    average_c: x.ta_max + p * duty * r_total,
                })
            }
            _ => None,
        };
        // Between step ends the stages move exponentially, and their sum can peak inside a
        // step (fast stages cooling while slow ones still warm). Splitting each step into equal
        // parts is exact (the same update, applied in parts), so the plot and its peak follow
        // the real curve; the split is chosen to fill about MAX_SERIES_POINTS.
        let steps = self.profile.len() * self.periods as usize;
        let parts = (MAX_SERIES_POINTS / steps.max(1)).clamp(1, MAX_PARTS_PER_STEP);
        let split: Vec<ProfileStep> = self
            .profile
            .iter()
            .flat_map(|step| {
                core::iter::repeat(ProfileStep {
                    power_w: step.power_w,
                    duration_s: step.duration_s / parts as f64,
                })
                .take(parts)
            })
            .collect();
        let rises = rise_series(stages, &split, self.periods);
        let series_peak_rise = rises.iter().map(|p| p[1]).fold(0.0, f64::max);
        // Keep the plot light: sample long runs evenly, always keeping the last point.
        let stride = rises.len().div_ceil(MAX_SERIES_POINTS).max(1);
        let mut series: Vec<[f64; 2]> = rises
            .iter()
            .step_by(stride)
            .map(|p| [p[0], x.ta_max + p[1]])
            .collect();
        if let Some(last) = rises.last() {
            if series.last().map(|p| p[0]) != Some(last[0]) {
                series.push([last[0], x.ta_max + last[1]]);
            }
        }
        Some(Transient {
            r_total,
            zth: zth_curve,
            pulse,
            series,
            series_peak_c: x.ta_max + series_peak_rise,
        })
    }

    /// Compute every result. Cannot fail: the input was checked.
    pub fn report(&self) -> ThermalReport {
        use QuantityKind::{Power, Temperature, TemperatureDifference, ThermalResistance};
        let x = &self.input;
        let limit_tj = x.tj_max - x.margin_c;
        let mut checks = Vec::new();
        let mut warnings = Vec::new();

        let theta_sa_needed = match x.path {
            HeatPath::Chain if x.power_w > 0.0 => {
                let jc = x.theta_jc.unwrap_or(0.0);
                let cs = x.theta_cs.unwrap_or(0.0);
                Some((limit_tj - x.ta_max) / x.power_w - jc - cs)
            }
            _ => None,
        };
        let steady = match self.theta {
            Some(theta) => {
                let tj = x.ta_max + theta * x.power_w;
                Steady {
                    theta_total: Some(theta),
                    tj_c: Some(tj),
                    margin_c: Some(x.tj_max - tj),
                    max_power_w: Some((limit_tj - x.ta_max) / theta),
                    hottest_ambient_c: Some(limit_tj - theta * x.power_w),
                    theta_sa_needed_k_per_w: theta_sa_needed,
                    limit_with_margin_c: limit_tj,
                }
            }
            None => Steady {
                theta_total: None,
                tj_c: None,
                margin_c: None,
                max_power_w: None,
                hottest_ambient_c: None,
                theta_sa_needed_k_per_w: theta_sa_needed,
                limit_with_margin_c: limit_tj,
            },
        };
        if let (Some(tj), Some(theta)) = (steady.tj_c, steady.theta_total) {
            let status = grade(x.tj_max - tj, x.margin_c);
            checks.push(ThermalCheck {
                id: ThermalCheckId::Steady,
                title: "Steady junction temperature".into(),
                status,
                text: format!(
                    "{} through {} at {} ambient gives T_j = {}, {} below the {} limit (wanted {}){}",
                    show(x.power_w, Power),
                    show(theta, ThermalResistance),
                    show(x.ta_max, Temperature),
                    show(tj, Temperature),
                    show(x.tj_max - tj, TemperatureDifference),
                    show(x.tj_max, Temperature),
                    show(x.margin_c, TemperatureDifference),
                    ending(status),
                ),
            });
        }
        if let Some(needed) = theta_sa_needed {
            if needed <= 0.0 {
                warnings.push(format!(
                    "No heat sink can keep the margin: θJC + θCS alone already take the junction \
                     past {} at {}. Lower the dissipation or the interface resistance.",
                    show(limit_tj, Temperature),
                    show(x.power_w, Power)
                ));
            }
            let (status, text) = match x.theta_sa {
                Some(sa) => {
                    let status = if sa <= needed {
                        Status::Pass
                    } else {
                        Status::Fail
                    };
                    let text = format!(
                        "The heat sink's {} is {} the {} the margin allows.",
                        show(sa, ThermalResistance),
                        if status == Status::Pass {
                            "within"
                        } else {
                            "above"
                        },
                        show(needed.max(0.0), ThermalResistance)
                    );
                    (status, text)
                }
                None if needed > 0.0 => (
                    Status::Pass,
                    format!(
                        "A heat sink of at most {} (sink to ambient, as mounted) keeps T_j at \
                         {} with {} and {} ambient.",
                        show(needed, ThermalResistance),
                        show(limit_tj, Temperature),
                        show(x.power_w, Power),
                        show(x.ta_max, Temperature)
                    ),
                ),
                None => (
                    Status::Fail,
                    String::from("No heat sink can keep the margin (see the warning)."),
                ),
            };
            checks.push(ThermalCheck {
                id: ThermalCheckId::HeatSink,
                title: "Heat sink".into(),
                status,
                text,
            });
        }

        let measured = Measured {
            from_case_top_c: match (x.psi_jt, x.case_top_c) {
                (Some(psi), Some(t)) => Some(t + psi * x.power_w),
                _ => None,
            },
            from_board_c: match (x.psi_jb, x.board_c) {
                (Some(psi), Some(t)) => Some(t + psi * x.power_w),
                _ => None,
            },
        };
        for (id, title, estimate, reading, psi, what) in [
            (
                ThermalCheckId::CaseTop,
                "Junction from the case-top reading",
                measured.from_case_top_c,
                x.case_top_c,
                x.psi_jt,
                "ΨJT",
            ),
            (
                ThermalCheckId::Board,
                "Junction from the board reading",
                measured.from_board_c,
                x.board_c,
                x.psi_jb,
                "ΨJB",
            ),
        ] {
            if let (Some(tj), Some(reading), Some(psi)) = (estimate, reading, psi) {
                let status = grade(x.tj_max - tj, x.margin_c);
                checks.push(ThermalCheck {
                    id,
                    title: title.into(),
                    status,
                    text: format!(
                        "The reading {} plus {} {} × {} gives T_j ≈ {}, {} below the {} limit{}",
                        show(reading, Temperature),
                        what,
                        show(psi, ThermalResistance),
                        show(x.power_w, Power),
                        show(tj, Temperature),
                        show(x.tj_max - tj, TemperatureDifference),
                        show(x.tj_max, Temperature),
                        ending(status),
                    ),
                });
            }
        }

        let derating = self.theta.map(|theta| Derating {
            limit: self.derating_curve(theta, 0.0),
            with_margin: self.derating_curve(theta, x.margin_c),
            rating_w: x.power_rating_w,
            power_w: x.power_w,
            ta_max: x.ta_max,
        });
        if let Some(rating) = x.power_rating_w {
            if x.power_w > rating {
                warnings.push(format!(
                    "The dissipation {} is above the package's {} rating.",
                    show(x.power_w, Power),
                    show(rating, Power)
                ));
            }
        }

        let transient = self.transient();
        if let Some(pulse) = transient.as_ref().and_then(|t| t.pulse) {
            let status = grade(x.tj_max - pulse.train_peak_c, x.margin_c);
            checks.push(ThermalCheck {
                id: ThermalCheckId::Pulse,
                title: "Pulse-train peak".into(),
                status,
                text: format!(
                    "Pulses at {} duty settle to peaks of {} and valleys of {} (the average \
                     alone would say {}); the peak is {} below the {} limit{}",
                    show(pulse.duty_pct, QuantityKind::Percent),
                    show(pulse.train_peak_c, Temperature),
                    show(pulse.train_valley_c, Temperature),
                    show(pulse.average_c, Temperature),
                    show(x.tj_max - pulse.train_peak_c, TemperatureDifference),
                    show(x.tj_max, Temperature),
                    ending(status),
                ),
            });
        }
        if let (Some(t), Some(theta)) = (&transient, self.theta) {
            if (t.r_total - theta).abs() > 0.05 * theta {
                warnings.push(format!(
                    "The Foster network settles at {}, not the steady path's {}: the two \
                     descriptions of the part disagree.",
                    show(t.r_total, ThermalResistance),
                    show(theta, ThermalResistance)
                ));
            }
        }
        if checks.is_empty() {
            warnings.push(String::from(
                "Nothing to check yet: give θSA for the heat sink, a measured temperature or a \
                 pulse train.",
            ));
        }

        let verdict = overall(&checks);
        let names = |status| titles_with(&checks, status);
        let summary = match verdict {
            Status::Pass if checks.is_empty() => String::from("Nothing is checked yet."),
            Status::Pass => String::from("The junction stays within its limit and margin."),
            Status::Marginal => format!(
                "Within the limit but short of the wanted margin: {}.",
                names(Status::Marginal)
            ),
            Status::Fail => format!("Too hot: {}.", names(Status::Fail)),
        };
        ThermalReport {
            verdict,
            summary,
            checks,
            warnings,
            steady,
            measured,
            derating,
            transient,
        }
    }
}

fn ending(status: Status) -> &'static str {
    match status {
        Status::Pass => ".",
        Status::Marginal => ": within the limit, with less margin than wanted.",
        Status::Fail => ": the junction runs above its limit.",
    }
}

mod out {
    use super::*;
    use crate::output::{out_object, out_words, Out, ToOut};

    out_words!(ThermalCheckId {
        Steady => "steady",
        HeatSink => "heatSink",
        Pulse => "pulse",
        CaseTop => "caseTop",
        Board => "board",
    });

    impl ToOut for Steady {
        fn to_out(&self) -> Out {
            out_object! {
                "thetaTotal": self.theta_total,
                "tjC": self.tj_c,
                "marginC": self.margin_c,
                "maxPowerW": self.max_power_w,
                "hottestAmbientC": self.hottest_ambient_c,
                "thetaSaNeededKPerW": self.theta_sa_needed_k_per_w,
                "limitWithMarginC": self.limit_with_margin_c,
            }
        }
    }

    impl ToOut for Measured {
        fn to_out(&self) -> Out {
            out_object! {
                "fromCaseTopC": self.from_case_top_c,
                "fromBoardC": self.from_board_c,
            }
        }
    }

    impl ToOut for Derating {
        fn to_out(&self) -> Out {
            out_object! {
                "limit": self.limit,
                "withMargin": self.with_margin,
                "ratingW": self.rating_w,
                "powerW": self.power_w,
                "taMax": self.ta_max,
            }
        }
    }

    impl ToOut for PulseResult {
        fn to_out(&self) -> Out {
            out_object! {
                "dutyPct": self.duty_pct,
                "singlePeakC": self.single_peak_c,
                "trainPeakC": self.train_peak_c,
                "trainValleyC": self.train_valley_c,
                "averageC": self.average_c,
            }
        }
    }

    impl ToOut for Transient {
        fn to_out(&self) -> Out {
            out_object! {
                "rTotal": self.r_total,
                "zth": self.zth,
                "pulse": self.pulse,
                "series": self.series,
                "seriesPeakC": self.series_peak_c,
            }
        }
    }

    impl ToOut for ThermalReport {
        fn to_out(&self) -> Out {
            out_object! {
                "verdict": self.verdict,
                "summary": self.summary,
                "checks": self.checks,
                "warnings": self.warnings,
                "steady": self.steady,
                "measured": self.measured,
                "derating": self.derating,
                "transient": self.transient,
            }
        }
    }
}
