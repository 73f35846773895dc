//! SVG comparison of a designed profile and the time-optimal ramp: shaft
//! speed (upper panel) and simulated angle of the link from vertical (lower
//! panel), nominal seat.

use plotters::style::RGBColor;

use crate::sim::output::{self, render_panels, Panel, PlotError};
use crate::sim::TraceSample;

/// One profile to draw: its label, colour and replay trace.
pub struct Curve<'a> {
    /// Legend text.
    pub label: &'a str,
    /// Colour.
    pub colour: RGBColor,
    /// Replay trace (time series).
    pub trace: &'a [TraceSample],
}

/// Draws the curves as an SVG document (two panels over a common time axis,
/// through [`crate::sim::output::render_panels`]).
///
/// # Errors
/// [`PlotError`] if plotters fails.
pub fn render_comparison(curves: &[Curve<'_>], title: &str) -> Result<String, PlotError> {
    let panel = |axis: &str, value: fn(&TraceSample) -> f64| Panel {
        axis: axis.to_owned(),
        curves: curves
            .iter()
            .map(|c| {
                let RGBColor(r, g, b) = c.colour;
                output::Curve::new(
                    c.label,
                    c.trace.iter().map(|s| (s.time_s, value(s))).collect(),
                    (r, g, b),
                    2,
                )
            })
            .collect(),
    };
    render_panels(
        title,
        &[
            panel("shaft speed [rad/s]", |s| s.command_rad_s),
            panel("angle from vertical [deg]", |s| s.angle_from_vertical_deg),
        ],
    )
}
