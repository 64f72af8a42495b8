//! Checks of every setting of a [`Model`] other than the increment controls
//! (which check themselves, [`IncrementControls::validate`]): contact
//! settings of the rigid bodies, fluids, inserts, the loads, ramps and
//! drives of each stage, and the linear solver's ordering. Each struct has
//! `validate` (and `checked`, which hands it back when valid);
//! [`Model::validate`] runs them all, and [`crate::driver::solve`] calls it
//! before any work, so a bad value is a typed error, never a panic or a run
//! that cannot end.

use thiserror::Error;

use super::{
    ControlsError, Fluid, FluidPressure, Force, Insert, InsertDrive, InsertStage, LinearSettings, Model, Motion, Ordering, Pressure, Ramp,
    RigidBody, RigidMotion, RotationMotion, Stage,
};

/// A setting that cannot drive a run, with where it sits.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum SettingsError {
    /// A number outside its allowed range (NaN included).
    #[error("{owner}: `{field}` must be {requirement}, got {value}")]
    OutOfRange {
        /// What the setting belongs to, e.g. "rigid body `groove`".
        owner: String,
        /// The field.
        field: &'static str,
        /// The value given.
        value: f64,
        /// What it must be.
        requirement: &'static str,
    },
    /// A ramp table point that is not finite, or out of order in t.
    #[error("{owner}: ramp point {index} ({t}, {fraction}) must be finite with t in [0, 1], not below the previous point's")]
    BadRampPoint {
        /// The stage and the ramp's key.
        owner: String,
        /// Index of the point in the table.
        index: usize,
        /// Its stage fraction.
        t: f64,
        /// Its load fraction.
        fraction: f64,
    },
    /// A custom ordering that is not a permutation of the equations.
    #[error("linear solver: the custom ordering is not a permutation: entry {index} is {value} ({reason})")]
    NotAPermutation {
        /// Index of the offending entry.
        index: usize,
        /// Its value.
        value: usize,
        /// Out of range, or repeated.
        reason: &'static str,
    },
    /// Increment controls of a stage.
    #[error("stage `{stage}`: {source}")]
    Controls {
        /// The stage.
        stage: String,
        /// What is wrong with its controls.
        #[source]
        source: ControlsError,
    },
}

/// A check of one number: `ok` and finite, else [`SettingsError::OutOfRange`]
/// naming `owner()`.
pub(crate) fn check(
    owner: impl Fn() -> String,
    field: &'static str,
    value: f64,
    ok: bool,
    requirement: &'static str,
) -> Result<(), SettingsError> {
    if ok && value.is_finite() {
        Ok(())
    } else {
        Err(SettingsError::OutOfRange { owner: owner(), field, value, requirement })
    }
}

/// Every component of `values` finite.
fn check_finite(owner: impl Fn() -> String, field: &'static str, values: &[f64]) -> Result<(), SettingsError> {
    values.iter().try_for_each(|&v| check(&owner, field, v, true, "finite"))
}

impl RigidBody {
    /// Checks the contact settings: friction ≥ 0, a positive normal penalty
    /// when given, a positive penetration tolerance, a finite centre and a
    /// non-zero finite axis of rotation.
    pub fn validate(&self) -> Result<(), SettingsError> {
        let owner = || format!("rigid body `{}`", self.name);
        check(owner, "friction", self.friction, self.friction >= 0.0, "non-negative")?;
        if let Some(p) = self.normal_penalty {
            check(owner, "normal_penalty", p, p > 0.0, "positive")?;
        }
        check(owner, "penetration_tolerance", self.penetration_tolerance, self.penetration_tolerance > 0.0, "positive")?;
        check_finite(owner, "rotation_center", &self.rotation_center)?;
        check_finite(owner, "rotation_axis", &self.rotation_axis)?;
        let length = self.rotation_axis.iter().map(|a| a * a).sum::<f64>().sqrt();
        check(owner, "rotation_axis", length, length > 0.0, "a non-zero vector")
    }

    /// The body, if [`Self::validate`] accepts it.
    pub fn checked(self) -> Result<Self, SettingsError> {
        self.validate().map(|_| self)
    }
}

impl Fluid {
    /// Checks the source point (finite).
    pub fn validate(&self) -> Result<(), SettingsError> {
        check_finite(|| format!("fluid `{}`", self.name), "source", &self.source)
    }

    /// The fluid, if [`Self::validate`] accepts it.
    pub fn checked(self) -> Result<Self, SettingsError> {
        self.validate().map(|_| self)
    }
}

impl Insert {
    /// Checks the reference point (finite).
    pub fn validate(&self) -> Result<(), SettingsError> {
        check_finite(|| format!("insert `{}`", self.name), "reference", &self.reference)
    }

    /// The insert, if [`Self::validate`] accepts it.
    pub fn checked(self) -> Result<Self, SettingsError> {
        self.validate().map(|_| self)
    }
}

impl Ramp {
    /// Checks a table ramp: finite points with t in [0, 1] and not
    /// decreasing. `owner` names the stage and the ramp's key in an error.
    pub fn validate(&self, owner: &str) -> Result<(), SettingsError> {
        let Ramp::Table(points) = self else { return Ok(()) };
        let mut previous = 0.0;
        for (index, &(t, fraction)) in points.iter().enumerate() {
            if !(t.is_finite() && fraction.is_finite() && (0.0..=1.0).contains(&t) && t >= previous) {
                return Err(SettingsError::BadRampPoint { owner: owner.to_string(), index, t, fraction });
            }
            previous = t;
        }
        Ok(())
    }
}

impl LinearSettings {
    /// Checks a custom ordering: every entry below its length and none
    /// repeated (its length against the equations is checked when the
    /// solver analyses them).
    pub fn validate(&self) -> Result<(), SettingsError> {
        let Ordering::Custom(perm) = &self.ordering else { return Ok(()) };
        let mut seen = vec![false; perm.len()];
        for (index, &value) in perm.iter().enumerate() {
            let reason = match seen.get_mut(value) {
                None => "out of range",
                Some(true) => "repeated",
                Some(s) => {
                    *s = true;
                    continue;
                }
            };
            return Err(SettingsError::NotAPermutation { index, value, reason });
        }
        Ok(())
    }

    /// The settings, if [`Self::validate`] accepts them.
    pub fn checked(self) -> Result<Self, SettingsError> {
        self.validate().map(|_| self)
    }
}

impl Stage {
    /// Checks the stage: its increment controls, a positive duration when
    /// given, finite loads, motions and drives, and its ramps.
    pub fn validate(&self) -> Result<(), SettingsError> {
        self.controls.validate().map_err(|source| SettingsError::Controls { stage: self.name.clone(), source })?;
        let owner = |what: &str, name: &str| format!("stage `{}`, {what} `{name}`", self.name);
        if let Some(d) = self.duration {
            check(|| format!("stage `{}`", self.name), "duration", d, d > 0.0, "positive")?;
        }
        for Motion { set, displacement } in &self.motions {
            let given: Vec<f64> = displacement.iter().flatten().copied().collect();
            check_finite(|| owner("motion of", set), "displacement", &given)?;
        }
        for RotationMotion { set, rotation, center, translation } in &self.rotations {
            let o = || owner("rotation of", set);
            check_finite(o, "rotation", rotation)?;
            check_finite(o, "center", center)?;
            check_finite(o, "translation", translation)?;
        }
        for Pressure { set, value } in &self.pressures {
            check_finite(|| owner("pressure on", set), "value", &[*value])?;
        }
        for Force { set, total } in &self.forces {
            check_finite(|| owner("force on", set), "total", total)?;
        }
        for FluidPressure { fluid, value } in &self.fluid_pressures {
            check_finite(|| owner("pressure of fluid", fluid), "value", &[*value])?;
        }
        if let Some(b) = &self.body_force {
            check_finite(|| format!("stage `{}`", self.name), "body_force", b)?;
        }
        for RigidMotion { body, translation, rotation } in &self.rigid_motions {
            let o = || owner("motion of rigid body", body);
            check_finite(o, "translation", translation)?;
            check_finite(o, "rotation", &[*rotation])?;
        }
        for InsertStage { insert, components } in &self.inserts {
            let drives: Vec<f64> = components
                .iter()
                .flatten()
                .map(|d| match *d {
                    InsertDrive::Move(v) | InsertDrive::Load(v) => v,
                })
                .collect();
            check_finite(|| owner("drive of insert", insert), "components", &drives)?;
        }
        for (key, ramp) in &self.ramps {
            ramp.validate(&owner("ramp", key))?;
        }
        Ok(())
    }
}

impl Model {
    /// Checks every setting of the model: each stage (increment controls
    /// included), rigid body, fluid and insert, and the linear solver's
    /// ordering. The first bad value is the error.
    pub fn validate(&self) -> Result<(), SettingsError> {
        self.stages.iter().try_for_each(Stage::validate)?;
        self.rigid.iter().try_for_each(RigidBody::validate)?;
        self.fluids.iter().try_for_each(Fluid::validate)?;
        self.inserts.iter().try_for_each(Insert::validate)?;
        self.linear.validate()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::RigidShape;

    fn body() -> RigidBody {
        RigidBody::new("groove", RigidShape::Plane { point: [0.0; 3], normal: [0.0, 1.0, 0.0] }, "top")
    }

    fn field_of(e: SettingsError) -> &'static str {
        match e {
            SettingsError::OutOfRange { field, .. } => field,
            other => panic!("expected an out-of-range error, got {other}"),
        }
    }

    #[test]
    fn rigid_bodies_refuse_nan_negative_zero_and_infinite_contact_settings() {
        assert!(body().validate().is_ok());
        for (f, field) in [(f64::NAN, "friction"), (-0.1, "friction"), (f64::INFINITY, "friction")] {
            assert_eq!(field_of(RigidBody { friction: f, ..body() }.checked().unwrap_err()), field);
        }
        for p in [0.0, -1.0, f64::NAN] {
            let e = RigidBody { normal_penalty: Some(p), ..body() }.validate().unwrap_err();
            assert!(e.to_string().contains("rigid body `groove`: `normal_penalty` must be positive"), "{e}");
        }
        for t in [0.0, -1e-3, f64::NAN, f64::INFINITY] {
            assert_eq!(field_of(RigidBody { penetration_tolerance: t, ..body() }.validate().unwrap_err()), "penetration_tolerance");
        }
        assert_eq!(field_of(RigidBody { rotation_axis: [0.0; 3], ..body() }.validate().unwrap_err()), "rotation_axis");
        assert_eq!(field_of(RigidBody { rotation_center: [0.0, f64::NAN, 0.0], ..body() }.validate().unwrap_err()), "rotation_center");
    }

    #[test]
    fn fluids_inserts_and_orderings_refuse_bad_values() {
        let fluid = Fluid { name: "oil".into(), sides: "wet".into(), source: [0.0, f64::NAN, 0.0] };
        assert!(fluid.validate().unwrap_err().to_string().contains("fluid `oil`: `source` must be finite"));
        let insert = Insert { name: "pin".into(), set: "bore".into(), reference: [f64::INFINITY, 0.0, 0.0], free: [false; 6] };
        assert_eq!(field_of(insert.checked().unwrap_err()), "reference");
        let ok = LinearSettings { ordering: Ordering::Custom(vec![2, 0, 1]) };
        assert!(ok.validate().is_ok());
        let out = LinearSettings { ordering: Ordering::Custom(vec![0, 3, 1]) };
        assert_eq!(out.validate(), Err(SettingsError::NotAPermutation { index: 1, value: 3, reason: "out of range" }));
        let twice = LinearSettings { ordering: Ordering::Custom(vec![1, 0, 1]) };
        assert_eq!(twice.validate(), Err(SettingsError::NotAPermutation { index: 2, value: 1, reason: "repeated" }));
    }

    #[test]
    fn stages_refuse_bad_durations_loads_ramps_and_controls() {
        let stage = |f: &dyn Fn(&mut Stage)| {
            let mut s = Stage { name: "squeeze".into(), ..Default::default() };
            f(&mut s);
            s.validate()
        };
        assert!(stage(&|_| {}).is_ok());
        for d in [0.0, -1.0, f64::NAN, f64::INFINITY] {
            assert_eq!(field_of(stage(&|s| s.duration = Some(d)).unwrap_err()), "duration");
        }
        let e = stage(&|s| s.pressures.push(Pressure { set: "top".into(), value: f64::NAN })).unwrap_err();
        assert!(e.to_string().contains("stage `squeeze`, pressure on `top`: `value` must be finite, got NaN"), "{e}");
        let e = stage(&|s| s.motions.push(Motion { set: "top".into(), displacement: [None, Some(f64::INFINITY), None] })).unwrap_err();
        assert_eq!(field_of(e), "displacement");
        let e = stage(&|s| s.fluid_pressures.push(FluidPressure { fluid: "oil".into(), value: f64::NAN })).unwrap_err();
        assert_eq!(field_of(e), "value");
        let e = stage(&|s| {
            s.inserts
                .push(InsertStage { insert: "pin".into(), components: [Some(InsertDrive::Load(f64::NAN)), None, None, None, None, None] })
        })
        .unwrap_err();
        assert_eq!(field_of(e), "components");
        // Ramp tables: out of order, outside [0, 1], not finite.
        for points in [vec![(0.5, 0.2), (0.25, 1.0)], vec![(0.0, 0.0), (1.5, 1.0)], vec![(0.0, f64::NAN)]] {
            let e = stage(&|s| {
                s.ramps.insert("top".into(), Ramp::Table(points.clone()));
            })
            .unwrap_err();
            assert!(matches!(e, SettingsError::BadRampPoint { .. }), "{e}");
        }
        // The stage's increment controls: min above max.
        let e = stage(&|s| {
            s.controls.min = 0.5;
            s.controls.max = 0.1;
        })
        .unwrap_err();
        assert!(matches!(e, SettingsError::Controls { source: ControlsError::MinAboveMax { .. }, .. }), "{e}");
    }
}
