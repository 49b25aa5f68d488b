//! Reading a calculator's input object from JavaScript.
//!
//! The object is first copied into core's plain [`Value`] tree (one pass over the JS heap, with
//! a depth limit), then handed to the input type's `read` function through core's
//! `fields::ObjectSource` (shared with the fuzz targets, so they fuzz this very reader). Errors
//! carry the path to the value (`vinMin`,
//! `foster[2].tau`) and say what kind of value was found, never the value itself. A key the
//! input does not ask for (a misspelling) is refused, naming the keys it does ask for.
//!
//! Why not serde: serde-wasm-bindgen's deserializer words its errors through serde's
//! `Unexpected`, which prints floats and escapes strings (about 17 KB of float-printing and
//! Unicode tables), and the derived visitors cost 7–8 KB per input type (see
//! `railnote_core::fields`), against the module's size budget (DEVELOPERS.md).

use js_sys::{Array, Object};
use railnote_core::fields::{read_value, FieldSource, ReadError, Value};
use wasm_bindgen::{JsCast, JsValue};

/// Nesting deeper than this is refused, so a hostile document cannot exhaust the stack.
const MAX_DEPTH: usize = 32;

/// A JS value copied out of the JS heap into core's plain [`Value`] tree.
pub fn value_from_js(value: &JsValue) -> Value {
    copy(value, 0)
}

fn copy(value: &JsValue, depth: usize) -> Value {
    if depth > MAX_DEPTH {
        return Value::TooDeep;
    }
    if value.is_null() || value.is_undefined() {
        Value::Null
    } else if let Some(b) = value.as_bool() {
        Value::Bool(b)
    } else if let Some(n) = value.as_f64() {
        Value::Number(n)
    } else if let Some(s) = value.as_string() {
        Value::Text(s)
    } else if Array::is_array(value) {
        let list: &Array = value.unchecked_ref();
        Value::List(list.iter().map(|v| copy(&v, depth + 1)).collect())
    } else if let Some(object) = value.dyn_ref::<Object>() {
        if value.is_function() {
            return Value::Unsupported;
        }
        let entries = Object::entries(object)
            .iter()
            .map(|pair| {
                let pair: Array = pair.unchecked_into();
                let key = pair.get(0).as_string().unwrap_or_default();
                (key, copy(&pair.get(1), depth + 1))
            })
            .collect();
        Value::Object(entries)
    } else {
        Value::Unsupported
    }
}

/// Read a calculator's input from a JS value with the input type's `read` function.
pub fn read<T>(
    value: &JsValue,
    reader: fn(&mut dyn FieldSource) -> Result<T, ReadError>,
) -> Result<T, ReadError> {
    read_value(&value_from_js(value), reader)
}
