//! The mixed elements' pressure and dilatation carried as Newton unknowns
//! (the three-field Simo–Taylor–Pister iteration, see
//! [`crate::element::MixedState`]): their linearised update along a Newton
//! correction, through the volumetric law of each element's material.

use super::discretization::Discretization;
use super::dofs::{DofMap, NONE};
use super::error::AssemblyError;
use super::kernel::KernelError;
use crate::element::{Formulation, MixedState};

/// Carried unknowns of every element, at the current iterate, at the start
/// of the current correction and at the last converged increment. Empty
/// when the unknowns are condensed from u instead.
#[derive(Debug, Clone, Default)]
pub struct MixedUnknowns {
    /// At the current iterate; handed to the element loop, which fills in
    /// each element's v/V and ∂(v/V)/∂u.
    pub current: Vec<MixedState>,
    base: Vec<MixedState>,
    /// At the last converged increment.
    pub converged: Vec<MixedState>,
    /// Per element: dilatation change per unit step of the correction, and
    /// the part applied in full (prescribed motion and consistency residual).
    dtheta: Vec<(f64, f64)>,
    /// Pressure and dilatation at the converged increment before the last
    /// (the predictor's history, see [`MixedUnknowns::extrapolate`]).
    previous: Vec<(f64, f64)>,
}

impl MixedUnknowns {
    /// Carries `states` (one per element) from here on.
    pub fn new(states: Vec<MixedState>) -> Self {
        let n = states.len();
        let previous = states.iter().map(|s| (s.pressure, s.dilatation)).collect();
        MixedUnknowns { current: states.clone(), base: states.clone(), converged: states, dtheta: vec![(0.0, 0.0); n], previous }
    }

    /// Whether no unknowns are carried (condensed elements).
    pub fn is_empty(&self) -> bool {
        self.current.is_empty()
    }

    /// Back to the last converged unknowns (start of an increment attempt).
    pub fn restart(&mut self) {
        self.current.copy_from_slice(&self.converged);
    }

    /// Keeps the current unknowns as converged.
    pub fn commit(&mut self) {
        for (p, c) in self.previous.iter_mut().zip(&self.converged) {
            *p = (c.pressure, c.dilatation);
        }
        self.converged.copy_from_slice(&self.current);
    }

    /// Starts an increment `ratio` times as long as the last one from the
    /// last converged unknowns moved on by `ratio` times their change over
    /// the last increment, as the displacement predictor moves u (an
    /// element whose dilatation would not stay positive keeps its converged
    /// unknowns).
    pub fn extrapolate(&mut self, ratio: f64) {
        for ((cur, conv), &(p0, t0)) in self.current.iter_mut().zip(&self.converged).zip(&self.previous) {
            let theta = conv.dilatation + ratio * (conv.dilatation - t0);
            if theta > 0.0 && theta.is_finite() {
                cur.dilatation = theta;
                cur.pressure = conv.pressure + ratio * (conv.pressure - p0);
            }
        }
    }

    /// Starts a correction: the linearised dilatation change of every mixed
    /// element for the free correction `du` (per unit step, by equation),
    /// the change of constrained dofs moving with it (`constrained_du`, per
    /// unit step, by global dof: dofs bonded to an insert) and, if given,
    /// the prescribed change `dup` applied in full (by global dof).
    pub fn directions(&mut self, disc: &Discretization, dofs: &DofMap, du: &[f64], constrained_du: &[f64], dup: Option<&[f64]>) {
        if self.is_empty() {
            return;
        }
        self.base.copy_from_slice(&self.current);
        let mesh = disc.mesh();
        let dim = dofs.dim;
        for e in 0..mesh.element_count() {
            if disc.context(e).formulation != Formulation::Mixed {
                continue;
            }
            let st = &self.current[e];
            let (mut free, mut fixed) = (0.0, st.volume_ratio - st.dilatation);
            for (a, &n) in mesh.element_nodes(e).iter().enumerate() {
                for i in 0..dim {
                    let d = n * dim + i;
                    let q = dofs.eq[d];
                    let w = st.dvolume_du[a * dim + i];
                    if q != NONE {
                        free += w * du[q];
                    } else {
                        free += w * constrained_du[d];
                        if let Some(dup) = dup {
                            fixed += w * dup[d];
                        }
                    }
                }
            }
            self.dtheta[e] = (free, fixed);
        }
    }

    /// The unknowns at step length `s` along the correction:
    /// θ = θ₀ + Δθ(s) and p = U'(θ₀) + U''(θ₀) Δθ(s), linearised at the
    /// correction's start. Fails when an element's θ would not be positive.
    pub fn apply(&mut self, disc: &Discretization, s: f64) -> Result<(), AssemblyError> {
        for e in 0..self.current.len() {
            let ctx = disc.context(e);
            if ctx.formulation != Formulation::Mixed {
                continue;
            }
            let base = self.base[e];
            let (free, fixed) = self.dtheta[e];
            let dtheta = fixed + s * free;
            let law = &ctx.material.volumetric;
            let m = |source| AssemblyError::in_element(e, KernelError::Material { point: 0, source });
            let dp =
                law.pressure_derivative(base.dilatation).map_err(m)? * dtheta + law.pressure(base.dilatation).map_err(m)? - base.pressure;
            let st = &mut self.current[e];
            st.dilatation = base.dilatation + dtheta;
            st.pressure = base.pressure + dp;
            if st.dilatation.is_nan() || st.dilatation <= 0.0 {
                return Err(AssemblyError::InvertedElement { element: e, point: 0, j: st.dilatation });
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn state(pressure: f64, dilatation: f64) -> MixedState {
        MixedState { pressure, dilatation, ..MixedState::default() }
    }

    // Linear extrapolation of the carried unknowns from the last two
    // converged increments (the displacement predictor's rule, applied to
    // p and θ), and an element whose θ would not stay positive keeps its
    // converged unknowns (definition, no published value).
    #[test]
    fn carried_unknowns_are_extrapolated_like_the_displacements() {
        let mut m = MixedUnknowns::new(vec![state(1.0, 0.99), state(0.0, 0.5)]);
        m.current = vec![state(1.5, 0.985), state(0.0, 0.2)];
        m.commit();
        m.extrapolate(2.0);
        assert!((m.current[0].pressure - 2.5).abs() < 1e-12 && (m.current[0].dilatation - 0.975).abs() < 1e-12, "{:?}", m.current[0]);
        // 0.2 + 2 (0.2 − 0.5) < 0: kept.
        assert_eq!((m.current[1].pressure, m.current[1].dilatation), (0.0, 0.2));
        m.restart();
        assert_eq!((m.current[0].pressure, m.current[0].dilatation), (1.5, 0.985));
    }
}
