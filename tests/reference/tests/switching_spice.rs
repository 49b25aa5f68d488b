//! Core's switching estimate against an outside reference: ngspice's transient analysis of the
//! same power stage (see `railnote_reference::converter`), run open loop at the duty the estimate
//! reports (conduction losses included) until it reaches its periodic steady state.
//!
//! Each case is one table row of converter values. From that row the test builds the
//! `SwitchingInput` it gives core and, from the same row and core's duty, the SPICE deck: the
//! same V_in corners, L and DCR, C_out and ESR, f_sw, switch on-resistances and load
//! (R = V_out/I_out). ngspice shares no arithmetic with core: core uses the volt-second and
//! charge-balance relations of its module doc; ngspice integrates the circuit.
//!
//! # What is compared, and what is not
//!
//! Compared, at every V_in corner (min, nom, max) of the continuous cases:
//!
//! | quantity                              | tolerance | source of the tolerance            |
//! |---------------------------------------|-----------|------------------------------------|
//! | inductor ripple, peak to peak         | 2 %       | issue 4                            |
//! | average inductor current              | 2 %       | issue 4                            |
//! | average output voltage (magnitude)    | 2 %       | issue 4                            |
//! | efficiency P_out/P_in (dE/dt: below)  | 2 %       | issue 4 (relative to η)            |
//! | inductor peak and RMS current         | 2 %       | ours: they follow from the two     |
//! |                                       |           | above, so the same tolerance holds |
//! | loss P_in − P_out (dE/dt: below)      | 2 %       | ours, the tolerance        |
//! | output capacitor's ESR loss           | 2 %       | ours, the tolerance        |
//!
//! and for the two discontinuous cases (the buck at light load, diode-rectified and synchronous
//! with discontinuous conduction allowed; every corner discontinuous):
//!
//! | quantity                                   | tolerance | source                         |
//! |--------------------------------------------|-----------|--------------------------------|
//! | output voltage at core's duty              | 3 %       | issue 4                        |
//! | duty cycle: core's against the duty that   | 3 %       | issue 4                        |
//! | gives the target output in ngspice (found  |           |                                |
//! | by secant iteration at V_in,nom)           |           |                                |
//! | inductor peak, efficiency, freewheel duty  | 3 %       | ours, the DCM tolerance|
//! | D2 (the time the current flows, less D1)   |           |                                |
//!
//! ngspice's loss includes the output capacitor's ESR loss (I_C,rms²·ESR, measured from the
//! capacitor's current), and so does core's total (`outputEsrW`); that term is also compared on
//! its own where it is large enough to measure (above 0.1 % of the loss: the boost and inverting
//! stages, whose capacitor carries pulsed current; a buck's sees only the ripple). The loss is
//! a small difference of two large powers, so ngspice's loss and efficiency are corrected by the
//! rate dE/dt at which the inductor and capacitor still gain stored energy over the window
//! (printed; zero at an exact periodic steady state). Without it, a run 10⁻⁴ short of its steady
//! state moved the high-duty boost's loss by 3 %.
//!
//! Every run must also have reached its periodic steady state: the averages of the last window
//! and of the window before it may differ by at most [`SETTLED`].
//!
//! Not compared, and why:
//! - Switching (overlap), gate-drive, dead-time, output-capacitance and core losses and the
//!   controller's I_q: ngspice's resistive switches switch abruptly and have no charge, so these
//!   inputs are zero here (dead time zero: the rectifier is driven as the exact complement).
//!   Their formulas are checked by core's own tests (textbook relations, from memory).
//! - Output ripple: core adds the capacitive and ESR parts, which errs high on purpose (their
//!   peaks do not coincide), so it is not an estimate of the same number ngspice gives.
//! - The loss breakdown term by term: ngspice gives only the total (P_in − P_out).
//!
//! The diode is a fixed-drop diode (a source in series with a near-ideal junction, see the
//! converter module); its drop at the case's inductor current is measured in its own ngspice run
//! and given to core as V_f, so both sides use the same drop.
//!
//! SPICE's own error is kept well below the tolerances: the largest time step is 1/100 of the
//! period, reltol 10⁻⁵, gate edges of 10⁻⁴ of the period. Run once with 800 steps per period
//! instead, no compared figure moved by more than 1.3·10⁻⁴ (relative). Run with
//! `cargo test -p railnote-reference --test switching_spice -- --nocapture` to see every figure.
//! ngspice must be installed (`cargo xtask test` installs Debian's package as root); without it
//! these tests fail and say so.

use railnote_core::switching::{
    check_switching, Corner, LightLoad, Mode, Rectifier, SwitchingInput, SwitchingReport, Topology,
};
use railnote_reference::converter::{
    self, diode_drop, Converter, FixedDropDiode, Measured, Run, Start,
};

/// The tolerance for continuous conduction, relative.
const TOLERANCE_CCM: f64 = 0.02;
/// The tolerance for the discontinuous cases, relative.
const TOLERANCE_DCM: f64 = 0.03;
/// Largest relative change of the averages between the last two measured windows.
const SETTLED: f64 = 2e-4;
/// Periods in each measured window.
const MEASURE_PERIODS: u32 = 20;
/// The largest SPICE time step is the period divided by this.
const STEPS_PER_PERIOD: u32 = 100;

/// A synchronous rectifier that lets the current stop opens below this inductor current, A;
/// its body diode carries the rest down to zero (about 1 µJ·f of loss: nothing next to mW).
const STOP_BELOW_A: f64 = 1e-3;
/// The series source of the body diode, V (dead time is zero, so it conducts only that rest).
const BODY_DIODE_V: f64 = 0.7;

/// What rectifies, with the values each kind needs.
#[derive(Clone, Copy)]
enum Rect {
    /// A synchronous switch of this on-resistance, Ω.
    Switch(f64),
    /// A fixed-drop diode whose series source is this, V.
    Diode(f64),
}

/// One converter, as both sides are given it.
#[derive(Clone, Copy)]
struct Case {
    name: &'static str,
    topology: Topology,
    rect: Rect,
    vin: [f64; 3],
    /// Output magnitude, V.
    vout: f64,
    iout: f64,
    fsw: f64,
    inductance: f64,
    dcr: f64,
    cout: f64,
    esr: f64,
    main_rds_on: f64,
    /// What a synchronous rectifier does at light load (a diode always lets the current stop).
    light_load: LightLoad,
    /// Periods simulated before the measured windows (from core's steady values).
    settle_periods: u32,
}

/// Core's input for `case`: every switching-time, charge and fixed loss at zero, as the
/// resistive switches of the deck have none of them. `diode_vf` is the measured drop of the
/// deck's diode.
fn core_input(case: &Case, diode_vf: Option<f64>) -> SwitchingInput {
    let (rectifier, rect_rds_on, rect_gate_charge, dead_time, body_diode_vf) = match case.rect {
        Rect::Switch(r) => (
            Rectifier::Synchronous,
            Some(r),
            Some(0.0),
            Some(0.0),
            Some(0.7),
        ),
        Rect::Diode(_) => (Rectifier::Diode, None, None, None, None),
    };
    SwitchingInput {
        topology: case.topology,
        rectifier,
        light_load: case.light_load,
        vin_min: case.vin[0],
        vin_nom: case.vin[1],
        vin_max: case.vin[2],
        vout: case.vout,
        iout: case.iout,
        fsw: case.fsw,
        inductance: Some(case.inductance),
        ripple_ratio_pct: None,
        main_rds_on: case.main_rds_on,
        rect_rds_on,
        diode_vf,
        rise_time: 0.0,
        fall_time: 0.0,
        main_gate_charge: 0.0,
        rect_gate_charge,
        drive_v: 5.0,
        dead_time,
        body_diode_vf,
        coss_charge: None,
        coss: None,
        dcr: case.dcr,
        core_loss: 0.0,
        iq: 0.0,
        cout: case.cout,
        esr: case.esr,
        min_on_time: 0.0,
        max_duty_pct: 100.0,
        isat: None,
    }
}

/// The one call of core's API in this file.
fn core_report(case: &Case, diode_vf: Option<f64>) -> SwitchingReport {
    check_switching(&core_input(case, diode_vf))
        .unwrap_or_else(|e| panic!("{}: core refused the input: {e}", case.name))
}

/// Core's report for `case` with the diode's V_f measured at the case's nominal inductor
/// current: a first report (V_f = the series source) gives that current, ngspice measures the
/// drop there, and the report with the measured drop is the one compared.
fn report_with_measured_drop(case: &Case) -> (SwitchingReport, Option<FixedDropDiode>) {
    match case.rect {
        Rect::Switch(_) => (core_report(case, None), None),
        Rect::Diode(source_v) => {
            let diode = FixedDropDiode::new(source_v);
            let first = core_report(case, Some(source_v));
            let current = first.corners[1].inductor_avg_a;
            let (half, full) = diode_drop(diode, current)
                .unwrap_or_else(|e| panic!("{}: diode drop: {e}", case.name));
            eprintln!(
                "{}: fixed-drop diode (source {source_v} V): drop {full:.6} V at {current:.4} A, \
                 {half:.6} V at half that; core gets V_f = {full:.6} V",
                case.name
            );
            (core_report(case, Some(full)), Some(diode))
        }
    }
}

/// The deck's power stage for `case` at `corner`'s V_in and `duty`.
fn power_stage(case: &Case, diode: Option<FixedDropDiode>, vin: f64, duty: f64) -> Converter {
    let rectifier = match (case.rect, diode) {
        (Rect::Switch(r), _) if case.light_load == LightLoad::DiscontinuousAllowed => {
            converter::Rectifier::SynchronousStopping {
                r_on_ohm: r,
                stop_below_a: STOP_BELOW_A,
                body_diode: FixedDropDiode::new(BODY_DIODE_V),
            }
        }
        (Rect::Switch(r), _) => converter::Rectifier::Synchronous { r_on_ohm: r },
        (Rect::Diode(_), Some(d)) => converter::Rectifier::Diode(d),
        (Rect::Diode(_), None) => unreachable!("a diode case always measures its diode"),
    };
    Converter {
        topology: match case.topology {
            Topology::Buck => converter::Topology::Buck,
            Topology::Boost => converter::Topology::Boost,
            Topology::Inverting => converter::Topology::InvertingBuckBoost,
        },
        v_in: vin,
        duty,
        f_sw_hz: case.fsw,
        l_h: case.inductance,
        dcr_ohm: case.dcr,
        c_out_f: case.cout,
        esr_ohm: case.esr,
        r_on_main_ohm: case.main_rds_on,
        rectifier,
        r_load_ohm: case.vout / case.iout,
    }
}

/// The output's sign in the deck.
fn sign(case: &Case) -> f64 {
    if case.topology == Topology::Inverting {
        -1.0
    } else {
        1.0
    }
}

/// Core's steady state as the deck's start: the capacitor at V_out, the inductor at the
/// valley (the current at the start of an on-time; zero in discontinuous conduction).
fn start(case: &Case, corner: &Corner) -> Start {
    Start {
        v_cap: sign(case) * case.vout,
        i_l: match corner.mode {
            Mode::Continuous => corner.inductor_valley_a,
            Mode::Discontinuous => 0.0,
        },
    }
}

fn run(case: &Case) -> Run {
    Run {
        settle_periods: case.settle_periods,
        measure_periods: MEASURE_PERIODS,
        steps_per_period: STEPS_PER_PERIOD,
    }
}

fn simulate(case: &Case, what: &str, conv: &Converter, start: Start) -> Measured {
    let name = format!("{} {what}", case.name);
    let measured = converter::simulate(&name, conv, start, run(case))
        .unwrap_or_else(|e| panic!("{name}: {e}"));
    assert!(
        measured.drift <= SETTLED,
        "{name}: not at periodic steady state after {} periods: the last two windows differ by \
         {:.2e} (more than {SETTLED:.0e}); give the case more settle_periods",
        case.settle_periods,
        measured.drift
    );
    measured
}

/// Collects the comparisons of one case, prints each as a table row, and fails at the end if
/// any is out of tolerance (so that every figure is printed first).
struct Comparison {
    case: &'static str,
    worst: f64,
    failures: Vec<String>,
}

impl Comparison {
    fn new(case: &'static str) -> Self {
        eprintln!(
            "{case}: {:<5} {:<26} {:>13} {:>13} {:>10} {:>5}",
            "V_in", "quantity", "ngspice", "core", "rel. error", "tol."
        );
        Comparison {
            case,
            worst: 0.0,
            failures: Vec::new(),
        }
    }

    /// One value: ngspice's against core's, relative to core's.
    fn value(&mut self, corner: &str, what: &str, spice: f64, core: f64, tolerance: f64) {
        let rel = (spice - core) / core;
        eprintln!(
            "{}: {corner:<5} {what:<26} {spice:>13.6} {core:>13.6} {rel:>+10.2e} {:>4.0}%",
            self.case,
            tolerance * 100.0
        );
        assert!(rel.is_finite(), "{}: {corner} {what}: {rel}", self.case);
        self.worst = self.worst.max(rel.abs());
        if rel.abs() > tolerance {
            self.failures.push(format!(
                "{corner} {what}: ngspice {spice}, core {core}, relative error {rel:+.3e} > {tolerance}"
            ));
        }
    }

    /// A figure printed for the record, not compared.
    fn shown(&self, corner: &str, what: &str, spice: f64) {
        eprintln!(
            "{}: {corner:<5} {what:<26} {spice:>13.6} {:>13} {:>10} {:>5}",
            self.case, "(none)", "(shown)", "-"
        );
    }

    fn finish(self) {
        eprintln!("{}: worst relative error {:.2e}", self.case, self.worst);
        assert!(
            self.failures.is_empty(),
            "{}: core and ngspice disagree:\n{}",
            self.case,
            self.failures.join("\n")
        );
    }
}

const LABELS: [&str; 3] = ["min", "nom", "max"];

/// A continuous case at all three corners.
fn continuous(case: Case) {
    let (report, diode) = report_with_measured_drop(&case);
    let mut cmp = Comparison::new(case.name);
    for (label, corner) in LABELS.iter().zip(&report.corners) {
        assert_eq!(
            corner.mode,
            Mode::Continuous,
            "{} {label}: the case is meant to be continuous",
            case.name
        );
        assert!(!corner.duty_limited, "{} {label}: duty limited", case.name);
        let conv = power_stage(&case, diode, corner.vin, corner.duty);
        let m = simulate(&case, label, &conv, start(&case, corner));
        eprintln!(
            "{}: {label:<5} D = {:.6} (ideal {:.6}), {} points in the last {MEASURE_PERIODS} \
             periods, drift {:.1e}, dE/dt {:+.1e} W",
            case.name, corner.duty, corner.duty_ideal, m.points, m.drift, m.stored_energy_rate_w
        );
        cmp.value(
            label,
            "ripple p-p (A)",
            m.ripple_pp_a,
            corner.ripple_a,
            TOLERANCE_CCM,
        );
        cmp.value(
            label,
            "inductor average (A)",
            m.i_l_avg_a,
            corner.inductor_avg_a,
            TOLERANCE_CCM,
        );
        cmp.value(
            label,
            "output voltage (V)",
            sign(&case) * m.v_out_avg,
            case.vout,
            TOLERANCE_CCM,
        );
        cmp.value(
            label,
            "efficiency",
            m.efficiency,
            corner.efficiency_pct / 100.0,
            TOLERANCE_CCM,
        );
        cmp.value(
            label,
            "inductor peak (A)",
            m.i_l_max_a,
            corner.inductor_peak_a,
            TOLERANCE_CCM,
        );
        cmp.value(
            label,
            "inductor RMS (A)",
            m.i_l_rms_a,
            corner.inductor_rms_a,
            TOLERANCE_CCM,
        );
        cmp.value(
            label,
            "loss (W)",
            m.loss_w,
            corner.losses.total_w,
            TOLERANCE_CCM,
        );
        if m.esr_loss_w > 1e-3 * m.loss_w {
            cmp.value(
                label,
                "ESR loss (W)",
                m.esr_loss_w,
                corner.losses.output_esr_w,
                TOLERANCE_CCM,
            );
        } else {
            cmp.shown(label, "ESR loss (W)", m.esr_loss_w);
        }
    }
    cmp.finish();
}

/// The logger's 5 V buck of the brief (invented scenario), synchronous: 10.8–14.4 V in, 0.8 A.
const BUCK: Case = Case {
    name: "buck sync 12→5 V 0.8 A",
    topology: Topology::Buck,
    rect: Rect::Switch(0.04),
    vin: [10.8, 12.0, 14.4],
    vout: 5.0,
    iout: 0.8,
    fsw: 500e3,
    inductance: 22e-6,
    dcr: 0.05,
    cout: 10e-6,
    esr: 0.01,
    main_rds_on: 0.08,
    light_load: LightLoad::ForcedContinuous,
    settle_periods: 300,
};

#[test]
fn buck_synchronous() {
    continuous(BUCK);
}

/// The same buck with a diode of about 0.4 V (a Schottky-like drop, common practice).
#[test]
fn buck_diode() {
    continuous(BUCK_DIODE);
}

const BUCK_DIODE: Case = Case {
    name: "buck diode 12→5 V 0.8 A",
    rect: Rect::Diode(0.4),
    ..BUCK
};

/// The comparison can tell a wrong duty: the same diode buck driven at the lossless duty
/// V_out/V_in (what an estimate that ignored the drops would report) misses the output by more
/// than the tolerance.
#[test]
fn lossless_duty_misses_the_output() {
    let case = BUCK_DIODE;
    let (report, diode) = report_with_measured_drop(&case);
    let nom = &report.corners[1];
    let conv = power_stage(&case, diode, nom.vin, nom.duty_ideal);
    let m = simulate(&case, "lossless duty", &conv, start(&case, nom));
    let rel = (m.v_out_avg - case.vout) / case.vout;
    eprintln!(
        "{}: nom at the lossless duty {:.6}: ngspice output {:.6} V, relative error {rel:+.2e}",
        case.name, nom.duty_ideal, m.v_out_avg
    );
    assert!(
        rel < -TOLERANCE_CCM,
        "{}: the lossless duty should leave the output more than {TOLERANCE_CCM} low, \
         got {rel:+.3e}",
        case.name
    );
}

/// An invented 24 V boost from the same battery (a valve driver), 0.5 A.
const BOOST: Case = Case {
    name: "boost sync 12→24 V 0.5 A",
    topology: Topology::Boost,
    rect: Rect::Switch(0.06),
    vin: [10.8, 12.0, 14.4],
    vout: 24.0,
    iout: 0.5,
    fsw: 500e3,
    inductance: 47e-6,
    dcr: 0.08,
    cout: 4.7e-6,
    esr: 0.01,
    main_rds_on: 0.06,
    light_load: LightLoad::ForcedContinuous,
    settle_periods: 800,
};

#[test]
fn boost_synchronous() {
    continuous(BOOST);
}

#[test]
fn boost_diode() {
    continuous(Case {
        name: "boost diode 12→24 V 0.5 A",
        rect: Rect::Diode(0.4),
        ..BOOST
    });
}

/// A deliberately lossy buck with a large ripple (invented: small cheap switches, a small
/// inductor): about 0.35 Ω main, 0.25 Ω rectifier, 0.2 Ω DCR and a ripple near 80 % of the load,
/// so that the estimate's first-order treatment of the drops (each at the interval's average
/// current) is pushed harder than in the cases above.
#[test]
fn buck_synchronous_lossy() {
    continuous(Case {
        name: "buck sync lossy 12→5 V 0.8 A",
        rect: Rect::Switch(0.25),
        inductance: 10e-6,
        dcr: 0.2,
        main_rds_on: 0.35,
        ..BUCK
    });
}

/// A boost at high duty from a low input (invented: a 5 V bus to 24 V, 0.2 A), where
/// the inductor carries I_out/(1 − D) ≈ 5 × I_out and the drops move the duty most.
#[test]
fn boost_synchronous_high_duty() {
    continuous(Case {
        name: "boost sync 5→24 V 0.2 A",
        vin: [4.5, 5.0, 5.5],
        iout: 0.2,
        inductance: 22e-6,
        dcr: 0.05,
        cout: 10e-6,
        main_rds_on: 0.05,
        rect: Rect::Switch(0.08),
        settle_periods: 1000,
        ..BOOST
    });
}

/// An invented −5 V bias rail from the battery, 0.4 A.
#[test]
fn inverting_synchronous() {
    continuous(Case {
        name: "inverting sync 12→−5 V 0.4 A",
        topology: Topology::Inverting,
        rect: Rect::Switch(0.05),
        vin: [10.8, 12.0, 14.4],
        vout: 5.0,
        iout: 0.4,
        fsw: 500e3,
        inductance: 22e-6,
        dcr: 0.05,
        cout: 10e-6,
        esr: 0.01,
        main_rds_on: 0.08,
        light_load: LightLoad::ForcedContinuous,
        settle_periods: 800,
    });
}

/// The logger's buck at 50 mA (its sleep load, invented): below the boundary load (about
/// 0.12 A at 10.8 V) at every corner.
const LIGHT: Case = Case {
    name: "buck diode 12→5 V 50 mA (DCM)",
    rect: Rect::Diode(0.4),
    iout: 0.05,
    cout: 4.7e-6,
    settle_periods: 400,
    ..BUCK
};

#[test]
fn buck_diode_discontinuous() {
    discontinuous(LIGHT);
}

/// The same with a synchronous rectifier that opens at zero current.
#[test]
fn buck_synchronous_discontinuous() {
    discontinuous(Case {
        name: "buck sync 12→5 V 50 mA (DCM allowed)",
        rect: Rect::Switch(0.04),
        light_load: LightLoad::DiscontinuousAllowed,
        ..LIGHT
    });
}

/// A discontinuous case at all three corners, and the duty for the target output at V_in,nom.
fn discontinuous(case: Case) {
    let (report, diode) = report_with_measured_drop(&case);
    let mut cmp = Comparison::new(case.name);
    for (label, corner) in LABELS.iter().zip(&report.corners) {
        assert_eq!(
            corner.mode,
            Mode::Discontinuous,
            "{} {label}: the case is meant to be discontinuous",
            case.name
        );
        let conv = power_stage(&case, diode, corner.vin, corner.duty);
        let m = simulate(&case, label, &conv, start(&case, corner));
        eprintln!(
            "{}: {label:<5} D1 = {:.6} (lossless {:.6}), D2 = {:.6}, inductor min {:.2e} A, drift {:.1e}",
            case.name, corner.duty, corner.duty_ideal, corner.freewheel_duty, m.i_l_min_a, m.drift
        );
        cmp.value(
            label,
            "output at core's duty (V)",
            m.v_out_avg,
            case.vout,
            TOLERANCE_DCM,
        );
        cmp.value(
            label,
            "inductor peak (A)",
            m.i_l_max_a,
            corner.inductor_peak_a,
            TOLERANCE_DCM,
        );
        cmp.value(
            label,
            "efficiency",
            m.efficiency,
            corner.efficiency_pct / 100.0,
            TOLERANCE_DCM,
        );
        cmp.value(
            label,
            "freewheel duty D2",
            m.conducting_fraction - corner.duty,
            corner.freewheel_duty,
            TOLERANCE_DCM,
        );
    }
    // The duty ngspice needs for the target output at V_in,nom, by the secant method from
    // core's duty, each run started at the target output with the inductor empty.
    let nom = &report.corners[1];
    let at = |duty: f64| {
        let conv = power_stage(&case, diode, nom.vin, duty);
        simulate(&case, "secant", &conv, start(&case, nom)).v_out_avg
    };
    let (mut d0, mut v0) = (nom.duty, at(nom.duty));
    let mut d1 = nom.duty * 1.01;
    let mut v1 = at(d1);
    for _ in 0..6 {
        if (v1 - case.vout).abs() <= 1e-5 * case.vout {
            break;
        }
        let next = d1 + (case.vout - v1) * (d1 - d0) / (v1 - v0);
        (d0, v0) = (d1, v1);
        d1 = next;
        v1 = at(d1);
    }
    assert!(
        (v1 - case.vout).abs() <= 1e-4 * case.vout,
        "{}: the secant search did not reach the target output: {v1} V at D = {d1}",
        case.name
    );
    cmp.value(
        "nom",
        "duty for the target output",
        d1,
        nom.duty,
        TOLERANCE_DCM,
    );
    cmp.finish();
}
