//! Validated ride geometry.
//!
//! A seat hangs from a pivot at radius `r0` (hub offset) from the shaft axis on
//! a link of effective length `L` (pivot to the centre of mass of seat plus
//! rider). Everything else — steady state, swing modes, ceilings — is computed
//! from a [`RideGeometry`], which can only be built from checked values; its
//! methods then never fail on account of the geometry.

use crate::error::{check_positive, check_range, ParamError};
use crate::gravity::Gravity;

/// How the seat is hung.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub enum Suspension {
    /// Chains (or cables): the seat swings radially and tangentially; the two
    /// directions are coupled by Coriolis forces in the turning frame.
    Chain,
    /// Rods hinged in the radial plane: the seat swings radially only.
    Rod,
}

/// Ride geometry checked once: every method can rely on finite, in-range values.
#[derive(Debug, Clone, Copy, PartialEq)]
#[cfg_attr(feature = "defmt", derive(defmt::Format))]
pub struct RideGeometry {
    hub_offset_m: f32,
    length_m: f32,
    suspension: Suspension,
    gravity: Gravity,
}

impl RideGeometry {
    /// Largest accepted hub offset, m.
    pub const MAX_HUB_OFFSET_M: f32 = 100.0;
    /// Largest accepted effective length, m.
    pub const MAX_LENGTH_M: f32 = 100.0;
    /// Shortest accepted effective length, m (1 cm: far below any seat, far
    /// above the subnormal lengths that would overflow the steady-state
    /// formulas in f32).
    pub const MIN_LENGTH_M: f32 = 0.01;

    /// Checks and builds a geometry.
    ///
    /// * `hub_offset_m`: shaft axis to hanger pivot, m, in [0, 100].
    /// * `length_m`: pivot to the centre of mass of seat plus rider, m, in
    ///   [0.01, 100] (zero or negative: [`ParamError::NotPositive`]).
    ///
    /// # Errors
    /// [`ParamError`] naming `hub_offset_m` or `length_m`.
    ///
    /// ```
    /// use swingdrive::{Gravity, RideGeometry, Suspension};
    /// let ride = RideGeometry::new(3.0, 5.0, Suspension::Chain, Gravity::STANDARD)?;
    /// assert_eq!(ride.length_m(), 5.0);
    /// assert!(RideGeometry::new(3.0, f32::NAN, Suspension::Chain, Gravity::STANDARD).is_err());
    /// # Ok::<(), swingdrive::ParamError>(())
    /// ```
    pub fn new(
        hub_offset_m: f32,
        length_m: f32,
        suspension: Suspension,
        gravity: Gravity,
    ) -> Result<Self, ParamError> {
        Ok(Self {
            hub_offset_m: check_range("hub_offset_m", hub_offset_m, 0.0, Self::MAX_HUB_OFFSET_M)?,
            length_m: check_length(length_m)?,
            suspension,
            gravity,
        })
    }

    /// Shaft axis to hanger pivot, m.
    #[must_use]
    pub const fn hub_offset_m(&self) -> f32 {
        self.hub_offset_m
    }

    /// Pivot to the centre of mass of seat plus rider, m.
    #[must_use]
    pub const fn length_m(&self) -> f32 {
        self.length_m
    }

    /// How the seats are hung.
    #[must_use]
    pub const fn suspension(&self) -> Suspension {
        self.suspension
    }

    /// Gravity in use.
    #[must_use]
    pub const fn gravity(&self) -> Gravity {
        self.gravity
    }

    /// The same ride with another effective length (for tolerance bands).
    ///
    /// # Errors
    /// [`ParamError`] naming `length_m`.
    pub fn with_length(&self, length_m: f32) -> Result<Self, ParamError> {
        Self::new(self.hub_offset_m, length_m, self.suspension, self.gravity)
    }
}

/// Checks the effective length: positive, and in [`RideGeometry::MIN_LENGTH_M`,
/// `RideGeometry::MAX_LENGTH_M`].
fn check_length(length_m: f32) -> Result<f32, ParamError> {
    let l = check_positive("length_m", length_m, RideGeometry::MAX_LENGTH_M)?;
    if l < RideGeometry::MIN_LENGTH_M {
        return Err(ParamError::OutOfRange("length_m"));
    }
    Ok(l)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bad_geometry_is_refused_by_name() {
        let g = Gravity::STANDARD;
        let c = Suspension::Chain;
        assert_eq!(
            RideGeometry::new(-1.0, 5.0, c, g),
            Err(ParamError::Negative("hub_offset_m"))
        );
        assert_eq!(
            RideGeometry::new(f32::INFINITY, 5.0, c, g),
            Err(ParamError::NonFinite("hub_offset_m"))
        );
        assert_eq!(
            RideGeometry::new(1e6, 5.0, c, g),
            Err(ParamError::OutOfRange("hub_offset_m"))
        );
        assert_eq!(
            RideGeometry::new(1.0, 0.0, c, g),
            Err(ParamError::NotPositive("length_m"))
        );
        assert_eq!(
            RideGeometry::new(1.0, -2.0, c, g),
            Err(ParamError::NotPositive("length_m"))
        );
        assert_eq!(
            RideGeometry::new(1.0, f32::NAN, c, g),
            Err(ParamError::NonFinite("length_m"))
        );
        assert!(RideGeometry::new(0.0, 5.0, Suspension::Rod, g).is_ok());
        let ride = RideGeometry::new(2.0, 5.0, c, g).unwrap();
        assert_eq!(ride.with_length(6.0).unwrap().length_m(), 6.0);
        assert_eq!(
            ride.with_length(-6.0),
            Err(ParamError::NotPositive("length_m"))
        );
    }
}
