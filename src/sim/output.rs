//! The trace of a replay as CSV and as an SVG plot.

use std::fmt;
use std::io::Write;

use plotters::prelude::*;

use super::replay::TraceSample;

/// Writes the trace as CSV: a header row with the field names of
/// [`TraceSample`] (documented in `docs/files.md`), then one row per sample.
///
/// # Errors
/// Any error of the writer.
pub fn write_trace_csv<W: Write>(trace: &[TraceSample], writer: W) -> Result<(), csv::Error> {
    let mut csv = csv::Writer::from_writer(writer);
    for sample in trace {
        csv.serialize(sample)?;
    }
    csv.flush()?;
    Ok(())
}

/// A plot that could not be drawn.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct PlotError(String);

impl PlotError {
    /// A plot error with a message.
    #[must_use]
    pub fn new(message: String) -> Self {
        Self(message)
    }
}

impl fmt::Display for PlotError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "cannot draw the plot: {}", self.0)
    }
}

impl std::error::Error for PlotError {}

fn plot_error(e: impl fmt::Display) -> PlotError {
    PlotError(e.to_string())
}

/// Most points drawn per curve; longer traces are thinned keeping each
/// bucket's minimum and maximum, so peaks survive.
pub const MAX_PLOT_POINTS: usize = 4000;

/// Thins `(t, value)` points to at most about [`MAX_PLOT_POINTS`], keeping
/// the smallest and largest value of each bucket in time order.
fn thin(points: impl ExactSizeIterator<Item = (f64, f64)>) -> Vec<(f64, f64)> {
    let n = points.len();
    let buckets = MAX_PLOT_POINTS / 2;
    if n <= MAX_PLOT_POINTS {
        return points.collect();
    }
    let per_bucket = n.div_ceil(buckets);
    let mut out = Vec::with_capacity(2 * buckets + 2);
    let mut bucket: Vec<(f64, f64)> = Vec::with_capacity(per_bucket);
    let flush = |bucket: &mut Vec<(f64, f64)>, out: &mut Vec<(f64, f64)>| {
        let min = bucket.iter().copied().min_by(|a, b| a.1.total_cmp(&b.1));
        let max = bucket.iter().copied().max_by(|a, b| a.1.total_cmp(&b.1));
        if let (Some(min), Some(max)) = (min, max) {
            if min.0 <= max.0 {
                out.extend([min, max]);
            } else {
                out.extend([max, min]);
            }
        }
        bucket.clear();
    };
    for p in points {
        bucket.push(p);
        if bucket.len() == per_bucket {
            flush(&mut bucket, &mut out);
        }
    }
    flush(&mut bucket, &mut out);
    out
}

/// Range of values including zero, with a margin, never empty.
fn value_range(curves: &[&[(f64, f64)]]) -> (f64, f64) {
    let (lo, hi) = curves
        .iter()
        .flat_map(|c| c.iter())
        .fold((0.0_f64, 0.0_f64), |(lo, hi), &(_, v)| {
            (lo.min(v), hi.max(v))
        });
    let margin = 0.05 * (hi - lo).max(1.0);
    (lo - margin, hi + margin)
}

/// One curve of a panel.
#[derive(Debug, Clone, PartialEq)]
pub struct Curve {
    /// Legend text.
    pub label: String,
    /// (time s, value) points, in time order (thinned when drawn).
    pub points: Vec<(f64, f64)>,
    /// Colour (red, green, blue).
    pub colour: (u8, u8, u8),
    /// Line width, pixels.
    pub width: u32,
}

impl Curve {
    /// A curve from points.
    #[must_use]
    pub fn new(label: &str, points: Vec<(f64, f64)>, colour: (u8, u8, u8), width: u32) -> Self {
        Self {
            label: label.to_owned(),
            points,
            colour,
            width,
        }
    }
}

/// One panel: its curves and the label of its value axis.
#[derive(Debug, Clone, PartialEq)]
pub struct Panel {
    /// Value-axis label.
    pub axis: String,
    /// The curves.
    pub curves: Vec<Curve>,
}

fn draw_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, plotters::coord::Shift>,
    panel: &Panel,
    (t0, t1): (f64, f64),
) -> Result<(), PlotError> {
    let thinned: Vec<Vec<(f64, f64)>> = panel
        .curves
        .iter()
        .map(|c| thin(c.points.iter().copied()))
        .collect();
    let refs: Vec<&[(f64, f64)]> = thinned.iter().map(Vec::as_slice).collect();
    let (lo, hi) = value_range(&refs);
    let mut chart = ChartBuilder::on(area)
        .margin(10)
        .x_label_area_size(35)
        .y_label_area_size(60)
        .build_cartesian_2d(t0..t1, lo..hi)
        .map_err(plot_error)?;
    chart
        .configure_mesh()
        .x_desc("time [s]")
        .y_desc(panel.axis.as_str())
        .draw()
        .map_err(plot_error)?;
    for (curve, points) in panel.curves.iter().zip(thinned) {
        let (r, g, b) = curve.colour;
        let colour = RGBColor(r, g, b);
        chart
            .draw_series(LineSeries::new(points, colour.stroke_width(curve.width)))
            .map_err(plot_error)?
            .label(curve.label.as_str())
            .legend(move |(x, y)| PathElement::new([(x, y), (x + 20, y)], colour));
    }
    chart
        .configure_series_labels()
        .position(SeriesLabelPosition::LowerRight)
        .border_style(BLACK)
        .background_style(WHITE.mix(0.8))
        .draw()
        .map_err(plot_error)?;
    Ok(())
}

/// Draws panels stacked over a common time axis, as an SVG document.
///
/// # Errors
/// [`PlotError`] if plotters fails.
pub fn render_panels(title: &str, panels: &[Panel]) -> Result<String, PlotError> {
    let (t0, t1) = panels
        .iter()
        .flat_map(|p| p.curves.iter())
        .flat_map(|c| c.points.iter())
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), &(t, _)| {
            (lo.min(t), hi.max(t))
        });
    let (t0, t1) = if t0.is_finite() && t1.is_finite() {
        (t0, t1.max(t0 + 1e-3))
    } else {
        (0.0, 1.0)
    };
    let rows = u32::try_from(panels.len().max(1)).unwrap_or(1);
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, (1000, 60 + 320 * rows)).into_drawing_area();
        root.fill(&WHITE).map_err(plot_error)?;
        let root = root.titled(title, ("sans-serif", 20)).map_err(plot_error)?;
        let areas = root.split_evenly((panels.len().max(1), 1));
        for (area, panel) in areas.iter().zip(panels) {
            draw_panel(area, panel, (t0, t1))?;
        }
        root.present().map_err(plot_error)?;
    }
    Ok(svg)
}

/// Shaft speed to rpm.
pub(crate) const RPM_PER_RAD_S: f64 = 60.0 / core::f64::consts::TAU;

/// Draws shaft speed (upper panel, rpm) and swing angles (lower panel,
/// degrees) against time, as an SVG document.
///
/// # Errors
/// [`PlotError`] if plotters fails.
pub fn render_svg(trace: &[TraceSample], title: &str) -> Result<String, PlotError> {
    let series = |f: fn(&TraceSample) -> f64| trace.iter().map(|s| (s.time_s, f(s))).collect();
    render_panels(
        title,
        &[
            Panel {
                axis: "shaft speed [rpm]".into(),
                curves: vec![
                    Curve::new(
                        "command",
                        series(|s| s.command_rad_s * RPM_PER_RAD_S),
                        (150, 150, 150),
                        1,
                    ),
                    Curve::new(
                        "shaft",
                        series(|s| s.speed_rad_s * RPM_PER_RAD_S),
                        (0, 0, 255),
                        2,
                    ),
                ],
            },
            Panel {
                axis: "swing angle [deg]".into(),
                curves: vec![
                    Curve::new(
                        "from vertical",
                        series(|s| s.angle_from_vertical_deg),
                        (255, 0, 0),
                        1,
                    ),
                    Curve::new("radial", series(|s| s.radial_angle_deg), (0, 255, 0), 1),
                    Curve::new(
                        "tangential",
                        series(|s| s.tangential_angle_deg),
                        (255, 0, 255),
                        1,
                    ),
                ],
            },
        ],
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn thinning_keeps_the_extremes() {
        let points: Vec<(f64, f64)> = (0..100_000)
            .map(|i| {
                let t = f64::from(i) * 1e-3;
                (t, (t * 3.0).sin() + if i == 54_321 { 5.0 } else { 0.0 })
            })
            .collect();
        let thinned = thin(points.iter().copied());
        assert!(thinned.len() <= MAX_PLOT_POINTS + 2);
        assert!(thinned.iter().any(|&(_, v)| v > 4.0));
        assert!(thinned.windows(2).all(|w| w[0].0 <= w[1].0));
    }
}
