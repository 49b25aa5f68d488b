//! railnote-wasm: the JavaScript face of railnote-core, and nothing else.
//!
//! Each calculator crosses the boundary once: one exported function takes a plain object and
//! returns a plain object (inputs read by [`input`] through core's field readers, outputs
//! written from core's plain-data form, `railnote_core::output`, so that absent values arrive
//! as `null` and objects as plain objects). Every failure is a thrown JS
//! `Error` built by [`field_error`]: its `message` is a sentence for the user and its `field`
//! property names the input key it concerns, so a page can show the message at that field.
//!
//! No function here panics on any input: inputs are deserialised (a type mismatch becomes an
//! error naming the field), then validated by core, then computed by core's infallible code.
//! The optional `panic-hook` feature only helps debugging.
#![forbid(unsafe_code)]

mod input;

/// The allocator for the module: talc instead of the standard library's dlmalloc, for size
/// (railnote's module has a gzip size budget; dlmalloc's malloc/free/realloc were about 7 KB
/// of it). The module is single-threaded (no `atomics` target feature), which this allocator
/// form requires; its constructor is safe.
#[cfg(all(not(target_feature = "atomics"), target_family = "wasm"))]
#[global_allocator]
static ALLOCATOR: talc::wasm::WasmDynamicTalc = talc::wasm::new_wasm_dynamic_allocator();

use railnote_core::compare::CompareInput;
use railnote_core::divider::DividerInput;
use railnote_core::fields::{FieldSource, ReadError};
use railnote_core::linear::LinearInput;
use railnote_core::output::{Out, ToOut};
use railnote_core::switching::SwitchingInput;
use railnote_core::thermal::ThermalInput;
use railnote_core::tree::TreeInput;
use railnote_core::units::{self, QuantityKind};
use railnote_core::InputError;
use wasm_bindgen::prelude::*;

/// The crate version, for bug reports and cache busting.
#[wasm_bindgen]
pub fn version() -> String {
    env!("CARGO_PKG_VERSION").into()
}

/// Build the one kind of error this API throws: a JS `Error` with a `field` property.
fn field_error(field: &str, message: &str) -> JsValue {
    let error = js_sys::Error::new(message);
    // Setting a property on a fresh Error object cannot fail; ignore the Result rather than
    // unwrap so that no panic path exists.
    let _ = js_sys::Reflect::set(&error, &"field".into(), &field.into());
    error.into()
}

impl From<InputErrorJs> for JsValue {
    fn from(e: InputErrorJs) -> JsValue {
        field_error(e.0.field, &e.0.message)
    }
}

/// Core's error, carried to JS.
struct InputErrorJs(InputError);

/// Read a calculator's input object with its `read` function; a failure becomes a field error.
fn read_input<T>(
    value: JsValue,
    reader: fn(&mut dyn FieldSource) -> Result<T, ReadError>,
) -> Result<T, JsValue> {
    input::read(&value, reader).map_err(|e| {
        let field: String = e.field.chars().take(60).collect();
        field_error(&field, &format!("{field}: {}", e.message))
    })
}

/// A report as a plain JavaScript value: objects, arrays, numbers, strings, booleans and `null`
/// for absent values (never a `Map`), written from core's plain-data form in one pass.
fn write_output<T: ToOut>(value: &T) -> Result<JsValue, JsValue> {
    Ok(to_js(&value.to_out()))
}

fn to_js(out: &Out) -> JsValue {
    match out {
        Out::Null => JsValue::NULL,
        Out::Bool(b) => JsValue::from_bool(*b),
        Out::Number(n) => JsValue::from_f64(*n),
        Out::Word(w) => JsValue::from_str(w),
        Out::Text(t) => JsValue::from_str(t),
        Out::List(items) => {
            let list = js_sys::Array::new();
            for item in items {
                list.push(&to_js(item));
            }
            list.into()
        }
        Out::Object(fields) => {
            let object = js_sys::Object::new();
            for (key, value) in fields {
                // Setting a property on a fresh plain object cannot fail; ignore the Result
                // rather than unwrap so that no panic path exists.
                let value = to_js(value);
                let _ = js_sys::Reflect::set(&object, &key_string(key), &value);
            }
            object.into()
        }
    }
}

/// The JS strings of report keys, made once each: keys are `&'static str`s of core's reports, so
/// their address identifies them, and a sorted list of (address, string) finds them again. Making
/// a fresh JS string for every key of every object was most of the cost of writing a report.
struct KeyStrings(Vec<(usize, JsValue)>);

impl KeyStrings {
    fn get(&mut self, key: &'static str) -> JsValue {
        let id = key.as_ptr() as usize;
        match self.0.binary_search_by_key(&id, |(k, _)| *k) {
            Ok(at) => self.0[at].1.clone(),
            Err(at) => {
                let value = JsValue::from_str(key);
                self.0.insert(at, (id, value.clone()));
                value
            }
        }
    }
}

thread_local! {
    static KEYS: core::cell::RefCell<KeyStrings> = const { core::cell::RefCell::new(KeyStrings(Vec::new())) };
}

/// The JS string of a report key, from [`KEYS`] (made afresh in the one case the list is busy,
/// which the code above never causes, rather than risk a panic).
fn key_string(key: &'static str) -> JsValue {
    KEYS.with(|keys| match keys.try_borrow_mut() {
        Ok(mut keys) => keys.get(key),
        Err(_) => JsValue::from_str(key),
    })
}

fn kind_named(kind: &str) -> Result<QuantityKind, JsValue> {
    QuantityKind::from_name(kind).ok_or_else(|| {
        let names: Vec<&str> = QuantityKind::ALL.iter().map(|k| k.name()).collect();
        field_error(
            "kind",
            &format!(
                "Unknown quantity kind \"{}\"; expected one of {}",
                kind.chars().take(40).collect::<String>(),
                names.join(", ")
            ),
        )
    })
}

/// Read `text` as a quantity of `kind` (`"voltage"`, `"current"`, …) in SI base units; throws
/// an Error with `field: "text"` and a message saying what was expected.
#[wasm_bindgen(js_name = parseQuantity)]
pub fn parse_quantity(text: &str, kind: &str) -> Result<f64, JsValue> {
    let kind = kind_named(kind)?;
    units::parse_quantity(text, kind).map_err(|e| field_error("text", &e.to_string()))
}

/// Write `value` of `kind` in engineering notation with `digits` significant figures
/// (clamped to 1..=12); a value that is not finite prints as "—".
#[wasm_bindgen(js_name = formatQuantity)]
pub fn format_quantity(value: f64, kind: &str, digits: u32) -> Result<String, JsValue> {
    let kind = kind_named(kind)?;
    Ok(units::format_quantity(value, kind, digits))
}

/// The names of every quantity kind `parseQuantity` and `formatQuantity` accept.
#[wasm_bindgen(js_name = quantityKinds)]
pub fn quantity_kinds() -> Vec<String> {
    QuantityKind::ALL.iter().map(|k| k.name().into()).collect()
}

/// The linear rail check: a plain input object in, a plain report object out (fields in the
/// site's reference page).
#[wasm_bindgen(js_name = checkLinear)]
pub fn check_linear(input: JsValue) -> Result<JsValue, JsValue> {
    let input = read_input(input, LinearInput::read)?;
    let report = railnote_core::linear::check(&input).map_err(InputErrorJs)?;
    write_output(&report)
}

/// The thermal path: steady chain or θJA, measured-case estimates, heat-sink need, derating,
/// Foster-network transients and pulse trains (fields in the site's reference page).
#[wasm_bindgen(js_name = checkThermal)]
pub fn check_thermal(input: JsValue) -> Result<JsValue, JsValue> {
    let input = read_input(input, ThermalInput::read)?;
    let report = railnote_core::thermal::check_thermal(&input).map_err(InputErrorJs)?;
    write_output(&report)
}

/// The divider picker: feedback search, reverse (two given resistors) and threshold dividers,
/// with worst case, RSS spread and seeded Monte Carlo (fields in the site's reference page).
#[wasm_bindgen(js_name = checkDivider)]
pub fn check_divider(input: JsValue) -> Result<JsValue, JsValue> {
    let input = read_input(input, DividerInput::read)?;
    let report = railnote_core::divider::check_divider(&input).map_err(InputErrorJs)?;
    write_output(&report)
}

/// The switching estimate: buck, boost or inverting buck-boost at each input corner, loss
/// breakdown and efficiency against load (fields in the site's reference page).
#[wasm_bindgen(js_name = checkSwitching)]
pub fn check_switching(input: JsValue) -> Result<JsValue, JsValue> {
    let input = read_input(input, SwitchingInput::read)?;
    let report = railnote_core::switching::check_switching(&input).map_err(InputErrorJs)?;
    write_output(&report)
}

/// Linear or switching: the same rail through the linear check and the switching estimate,
/// side by side (fields in the site's reference page).
#[wasm_bindgen(js_name = compareRails)]
pub fn compare_rails(input: JsValue) -> Result<JsValue, JsValue> {
    let input = read_input(input, CompareInput::read)?;
    let report = railnote_core::compare::compare_rails(&input).map_err(InputErrorJs)?;
    write_output(&report)
}

/// The rail tree: a versioned tree document (version, taMax, sources, rails, loads) in, every
/// rail and load at the source's three voltages, checks, first failure and runtime out.
#[wasm_bindgen(js_name = checkTree)]
pub fn check_tree(input: JsValue) -> Result<JsValue, JsValue> {
    let input = read_input(input, TreeInput::read)?;
    let report = railnote_core::tree::check_tree(&input).map_err(InputErrorJs)?;
    write_output(&report)
}

/// Print panics to the console while debugging (`--features panic-hook`). The API is written
/// never to panic; this only makes a bug in that promise visible.
#[cfg(feature = "panic-hook")]
#[wasm_bindgen(start)]
pub fn start() {
    fn hook(info: &std::panic::PanicHookInfo<'_>) {
        web_log(&info.to_string());
    }
    std::panic::set_hook(Box::new(hook));
}

#[cfg(feature = "panic-hook")]
#[wasm_bindgen]
extern "C" {
    #[wasm_bindgen(js_namespace = console, js_name = error)]
    fn web_log(message: &str);
}
