//! Reading a calculator's input from named fields.
//!
//! Each input type has a `read` function that asks a [`FieldSource`] for its fields by their
//! serialised (camelCase) names. The wasm crate implements the source over a JavaScript object;
//! a JSON document reader can implement it the same way.
//!
//! This is written by hand instead of deriving serde's `Deserialize` because the derived
//! visitors cost 7–8 KB of WebAssembly per input type before compression (one inlined copy of
//! the whole reading and error path per field), against railnote's size budget for every
//! calculator together; a read function is a short list of calls into one shared source.

use alloc::format;
use alloc::string::String;
use alloc::vec::Vec;

/// A value that could not be read: the path to it (`"vinMin"`, `"foster[2].tau"`) and why.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct ReadError {
    pub field: String,
    pub message: String,
}

impl core::fmt::Display for ReadError {
    fn fmt(&self, f: &mut core::fmt::Formatter<'_>) -> core::fmt::Result {
        write!(f, "{}: {}", self.field, self.message)
    }
}

impl core::error::Error for ReadError {}

/// Named input values. `None` means the key is absent (or null).
pub trait FieldSource {
    /// The number under `key`; an error when the value is not a number.
    fn number(&mut self, key: &'static str) -> Result<Option<f64>, ReadError>;
    /// The text under `key`; an error when the value is not text.
    fn text(&mut self, key: &'static str) -> Result<Option<String>, ReadError>;
    /// Read each object of the list under `key` with `item`; an absent key is an empty list.
    fn each_object(
        &mut self,
        key: &'static str,
        item: &mut dyn FnMut(&mut dyn FieldSource) -> Result<(), ReadError>,
    ) -> Result<(), ReadError>;
    /// An error about the value under `key`, with the source's path to it.
    fn error(&self, key: &str, message: String) -> ReadError;
}

/// A number that must be there.
pub fn required(source: &mut dyn FieldSource, key: &'static str) -> Result<f64, ReadError> {
    match source.number(key)? {
        Some(v) => Ok(v),
        None => Err(source.error(key, String::from("a number is needed here"))),
    }
}

/// The numbers under `keys`, in order, each `None` when absent. One loop for a whole input
/// instead of one inlined call per field: a calculator with 30 fields reads in a few hundred
/// bytes of WebAssembly rather than several kilobytes.
pub fn numbers<const N: usize>(
    source: &mut dyn FieldSource,
    keys: &[&'static str; N],
) -> Result<[Option<f64>; N], ReadError> {
    let mut out = [None; N];
    for (slot, key) in out.iter_mut().zip(keys) {
        *slot = source.number(key)?;
    }
    Ok(out)
}

/// The numbers under `keys`, in order, every one of them required.
pub fn required_numbers<const N: usize>(
    source: &mut dyn FieldSource,
    keys: &[&'static str; N],
) -> Result<[f64; N], ReadError> {
    let mut out = [0.0; N];
    for (slot, key) in out.iter_mut().zip(keys) {
        *slot = required(source, key)?;
    }
    Ok(out)
}

/// A whole count (0 ..= u32::MAX), if given.
pub fn count(source: &mut dyn FieldSource, key: &'static str) -> Result<Option<u32>, ReadError> {
    match source.number(key)? {
        None => Ok(None),
        Some(v) if v >= 0.0 && v <= f64::from(u32::MAX) && v == libm::floor(v) => {
            Ok(Some(v as u32))
        }
        Some(_) => Err(source.error(key, String::from("expected a whole number"))),
    }
}

/// One of a fixed set of words, each standing for a value.
pub fn choice<T: Copy>(
    source: &mut dyn FieldSource,
    key: &'static str,
    options: &[(&str, T)],
) -> Result<T, ReadError> {
    optional_choice(source, key, options)?
        .ok_or_else(|| source.error(key, expected_one_of(options)))
}

/// One of a fixed set of words, if given.
pub fn optional_choice<T: Copy>(
    source: &mut dyn FieldSource,
    key: &'static str,
    options: &[(&str, T)],
) -> Result<Option<T>, ReadError> {
    let Some(word) = source.text(key)? else {
        return Ok(None);
    };
    options
        .iter()
        .find(|(name, _)| *name == word)
        .map(|(_, value)| Some(*value))
        .ok_or_else(|| source.error(key, expected_one_of(options)))
}

fn expected_one_of<T>(options: &[(&str, T)]) -> String {
    let mut out = String::from("expected one of");
    for (i, (name, _)) in options.iter().enumerate() {
        out.push_str(if i == 0 { " " } else { ", " });
        out.push_str(&format!("\"{name}\""));
    }
    out
}

/// A plain input value: what a calculator's input object holds once copied out of whatever
/// carried it (the wasm crate copies a JS object into it; the fuzz targets build it from JSON).
/// Read through [`ObjectSource`] with [`read_value`], by one set of rules for every caller: null
/// is absent, a wrong type names what it found, a key nobody asked for is refused.
#[derive(Clone, Debug, PartialEq)]
pub enum Value {
    Null,
    Bool(bool),
    Number(f64),
    Text(String),
    List(Vec<Value>),
    Object(Vec<(String, Value)>),
    /// A function, symbol, bigint or anything else no input has.
    Unsupported,
    /// Nested deeper than the copier allows.
    TooDeep,
}

fn kind_of(value: &Value) -> &'static str {
    match value {
        Value::Null => "nothing (null)",
        Value::Bool(_) => "true or false",
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
#[derive(Debug)]
pub struct ObjectSource<'a> {
    entries: &'a [(String, Value)],
    used: Vec<bool>,
    asked: Vec<&'static str>,
    /// "" at the top, "foster[2]" inside a list item.
    path: String,
}

impl<'a> ObjectSource<'a> {
    pub fn new(value: &'a Value, path: String) -> Result<Self, ReadError> {
        match value {
            Value::Object(entries) => Ok(ObjectSource {
                entries,
                used: alloc::vec![false; entries.len()],
                asked: Vec::new(),
                path,
            }),
            other => Err(ReadError {
                field: if path.is_empty() {
                    String::from("input")
                } else {
                    path.clone()
                },
                message: format!("expected an object, found {}", kind_of(other)),
            }),
        }
    }

    fn full(&self, key: &str) -> String {
        if self.path.is_empty() {
            String::from(key)
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
    pub fn finish(self) -> Result<(), ReadError> {
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

/// Read an input from a [`Value`] with its type's `read`, refusing keys it did not ask for.
pub fn read_value<T>(
    value: &Value,
    reader: fn(&mut dyn FieldSource) -> Result<T, ReadError>,
) -> Result<T, ReadError> {
    let mut source = ObjectSource::new(value, String::new())?;
    let input = reader(&mut source)?;
    source.finish()?;
    Ok(input)
}
