//! Reading a calculator's input object from JavaScript.
//!
//! serde-wasm-bindgen's deserializer would do this, but its error type formats every unexpected
//! value through serde's `Unexpected` display, which prints floats and escapes strings: that
//! pulls core's float-printing and Unicode-printability tables into the module, about 20 KB
//! before compression, a third of railnote's size budget, only to word error messages. So the
//! input is first copied into a small [`Value`] tree and deserialised from there with serde's
//! own `value` deserializers and an error type ([`InputReadError`]) that words unexpected
//! values without printing them. Because every key of the object is visited, the input types'
//! `deny_unknown_fields` refuses a misspelt key, which serde-wasm-bindgen (it looks up declared
//! keys only) would silently ignore. Outputs still go through serde-wasm-bindgen's serializer.

use core::fmt;
use js_sys::{Array, Object};
use serde::de::{
    self, value::MapDeserializer, value::SeqDeserializer, DeserializeOwned, Deserializer, Expected,
    IntoDeserializer, Unexpected, Visitor,
};
use wasm_bindgen::{JsCast, JsValue};

/// Nesting deeper than this is refused, so a hostile document cannot exhaust the stack.
const MAX_DEPTH: usize = 32;

/// A plain JavaScript value, copied out of the JS heap.
#[derive(Debug)]
pub enum Value {
    Null,
    Bool(bool),
    Number(f64),
    Text(String),
    List(Vec<Value>),
    Object(Vec<(String, Value)>),
    /// A function, symbol, bigint or anything else no input has.
    Unsupported,
    /// Nested deeper than [`MAX_DEPTH`].
    TooDeep,
}

impl Value {
    pub fn from_js(value: &JsValue) -> Value {
        Value::read(value, 0)
    }

    fn read(value: &JsValue, depth: usize) -> Value {
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
            Value::List(list.iter().map(|v| Value::read(&v, depth + 1)).collect())
        } else if let Some(object) = value.dyn_ref::<Object>() {
            if value.is_function() {
                return Value::Unsupported;
            }
            let entries = Object::entries(object)
                .iter()
                .map(|pair| {
                    let pair: Array = pair.unchecked_into();
                    let key = pair.get(0).as_string().unwrap_or_default();
                    (key, Value::read(&pair.get(1), depth + 1))
                })
                .collect();
            Value::Object(entries)
        } else {
            Value::Unsupported
        }
    }

    fn unexpected(&self) -> Unexpected<'_> {
        match self {
            Value::Null => Unexpected::Unit,
            Value::Bool(b) => Unexpected::Bool(*b),
            Value::Number(n) => Unexpected::Float(*n),
            Value::Text(s) => Unexpected::Str(s),
            Value::List(_) => Unexpected::Seq,
            Value::Object(_) => Unexpected::Map,
            Value::Unsupported | Value::TooDeep => Unexpected::Other("an unsupported value"),
        }
    }
}

/// Why an input object could not be read. Its message never prints the offending value, only
/// what kind of value it was.
#[derive(Debug)]
pub struct InputReadError(String);

impl fmt::Display for InputReadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl std::error::Error for InputReadError {}

fn kind_of(unexpected: &Unexpected<'_>) -> &'static str {
    match unexpected {
        Unexpected::Bool(_) => "true or false",
        Unexpected::Unsigned(_) | Unexpected::Signed(_) | Unexpected::Float(_) => "a number",
        Unexpected::Char(_) | Unexpected::Str(_) => "text",
        Unexpected::Unit | Unexpected::Option => "nothing (null)",
        Unexpected::Seq => "a list",
        Unexpected::Map => "an object",
        _ => "another kind of value",
    }
}

impl de::Error for InputReadError {
    fn custom<T: fmt::Display>(message: T) -> Self {
        InputReadError(message.to_string())
    }

    fn invalid_type(unexpected: Unexpected<'_>, expected: &dyn Expected) -> Self {
        InputReadError(format!(
            "expected {expected}, found {}",
            kind_of(&unexpected)
        ))
    }

    fn invalid_value(unexpected: Unexpected<'_>, expected: &dyn Expected) -> Self {
        InputReadError(format!(
            "expected {expected}, found {}",
            kind_of(&unexpected)
        ))
    }
}

impl<'de> IntoDeserializer<'de, InputReadError> for Value {
    type Deserializer = Value;
    fn into_deserializer(self) -> Value {
        self
    }
}

impl<'de> Deserializer<'de> for Value {
    type Error = InputReadError;

    fn deserialize_any<V: Visitor<'de>>(self, visitor: V) -> Result<V::Value, InputReadError> {
        match self {
            Value::Null => visitor.visit_unit(),
            Value::Bool(b) => visitor.visit_bool(b),
            // Whole numbers go as integers so that count fields (u32) accept them; f64 fields
            // accept integers too.
            Value::Number(n) if n.fract() == 0.0 && n.abs() < 9.0e15 => visitor.visit_i64(n as i64),
            Value::Number(n) => visitor.visit_f64(n),
            Value::Text(s) => visitor.visit_string(s),
            Value::List(items) => {
                let mut seq = SeqDeserializer::new(items.into_iter());
                let out = visitor.visit_seq(&mut seq)?;
                seq.end()?;
                Ok(out)
            }
            Value::Object(entries) => {
                let mut map = MapDeserializer::new(entries.into_iter());
                let out = visitor.visit_map(&mut map)?;
                map.end()?;
                Ok(out)
            }
            Value::Unsupported => Err(de::Error::custom(
                "found a function, symbol or other value that no input takes",
            )),
            Value::TooDeep => Err(de::Error::custom(format!(
                "nested more than {MAX_DEPTH} levels deep"
            ))),
        }
    }

    fn deserialize_option<V: Visitor<'de>>(self, visitor: V) -> Result<V::Value, InputReadError> {
        match self {
            Value::Null => visitor.visit_none(),
            other => visitor.visit_some(other),
        }
    }

    fn deserialize_enum<V: Visitor<'de>>(
        self,
        _name: &'static str,
        _variants: &'static [&'static str],
        visitor: V,
    ) -> Result<V::Value, InputReadError> {
        match self {
            Value::Text(s) => visitor.visit_enum(s.into_deserializer()),
            other => Err(de::Error::invalid_type(
                other.unexpected(),
                &"a choice given as text",
            )),
        }
    }

    serde::forward_to_deserialize_any! {
        bool i8 i16 i32 i64 i128 u8 u16 u32 u64 u128 f32 f64 char str string bytes byte_buf
        unit unit_struct newtype_struct seq tuple tuple_struct map struct identifier ignored_any
    }
}

/// Deserialise `T` from a JS value. On failure, the key the failure concerns (from
/// serde_path_to_error's path, or the key serde names for a missing or unknown field) and a
/// sentence.
pub fn read<T: DeserializeOwned>(value: &JsValue) -> Result<T, (String, String)> {
    serde_path_to_error::deserialize(Value::from_js(value)).map_err(|e| {
        let path = e.path().to_string();
        let inner = e.into_inner().to_string();
        // A missing or unknown key fails at the object itself; serde names it in backticks.
        let field = if path.is_empty() || path == "." {
            inner.split('`').nth(1).unwrap_or("input").to_string()
        } else {
            path
        };
        (field, inner)
    })
}
