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
    self, DeserializeOwned, DeserializeSeed, Deserializer, Expected, IntoDeserializer, MapAccess,
    SeqAccess, Unexpected, Visitor,
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

/// Why an input object could not be read, and where. Its message never prints the offending
/// value, only what kind of value it was.
#[derive(Debug)]
pub struct InputReadError {
    message: String,
    /// Keys and list positions from the top, filled in as the error travels out.
    path: Vec<PathStep>,
}

#[derive(Debug)]
enum PathStep {
    Key(String),
    Index(usize),
}

impl InputReadError {
    fn new(message: String) -> Self {
        InputReadError {
            message,
            path: Vec::new(),
        }
    }

    fn inside(mut self, step: PathStep) -> Self {
        self.path.push(step);
        self
    }

    /// `rails[2].name`, or `""` for the top level.
    fn path(&self) -> String {
        let mut out = String::new();
        for step in self.path.iter().rev() {
            match step {
                PathStep::Key(k) if out.is_empty() => out.push_str(k),
                PathStep::Key(k) => {
                    out.push('.');
                    out.push_str(k);
                }
                PathStep::Index(i) => {
                    out.push('[');
                    out.push_str(&i.to_string());
                    out.push(']');
                }
            }
        }
        out
    }
}

impl fmt::Display for InputReadError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
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
        InputReadError::new(message.to_string())
    }

    fn invalid_type(unexpected: Unexpected<'_>, expected: &dyn Expected) -> Self {
        InputReadError::new(format!(
            "expected {expected}, found {}",
            kind_of(&unexpected)
        ))
    }

    fn invalid_value(unexpected: Unexpected<'_>, expected: &dyn Expected) -> Self {
        InputReadError::new(format!(
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
            Value::List(items) => visitor.visit_seq(ListAccess {
                items: items.into_iter().enumerate(),
            }),
            Value::Object(entries) => visitor.visit_map(ObjectAccess {
                entries: entries.into_iter(),
                pending: None,
            }),
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

    /// Structs are read from objects only. Without this the derived visitor's sequence form
    /// (`visit_seq`, a struct written as a list) would be compiled in for every input type,
    /// several KB each, for a spelling no caller uses.
    fn deserialize_struct<V: Visitor<'de>>(
        self,
        _name: &'static str,
        _fields: &'static [&'static str],
        visitor: V,
    ) -> Result<V::Value, InputReadError> {
        match self {
            Value::Object(entries) => visitor.visit_map(ObjectAccess {
                entries: entries.into_iter(),
                pending: None,
            }),
            other => Err(de::Error::invalid_type(other.unexpected(), &visitor)),
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
        unit unit_struct newtype_struct seq tuple tuple_struct map identifier ignored_any
    }
}

/// Hands a list's items to a visitor, marking an error with the item's position.
struct ListAccess {
    items: core::iter::Enumerate<std::vec::IntoIter<Value>>,
}

impl<'de> SeqAccess<'de> for ListAccess {
    type Error = InputReadError;

    fn next_element_seed<T: DeserializeSeed<'de>>(
        &mut self,
        seed: T,
    ) -> Result<Option<T::Value>, InputReadError> {
        match self.items.next() {
            Some((i, value)) => seed
                .deserialize(value)
                .map(Some)
                .map_err(|e| e.inside(PathStep::Index(i))),
            None => Ok(None),
        }
    }
}

/// Hands an object's entries to a visitor, marking an error with the entry's key.
struct ObjectAccess {
    entries: std::vec::IntoIter<(String, Value)>,
    pending: Option<(String, Value)>,
}

impl<'de> MapAccess<'de> for ObjectAccess {
    type Error = InputReadError;

    fn next_key_seed<K: DeserializeSeed<'de>>(
        &mut self,
        seed: K,
    ) -> Result<Option<K::Value>, InputReadError> {
        let Some((key, value)) = self.entries.next() else {
            return Ok(None);
        };
        let out = seed.deserialize(Value::Text(key.clone()))?;
        self.pending = Some((key, value));
        Ok(Some(out))
    }

    fn next_value_seed<V: DeserializeSeed<'de>>(
        &mut self,
        seed: V,
    ) -> Result<V::Value, InputReadError> {
        let (key, value) = self
            .pending
            .take()
            .ok_or_else(|| <InputReadError as de::Error>::custom("a value without its key"))?;
        seed.deserialize(value)
            .map_err(|e| e.inside(PathStep::Key(key)))
    }
}

/// Deserialise `T` from a JS value. On failure, the key the failure concerns (the path to the
/// value, or the key serde names for a missing or unknown field) and a sentence.
pub fn read<T: DeserializeOwned>(value: &JsValue) -> Result<T, (String, String)> {
    T::deserialize(Value::from_js(value)).map_err(|e| {
        let path = e.path();
        let inner = e.message;
        // A missing or unknown key fails at the object itself; serde names it in backticks.
        let field = if path.is_empty() {
            inner.split('`').nth(1).unwrap_or("input").to_string()
        } else {
            path
        };
        (field, inner)
    })
}
