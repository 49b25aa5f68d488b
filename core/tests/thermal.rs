//! The thermal path against the JEDEC definitions, hand-worked numbers and the limits any
//! thermal impedance must meet.
//!
//! Tolerances, relative unless stated:
//!
//! | quantity                               | tolerance | why                                  |
//! |----------------------------------------|-----------|--------------------------------------|
//! | steady T_j, limits, Ψ estimates        | 1e-12     | one or two roundings                 |
//! | pulse-train closed form vs limits      | 1e-9      | exponentials of large arguments      |
//! | stepped time series vs closed form     | 1e-9      | the same exponentials, stepped       |
//!
//! The ngspice cross-check of the Foster network lives under tests/reference.

use railnote_core::thermal::{
    check_thermal, pulse_train_rise, rise_series, zth, FosterStage, HeatPath, ProfileStep,
    ThermalCheckId, ThermalInput, ThermalReport,
};
use railnote_core::verdict::Status;

/// The brief's invented scenario: the logger's 3.3 V LDO at its worst-case 0.49 W, θJA 100 K/W
/// on the logger board, enclosure up to 60 °C, the radio transmitting in bursts. The Foster
/// network is invented (package-like time constants) and sums to θJA.
fn demo() -> ThermalInput {
    ThermalInput {
        power_w: 0.49,
        ta_max: 60.0,
        ta_min: -20.0,
        tj_max: 125.0,
        margin_c: 15.0,
        path: HeatPath::Ja,
        theta_ja: Some(100.0),
        theta_jc: None,
        theta_cs: None,
        theta_sa: None,
        power_rating_w: None,
        psi_jt: Some(8.0),
        case_top_c: Some(95.0),
        psi_jb: None,
        board_c: None,
        foster: demo_network(),
        pulse_power_w: Some(0.49),
        pulse_on_s: Some(0.05),
        pulse_period_s: Some(0.5),
        profile: Vec::new(),
        profile_periods: None,
    }
}

fn demo_network() -> Vec<FosterStage> {
    [(2.0, 1e-3), (8.0, 10e-3), (25.0, 0.1), (65.0, 2.0)]
        .into_iter()
        .map(|(r, tau)| FosterStage { r, tau })
        .collect()
}

type Pick = (&'static str, fn(&ThermalReport) -> f64);
const TJ: Pick = ("steady.tj_c", |r| r.steady.tj_c.unwrap());
const MAX_POWER: Pick = ("steady.max_power_w", |r| r.steady.max_power_w.unwrap());
const HOTTEST: Pick = ("steady.hottest_ambient_c", |r| {
    r.steady.hottest_ambient_c.unwrap()
});
const SA_NEEDED: Pick = ("steady.theta_sa_needed", |r| {
    r.steady.theta_sa_needed_k_per_w.unwrap()
});
const FROM_TOP: Pick = ("measured.from_case_top_c", |r| {
    r.measured.from_case_top_c.unwrap()
});
const FROM_BOARD: Pick = ("measured.from_board_c", |r| {
    r.measured.from_board_c.unwrap()
});
const AVERAGE: Pick = ("pulse.average_c", |r| {
    r.transient.as_ref().unwrap().pulse.unwrap().average_c
});

/// The only test code that calls the calculator.
fn check(
    input: &ThermalInput,
    verdict: Status,
    expected: &[(Pick, f64)],
    rel: f64,
) -> ThermalReport {
    let report = check_thermal(input).unwrap_or_else(|e| panic!("refused: {e}"));
    assert_eq!(report.verdict, verdict, "{}", report.summary);
    for &((name, pick), want) in expected {
        let got = pick(&report);
        assert!(
            ((got - want) / want).abs() <= rel,
            "{name}: got {got}, want {want}"
        );
    }
    report
}

#[test]
fn demo_steady_and_measured_by_hand() {
    // JEDEC JESD51-2A: T_j = T_a + θJA·P = 60 + 100 × 0.49 = 109 °C (margin 16 K ≥ 15 K).
    // Largest power keeping 15 K: (125 − 15 − 60) / 100 = 0.5 W.
    // Hottest ambient at 0.49 W: 125 − 15 − 49 = 61 °C.
    // JESD51-2A ΨJT: T_j = T_top + ΨJT·P = 95 + 8 × 0.49 = 98.92 °C.
    // Pulse average: 60 + 0.49 × (50 ms / 500 ms) × 100 = 64.9 °C.
    let report = check(
        &demo(),
        Status::Pass,
        &[
            (TJ, 109.0),
            (MAX_POWER, 0.5),
            (HOTTEST, 61.0),
            (FROM_TOP, 98.92),
            (AVERAGE, 64.9),
        ],
        1e-12,
    );
    let ids: Vec<_> = report.checks.iter().map(|c| c.id).collect();
    assert_eq!(
        ids,
        [
            ThermalCheckId::Steady,
            ThermalCheckId::CaseTop,
            ThermalCheckId::Pulse
        ]
    );
    assert!(report.warnings.is_empty(), "{:?}", report.warnings);
}

#[test]
fn jesd51_definitions_as_check_equations() {
    // JESD51-2A: θJA = (T_j − T_a)/P; ΨJT = (T_j − T_t)/P. JESD51-12: ΨJB = (T_j − T_b)/P.
    let input = ThermalInput {
        psi_jb: Some(30.0),
        board_c: Some(80.0),
        ..demo()
    };
    let report = check(
        &input,
        Status::Pass,
        &[(FROM_BOARD, 80.0 + 30.0 * 0.49)],
        1e-12,
    );
    let tj = report.steady.tj_c.unwrap();
    assert!(((tj - 60.0) / 0.49 - 100.0).abs() < 1e-9);
    let from_top = report.measured.from_case_top_c.unwrap();
    assert!(((from_top - 95.0) / 0.49 - 8.0).abs() < 1e-9);
    let from_board = report.measured.from_board_c.unwrap();
    assert!(((from_board - 80.0) / 0.49 - 30.0).abs() < 1e-9);
}

#[test]
fn heat_sink_chain() {
    // A part on a heat sink: θJC 3 K/W, θCS 0.5 K/W (interface pad), 10 W, T_a 50 °C, T_j,max
    // 150 °C, margin 10 K. θSA needed = (150 − 10 − 50) / 10 − 3 − 0.5 = 5.5 K/W.
    let chain = ThermalInput {
        power_w: 10.0,
        ta_max: 50.0,
        tj_max: 150.0,
        margin_c: 10.0,
        path: HeatPath::Chain,
        theta_ja: None,
        theta_jc: Some(3.0),
        theta_cs: Some(0.5),
        theta_sa: None,
        psi_jt: None,
        case_top_c: None,
        foster: Vec::new(),
        pulse_power_w: None,
        pulse_on_s: None,
        pulse_period_s: None,
        ..demo()
    };
    let report = check(&chain, Status::Pass, &[(SA_NEEDED, 5.5)], 1e-12);
    assert!(report.steady.tj_c.is_none() && report.derating.is_none());
    // A 5 K/W sink: T_j = 50 + 10 × 8.5 = 135 °C; a 6 K/W sink fails the sink check.
    let with_sink = ThermalInput {
        theta_sa: Some(5.0),
        ..chain.clone()
    };
    check(
        &with_sink,
        Status::Pass,
        &[(TJ, 135.0), (SA_NEEDED, 5.5)],
        1e-12,
    );
    let too_small = ThermalInput {
        theta_sa: Some(6.0),
        ..chain.clone()
    };
    let report = check(&too_small, Status::Fail, &[(TJ, 145.0)], 1e-12);
    let status = |id| report.checks.iter().find(|c| c.id == id).map(|c| c.status);
    assert_eq!(status(ThermalCheckId::Steady), Some(Status::Marginal));
    assert_eq!(status(ThermalCheckId::HeatSink), Some(Status::Fail));
    // No sink can help when θJC + θCS alone exceed the budget: 40 W needs under 2.25 K/W total.
    let hopeless = ThermalInput {
        power_w: 40.0,
        ..chain
    };
    let report = check(
        &hopeless,
        Status::Fail,
        &[(SA_NEEDED, 90.0 / 40.0 - 3.5)],
        1e-12,
    );
    assert!(report.warnings.iter().any(|w| w.contains("No heat sink")));
}

#[test]
fn derating_line_and_rating_clamp() {
    // P_max(T_a) = (125 − T_a)/100, clamped at a 0.4 W package rating: knee at 125 − 40 = 85 °C.
    let rated = ThermalInput {
        power_rating_w: Some(0.4),
        ..demo()
    };
    let report = check_thermal(&rated).unwrap();
    let d = report.derating.unwrap();
    assert_eq!(d.limit, [[-20.0, 0.4], [85.0, 0.4], [125.0, 0.0]]);
    // With the 15 K margin the line ends at 110 °C and its knee is at 70 °C.
    assert_eq!(d.with_margin, [[-20.0, 0.4], [70.0, 0.4], [110.0, 0.0]]);
    assert!(report.warnings.iter().any(|w| w.contains("rating")));
}

#[test]
fn foster_limits() {
    let net = demo_network();
    let r_total: f64 = net.iter().map(|s| s.r).sum();
    // A single pulse much longer than every τ reaches P·ΣR_i (the steady state).
    assert!((zth(&net, 1e4) - r_total).abs() < 1e-9);
    // A tiny pulse gives almost no rise: Z_th(1 ns) ≈ Σ R_i·t/τ_i = 2e-6 + 8e-7 + … K/W.
    let tiny: f64 = net.iter().map(|s| s.r * 1e-9 / s.tau).sum();
    assert!((zth(&net, 1e-9) - tiny).abs() < 1e-6 * tiny);
    // Duty 100 %: the train is the steady state, peak = valley = P·ΣR_i.
    let (peak, valley) = pulse_train_rise(&net, 0.49, 0.5, 0.5);
    assert!((peak - 49.0).abs() < 1e-9 && (valley - 49.0).abs() < 1e-9);
    // Period much longer than every τ: each pulse starts cold, so the peak is the single pulse.
    let (peak, valley) = pulse_train_rise(&net, 0.49, 0.05, 1e4);
    assert!((peak - 0.49 * zth(&net, 0.05)).abs() < 1e-9);
    assert!(valley.abs() < 1e-9);
}

#[test]
fn stepped_series_settles_on_the_closed_form() {
    // Two different computations of the same thing: the closed-form periodic steady state, and
    // the exact stage-by-stage stepping from cold. After 100 periods of 0.5 s (25 × the longest
    // τ of 2 s) the stepping must sit on the closed form.
    let net = demo_network();
    let profile = [
        ProfileStep {
            power_w: 0.49,
            duration_s: 0.05,
        },
        ProfileStep {
            power_w: 0.0,
            duration_s: 0.45,
        },
    ];
    let series = rise_series(&net, &profile, 100);
    let (peak, valley) = pulse_train_rise(&net, 0.49, 0.05, 0.5);
    let n = series.len();
    let last_peak = series[n - 2][1];
    let last_valley = series[n - 1][1];
    assert!(
        ((last_peak - peak) / peak).abs() < 1e-9,
        "{last_peak} vs {peak}"
    );
    assert!(
        ((last_valley - valley) / valley).abs() < 1e-9,
        "{last_valley} vs {valley}"
    );
    // The series is built on the same times as the profile: 2 steps × 100 periods + the start.
    assert_eq!(n, 201);
    assert!((series[n - 1][0] - 50.0).abs() < 1e-9);
}

#[test]
fn transient_report_from_the_demo() {
    let report = check(&demo(), Status::Pass, &[], 0.0);
    let t = report.transient.unwrap();
    assert!((t.r_total - 100.0).abs() < 1e-12);
    let pulse = t.pulse.unwrap();
    // Peak above average above valley; the single pulse from cold peaks lowest.
    assert!(pulse.train_peak_c > pulse.average_c && pulse.average_c > pulse.train_valley_c);
    assert!(pulse.single_peak_c < pulse.train_peak_c);
    // The time series (10 periods from cold) never passes the settled peak.
    assert!(t.series_peak_c <= pulse.train_peak_c + 1e-9);
    // 10 periods × 2 steps, each split in 12 for the plot (exact: the same update in parts):
    // the step ends must equal the unsplit stepping.
    assert_eq!(t.series.len(), 241);
    let profile = [
        ProfileStep {
            power_w: 0.49,
            duration_s: 0.05,
        },
        ProfileStep {
            power_w: 0.0,
            duration_s: 0.45,
        },
    ];
    let step_ends = rise_series(&demo_network(), &profile, 10);
    for (k, end) in step_ends.iter().enumerate() {
        let point = t.series[12 * k];
        assert!((point[0] - end[0]).abs() < 1e-12, "time at step end {k}");
        assert!(
            (point[1] - 60.0 - end[1]).abs() < 1e-9,
            "rise at step end {k}"
        );
    }
    assert_eq!(report.steady.limit_with_margin_c, 110.0);
    // Z_th rises monotonically towards ΣR.
    assert!(t
        .zth
        .windows(2)
        .all(|w| w[1][1] >= w[0][1] && w[1][0] > w[0][0]));
    assert!(t.zth.last().unwrap()[1] < 100.0);
}

#[test]
fn bad_inputs_name_their_field() {
    type Spoil = fn(&mut ThermalInput);
    let cases: &[(&str, Spoil, &str)] = &[
        ("powerW", |x| x.power_w = -1.0, "must not be below 0 W"),
        (
            "taMax",
            |x| x.ta_max = 130.0,
            "T_a,max must be below T_j,max",
        ),
        ("taMin", |x| x.ta_min = 70.0, "T_a,min must not be above"),
        (
            "marginC",
            |x| x.margin_c = 70.0,
            "less than T_j,max − T_a,max",
        ),
        (
            "thetaJa",
            |x| x.theta_ja = Some(-5.0),
            "θJA must not be below",
        ),
        ("thetaJa", |x| x.theta_ja = None, "θJA is needed"),
        ("thetaJc", |x| x.path = HeatPath::Chain, "θJC is needed"),
        (
            "caseTopC",
            |x| x.case_top_c = None,
            "case-top temperature is needed",
        ),
        ("psiJt", |x| x.psi_jt = Some(f64::NAN), "finite"),
        ("foster[2].tau", |x| x.foster[2].tau = 0.0, "τ"),
        ("foster[1].r", |x| x.foster[1].r = -3.0, "R"),
        (
            "foster",
            |x| x.foster = vec![FosterStage { r: 1.0, tau: 1.0 }; 9],
            "at most 8",
        ),
        ("foster", |x| x.foster.clear(), "needs a Foster network"),
        (
            "pulseOnS",
            |x| x.pulse_on_s = Some(1.0),
            "must not exceed the period",
        ),
        ("pulsePeriodS", |x| x.pulse_period_s = None, "together"),
        (
            "profilePeriods",
            |x| x.profile_periods = Some(0),
            "from 1 to 1000",
        ),
        (
            "profile[0].durationS",
            |x| {
                x.profile = vec![ProfileStep {
                    power_w: 1.0,
                    duration_s: 0.0,
                }]
            },
            "duration",
        ),
        ("powerRatingW", |x| x.power_rating_w = Some(0.0), "rating"),
    ];
    for &(field, spoil, words) in cases {
        let mut input = demo();
        spoil(&mut input);
        let error = check_thermal(&input).expect_err(field);
        assert_eq!(error.field, field, "{error}");
        assert!(error.message.contains(words), "{field}: {error}");
    }
}
