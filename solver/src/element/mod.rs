//! Total-Lagrangian continuum elements for rubber: every registered 2-D and
//! 3-D shape (quad4, tri6, quad8, quad9 in axisymmetric or plane-strain
//! analysis; hex8, tet10, hex20, hex27 in 3-D), each as a mixed u–p element
//! with a discontinuous pressure condensed per element
//! ([`pressure_space`]) or as a plain displacement element.
//!
//! Every element is written against one kinematic description: at each Gauss
//! point the variation of the 3×3 deformation gradient with respect to each
//! element degree of freedom is a constant 9×nd matrix `B` (the hoop row of an
//! axisymmetric element included), so `F = I + B u`. Internal force and
//! tangent are then `∫ Bᵀ P dV` and `∫ Bᵀ A B dV` with `P` the first
//! Piola–Kirchhoff stress and `A = ∂P/∂F`. The element knows no material:
//! it hands the caller the kinematics of every point ([`kinematics`]) and
//! takes back the stress and tangent there ([`PointResponse`]); the assembly
//! kernel makes that call. Adding an element shape touches [`geometry`].
//!
//! ## Mixed Q1/P0 (mean dilatation); linear pressure in [`pressure_space`]
//! Following Simo, Taylor & Pister (1985, CMAME 51:177–208), the pressure and
//! the dilatation θ are constant per element and condensed. With the
//! isochoric/volumetric split `W = W_iso(C̄) + U(J)`, the isochoric energy of
//! the modified gradient `F̄ = (θ/J)^{1/3} F` equals that of `F` itself, so the
//! condensed element energy is
//!
//! ```text
//! Π_e(u) = ∫ W_iso(C) dV + V U(θ),   θ = (1/V) ∫ J dV,   p = U'(θ)
//! f = ∫ Bᵀ (P_iso + p J F⁻ᵀ) dV
//! K = ∫ Bᵀ (A_iso + p ∂(J F⁻ᵀ)/∂F) B dV + U''(θ)/V · g gᵀ,   g = ∫ Bᵀ J F⁻ᵀ dV
//! ```
//!
//! which is symmetric, displacement-only and exact (the finite-difference
//! tests below check it).

pub mod geometry;
pub mod kernel;
pub mod planar;
pub mod pressure_space;
pub mod side;
pub mod solid;
pub mod spatial;
pub mod taylor_hood;

pub use geometry::{reference_geometry_into, PointGeometry, Shape};
pub use kernel::{
    integrate_into, kinematics, kinematics_into, point_states_into, ElementKinematics, MixedState, PointKinematics, PointResponse,
    PointState, VolumetricResponse, MAX_DOFS, MAX_POINTS,
};

use thiserror::Error;

/// Kind of analysis: fixes how a 2-D section is read.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Analysis {
    /// 3-D solid (hex8 elements).
    Solid3d,
    /// Axisymmetric r–z section (x = r, y = z), quad4 elements; forces and
    /// reactions are for the full 2π revolution.
    Axisymmetric,
    /// Plane strain x–y section of the given out-of-plane thickness (length units), quad4.
    PlaneStrain {
        /// Out-of-plane thickness (length units), > 0.
        thickness: f64,
    },
}

/// How the volumetric response is discretised.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Formulation {
    /// The element's own mixed u–p pair, locking-free for nearly
    /// incompressible rubber: a pressure condensed per element (Q1/P0 mean
    /// dilatation for hex8, see [`pressure_space`]), or for tet10 the
    /// continuous Taylor–Hood pressure ([`Formulation::ContinuousPressure`]).
    #[default]
    Mixed,
    /// Plain displacement element (locks for nearly incompressible material;
    /// kept for comparison tests).
    Displacement,
    /// Mixed with the pressure condensed in every element, also where the
    /// element's own pair has a continuous one (tet10 then runs as P2/P0;
    /// kept for comparison).
    ElementPressure,
    /// Mixed with a continuous pressure whose corner values are global
    /// unknowns ([`taylor_hood`]); what [`Formulation::Mixed`] means for
    /// tet10. Elements without such a form run as `Mixed`.
    ContinuousPressure,
}

impl Formulation {
    /// What an element of `shape` in a region of this formulation runs:
    /// `Displacement`, `Mixed` (the pressure condensed per element) or
    /// `ContinuousPressure`.
    pub fn resolve(self, shape: Shape) -> Formulation {
        let continuous = taylor_hood::pressure_nodes(shape).is_some();
        match self {
            Formulation::Displacement => Formulation::Displacement,
            Formulation::Mixed | Formulation::ContinuousPressure if continuous => Formulation::ContinuousPressure,
            _ => Formulation::Mixed,
        }
    }

    /// Whether the material's isochoric part alone is evaluated at the
    /// points (every mixed form).
    pub fn is_mixed(self) -> bool {
        self != Formulation::Displacement
    }
}

/// Failure inside one element (the caller adds the element index).
#[derive(Debug, Clone, PartialEq, Error)]
pub enum ElementError {
    /// det F ≤ 0 (or the mean dilatation θ ≤ 0) at an integration point.
    #[error("inverted at integration point {point}: J = {j:.3e}")]
    Inverted {
        /// Index of the integration point (0-based).
        point: usize,
        /// det F (or θ) there.
        j: f64,
    },
    /// The reference element itself has a non-positive Jacobian (bad mesh).
    #[error("non-positive reference Jacobian {det:.3e} at integration point {point}")]
    BadReference {
        /// Index of the integration point (0-based).
        point: usize,
        /// The reference Jacobian determinant there.
        det: f64,
    },
    /// A side shape (line) was passed where an element is needed.
    #[error("{shape} is a side shape, not an element")]
    NotAnElement {
        /// Name of the side shape.
        shape: &'static str,
    },
}
