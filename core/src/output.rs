//! Writing a report as plain data: a small tree of numbers, words, lists and objects with the
//! report's camelCase keys, which the wasm crate turns into a JavaScript object in one pass.
//!
//! This is the writing half of what [`crate::fields`] is for reading, and it exists for the same
//! reason: size. serde's derived `Serialize` through serde-wasm-bindgen cost about 23 KB of the
//! module for three calculators (one inlined serializer call per field, each with its error
//! path), against railnote's size budget; a report's [`ToOut`] is a list of (key, value) pairs
//! built by one macro and read by one small converter. The serde derives stay (behind the `serde`
//! feature) for native users, and `core/tests/output.rs` checks that both give the same document
//! for every calculator, so the two cannot drift apart.

use alloc::string::String;
use alloc::vec::Vec;

/// A report as plain data.
#[derive(Clone, Debug, PartialEq)]
pub enum Out {
    Null,
    Bool(bool),
    Number(f64),
    /// A fixed word: an enum's camelCase name.
    Word(&'static str),
    Text(String),
    List(Vec<Out>),
    Object(Vec<(&'static str, Out)>),
}

/// A value that can be written as [`Out`].
pub trait ToOut {
    fn to_out(&self) -> Out;
}

impl ToOut for f64 {
    fn to_out(&self) -> Out {
        Out::Number(*self)
    }
}

impl ToOut for u32 {
    fn to_out(&self) -> Out {
        Out::Number(f64::from(*self))
    }
}

impl ToOut for bool {
    fn to_out(&self) -> Out {
        Out::Bool(*self)
    }
}

impl ToOut for String {
    fn to_out(&self) -> Out {
        Out::Text(self.clone())
    }
}

impl<T: ToOut> ToOut for Option<T> {
    fn to_out(&self) -> Out {
        match self {
            Some(v) => v.to_out(),
            None => Out::Null,
        }
    }
}

impl<T: ToOut> ToOut for [T] {
    fn to_out(&self) -> Out {
        Out::List(self.iter().map(ToOut::to_out).collect())
    }
}

impl<T: ToOut> ToOut for Vec<T> {
    fn to_out(&self) -> Out {
        self.as_slice().to_out()
    }
}

impl<T: ToOut, const N: usize> ToOut for [T; N] {
    fn to_out(&self) -> Out {
        self.as_slice().to_out()
    }
}

/// An object of `key: value` pairs, each value written with [`ToOut`]:
/// `out_object! { "vinMin": self.vin_min, "checks": self.checks }`.
macro_rules! out_object {
    ($($key:literal : $value:expr),* $(,)?) => {
        $crate::output::Out::Object(alloc::vec![
            $(($key, $crate::output::ToOut::to_out(&$value))),*
        ])
    };
}

/// [`ToOut`] for a plain enum written as its camelCase word:
/// `out_words!(Status { Pass => "pass", Fail => "fail" })`.
macro_rules! out_words {
    ($ty:ty { $($variant:ident => $word:literal),* $(,)? }) => {
        impl $crate::output::ToOut for $ty {
            fn to_out(&self) -> $crate::output::Out {
                $crate::output::Out::Word(match self {
                    $(<$ty>::$variant => $word),*
                })
            }
        }
    };
}

pub(crate) use out_object;
pub(crate) use out_words;

/// Whether any number in the tree is NaN or infinite (a report promises finite numbers; the
/// tree's validation refuses one that is not).
pub fn has_non_finite(out: &Out) -> bool {
    match out {
        Out::Number(n) => !n.is_finite(),
        Out::List(items) => items.iter().any(has_non_finite),
        Out::Object(fields) => fields.iter().any(|(_, v)| has_non_finite(v)),
        _ => false,
    }
}
