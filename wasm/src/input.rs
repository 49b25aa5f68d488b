//! Reading a calculator's input object from JavaScript.
//!
//! The object is first copied into a small [`Value`] tree (one pass over the JS heap, with a
//! depth limit), then handed to the input type's `read` function through [`ObjectSource`],
//! core's `FieldSource` over that tree. Errors carry the path to the value (`vinMin`,
//! `foster[2].tau`) and say what kind of value was found, never the value itself. A key the
//! input does not ask for (a misspelling) is refused, naming the keys it does ask for.
//!
//! Why not serde: serde-wasm-bindgen's deserializer words its errors through serde's
//! `Unexpected`, which prints floats and escapes strings (about 17 KB of float-printing and
//! Unicode tables), and the derived visitors cost 7–8 KB per input type (see
//! `railnote_core::fields`), against the module's size budget (DEVELOPERS.md).

use js_sys::{Array, Object};
use railnote_core::fields::{FieldSource, ReadError};
use wasm_bindgen::{JsCast, JsValue};

/// Nesting deeper than this is refused, so a hostile document cannot exhaust the stack.
const MAX_DEPTH: usize = 32;

/// A plain JavaScript value, copied out of the JS heap.
#[derive(Debug)]
pub enum Value {
    Null,
    Bool,
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
        } else if value.as_bool().is_some() {
            Value::Bool
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
}

fn kind_of(value: &Value) -> &'static str {
    match value {
        Value::Null => "nothing (null)",
        Value::Bool => "true or false",
        Value::Number(_) => "a number",
        Value::Text(_) => "text",
        Value::List(_) => "a list",
        Value::Object(_) => "an object",
        Value::Unsupported => "a function, symbol or other value that no input takes",
        Value::TooDeep => "values nested too deep",
    }
}

/// Core's `FieldSource` over one object of the [`Value`] tree, remembering which keys were
/// asked for and which entries were used.
pub struct ObjectSource<'a> {
    entries: &'a [(String, Value)],
    used: Vec<bool>,
    asked: Vec<&'static str>,
    /// "" at the top, "foster[2]" inside a list item.
    path: String,
}

impl<'a> ObjectSource<'a> {
    fn new(value: &'a Value, path: String) -> Result<Self, ReadError> {
        match value {
            Value::Object(entries) => Ok(ObjectSource {
                entries,
                used: vec![false; entries.len()],
                asked: Vec::new(),
                path,
            }),
            other => Err(ReadError {
                field: if path.is_empty() {
                    "input".into()
                } else {
                    path.clone()
                },
                message: format!("expected an object, found {}", kind_of(other)),
            }),
        }
    }

    fn full(&self, key: &str) -> String {
        if self.path.is_empty() {
            key.to_string()
        } else {
            format!("{}.{key}", self.path)
        }
    }

    fn find(&mut self, key: &'static str) -> Option<&'a Value> {
        self.asked.push(key);
        let at = self.entries.iter().position(|(k, _)| k == key)?;
        self.used[at] = true;
        match &self.entries[at].1 {
            Value::Null => None,
            value => Some(value),
        }
    }

    /// After reading: refuse the first entry nobody asked for.
    fn finish(self) -> Result<(), ReadError> {
        match self.used.iter().position(|used| !used) {
            None => Ok(()),
            Some(at) => {
                let key: String = self.entries[at].0.chars().take(40).collect();
                // A key without a name (`""`, spaces) is named by where it sits, so that the
                // error still has a field (found by the tree_doc fuzz target).
                let field = match (key.trim().is_empty(), self.path.is_empty()) {
                    (false, _) => self.full(&key),
                    (true, true) => String::from("input"),
                    (true, false) => self.path.clone(),
                };
                Err(ReadError {
                    field,
                    message: format!(
                        "unknown input key `{key}`; expected one of {}",
                        self.asked.join(", ")
                    ),
                })
            }
        }
    }
}

impl FieldSource for ObjectSource<'_> {
    fn number(&mut self, key: &'static str) -> Result<Option<f64>, ReadError> {
        match self.find(key) {
            None => Ok(None),
            Some(Value::Number(n)) => Ok(Some(*n)),
            Some(other) => {
                Err(self.error(key, format!("expected a number, found {}", kind_of(other))))
            }
        }
    }

    fn text(&mut self, key: &'static str) -> Result<Option<String>, ReadError> {
        match self.find(key) {
            None => Ok(None),
            Some(Value::Text(s)) => Ok(Some(s.clone())),
            Some(other) => Err(self.error(key, format!("expected text, found {}", kind_of(other)))),
        }
    }

    fn each_object(
        &mut self,
        key: &'static str,
        item: &mut dyn FnMut(&mut dyn FieldSource) -> Result<(), ReadError>,
    ) -> Result<(), ReadError> {
        match self.find(key) {
            None => Ok(()),
            Some(Value::List(items)) => {
                for (i, value) in items.iter().enumerate() {
                    let mut source = ObjectSource::new(value, format!("{}[{i}]", self.full(key)))?;
                    item(&mut source)?;
                    source.finish()?;
                }
                Ok(())
            }
            Some(other) => {
                Err(self.error(key, format!("expected a list, found {}", kind_of(other))))
            }
        }
    }

    fn error(&self, key: &str, message: String) -> ReadError {
        ReadError {
            field: self.full(key),
            message,
        }
    }
}

/// Read a calculator's input from a JS value with the input type's `read` function.
pub fn read<T>(
    value: &JsValue,
    reader: fn(&mut dyn FieldSource) -> Result<T, ReadError>,
) -> Result<T, ReadError> {
    let tree = Value::from_js(value);
    let mut source = ObjectSource::new(&tree, String::new())?;
    let input = reader(&mut source)?;
    source.finish()?;
    Ok(input)
}
