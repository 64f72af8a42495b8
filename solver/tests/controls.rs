//! Increment controls are checked where a solve starts: bad settings given
//! through the library API return a typed error naming the stage and the
//! field, never a panic (`clamp` with min > max once panicked) or an endless
//! cutback loop (min = 0, or a cutback that does not shrink the step).

use std::sync::Arc;

use olli_mesh::{ElementKind, Mesh};
use olli_solver::material::{registry, VolumetricForm};
use olli_solver::model::ControlsError;
use olli_solver::{solve, Analysis, Formulation, IncrementControls, Model, Motion, Quiet, SolveError, Stage, Support};

/// One unit cube squeezed by 10 % (one element is enough: only the checks run).
fn cube_model(controls: IncrementControls) -> Model {
    let mut mesh = Mesh::new(3);
    for k in 0..2 {
        for j in 0..2 {
            for i in 0..2 {
                mesh.add_node([i as f64, j as f64, k as f64]);
            }
        }
    }
    mesh.add_element(ElementKind::Hex8, &[0, 1, 3, 2, 4, 5, 7, 6]);
    mesh.node_sets.insert("bottom".into(), vec![0, 1, 2, 3]);
    mesh.node_sets.insert("top".into(), vec![4, 5, 6, 7]);
    let rubber = registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)], VolumetricForm::Quadratic).unwrap();
    let mut model = Model::single_region(mesh, Analysis::Solid3d, Arc::new(rubber), Formulation::Mixed);
    model.stages.push(Stage {
        name: "squeeze".into(),
        controls,
        supports: vec![Support { set: "bottom".into(), components: [true; 3] }],
        motions: vec![Motion { set: "top".into(), displacement: [Some(0.0), Some(0.0), Some(-0.1)] }],
        ..Default::default()
    });
    model
}

fn rejected(controls: IncrementControls) -> ControlsError {
    let err = controls.validate().unwrap_err();
    match solve(&cube_model(controls), &mut Quiet) {
        Err(SolveError::BadControls { stage, source }) => {
            assert_eq!(stage, "squeeze");
            assert_eq!(source.to_string(), err.to_string());
        }
        other => panic!("expected BadControls, got {other:?}"),
    }
    err
}

#[test]
fn min_above_max_is_an_error_not_a_panic() {
    let err = rejected(IncrementControls { min: 0.5, max: 0.1, ..Default::default() });
    assert_eq!(err, ControlsError::MinAboveMax { min: 0.5, max: 0.1 });
}

#[test]
fn zero_min_increment_is_rejected() {
    let err = rejected(IncrementControls { min: 0.0, ..Default::default() });
    assert!(matches!(err, ControlsError::OutOfRange { field: "min", .. }), "{err}");
}

#[test]
fn cutback_that_does_not_shrink_is_rejected() {
    for cutback in [1.0, 1.5, 0.0] {
        let err = rejected(IncrementControls { cutback, ..Default::default() });
        assert!(matches!(err, ControlsError::OutOfRange { field: "cutback", .. }), "{err}");
    }
}

#[test]
fn nan_settings_are_rejected() {
    let err = rejected(IncrementControls { first: f64::NAN, ..Default::default() });
    assert!(matches!(err, ControlsError::OutOfRange { field: "first", .. }), "{err}");
    let err = rejected(IncrementControls { force_tolerance: f64::NAN, ..Default::default() });
    assert!(matches!(err, ControlsError::OutOfRange { field: "force_tolerance", .. }), "{err}");
    let err = rejected(IncrementControls { max: f64::INFINITY, ..Default::default() });
    assert!(matches!(err, ControlsError::OutOfRange { field: "max", .. }), "{err}");
}

/// The defaults pass, and the cube then solves (the check does not reject
/// what the solver has always accepted).
#[test]
fn default_controls_are_valid_and_solve() {
    IncrementControls::default().validate().unwrap();
    let sol = solve(&cube_model(IncrementControls::default()), &mut Quiet).unwrap();
    assert!(sol.completed());
}

/// Settings other than the increment controls are checked where a solve
/// starts too: a NaN friction, a zero penetration tolerance, a ramp out of
/// order and a custom ordering that is no permutation (which once indexed
/// out of bounds in the symbolic analysis) are typed errors naming the
/// owner and the field.
#[test]
fn other_model_settings_are_rejected_before_any_work() {
    use olli_solver::model::{Ordering, Ramp, RigidBody, RigidShape, SettingsError};
    let bad_run = |edit: &dyn Fn(&mut Model)| {
        let mut model = cube_model(IncrementControls::default());
        edit(&mut model);
        match solve(&model, &mut Quiet) {
            Err(SolveError::BadSettings(e)) => e,
            other => panic!("expected BadSettings, got {other:?}"),
        }
    };
    let plate = || RigidBody::new("plate", RigidShape::Plane { point: [0.0, 0.0, 1.0], normal: [0.0, 0.0, -1.0] }, "top");
    let e = bad_run(&|m| m.rigid.push(RigidBody { friction: f64::NAN, ..plate() }));
    assert!(matches!(e, SettingsError::OutOfRange { field: "friction", .. }), "{e}");
    let e = bad_run(&|m| m.rigid.push(RigidBody { penetration_tolerance: 0.0, ..plate() }));
    assert_eq!(e.to_string(), "rigid body `plate`: `penetration_tolerance` must be positive, got 0");
    let e = bad_run(&|m| {
        m.stages[0].ramps.insert("top".into(), Ramp::Table(vec![(0.6, 0.5), (0.3, 1.0)]));
    });
    assert!(matches!(e, SettingsError::BadRampPoint { index: 1, .. }), "{e}");
    let e = bad_run(&|m| m.linear.ordering = Ordering::Custom(vec![0; 12]));
    assert!(matches!(e, SettingsError::NotAPermutation { index: 1, value: 0, reason: "repeated" }), "{e}");
    let e = bad_run(&|m| m.stages[0].duration = Some(-1.0));
    assert!(matches!(e, SettingsError::OutOfRange { field: "duration", .. }), "{e}");
}

/// The fit's and the homogeneous tests' settings: a NaN, zero or negative
/// tolerance and zero iterations are errors, never a loop without end.
#[test]
fn fit_and_homogeneous_settings_are_checked() {
    use olli_solver::fit::{self, DataPoint, FitError, FitModel};
    use olli_solver::material::homogeneous::{self, HomogeneousError, Mode};
    let data: Vec<DataPoint> = [1.2, 1.5, 2.0]
        .iter()
        .map(|&l| DataPoint { mode: Mode::Uniaxial, stretch: l, nominal_stress: 0.4 * (l - 1.0 / (l * l)) })
        .collect();
    for (tolerance, patience) in [(f64::NAN, 200), (0.0, 200), (-1e-9, 200), (1.0, 200), (1e-12, 0)] {
        let settings = fit::Settings { tolerance, patience, ..Default::default() };
        match fit::fit(FitModel::NeoHookean, &data, &settings) {
            Err(FitError::BadSettings { .. }) => {}
            other => panic!("tolerance {tolerance}, patience {patience}: {other:?}"),
        }
    }
    assert!(fit::fit(FitModel::NeoHookean, &data, &fit::Settings::default()).is_ok());
    let rubber = registry::material("neo-hookean", &[("shear_modulus", 1.0), ("bulk_modulus", 100.0)], VolumetricForm::Quadratic).unwrap();
    for (tolerance, max_iterations) in [(f64::NAN, 60), (0.0, 60), (-1.0, 60), (f64::INFINITY, 60), (1e-12, 0)] {
        let settings = homogeneous::Settings { tolerance, max_iterations };
        match homogeneous::point(&rubber, Mode::Uniaxial, 1.5, None, &settings) {
            Err(HomogeneousError::BadSettings { .. }) => {}
            other => panic!("tolerance {tolerance}, iterations {max_iterations}: {other:?}"),
        }
    }
    assert!(homogeneous::point(&rubber, Mode::Uniaxial, 1.5, None, &homogeneous::Settings::default()).is_ok());
}
