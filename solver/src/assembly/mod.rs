//! Global assembly: the degree-of-freedom map with eliminated Dirichlet
//! dofs ([`dofs`]), the sparse lower-triangle pattern with its
//! element-to-storage scatter map built once per mesh and constraint set
//! ([`pattern`]), and the rayon-parallel element loop ([`assembler`]).
//!
//! This is the one place where elements, materials and the global system meet.

pub mod assembler;
pub mod discretization;
pub mod dofs;
pub mod pattern;

pub use assembler::Assembler;
pub use discretization::Discretization;
pub use dofs::DofMap;
pub use pattern::Pattern;
