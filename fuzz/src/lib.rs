//! What railnote's fuzz targets share: core's plain value tree read by core's `ObjectSource` (the
//! very reader the wasm crate uses), the structured editor that turns fuzz bytes into a
//! calculator's input object, and the invariants every target asserts.
//!
//! # Why structured inputs for the calculators
//!
//! A calculator reads 17–37 keys by name, most of them required, before validation even starts.
//! Fed raw JSON bytes, libFuzzer spends nearly every execution on syntax errors, misspelt keys
//! and the first missing field: the reader, not the maths. Here the fuzz bytes instead *edit* a
//! demo input of the calculator (`demos/<name>.json`, the brief's soil-moisture logger): the
//! first byte picks one of the demo variants, then one byte per key decides whether the value
//! stays, is scaled, is re-typed through the quantity parser, becomes a limit value (0, ±10^6
//! and just past it, NaN, ±∞, subnormals, raw bit patterns), goes missing, turns null or takes
//! the wrong JSON type; lists lose, gain or duplicate items; names and choice words swap. Bytes
//! left over read as zero, which means "keep", so an empty input *is* the demo and short inputs
//! stay close to it: most executions reach validation and a good share reach the report, where
//! the invariants are. The tree document importer (`tree_doc`) is fuzzed the other way too,
//! from raw JSON bytes, because that is what a pasted or imported file is.

use arbitrary::Unstructured;
pub use railnote_core::fields::Value;
use railnote_core::fields::{read_value, FieldSource, ReadError};
use railnote_core::output::Out;
use railnote_core::units::{format_quantity, parse_quantity, QuantityKind};

/// A JSON value as core's plain input [`Value`] (the tree the wasm crate copies a JS object
/// into; a number may be anything an f64 holds, as JS hands the module NaN and ±∞ too).
pub fn value_from_json(v: &serde_json::Value) -> Value {
    match v {
        serde_json::Value::Null => Value::Null,
        serde_json::Value::Bool(b) => Value::Bool(*b),
        serde_json::Value::Number(n) => Value::Number(n.as_f64().unwrap_or(f64::NAN)),
        serde_json::Value::String(s) => Value::Text(s.clone()),
        serde_json::Value::Array(items) => Value::List(items.iter().map(value_from_json).collect()),
        serde_json::Value::Object(map) => Value::Object(
            map.iter()
                .map(|(k, v)| (k.clone(), value_from_json(v)))
                .collect(),
        ),
    }
}

/// The value as JSON text, with non-finite numbers as the words JS would print: for showing
/// a failing input (`RAILNOTE_FUZZ_SHOW=1`) and for turning it into a regression test.
pub fn value_text(value: &Value) -> String {
    let mut out = String::new();
    write_value(value, &mut out);
    out
}

fn write_value(value: &Value, out: &mut String) {
    match value {
        Value::Null | Value::Unsupported | Value::TooDeep => out.push_str("null"),
        Value::Bool(b) => out.push_str(if *b { "true" } else { "false" }),
        Value::Number(n) if n.is_finite() => out.push_str(&format!("{n:?}")),
        Value::Number(n) => out.push_str(&format!("\"<{n}>\"")),
        Value::Text(s) => out.push_str(&serde_json::Value::String(s.clone()).to_string()),
        Value::List(items) => {
            out.push('[');
            for (i, item) in items.iter().enumerate() {
                if i > 0 {
                    out.push_str(", ");
                }
                write_value(item, out);
            }
            out.push(']');
        }
        Value::Object(entries) => {
            out.push('{');
            for (i, (k, v)) in entries.iter().enumerate() {
                if i > 0 {
                    out.push_str(", ");
                }
                out.push_str(&serde_json::Value::String(k.clone()).to_string());
                out.push_str(": ");
                write_value(v, out);
            }
            out.push('}');
        }
    }
}

/// Read an input from `value` with its type's `read`, refusing unknown keys, as the wasm API
/// does. A reading error must name a field and say why.
pub fn read<T>(
    value: &Value,
    reader: fn(&mut dyn FieldSource) -> Result<T, ReadError>,
) -> Option<T> {
    match read_value(value, reader) {
        Ok(input) => Some(input),
        Err(e) => {
            assert_error(&e.field, &e.message, plain_texts(value));
            None
        }
    }
}

/// An error names a non-empty field and gives a non-empty reason; with `texts`, the reason
/// shows no float's spelling of a non-finite value (the caller passes false when the input's
/// own keys or names do, since messages quote them).
pub fn assert_error(field: &str, message: &str, texts: bool) {
    assert!(
        !field.trim().is_empty(),
        "an error without a field: {message:?}"
    );
    assert!(
        !message.trim().is_empty(),
        "an error without a message at {field:?}"
    );
    assert!(
        !(texts && spells_non_finite(message)),
        "{field}: {message:?} spells a non-finite value"
    );
}

/// Whether no key or text of `value` spells a non-finite value, so that none may appear in
/// what core says about it.
pub fn plain_texts(value: &Value) -> bool {
    fn walk(v: &Value) -> bool {
        match v {
            Value::Text(t) => !spells_non_finite(t),
            Value::List(items) => items.iter().all(walk),
            Value::Object(entries) => entries
                .iter()
                .all(|(k, v)| !spells_non_finite(k) && walk(v)),
            _ => true,
        }
    }
    walk(value)
}

/// Whether `text` holds a float's own spelling of a non-finite value ("NaN", or "inf" as a word).
pub fn spells_non_finite(text: &str) -> bool {
    text.contains("NaN")
        || text
            .split(|c: char| !c.is_alphanumeric())
            .any(|w| w == "inf")
}

/// Every number of a report is finite (absent values are `Null`, never NaN), and the walk names
/// the path of the first offender. With `texts`, no text spells a non-finite value either (the
/// caller passes false when the input's own names do, as a rail called "NaN" may).
pub fn assert_finite(out: &Out, texts: bool) {
    fn walk(out: &Out, path: &mut String, texts: bool) {
        match out {
            Out::Number(n) => assert!(n.is_finite(), "{path} is {n}"),
            Out::Text(t) => assert!(!(texts && spells_non_finite(t)), "{path}: {t:?}"),
            Out::List(items) => {
                for (i, item) in items.iter().enumerate() {
                    let len = path.len();
                    path.push_str(&format!("[{i}]"));
                    walk(item, path, texts);
                    path.truncate(len);
                }
            }
            Out::Object(fields) => {
                for (key, value) in fields {
                    let len = path.len();
                    path.push('.');
                    path.push_str(key);
                    walk(value, path, texts);
                    path.truncate(len);
                }
            }
            Out::Null | Out::Bool(_) | Out::Word(_) => {}
        }
    }
    walk(out, &mut String::from("report"), texts);
}

/// `a` within a relative `rel` of `b` (with an absolute floor of `rel · floor`).
pub fn near(a: f64, b: f64, rel: f64, floor: f64) -> bool {
    (a - b).abs() <= rel * a.abs().max(b.abs()).max(floor)
}

/// The demo variants of a calculator: a JSON list of input objects.
pub fn demos(json: &str) -> Vec<Value> {
    match value_from_json(&serde_json::from_str(json).expect("a demo file is JSON")) {
        Value::List(items) => items,
        _ => panic!("a demo file holds a list of inputs"),
    }
}

/// Words the editor may put where a word was: every choice any calculator reads, and near
/// misses.
const WORDS: &[&str] = &[
    "fixed",
    "estimate",
    "resistive",
    "constant",
    "classic",
    "ja",
    "chain",
    "feedback",
    "reverse",
    "threshold",
    "adjust",
    "E3",
    "E6",
    "E12",
    "E24",
    "E48",
    "E96",
    "E192",
    "E1",
    "e24",
    "normal",
    "uniform",
    "buck",
    "boost",
    "inverting",
    "synchronous",
    "diode",
    "forcedContinuous",
    "discontinuousAllowed",
    "linear",
    "switching",
    "switch",
    "Linear",
    "",
    " ",
    "Source",
    "<script>alert(1)</script>",
    "\u{0}",
    "ЗV3",
];

/// Factors the editor scales a number by.
const FACTORS: &[f64] = &[
    0.0, -1.0, 0.5, 0.9, 0.99, 0.999_999, 1.000_001, 1.01, 1.1, 2.0, 10.0, 0.1, 1e3, 1e-3, 1e6,
    1e-6, 1e-9, 1e9, -0.5, 3.0,
];

/// Values at and around the limits every input has.
const SPECIALS: &[f64] = &[
    0.0,
    -0.0,
    1.0,
    -1.0,
    1e6,
    -1e6,
    1.000_001e6,
    -1.000_001e6,
    999_999.999,
    1e-6,
    1e-12,
    1e-300,
    f64::MIN_POSITIVE,
    5e-324,
    f64::MAX,
    f64::NAN,
    f64::INFINITY,
    f64::NEG_INFINITY,
    100.0,
    99.999_999,
    100.000_001,
    4_294_967_295.0,
    4_294_967_296.0,
    0.5,
    1e-15,
    2e5,
    1e5,
];

/// The quantity a key holds, guessed from its name, for re-typing a value as text.
pub fn kind_for_key(key: &str) -> QuantityKind {
    use QuantityKind::*;
    let k = key.to_ascii_lowercase();
    if k.ends_with("pct") {
        Percent
    } else if k.contains("ppm") {
        Tempco
    } else if k.starts_with("theta") || k.starts_with("psi") || k.starts_with("swtheta") {
        ThermalResistance
    } else if k.ends_with("marginc") {
        TemperatureDifference
    } else if k.starts_with("ta")
        || k.starts_with("tj")
        || k.starts_with("temp")
        || k.ends_with("c") && k.len() > 1 && !k.ends_with("dc")
    {
        Temperature
    } else if k.ends_with("wh") {
        Energy
    } else if k.ends_with("ah") {
        BatteryCharge
    } else if k.ends_with("w") || k.contains("loss") {
        Power
    } else if k.contains("time") || k.ends_with("s") || k == "tau" {
        Time
    } else if k == "fsw" {
        Frequency
    } else if k.contains("charge") {
        Charge
    } else if k.starts_with("cout") || k == "coss" {
        Capacitance
    } else if k == "inductance" {
        Inductance
    } else if k.starts_with("r") || k.contains("rds") || k == "dcr" || k == "esr" || k == "r" {
        Resistance
    } else if k.contains("samples")
        || k.contains("seed")
        || k == "limit"
        || k == "pick"
        || k.contains("periods")
        || k == "version"
    {
        Count
    } else if k.starts_with('i') || k.contains("current") || k.ends_with('a') {
        Current
    } else {
        Voltage
    }
}

/// Turns fuzz bytes into edits of a demo input. Exhausted bytes read as zero: keep.
pub struct Editor<'a, 'b> {
    u: &'b mut Unstructured<'a>,
    /// Every text of the base document (rail and load names), for swapping names around.
    names: Vec<String>,
}

impl<'a, 'b> Editor<'a, 'b> {
    pub fn new(u: &'b mut Unstructured<'a>, base: &Value) -> Self {
        let mut names = Vec::new();
        collect_texts(base, &mut names);
        Editor { u, names }
    }

    fn byte(&mut self) -> u8 {
        self.u.arbitrary().unwrap_or(0)
    }

    fn pick<T: Copy>(&mut self, from: &[T]) -> T {
        from[usize::from(self.byte()) % from.len()]
    }

    /// Edit a whole input.
    pub fn edit(&mut self, base: &Value) -> Value {
        match self.byte() {
            // Rarely, not an object at all.
            255 => self.wrong_type(base),
            _ => self.value("", base),
        }
    }

    fn wrong_type(&mut self, base: &Value) -> Value {
        match self.byte() % 5 {
            0 => Value::Text("3.3".into()),
            1 => Value::Bool(true),
            2 => Value::List(vec![base.clone()]),
            3 => Value::Object(vec![("value".into(), base.clone())]),
            _ => Value::Number(3.3),
        }
    }

    fn value(&mut self, key: &str, base: &Value) -> Value {
        match base {
            Value::Number(n) => self.number(key, *n),
            Value::Text(t) => self.text(t),
            Value::List(items) => self.list(key, items),
            Value::Object(entries) => self.object(entries),
            other => other.clone(),
        }
    }

    fn object(&mut self, entries: &[(String, Value)]) -> Value {
        let mut out = Vec::with_capacity(entries.len() + 1);
        for (k, v) in entries {
            out.push((k.clone(), self.value(k, v)));
        }
        // Now and then a key the reader does not ask for: a misspelling or a stray field.
        match self.byte() {
            250 => out.push(("unknownKey".into(), Value::Number(1.0))),
            251 if !entries.is_empty() => {
                let i = usize::from(self.byte()) % entries.len();
                out.push((
                    entries[i].0.to_ascii_lowercase() + "x",
                    entries[i].1.clone(),
                ));
            }
            252 if !out.is_empty() => {
                // The same key twice: the reader takes the first and refuses the second.
                let i = usize::from(self.byte()) % out.len();
                let dup = out[i].clone();
                out.push(dup);
            }
            _ => {}
        }
        Value::Object(out)
    }

    fn list(&mut self, key: &str, items: &[Value]) -> Value {
        let mut items: Vec<Value> = items.to_vec();
        match self.byte() {
            0..=179 => {}
            180..=199 if !items.is_empty() => {
                let i = usize::from(self.byte()) % items.len();
                items.remove(i);
            }
            200..=219 if !items.is_empty() => {
                let i = usize::from(self.byte()) % items.len();
                let copy = items[i].clone();
                items.push(copy);
            }
            220..=229 => items.reverse(),
            230..=237 => items.clear(),
            238..=241 if !items.is_empty() => {
                // Many copies: size limits and long computations.
                let n = usize::from(self.byte()) * 8;
                let copy = items[0].clone();
                items.extend(std::iter::repeat_n(copy, n));
            }
            242..=247 => return self.wrong_type(&Value::List(items)),
            248..=251 => return Value::Null,
            _ => {}
        }
        Value::List(items.iter().map(|item| self.value(key, item)).collect())
    }

    fn text(&mut self, base: &str) -> Value {
        match self.byte() {
            0..=199 => Value::Text(base.into()),
            200..=219 => Value::Text(self.pick(WORDS).into()),
            220..=234 if !self.names.is_empty() => {
                let i = usize::from(self.byte()) % self.names.len();
                Value::Text(self.names[i].clone())
            }
            235..=239 => Value::Text(base.to_ascii_uppercase() + " "),
            240..=244 => Value::Text(self.u.arbitrary::<String>().unwrap_or_default()),
            245..=247 => Value::Text(base.repeat(usize::from(self.byte()) * 40 + 1)),
            248..=249 => Value::Null,
            250..=252 => Value::Number(1.0),
            _ => Value::List(vec![]),
        }
    }

    fn number(&mut self, key: &str, base: f64) -> Value {
        let kind = kind_for_key(key);
        Value::Number(match self.byte() {
            0..=127 | 240..=255 => base,
            128..=159 => base * self.pick(FACTORS),
            160..=175 => {
                // A power of ten from 10^-16 to 10^16 times the base, or plus a small step.
                let k = self.u.arbitrary::<i8>().unwrap_or(0);
                if k % 2 == 0 {
                    base * 10f64.powf(f64::from(k) / 8.0)
                } else {
                    base + f64::from(k) * 0.01
                }
            }
            176..=191 => {
                // Retyped as text the way a page would: formatted with some figures, perhaps
                // touched, parsed again; text that does not parse leaves the key out (the page
                // shows the message at the field and sends nothing).
                let digits = u32::from(self.byte() % 13);
                let mut text = format_quantity(base, kind, digits);
                match self.byte() % 4 {
                    0 => {}
                    1 => text = text.replace(' ', ""),
                    2 => text.push_str(&self.u.arbitrary::<String>().unwrap_or_default()),
                    _ => text = self.u.arbitrary::<String>().unwrap_or_default(),
                }
                match parse_quantity(&text, kind) {
                    Ok(v) => v,
                    Err(_) => return Value::Null,
                }
            }
            192..=207 => self.pick(SPECIALS),
            208..=215 => f64::from_bits(self.u.arbitrary::<u64>().unwrap_or(0)),
            216..=223 => return Value::Null,
            224..=231 => return self.wrong_type(&Value::Number(base)),
            _ => -base,
        })
    }
}

fn collect_texts(v: &Value, out: &mut Vec<String>) {
    match v {
        Value::Text(t) => {
            if !out.contains(t) {
                out.push(t.clone());
            }
        }
        Value::List(items) => items.iter().for_each(|i| collect_texts(i, out)),
        Value::Object(entries) => entries.iter().for_each(|(_, v)| collect_texts(v, out)),
        _ => {}
    }
}

/// The input a structured target builds from `data`: the first byte picks a demo variant, the
/// rest edit it. With `RAILNOTE_FUZZ_SHOW` set, the input is printed (to reproduce a crash).
pub fn structured_input(data: &[u8], demos: &[Value]) -> Value {
    let mut u = Unstructured::new(data);
    let variant: u8 = u.arbitrary().unwrap_or(0);
    let base = &demos[usize::from(variant) % demos.len()];
    let value = Editor::new(&mut u, base).edit(base);
    if std::env::var_os("RAILNOTE_FUZZ_SHOW").is_some() {
        eprintln!("input: {}", value_text(&value));
    }
    value
}

/// Each calculator's entry point from its input object, with the invariants of its report.
pub mod calc {
    use super::{assert_error, assert_finite, near, plain_texts, read, Value};
    use railnote_core::output::ToOut;
    use railnote_core::{compare, divider, linear, switching, thermal, tree};

    /// Read, check, and hand an Ok report to `then` after the finiteness walk; an Err must
    /// name its field.
    fn run<I, R: ToOut>(
        value: &Value,
        reader: fn(
            &mut dyn railnote_core::fields::FieldSource,
        ) -> Result<I, railnote_core::fields::ReadError>,
        check: fn(&I) -> Result<R, railnote_core::InputError>,
        then: fn(&R),
    ) {
        let Some(input) = read(value, reader) else {
            return;
        };
        match check(&input) {
            Ok(report) => {
                assert_finite(&report.to_out(), plain_texts(value));
                then(&report);
            }
            Err(e) => assert_error(e.field, &e.message, plain_texts(value)),
        }
    }

    pub fn linear(value: &Value) {
        run(value, linear::LinearInput::read, linear::check, |r| {
            for c in &r.corners {
                for p in [&c.full, &c.typ] {
                    assert!(
                        (0.0..=100.0).contains(&p.efficiency_pct),
                        "linear efficiency {} % at {:?}",
                        p.efficiency_pct,
                        c.label
                    );
                }
            }
        });
    }

    pub fn thermal(value: &Value) {
        run(
            value,
            thermal::ThermalInput::read,
            thermal::check_thermal,
            |r| {
                let Some(t) = &r.transient else { return };
                // A Foster network's Z_th(t) = Σ R_i (1 − e^(−t/τ_i)) rises and stays below Σ R_i.
                for pair in t.zth.windows(2) {
                    assert!(
                        pair[1][1] >= pair[0][1] * (1.0 - 1e-12),
                        "Z_th falls: {pair:?}"
                    );
                }
                for p in &t.zth {
                    assert!(
                        p[1] >= 0.0 && p[1] <= t.r_total * (1.0 + 1e-12),
                        "Z_th {p:?} vs {}",
                        t.r_total
                    );
                }
                if let Some(p) = &t.pulse {
                    let tol = 1e-9 * p.train_peak_c.abs().max(1.0);
                    assert!(
                        p.train_valley_c <= p.average_c + tol
                            && p.average_c <= p.train_peak_c + tol,
                        "pulse {p:?}"
                    );
                    assert!(
                        p.single_peak_c <= p.train_peak_c + tol,
                        "single pulse above the train: {p:?}"
                    );
                    assert!((0.0..=100.0).contains(&p.duty_pct), "duty {p:?}");
                }
                let top = t
                    .series
                    .iter()
                    .map(|p| p[1])
                    .fold(f64::NEG_INFINITY, f64::max);
                if !t.series.is_empty() {
                    assert!(
                        t.series_peak_c >= top - 1e-9 * top.abs().max(1.0),
                        "series peak {} below a point {top}",
                        t.series_peak_c
                    );
                }
            },
        );
    }

    pub fn divider(value: &Value) {
        run(
            value,
            divider::DividerInput::read,
            divider::check_divider,
            |r| {
                let inside = |lo: f64, x: f64, hi: f64| {
                    let tol = 1e-12 * lo.abs().max(hi.abs()).max(1e-300);
                    lo - tol <= x && x <= hi + tol
                };
                for c in &r.candidates {
                    assert!(
                        inside(c.worst_min, c.vout, c.worst_max),
                        "nominal outside the worst case: {c:?}"
                    );
                    assert!(c.rss >= 0.0, "rss {c:?}");
                }
                if let Some(chosen) = r.candidates.get(r.pick as usize) {
                    if let Some(d) = &r.detail {
                        for t in &d.contributions {
                            // One term alone stays inside the 16-corner box.
                            assert!(
                                inside(chosen.worst_min, t.low, chosen.worst_max)
                                    && inside(chosen.worst_min, t.high, chosen.worst_max),
                                "{t:?} outside {chosen:?}"
                            );
                        }
                    }
                    if let Some(m) = &r.monte_carlo {
                        let slack = 1e-9 * chosen.worst_min.abs().max(chosen.worst_max.abs());
                        assert!(
                            m.min >= chosen.worst_min - slack && m.max <= chosen.worst_max + slack,
                            "a Monte Carlo sample outside the worst case: {m:?} vs {chosen:?}"
                        );
                        assert!(
                            m.samples == 0 || inside(m.min, m.mean, m.max),
                            "mean outside min..max: {m:?}"
                        );
                        assert!(
                            (0.0..=100.0).contains(&m.yield_pct) && m.sigma >= 0.0,
                            "{m:?}"
                        );
                        let counted: u64 = m.histogram.counts.iter().map(|&c| u64::from(c)).sum();
                        assert_eq!(counted, u64::from(m.samples), "histogram counts");
                    }
                } else {
                    assert!(
                        r.candidates.is_empty(),
                        "pick {} of {}",
                        r.pick,
                        r.candidates.len()
                    );
                }
                if let Some(t) = &r.threshold {
                    for c in &t.candidates {
                        assert!(
                            inside(c.start_low, c.start, c.start_high)
                                && inside(c.stop_low, c.stop, c.stop_high),
                            "threshold nominal outside its range: {c:?}"
                        );
                    }
                }
            },
        );
    }

    fn efficiencies_in_range(sides: &[(f64, &str)]) {
        for (eta, what) in sides {
            assert!(
                *eta > 0.0 && *eta <= 100.0,
                "{what}: efficiency {eta} % outside (0, 100]"
            );
        }
    }

    fn switching_checks(r: &switching::SwitchingReport) {
        for c in &r.corners {
            efficiencies_in_range(&[(c.efficiency_pct, "switching corner")]);
            assert!(
                (0.0..=1.0).contains(&c.duty),
                "duty {} at {:?}",
                c.duty,
                c.label
            );
            let sum = c.losses.main_conduction_w
                + c.losses.main_switching_w
                + c.losses.main_gate_w
                + c.losses.rect_conduction_w
                + c.losses.rect_gate_w
                + c.losses.dead_time_w
                + c.losses.output_cap_w
                + c.losses.diode_w
                + c.losses.inductor_copper_w
                + c.losses.inductor_core_w
                + c.losses.controller_w
                + c.losses.output_esr_w;
            assert!(
                near(sum, c.losses.total_w, 1e-9, 1e-300),
                "losses {sum} vs total {}",
                c.losses.total_w
            );
            assert!(
                near(c.input_w, c.output_w + c.losses.total_w, 1e-9, 1e-300),
                "input ≠ output + losses at {:?}",
                c.label
            );
        }
        for curve in &r.sweep {
            for eta in &curve.efficiency_pct {
                efficiencies_in_range(&[(*eta, "switching sweep")]);
            }
        }
    }

    pub fn switching(value: &Value) {
        run(
            value,
            switching::SwitchingInput::read,
            switching::check_switching,
            switching_checks,
        );
    }

    pub fn compare(value: &Value) {
        run(
            value,
            compare::CompareInput::read,
            compare::compare_rails,
            |r| {
                assert_eq!(
                    r.linear_possible,
                    r.linear_impossible.is_none(),
                    "linear side possible and a reason why not"
                );
                for c in &r.corners {
                    efficiencies_in_range(&[(
                        c.switching.efficiency_pct,
                        "compare, switching side",
                    )]);
                    if let Some(l) = &c.linear {
                        assert!(
                            (0.0..=100.0).contains(&l.efficiency_pct),
                            "compare, linear side {} %",
                            l.efficiency_pct
                        );
                    }
                    assert_eq!(
                        c.linear.is_some(),
                        r.linear_possible,
                        "a linear side where none is possible"
                    );
                }
            },
        );
    }

    pub fn tree(value: &Value) {
        run(value, tree::TreeInput::read, tree::check_tree, |r| {
            for c in &r.corners {
                let per_load: [f64; 3] = [0, 1, 2].map(|k| {
                    c.loads
                        .iter()
                        .map(|l| [l.p_w.typ, l.p_w.peak, l.p_w.avg][k])
                        .sum()
                });
                let per_rail: [f64; 3] = [0, 1, 2].map(|k| {
                    c.rails
                        .iter()
                        .map(|x| [x.loss_w.typ, x.loss_w.peak, x.loss_w.avg][k])
                        .sum()
                });
                for (k, (src, loads, losses)) in [
                    (c.source_w.typ, c.loads_w.typ, c.losses_w.typ),
                    (c.source_w.peak, c.loads_w.peak, c.losses_w.peak),
                    (c.source_w.avg, c.loads_w.avg, c.losses_w.avg),
                ]
                .into_iter()
                .enumerate()
                {
                    // Conservation of energy, as the property test in core/tests/tree.rs states it.
                    let scale = src.abs().max(1e-9);
                    assert!(
                        (src - loads - losses).abs() <= 1e-9 * scale,
                        "case {k} at {} V: source {src} W vs loads {loads} + losses {losses}",
                        c.vin
                    );
                    assert!(
                        losses >= -1e-12 * scale,
                        "a loss below zero: {losses} (case {k})"
                    );
                    assert!(
                        (loads - per_load[k]).abs() <= 1e-9 * scale
                            && (losses - per_rail[k]).abs() <= 1e-9 * scale,
                        "totals vs the lists (case {k})"
                    );
                }
                assert!(
                    (0.0..=100.0 * (1.0 + 1e-12)).contains(&c.efficiency_pct),
                    "tree efficiency {} %",
                    c.efficiency_pct
                );
            }
        });
    }
}

/// The quantity parser and printer.
pub mod units {
    use railnote_core::units::{
        format_quantity, parse_quantity, ParseProblem, QuantityKind, MAX_INPUT_CHARS,
    };

    /// Where printing and reading back must agree: `value` printed with `digits` figures reads
    /// back within half a unit of the last figure. Holds for every finite value whose text is
    /// short enough to be read (≤ 64 characters) and at most 10^300 in magnitude (near the
    /// largest double, rounding to fewer figures can print a number past it: -1.5e308 at one
    /// figure is "-2e296 TV") — a count only for whole, non-negative values (it is printed
    /// whole, and a count has no sign).
    fn round_trip(value: f64, kind: QuantityKind, digits: u32) {
        let text = format_quantity(value, kind, digits);
        assert!(
            !text.contains("NaN") && !text.contains("inf"),
            "{value:e} printed as {text:?}"
        );
        if !value.is_finite() {
            assert_eq!(text, "—", "a non-finite value prints as a dash");
            return;
        }
        if text.chars().count() > MAX_INPUT_CHARS || value.abs() > 1e300 {
            return;
        }
        if kind == QuantityKind::Count && !(value >= 0.0 && value == value.floor() && value < 1e15)
        {
            return;
        }
        let back = match parse_quantity(&text, kind) {
            Ok(v) => v,
            Err(e) => panic!("{value:e} ({kind:?}, {digits} figures) printed as {text:?}, which does not read back: {e}"),
        };
        let figures = digits.clamp(1, 12) as i32;
        let rel = 0.51 * 10f64.powi(1 - figures) + 1e-14;
        let ok = if kind == QuantityKind::Count {
            back == value
        } else {
            (back - value).abs() <= rel * value.abs()
        };
        assert!(
            ok,
            "{value:e} ({kind:?}, {digits} figures) printed as {text:?} reads back as {back:e}"
        );
    }

    pub fn check(data: &[u8]) {
        let (head, rest) = data.split_at(data.len().min(9));
        let digits = u32::from(head.first().copied().unwrap_or(3) % 14);
        let mut bits = [0u8; 8];
        bits[..head.len().saturating_sub(1)].copy_from_slice(&head[1.min(head.len())..]);
        let value = f64::from_bits(u64::from_le_bytes(bits));
        let text = String::from_utf8_lossy(rest);
        for kind in QuantityKind::ALL {
            match parse_quantity(&text, kind) {
                Ok(v) => {
                    assert!(v.is_finite(), "{text:?} read as {v} ({kind:?})");
                    assert!(!(v == 0.0 && v.is_sign_negative()), "{text:?} read as -0");
                    assert!(
                        text.chars().count() <= MAX_INPUT_CHARS,
                        "an over-long text was read"
                    );
                    if kind == QuantityKind::Count {
                        assert!(v >= 0.0 && v == v.floor(), "count {text:?} read as {v}");
                    }
                    round_trip(v, kind, 12);
                    round_trip(v, kind, digits);
                }
                Err(e) => {
                    assert_eq!(e.expected, kind);
                    if text.chars().count() > MAX_INPUT_CHARS {
                        assert_eq!(e.problem, ParseProblem::TooLong, "{text:?}");
                    }
                    assert!(!e.to_string().is_empty());
                }
            }
            round_trip(value, kind, digits);
        }
    }
}
