//! Dynamic angle protection: an on-board seat-swing estimator and a
//! reference governor that keep the *peak* swing angle inside the certified
//! angle, not only the steady one.
//!
//! * [`envelope`]: per seat length, the room the certified cone leaves for
//!   swing energy at each speed and the most a speed change can pump in
//!   (a table built once).
//! * [`estimator`]: the seat model integrated from the measured shaft speed
//!   for the shortest, nominal and longest length of the tolerance band,
//!   open loop from a confirmed rest, with an optional sensor correction.
//! * [`governor`]: the [`RequestGovernor`](crate::RequestGovernor) that admits
//!   the largest certified change of the ramp's target.
//!
//! The argument, its assumptions and its tests are in
//! docs/dynamic_protection.md. This is a component, not a certified safety
//! function; the ride's safety functions and its certification (EN 13814,
//! ASTM F2291, ISO 17842, EN ISO 13849-1, IEC 62061, IEC 61508) stay with the
//! integrator and licensed engineers.

pub mod band;
#[cfg(feature = "std")]
pub mod closed_loop;
pub mod envelope;
pub mod estimator;
pub mod governor;
pub mod link;
#[cfg(feature = "std")]
pub mod search;

pub use envelope::SwingEnvelope;
pub use estimator::{EstimatorFault, SwingEstimator};
pub use governor::{Certificate, GovernorParams, SwingGovernor};
