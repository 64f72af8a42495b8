//! Rigid surfaces that rubber touches: in 2-D lines, segments, circular arcs
//! and polylines built of them (a groove with its corner radii); in 3-D
//! planes, cylinders (a shaft or a bore) and spheres.
//!
//! The one question contact asks a surface is [`RigidSurface::project`]: for a
//! point, the signed gap to the surface (positive on the rubber's side,
//! negative when the point has penetrated), the unit normal pointing toward
//! the rubber, and the derivative of that normal with respect to the point
//! (zero on flat pieces, `(I − n⊗n)/d` on curved ones), which the consistent
//! contact tangent needs.
//!
//! Surfaces are described in their own frame; a rigid motion (translation,
//! plus a rotation about a centre) moves them with the load factor.

use nalgebra::{Matrix3, Rotation3, Unit, Vector3};

/// Closest-point information of one point against a surface.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Projection {
    /// Signed distance: > 0 separated (rubber side), < 0 penetrated.
    pub gap: f64,
    /// Unit normal at the closest point, pointing to the rubber side.
    pub normal: Vector3<f64>,
    /// ∂normal/∂point (symmetric; zero for flat pieces).
    pub normal_derivative: Matrix3<f64>,
    /// Closest point on the surface.
    pub point: Vector3<f64>,
}

/// One piece of a 2-D profile (in the x–y plane).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Piece2 {
    /// Segment from `a` to `b`; the rubber is on its left (looking from a to b).
    Segment {
        /// Start point (length units).
        a: [f64; 2],
        /// End point (length units).
        b: [f64; 2],
    },
    /// Arc of a circle from angle `start` to `end` (radians, counter-clockwise
    /// when `end > start`); the rubber is on the left of the travel direction.
    Arc {
        /// Centre of the circle (length units).
        center: [f64; 2],
        /// Radius (length units).
        radius: f64,
        /// Start angle (radians from +x).
        start: f64,
        /// End angle (radians from +x).
        end: f64,
    },
}

/// The geometry of a rigid surface in its own (unmoved) frame.
#[derive(Debug, Clone, PartialEq)]
pub enum Shape {
    /// An infinite line in 2-D through `point` with direction `direction`; the rubber is on its left.
    Line {
        /// Any point on the line (length units).
        point: [f64; 2],
        /// Direction of travel; the rubber is on its left.
        direction: [f64; 2],
    },
    /// A chain of segments and arcs in 2-D; the rubber is on its left.
    Profile(Vec<Piece2>),
    /// A plane in 3-D through `point`; `normal` points to the rubber.
    Plane {
        /// Any point on the plane (length units).
        point: [f64; 3],
        /// Normal pointing to the rubber (any non-zero length).
        normal: [f64; 3],
    },
    /// A circular cylinder in 3-D: axis through `point` along `axis`. With
    /// `rubber_outside` the rubber is outside it (a shaft), otherwise inside (a bore).
    Cylinder {
        /// Any point on the axis (length units).
        point: [f64; 3],
        /// Direction of the axis (any non-zero length).
        axis: [f64; 3],
        /// Radius (length units).
        radius: f64,
        /// Rubber outside the surface (shaft, ball) rather than inside (bore, cup).
        rubber_outside: bool,
    },
    /// A sphere in 3-D, rubber outside or inside.
    Sphere {
        /// Centre (length units).
        center: [f64; 3],
        /// Radius (length units).
        radius: f64,
        /// Rubber outside the surface (shaft, ball) rather than inside (bore, cup).
        rubber_outside: bool,
    },
}

/// Rigid motion of a surface at some load factor: `x ↦ R (x − c) + c + t`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Placement {
    /// Translation t (length units).
    pub translation: Vector3<f64>,
    /// Rotation R about the centre.
    pub rotation: Rotation3<f64>,
    /// Centre of rotation c (length units).
    pub center: Vector3<f64>,
}

impl Default for Placement {
    fn default() -> Self {
        Placement { translation: Vector3::zeros(), rotation: Rotation3::identity(), center: Vector3::zeros() }
    }
}

impl Placement {
    /// A placement that translates by `t` and rotates by `angle` (radians)
    /// about `axis` through `center` (in 2-D the axis is z).
    pub fn new(t: Vector3<f64>, axis: Vector3<f64>, angle: f64, center: Vector3<f64>) -> Self {
        let rotation = if angle == 0.0 || axis.norm() == 0.0 {
            Rotation3::identity()
        } else {
            Rotation3::from_axis_angle(&Unit::new_normalize(axis), angle)
        };
        Placement { translation: t, rotation, center }
    }

    /// A point of the surface's own frame, moved: `R (x − c) + c + t`.
    pub fn apply(&self, x: &Vector3<f64>) -> Vector3<f64> {
        self.rotation * (x - self.center) + self.center + self.translation
    }

    /// A point given in the moved frame, expressed in the surface's own frame.
    pub fn to_local(self, x: &Vector3<f64>) -> Vector3<f64> {
        self.rotation.inverse() * (x - self.center - self.translation) + self.center
    }

    /// A projection computed in the surface frame, expressed in the moved frame.
    fn to_global(self, p: Projection) -> Projection {
        let r = self.rotation.matrix();
        Projection {
            gap: p.gap,
            normal: r * p.normal,
            normal_derivative: r * p.normal_derivative * r.transpose(),
            point: r * (p.point - self.center) + self.center + self.translation,
        }
    }
}

fn v3(a: [f64; 3]) -> Vector3<f64> {
    Vector3::new(a[0], a[1], a[2])
}

fn v2(a: [f64; 2]) -> Vector3<f64> {
    Vector3::new(a[0], a[1], 0.0)
}

/// Projection onto a flat piece (normal constant).
fn flat(x: &Vector3<f64>, point: Vector3<f64>, normal: Vector3<f64>) -> Projection {
    let gap = (x - point).dot(&normal);
    Projection { gap, normal, normal_derivative: Matrix3::zeros(), point: x - normal * gap }
}

/// Projection onto a point-like feature (a sharp corner or a circle/sphere
/// centre seen from distance `d`): normal along `x − q`, signed by `sign`.
/// `projector` removes the components along which the feature is extended
/// (identity for a point, I − a⊗a for a cylinder axis, the in-plane
/// projector in 2-D).
fn radial(x: &Vector3<f64>, q: Vector3<f64>, radius: f64, sign: f64, projector: Matrix3<f64>) -> Option<Projection> {
    let r = projector * (x - q);
    let d = r.norm();
    if d < 1e-300 {
        return None;
    }
    let e = r / d;
    let normal = e * sign;
    // ∂e/∂x = (P − e⊗e)/d, with P the projector (e lies in its range).
    let de = (projector - e * e.transpose()) / d;
    Some(Projection { gap: sign * (d - radius), normal, normal_derivative: de * sign, point: q + e * radius + (x - q - r) })
}

fn planar() -> Matrix3<f64> {
    Matrix3::from_diagonal(&Vector3::new(1.0, 1.0, 0.0))
}

impl Piece2 {
    /// Projection of x onto this piece, and the distance to its closest point.
    fn project(&self, x: &Vector3<f64>) -> Option<(Projection, f64)> {
        match *self {
            Piece2::Segment { a, b } => {
                let (a, b) = (v2(a), v2(b));
                let t = b - a;
                let len2 = t.norm_squared();
                if len2 == 0.0 {
                    return None;
                }
                let s = ((x - a).dot(&t) / len2).clamp(0.0, 1.0);
                let left = Vector3::new(-t.y, t.x, 0.0) / len2.sqrt();
                if s > 0.0 && s < 1.0 {
                    let p = flat(x, a, left);
                    Some((p, p.gap.abs()))
                } else {
                    // Beyond an end: the end point is the closest feature; its
                    // gap sign comes from the side of the segment's line.
                    let q = if s <= 0.0 { a } else { b };
                    let side = if (x - a).dot(&left) >= 0.0 { 1.0 } else { -1.0 };
                    let p = radial(x, q, 0.0, side, planar())?;
                    Some((p, (x - q).norm()))
                }
            }
            Piece2::Arc { center, radius, start, end } => {
                let c = v2(center);
                let r = x - c;
                let ccw = end > start;
                let angle = r.y.atan2(r.x);
                if within_arc(angle, start, end) && r.norm() > 0.0 {
                    // Rubber on the left of travel: outside for clockwise travel, inside for counter-clockwise.
                    let sign = if ccw { -1.0 } else { 1.0 };
                    let p = radial(x, c, radius, sign, planar())?;
                    Some((p, p.gap.abs()))
                } else {
                    let ends = [start, end].map(|t| c + Vector3::new(t.cos(), t.sin(), 0.0) * radius);
                    let q = if (x - ends[0]).norm() <= (x - ends[1]).norm() { ends[0] } else { ends[1] };
                    let inside = r.norm() < radius;
                    let side = if inside == ccw { 1.0 } else { -1.0 };
                    let p = radial(x, q, 0.0, side, planar())?;
                    Some((p, (x - q).norm()))
                }
            }
        }
    }
}

/// Whether `angle` lies on the arc from `start` to `end` (either direction).
fn within_arc(angle: f64, start: f64, end: f64) -> bool {
    let (lo, hi) = if end >= start { (start, end) } else { (end, start) };
    let tau = std::f64::consts::TAU;
    let shifted = lo + (angle - lo).rem_euclid(tau);
    shifted <= hi
}

impl Shape {
    /// Projection of `x` (surface frame) onto the surface.
    pub fn project_local(&self, x: &Vector3<f64>) -> Option<Projection> {
        match self {
            Shape::Line { point, direction } => {
                let d = v2(*direction);
                let len = d.norm();
                if len == 0.0 {
                    return None;
                }
                Some(flat(x, v2(*point), Vector3::new(-d.y, d.x, 0.0) / len))
            }
            Shape::Profile(pieces) => {
                // Nearest piece wins; on a tie (a shared vertex) prefer the
                // piece whose own side test is decisive (an interior hit).
                let mut best: Option<(Projection, f64)> = None;
                for piece in pieces {
                    if let Some((p, dist)) = piece.project(x) {
                        let better = match &best {
                            None => true,
                            Some((_, bd)) => dist < *bd - 1e-12 * (1.0 + bd),
                        };
                        if better {
                            best = Some((p, dist));
                        }
                    }
                }
                best.map(|(p, _)| p)
            }
            Shape::Plane { point, normal } => {
                let n = v3(*normal);
                let len = n.norm();
                (len > 0.0).then(|| flat(x, v3(*point), n / len))
            }
            Shape::Cylinder { point, axis, radius, rubber_outside } => {
                let a = v3(*axis).try_normalize(0.0)?;
                let proj = Matrix3::identity() - a * a.transpose();
                radial(x, v3(*point), *radius, if *rubber_outside { 1.0 } else { -1.0 }, proj)
            }
            Shape::Sphere { center, radius, rubber_outside } => {
                radial(x, v3(*center), *radius, if *rubber_outside { 1.0 } else { -1.0 }, Matrix3::identity())
            }
        }
    }
}

impl Piece2 {
    /// The same piece traversed the other way (the rubber side flips).
    fn reversed(&self) -> Piece2 {
        match *self {
            Piece2::Segment { a, b } => Piece2::Segment { a: b, b: a },
            Piece2::Arc { center, radius, start, end } => Piece2::Arc { center, radius, start: end, end: start },
        }
    }
}

impl Shape {
    /// The same geometry with the rubber side chosen so that `point` (a point
    /// inside the rubber, e.g. the centroid of the touching nodes) lies on
    /// it. Lets job files describe a groove or a cover without caring about
    /// the direction in which they list its points.
    pub fn facing(&self, point: [f64; 3]) -> Shape {
        let flip = self.project_local(&v3(point)).is_some_and(|p| p.gap < 0.0);
        self.flipped_if(flip)
    }

    /// The same geometry with the rubber side chosen by a vote of `points`
    /// (points inside the rubber, e.g. just inside each touching side):
    /// flipped when more of them lie behind the surface than in front of
    /// it. Unlike a single centroid, the vote cannot be decided by rounding
    /// when the touching face lies on the surface (a plate resting on a
    /// block) and is not misled by a ring whose centroid is on the axis.
    pub fn facing_most(&self, points: &[[f64; 3]]) -> Shape {
        let (mut front, mut behind) = (0usize, 0usize);
        for p in points.iter().filter_map(|&x| self.project_local(&v3(x))) {
            if p.gap < 0.0 {
                behind += 1;
            } else if p.gap > 0.0 {
                front += 1;
            }
        }
        self.flipped_if(behind > front)
    }

    /// This shape with its rubber side turned over when `flip`.
    fn flipped_if(&self, flip: bool) -> Shape {
        if !flip {
            return self.clone();
        }
        match self {
            Shape::Line { point, direction } => Shape::Line { point: *point, direction: [-direction[0], -direction[1]] },
            Shape::Profile(pieces) => Shape::Profile(pieces.iter().rev().map(Piece2::reversed).collect()),
            Shape::Plane { point, normal } => Shape::Plane { point: *point, normal: [-normal[0], -normal[1], -normal[2]] },
            Shape::Cylinder { point, axis, radius, rubber_outside } => {
                Shape::Cylinder { point: *point, axis: *axis, radius: *radius, rubber_outside: !rubber_outside }
            }
            Shape::Sphere { center, radius, rubber_outside } => {
                Shape::Sphere { center: *center, radius: *radius, rubber_outside: !rubber_outside }
            }
        }
    }
}

/// A named rigid surface with its placement at the current load factor.
#[derive(Debug, Clone, PartialEq)]
pub struct RigidSurface {
    /// Geometry in the surface's own frame.
    pub shape: Shape,
    /// Where the surface is at the current load factor.
    pub placement: Placement,
}

impl RigidSurface {
    /// Projection of the current point `x` onto the moved surface.
    pub fn project(&self, x: &Vector3<f64>) -> Option<Projection> {
        let local = self.placement.to_local(x);
        self.shape.project_local(&local).map(|p| self.placement.to_global(p))
    }
}

/// Builds a 2-D profile from corner points with a fillet of `radius` at every
/// interior corner (0 for sharp corners). The rubber is on the left of the
/// path from the first point to the last.
pub fn filleted_polyline(points: &[[f64; 2]], radius: f64) -> Result<Vec<Piece2>, String> {
    if points.len() < 2 {
        return Err("a polyline needs at least two points".into());
    }
    if !(radius >= 0.0 && radius.is_finite()) {
        return Err(format!("corner radius {radius} must be zero or positive"));
    }
    if points.iter().flatten().any(|v| !v.is_finite()) {
        return Err("polyline points must be finite numbers".into());
    }
    if let Some(i) = points.windows(2).position(|w| w[0] == w[1]) {
        return Err(format!("polyline points {} and {} coincide", i + 1, i + 2));
    }
    let p: Vec<Vector3<f64>> = points.iter().map(|&q| v2(q)).collect();
    let mut pieces = Vec::new();
    let mut cursor = p[0];
    for i in 1..p.len() {
        if i + 1 == p.len() || radius <= 0.0 {
            pieces.push(Piece2::Segment { a: [cursor.x, cursor.y], b: [p[i].x, p[i].y] });
            cursor = p[i];
            continue;
        }
        let (d_in, d_out) = ((p[i] - p[i - 1]).normalize(), (p[i + 1] - p[i]).normalize());
        let turn = d_in.x * d_out.y - d_in.y * d_out.x; // > 0: left turn
        let cos = d_in.dot(&d_out).clamp(-1.0, 1.0);
        let half = 0.5 * cos.acos(); // half the deflection angle
        if half.abs() < 1e-12 {
            continue; // collinear: no corner
        }
        let setback = radius * half.tan();
        let seg_in = (p[i] - p[i - 1]).norm();
        let seg_out = (p[i + 1] - p[i]).norm();
        if setback > seg_in.min(seg_out) * (1.0 + 1e-9) {
            return Err(format!("corner radius {radius} does not fit at point {} of the polyline", i + 1));
        }
        let t1 = p[i] - d_in * setback;
        let t2 = p[i] + d_out * setback;
        let left_in = Vector3::new(-d_in.y, d_in.x, 0.0);
        let center = t1 + left_in * (radius * turn.signum());
        pieces.push(Piece2::Segment { a: [cursor.x, cursor.y], b: [t1.x, t1.y] });
        let a1 = (t1.y - center.y).atan2(t1.x - center.x);
        let mut a2 = (t2.y - center.y).atan2(t2.x - center.x);
        if turn > 0.0 {
            while a2 < a1 {
                a2 += std::f64::consts::TAU;
            }
        } else {
            while a2 > a1 {
                a2 -= std::f64::consts::TAU;
            }
        }
        pieces.push(Piece2::Arc { center: [center.x, center.y], radius, start: a1, end: a2 });
        cursor = t2;
    }
    Ok(pieces)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn fd_normal_derivative(s: &RigidSurface, x: Vector3<f64>) -> Matrix3<f64> {
        let h = 1e-6;
        let mut d = Matrix3::zeros();
        for k in 0..3 {
            let mut e = Vector3::zeros();
            e[k] = h;
            let np = s.project(&(x + e)).unwrap().normal;
            let nm = s.project(&(x - e)).unwrap().normal;
            d.set_column(k, &((np - nm) / (2.0 * h)));
        }
        d
    }

    fn surface(shape: Shape) -> RigidSurface {
        RigidSurface { shape, placement: Placement::new(Vector3::new(0.3, -0.2, 0.0), Vector3::z(), 0.4, Vector3::new(1.0, 1.0, 0.0)) }
    }

    // The gap is the Euclidean distance to the surface (elementary geometry);
    // the normal derivative must match central differences of the normal.
    #[test]
    fn gaps_and_normal_derivatives_match_geometry() {
        let circle_in_profile = Shape::Profile(vec![Piece2::Arc { center: [0.0, 0.0], radius: 2.0, start: -3.0, end: 3.0 }]);
        let cases = [
            (Shape::Line { point: [0.0, 0.0], direction: [1.0, 0.0] }, Vector3::new(0.7, 0.5, 0.0)),
            (Shape::Plane { point: [0.0, 0.0, 1.0], normal: [0.0, 0.0, 2.0] }, Vector3::new(0.1, 0.2, 0.8)),
            (
                Shape::Cylinder { point: [0.0, 0.0, 0.0], axis: [0.0, 0.0, 1.0], radius: 1.0, rubber_outside: true },
                Vector3::new(1.5, 0.4, 3.0),
            ),
            (Shape::Sphere { center: [0.0, 0.0, 0.0], radius: 2.0, rubber_outside: false }, Vector3::new(0.5, 0.4, 1.1)),
            (circle_in_profile, Vector3::new(0.5, 0.9, 0.0)),
        ];
        for (shape, x) in cases {
            let s = surface(shape);
            let p = s.project(&x).unwrap();
            // The closest point lies on the surface at distance |gap| along the normal.
            assert!(((x - p.point).norm() - p.gap.abs()).abs() < 1e-12, "{s:?}");
            assert!((x - p.point - p.normal * p.gap).norm() < 1e-12, "{s:?}");
            let fd = fd_normal_derivative(&s, x);
            assert!((fd - p.normal_derivative).norm() < 1e-6, "{s:?}\n{fd}\n{}", p.normal_derivative);
        }
    }

    // A rigid rotation about a centre moves a surface like any rigid body
    // (elementary kinematics): a horizontal line turned by 90° about c is the
    // vertical line through c, and gaps are measured from it.
    #[test]
    fn rotation_about_a_centre_moves_the_surface_rigidly() {
        let c = Vector3::new(2.0, 1.0, 0.0);
        let line = RigidSurface {
            shape: Shape::Line { point: [2.0, 1.0], direction: [1.0, 0.0] },
            placement: Placement::new(Vector3::new(0.5, 0.0, 0.0), Vector3::z(), std::f64::consts::FRAC_PI_2, c),
        };
        // After the turn the rubber side (left of +x, i.e. +y) faces −x; then shifted by 0.5 in x.
        let p = line.project(&Vector3::new(1.0, 7.0, 0.0)).unwrap();
        assert!((p.gap - 1.5).abs() < 1e-12, "{}", p.gap);
        assert!((p.normal - Vector3::new(-1.0, 0.0, 0.0)).norm() < 1e-12);
        assert!((p.point - Vector3::new(2.5, 7.0, 0.0)).norm() < 1e-12);
    }

    #[test]
    fn facing_puts_the_given_point_on_the_rubber_side() {
        let groove = Shape::Profile(filleted_polyline(&[[24.0, 2.8], [24.0, 0.0], [16.0, 0.0], [16.0, 2.8]], 0.2).unwrap());
        let inside = [20.0, 1.0, 0.0];
        // Listed right to left, the rubber would be below the groove: facing flips it.
        assert!(groove.project_local(&v3(inside)).unwrap().gap < 0.0);
        let fixed = groove.facing(inside);
        assert!((fixed.project_local(&v3(inside)).unwrap().gap - 1.0).abs() < 1e-12);
        let bore = Shape::Cylinder { point: [0.0; 3], axis: [0.0, 0.0, 1.0], radius: 5.0, rubber_outside: true };
        assert_eq!(
            bore.facing([4.0, 0.0, 0.0]),
            Shape::Cylinder { point: [0.0; 3], axis: [0.0, 0.0, 1.0], radius: 5.0, rubber_outside: false }
        );
    }

    #[test]
    fn groove_with_fillets_keeps_rubber_inside() {
        // A 8 wide, 2.8 deep groove with 0.2 corner radii; rubber inside it.
        let pieces = filleted_polyline(&[[16.0, 2.8], [16.0, 0.0], [24.0, 0.0], [24.0, 2.8]], 0.2).unwrap();
        assert_eq!(pieces.len(), 5); // segment, arc, segment, arc, segment
        let s = RigidSurface { shape: Shape::Profile(pieces), placement: Placement::default() };
        let p = s.project(&Vector3::new(20.0, 0.5, 0.0)).unwrap();
        assert!((p.gap - 0.5).abs() < 1e-12 && (p.normal - Vector3::y()).norm() < 1e-12);
        let p = s.project(&Vector3::new(16.5, 1.5, 0.0)).unwrap();
        assert!((p.gap - 0.5).abs() < 1e-12 && (p.normal - Vector3::x()).norm() < 1e-12);
        // Below the bottom: penetrated.
        let p = s.project(&Vector3::new(20.0, -0.1, 0.0)).unwrap();
        assert!((p.gap + 0.1).abs() < 1e-12);
        // At the fillet: distance to the corner circle of centre (16.2, 0.2).
        let x = Vector3::new(16.1, 0.1, 0.0);
        let p = s.project(&x).unwrap();
        let expected = 0.2 - (x - Vector3::new(16.2, 0.2, 0.0)).norm();
        assert!((p.gap - expected).abs() < 1e-12, "{} vs {expected}", p.gap);
    }
}
