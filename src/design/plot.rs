//! SVG comparison of a designed profile and the time-optimal ramp: shaft
//! speed (upper panel) and simulated angle of the link from vertical (lower
//! panel), nominal seat.

use plotters::prelude::*;

use crate::sim::output::PlotError;
use crate::sim::TraceSample;

fn plot_error(e: impl std::fmt::Display) -> PlotError {
    PlotError::new(e.to_string())
}

/// One profile to draw: its label, colour and replay trace.
pub struct Curve<'a> {
    /// Legend text.
    pub label: &'a str,
    /// Colour.
    pub colour: RGBColor,
    /// Replay trace (time series).
    pub trace: &'a [TraceSample],
}

/// A drawing area, its axis label and the value it shows.
type Panel<'a, 'b> = (
    &'a DrawingArea<SVGBackend<'b>, plotters::coord::Shift>,
    &'static str,
    fn(&TraceSample) -> f64,
);

fn range(values: impl Iterator<Item = f64>) -> (f64, f64) {
    let (lo, hi) = values.fold((0.0_f64, 0.0_f64), |(lo, hi), v| (lo.min(v), hi.max(v)));
    let margin = 0.05 * (hi - lo).max(1e-3);
    (lo - margin, hi + margin)
}

/// Draws the curves as an SVG document.
///
/// # Errors
/// [`PlotError`] if plotters fails.
pub fn render_comparison(curves: &[Curve<'_>], title: &str) -> Result<String, PlotError> {
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (1000, 700)).into_drawing_area();
        root.fill(&WHITE).map_err(plot_error)?;
        let root = root.titled(title, ("sans-serif", 20)).map_err(plot_error)?;
        let (upper, lower) = root.split_vertically(330);
        let all = || curves.iter().flat_map(|c| c.trace.iter());
        let t0 = all().map(|s| s.time_s).fold(f64::INFINITY, f64::min);
        let t1 = all().map(|s| s.time_s).fold(f64::NEG_INFINITY, f64::max);
        let (t0, t1) = if t0.is_finite() && t1 > t0 {
            (t0, t1)
        } else {
            (0.0, 1.0)
        };
        let panels: [Panel<'_, '_>; 2] = [
            (&upper, "shaft speed [rad/s]", |s| s.command_rad_s),
            (&lower, "angle from vertical [deg]", |s| {
                s.angle_from_vertical_deg
            }),
        ];
        for (area, label, value) in panels {
            let (lo, hi) = range(all().map(value));
            let mut chart = ChartBuilder::on(area)
                .margin(10)
                .x_label_area_size(35)
                .y_label_area_size(60)
                .build_cartesian_2d(t0..t1, lo..hi)
                .map_err(plot_error)?;
            chart
                .configure_mesh()
                .x_desc("time [s]")
                .y_desc(label)
                .draw()
                .map_err(plot_error)?;
            for c in curves {
                let colour = c.colour;
                chart
                    .draw_series(LineSeries::new(
                        c.trace.iter().map(|s| (s.time_s, value(s))),
                        colour.stroke_width(2),
                    ))
                    .map_err(plot_error)?
                    .label(c.label)
                    .legend(move |(x, y)| PathElement::new([(x, y), (x + 20, y)], colour));
            }
            chart
                .configure_series_labels()
                .position(SeriesLabelPosition::LowerRight)
                .border_style(BLACK)
                .background_style(WHITE.mix(0.8))
                .draw()
                .map_err(plot_error)?;
        }
        root.present().map_err(plot_error)?;
    }
    Ok(svg)
}
