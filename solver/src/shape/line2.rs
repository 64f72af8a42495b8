//! Two-node line on [−1, 1]: the edges of quad4 elements.

/// Values and d/ds of the two shape functions at `s`.
pub fn eval(s: f64) -> ([f64; 2], [f64; 2]) {
    ([0.5 * (1.0 - s), 0.5 * (1.0 + s)], [-0.5, 0.5])
}
