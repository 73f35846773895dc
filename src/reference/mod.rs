//! Independent f64 reference implementations (host only, feature `std`).
//!
//! Written apart from the f32 code, with other algorithms where one exists, so
//! that host tests can cross-check the target code over the whole parameter
//! space. Not for use on the target: f64 is software-emulated on Cortex-M.
//! Being a host-side test oracle, it may index its small fixed-size arrays.
#![allow(clippy::indexing_slicing)]

pub mod ramp;
pub mod seat;
pub mod steady;
