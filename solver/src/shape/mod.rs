//! Lagrange shape functions of the supported elements on their reference
//! domains, in the VTK node order used by the mesh model.
//!
//! Each function writes values and reference derivatives into caller arrays,
//! so integration loops do not allocate.

pub mod hex8;
pub mod line2;
pub mod quad4;
