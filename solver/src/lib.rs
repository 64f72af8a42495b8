//! # olli-solver
//!
//! Total-Lagrangian finite elements for nearly incompressible rubber parts:
//! the constitutive library ([`material`]) and, built on it, the elements,
//! assembly, sparse direct solve and Newton–Raphson driver.

pub mod contact;
pub mod job;
pub mod material;
pub mod output;
