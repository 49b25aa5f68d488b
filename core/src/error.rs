//! The one error every calculator returns for input it cannot use.

use alloc::string::String;
use core::fmt;

/// An input value a calculator cannot use, naming the field and the reason in words.
///
/// `field` is the input's key in the serialised form (camelCase, e.g. `"vinMin"`), so that a
/// page can put the message next to the right field; `message` is a sentence for the user that
/// names the quantity the way the trade writes it ("V_in,min must be above V_out (3.3 V)").
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct InputError {
    pub field: &'static str,
    pub message: String,
}

impl InputError {
    pub fn new(field: &'static str, message: impl Into<String>) -> InputError {
        InputError {
            field,
            message: message.into(),
        }
    }
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl core::error::Error for InputError {}

/// Checks shared by the calculators' validation steps. Each returns the value when it is usable
/// so that validation reads as a list of named fields.
pub(crate) mod check {
    use super::InputError;
    use crate::units::{format_quantity, QuantityKind};
    use alloc::format;

    /// The largest magnitude any input may have. It keeps every product and quotient the
    /// calculators form finite, far beyond any board-level value.
    pub const LIMIT: f64 = 1.0e6;

    /// The smallest magnitude a non-zero input may have (femto, the smallest prefix the parser
    /// reads). Together with [`LIMIT`] it keeps every quotient finite: a dropout, a power or an
    /// efficiency of 1e-320 (which JSON and JS carry as numbers) made a bound, a needed θSA or a
    /// rail's input current infinite (found by the fuzz targets, see
    /// core/tests/fuzz_regressions.rs).
    pub const SMALLEST: f64 = 1.0e-15;

    /// A limit as a message shows it: up to four significant figures, without trailing zeros
    /// ("0.001 K/W", not "0.001000 K/W"); limits are round numbers.
    #[inline(never)]
    pub fn show(value: f64, kind: QuantityKind) -> alloc::string::String {
        let text = format_quantity(value, kind, 4);
        let Some((number, unit)) = text.split_once(' ') else {
            return text;
        };
        // Only the mantissa loses its trailing zeros: "1.000e-60" is "1e-60", not "1.000e-6".
        let (mantissa, exponent) = match number.find('e') {
            Some(at) => number.split_at(at),
            None => (number, ""),
        };
        if !mantissa.contains('.') {
            return text;
        }
        let mantissa = mantissa.trim_end_matches('0').trim_end_matches('.');
        format!("{mantissa}{exponent} {unit}")
    }

    /// A value as a message shows it: three significant figures with its unit ("3.30 V").
    pub fn figure(value: f64, kind: QuantityKind) -> alloc::string::String {
        format_quantity(value, kind, 3)
    }

    /// An optional input that must be there.
    pub fn needed(field: &'static str, label: &str, value: Option<f64>) -> Result<f64, InputError> {
        value.ok_or_else(|| InputError::new(field, format!("{label} is needed")))
    }

    /// A finite number no larger in magnitude than [`LIMIT`].
    #[inline(never)]
    pub fn finite(
        field: &'static str,
        label: &str,
        value: f64,
        kind: QuantityKind,
    ) -> Result<f64, InputError> {
        if !value.is_finite() {
            return Err(InputError::new(
                field,
                format!("{label} must be a finite number"),
            ));
        }
        if value.abs() > LIMIT {
            return Err(InputError::new(
                field,
                format!("{label} must be at most {}", show(LIMIT, kind)),
            ));
        }
        if value != 0.0 && value.abs() < SMALLEST {
            return Err(InputError::new(
                field,
                format!(
                    "{label} must be 0 or at least {} in size",
                    show(SMALLEST, kind)
                ),
            ));
        }
        Ok(value)
    }

    /// Strictly above `low`.
    #[inline(never)]
    pub fn above(
        field: &'static str,
        label: &str,
        value: f64,
        low: f64,
        kind: QuantityKind,
    ) -> Result<f64, InputError> {
        let value = finite(field, label, value, kind)?;
        if value > low {
            Ok(value)
        } else {
            Err(InputError::new(
                field,
                format!("{label} must be above {}", show(low, kind)),
            ))
        }
    }

    /// At least `low`.
    #[inline(never)]
    pub fn at_least(
        field: &'static str,
        label: &str,
        value: f64,
        low: f64,
        kind: QuantityKind,
    ) -> Result<f64, InputError> {
        let value = finite(field, label, value, kind)?;
        if value >= low {
            Ok(value)
        } else {
            Err(InputError::new(
                field,
                format!("{label} must not be below {}", show(low, kind)),
            ))
        }
    }

    /// Within `low..=high`.
    #[inline(never)]
    pub fn within(
        field: &'static str,
        label: &str,
        value: f64,
        low: f64,
        high: f64,
        kind: QuantityKind,
    ) -> Result<f64, InputError> {
        let value = finite(field, label, value, kind)?;
        if (low..=high).contains(&value) {
            Ok(value)
        } else {
            Err(InputError::new(
                field,
                format!(
                    "{label} must be between {} and {}",
                    show(low, kind),
                    show(high, kind)
                ),
            ))
        }
    }
}

#[cfg(test)]
mod tests {
    use super::check::show;
    use crate::units::QuantityKind::{Temperature, Voltage};

    #[test]
    fn show_trims_the_mantissa_only() {
        // Regression (found by the browser's hostile corpus, T_j,max typed as 1e-60 °C): the
        // zeros of the exponent were trimmed too, so 1e-60 showed as "1.000e-6".
        assert_eq!(show(1e-60, Temperature), "1e-60 °C");
        assert_eq!(show(1e-308, Temperature), "1e-308 °C");
        assert_eq!(show(2.5e-20, Temperature), "2.5e-20 °C");
        assert_eq!(show(1e32, Voltage), "1e20 TV");
        // Plain numbers as before.
        assert_eq!(show(0.001, Temperature), "0.001 °C");
        assert_eq!(show(1e6, Voltage), "1 MV");
        assert_eq!(show(125.0, Temperature), "125 °C");
        assert_eq!(show(1.5e3, Voltage), "1.5 kV");
    }
}
