//! The outcome words every calculator shares: a status, one check with its reason, and the
//! verdict of several checks.

use alloc::string::String;
use alloc::vec::Vec;

/// Pass, marginal (works but misses a wanted margin) or fail. Ordered from best to worst, so the
/// verdict of several checks is their maximum.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
#[cfg_attr(feature = "serde", derive(serde::Serialize, serde::Deserialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub enum Status {
    Pass,
    Marginal,
    Fail,
}

impl Status {
    pub fn word(self) -> &'static str {
        match self {
            Status::Pass => "pass",
            Status::Marginal => "marginal",
            Status::Fail => "fail",
        }
    }
}

/// Grade a margin: fail below zero, marginal below the wanted margin, pass otherwise.
pub fn grade(value: f64, wanted_margin: f64) -> Status {
    if value < 0.0 {
        Status::Fail
    } else if value < wanted_margin {
        Status::Marginal
    } else {
        Status::Pass
    }
}

/// One check, its outcome and the reason in words; `Id` names the calculator's checks.
#[derive(Clone, Debug, PartialEq)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "camelCase"))]
pub struct Check<Id> {
    pub id: Id,
    pub title: String,
    pub status: Status,
    pub text: String,
}

/// The verdict of several checks: the worst of them, pass when there are none.
pub fn overall<Id>(checks: &[Check<Id>]) -> Status {
    checks
        .iter()
        .map(|c| c.status)
        .max()
        .unwrap_or(Status::Pass)
}

/// The titles of the checks with `status`, lower case and comma-separated, for a summary.
pub fn titles_with<Id>(checks: &[Check<Id>], status: Status) -> String {
    let names: Vec<&str> = checks
        .iter()
        .filter(|c| c.status == status)
        .map(|c| c.title.as_str())
        .collect();
    // The titles are ASCII; ASCII lowering keeps Unicode case tables out of the module.
    names.join(", ").to_ascii_lowercase()
}

use crate::output::{out_object, out_words, Out, ToOut};

out_words!(Status { Pass => "pass", Marginal => "marginal", Fail => "fail" });

impl<Id: ToOut> ToOut for Check<Id> {
    fn to_out(&self) -> Out {
        out_object! { "id": self.id, "title": self.title, "status": self.status, "text": self.text }
    }
}
