//! Errors for rejected parameters.
//!
//! Configuration is checked once, when a validated type is built; the error
//! names the offending parameter so that a commissioning engineer can find it
//! in the ride file or the firmware constants without guessing.

use core::fmt;

/// A parameter that was refused, and why.
///
/// The `&'static str` is the parameter's name as written in the API and in the
/// ride file (for example `"length_m"`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
#[non_exhaustive]
pub enum ParamError {
    /// The value is NaN or infinite.
    NonFinite(&'static str),
    /// The value must be strictly greater than zero.
    NotPositive(&'static str),
    /// The value must not be negative.
    Negative(&'static str),
    /// The value is finite but outside the documented range.
    OutOfRange(&'static str),
}

impl ParamError {
    /// The name of the refused parameter.
    #[must_use]
    pub const fn parameter(&self) -> &'static str {
        match *self {
            Self::NonFinite(p) | Self::NotPositive(p) | Self::Negative(p) | Self::OutOfRange(p) => {
                p
            }
        }
    }
}

impl fmt::Display for ParamError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            Self::NonFinite(p) => write!(f, "{p} must be a finite number"),
            Self::NotPositive(p) => write!(f, "{p} must be greater than zero"),
            Self::Negative(p) => write!(f, "{p} must not be negative"),
            Self::OutOfRange(p) => write!(f, "{p} is outside its allowed range"),
        }
    }
}

impl core::error::Error for ParamError {}

/// Checks that `value` is finite and inside `[min, max]`.
///
/// Returns the value so that validation reads as one expression.
pub(crate) fn check_range(
    name: &'static str,
    value: f32,
    min: f32,
    max: f32,
) -> Result<f32, ParamError> {
    if !value.is_finite() {
        Err(ParamError::NonFinite(name))
    } else if value < 0.0 && min >= 0.0 {
        Err(ParamError::Negative(name))
    } else if value < min || value > max {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(value)
    }
}

/// Checks that `value` is finite, strictly positive and at most `max`.
pub(crate) fn check_positive(name: &'static str, value: f32, max: f32) -> Result<f32, ParamError> {
    if !value.is_finite() {
        Err(ParamError::NonFinite(name))
    } else if value <= 0.0 {
        Err(ParamError::NotPositive(name))
    } else if value > max {
        Err(ParamError::OutOfRange(name))
    } else {
        Ok(value)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn range_check_names_the_parameter() {
        assert_eq!(
            check_range("x", f32::NAN, 0.0, 1.0),
            Err(ParamError::NonFinite("x"))
        );
        assert_eq!(
            check_range("x", -0.5, 0.0, 1.0),
            Err(ParamError::Negative("x"))
        );
        assert_eq!(
            check_range("x", 1.5, 0.0, 1.0),
            Err(ParamError::OutOfRange("x"))
        );
        assert_eq!(
            check_range("x", -2.0, -1.0, 1.0),
            Err(ParamError::OutOfRange("x"))
        );
        assert_eq!(check_range("x", 0.5, 0.0, 1.0), Ok(0.5));
        assert_eq!(
            check_positive("y", 0.0, 1.0),
            Err(ParamError::NotPositive("y"))
        );
        assert_eq!(
            check_positive("y", f32::INFINITY, 1.0),
            Err(ParamError::NonFinite("y"))
        );
        assert_eq!(
            check_positive("y", 2.0, 1.0),
            Err(ParamError::OutOfRange("y"))
        );
        assert_eq!(ParamError::Negative("z").parameter(), "z");
    }
}
