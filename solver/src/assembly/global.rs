//! The global system of one Newton evaluation, as loads, contact and
//! stabilization add to it: the external force at every dof, the tangent in
//! the pattern's lower triangle (with an optional skew part), and the
//! predictor's right-hand side. They write through [`GlobalSystem`]'s
//! methods, never into pattern slots of their own.

use super::dofs::{DofMap, NONE};
use super::pattern::Pattern;

/// What one evaluation adds to beyond the element loop.
pub struct GlobalSystem<'a> {
    /// Equation numbers of the global dofs.
    pub dofs: &'a DofMap,
    /// Sparse pattern of the tangent.
    pub pattern: &'a Pattern,
    /// External force at every global dof (loads add, reactions of springs subtract).
    pub external: &'a mut [f64],
    /// Tangent values in pattern order (lower triangle), if wanted.
    pub tangent: Option<&'a mut [f64]>,
    /// Skew-symmetric tangent entries `(slot, w)` (w below the diagonal, −w
    /// above), for the non-symmetric factorization; `None` drops them.
    pub skew: Option<&'a mut Vec<(usize, f64)>>,
    /// Tangent predictor: the prescribed-dof change `du_p` (global, zero at
    /// free dofs) and the right-hand side (free dofs) that receives `−K_fp du_p`.
    pub predictor: Option<(&'a [f64], &'a mut [f64])>,
}

impl GlobalSystem<'_> {
    /// Whether a tangent contribution would be used at all.
    pub fn wants_stiffness(&self) -> bool {
        self.tangent.is_some() || self.predictor.is_some()
    }

    /// Adds `force` (one entry per dof of `gdofs`) to the external force.
    pub fn add_force(&mut self, gdofs: &[usize], force: &[f64]) {
        for (&d, f) in gdofs.iter().zip(force) {
            self.external[d] += f;
        }
    }

    /// Adds the tangent contribution `k` (column-major, `gdofs.len()`
    /// squared, over the global dofs `gdofs`, whose pairs must lie in the
    /// pattern): its symmetric part to the lower triangle; its skew part to
    /// the skew entries when `keep_skew` (else it is dropped); and `−k du_p`
    /// to the predictor, with the same matrix the tangent holds.
    pub fn add_stiffness(&mut self, gdofs: &[usize], k: &[f64], keep_skew: bool) {
        let nd = gdofs.len();
        for c in 0..nd {
            let qc = self.dofs.eq[gdofs[c]];
            for r in 0..nd {
                let qr = self.dofs.eq[gdofs[r]];
                if qr == NONE {
                    continue;
                }
                let (krc, kcr) = (k[c * nd + r], k[r * nd + c]);
                let sym = 0.5 * (krc + kcr);
                if let Some((dup, rhs)) = self.predictor.as_mut() {
                    rhs[qr] -= if keep_skew { krc } else { sym } * dup[gdofs[c]];
                }
                if qc == NONE || qr < qc {
                    continue;
                }
                let Some(vals) = self.tangent.as_deref_mut() else { continue };
                let Some(slot) = self.pattern.slot(qr, qc) else { continue };
                if qr == qc {
                    vals[slot] += krc;
                    continue;
                }
                vals[slot] += sym;
                let skew = 0.5 * (krc - kcr);
                if skew != 0.0 && keep_skew {
                    if let Some(s) = self.skew.as_deref_mut() {
                        s.push((slot, skew));
                    }
                }
            }
        }
    }

    /// A spring of stiffness `k` on the free global dof `dof`, stretched by
    /// `stretch`: its force `−k·stretch` to the external force and `k` to the
    /// diagonal of the tangent. Prescribed dofs are left alone.
    pub fn add_spring(&mut self, dof: usize, k: f64, stretch: f64) {
        let q = self.dofs.eq[dof];
        if q == NONE {
            return;
        }
        self.external[dof] -= k * stretch;
        if let Some(vals) = self.tangent.as_deref_mut() {
            if let Some(slot) = self.pattern.slot(q, q) {
                vals[slot] += k;
            }
        }
    }
}

/// Relative size below which a slot's summed skew entries count as
/// cancelled: the sides of a closed surface give skew parts that sum to
/// round-off, which must not force the non-symmetric factorization.
pub const SKEW_CANCELLED: f64 = 1e-9;

/// Sums the skew entries of each slot and drops the slots whose sum is
/// below [`SKEW_CANCELLED`] times the largest entry that went into it.
pub fn consolidate_skew(skew: &mut Vec<(usize, f64)>) {
    if skew.is_empty() {
        return;
    }
    skew.sort_unstable_by_key(|e| e.0);
    let mut out = 0;
    let mut i = 0;
    while i < skew.len() {
        let slot = skew[i].0;
        let (mut sum, mut largest) = (0.0, 0.0f64);
        while i < skew.len() && skew[i].0 == slot {
            sum += skew[i].1;
            largest = largest.max(skew[i].1.abs());
            i += 1;
        }
        if sum.abs() > SKEW_CANCELLED * largest {
            skew[out] = (slot, sum);
            out += 1;
        }
    }
    skew.truncate(out);
}

#[cfg(test)]
mod skew_tests {
    use super::consolidate_skew;

    #[test]
    fn cancelled_slots_are_dropped_and_the_rest_summed() {
        let mut skew = vec![(4, 1.0), (2, 0.5), (4, -1.0 + 1e-13), (2, 0.25), (7, -3.0)];
        consolidate_skew(&mut skew);
        assert_eq!(skew, vec![(2, 0.75), (7, -3.0)]);
    }
}
