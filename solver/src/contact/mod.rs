//! Contact between rubber and rigid (metal) surfaces.

pub mod active;
pub mod law;
pub mod pair;
pub mod surface;

pub use surface::{Piece2, Placement, Projection, RigidSurface, Shape};
