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
