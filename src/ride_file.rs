//! The ride description file (TOML, host only, feature `std`).
//!
//! One file describes one ride: its geometry, the limits its speed profiles
//! must keep, and optionally seat damping and a drive model for simulations.
//! Every key is documented in `docs/files.md`. Unknown tables and keys are
//! refused, so a typo cannot silently leave a default in force.
//!
//! ```toml
//! [geometry]
//! hub_offset_m = 3.6
//! length_m = 6.2
//! suspension = "chain"
//!
//! [limits]
//! max_accel_rad_s2 = 0.10
//! max_decel_rad_s2 = 0.12
//! max_jerk_rad_s3 = 0.05
//! ```
//!
//! An optional `[interlock]` table holds the speed interlock's safety
//! parameter set ([`SafetyParams`]); see `docs/files.md`.
//!
//! Adding a table: give [`RideFile`] a field (an `Option` if the table may
//! be left out), add its raw `#[serde(deny_unknown_fields)]` struct with
//! [`toml::Spanned`] values next to the others below, validate it in
//! [`RideFile::from_toml_str`], and document it in `docs/files.md`.

use std::fmt;
use std::path::Path;

use serde::{Deserialize, Serialize};
use toml::Spanned;

use crate::error::ParamError;
use crate::geometry::{RideGeometry, Suspension};
use crate::gravity::{Gravity, STANDARD_GRAVITY_MPS2};
use crate::interlock::{SafetyConfig, SafetyParams};
use crate::ramp::Reverse;
use crate::sim::profile::ProfileStats;
use crate::sim::{DriveModel, SeatDynamics};

/// Largest accepted acceleration or deceleration limit, rad/s².
pub const MAX_LIMIT_ACCEL_RAD_S2: f64 = 10.0;
/// Largest accepted jerk limit, rad/s³.
pub const MAX_LIMIT_JERK_RAD_S3: f64 = 100.0;

/// A validated ride file.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub struct RideFile {
    /// The geometry as the target sees it (f32).
    pub geometry: RideGeometry,
    /// The same seat in f64 for simulation, with the `[swing]` damping.
    pub seat: SeatDynamics,
    /// The `[limits]` table.
    pub limits: RideLimits,
    /// The `[drive]` table, if given.
    pub drive: Option<DriveModel>,
    /// The `[interlock]` table, if given: the checked safety parameter set.
    pub interlock: Option<SafetyParams>,
}

/// Limits a speed profile for this ride must keep (`[limits]`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct RideLimits {
    /// Largest acceleration, rad/s², in (0, 10].
    pub max_accel_rad_s2: f64,
    /// Largest deceleration (positive number), rad/s², in (0, 10].
    pub max_decel_rad_s2: f64,
    /// Largest jerk, rad/s³, in (0, 100].
    pub max_jerk_rad_s3: f64,
}

/// One limit held against a profile.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LimitCheck {
    /// The limit's key in `[limits]`.
    pub limit: &'static str,
    /// The limit's value.
    pub allowed: f64,
    /// The profile's figure.
    pub profile: f64,
    /// `profile <= allowed`.
    pub ok: bool,
}

/// Limit checks of one profile.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LimitReport {
    /// `true` if every check passed and the profile has no speed step.
    pub ok: bool,
    /// Speed steps in the profile (a step has unbounded acceleration).
    pub steps: usize,
    /// The checks.
    pub checks: Vec<LimitCheck>,
}

impl RideLimits {
    /// Holds a profile's figures against the limits. The jerk figure of a
    /// sampled profile is an estimate (see [`ProfileStats`]); a speed step
    /// always fails.
    #[must_use]
    pub fn check(&self, stats: &ProfileStats) -> LimitReport {
        let check = |limit, allowed, profile| LimitCheck {
            limit,
            allowed,
            profile,
            ok: profile <= allowed,
        };
        let checks = vec![
            check(
                "max_accel_rad_s2",
                self.max_accel_rad_s2,
                stats.peak_accel_rad_s2,
            ),
            check(
                "max_decel_rad_s2",
                self.max_decel_rad_s2,
                stats.peak_decel_rad_s2,
            ),
            check(
                "max_jerk_rad_s3",
                self.max_jerk_rad_s3,
                stats.peak_jerk_rad_s3,
            ),
        ];
        LimitReport {
            ok: stats.steps == 0 && checks.iter().all(|c| c.ok),
            steps: stats.steps,
            checks,
        }
    }
}

/// A ride file that was refused, with where and why.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RideFileError {
    source: String,
    line: Option<usize>,
    field: Option<String>,
    message: String,
}

impl RideFileError {
    /// The file name.
    #[must_use]
    pub fn source_name(&self) -> &str {
        &self.source
    }

    /// The line (1-based), when known.
    #[must_use]
    pub const fn line(&self) -> Option<usize> {
        self.line
    }

    /// The key at fault as `table.key`, when known.
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

impl fmt::Display for RideFileError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.source)?;
        if let Some(line) = self.line {
            write!(f, ": line {line}")?;
        }
        if let Some(field) = &self.field {
            write!(f, ", field `{field}`")?;
        }
        write!(f, ": {}", self.message)
    }
}

impl std::error::Error for RideFileError {}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawRideFile {
    geometry: RawGeometry,
    limits: RawLimits,
    swing: Option<RawSwing>,
    drive: Option<RawDrive>,
    interlock: Option<RawInterlock>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawInterlock {
    certified_angle_deg: Spanned<f64>,
    max_load_factor: Option<Spanned<f64>>,
    mechanical_max_rad_s: Spanned<f64>,
    hub_offset_max_m: Option<Spanned<f64>>,
    length_max_m: Option<Spanned<f64>>,
    gravity_min_mps2: Option<Spanned<f64>>,
    speed_margin_rad_s: Spanned<f64>,
    max_acceleration_rad_s2: Spanned<f64>,
    max_deceleration_rad_s2: Spanned<f64>,
    max_jerk_rad_s3: Spanned<f64>,
    overspeed_tolerance_rad_s: Spanned<f64>,
    following_tolerance_rad_s: Spanned<f64>,
    channel_tolerance_rad_s: Spanned<f64>,
    sensor_max_rad_s: Spanned<f64>,
    standstill_rad_s: Spanned<f64>,
    tick_s: Spanned<f64>,
    overrun_tick_s: Spanned<f64>,
    stop_time_margin_s: Spanned<f64>,
    brake_delay_s: Spanned<f64>,
    debounce_ticks: Spanned<i64>,
    stale_ticks: Spanned<i64>,
    standstill_ticks: Spanned<i64>,
    reverse_permitted: Spanned<bool>,
    second_channel: Spanned<bool>,
    angle_sensor: Spanned<bool>,
}

/// Share of the nominal effective length added for the longest one when
/// `[interlock] length_max_m` is left out (see docs/safety.md).
pub const DEFAULT_LENGTH_TOLERANCE: f64 = 0.05;

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawGeometry {
    hub_offset_m: Spanned<f64>,
    length_m: Spanned<f64>,
    suspension: RawSuspension,
    gravity_mps2: Option<Spanned<f64>>,
}

#[derive(Deserialize, Clone, Copy)]
#[serde(rename_all = "lowercase")]
enum RawSuspension {
    Chain,
    Rod,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawLimits {
    max_accel_rad_s2: Spanned<f64>,
    max_decel_rad_s2: Spanned<f64>,
    max_jerk_rad_s3: Spanned<f64>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawSwing {
    damping_per_s: Option<Spanned<f64>>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawDrive {
    lag_s: Spanned<f64>,
    accel_limit_rad_s2: Spanned<f64>,
    coast_friction_rad_s2: Option<Spanned<f64>>,
    coast_viscous_per_s: Option<Spanned<f64>>,
}

/// Turns byte offsets into line numbers and builds errors (shared with the
/// ride-cycle program file).
pub(crate) struct Locator<'a> {
    pub(crate) source: &'a str,
    pub(crate) text: &'a str,
}

impl Locator<'_> {
    /// Reads a whole file, or an error naming it.
    pub(crate) fn read(path: &Path) -> Result<(String, String), RideFileError> {
        let name = path.display().to_string();
        match std::fs::read_to_string(path) {
            Ok(text) => Ok((text, name)),
            Err(e) => Err(RideFileError {
                source: name,
                line: None,
                field: None,
                message: format!("cannot read: {e}"),
            }),
        }
    }

    /// Parses the TOML text into `T`, a syntax or schema error at its line.
    pub(crate) fn parse<T: serde::de::DeserializeOwned>(&self) -> Result<T, RideFileError> {
        toml::from_str(self.text).map_err(|e| {
            self.error(
                e.span().map(|s| s.start),
                None,
                e.message().trim_end().to_owned(),
            )
        })
    }

    pub(crate) fn line_of(&self, offset: usize) -> usize {
        let end = offset.min(self.text.len());
        self.text
            .as_bytes()
            .get(..end)
            .map_or(0, |b| b.iter().filter(|&&c| c == b'\n').count())
            + 1
    }

    pub(crate) fn error(
        &self,
        offset: Option<usize>,
        field: Option<&str>,
        message: String,
    ) -> RideFileError {
        RideFileError {
            source: self.source.to_owned(),
            line: offset.map(|o| self.line_of(o)),
            field: field.map(str::to_owned),
            message,
        }
    }

    /// Checks a value with `check`, reporting a refusal at the value's line
    /// under `table.key`.
    pub(crate) fn value<T>(
        &self,
        table: &str,
        value: &Spanned<f64>,
        range: &str,
        check: impl FnOnce(f64) -> Result<T, ParamError>,
    ) -> Result<T, RideFileError> {
        check(*value.get_ref()).map_err(|e| {
            let key = e.parameter();
            let what = match e {
                ParamError::NonFinite(_) => "must be a finite number",
                ParamError::NotPositive(_) => "must be greater than zero",
                ParamError::Negative(_) => "must not be negative",
                _ => "is out of range",
            };
            self.error(
                Some(value.span().start),
                Some(&format!("{table}.{key}")),
                format!("{what} (allowed: {range})"),
            )
        })
    }
}

/// Checks a limit: finite and in (0, max] (also the program file's durations).
pub(crate) fn limit(name: &'static str, value: f64, max: f64) -> Result<f64, ParamError> {
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

/// Checks the `[interlock]` table against the ride's geometry and builds the
/// parameter set; a refusal points at the key's line.
fn interlock_params(
    at: &Locator<'_>,
    i: &RawInterlock,
    geometry: &RideGeometry,
) -> Result<SafetyParams, RideFileError> {
    let key_error = |span: &std::ops::Range<usize>, key: &str, message: String| {
        at.error(Some(span.start), Some(&format!("interlock.{key}")), message)
    };
    #[allow(clippy::cast_possible_truncation)]
    let f = |v: &Spanned<f64>| *v.get_ref() as f32;
    let ticks = |v: &Spanned<i64>, key: &str| {
        u16::try_from(*v.get_ref()).map_err(|_| {
            key_error(
                &v.span(),
                key,
                "must be a whole number from 1 to 65535".into(),
            )
        })
    };
    // The tolerance band defaults to the nominal geometry, with the longest
    // length 5 % above the nominal one.
    let nominal_length = f64::from(geometry.length_m());
    let band =
        |v: &Option<Spanned<f64>>, nominal: f64| v.as_ref().map_or(nominal, |v| *v.get_ref());
    let hub_offset_max = band(&i.hub_offset_max_m, f64::from(geometry.hub_offset_m()));
    let length_max = band(
        &i.length_max_m,
        nominal_length * (1.0 + DEFAULT_LENGTH_TOLERANCE),
    );
    let gravity_min = band(&i.gravity_min_mps2, f64::from(geometry.gravity().mps2()));
    let line_of_band = |v: &Option<Spanned<f64>>| v.as_ref().map_or(0..0, Spanned::span);
    if hub_offset_max < f64::from(geometry.hub_offset_m()) {
        return Err(key_error(
            &line_of_band(&i.hub_offset_max_m),
            "hub_offset_max_m",
            "must not be below [geometry] hub_offset_m".into(),
        ));
    }
    if length_max < nominal_length {
        return Err(key_error(
            &line_of_band(&i.length_max_m),
            "length_max_m",
            "must not be below [geometry] length_m".into(),
        ));
    }
    if gravity_min > f64::from(geometry.gravity().mps2()) {
        return Err(key_error(
            &line_of_band(&i.gravity_min_mps2),
            "gravity_min_mps2",
            "must not be above [geometry] gravity_mps2".into(),
        ));
    }
    #[allow(clippy::cast_possible_truncation)]
    let config = SafetyConfig {
        certified_angle_deg: f(&i.certified_angle_deg),
        max_load_factor: i.max_load_factor.as_ref().map(f),
        mechanical_max_rad_s: f(&i.mechanical_max_rad_s),
        hub_offset_max_m: hub_offset_max as f32,
        length_max_m: length_max as f32,
        gravity_min_mps2: gravity_min as f32,
        speed_margin_rad_s: f(&i.speed_margin_rad_s),
        max_acceleration_rad_s2: f(&i.max_acceleration_rad_s2),
        max_deceleration_rad_s2: f(&i.max_deceleration_rad_s2),
        max_jerk_rad_s3: f(&i.max_jerk_rad_s3),
        overspeed_tolerance_rad_s: f(&i.overspeed_tolerance_rad_s),
        following_tolerance_rad_s: f(&i.following_tolerance_rad_s),
        channel_tolerance_rad_s: f(&i.channel_tolerance_rad_s),
        sensor_max_rad_s: f(&i.sensor_max_rad_s),
        standstill_rad_s: f(&i.standstill_rad_s),
        tick_s: f(&i.tick_s),
        overrun_tick_s: f(&i.overrun_tick_s),
        stop_time_margin_s: f(&i.stop_time_margin_s),
        brake_delay_s: f(&i.brake_delay_s),
        debounce_ticks: ticks(&i.debounce_ticks, "debounce_ticks")?,
        stale_ticks: ticks(&i.stale_ticks, "stale_ticks")?,
        standstill_ticks: ticks(&i.standstill_ticks, "standstill_ticks")?,
        reverse: if *i.reverse_permitted.get_ref() {
            Reverse::Allowed
        } else {
            Reverse::Forbidden
        },
        second_channel: *i.second_channel.get_ref(),
        angle_sensor: *i.angle_sensor.get_ref(),
    };
    SafetyParams::new(config).map_err(|e| {
        let key = e.parameter();
        let span = [
            ("certified_angle_deg", i.certified_angle_deg.span()),
            ("max_load_factor", line_of_band(&i.max_load_factor)),
            ("mechanical_max_rad_s", i.mechanical_max_rad_s.span()),
            ("hub_offset_max_m", line_of_band(&i.hub_offset_max_m)),
            ("length_max_m", line_of_band(&i.length_max_m)),
            ("gravity_min_mps2", line_of_band(&i.gravity_min_mps2)),
            ("speed_margin_rad_s", i.speed_margin_rad_s.span()),
            ("max_acceleration_rad_s2", i.max_acceleration_rad_s2.span()),
            ("max_deceleration_rad_s2", i.max_deceleration_rad_s2.span()),
            ("max_jerk_rad_s3", i.max_jerk_rad_s3.span()),
            (
                "overspeed_tolerance_rad_s",
                i.overspeed_tolerance_rad_s.span(),
            ),
            (
                "following_tolerance_rad_s",
                i.following_tolerance_rad_s.span(),
            ),
            ("channel_tolerance_rad_s", i.channel_tolerance_rad_s.span()),
            ("sensor_max_rad_s", i.sensor_max_rad_s.span()),
            ("standstill_rad_s", i.standstill_rad_s.span()),
            ("tick_s", i.tick_s.span()),
            ("overrun_tick_s", i.overrun_tick_s.span()),
            ("stop_time_margin_s", i.stop_time_margin_s.span()),
            ("brake_delay_s", i.brake_delay_s.span()),
            ("debounce_ticks", i.debounce_ticks.span()),
            ("stale_ticks", i.stale_ticks.span()),
            ("standstill_ticks", i.standstill_ticks.span()),
        ]
        .into_iter()
        .find(|(k, _)| *k == key)
        .map(|(_, s)| s);
        at.error(
            span.filter(|s| s.end > 0).map(|s| s.start),
            Some(&format!("interlock.{key}")),
            format!("{e} (ranges in docs/files.md)"),
        )
    })
}

impl RideFile {
    /// Reads and validates a ride file.
    ///
    /// # Errors
    /// [`RideFileError`] naming the file, line and key.
    pub fn from_path(path: &Path) -> Result<Self, RideFileError> {
        let (text, name) = Locator::read(path)?;
        Self::from_toml_str(&text, &name)
    }

    /// Validates ride-file text; `source_name` names it in errors.
    ///
    /// # Errors
    /// [`RideFileError`] naming the source, line and key: TOML syntax,
    /// missing or unknown tables and keys, wrong types, values out of range.
    pub fn from_toml_str(text: &str, source_name: &str) -> Result<Self, RideFileError> {
        let at = Locator {
            source: source_name,
            text,
        };
        let raw: RawRideFile = at.parse()?;

        // Each key is checked on its own, through the constructor that owns its
        // range, so that a refusal can point at the key's line.
        let g = &raw.geometry;
        let gravity_mps2 = match &g.gravity_mps2 {
            None => f64::from(STANDARD_GRAVITY_MPS2),
            Some(v) => at.value("geometry", v, "9.7 to 9.9 m/s²", |x| {
                #[allow(clippy::cast_possible_truncation)]
                Gravity::new(x as f32).map(|_| x)
            })?,
        };
        let suspension = match g.suspension {
            RawSuspension::Chain => Suspension::Chain,
            RawSuspension::Rod => Suspension::Rod,
        };
        let hub_offset_m = at.value("geometry", &g.hub_offset_m, "0 to 100 m", |x| {
            SeatDynamics::new(x, 1.0, suspension, gravity_mps2).map(|_| x)
        })?;
        let length_m = at.value("geometry", &g.length_m, "0.01 to 100 m", |x| {
            SeatDynamics::new(0.0, x, suspension, gravity_mps2).map(|_| x)
        })?;
        let mut seat = SeatDynamics::new(hub_offset_m, length_m, suspension, gravity_mps2)
            .map_err(|e| at.error(None, Some("geometry"), e.to_string()))?;
        #[allow(clippy::cast_possible_truncation)]
        let geometry = Gravity::new(gravity_mps2 as f32)
            .and_then(|gravity| {
                RideGeometry::new(hub_offset_m as f32, length_m as f32, suspension, gravity)
            })
            .map_err(|e| at.error(None, Some("geometry"), e.to_string()))?;

        let l = &raw.limits;
        let accel_range = "above 0, up to 10 rad/s²";
        let limits = RideLimits {
            max_accel_rad_s2: at.value("limits", &l.max_accel_rad_s2, accel_range, |x| {
                limit("max_accel_rad_s2", x, MAX_LIMIT_ACCEL_RAD_S2)
            })?,
            max_decel_rad_s2: at.value("limits", &l.max_decel_rad_s2, accel_range, |x| {
                limit("max_decel_rad_s2", x, MAX_LIMIT_ACCEL_RAD_S2)
            })?,
            max_jerk_rad_s3: at.value(
                "limits",
                &l.max_jerk_rad_s3,
                "above 0, up to 100 rad/s³",
                |x| limit("max_jerk_rad_s3", x, MAX_LIMIT_JERK_RAD_S3),
            )?,
        };

        if let Some(damping) = raw.swing.as_ref().and_then(|s| s.damping_per_s.as_ref()) {
            seat = at.value("swing", damping, "0 to 10 1/s", |x| seat.with_damping(x))?;
        }

        let drive = match &raw.drive {
            None => None,
            Some(d) => {
                let zero = Spanned::new(0..0, 0.0);
                let friction = d.coast_friction_rad_s2.as_ref().unwrap_or(&zero);
                let viscous = d.coast_viscous_per_s.as_ref().unwrap_or(&zero);
                let lag = at.value("drive", &d.lag_s, "above 0, up to 60 s", |x| {
                    DriveModel::new(x, 1.0, 0.0, 0.0).map(|_| x)
                })?;
                let accel = at.value(
                    "drive",
                    &d.accel_limit_rad_s2,
                    "above 0, up to 100 rad/s²",
                    |x| DriveModel::new(1.0, x, 0.0, 0.0).map(|_| x),
                )?;
                let friction = at.value("drive", friction, "0 to 100 rad/s²", |x| {
                    DriveModel::new(1.0, 1.0, x, 0.0).map(|_| x)
                })?;
                let viscous = at.value("drive", viscous, "0 to 10 1/s", |x| {
                    DriveModel::new(1.0, 1.0, 0.0, x).map(|_| x)
                })?;
                Some(
                    DriveModel::new(lag, accel, friction, viscous)
                        .map_err(|e| at.error(None, Some("drive"), e.to_string()))?,
                )
            }
        };

        let interlock = match &raw.interlock {
            None => None,
            Some(i) => Some(interlock_params(&at, i, &geometry)?),
        };

        Ok(Self {
            geometry,
            seat,
            limits,
            drive,
            interlock,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = "[geometry]\nhub_offset_m = 3.6\nlength_m = 6\nsuspension = \"chain\"\n\n[limits]\nmax_accel_rad_s2 = 0.10\nmax_decel_rad_s2 = 0.12\nmax_jerk_rad_s3 = 0.05\n";

    #[test]
    fn a_minimal_file_reads_with_defaults() {
        let ride = RideFile::from_toml_str(GOOD, "r.toml").unwrap();
        assert_eq!(ride.seat.length_m(), 6.0);
        assert_eq!(ride.seat.gravity_mps2(), f64::from(STANDARD_GRAVITY_MPS2));
        assert_eq!(ride.seat.damping_per_s(), 0.0);
        assert_eq!(ride.geometry.suspension(), Suspension::Chain);
        assert_eq!(ride.limits.max_decel_rad_s2, 0.12);
        assert!(ride.drive.is_none());
    }

    #[test]
    fn optional_tables() {
        let text = format!(
            "{GOOD}\n[swing]\ndamping_per_s = 0.02\n\n[drive]\nlag_s = 0.5\naccel_limit_rad_s2 = 0.2\ncoast_friction_rad_s2 = 0.03\n"
        );
        let ride = RideFile::from_toml_str(&text, "r.toml").unwrap();
        assert_eq!(ride.seat.damping_per_s(), 0.02);
        let drive = ride.drive.unwrap();
        assert_eq!(drive.coast_friction_rad_s2(), 0.03);
        assert_eq!(drive.coast_viscous_per_s(), 0.0);
    }

    #[test]
    fn errors_name_file_line_and_key() {
        let e = RideFile::from_toml_str(&GOOD.replace("length_m = 6", "length_m = -6"), "r.toml")
            .unwrap_err();
        assert_eq!(
            e.to_string(),
            "r.toml: line 3, field `geometry.length_m`: must be greater than zero (allowed: 0.01 to 100 m)"
        );
        let e = RideFile::from_toml_str(
            &GOOD.replace("max_jerk_rad_s3 = 0.05", "max_jerk_rad_s3 = 500.0"),
            "r.toml",
        )
        .unwrap_err();
        assert_eq!(e.line(), Some(9));
        assert_eq!(e.field(), Some("limits.max_jerk_rad_s3"));
        let e =
            RideFile::from_toml_str(&GOOD.replace("length_m", "lenght_m"), "r.toml").unwrap_err();
        assert_eq!(e.line(), Some(3));
        assert!(e.message().contains("unknown field `lenght_m`"), "{e}");
        let e =
            RideFile::from_toml_str(&GOOD.replace("\"chain\"", "\"rope\""), "r.toml").unwrap_err();
        assert_eq!(e.line(), Some(4));
        assert!(e.message().contains("unknown variant `rope`"), "{e}");
        let e = RideFile::from_toml_str(&format!("{GOOD}[extra]\nx = 1\n"), "r.toml").unwrap_err();
        assert!(e.message().contains("unknown field `extra`"), "{e}");
        let e = RideFile::from_toml_str("[geometry]\nhub_offset_m = 3.6\n", "r.toml").unwrap_err();
        assert!(e.message().contains("missing field"), "{e}");
        let e =
            RideFile::from_toml_str(&GOOD.replace("= 0.10", "= \"fast\""), "r.toml").unwrap_err();
        assert_eq!(e.line(), Some(7));
        let e = RideFile::from_toml_str("[geometry\n", "r.toml").unwrap_err();
        assert_eq!(e.line(), Some(1));
    }

    const INTERLOCK: &str = "\n[interlock]\ncertified_angle_deg = 40.0\nmechanical_max_rad_s = 2.0\nspeed_margin_rad_s = 0.02\nmax_acceleration_rad_s2 = 0.1\nmax_deceleration_rad_s2 = 0.12\nmax_jerk_rad_s3 = 0.05\noverspeed_tolerance_rad_s = 0.05\nfollowing_tolerance_rad_s = 0.08\nchannel_tolerance_rad_s = 0.04\nsensor_max_rad_s = 5.0\nstandstill_rad_s = 0.01\ntick_s = 0.001\noverrun_tick_s = 0.002\nstop_time_margin_s = 2.0\nbrake_delay_s = 30.0\ndebounce_ticks = 5\nstale_ticks = 10\nstandstill_ticks = 50\nreverse_permitted = false\nsecond_channel = true\nangle_sensor = false\n";

    #[test]
    fn the_interlock_table_builds_the_parameter_set() {
        // Demo data (invented ride).
        let ride = RideFile::from_toml_str(&format!("{GOOD}{INTERLOCK}"), "r.toml").unwrap();
        let p = ride.interlock.unwrap();
        let c = p.config();
        assert_eq!(c.certified_angle_deg, 40.0);
        assert_eq!(c.hub_offset_max_m, 3.6);
        // Default band: 5 % over the nominal 6 m (docs/safety.md).
        assert!((c.length_max_m - 6.3).abs() < 1e-6);
        assert_eq!(c.gravity_min_mps2, STANDARD_GRAVITY_MPS2);
        assert_eq!(c.reverse, Reverse::Forbidden);
        assert!(c.second_channel);
        assert!(RideFile::from_toml_str(GOOD, "r.toml")
            .unwrap()
            .interlock
            .is_none());
    }

    #[test]
    fn interlock_errors_name_line_and_key() {
        let text = format!("{GOOD}{INTERLOCK}").replace("tick_s = 0.001", "tick_s = 0.5");
        let e = RideFile::from_toml_str(&text, "r.toml").unwrap_err();
        assert_eq!(e.field(), Some("interlock.tick_s"));
        assert_eq!(e.line(), Some(23));
        let text = format!("{GOOD}{INTERLOCK}length_max_m = 5.0\n");
        let e = RideFile::from_toml_str(&text, "r.toml").unwrap_err();
        assert_eq!(e.field(), Some("interlock.length_max_m"));
        let text = format!("{GOOD}{INTERLOCK}").replace("stale_ticks = 10", "stale_ticks = -1");
        let e = RideFile::from_toml_str(&text, "r.toml").unwrap_err();
        assert_eq!(e.field(), Some("interlock.stale_ticks"));
        let text = format!("{GOOD}{INTERLOCK}").replace("angle_sensor = false\n", "");
        let e = RideFile::from_toml_str(&text, "r.toml").unwrap_err();
        assert!(e.message().contains("missing field `angle_sensor`"), "{e}");
    }

    #[test]
    fn limits_against_a_profile() {
        let ride = RideFile::from_toml_str(GOOD, "r.toml").unwrap();
        let ok = ProfileStats {
            peak_accel_rad_s2: 0.05,
            peak_decel_rad_s2: 0.05,
            peak_jerk_rad_s3: 0.01,
            steps: 0,
            largest_step_rad_s: 0.0,
        };
        assert!(ride.limits.check(&ok).ok);
        let stepped = ProfileStats { steps: 1, ..ok };
        assert!(!ride.limits.check(&stepped).ok);
        let fast = ProfileStats {
            peak_accel_rad_s2: 0.2,
            ..ok
        };
        let report = ride.limits.check(&fast);
        assert!(!report.ok);
        assert!(report
            .checks
            .iter()
            .any(|c| c.limit == "max_accel_rad_s2" && !c.ok));
    }
}
