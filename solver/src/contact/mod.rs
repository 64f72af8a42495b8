//! Contact between rubber and rigid (metal) surfaces.

pub mod active;
pub mod bands;
pub mod corner;
pub mod law;
pub mod pair;
/// Rigid-surface geometry (closest points, normals); it lives in
/// [`crate::rigid_surface`], below the model, which describes rigid bodies by it.
pub use crate::rigid_surface as surface;

pub use surface::{Piece2, Placement, Projection, RigidSurface, Shape};
