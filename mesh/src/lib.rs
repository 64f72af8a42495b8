//! # olli-mesh
//!
//! The mesh side of olli: the mesh model with its named node, element and side
//! sets; generators for the part families of rubber engineering (blocks,
//! bushing sections, mount discs, O-ring cords); importers; geometric
//! selections; quality checks; and `.vtu` export.
//!
//! This crate never depends on the solver: everything here is geometry and
//! topology.

pub mod cleanup;
pub mod command;
pub mod element;
pub mod error;
pub mod export;
pub mod import;
pub mod generate;
pub mod model;
pub mod quality;
pub mod select;
pub mod shape;
pub mod spec;
pub mod summary;

pub use element::ElementKind;
pub use error::{Location, MeshError};
pub use model::{Mesh, Side};
pub use export::write_vtu;
pub use import::{import, read_mesh, Imported};
pub use spec::{generate, GeneratorSpec};
pub use summary::{summary, MeshSummary};
