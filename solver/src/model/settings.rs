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
    ControlsError, ExtrusionGap, Fluid, FluidPressure, Force, Gland, Insert, InsertDrive, InsertStage, LinearSettings, Model, Motion,
    Ordering, Pressure, Ramp, RigidBody, RigidMotion, RigidShape, RotationMotion, Stage, Threads,
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
    /// A name that refers to nothing in the model (a rigid body, a node set).
    #[error("{owner}: `{field}` names {kind} `{name}`, which the model does not have")]
    UnknownName {
        /// What the setting belongs to, e.g. "gland `rod`".
        owner: String,
        /// The field holding the name.
        field: &'static str,
        /// What kind of thing the name should be ("rigid body", "node set").
        kind: &'static str,
        /// The name given.
        name: String,
    },
    /// A gland whose groove is not a profile (a polyline or an arc).
    #[error("gland `{gland}`: its groove `{groove}` is not a profile (polyline or arc)")]
    GrooveNotProfile {
        /// The gland.
        gland: String,
        /// The rigid body named as its groove.
        groove: String,
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

/// `Ok` when `name` is one of `rigid`'s bodies, else [`SettingsError::UnknownName`].
fn check_rigid_name(rigid: &[RigidBody], owner: impl Fn() -> String, field: &'static str, name: &str) -> Result<(), SettingsError> {
    if rigid.iter().any(|r| r.name == name) {
        Ok(())
    } else {
        Err(SettingsError::UnknownName { owner: owner(), field, kind: "rigid body", name: name.to_string() })
    }
}

impl Gland {
    /// Checks that the groove and the closing surface are bodies of
    /// `rigid`, and that the groove is a profile.
    pub fn validate(&self, rigid: &[RigidBody]) -> Result<(), SettingsError> {
        let owner = || format!("gland `{}`", self.name);
        check_rigid_name(rigid, owner, "groove", &self.groove)?;
        check_rigid_name(rigid, owner, "closed_by", &self.closed_by)?;
        match rigid.iter().find(|r| r.name == self.groove).map(|r| &r.shape) {
            Some(RigidShape::Profile(_)) => Ok(()),
            _ => Err(SettingsError::GrooveNotProfile { gland: self.name.clone(), groove: self.groove.clone() }),
        }
    }
}

impl ExtrusionGap {
    /// Checks a finite edge, a finite non-zero direction, a positive finite
    /// `max_depth` when given, and that `follows` and `nodes` name a rigid
    /// body of `rigid` and a node set of `mesh`.
    pub fn validate(&self, rigid: &[RigidBody], mesh: &olli_mesh::Mesh) -> Result<(), SettingsError> {
        let owner = || format!("extrusion gap `{}`", self.name);
        check_finite(owner, "edge", &self.edge)?;
        check_finite(owner, "into", &self.into)?;
        let length = self.into.iter().map(|c| c * c).sum::<f64>().sqrt();
        check(owner, "into", length, length > 0.0, "a non-zero direction (its length)")?;
        if let Some(d) = self.max_depth {
            check(owner, "max_depth", d, d > 0.0, "positive")?;
        }
        if let Some(f) = &self.follows {
            check_rigid_name(rigid, owner, "follows", f)?;
        }
        match &self.nodes {
            Some(set) if mesh.nodes_of_set(set).is_none() => {
                Err(SettingsError::UnknownName { owner: owner(), field: "nodes", kind: "node set", name: set.clone() })
            }
            _ => Ok(()),
        }
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
        let owner = || "linear solver".to_string();
        if let Threads::Count(n) = self.threads {
            check(owner, "threads", n as f64, n >= 1, "at least 1")?;
        }
        let r = &self.reuse;
        check(owner, "reuse.max_iterations", r.max_iterations as f64, r.max_iterations >= 1, "at least 1")?;
        check(owner, "reuse.tolerance", r.tolerance, r.tolerance > 0.0 && r.tolerance < 1.0, "in (0, 1)")?;
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
    /// included), rigid body, fluid, insert, gland and extrusion gap (the
    /// names they give included), and the linear solver's
    /// ordering. The first bad value is the error.
    pub fn validate(&self) -> Result<(), SettingsError> {
        self.stages.iter().try_for_each(Stage::validate)?;
        self.rigid.iter().try_for_each(RigidBody::validate)?;
        self.fluids.iter().try_for_each(Fluid::validate)?;
        self.inserts.iter().try_for_each(Insert::validate)?;
        self.glands.iter().try_for_each(|g| g.validate(&self.rigid))?;
        self.extrusion_gaps.iter().try_for_each(|x| x.validate(&self.rigid, &self.mesh))?;
        self.linear.validate()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
    fn glands_and_extrusion_gaps_refuse_unknown_names_and_bad_values() {
        use crate::rigid_surface::Piece2;
        let groove = RigidBody::new("groove", RigidShape::Profile(vec![Piece2::Segment { a: [0.0, 0.0], b: [1.0, 0.0] }]), "seat");
        let bore = RigidBody::new("bore", RigidShape::Line { point: [0.0, 2.0], direction: [-1.0, 0.0] }, "top");
        let rigid = [groove, bore];
        let gland = Gland { name: "rod".into(), groove: "groove".into(), closed_by: "bore".into() };
        assert!(gland.validate(&rigid).is_ok());
        let e = Gland { closed_by: "cover".into(), ..gland.clone() }.validate(&rigid).unwrap_err();
        assert_eq!(e.to_string(), "gland `rod`: `closed_by` names rigid body `cover`, which the model does not have");
        let e = Gland { groove: "bore".into(), closed_by: "groove".into(), ..gland }.validate(&rigid).unwrap_err();
        assert_eq!(e, SettingsError::GrooveNotProfile { gland: "rod".into(), groove: "bore".into() });

        let mut mesh = olli_mesh::generate::rectangle(&Default::default()).unwrap();
        mesh.node_sets.insert("lip".into(), vec![0, 1]);
        let gap =
            ExtrusionGap { name: "gap".into(), edge: [1.0, 2.0, 0.0], into: [1.0, 0.0, 0.0], follows: None, nodes: None, max_depth: None };
        assert!(gap.validate(&rigid, &mesh).is_ok());
        let ok = ExtrusionGap { follows: Some("bore".into()), nodes: Some("lip".into()), max_depth: Some(0.1), ..gap.clone() };
        assert!(ok.validate(&rigid, &mesh).is_ok());
        let unknown = |g: ExtrusionGap| match g.validate(&rigid, &mesh).unwrap_err() {
            SettingsError::UnknownName { field, kind, .. } => (field, kind),
            other => panic!("expected an unknown name, got {other}"),
        };
        assert_eq!(unknown(ExtrusionGap { follows: Some("rod".into()), ..gap.clone() }), ("follows", "rigid body"));
        assert_eq!(unknown(ExtrusionGap { nodes: Some("heel".into()), ..gap.clone() }), ("nodes", "node set"));
        assert_eq!(field_of(ExtrusionGap { into: [0.0; 3], ..gap.clone() }.validate(&rigid, &mesh).unwrap_err()), "into");
        assert_eq!(field_of(ExtrusionGap { edge: [f64::NAN, 0.0, 0.0], ..gap.clone() }.validate(&rigid, &mesh).unwrap_err()), "edge");
        for d in [0.0, -0.1, f64::INFINITY] {
            assert_eq!(field_of(ExtrusionGap { max_depth: Some(d), ..gap.clone() }.validate(&rigid, &mesh).unwrap_err()), "max_depth");
        }
    }

    #[test]
    fn fluids_inserts_and_orderings_refuse_bad_values() {
        let fluid = Fluid { name: "oil".into(), sides: "wet".into(), source: [0.0, f64::NAN, 0.0] };
        assert!(fluid.validate().unwrap_err().to_string().contains("fluid `oil`: `source` must be finite"));
        let insert = Insert { name: "pin".into(), set: "bore".into(), reference: [f64::INFINITY, 0.0, 0.0], free: [false; 6] };
        assert_eq!(field_of(insert.checked().unwrap_err()), "reference");
        let ok = LinearSettings { ordering: Ordering::Custom(vec![2, 0, 1]), ..Default::default() };
        assert!(ok.validate().is_ok());
        let out = LinearSettings { ordering: Ordering::Custom(vec![0, 3, 1]), ..Default::default() };
        assert_eq!(out.validate(), Err(SettingsError::NotAPermutation { index: 1, value: 3, reason: "out of range" }));
        let twice = LinearSettings { ordering: Ordering::Custom(vec![1, 0, 1]), ..Default::default() };
        assert_eq!(twice.validate(), Err(SettingsError::NotAPermutation { index: 2, value: 1, reason: "repeated" }));
        let field = |s: LinearSettings| match s.validate() {
            Err(SettingsError::OutOfRange { field, .. }) => field,
            other => panic!("{other:?}"),
        };
        assert_eq!(field(LinearSettings { threads: Threads::Count(0), ..Default::default() }), "threads");
        let reuse = |max_iterations, tolerance| LinearSettings {
            reuse: crate::model::FactorReuse { enabled: true, max_iterations, tolerance },
            ..Default::default()
        };
        assert_eq!(field(reuse(0, 1e-10)), "reuse.max_iterations");
        assert_eq!(field(reuse(20, 0.0)), "reuse.tolerance");
        assert_eq!(field(reuse(20, f64::NAN)), "reuse.tolerance");
        assert!(reuse(1, 0.5).validate().is_ok() && LinearSettings::default().validate().is_ok());
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
