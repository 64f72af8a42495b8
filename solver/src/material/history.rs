//! History variables of one integration point, as a material sees them.
//!
//! A material with memory (viscoelastic, damaged) keeps a fixed number of
//! values per integration point ([`super::Material::history_len`]; 0 for a
//! purely elastic one). Each evaluation reads the values of the last
//! converged increment (`previous`) and writes the values that belong to the
//! trial state (`current`); it never reads `current`. The store that owns
//! them (`assembly::history`) copies `current` into `previous` only when an
//! increment converges, so a failed or cut-back attempt leaves no trace.
//!
//! Every value starts at zero, which each model must read as its virgin,
//! undeformed state.

/// The history values of one point for one evaluation.
#[derive(Debug)]
pub struct PointHistory<'a> {
    /// Values at the end of the last converged increment (read only).
    pub previous: &'a [f64],
    /// Values at the trial state, written by the evaluation.
    pub current: &'a mut [f64],
    /// Time elapsed since the last converged increment (job's time unit;
    /// 0 for a stage without duration: the response is instantaneous).
    pub time_step: f64,
    /// What the isochoric tangent of a relaxing material stands for.
    pub tangent: TangentKind,
}

/// What the isochoric tangent of a viscoelastic material stands for. Elastic
/// materials ignore it. The frequency-domain kinds read the instantaneous
/// tangent D⁰ of the converged state (evaluate them at a zero time step)
/// and scale it by a part of the Prony series' complex modulus
/// g*(ω) = g′ + i g″ ([`super::Prony::complex_modulus`]), so that a harmonic
/// analysis assembles the storage stiffness with `Storage` and the loss
/// stiffness as `Loss` minus `Without`.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub enum TangentKind {
    /// The consistent tangent of the time step (Newton iterations). Default.
    #[default]
    Step,
    /// D⁰ times the storage part g′(ω) (ω in rad per time unit).
    Storage(f64),
    /// D⁰ times the loss part g″(ω) (ω in rad per time unit).
    Loss(f64),
    /// No isochoric material tangent at all (D⁰ times 0).
    Without,
}
