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
