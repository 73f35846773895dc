pub mod ramp;
