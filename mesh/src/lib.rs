//! # olli-mesh
//!
//! The mesh side of olli: the mesh model with its named node, element and side
//! sets; generators for the part families of rubber engineering (blocks,
//! bushing sections, mount discs, O-ring cords); importers; geometric
//! selections; quality checks; and `.vtu` export.
//!
//! This crate never depends on the solver: everything here is geometry and
//! topology.
//!
//! ## A tour
//!
//! Mesh a 3.5 mm O-ring cord section (axisymmetric: x = r, y = z), check it,
//! pick the part of its surface that faces down, and write it for a viewer:
//!
//! ```
//! use olli_mesh::generate::{cord, CircleParams, Order};
//! use olli_mesh::select::{select_sides, Selection, Vec3};
//! use olli_mesh::quality::{check, QualitySettings};
//!
//! let mesh = cord(&CircleParams {
//!     center: [20.0, 1.75],
//!     diameter: Some(3.5),
//!     divisions: 16,           // elements around the circumference
//!     order: Order::Quadratic, // quad8
//!     ..Default::default()
//! })?;
//! // Natural sets: `surface` and its quarters `outer`, `top`, `inner`, `bottom`.
//! assert_eq!(mesh.side_sets["surface"].len(), 16);
//! assert!(check(&mesh, &QualitySettings::default()).inverted.is_empty());
//!
//! // Sides of the surface below the centre line, from geometry.
//! let lower = Selection::Intersection(vec![
//!     Selection::Set("surface".into()),
//!     Selection::Box { min: Vec3([0.0, -1.0, 0.0]), max: Vec3([40.0, 1.75, 0.0]) },
//! ]);
//! let sides = select_sides(&mesh, &lower, 1e-9)?;
//! assert_eq!(sides.len(), 8);
//!
//! let path = std::env::temp_dir().join("olli-doc-cord.vtu");
//! olli_mesh::write_vtu(&mesh, &path)?;          // sets travel as `set_*` arrays
//! let back = olli_mesh::read_mesh(&path)?;      // ... and come back
//! assert_eq!(back, mesh);
//! # Ok::<(), olli_mesh::MeshError>(())
//! ```
//!
//! ## Map
//!
//! - [`model`], [`element`]: the mesh and the element kinds (VTK node order).
//! - [`generate`]: rectangle, block, annulus, hollow cylinder, disc, cord,
//!   solid cylinder, extrude, sweep; [`spec`] describes a call as TOML.
//! - [`import`] (`.vtu`, `.vtk`, Gmsh `.msh` 4.1) and [`export`] (`.vtu`).
//! - [`select`]: node and side sets from geometry, with set algebra.
//! - [`shape`], [`quality`], [`cleanup`]: Jacobians, quality report, repairs.
//! - [`summary`], [`command`]: what `olli mesh info / convert / generate` print and do.
#![warn(missing_docs)]

pub mod cleanup;
pub mod command;
pub mod element;
pub mod error;
pub mod export;
pub mod fuzz;
pub mod generate;
pub mod import;
pub mod memory;
pub mod model;
pub mod quality;
pub mod select;
pub mod shape;
pub mod spec;
pub mod summary;

pub use element::ElementKind;
pub use error::{Location, MeshError};
pub use export::write_vtu;
pub use import::{import, read_mesh, Imported, PointArray};
pub use model::{Mesh, Side};
pub use spec::{generate, GeneratorSpec};
pub use summary::{summary, MeshSummary};
