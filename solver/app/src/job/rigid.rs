//! Rigid surfaces of a job: each `[[rigid]]` table becomes a rigid body
//! (its shape turned to face the rubber, the side set it touches, friction
//! and contact settings) and its `move` / `rotate` tables become per-stage
//! positions, each stage carrying the full position reached so far.

use std::ops::Range;

use olli_mesh::Mesh;

use super::build::Builder;
use super::diagnostics::InputError;
use super::schema::{AnalysisKind, JobFile};
use olli_solver::contact::surface::filleted_polyline;
use olli_solver::contact::{Piece2, Shape as RigidShape};
use olli_solver::model::{RigidBody, RigidMotion, Stage};

impl Builder<'_> {
    /// Rigid surfaces: shape (facing the rubber), the side set they touch, friction.
    pub(super) fn rigid_bodies(&self, file: &JobFile, mesh: &Mesh, kind: AnalysisKind) -> Result<Vec<RigidBody>, InputError> {
        let mut bodies: Vec<RigidBody> = Vec::new();
        for r in &file.rigid {
            let spec = r.get_ref();
            let name = spec.name.get_ref();
            if bodies.iter().any(|b| &b.name == name) {
                return Err(self.err(spec.name.span(), format!("two rigid surfaces are named `{name}`")));
            }
            let sides = spec.touches.get_ref();
            if !mesh.side_sets.contains_key(sides) {
                let known: Vec<&str> = mesh.side_sets.keys().map(String::as_str).collect();
                return Err(self.unknown_name(spec.touches.span(), "touches", "side set", sides, &known));
            }
            let bad = |span: Range<usize>, m: String| self.err(span, format!("rigid `{name}`: {m}"));
            let solid = kind == AnalysisKind::Solid;
            let mut shapes: Vec<(Range<usize>, &str, RigidShape)> = Vec::new();
            if let Some(l) = &spec.line {
                let v = l.get_ref();
                if v.direction.iter().all(|&d| d == 0.0) || v.direction.iter().chain(&v.point).any(|d| !d.is_finite()) {
                    return Err(bad(l.span(), "line needs a finite point and a non-zero direction".into()));
                }
                shapes.push((l.span(), "line", RigidShape::Line { point: v.point, direction: v.direction }));
            }
            if let Some(p) = &spec.polyline {
                let pieces = filleted_polyline(p.get_ref(), spec.fillet.unwrap_or(0.0)).map_err(|m| bad(p.span(), m))?;
                shapes.push((p.span(), "polyline", RigidShape::Profile(pieces)));
            }
            if let Some(a) = &spec.arc {
                let v = a.get_ref();
                if !(v.radius > 0.0 && v.radius.is_finite()) {
                    return Err(bad(a.span(), format!("arc radius {} must be positive", v.radius)));
                }
                if !(v.from.is_finite() && v.to.is_finite()) || v.from == v.to {
                    return Err(bad(a.span(), "arc needs two different finite angles `from` and `to`".into()));
                }
                let piece = Piece2::Arc { center: v.center, radius: v.radius, start: v.from.to_radians(), end: v.to.to_radians() };
                shapes.push((a.span(), "arc", RigidShape::Profile(vec![piece])));
            }
            if let Some(p) = &spec.plane {
                let v = p.get_ref();
                if v.normal.iter().all(|&d| d == 0.0) || v.normal.iter().chain(&v.point).any(|d| !d.is_finite()) {
                    return Err(bad(p.span(), "plane needs a finite point and a non-zero normal".into()));
                }
                shapes.push((p.span(), "plane", RigidShape::Plane { point: v.point, normal: v.normal }));
            }
            if let Some(c) = &spec.cylinder {
                let v = c.get_ref();
                if !(v.radius > 0.0 && v.radius.is_finite()) {
                    return Err(bad(c.span(), format!("cylinder radius {} must be positive", v.radius)));
                }
                if v.axis.iter().all(|&d| d == 0.0) {
                    return Err(bad(c.span(), "cylinder axis must be non-zero".into()));
                }
                shapes.push((
                    c.span(),
                    "cylinder",
                    RigidShape::Cylinder { point: v.point, axis: v.axis, radius: v.radius, rubber_outside: true },
                ));
            }
            if let Some(c) = &spec.sphere {
                let v = c.get_ref();
                if !(v.radius > 0.0) {
                    return Err(bad(c.span(), format!("sphere radius {} must be positive", v.radius)));
                }
                shapes.push((c.span(), "sphere", RigidShape::Sphere { center: v.center, radius: v.radius, rubber_outside: true }));
            }
            let (span, key, shape) = match shapes.len() {
                1 => shapes.pop().expect("one shape"),
                0 => return Err(bad(r.span(), "give its shape: line, polyline or arc (2-D); plane, cylinder or sphere (3-D)".into())),
                _ => {
                    return Err(bad(
                        r.span(),
                        format!("give one shape, not {}", shapes.iter().map(|s| s.1).collect::<Vec<_>>().join(" and ")),
                    ))
                }
            };
            let three_d = matches!(key, "plane" | "cylinder" | "sphere");
            if three_d != solid {
                return Err(bad(
                    span,
                    format!("`{key}` is a {} shape; this is a {} analysis", if three_d { "3-D" } else { "2-D" }, kind.name()),
                ));
            }
            // The rubber side: the given point, or a vote of points just inside the touching sides.
            let shape = match &spec.rubber_point {
                Some(p) if p.iter().any(|c| !c.is_finite()) => {
                    return Err(bad(r.span(), format!("`rubber_point` must be finite numbers, got {p:?}")));
                }
                Some(p) if p.len() == if solid { 3 } else { 2 } => shape.facing([p[0], p[1], if solid { p[2] } else { 0.0 }]),
                Some(p) => {
                    return Err(bad(r.span(), format!("`rubber_point` needs {} coordinates, got {}", if solid { 3 } else { 2 }, p.len())))
                }
                None => shape.facing_most(&inside_points(mesh, sides)),
            };
            let mut body = RigidBody::new(name.clone(), shape, sides.clone());
            if !(spec.friction >= 0.0 && spec.friction.is_finite()) {
                return Err(bad(r.span(), format!("`friction` must be ≥ 0, got {}", spec.friction)));
            }
            body.friction = spec.friction;
            if let Some(p) = spec.penalty {
                if !(p > 0.0 && p.is_finite()) {
                    return Err(bad(r.span(), format!("`penalty` must be positive, got {p}")));
                }
                body.normal_penalty = Some(p);
            }
            if let Some(t) = spec.penetration_tolerance {
                if !(t > 0.0 && t < 1.0) {
                    return Err(bad(r.span(), format!("`penetration_tolerance` must be in (0, 1), got {t}")));
                }
                body.penetration_tolerance = t;
            }
            let dim = if solid { 3 } else { 2 };
            if let Some(c) = &spec.rotation_center {
                if c.len() != dim {
                    return Err(bad(r.span(), format!("`rotation_center` needs {dim} coordinates")));
                }
                body.rotation_center[..dim].copy_from_slice(c);
            }
            if let Some(a) = &spec.rotation_axis {
                if !solid || a.len() != 3 {
                    return Err(bad(r.span(), "`rotation_axis` is for 3-D analyses, with 3 components".into()));
                }
                body.rotation_axis.copy_from_slice(a);
            }
            bodies.push(body);
        }
        Ok(bodies)
    }

    /// Rigid-surface positions per stage: each stage that moves or turns a
    /// surface gets its full position (translation and rotation so far).
    pub(super) fn rigid_motions(
        &self,
        file: &JobFile,
        kind: AnalysisKind,
        stages: &mut [Stage],
        loaded: &mut [bool],
    ) -> Result<(), InputError> {
        let dim = kind.components().len();
        for r in &file.rigid {
            let spec = r.get_ref();
            let name = spec.name.get_ref();
            let mut targets: Vec<(Option<[f64; 3]>, Option<f64>)> = vec![(None, None); stages.len()];
            let stage_names: Vec<&str> = stages.iter().map(|s| s.name.as_str()).collect();
            if let Some(m) = &spec.moves {
                for (stage, v) in m.get_ref() {
                    let i = stage_names
                        .iter()
                        .position(|n| n == stage)
                        .ok_or_else(|| self.unknown_name(m.span(), "move", "stage", stage, &stage_names))?;
                    if v.len() != dim || v.iter().any(|x| !x.is_finite()) {
                        return Err(self.err(m.span(), format!("rigid `{name}`: move in stage `{stage}` needs {dim} finite components")));
                    }
                    let mut t = [0.0; 3];
                    t[..dim].copy_from_slice(v);
                    targets[i].0 = Some(t);
                }
            }
            if let Some(m) = &spec.rotate {
                for (stage, deg) in m.get_ref() {
                    let i = stage_names
                        .iter()
                        .position(|n| n == stage)
                        .ok_or_else(|| self.unknown_name(m.span(), "rotate", "stage", stage, &stage_names))?;
                    if !deg.is_finite() {
                        return Err(self.err(m.span(), format!("rigid `{name}`: rotation in stage `{stage}` must be finite")));
                    }
                    targets[i].1 = Some(deg.to_radians());
                }
            }
            let (mut translation, mut rotation) = ([0.0; 3], 0.0);
            for (i, (t, a)) in targets.into_iter().enumerate() {
                if t.is_none() && a.is_none() {
                    continue;
                }
                translation = t.unwrap_or(translation);
                rotation = a.unwrap_or(rotation);
                self.set_ramp(&mut stages[i], name, &spec.ramp)?;
                stages[i].rigid_motions.push(RigidMotion { body: name.clone(), translation, rotation });
                loaded[i] = true;
            }
        }
        Ok(())
    }
}

/// A point just inside the rubber beside each side of the set `sides`: a
/// quarter of the way from the side's centroid to its element's centroid.
fn inside_points(mesh: &Mesh, sides: &str) -> Vec<[f64; 3]> {
    let centroid = |nodes: &[usize]| {
        let mut c = [0.0; 3];
        for &n in nodes {
            for k in 0..3 {
                c[k] += mesh.nodes[n][k] / nodes.len().max(1) as f64;
            }
        }
        c
    };
    mesh.side_sets
        .get(sides)
        .map(|set| {
            set.iter()
                .map(|side| {
                    let (s, e) = (centroid(&mesh.side_nodes(*side)), centroid(mesh.element_nodes(side.element)));
                    [0, 1, 2].map(|k| s[k] + 0.25 * (e[k] - s[k]))
                })
                .collect()
        })
        .unwrap_or_default()
}
