//! railnote-wasm: the JavaScript face of railnote-core, and nothing else.
//!
//! Each calculator crosses the boundary once: one exported function takes a plain object and
//! returns a plain object (serde-wasm-bindgen, one JSON-compatible serializer for outputs so that
//! absent values arrive as `null` and maps as plain objects). Every failure is a thrown JS
//! `Error` built by [`field_error`]: its `message` is a sentence for the user and its `field`
//! property names the input key it concerns, so a page can show the message at that field.
//!
//! No function here panics on any input: inputs are deserialised (a type mismatch becomes an
//! error naming the field), then validated by core, then computed by core's infallible code.
//! The optional `panic-hook` feature only helps debugging.
#![forbid(unsafe_code)]

use railnote_core::linear::LinearInput;
use railnote_core::units::{self, QuantityKind};
use railnote_core::InputError;
use serde::de::DeserializeOwned;
use serde::Serialize;
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

/// Deserialise a calculator's input object. serde_path_to_error keeps the path to the value
/// that failed, so a wrong type or a missing key is reported at its field; a key the input type
/// does not have (a typo) is refused by [`refuse_unknown_keys`].
fn read_input<T: DeserializeOwned>(value: JsValue) -> Result<T, JsValue> {
    refuse_unknown_keys(&value, field_names::<T>())?;
    let deserializer = serde_wasm_bindgen::Deserializer::from(value);
    serde_path_to_error::deserialize(deserializer).map_err(|e| {
        let path = e.path().to_string();
        let inner = e.into_inner().to_string();
        // A missing key fails at the object itself; serde names it in backticks.
        let field = if path.is_empty() || path == "." {
            inner.split('`').nth(1).unwrap_or("input").to_string()
        } else {
            path
        };
        field_error(&field, &format!("{field}: {inner}"))
    })
}

/// serde-wasm-bindgen reads a struct by looking up its declared keys, so an unknown key would
/// pass silently and a misspelt optional input would simply be ignored. Refuse it instead.
fn refuse_unknown_keys(value: &JsValue, known: &[&str]) -> Result<(), JsValue> {
    let Some(object) = value.dyn_ref::<js_sys::Object>() else {
        return Ok(()); // Not an object: deserialisation reports that.
    };
    if known.is_empty() {
        return Ok(());
    }
    for key in js_sys::Object::keys(object).iter() {
        let key = key.as_string().unwrap_or_default();
        if !known.contains(&key.as_str()) {
            let shown: String = key.chars().take(40).collect();
            return Err(field_error(
                &shown,
                &format!(
                    "unknown input key `{shown}`; expected one of {}",
                    known.join(", ")
                ),
            ));
        }
    }
    Ok(())
}

/// The keys a struct's derived Deserialize asks for. serde passes them to
/// `deserialize_struct`; this deserializer only records them and stops.
fn field_names<T: DeserializeOwned>() -> &'static [&'static str] {
    use serde::de::{value::Error, Deserializer, Error as _, Visitor};
    struct Fields<'a>(&'a mut &'static [&'static str]);
    impl<'de> Deserializer<'de> for Fields<'_> {
        type Error = Error;
        fn deserialize_any<V: Visitor<'de>>(self, _: V) -> Result<V::Value, Error> {
            Err(Error::custom("only struct field names are read"))
        }
        fn deserialize_struct<V: Visitor<'de>>(
            self,
            _: &'static str,
            fields: &'static [&'static str],
            _: V,
        ) -> Result<V::Value, Error> {
            *self.0 = fields;
            Err(Error::custom("field names read"))
        }
        serde::forward_to_deserialize_any! {
            bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string bytes byte_buf
            option unit unit_struct newtype_struct seq tuple tuple_struct map enum identifier
            ignored_any
        }
    }
    let mut fields: &'static [&'static str] = &[];
    let _ = T::deserialize(Fields(&mut fields));
    fields
}

fn write_output<T: Serialize>(value: &T) -> Result<JsValue, JsValue> {
    let serializer = serde_wasm_bindgen::Serializer::json_compatible();
    value
        .serialize(&serializer)
        .map_err(|e| field_error("output", &format!("The result could not be written: {e}")))
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
    let input: LinearInput = read_input(input)?;
    let report = railnote_core::linear::check(&input).map_err(InputErrorJs)?;
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
