//! Core's Foster-network transients against an outside reference: ngspice's transient analysis
//! of the network's electrical analogue (R_i ‖ C_i pairs in series, C_i = τ_i/R_i, the power as
//! a current source into the junction node; see `railnote_reference::spice`).
//!
//! ngspice integrates the circuit numerically (trapezoidal rule with its own step control) and
//! shares no arithmetic with core, which uses closed forms: Z_th(t), the pulse train's periodic
//! steady state (`pulse_train_rise`) and the exact stage-by-stage update over each step of a
//! piecewise-constant profile (`rise_series`). Each comparison below is printed with its relative
//! error; run with `cargo test -p railnote-reference -- --nocapture` to see them.
//!
//! Tolerance, relative to core's rise above ambient (K), for every compared value:
//!
//! | quantity                                         | tolerance | why                         |
//! |--------------------------------------------------|-----------|-----------------------------|
//! | single-pulse peak, pulse-train peak and valley,  | 0.5 %     | the tolerance for   |
//! | profile values at step boundaries, whole curves  |           | the transient results       |
//!
//! SPICE's own error is kept far below that (reltol 1e-6, largest step 1/200 of the shortest
//! step of the profile, ramps of 1 ppm of that step centred on each boundary so each step keeps
//! its energy; 9 significant digits in the `wrdata` file), so a failure here means core is
//! wrong, not SPICE. Periodic steady state is reached by simulating at least 20 × the longest τ
//! from cold: what is left of the start-up transient is below e^−20 ≈ 2·10^−9 of it.
//!
//! ngspice must be installed (`cargo xtask test` installs Debian's package as root); without it
//! these tests fail and say so.

use railnote_core::thermal::{
    check_thermal, pulse_train_rise, rise_series, zth, FosterStage, HeatPath, ProfileStep,
    ThermalInput,
};
use railnote_reference::spice::{profile_pwl, simulate, Trace, Transient};

/// The tolerance for transient results, relative.
const TOLERANCE: f64 = 0.005;
/// Each step of a profile is cut into this many sub-steps for whole-curve comparisons (core's
/// stepped solution is exact at any step length, so cutting a step changes nothing in it).
const SUB_STEPS: usize = 20;
/// Largest SPICE time step, as a fraction of the profile's shortest step.
const STEP_FRACTION: f64 = 1.0 / 200.0;
/// Width of the PWL ramp at each power change, as a fraction of the shortest step.
const EDGE_FRACTION: f64 = 1e-6;

fn network(stages: &[(f64, f64)]) -> Vec<FosterStage> {
    stages
        .iter()
        .map(|&(r, tau)| FosterStage { r, tau })
        .collect()
}

/// The brief's invented scenario: the logger's LDO on its board, Σ R = θJA = 100 K/W.
fn demo_network() -> Vec<FosterStage> {
    network(&[(2.0, 1e-3), (8.0, 10e-3), (25.0, 0.1), (65.0, 2.0)])
}

/// An invented eight-stage network (the most core takes), time constants from 20 µs (die) to
/// 2 s (board), Σ R = 60 K/W.
fn eight_stage_network() -> Vec<FosterStage> {
    network(&[
        (0.3, 20e-6),
        (0.7, 200e-6),
        (1.5, 1e-3),
        (3.0, 5e-3),
        (6.0, 20e-3),
        (12.0, 100e-3),
        (16.5, 0.5),
        (20.0, 2.0),
    ])
}

fn steps(list: &[(f64, f64)]) -> Vec<ProfileStep> {
    list.iter()
        .map(|&(power_w, duration_s)| ProfileStep {
            power_w,
            duration_s,
        })
        .collect()
}

/// A profile with each step cut into SUB_STEPS equal parts.
fn subdivided(profile: &[ProfileStep]) -> Vec<ProfileStep> {
    profile
        .iter()
        .flat_map(|s| {
            std::iter::repeat(ProfileStep {
                power_w: s.power_w,
                duration_s: s.duration_s / SUB_STEPS as f64,
            })
            .take(SUB_STEPS)
        })
        .collect()
}

/// Collects the comparisons of one case, prints each, and fails at the end if any is out of
/// tolerance (so that every figure is printed first).
struct Comparison {
    case: &'static str,
    worst: f64,
    failures: Vec<String>,
}

impl Comparison {
    fn new(case: &'static str) -> Self {
        Comparison {
            case,
            worst: 0.0,
            failures: Vec::new(),
        }
    }

    /// One value: ngspice's against core's, both in K above ambient.
    fn value(&mut self, what: &str, spice: f64, core: f64) {
        let rel = (spice - core) / core;
        eprintln!(
            "{}: {what}: ngspice {spice:.6} K, core {core:.6} K, relative error {rel:+.2e}",
            self.case
        );
        self.note(what, rel);
    }

    /// A whole curve: ngspice interpolated at each of core's (t, rise) points.
    fn curve(&mut self, what: &str, spice: &Trace, core: &[[f64; 2]]) {
        let mut worst: f64 = 0.0;
        let mut at = 0.0;
        for &[t, rise] in core {
            let rel = (spice.at(t) - rise) / rise;
            if rel.abs() > worst.abs() {
                worst = rel;
                at = t;
            }
        }
        eprintln!(
            "{}: {what}: {} points, largest relative error {worst:+.2e} (at t = {at:.6} s)",
            self.case,
            core.len()
        );
        self.note(what, worst);
    }

    fn note(&mut self, what: &str, rel: f64) {
        assert!(
            rel.is_finite(),
            "{}: {what}: relative error {rel}",
            self.case
        );
        self.worst = self.worst.max(rel.abs());
        if rel.abs() > TOLERANCE {
            self.failures
                .push(format!("{what}: relative error {rel:+.3e} > {TOLERANCE}"));
        }
    }

    fn finish(self) {
        eprintln!(
            "{}: worst relative error {:.2e} (tolerance {TOLERANCE})",
            self.case, self.worst
        );
        assert!(
            self.failures.is_empty(),
            "{}: core and ngspice disagree:\n{}",
            self.case,
            self.failures.join("\n")
        );
    }
}

/// Simulates `profile` repeated `periods` times through `stages` and keeps the output from
/// `keep_from` on.
fn spice_run(
    name: &str,
    stages: &[FosterStage],
    profile: &[ProfileStep],
    periods: u32,
    keep_from: f64,
) -> Trace {
    let shortest = profile
        .iter()
        .map(|s| s.duration_s)
        .fold(f64::INFINITY, f64::min);
    let period: f64 = profile.iter().map(|s| s.duration_s).sum();
    let tran = Transient {
        stop: period * periods as f64,
        keep_from,
        max_step: shortest * STEP_FRACTION,
    };
    let pwl = profile_pwl(profile, periods, shortest * EDGE_FRACTION);
    simulate(name, stages, &pwl, tran).unwrap_or_else(|e| panic!("{name}: {e}"))
}

/// Periods of `period` that cover at least 20 × the longest τ.
fn periods_to_settle(stages: &[FosterStage], period: f64) -> u32 {
    let tau_max = stages.iter().map(|s| s.tau).fold(0.0, f64::max);
    (20.0 * tau_max / period).ceil() as u32
}

/// One pulse of `p` for `t_on` from cold: the peak P·Z_th(t_on) and the rise curve.
fn single_pulse(case: &'static str, stages: &[FosterStage], p: f64, t_on: f64) {
    let mut cmp = Comparison::new(case);
    let profile = steps(&[(p, t_on)]);
    let spice = spice_run(case, stages, &profile, 1, 0.0);
    let peak = spice.at(t_on);
    cmp.value(
        "single-pulse peak vs P·Z_th(t_on)",
        peak,
        p * zth(stages, t_on),
    );
    let stepped = rise_series(stages, &profile, 1);
    cmp.value(
        "single-pulse peak vs rise_series",
        peak,
        stepped.last().unwrap()[1],
    );
    let curve = rise_series(stages, &subdivided(&profile), 1);
    cmp.curve(
        "single-pulse rise curve vs rise_series",
        &spice,
        &curve[1..],
    );
    cmp.finish();
}

/// A periodic pulse train run from cold to its periodic steady state.
fn pulse_train(case: &'static str, stages: &[FosterStage], p: f64, t_on: f64, period: f64) {
    let mut cmp = Comparison::new(case);
    let periods = periods_to_settle(stages, period);
    let profile = steps(&[(p, t_on), (0.0, period - t_on)]);
    let end = period * periods as f64;
    let last_start = end - period;
    let spice = spice_run(case, stages, &profile, periods, last_start - period);
    eprintln!(
        "{case}: {periods} periods of {period} s ({end} s, ≥ 20 × the longest τ), {} SPICE rows kept",
        spice.t.len()
    );
    // ngspice's peak and valley: the extremes of its last period, wherever they fall.
    let (spice_peak, spice_valley) = spice.extremes(last_start, end);
    let (peak, valley) = pulse_train_rise(stages, p, t_on, period);
    cmp.value("train peak vs pulse_train_rise", spice_peak, peak);
    cmp.value("train valley vs pulse_train_rise", spice_valley, valley);
    let stepped = rise_series(stages, &profile, periods);
    // The last period's two points: the end of the pulse and the end of the period.
    let n = stepped.len();
    cmp.value("train peak vs rise_series", spice_peak, stepped[n - 2][1]);
    cmp.value(
        "train valley vs rise_series",
        spice_valley,
        stepped[n - 1][1],
    );
    let curve = rise_series(stages, &subdivided(&profile), periods);
    let last_period = &curve[curve.len() - 2 * SUB_STEPS..];
    cmp.curve("last period vs rise_series", &spice, last_period);
    cmp.finish();
}

/// An unequal three-step profile (the steps need not be a pulse) run to periodic steady state;
/// compared at every step boundary and sub-step of the last period.
fn unequal_profile(case: &'static str, stages: &[FosterStage]) {
    let mut cmp = Comparison::new(case);
    let profile = steps(&[(1.0, 20e-3), (0.2, 80e-3), (0.0, 100e-3)]);
    let period: f64 = profile.iter().map(|s| s.duration_s).sum();
    let periods = periods_to_settle(stages, period);
    let end = period * periods as f64;
    let spice = spice_run(case, stages, &profile, periods, end - 2.0 * period);
    let stepped = rise_series(stages, &profile, periods);
    let names = ["end of 1 W", "end of 0.2 W", "end of 0 W (period)"];
    for (name, point) in names.iter().zip(&stepped[stepped.len() - 3..]) {
        cmp.value(
            &format!("last period, {name} vs rise_series"),
            spice.at(point[0]),
            point[1],
        );
    }
    let curve = rise_series(stages, &subdivided(&profile), periods);
    let last_period = &curve[curve.len() - 3 * SUB_STEPS..];
    let core_peak = last_period.iter().map(|p| p[1]).fold(0.0, f64::max);
    let core_valley = last_period
        .iter()
        .map(|p| p[1])
        .fold(f64::INFINITY, f64::min);
    let (spice_peak, spice_valley) = spice.extremes(end - period, end);
    cmp.value("last-period peak vs rise_series", spice_peak, core_peak);
    cmp.value(
        "last-period valley vs rise_series",
        spice_valley,
        core_valley,
    );
    cmp.curve("last period vs rise_series", &spice, last_period);
    cmp.finish();
}

#[test]
fn demo_single_pulse() {
    single_pulse("demo 4-stage", &demo_network(), 0.49, 0.05);
}

#[test]
fn eight_stage_single_pulse() {
    single_pulse("8-stage", &eight_stage_network(), 1.5, 0.01);
}

#[test]
fn demo_pulse_train() {
    pulse_train("demo 4-stage", &demo_network(), 0.49, 0.05, 0.5);
}

#[test]
fn eight_stage_pulse_train() {
    pulse_train("8-stage", &eight_stage_network(), 1.5, 0.01, 0.1);
}

#[test]
fn demo_unequal_profile() {
    unequal_profile("demo 4-stage, 1 W/0.2 W/0 W", &demo_network());
}

#[test]
fn eight_stage_unequal_profile() {
    unequal_profile("8-stage, 1 W/0.2 W/0 W", &eight_stage_network());
}

/// The calculator's own report for the demo (what the page shows) against ngspice: the single
/// peak, the train's peak and valley, and the time series' peak, each minus T_a,max.
#[test]
fn demo_report_against_spice() {
    let mut cmp = Comparison::new("demo report");
    let stages = demo_network();
    let (p, t_on, period, ta) = (0.49, 0.05, 0.5, 60.0);
    let periods = periods_to_settle(&stages, period);
    let input = ThermalInput {
        power_w: 0.49,
        ta_max: ta,
        ta_min: -20.0,
        tj_max: 125.0,
        margin_c: 15.0,
        path: HeatPath::Ja,
        theta_ja: Some(100.0),
        theta_jc: None,
        theta_cs: None,
        theta_sa: None,
        power_rating_w: None,
        psi_jt: None,
        case_top_c: None,
        psi_jb: None,
        board_c: None,
        foster: stages.clone(),
        pulse_power_w: Some(p),
        pulse_on_s: Some(t_on),
        pulse_period_s: Some(period),
        profile: Vec::new(),
        profile_periods: Some(periods),
    };
    let report = check_thermal(&input).unwrap_or_else(|e| panic!("refused: {e}"));
    let transient = report
        .transient
        .expect("a Foster network gives a transient");
    let pulse = transient.pulse.expect("a pulse gives pulse results");
    let profile = steps(&[(p, t_on), (0.0, period - t_on)]);
    let end = period * periods as f64;
    // From t = 0: the single pulse is the first pulse of the train.
    let spice = spice_run("demo-report", &stages, &profile, periods, 0.0);
    cmp.value(
        "singlePeakC − taMax",
        spice.at(t_on),
        pulse.single_peak_c - ta,
    );
    let (spice_peak, spice_valley) = spice.extremes(end - period, end);
    cmp.value("trainPeakC − taMax", spice_peak, pulse.train_peak_c - ta);
    cmp.value(
        "trainValleyC − taMax",
        spice_valley,
        pulse.train_valley_c - ta,
    );
    let (spice_series_peak, _) = spice.extremes(0.0, end);
    cmp.value(
        "seriesPeakC − taMax",
        spice_series_peak,
        transient.series_peak_c - ta,
    );
    let series: Vec<[f64; 2]> = transient.series[1..]
        .iter()
        .map(|&[t, tj]| [t, tj - ta])
        .collect();
    cmp.curve("series − taMax", &spice, &series);
    cmp.finish();
}
