//! Finite rotations by the rotation vector θ (exponential map, Rodrigues'
//! formula): R(θ) = I + α(s)[θ]× + β(s)[θ]×², s = |θ|, α = sin s / s,
//! β = (1 − cos s)/s². A rotation vector ramped along a fixed direction
//! turns every point along an exact circular arc.
//!
//! The first derivatives ∂R/∂θ_k are exact (differentiating α and β through
//! s); near s = 0 the coefficient functions use their Taylor series so no
//! cancellation occurs.

/// A 3×3 matrix, row-major.
pub type Mat3 = [[f64; 3]; 3];

/// Below this angle (radians) the coefficient functions use their series.
const SERIES_BELOW: f64 = 0.2;

/// α = sin s / s, β = (1 − cos s)/s², a = α′/s, b = β′/s.
fn coefficients(s: f64) -> (f64, f64, f64, f64) {
    if s < SERIES_BELOW {
        let s2 = s * s;
        let alpha = 1.0 - s2 / 6.0 * (1.0 - s2 / 20.0 * (1.0 - s2 / 42.0 * (1.0 - s2 / 72.0)));
        let beta = 0.5 * (1.0 - s2 / 12.0 * (1.0 - s2 / 30.0 * (1.0 - s2 / 56.0 * (1.0 - s2 / 90.0))));
        // a = (s cos s − sin s)/s³ and b = (s sin s − 2(1 − cos s))/s⁴ by their series.
        let a = -1.0 / 3.0 + s2 / 30.0 - s2 * s2 / 840.0 + s2 * s2 * s2 / 45360.0 - s2 * s2 * s2 * s2 / 3991680.0;
        let b = -1.0 / 12.0 + s2 / 180.0 - s2 * s2 / 6720.0 + s2 * s2 * s2 / 453600.0 - s2 * s2 * s2 * s2 / 47900160.0;
        (alpha, beta, a, b)
    } else {
        let (sn, cs) = s.sin_cos();
        let alpha = sn / s;
        let beta = (1.0 - cs) / (s * s);
        let a = (s * cs - sn) / (s * s * s);
        let b = (s * sn - 2.0 * (1.0 - cs)) / (s * s * s * s);
        (alpha, beta, a, b)
    }
}

/// The skew matrix [v]× with [v]× w = v × w.
pub fn skew(v: [f64; 3]) -> Mat3 {
    [[0.0, -v[2], v[1]], [v[2], 0.0, -v[0]], [-v[1], v[0], 0.0]]
}

/// R(θ) and its three derivatives ∂R/∂θ_k.
pub fn rotation_with_derivatives(theta: [f64; 3]) -> (Mat3, [Mat3; 3]) {
    let s = (theta[0] * theta[0] + theta[1] * theta[1] + theta[2] * theta[2]).sqrt();
    let (alpha, beta, a, b) = coefficients(s);
    let w = skew(theta);
    let s2 = s * s;
    // Q = [θ]×² = θθᵀ − s² I
    let mut q = [[0.0; 3]; 3];
    let mut r = [[0.0; 3]; 3];
    for i in 0..3 {
        for j in 0..3 {
            q[i][j] = theta[i] * theta[j] - if i == j { s2 } else { 0.0 };
            r[i][j] = if i == j { 1.0 } else { 0.0 } + alpha * w[i][j] + beta * q[i][j];
        }
    }
    let mut d = [[[0.0; 3]; 3]; 3];
    for (k, dk) in d.iter_mut().enumerate() {
        let mut e = [0.0; 3];
        e[k] = 1.0;
        let ek = skew(e);
        for i in 0..3 {
            for j in 0..3 {
                // ∂Q/∂θ_k = e_k θᵀ + θ e_kᵀ − 2 θ_k I
                let dq = e[i] * theta[j] + theta[i] * e[j] - if i == j { 2.0 * theta[k] } else { 0.0 };
                dk[i][j] = a * theta[k] * w[i][j] + alpha * ek[i][j] + b * theta[k] * q[i][j] + beta * dq;
            }
        }
    }
    (r, d)
}

/// R(θ) alone.
pub fn rotation(theta: [f64; 3]) -> Mat3 {
    rotation_with_derivatives(theta).0
}

/// `m v`.
pub fn apply(m: &Mat3, v: [f64; 3]) -> [f64; 3] {
    [
        m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
        m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
        m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
    ]
}

/// `a × b`.
pub fn cross(a: [f64; 3], b: [f64; 3]) -> [f64; 3] {
    [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]
}

#[cfg(test)]
mod tests {
    use super::*;

    /// ∂R/∂θ_k against central differences, on both sides of the series switch.
    #[test]
    fn rotation_derivatives_match_finite_differences() {
        for theta in [[0.0, 0.0, 0.0], [0.01, -0.02, 0.005], [0.15, 0.05, -0.1], [0.3, -0.7, 1.1], [2.0, 1.0, -0.5]] {
            let (_, d) = rotation_with_derivatives(theta);
            for k in 0..3 {
                let h = 1e-6;
                let (mut tp, mut tm) = (theta, theta);
                tp[k] += h;
                tm[k] -= h;
                let (rp, rm) = (rotation(tp), rotation(tm));
                for i in 0..3 {
                    for j in 0..3 {
                        let fd = (rp[i][j] - rm[i][j]) / (2.0 * h);
                        assert!((fd - d[k][i][j]).abs() < 1e-8, "θ = {theta:?}, k = {k}: {fd} vs {}", d[k][i][j]);
                    }
                }
            }
        }
    }

    /// A quarter turn about z maps x to y; R is orthogonal with det 1; the
    /// series and closed forms agree at the switch.
    #[test]
    fn rotation_is_a_rotation() {
        let r = rotation([0.0, 0.0, std::f64::consts::FRAC_PI_2]);
        let v = apply(&r, [1.0, 0.0, 0.0]);
        assert!((v[0]).abs() < 1e-15 && (v[1] - 1.0).abs() < 1e-15);
        let r = rotation([0.4, -0.3, 1.2]);
        for i in 0..3 {
            for j in 0..3 {
                let dot: f64 = (0..3).map(|k| r[k][i] * r[k][j]).sum();
                assert!((dot - if i == j { 1.0 } else { 0.0 }).abs() < 1e-14);
            }
        }
        let below = coefficients(SERIES_BELOW * (1.0 - 1e-12));
        let above = coefficients(SERIES_BELOW * (1.0 + 1e-12));
        for (x, y) in [(below.0, above.0), (below.1, above.1), (below.2, above.2), (below.3, above.3)] {
            assert!((x - y).abs() < 1e-13, "{x} vs {y}");
        }
    }
}
