//! # olli-solver
//!
//! Total-Lagrangian finite elements for nearly incompressible rubber parts:
//! the constitutive library ([`material`]) and, built on it, the elements
//! ([`element`]), the sparse assembly ([`assembly`]), the sparse direct solve
//! ([`linear`]), loads ([`load`]) and the Newton–Raphson driver with adaptive
//! load stepping ([`driver`]). A problem is described in memory by a
//! [`model::Model`] and solved by [`driver::solve`].

pub mod contact;
pub mod element;
pub mod job;
pub mod output;
pub mod material;
pub mod quadrature;
pub mod shape;
pub mod assembly;
pub mod error;
pub mod linear;
pub mod load;
pub mod model;
pub mod driver;
pub mod results;

pub use driver::{solve, Event, Observer, Quiet};
pub use error::SolveError;
pub use model::{Analysis, Force, Formulation, IncrementControls, Model, Motion, OutputSettings, Pressure, Region, Stage, Support};
pub use results::{IncrementResult, NodalFields, PointFields, Solution, SolveStats, Termination};
