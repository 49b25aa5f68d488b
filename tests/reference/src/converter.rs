//! A switching converter's power stage as a SPICE deck, simulated by ngspice to its periodic
//! steady state.
//!
//! The deck is the power stage and nothing else: an ideal input source, the switches, the
//! inductor with its DCR, the output capacitor with its ESR and the load. It is driven open loop
//! at a given duty cycle (the one the estimate reports, losses included), so a comparison tests
//! the estimate's model of the power stage, not a controller.
//!
//! - **Switches** are ngspice's voltage-controlled switches (`S`, model `SW`): R_on when the
//!   control is above 0.5 V, R_off = 100 MΩ below, no hysteresis. They switch abruptly, so they
//!   have no switching, gate-drive or output-capacitance losses: what is compared is conduction
//!   only, by construction.
//! - **Gate drive** is one `PULSE` source between 0 and 1 V with rise and fall of 10⁻⁴ of the
//!   period. The main switch is on while it is above 0.5 V, so its on-time is exactly D·T (pulse
//!   width D·T − t_r plus half of each edge). A synchronous rectifier is driven by 1 V minus the
//!   same pulse and crosses the same threshold at the same instants: dead time is zero, and no
//!   interval exists where both conduct or neither does.
//! - **Discontinuous allowed with a synchronous rectifier**
//!   ([`Rectifier::SynchronousStopping`]): the rectifier's control is (1 − gate)·u(i_L − I_stop),
//!   ngspice's unit step of the inductor current (read through a 0 V ammeter in series with the
//!   inductor), so it opens when the current falls to I_stop and stays open until the next
//!   off-time. A fixed-drop body diode across it carries the remaining I_stop (1 mA in the tests)
//!   down to zero, as a real one would; an open switch would otherwise interrupt the current.
//! - **Diode** rectification uses a fixed-drop diode: a voltage source of V_src in series with a
//!   near-ideal junction (`D` model, I_s = 1 pA, emission coefficient N = 0.02, no series
//!   resistance, no charge storage). Its drop is V_src plus N·V_T·ln(I/I_s) ≈ 14 mV at 0.8 A,
//!   and changes by only 0.5 mV per factor of 2.7 in current. Why not a silicon-like diode model:
//!   the estimate takes one forward voltage V_f and charges V_f·I for the time it conducts; an
//!   exponential diode's drop moves by tens of mV across the ripple, and the comparison would then
//!   test the choice of V_f rather than the estimate. The drop at the operating current is
//!   measured in its own ngspice run ([`diode_drop`]) and that measured value is what the test
//!   gives the estimate as V_f. The near-ideal junction still blocks reverse current, so a diode
//!   converter at light load goes discontinuous by itself.
//! - **Load** is a resistor (R = V_out/I_out at the estimate's output). A resistor damps the
//!   output filter, so the periodic steady state comes within a few hundred periods; a constant
//!   current load would leave only the DCR and the on-resistances to damp it (thousands of
//!   periods for a boost).
//! - **Start and steady state**: the inductor current and the capacitor voltage start at given
//!   values (`uic` with element initial conditions), best the estimate's own steady values, and
//!   the deck runs `settle_periods + 2·measure_periods` periods. The last `measure_periods` give
//!   the results; the `measure_periods` before them give the same averages again, and their
//!   difference ([`Measured::drift`]) says whether the periodic steady state was reached.
//!
//! ngspice integrates with its default trapezoidal rule, the largest step 1/`steps_per_period`
//! of the period and reltol 10⁻⁵; every edge of the pulse is a breakpoint, so each switching
//! instant is a computed time point. The data comes back through `wrdata` at 9 significant
//! digits.

use crate::spice::{parse_table, run_deck};
use std::fmt::Write as _;

/// Which power stage.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Topology {
    /// Switch from V_in to the switch node, rectifier from the switch node to ground, inductor
    /// from the switch node to the output.
    Buck,
    /// Inductor from V_in to the switch node, switch from the switch node to ground, rectifier
    /// from the switch node to the output.
    Boost,
    /// Switch from V_in to the switch node, inductor from the switch node to ground, rectifier
    /// from the (negative) output to the switch node.
    InvertingBuckBoost,
}

/// The fixed-drop diode: `source_v` in series with a near-ideal junction.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FixedDropDiode {
    /// The series source, V.
    pub source_v: f64,
    /// The junction's saturation current, A.
    pub is_a: f64,
    /// The junction's emission coefficient.
    pub n: f64,
}

impl FixedDropDiode {
    /// A junction of I_s = 1 pA and N = 0.02 behind `source_v`.
    pub fn new(source_v: f64) -> Self {
        FixedDropDiode {
            source_v,
            is_a: 1e-12,
            n: 0.02,
        }
    }

    fn model_line(&self) -> String {
        format!(".model dfix D(Is={:e} N={:e})\n", self.is_a, self.n)
    }
}

/// What carries the inductor current while the main switch is off.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Rectifier {
    /// A second switch of this on-resistance, Ω, driven as the main switch's complement
    /// (forced continuous: the inductor current may reverse).
    Synchronous { r_on_ohm: f64 },
    /// A second switch driven as the main switch's complement but opened while the inductor
    /// current is below `stop_below_a` (a controller that lets the current stop: discontinuous
    /// conduction allowed). A body diode across it carries the last `stop_below_a` down to zero.
    SynchronousStopping {
        r_on_ohm: f64,
        stop_below_a: f64,
        body_diode: FixedDropDiode,
    },
    /// A fixed-drop diode.
    Diode(FixedDropDiode),
}

/// One power stage at one operating point.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Converter {
    pub topology: Topology,
    /// Input voltage, V (an ideal source).
    pub v_in: f64,
    /// The main switch's duty cycle, 0 < D < 1.
    pub duty: f64,
    pub f_sw_hz: f64,
    pub l_h: f64,
    pub dcr_ohm: f64,
    pub c_out_f: f64,
    pub esr_ohm: f64,
    /// On-resistance of the main (controlled) switch, Ω.
    pub r_on_main_ohm: f64,
    pub rectifier: Rectifier,
    /// The load resistor, Ω.
    pub r_load_ohm: f64,
}

/// Where the simulation starts: the output capacitor's voltage (signed; negative for the
/// inverting stage) and the inductor current at t = 0, the start of an on-time (the valley of
/// the ripple in continuous conduction, zero in discontinuous).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Start {
    pub v_cap: f64,
    pub i_l: f64,
}

/// How long and how finely to simulate.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Run {
    /// Periods simulated before the two windows that are measured.
    pub settle_periods: u32,
    /// Periods in each of the two windows.
    pub measure_periods: u32,
    /// The largest time step is the period divided by this.
    pub steps_per_period: u32,
}

/// What ngspice gave over the last `measure_periods` periods.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Measured {
    /// Inductor current peak to peak, A.
    pub ripple_pp_a: f64,
    /// Average inductor current, A (in the stage's forward direction).
    pub i_l_avg_a: f64,
    pub i_l_max_a: f64,
    pub i_l_min_a: f64,
    /// RMS inductor current, A.
    pub i_l_rms_a: f64,
    /// Average output voltage, V (signed).
    pub v_out_avg: f64,
    /// Average input power, W (V_in times the average input current).
    pub p_in_w: f64,
    /// Average power into the load, W.
    pub p_out_w: f64,
    /// p_out / (p_out + loss_w): p_out / p_in with the stored-energy rate taken out (the two
    /// are the same at the periodic steady state).
    pub efficiency: f64,
    /// The power lost in the stage, W: p_in − p_out less the rate at which the inductor and the
    /// capacitor gained stored energy over the window (½·L·i² + ½·C·v², end minus start, over
    /// the window's length). At the periodic steady state that rate is zero; counting it keeps
    /// the loss, a small difference of two large powers, honest when a slow part of the start
    /// transient is still left.
    pub loss_w: f64,
    /// The rate of change of stored energy that was taken out of the loss, W.
    pub stored_energy_rate_w: f64,
    /// Power lost in the output capacitor's ESR, W (I_C,rms²·ESR; zero when the ESR is zero).
    pub esr_loss_w: f64,
    /// The largest relative change of the average output voltage, the average inductor current
    /// and the input power between the window before and the last window: a measure of how far
    /// from the periodic steady state the run still was.
    pub drift: f64,
    /// Fraction of the last window in which the inductor current is above 10⁻⁴ of its peak:
    /// 1 in continuous conduction, D1 + D2 in discontinuous.
    pub conducting_fraction: f64,
    /// Number of time points in the last window.
    pub points: usize,
}

fn period(conv: &Converter) -> f64 {
    1.0 / conv.f_sw_hz
}

/// The edge time of the gate pulse, s.
fn edge(conv: &Converter) -> f64 {
    period(conv) * 1e-4
}

/// The deck of `conv` started at `start`, run as `run` says, writing time, v(out), the
/// capacitor's inner node v(nc) (behind the ESR), the inductor current, the input current and the
/// load current to `out.txt`.
pub fn deck(conv: &Converter, start: Start, run: Run) -> String {
    let t = period(conv);
    let tr = edge(conv);
    let total = run.settle_periods + 2 * run.measure_periods;
    let stop = t * f64::from(total);
    let keep_from = t * f64::from(run.settle_periods);
    let step = t / f64::from(run.steps_per_period);
    let mut d = String::new();
    let name = match conv.topology {
        Topology::Buck => "buck",
        Topology::Boost => "boost",
        Topology::InvertingBuckBoost => "inverting buck-boost",
    };
    writeln!(
        d,
        "* railnote {name} power stage, open loop at D = {}",
        conv.duty
    )
    .unwrap();
    // The input source and an ammeter (a 0 V source) for the input current.
    writeln!(d, "Vsupply src 0 DC {:e}", conv.v_in).unwrap();
    d.push_str("Vinm src vin DC 0\n");
    // Gate pulse: on (above 0.5 V) for exactly D·T from t = tr/2 of each period.
    writeln!(
        d,
        "Vgate g 0 PULSE(0 1 0 {tr:e} {tr:e} {:e} {t:e})",
        conv.duty * t - tr
    )
    .unwrap();
    d.push_str("Vref one 0 DC 1\n");
    // (node a, node b) of each part, current a → b forward.
    let (main, inductor, rectifier) = match conv.topology {
        Topology::Buck => (("vin", "sw"), ("sw", "out"), ("0", "sw")),
        Topology::Boost => (("sw", "0"), ("vin", "sw"), ("sw", "out")),
        Topology::InvertingBuckBoost => (("vin", "sw"), ("sw", "0"), ("out", "sw")),
    };
    writeln!(d, "Smain {} {} g 0 swmain", main.0, main.1).unwrap();
    match conv.rectifier {
        Rectifier::Synchronous { r_on_ohm } => {
            // Controlled by V(one) − V(g) = 1 − gate: the complement, same threshold crossing.
            writeln!(d, "Srect {} {} one g swrect", rectifier.0, rectifier.1).unwrap();
            writeln!(d, ".model swrect SW(Ron={r_on_ohm:e} Roff=1e8 Vt=0.5 Vh=0)").unwrap();
        }
        Rectifier::SynchronousStopping {
            r_on_ohm,
            stop_below_a,
            body_diode,
        } => {
            // On while the gate is low and the inductor current (through its ammeter) is at
            // least stop_below_a: u() is ngspice's unit step.
            writeln!(d, "Srect {} {} rc 0 swrect", rectifier.0, rectifier.1).unwrap();
            writeln!(
                d,
                "Brect rc 0 V = (1 - v(g)) * u(i(Vlm) - {stop_below_a:e})"
            )
            .unwrap();
            writeln!(d, ".model swrect SW(Ron={r_on_ohm:e} Roff=1e8 Vt=0.5 Vh=0)").unwrap();
            writeln!(d, "Vbody {} bda DC {:e}", rectifier.0, body_diode.source_v).unwrap();
            writeln!(d, "Dbody bda {} dfix", rectifier.1).unwrap();
            d.push_str(&body_diode.model_line());
        }
        Rectifier::Diode(diode) => {
            // Anode a, cathode b: source from a to the junction's anode, junction to b.
            writeln!(d, "Vdrop {} da DC {:e}", rectifier.0, diode.source_v).unwrap();
            writeln!(d, "Drect da {} dfix", rectifier.1).unwrap();
            d.push_str(&diode.model_line());
        }
    }
    writeln!(
        d,
        ".model swmain SW(Ron={:e} Roff=1e8 Vt=0.5 Vh=0)",
        conv.r_on_main_ohm
    )
    .unwrap();
    // The inductor, an ammeter for the rectifier's control, the winding resistance.
    writeln!(d, "L1 {} nl {:e} ic={:e}", inductor.0, conv.l_h, start.i_l).unwrap();
    d.push_str("Vlm nl nr DC 0\n");
    writeln!(d, "Rdcr nr {} {:e}", inductor.1, conv.dcr_ohm).unwrap();
    writeln!(d, "Resr out nc {:e}", conv.esr_ohm).unwrap();
    writeln!(d, "Cout nc 0 {:e} ic={:e}", conv.c_out_f, start.v_cap).unwrap();
    // The load behind an ammeter: current out → load positive (negative for inverting).
    d.push_str("Vloadm out nload DC 0\n");
    writeln!(d, "Rload nload 0 {:e}", conv.r_load_ohm).unwrap();
    write!(
        d,
        ".control\n\
         set wr_singlescale\n\
         set wr_vecnames\n\
         option reltol=1e-5\n\
         tran {step:e} {stop:e} {keep_from:e} {step:e} uic\n\
         wrdata out.txt v(out) v(nc) l1#branch vinm#branch vloadm#branch\n\
         quit\n\
         .endc\n\
         .end\n"
    )
    .unwrap();
    d
}

/// The value of `y` at `x`, linearly interpolated between the samples around it.
fn at(t: &[f64], y: &[f64], x: f64) -> f64 {
    let i = t.partition_point(|&s| s < x).clamp(1, t.len() - 1);
    let (t0, t1) = (t[i - 1], t[i]);
    if t1 == t0 {
        y[i]
    } else {
        y[i - 1] + (y[i] - y[i - 1]) * (x - t0) / (t1 - t0)
    }
}

/// Time average of `y` over [from, to] by the trapezoidal rule on the samples, the ends
/// interpolated.
fn mean(t: &[f64], y: &[f64], from: f64, to: f64) -> f64 {
    let mut points: Vec<(f64, f64)> = vec![(from, at(t, y, from))];
    points.extend(
        t.iter()
            .zip(y)
            .filter(|(&s, _)| s > from && s < to)
            .map(|(&s, &v)| (s, v)),
    );
    points.push((to, at(t, y, to)));
    let area: f64 = points
        .windows(2)
        .map(|w| (w[1].0 - w[0].0) * (w[0].1 + w[1].1) / 2.0)
        .sum();
    area / (to - from)
}

/// The time within [from, to] in which `y` is above `threshold`, crossings placed by linear
/// interpolation between samples.
fn time_above(t: &[f64], y: &[f64], from: f64, to: f64, threshold: f64) -> f64 {
    let mut total = 0.0;
    for i in 1..t.len() {
        let (t0, t1) = (t[i - 1].max(from), t[i].min(to));
        if t1 <= t0 {
            continue;
        }
        let (y0, y1) = (y[i - 1] - threshold, y[i] - threshold);
        let dt = t[i] - t[i - 1];
        total += match (y0 > 0.0, y1 > 0.0) {
            (true, true) => t1 - t0,
            (false, false) => 0.0,
            // The crossing time, then the part of [t0, t1] on the high side.
            (up_first, _) => {
                let cross = t[i - 1] + dt * y0 / (y0 - y1);
                if up_first {
                    (cross.min(t1) - t0).max(0.0)
                } else {
                    (t1 - cross.max(t0)).max(0.0)
                }
            }
        };
    }
    total
}

/// Simulates `conv` from `start` for `run` and measures the last window.
pub fn simulate(name: &str, conv: &Converter, start: Start, run: Run) -> Result<Measured, String> {
    let (data, log, deck_path) = run_deck(name, &deck(conv, start, run))?;
    let table = parse_table(&data).map_err(|e| format!("{e} ({deck_path})"))?;
    let t = table.column("time")?;
    let v_out = table.column("v(out)")?;
    let v_cap = table.column("v(nc)")?;
    let i_l = table.column("l1#branch")?;
    let i_in = table.column("vinm#branch")?;
    let i_load = table.column("vloadm#branch")?;
    let tp = period(conv);
    let stop = tp * f64::from(run.settle_periods + 2 * run.measure_periods);
    let last = *t.last().unwrap();
    if (last - stop).abs() > 1e-6 * tp {
        return Err(format!(
            "ngspice stopped at t = {last} s, not at the end {stop} s ({deck_path}):\n{log}"
        ));
    }
    let window = tp * f64::from(run.measure_periods);
    let (from, before) = (stop - window, stop - 2.0 * window);
    let p_load: Vec<f64> = v_out.iter().zip(i_load).map(|(v, i)| v * i).collect();
    let i_l_sq: Vec<f64> = i_l.iter().map(|i| i * i).collect();
    let averages = |a: f64, b: f64| {
        (
            mean(t, v_out, a, b),
            mean(t, i_l, a, b),
            conv.v_in * mean(t, i_in, a, b),
        )
    };
    let (v_out_avg, i_l_avg_a, p_in_w) = averages(from, stop);
    let (v_before, i_before, p_before) = averages(before, from);
    let drift = [
        (v_before - v_out_avg) / v_out_avg,
        (i_before - i_l_avg_a) / i_l_avg_a,
        (p_before - p_in_w) / p_in_w,
    ]
    .iter()
    .fold(0.0f64, |m, x| m.max(x.abs()));
    let p_out_w = mean(t, &p_load, from, stop);
    let stored = |time: f64| {
        let (i, v) = (at(t, i_l, time), at(t, v_cap, time));
        0.5 * conv.l_h * i * i + 0.5 * conv.c_out_f * v * v
    };
    let stored_energy_rate_w = (stored(stop) - stored(from)) / window;
    let esr_loss_w = if conv.esr_ohm > 0.0 {
        let p_esr: Vec<f64> = v_out
            .iter()
            .zip(v_cap)
            .map(|(a, b)| (a - b) * (a - b) / conv.esr_ohm)
            .collect();
        mean(t, &p_esr, from, stop)
    } else {
        0.0
    };
    let (mut i_l_max_a, mut i_l_min_a, mut points) = (f64::NEG_INFINITY, f64::INFINITY, 0);
    for (&s, &i) in t.iter().zip(i_l) {
        if s >= from {
            i_l_max_a = i_l_max_a.max(i);
            i_l_min_a = i_l_min_a.min(i);
            points += 1;
        }
    }
    let conducting_fraction = time_above(t, i_l, from, stop, 1e-4 * i_l_max_a) / window;
    Ok(Measured {
        ripple_pp_a: i_l_max_a - i_l_min_a,
        i_l_avg_a,
        i_l_max_a,
        i_l_min_a,
        i_l_rms_a: mean(t, &i_l_sq, from, stop).sqrt(),
        v_out_avg,
        p_in_w,
        p_out_w,
        efficiency: p_out_w / (p_in_w - stored_energy_rate_w),
        loss_w: p_in_w - p_out_w - stored_energy_rate_w,
        stored_energy_rate_w,
        esr_loss_w,
        drift,
        conducting_fraction,
        points,
    })
}

/// The forward drop of `diode` (its source plus its junction) at `current_a` and at half of it,
/// V, from an ngspice DC sweep of a current source through it: (drop at I/2, drop at I).
pub fn diode_drop(diode: FixedDropDiode, current_a: f64) -> Result<(f64, f64), String> {
    let half = current_a / 2.0;
    let deck = format!(
        "* railnote fixed-drop diode, forward drop\n\
         Itest 0 a DC {current_a:e}\n\
         Vdrop a da DC {:e}\n\
         Drect da 0 dfix\n\
         {}\
         .control\n\
         set wr_singlescale\n\
         set wr_vecnames\n\
         dc Itest {half:e} {current_a:e} {half:e}\n\
         wrdata out.txt v(a)\n\
         quit\n\
         .endc\n\
         .end\n",
        diode.source_v,
        diode.model_line()
    );
    let (data, _log, deck_path) = run_deck("diode-drop", &deck)?;
    let table = parse_table(&data).map_err(|e| format!("{e} ({deck_path})"))?;
    let v = table.column("v(a)")?;
    match v {
        [at_half, at_full] => Ok((*at_half, *at_full)),
        _ => Err(format!(
            "expected two sweep points, got {} ({deck_path})",
            v.len()
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn mean_of_a_ramp_with_interpolated_ends() {
        let t = [0.0, 1.0, 2.0, 4.0];
        let y = [0.0, 1.0, 2.0, 4.0];
        assert!((mean(&t, &y, 0.5, 3.0) - 1.75).abs() < 1e-15);
        assert!((mean(&t, &y, 0.0, 4.0) - 2.0).abs() < 1e-15);
    }

    #[test]
    fn time_above_places_crossings_between_samples() {
        // A triangle 0 → 2 → 0 over [0, 2]: above 1 from 0.5 to 1.5.
        let t = [0.0, 1.0, 2.0, 3.0];
        let y = [0.0, 2.0, 0.0, 0.0];
        assert!((time_above(&t, &y, 0.0, 3.0, 1.0) - 1.0).abs() < 1e-15);
        assert!((time_above(&t, &y, 0.75, 3.0, 1.0) - 0.75).abs() < 1e-15);
        assert!((time_above(&t, &y, 0.0, 1.25, 1.0) - 0.75).abs() < 1e-15);
        assert_eq!(time_above(&t, &y, 2.0, 3.0, 1.0), 0.0);
    }

    #[test]
    fn deck_has_one_pulse_of_duty_times_period_and_complementary_rectifier() {
        let conv = Converter {
            topology: Topology::Buck,
            v_in: 12.0,
            duty: 0.4,
            f_sw_hz: 500e3,
            l_h: 22e-6,
            dcr_ohm: 0.05,
            c_out_f: 4.7e-6,
            esr_ohm: 0.01,
            r_on_main_ohm: 0.1,
            rectifier: Rectifier::Synchronous { r_on_ohm: 0.05 },
            r_load_ohm: 6.25,
        };
        let run = Run {
            settle_periods: 10,
            measure_periods: 5,
            steps_per_period: 100,
        };
        let text = deck(
            &conv,
            Start {
                v_cap: 5.0,
                i_l: 0.7,
            },
            run,
        );
        // The pulse: 0 to 1 V, no delay, equal edges, width + one edge = D·T, period T.
        let line = text.lines().find(|l| l.starts_with("Vgate")).unwrap();
        let inside = &line[line.find('(').unwrap() + 1..line.find(')').unwrap()];
        let p: Vec<f64> = inside.split(' ').map(|x| x.parse().unwrap()).collect();
        assert_eq!(&p[..3], [0.0, 1.0, 0.0], "{line}");
        assert_eq!(p[3], p[4], "{line}");
        assert!((p[5] + p[3] - 0.8e-6).abs() < 1e-18, "{line}");
        assert!((p[6] - 2e-6).abs() < 1e-18, "{line}");
        // 10 + 2·5 periods, output kept from the end of the 10 settling periods.
        let tran: Vec<f64> = text
            .lines()
            .find(|l| l.starts_with("tran "))
            .unwrap()
            .split(' ')
            .filter_map(|x| x.parse().ok())
            .collect();
        assert!((tran[1] - 40e-6).abs() < 1e-15 && (tran[2] - 20e-6).abs() < 1e-15);
        assert!(text.contains("Srect 0 sw one g swrect"), "{text}");
    }
}
