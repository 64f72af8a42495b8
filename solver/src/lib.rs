//! # olli-solver
//!
//! Total-Lagrangian finite elements for nearly incompressible rubber parts:
//! the constitutive library ([`material`]) and, built on it, the elements
//! ([`element`]), the sparse assembly ([`assembly`]), the sparse direct solve
//! ([`linear`]), loads ([`load`]) and the Newton–Raphson driver with adaptive
//! load stepping ([`driver`]).
//!
//! A problem is described in memory by a [`Model`] — mesh, analysis kind,
//! material regions, load stages — and solved by [`solve`], which reports
//! progress to an [`Observer`] and returns every converged increment:
//!
//! ```no_run
//! use std::sync::Arc;
//! use olli_solver::material::{registry, VolumetricForm};
//! use olli_solver::{solve, Analysis, Formulation, Model, Motion, Quiet, Stage, Support};
//! # fn mesh() -> olli_mesh::Mesh { unimplemented!() }
//! let rubber = registry::material("neo-hookean", &[("shear_modulus", 0.5), ("bulk_modulus", 500.0)],
//!     VolumetricForm::Quadratic).unwrap();
//! let mut model = Model::single_region(mesh(), Analysis::Solid3d, Arc::new(rubber), Formulation::Mixed);
//! model.stages.push(Stage {
//!     name: "squeeze".into(),
//!     supports: vec![Support { set: "bottom".into(), components: [true; 3] }],
//!     motions: vec![Motion { set: "top".into(), displacement: [Some(0.0), Some(0.0), Some(-2.0)] }],
//!     ..Default::default()
//! });
//! let solution = solve(&model, &mut Quiet).unwrap();
//! let force = solution.last().unwrap().reactions["top"];
//! ```
#![warn(missing_docs)]

pub mod assembly;
pub mod contact;
pub mod driver;
pub mod element;
pub mod error;
pub mod fit;
pub mod insert;
pub mod linear;
pub mod load;
pub mod material;
pub mod model;
pub mod quadrature;
pub mod results;
pub mod rigid_surface;
pub mod shape;

pub use driver::{solve, Event, Observer, Quiet};
pub use error::SolveError;
pub use model::{
    Analysis, Force, Formulation, IncrementControls, Insert, InsertDrive, InsertStage, Model, Motion, OutputSettings, Pressure, Ramp,
    Region, RigidBody, RigidMotion, RotationMotion, Stage, Support,
};
pub use results::{IncrementResult, NodalFields, PointFields, Solution, SolveStats, Termination};
