//! Global assembly: the element table resolved from the model
//! ([`discretization`]), the degree-of-freedom map with eliminated Dirichlet
//! dofs ([`dofs`]), the sparse lower-triangle pattern with its
//! element-to-storage scatter plan built once per mesh and constraint set
//! ([`pattern`], [`scatter`]: split among threads without locks), the integration-point kernel ([`kernel`]), the carried
//! unknowns of mixed elements ([`mixed`]), the history variables of
//! materials with memory ([`history`]) and the rayon-parallel element loop
//! ([`assembler`]).
//!
//! This is the one place where elements and materials meet: the element
//! supplies kinematics per integration point, [`kernel`] evaluates the
//! material there and hands the stress and tangent back to the element.

pub mod assembler;
pub mod discretization;
pub mod dofs;
pub mod error;
pub mod global;
pub mod history;
pub mod kernel;
pub mod mixed;
pub mod pattern;
pub mod pressure;
pub mod scatter;

pub use assembler::Assembler;
pub use discretization::Discretization;
pub use dofs::DofMap;
pub use error::AssemblyError;
pub use history::{ElementHistory, PointHistories};
pub use kernel::{
    element_cached_into, element_continuous_into, element_into, element_with_history_into, element_with_state_into, point_states,
    point_states_with_history, ElementContext, KernelError, ReferenceGeometry,
};
pub use mixed::MixedUnknowns;
pub use pattern::Pattern;
pub use pressure::ContinuousPressures;

#[cfg(test)]
mod fd_tests;
#[cfg(test)]
mod parity_tests;
