//! The outcome words every calculator shares.

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
