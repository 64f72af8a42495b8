//! Quadrature rules with their weights on the reference domains of the
//! shapes: Gauss–Legendre on the interval [−1, 1] and its tensor products on
//! the square and the cube, symmetric rules on the unit triangle and the unit
//! tetrahedron. Every rule is named after its published source and carries
//! the polynomial degree it integrates exactly, which the tests check
//! monomial by monomial (and that the next degree is not exact).
//!
//! Rules are built once on first use and handed out as `&'static Rule`, so
//! element loops index precomputed points without allocating.

use std::sync::OnceLock;

/// Reference domain of a shape or rule.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum Domain {
    /// [−1, 1].
    Line,
    /// Unit triangle (0,0), (1,0), (0,1); area 1/2.
    Triangle,
    /// [−1, 1]²; area 4.
    Square,
    /// Unit tetrahedron (0,0,0), (1,0,0), (0,1,0), (0,0,1); volume 1/6.
    Tetrahedron,
    /// [−1, 1]³; volume 8.
    Cube,
}

impl Domain {
    /// Number of reference coordinates used (the rest of `[f64; 3]` is zero).
    pub fn dimension(self) -> usize {
        match self {
            Domain::Line => 1,
            Domain::Triangle | Domain::Square => 2,
            Domain::Tetrahedron | Domain::Cube => 3,
        }
    }

    /// Length, area or volume of the reference domain.
    pub fn measure(self) -> f64 {
        match self {
            Domain::Line => 2.0,
            Domain::Triangle => 0.5,
            Domain::Square => 4.0,
            Domain::Tetrahedron => 1.0 / 6.0,
            Domain::Cube => 8.0,
        }
    }
}

/// A quadrature rule: points in reference coordinates and their weights.
#[derive(Debug, Clone, PartialEq)]
pub struct Rule {
    /// Published name of the rule, e.g. "Gauss–Legendre 3×3".
    pub name: String,
    /// Reference domain the points lie in.
    pub domain: Domain,
    /// Highest total polynomial degree integrated exactly (for the tensor
    /// products: the degree in each coordinate separately).
    pub degree: usize,
    /// Points; unused coordinates are zero.
    pub points: Vec<[f64; 3]>,
    /// Weights; they sum to the domain's measure.
    pub weights: Vec<f64>,
}

impl Rule {
    /// Number of points.
    pub fn len(&self) -> usize {
        self.points.len()
    }

    /// Whether the rule has no points (never true for the rules here).
    pub fn is_empty(&self) -> bool {
        self.points.is_empty()
    }
}

/// The rule with the fewest points that integrates every polynomial of total
/// degree `degree` exactly on `domain` (for the square and cube: of degree
/// `degree` in each coordinate). `None` above the rules available
/// (degree 7 on line, square, cube; degree 5 on triangle and tetrahedron).
pub fn rule(domain: Domain, degree: usize) -> Option<&'static Rule> {
    all().iter().filter(|r| r.domain == domain && r.degree >= degree).min_by_key(|r| (r.len(), r.degree))
}

/// Every rule, for the tests and for callers that list them.
pub fn all() -> &'static [Rule] {
    static RULES: OnceLock<Vec<Rule>> = OnceLock::new();
    RULES.get_or_init(all_rules)
}

fn all_rules() -> Vec<Rule> {
    let mut rules = Vec::new();
    for n in 1..=4 {
        rules.push(gauss_product(Domain::Line, n));
        rules.push(gauss_product(Domain::Square, n));
        rules.push(gauss_product(Domain::Cube, n));
    }
    rules.extend([triangle_centroid(), triangle_strang_fix_3(), triangle_dunavant_6(), triangle_radon_7()]);
    rules.extend([tetrahedron_centroid(), tetrahedron_keast_4(), tetrahedron_walkington_14()]);
    rules
}

/// Points and weights of the n-point Gauss–Legendre rule on [−1, 1]
/// (closed forms; Abramowitz & Stegun 1964, Handbook of Mathematical
/// Functions, Table 25.4). Degree 2n − 1.
fn gauss_legendre(n: usize) -> Vec<(f64, f64)> {
    match n {
        1 => vec![(0.0, 2.0)],
        2 => {
            let a = (1.0f64 / 3.0).sqrt();
            vec![(-a, 1.0), (a, 1.0)]
        }
        3 => {
            let a = 0.6f64.sqrt();
            vec![(-a, 5.0 / 9.0), (0.0, 8.0 / 9.0), (a, 5.0 / 9.0)]
        }
        _ => {
            let r = (6.0f64 / 5.0).sqrt();
            let (inner, outer) = ((3.0 / 7.0 - 2.0 / 7.0 * r).sqrt(), (3.0 / 7.0 + 2.0 / 7.0 * r).sqrt());
            let s30 = 30.0f64.sqrt();
            let (wi, wo) = ((18.0 + s30) / 36.0, (18.0 - s30) / 36.0);
            vec![(-outer, wo), (-inner, wi), (inner, wi), (outer, wo)]
        }
    }
}

/// Tensor product of the n-point Gauss–Legendre rule, first coordinate fastest.
fn gauss_product(domain: Domain, n: usize) -> Rule {
    let line = gauss_legendre(n);
    let dim = domain.dimension();
    let mut points = Vec::new();
    let mut weights = Vec::new();
    let count = line.len().pow(dim as u32);
    for index in 0..count {
        let mut p = [0.0; 3];
        let mut w = 1.0;
        let mut rest = index;
        for c in 0..dim {
            let (x, wx) = line[rest % n];
            rest /= n;
            p[c] = x;
            w *= wx;
        }
        points.push(p);
        weights.push(w);
    }
    let name = match dim {
        1 => format!("Gauss–Legendre {n}"),
        2 => format!("Gauss–Legendre {n}×{n}"),
        _ => format!("Gauss–Legendre {n}×{n}×{n}"),
    };
    Rule { name, domain, degree: 2 * n - 1, points, weights }
}

/// Adds the points of one symmetry orbit of a triangle rule given by a
/// barycentric pattern (a, a, 1 − 2a): three points, or one for a = 1/3.
fn triangle_orbit(points: &mut Vec<[f64; 3]>, weights: &mut Vec<f64>, a: f64, weight: f64) {
    let b = 1.0 - 2.0 * a;
    let orbit: Vec<[f64; 3]> = if (a - 1.0 / 3.0).abs() < 1e-15 { vec![[a, a, 0.0]] } else { vec![[a, a, 0.0], [b, a, 0.0], [a, b, 0.0]] };
    for p in orbit {
        points.push(p);
        weights.push(weight);
    }
}

fn triangle_rule(name: &str, degree: usize, orbits: &[(f64, f64)]) -> Rule {
    let (mut points, mut weights) = (Vec::new(), Vec::new());
    for &(a, w) in orbits {
        triangle_orbit(&mut points, &mut weights, a, w);
    }
    Rule { name: name.into(), domain: Domain::Triangle, degree, points, weights }
}

/// One point at the centroid, degree 1.
fn triangle_centroid() -> Rule {
    triangle_rule("triangle centroid", 1, &[(1.0 / 3.0, 0.5)])
}

/// Three interior points (1/6, 1/6), (2/3, 1/6), (1/6, 2/3), weight 1/6
/// each, degree 2 (Strang & Fix 1973, An Analysis of the Finite Element
/// Method, Table 4.1).
fn triangle_strang_fix_3() -> Rule {
    triangle_rule("Strang–Fix 3-point", 2, &[(1.0 / 6.0, 1.0 / 6.0)])
}

/// Six points, degree 4 (Dunavant 1985, High degree efficient symmetrical
/// Gaussian quadrature rules for the triangle, IJNME 21:1129–1148, rule 4;
/// weights there are for unit area, halved here).
fn triangle_dunavant_6() -> Rule {
    triangle_rule(
        "Dunavant 6-point",
        4,
        &[(0.445_948_490_915_965, 0.223_381_589_678_011 / 2.0), (0.091_576_213_509_771, 0.109_951_743_655_322 / 2.0)],
    )
}

/// Seven points, degree 5, in closed form (Radon 1948, Zur mechanischen
/// Kubatur, Monatshefte für Mathematik 52:286–300; Dunavant 1985 rule 5).
fn triangle_radon_7() -> Rule {
    let s15 = 15.0f64.sqrt();
    triangle_rule(
        "Radon 7-point",
        5,
        &[(1.0 / 3.0, 9.0 / 80.0), ((6.0 - s15) / 21.0, (155.0 - s15) / 2400.0), ((6.0 + s15) / 21.0, (155.0 + s15) / 2400.0)],
    )
}

/// Points of the tetrahedron orbit with barycentric pattern (a, a, a, 1 − 3a)
/// (4 points) — or, with `pair`, (a, a, b, b) with b = 1/2 − a (6 points).
fn tetrahedron_orbit(points: &mut Vec<[f64; 3]>, weights: &mut Vec<f64>, a: f64, pair: bool, weight: f64) {
    let orbit: Vec<[f64; 4]> = if pair {
        let b = 0.5 - a;
        vec![[a, a, b, b], [a, b, a, b], [a, b, b, a], [b, a, a, b], [b, a, b, a], [b, b, a, a]]
    } else if (a - 0.25).abs() < 1e-15 {
        vec![[0.25; 4]]
    } else {
        let b = 1.0 - 3.0 * a;
        vec![[b, a, a, a], [a, b, a, a], [a, a, b, a], [a, a, a, b]]
    };
    for l in orbit {
        // Barycentric (λ0, λ1, λ2, λ3) → Cartesian (λ1, λ2, λ3).
        points.push([l[1], l[2], l[3]]);
        weights.push(weight);
    }
}

fn tetrahedron_rule(name: &str, degree: usize, orbits: &[(f64, bool, f64)]) -> Rule {
    let (mut points, mut weights) = (Vec::new(), Vec::new());
    for &(a, pair, w) in orbits {
        tetrahedron_orbit(&mut points, &mut weights, a, pair, w);
    }
    Rule { name: name.into(), domain: Domain::Tetrahedron, degree, points, weights }
}

/// One point at the centroid, degree 1.
fn tetrahedron_centroid() -> Rule {
    tetrahedron_rule("tetrahedron centroid", 1, &[(0.25, false, 1.0 / 6.0)])
}

/// Four points at barycentric (a, b, b, b) with a = (5 + 3√5)/20 and
/// b = (5 − √5)/20, weight 1/24 each, degree 2 (Keast 1986, Moderate-degree
/// tetrahedral quadrature formulas, CMAME 55:339–348, rule 2).
fn tetrahedron_keast_4() -> Rule {
    let b = (5.0 - 5.0f64.sqrt()) / 20.0;
    tetrahedron_rule("Keast 4-point", 2, &[(b, false, 1.0 / 24.0)])
}

/// Fourteen points with positive weights, degree 5 (Walkington 2000,
/// Quadrature on simplices of arbitrary dimension, CMU technical report;
/// digits from memory, checked by the exactness test to 1e-14).
fn tetrahedron_walkington_14() -> Rule {
    tetrahedron_rule(
        "Walkington 14-point",
        5,
        &[
            (0.092_735_250_310_891_2, false, 0.012_248_840_519_393_66),
            (0.310_885_919_263_300_6, false, 0.018_781_320_953_002_64),
            (0.045_503_704_125_649_6, true, 0.007_091_003_462_846_911),
        ],
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    fn factorial(n: usize) -> f64 {
        (1..=n).map(|k| k as f64).product()
    }

    /// Exact integral of x^a y^b z^c over the reference domain: products of
    /// ∫₋₁¹ t^k dt = 2/(k+1) (k even) on the interval, square and cube, and
    /// the Dirichlet formula a! b! c! / (a + b + c + d)! on the unit simplex
    /// of dimension d (e.g. Zienkiewicz & Taylor, The Finite Element Method,
    /// vol. 1, the area/volume-coordinate integration formulas).
    fn exact(domain: Domain, e: [usize; 3]) -> f64 {
        let line = |k: usize| if k.is_multiple_of(2) { 2.0 / (k as f64 + 1.0) } else { 0.0 };
        match domain {
            Domain::Line => line(e[0]),
            Domain::Square => line(e[0]) * line(e[1]),
            Domain::Cube => line(e[0]) * line(e[1]) * line(e[2]),
            Domain::Triangle => factorial(e[0]) * factorial(e[1]) / factorial(e[0] + e[1] + 2),
            Domain::Tetrahedron => factorial(e[0]) * factorial(e[1]) * factorial(e[2]) / factorial(e[0] + e[1] + e[2] + 3),
        }
    }

    fn integrate(rule: &Rule, e: [usize; 3]) -> f64 {
        rule.points
            .iter()
            .zip(&rule.weights)
            .map(|(p, w)| w * p[0].powi(e[0] as i32) * p[1].powi(e[1] as i32) * p[2].powi(e[2] as i32))
            .sum()
    }

    /// Exponents whose "degree" is `d`: total degree on simplices, the largest
    /// exponent on tensor-product domains; unused coordinates stay zero.
    fn monomials(domain: Domain, d: usize) -> Vec<[usize; 3]> {
        let dim = domain.dimension();
        let mut out = Vec::new();
        for a in 0..=d {
            for b in 0..=if dim > 1 { d } else { 0 } {
                for c in 0..=if dim > 2 { d } else { 0 } {
                    let degree = match domain {
                        Domain::Triangle | Domain::Tetrahedron => a + b + c,
                        _ => a.max(b).max(c),
                    };
                    if degree == d {
                        out.push([a, b, c]);
                    }
                }
            }
        }
        out
    }

    #[test]
    fn every_rule_is_exact_to_its_stated_degree_and_not_beyond() {
        for rule in all() {
            assert_eq!(rule.points.len(), rule.weights.len());
            for d in 0..=rule.degree {
                for e in monomials(rule.domain, d) {
                    let (got, want) = (integrate(rule, e), exact(rule.domain, e));
                    assert!((got - want).abs() < 1e-14, "{}: x^{e:?} gives {got}, exact {want}", rule.name);
                }
            }
            let next = monomials(rule.domain, rule.degree + 1);
            let worst = next.iter().map(|&e| (integrate(rule, e) - exact(rule.domain, e)).abs()).fold(0.0, f64::max);
            assert!(worst > 1e-8, "{} is exact beyond its stated degree {}", rule.name, rule.degree);
        }
    }

    #[test]
    fn points_lie_inside_their_domain_and_weights_are_positive() {
        for rule in all() {
            for (p, &w) in rule.points.iter().zip(&rule.weights) {
                assert!(w > 0.0, "{}", rule.name);
                let inside = match rule.domain {
                    Domain::Line | Domain::Square | Domain::Cube => p.iter().all(|x| x.abs() < 1.0),
                    Domain::Triangle | Domain::Tetrahedron => p.iter().all(|&x| x >= 0.0) && p.iter().sum::<f64>() < 1.0,
                };
                assert!(inside, "{}: {p:?}", rule.name);
            }
        }
    }

    #[test]
    fn the_cheapest_sufficient_rule_is_chosen() {
        assert_eq!(rule(Domain::Cube, 3).unwrap().len(), 8);
        assert_eq!(rule(Domain::Square, 5).unwrap().len(), 9);
        assert_eq!(rule(Domain::Triangle, 2).unwrap().len(), 3);
        assert_eq!(rule(Domain::Triangle, 3).unwrap().len(), 6);
        assert_eq!(rule(Domain::Tetrahedron, 2).unwrap().len(), 4);
        assert_eq!(rule(Domain::Tetrahedron, 3).unwrap().len(), 14);
        assert!(rule(Domain::Tetrahedron, 6).is_none());
    }
}
