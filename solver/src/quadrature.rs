//! Gauss–Legendre rules on the reference interval [−1, 1] and their tensor
//! products on the reference square and cube. Two points per direction
//! integrate the bilinear/trilinear elements' stiffness fully (no hourglass
//! modes), which the mixed Q1/P0 element needs for stability.

/// Abscissa of the two-point rule, 1/√3.
pub const G2: f64 = 0.577_350_269_189_625_8;

/// Points of the two-point rule (weights are both 1).
pub const LINE2: [f64; 2] = [-G2, G2];

/// 2×2 points on the reference square, weight 1 each.
pub const SQUARE4: [[f64; 2]; 4] = [[-G2, -G2], [G2, -G2], [G2, G2], [-G2, G2]];

/// 2×2×2 points on the reference cube, weight 1 each.
pub const CUBE8: [[f64; 3]; 8] =
    [[-G2, -G2, -G2], [G2, -G2, -G2], [G2, G2, -G2], [-G2, G2, -G2], [-G2, -G2, G2], [G2, -G2, G2], [G2, G2, G2], [-G2, G2, G2]];
