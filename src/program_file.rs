//! The ride-cycle program file (TOML, host only, feature `std`).
//!
//! A cycle written down once, as a list of `[[step]]` tables; every key is
//! documented in `docs/files.md`. Unknown keys, and keys that do not belong to
//! a step's kind, are refused with the file, line and key, so a typo cannot
//! silently change what the ride does.
//!
//! ```toml
//! name = "demo cycle"            # optional
//!
//! [[step]]
//! kind = "confirm"               # wait for the operator
//! label = "riders seated"        # optional, for logs
//! answer_after_s = 4.0           # scripted answer (CLI); or --auto-confirm
//!
//! [[step]]
//! kind = "ramp"                  # time-optimal ramp under the certified limits
//! to_angle_deg = 35.0            # or to_speed_rad_s, or to_speed_rpm
//!
//! [[step]]
//! kind = "hold"
//! duration_s = 20.0
//!
//! [[step]]
//! kind = "swing_free"            # a designed swing-free table
//! to_angle_deg = 45.0
//! duration_s = 30.0              # optional: shortest meeting the target if absent
//!
//! [[step]]
//! kind = "stop"                  # ramp down to rest; ends the program
//! ```

use std::path::Path;

use serde::Deserialize;
use toml::Spanned;

use crate::error::ParamError;
use crate::geometry::RideGeometry;
use crate::ride_file::{limit, Locator, RideFileError};
use crate::units::{Angle, AngularSpeed};

/// Most steps a program file may hold (the firmware's program capacity is its
/// own choice; the CLI runs programs of up to this many steps).
pub const MAX_PROGRAM_STEPS: usize = 64;

/// A step's target: an angle at the nominal geometry, or a speed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum TargetSpec {
    /// Steady swing angle, °.
    AngleDeg(f64),
    /// Shaft speed, rad/s.
    SpeedRadS(f64),
    /// Shaft speed, rpm.
    SpeedRpm(f64),
}

impl TargetSpec {
    /// The shaft speed for this target on `ride`, rad/s.
    ///
    /// # Errors
    /// [`ParamError`] from the steady-state solve (an angle out of range).
    pub fn speed_rad_s(&self, ride: &RideGeometry) -> Result<f64, ParamError> {
        #[allow(clippy::cast_possible_truncation)]
        Ok(match *self {
            Self::AngleDeg(deg) => f64::from(
                ride.speed_for_angle(Angle::from_deg(deg as f32))?
                    .rad_per_s(),
            ),
            Self::SpeedRadS(w) => w,
            Self::SpeedRpm(rpm) => f64::from(AngularSpeed::from_rpm(rpm as f32).rad_per_s()),
        })
    }
}

/// What one step does.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum StepAction {
    /// Time-optimal ramp to the target.
    Ramp(TargetSpec),
    /// A designed swing-free transition to the target, of the given duration
    /// (s) or the shortest that meets the residual-swing target.
    SwingFree {
        /// The target.
        target: TargetSpec,
        /// Duration, s.
        duration_s: Option<f64>,
    },
    /// Keep the speed, s.
    Hold {
        /// Duration, s.
        duration_s: f64,
    },
    /// Wait for the operator; the scripted answer comes this many seconds
    /// after the wait starts (`None`: only `--auto-confirm` answers).
    Confirm {
        /// Seconds after the wait starts.
        answer_after_s: Option<f64>,
    },
    /// Ramp down to rest and end the program.
    Stop,
}

/// One step as written.
#[derive(Debug, Clone, PartialEq)]
pub struct ProgramStep {
    /// Line of the step's `kind` key, 1-based.
    pub line: usize,
    /// Optional label for logs.
    pub label: Option<String>,
    /// What it does.
    pub action: StepAction,
}

impl ProgramStep {
    /// The label, or the step kind when there is none.
    #[must_use]
    pub fn title(&self) -> String {
        self.label.clone().unwrap_or_else(|| {
            match self.action {
                StepAction::Ramp(_) => "ramp",
                StepAction::SwingFree { .. } => "swing-free transition",
                StepAction::Hold { .. } => "hold",
                StepAction::Confirm { .. } => "operator confirmation",
                StepAction::Stop => "stop",
            }
            .to_owned()
        })
    }
}

/// A read program file.
#[derive(Debug, Clone, PartialEq)]
pub struct ProgramFile {
    /// The program's name, if given.
    pub name: Option<String>,
    /// The steps, in order.
    pub steps: Vec<ProgramStep>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawProgram {
    name: Option<String>,
    step: Vec<RawStep>,
}

#[derive(Deserialize)]
#[serde(deny_unknown_fields)]
struct RawStep {
    kind: Spanned<String>,
    label: Option<String>,
    to_angle_deg: Option<Spanned<f64>>,
    to_speed_rad_s: Option<Spanned<f64>>,
    to_speed_rpm: Option<Spanned<f64>>,
    duration_s: Option<Spanned<f64>>,
    answer_after_s: Option<Spanned<f64>>,
}

impl ProgramFile {
    /// Reads and checks a program file (syntax, kinds, keys, ranges; the
    /// check against the ride's parameter set comes when the program is
    /// built, [`crate::program::Program::new`]).
    ///
    /// # Errors
    /// [`RideFileError`] naming the file, line and key.
    pub fn from_path(path: &Path) -> Result<Self, RideFileError> {
        let (text, name) = Locator::read(path)?;
        Self::from_toml_str(&text, &name)
    }

    /// Checks program text; `source_name` names it in errors.
    ///
    /// # Errors
    /// [`RideFileError`] naming the source, line and key.
    pub fn from_toml_str(text: &str, source_name: &str) -> Result<Self, RideFileError> {
        let at = Locator {
            source: source_name,
            text,
        };
        let raw: RawProgram = at.parse()?;
        if raw.step.is_empty() {
            return Err(at.error(None, Some("step"), "the program has no step".to_owned()));
        }
        if raw.step.len() > MAX_PROGRAM_STEPS {
            return Err(at.error(
                None,
                Some("step"),
                format!("more than {MAX_PROGRAM_STEPS} steps"),
            ));
        }
        let mut steps = Vec::with_capacity(raw.step.len());
        for (i, s) in raw.step.iter().enumerate() {
            let table = format!("step[{}]", i + 1);
            let kind_at = s.kind.span().start;
            // Keys a kind does not use are refused, not ignored.
            let reject = |key: &str, v: &Option<Spanned<f64>>| -> Result<(), RideFileError> {
                match v {
                    Some(v) => Err(at.error(
                        Some(v.span().start),
                        Some(&format!("{table}.{key}")),
                        format!("not a key of a `{}` step", s.kind.get_ref()),
                    )),
                    None => Ok(()),
                }
            };
            let target = || -> Result<TargetSpec, RideFileError> {
                let given: Vec<(&str, &Spanned<f64>)> = [
                    ("to_angle_deg", &s.to_angle_deg),
                    ("to_speed_rad_s", &s.to_speed_rad_s),
                    ("to_speed_rpm", &s.to_speed_rpm),
                ]
                .into_iter()
                .filter_map(|(k, v)| v.as_ref().map(|v| (k, v)))
                .collect();
                match given.as_slice() {
                    [(key, v)] => {
                        let value = *v.get_ref();
                        let range = match *key {
                            "to_angle_deg" => "0 to 85°",
                            _ => "0 to 100 rad/s (or the rpm equivalent)",
                        };
                        at.value(&table, v, range, |x| {
                            if !x.is_finite() {
                                Err(ParamError::NonFinite(key_name(key)))
                            } else if x < 0.0 {
                                Err(ParamError::Negative(key_name(key)))
                            } else {
                                Ok(x)
                            }
                        })?;
                        Ok(match *key {
                            "to_angle_deg" => TargetSpec::AngleDeg(value),
                            "to_speed_rad_s" => TargetSpec::SpeedRadS(value),
                            _ => TargetSpec::SpeedRpm(value),
                        })
                    }
                    [] => Err(at.error(
                        Some(kind_at),
                        Some(&format!("{table}.to_angle_deg")),
                        "needs one of to_angle_deg, to_speed_rad_s, to_speed_rpm".to_owned(),
                    )),
                    [_, (key, v), ..] => Err(at.error(
                        Some(v.span().start),
                        Some(&format!("{table}.{key}")),
                        "give only one of to_angle_deg, to_speed_rad_s, to_speed_rpm".to_owned(),
                    )),
                }
            };
            let action = match s.kind.get_ref().as_str() {
                "ramp" => {
                    reject("duration_s", &s.duration_s)?;
                    reject("answer_after_s", &s.answer_after_s)?;
                    StepAction::Ramp(target()?)
                }
                "swing_free" => {
                    reject("answer_after_s", &s.answer_after_s)?;
                    let duration_s =
                        match &s.duration_s {
                            Some(v) => Some(at.value(&table, v, "(0, 600] s", |x| {
                                limit("duration_s", x, 600.0)
                            })?),
                            None => None,
                        };
                    StepAction::SwingFree {
                        target: target()?,
                        duration_s,
                    }
                }
                "hold" => {
                    reject("to_angle_deg", &s.to_angle_deg)?;
                    reject("to_speed_rad_s", &s.to_speed_rad_s)?;
                    reject("to_speed_rpm", &s.to_speed_rpm)?;
                    reject("answer_after_s", &s.answer_after_s)?;
                    let Some(v) = &s.duration_s else {
                        return Err(at.error(
                            Some(kind_at),
                            Some(&format!("{table}.duration_s")),
                            "a hold needs duration_s".to_owned(),
                        ));
                    };
                    StepAction::Hold {
                        duration_s: at.value(&table, v, "(0, 86400] s", |x| {
                            limit("duration_s", x, 86_400.0)
                        })?,
                    }
                }
                "confirm" => {
                    reject("to_angle_deg", &s.to_angle_deg)?;
                    reject("to_speed_rad_s", &s.to_speed_rad_s)?;
                    reject("to_speed_rpm", &s.to_speed_rpm)?;
                    reject("duration_s", &s.duration_s)?;
                    let answer_after_s = match &s.answer_after_s {
                        Some(v) => Some(at.value(&table, v, "(0, 86400] s", |x| {
                            limit("answer_after_s", x, 86_400.0)
                        })?),
                        None => None,
                    };
                    StepAction::Confirm { answer_after_s }
                }
                "stop" => {
                    reject("to_angle_deg", &s.to_angle_deg)?;
                    reject("to_speed_rad_s", &s.to_speed_rad_s)?;
                    reject("to_speed_rpm", &s.to_speed_rpm)?;
                    reject("duration_s", &s.duration_s)?;
                    reject("answer_after_s", &s.answer_after_s)?;
                    StepAction::Stop
                }
                other => {
                    return Err(at.error(
                        Some(kind_at),
                        Some(&format!("{table}.kind")),
                        format!(
                            "unknown step kind `{other}` (ramp, swing_free, hold, confirm, stop)"
                        ),
                    ))
                }
            };
            steps.push(ProgramStep {
                line: at.line_of(kind_at),
                label: s.label.clone(),
                action,
            });
        }
        Ok(Self {
            name: raw.name,
            steps,
        })
    }
}

/// The `'static` name of a target key, for [`ParamError`].
fn key_name(key: &str) -> &'static str {
    match key {
        "to_angle_deg" => "to_angle_deg",
        "to_speed_rad_s" => "to_speed_rad_s",
        _ => "to_speed_rpm",
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"
name = "test cycle"
[[step]]
kind = "confirm"
answer_after_s = 2.0
[[step]]
kind = "ramp"
to_angle_deg = 30.0
[[step]]
kind = "hold"
duration_s = 5.0
[[step]]
kind = "swing_free"
to_speed_rpm = 9.0
[[step]]
kind = "stop"
"#;

    #[test]
    fn reads_every_kind() {
        let p = ProgramFile::from_toml_str(GOOD, "good.toml").unwrap();
        assert_eq!(p.name.as_deref(), Some("test cycle"));
        assert_eq!(p.steps.len(), 5);
        assert_eq!(
            p.steps[0].action,
            StepAction::Confirm {
                answer_after_s: Some(2.0)
            }
        );
        assert_eq!(
            p.steps[1].action,
            StepAction::Ramp(TargetSpec::AngleDeg(30.0))
        );
        assert_eq!(p.steps[1].line, 7);
        assert_eq!(
            p.steps[3].action,
            StepAction::SwingFree {
                target: TargetSpec::SpeedRpm(9.0),
                duration_s: None
            }
        );
        assert_eq!(p.steps[4].action, StepAction::Stop);
    }

    fn refused(text: &str) -> RideFileError {
        ProgramFile::from_toml_str(text, "p.toml").unwrap_err()
    }

    #[test]
    fn refusals_name_line_and_key() {
        let e = refused("[[step]]\nkind = \"hold\"\nduration_s = -1.0\n");
        assert_eq!(e.line(), Some(3));
        assert_eq!(e.field(), Some("step[1].duration_s"));
        let e = refused("[[step]]\nkind = \"hold\"\nto_angle_deg = 10.0\nduration_s = 1.0\n");
        assert_eq!(e.field(), Some("step[1].to_angle_deg"));
        let e = refused("[[step]]\nkind = \"spin\"\n");
        assert_eq!(e.field(), Some("step[1].kind"));
        let e = refused("[[step]]\nkind = \"ramp\"\nto_angle_deg = 10.0\nto_speed_rpm = 3.0\n");
        assert_eq!(e.field(), Some("step[1].to_speed_rpm"));
        let e = refused("[[step]]\nkind = \"ramp\"\n");
        assert!(e.message().contains("needs one of"));
        let e = refused("[[step]]\nkind = \"ramp\"\nto_angle_deg = nan\n");
        assert_eq!(e.field(), Some("step[1].to_angle_deg"));
        let e = refused("[[step]]\nkind = \"stop\"\nspeed = 1.0\n");
        assert_eq!(e.line(), Some(3));
        assert!(refused("name = \"x\"\nstep = []\n")
            .message()
            .contains("no step"));
    }
}
