//! A commanded speed profile: samples of (time, shaft speed), linear in
//! between.
//!
//! Between two samples the speed changes linearly, so the acceleration is
//! constant on each interval and jumps at the samples; every sample time is a
//! breakpoint at which the integrator restarts. Two samples at the same time
//! are a step of the speed (an impulse on the seats). Before the first sample
//! and after the last the speed holds.
//!
//! Profiles come from memory ([`SpeedProfile::new`], e.g. from the crate's
//! ramp) or from a CSV file ([`SpeedProfile::from_csv_path`]; columns in
//! `docs/files.md`).

use std::fmt;
use std::io::Read;
use std::path::Path;

use crate::steady::MAX_SHAFT_SPEED_RAD_S;

/// Longest accepted profile, s (one day).
pub const MAX_PROFILE_DURATION_S: f64 = 86_400.0;

/// Largest accepted |time| of a sample, s: f64 times up to 1e9 s keep a
/// resolution better than 1 µs.
pub const MAX_SAMPLE_TIME_S: f64 = 1.0e9;

/// One sample of the commanded speed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ProfileSample {
    /// Time, s.
    pub time_s: f64,
    /// Shaft speed, rad/s (negative: reverse).
    pub speed_rad_s: f64,
}

/// A validated speed profile: at least one sample, times non-decreasing, at
/// most two samples at one time, speeds within ±[`MAX_SHAFT_SPEED_RAD_S`].
#[derive(Debug, Clone, PartialEq)]
pub struct SpeedProfile {
    samples: Vec<ProfileSample>,
}

/// Figures of a profile to hold against the ride's limits.
#[derive(Debug, Clone, Copy, PartialEq, Default, serde::Serialize)]
pub struct ProfileStats {
    /// Largest positive acceleration on any interval, rad/s² (0 if none).
    pub peak_accel_rad_s2: f64,
    /// Largest deceleration (as a positive number) on any interval, rad/s².
    pub peak_decel_rad_s2: f64,
    /// Largest jerk estimate, rad/s³: |Δα| between neighbouring intervals
    /// over the time between their midpoints (the hold before the first
    /// and after the last sample counts as an interval of zero acceleration
    /// as long as its neighbour). Steps are left out and counted instead.
    pub peak_jerk_rad_s3: f64,
    /// Number of speed steps (two samples at one time).
    pub steps: usize,
    /// Largest |speed change| of a step, rad/s.
    pub largest_step_rad_s: f64,
}

/// Where in the input a profile error was found.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
#[non_exhaustive]
pub enum ProfileLocation {
    /// Nowhere in particular (the whole input).
    Whole,
    /// A line of a CSV file (1-based, counting the header).
    Line(u64),
    /// A sample of an in-memory profile (0-based index).
    Sample(usize),
}

/// A profile that was refused, with where and why.
#[derive(Debug, Clone, PartialEq)]
pub struct ProfileError {
    source: String,
    location: ProfileLocation,
    field: Option<String>,
    message: String,
}

impl ProfileError {
    fn new(
        source: &str,
        location: ProfileLocation,
        field: Option<&str>,
        message: impl Into<String>,
    ) -> Self {
        Self {
            source: source.to_owned(),
            location,
            field: field.map(str::to_owned),
            message: message.into(),
        }
    }

    /// The file name (or `"profile"` for an in-memory profile).
    #[must_use]
    pub fn source_name(&self) -> &str {
        &self.source
    }

    /// Where the error is.
    #[must_use]
    pub const fn location(&self) -> ProfileLocation {
        self.location
    }

    /// The column or field at fault, if one is.
    #[must_use]
    pub fn field(&self) -> Option<&str> {
        self.field.as_deref()
    }

    /// What is wrong.
    #[must_use]
    pub fn message(&self) -> &str {
        &self.message
    }
}

impl fmt::Display for ProfileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.source)?;
        match self.location {
            ProfileLocation::Whole => {}
            ProfileLocation::Line(line) => write!(f, ": line {line}")?,
            ProfileLocation::Sample(i) => write!(f, ": sample {i}")?,
        }
        if let Some(field) = &self.field {
            write!(f, ", field `{field}`")?;
        }
        write!(f, ": {}", self.message)
    }
}

impl std::error::Error for ProfileError {}

/// Speed column of a CSV profile and its unit.
#[derive(Clone, Copy)]
enum SpeedUnit {
    RadPerS,
    Rpm,
}

impl SpeedUnit {
    fn column(self) -> &'static str {
        match self {
            Self::RadPerS => "speed_rad_s",
            Self::Rpm => "speed_rpm",
        }
    }

    fn to_rad_s(self, value: f64) -> f64 {
        match self {
            Self::RadPerS => value,
            Self::Rpm => value * core::f64::consts::TAU / 60.0,
        }
    }
}

/// Column names a profile CSV may use.
const TIME_COLUMN: &str = "time_s";

impl SpeedProfile {
    /// A profile from (time s, speed rad/s) samples.
    ///
    /// # Errors
    /// [`ProfileError`] naming the sample and field when a value is not
    /// finite or out of range, times decrease, more than two samples share a
    /// time, the profile is longer than [`MAX_PROFILE_DURATION_S`] or empty.
    pub fn new(samples: &[(f64, f64)]) -> Result<Self, ProfileError> {
        let mut builder = Builder::new("profile");
        for (i, &(time_s, speed_rad_s)) in samples.iter().enumerate() {
            builder.push(
                ProfileLocation::Sample(i),
                time_s,
                "time_s",
                speed_rad_s,
                "speed_rad_s",
            )?;
        }
        builder.finish()
    }

    /// A profile read from a CSV file (see `docs/files.md`).
    ///
    /// # Errors
    /// [`ProfileError`] naming the file, line and column.
    pub fn from_csv_path(path: &Path) -> Result<Self, ProfileError> {
        let name = path.display().to_string();
        let file = std::fs::File::open(path).map_err(|e| {
            ProfileError::new(
                &name,
                ProfileLocation::Whole,
                None,
                format!("cannot open: {e}"),
            )
        })?;
        Self::from_csv_reader(file, &name)
    }

    /// A profile read from CSV text; `source_name` names it in errors.
    ///
    /// The first non-comment row is the header: `time_s` and exactly one of
    /// `speed_rad_s` or `speed_rpm`, in any order; no other columns. Lines
    /// starting with `#` are comments. Fields may be padded with spaces.
    ///
    /// # Errors
    /// [`ProfileError`] naming the source, line and column.
    pub fn from_csv_reader<R: Read>(reader: R, source_name: &str) -> Result<Self, ProfileError> {
        let mut csv = csv::ReaderBuilder::new()
            .trim(csv::Trim::All)
            .comment(Some(b'#'))
            .has_headers(true)
            .from_reader(reader);
        let csv_error = |e: &csv::Error| {
            let location = e
                .position()
                .map_or(ProfileLocation::Whole, |p| ProfileLocation::Line(p.line()));
            let message = match e.kind() {
                csv::ErrorKind::UnequalLengths {
                    expected_len, len, ..
                } => format!("{len} fields where the header has {expected_len}"),
                csv::ErrorKind::Utf8 { .. } => "not valid UTF-8 text".to_owned(),
                _ => e.to_string(),
            };
            ProfileError::new(source_name, location, None, message)
        };
        let headers = csv.headers().map_err(|e| csv_error(&e))?.clone();
        let header_line = headers.position().map_or(1, csv::Position::line);
        let header_error = |field: Option<&str>, message: String| {
            ProfileError::new(
                source_name,
                ProfileLocation::Line(header_line.max(1)),
                field,
                message,
            )
        };
        let mut time_index = None;
        let mut speed = None;
        for (i, name) in headers.iter().enumerate() {
            let slot = match name {
                TIME_COLUMN => &mut time_index,
                "speed_rad_s" | "speed_rpm" => {
                    if speed.is_some() {
                        return Err(header_error(
                            Some(name),
                            "give the speed in one column only (speed_rad_s or speed_rpm)".into(),
                        ));
                    }
                    let unit = if name == "speed_rpm" {
                        SpeedUnit::Rpm
                    } else {
                        SpeedUnit::RadPerS
                    };
                    speed = Some((i, unit));
                    continue;
                }
                other => {
                    return Err(header_error(
                        Some(other),
                        "unknown column (expected time_s and speed_rad_s or speed_rpm)".into(),
                    ))
                }
            };
            if slot.is_some() {
                return Err(header_error(Some(name), "column given twice".into()));
            }
            *slot = Some(i);
        }
        let Some(time_index) = time_index else {
            return Err(header_error(
                Some(TIME_COLUMN),
                "missing column (the header needs time_s and speed_rad_s or speed_rpm)".into(),
            ));
        };
        let Some((speed_index, unit)) = speed else {
            return Err(header_error(
                Some("speed_rad_s"),
                "missing speed column (speed_rad_s or speed_rpm)".into(),
            ));
        };
        let mut builder = Builder::new(source_name);
        let mut record = csv::StringRecord::new();
        loop {
            match csv.read_record(&mut record) {
                Ok(true) => {}
                Ok(false) => break,
                Err(e) => return Err(csv_error(&e)),
            }
            let line = record.position().map_or(0, csv::Position::line);
            let location = ProfileLocation::Line(line);
            let number = |index: usize, column: &str| -> Result<f64, ProfileError> {
                let text = record.get(index).unwrap_or("");
                text.parse::<f64>().map_err(|_| {
                    ProfileError::new(
                        source_name,
                        location,
                        Some(column),
                        format!("not a number: {text:?}"),
                    )
                })
            };
            let time_s = number(time_index, TIME_COLUMN)?;
            let raw_speed = number(speed_index, unit.column())?;
            builder.push(
                location,
                time_s,
                TIME_COLUMN,
                unit.to_rad_s(raw_speed),
                unit.column(),
            )?;
        }
        builder.finish()
    }

    /// The samples, in time order.
    #[must_use]
    pub fn samples(&self) -> &[ProfileSample] {
        &self.samples
    }

    /// Time of the first sample, s.
    #[must_use]
    pub fn start_s(&self) -> f64 {
        self.samples.first().map_or(0.0, |s| s.time_s)
    }

    /// Time of the last sample, s.
    #[must_use]
    pub fn end_s(&self) -> f64 {
        self.samples.last().map_or(0.0, |s| s.time_s)
    }

    /// Speed of the first sample (before any step at the start), rad/s.
    #[must_use]
    pub fn first_speed_rad_s(&self) -> f64 {
        self.samples.first().map_or(0.0, |s| s.speed_rad_s)
    }

    /// Speed of the last sample (held after the profile), rad/s.
    #[must_use]
    pub fn last_speed_rad_s(&self) -> f64 {
        self.samples.last().map_or(0.0, |s| s.speed_rad_s)
    }

    /// Largest |speed| in the profile, rad/s.
    #[must_use]
    pub fn max_abs_speed_rad_s(&self) -> f64 {
        self.samples
            .iter()
            .map(|s| s.speed_rad_s.abs())
            .fold(0.0, f64::max)
    }

    /// Commanded speed (rad/s) and acceleration (rad/s²) at `time_s`. At a
    /// sample the value after the sample counts: the speed after a step and
    /// the acceleration of the interval that starts there.
    #[must_use]
    pub fn command_at(&self, time_s: f64) -> (f64, f64) {
        let after = self.samples.partition_point(|s| s.time_s <= time_s);
        let Some(i) = after.checked_sub(1) else {
            return (self.first_speed_rad_s(), 0.0);
        };
        match (self.samples.get(i), self.samples.get(i + 1)) {
            (Some(a), Some(b)) => {
                let accel = (b.speed_rad_s - a.speed_rad_s) / (b.time_s - a.time_s);
                (a.speed_rad_s + accel * (time_s - a.time_s), accel)
            }
            (Some(a), None) => (a.speed_rad_s, 0.0),
            _ => (self.first_speed_rad_s(), 0.0),
        }
    }

    /// The speed step at `time_s`, as (speed before, speed after), if two
    /// samples sit exactly there.
    #[must_use]
    pub fn step_at(&self, time_s: f64) -> Option<(f64, f64)> {
        let first = self.samples.partition_point(|s| s.time_s < time_s);
        match (self.samples.get(first), self.samples.get(first + 1)) {
            (Some(a), Some(b)) if a.time_s == time_s && b.time_s == time_s => {
                Some((a.speed_rad_s, b.speed_rad_s))
            }
            _ => None,
        }
    }

    /// The distinct sample times (the breakpoints), in order.
    pub fn breakpoints(&self) -> impl Iterator<Item = f64> + '_ {
        let mut last = None;
        self.samples.iter().filter_map(move |s| {
            if last == Some(s.time_s) {
                None
            } else {
                last = Some(s.time_s);
                Some(s.time_s)
            }
        })
    }

    /// Acceleration, jerk and step figures (see [`ProfileStats`]).
    #[must_use]
    pub fn stats(&self) -> ProfileStats {
        let mut stats = ProfileStats::default();
        // Intervals of positive duration as (duration, acceleration), with
        // the holds at both ends.
        let mut intervals: Vec<(f64, f64)> = Vec::with_capacity(self.samples.len() + 1);
        for pair in self.samples.windows(2) {
            let [a, b] = pair else { continue };
            let duration = b.time_s - a.time_s;
            if duration > 0.0 {
                let accel = (b.speed_rad_s - a.speed_rad_s) / duration;
                stats.peak_accel_rad_s2 = stats.peak_accel_rad_s2.max(accel);
                stats.peak_decel_rad_s2 = stats.peak_decel_rad_s2.max(-accel);
                intervals.push((duration, accel));
            } else {
                stats.steps += 1;
                stats.largest_step_rad_s = stats
                    .largest_step_rad_s
                    .max((b.speed_rad_s - a.speed_rad_s).abs());
            }
        }
        if let (Some(&(first, _)), Some(&(last, _))) = (intervals.first(), intervals.last()) {
            intervals.insert(0, (first, 0.0));
            intervals.push((last, 0.0));
        }
        for pair in intervals.windows(2) {
            if let [(d0, a0), (d1, a1)] = pair {
                let jerk = (a1 - a0).abs() / (0.5 * (d0 + d1));
                stats.peak_jerk_rad_s3 = stats.peak_jerk_rad_s3.max(jerk);
            }
        }
        stats
    }
}

/// Checks samples one by one as they are read.
struct Builder<'a> {
    source: &'a str,
    samples: Vec<ProfileSample>,
}

impl<'a> Builder<'a> {
    fn new(source: &'a str) -> Self {
        Self {
            source,
            samples: Vec::new(),
        }
    }

    fn push(
        &mut self,
        location: ProfileLocation,
        time_s: f64,
        time_field: &str,
        speed_rad_s: f64,
        speed_field: &str,
    ) -> Result<(), ProfileError> {
        let error = |field: &str, message: &str| {
            Err(ProfileError::new(
                self.source,
                location,
                Some(field),
                message,
            ))
        };
        if !time_s.is_finite() {
            return error(time_field, "must be a finite number");
        }
        if time_s.abs() > MAX_SAMPLE_TIME_S {
            return error(time_field, "is outside ±1e9 s");
        }
        if !speed_rad_s.is_finite() {
            return error(speed_field, "must be a finite number");
        }
        if speed_rad_s.abs() > f64::from(MAX_SHAFT_SPEED_RAD_S) {
            return error(
                speed_field,
                "is above the largest accepted shaft speed (100 rad/s)",
            );
        }
        let n = self.samples.len();
        if let Some(last) = self.samples.last() {
            if time_s < last.time_s {
                return error(time_field, "goes back in time (times must not decrease)");
            }
            let before_last = n.checked_sub(2).and_then(|i| self.samples.get(i));
            if before_last.is_some_and(|s| s.time_s == time_s) {
                return error(
                    time_field,
                    "a third sample at the same time (a step takes two)",
                );
            }
        }
        if self
            .samples
            .first()
            .is_some_and(|first| time_s - first.time_s > MAX_PROFILE_DURATION_S)
        {
            return error(time_field, "the profile is longer than one day (86400 s)");
        }
        self.samples.push(ProfileSample {
            time_s,
            speed_rad_s,
        });
        Ok(())
    }

    fn finish(self) -> Result<SpeedProfile, ProfileError> {
        if self.samples.is_empty() {
            return Err(ProfileError::new(
                self.source,
                ProfileLocation::Whole,
                None,
                "no samples",
            ));
        }
        Ok(SpeedProfile {
            samples: self.samples,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn linear_between_samples_with_steps() {
        let p = SpeedProfile::new(&[(0.0, 0.0), (0.0, 1.0), (10.0, 2.0), (20.0, 2.0)]).unwrap();
        assert_eq!(p.command_at(-1.0), (0.0, 0.0));
        assert_eq!(p.command_at(0.0), (1.0, 0.1));
        let (w, a) = p.command_at(5.0);
        assert!((w - 1.5).abs() < 1e-15 && (a - 0.1).abs() < 1e-15);
        assert_eq!(p.command_at(10.0), (2.0, 0.0));
        assert_eq!(p.command_at(99.0), (2.0, 0.0));
        assert_eq!(p.step_at(0.0), Some((0.0, 1.0)));
        assert_eq!(p.step_at(10.0), None);
        assert_eq!(p.breakpoints().collect::<Vec<_>>(), vec![0.0, 10.0, 20.0]);
        let s = p.stats();
        assert_eq!(s.steps, 1);
        assert_eq!(s.largest_step_rad_s, 1.0);
        assert!((s.peak_accel_rad_s2 - 0.1).abs() < 1e-15);
        // Hand calculation: 0 → 0.1 rad/s² between a 10 s hold and a 10 s ramp: 0.01 rad/s³.
        assert!((s.peak_jerk_rad_s3 - 0.01).abs() < 1e-15);
    }

    #[test]
    fn csv_in_rpm_with_comments_and_padding() {
        let text = "# demo\n time_s , speed_rpm\n0, 0\n 30 ,6\n";
        let p = SpeedProfile::from_csv_reader(text.as_bytes(), "t.csv").unwrap();
        // 6 rpm = 6 · 2π / 60 rad/s = 0.2π rad/s (hand calculation).
        assert!((p.last_speed_rad_s() - 0.2 * core::f64::consts::PI).abs() < 1e-15);
        assert_eq!(p.end_s(), 30.0);
    }

    #[test]
    fn csv_errors_name_file_line_and_field() {
        let cases = [
            ("time_s,speed_rad_s\n0,0\n1,abc\n", "t.csv: line 3, field `speed_rad_s`: not a number: \"abc\""),
            ("time_s,speed_rad_s\n0,0\n-1,0\n", "t.csv: line 3, field `time_s`: goes back in time (times must not decrease)"),
            ("time_s,speed_rad_s,x\n", "t.csv: line 1, field `x`: unknown column (expected time_s and speed_rad_s or speed_rpm)"),
            ("time_s\n0\n", "t.csv: line 1, field `speed_rad_s`: missing speed column (speed_rad_s or speed_rpm)"),
            ("time_s,speed_rad_s,speed_rpm\n", "t.csv: line 1, field `speed_rpm`: give the speed in one column only (speed_rad_s or speed_rpm)"),
            ("time_s,speed_rad_s\n0,0\n1\n", "t.csv: line 3: 1 fields where the header has 2"),
            ("time_s,speed_rad_s\n", "t.csv: no samples"),
            ("time_s,speed_rad_s\n0,NaN\n", "t.csv: line 2, field `speed_rad_s`: must be a finite number"),
            ("time_s,speed_rad_s\n0,500\n", "t.csv: line 2, field `speed_rad_s`: is above the largest accepted shaft speed (100 rad/s)"),
            ("time_s,speed_rad_s\n0,0\n0,1\n0,2\n", "t.csv: line 4, field `time_s`: a third sample at the same time (a step takes two)"),
        ];
        for (text, expected) in cases {
            let e = SpeedProfile::from_csv_reader(text.as_bytes(), "t.csv").unwrap_err();
            assert_eq!(e.to_string(), expected);
        }
        let bytes: &[u8] = b"time_s,speed_rad_s\n0,\xff\n";
        let e = SpeedProfile::from_csv_reader(bytes, "t.csv").unwrap_err();
        assert!(e.to_string().starts_with("t.csv: line 2"), "{e}");
    }

    #[test]
    fn in_memory_errors_name_the_sample() {
        let e = SpeedProfile::new(&[(0.0, 0.0), (f64::INFINITY, 1.0)]).unwrap_err();
        assert_eq!(
            e.to_string(),
            "profile: sample 1, field `time_s`: must be a finite number"
        );
        let e = SpeedProfile::new(&[(0.0, 0.0), (90_000.0, 1.0)]).unwrap_err();
        assert_eq!(e.location(), ProfileLocation::Sample(1));
        assert!(SpeedProfile::new(&[]).is_err());
    }
}
