//! # olli-solver
//!
//! Total-Lagrangian finite elements for nearly incompressible rubber parts:
//! the constitutive library ([`material`]) and, built on it, the elements
//! ([`element`]), the sparse assembly ([`assembly`]), the sparse direct solve
//! ([`linear`]), loads ([`load`]) and the Newton–Raphson driver with adaptive
//! load stepping ([`driver`]). A problem is described in memory by a
//! [`model::Model`] and solved by [`driver::solve`].

pub mod element;
pub mod material;
pub mod quadrature;
pub mod shape;
