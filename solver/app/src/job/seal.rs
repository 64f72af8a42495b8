//! Seal figures a job asks for by name: `[[gland]]` (fill and squeeze of a
//! groove closed by another surface, 2-D) and `[[extrusion]]` (the rubber's
//! intrusion past the edge of a clearance gap, with an optional stop), and
//! the `bands` key of `[[rigid]]` (contact bands reported per surface).

use olli_mesh::Mesh;
use toml::Spanned;

use super::build::Builder;
use super::diagnostics::InputError;
use super::schema::{AnalysisKind, JobFile};
use olli_solver::model::{ExtrusionGap, Gland, RigidBody, RigidShape};

/// Most contact bands a `[[rigid]]` table may ask for.
pub const MAX_BANDS: i64 = 20;

impl Builder<'_> {
    /// The `bands` of every `[[rigid]]` table, in file order (0 when not given).
    pub(super) fn rigid_bands(&self, file: &JobFile) -> Result<Vec<usize>, InputError> {
        file.rigid
            .iter()
            .map(|r| match &r.get_ref().bands {
                None => Ok(0),
                Some(b) if (0..=MAX_BANDS).contains(b.get_ref()) => Ok(*b.get_ref() as usize),
                Some(b) => Err(self.err(b.span(), format!("`bands`: give a count from 0 to {MAX_BANDS}, got {}", b.get_ref()))),
            })
            .collect()
    }

    /// The glands of the job: each names a groove profile and the surface closing it.
    pub(super) fn glands(&self, file: &JobFile, kind: AnalysisKind, rigid: &[RigidBody]) -> Result<Vec<Gland>, InputError> {
        let mut out: Vec<Gland> = Vec::new();
        for g in &file.gland {
            let spec = g.get_ref();
            let name = self.seal_name(&spec.name, "gland", out.iter().map(|o| o.name.as_str()))?;
            if kind == AnalysisKind::Solid {
                return Err(self.err(g.span(), format!("gland `{name}`: gland fill and squeeze are 2-D figures; this is a 3-D analysis")));
            }
            let groove = self.rigid_name(&spec.groove, "groove", rigid)?;
            if !matches!(groove.shape, RigidShape::Profile(_)) {
                return Err(
                    self.err(spec.groove.span(), format!("`groove`: rigid `{}` is a line; a groove is a `polyline` or `arc`", groove.name))
                );
            }
            let closing = self.rigid_name(&spec.closed_by, "closed_by", rigid)?;
            if closing.name == groove.name {
                return Err(self.err(spec.closed_by.span(), "`closed_by`: a groove cannot close itself; name the bore or cover"));
            }
            out.push(Gland { name, groove: groove.name.clone(), closed_by: closing.name.clone() });
        }
        Ok(out)
    }

    /// The extrusion gaps of the job.
    pub(super) fn extrusion_gaps(
        &self,
        file: &JobFile,
        mesh: &Mesh,
        kind: AnalysisKind,
        rigid: &[RigidBody],
    ) -> Result<Vec<ExtrusionGap>, InputError> {
        let dim = kind.components().len();
        let mut out: Vec<ExtrusionGap> = Vec::new();
        for x in &file.extrusion {
            let spec = x.get_ref();
            let name = self.seal_name(&spec.name, "extrusion gap", out.iter().map(|o| o.name.as_str()))?;
            let point = |v: &Spanned<Vec<f64>>, key: &str| {
                let p = v.get_ref();
                if p.len() != dim || p.iter().any(|c| !c.is_finite()) {
                    return Err(self.err(v.span(), format!("`{key}`: give {dim} finite coordinates for a {} analysis", kind.name())));
                }
                let mut out = [0.0; 3];
                out[..dim].copy_from_slice(p);
                Ok(out)
            };
            let edge = point(&spec.edge, "edge")?;
            let into = point(&spec.into, "into")?;
            if into.iter().all(|&c| c == 0.0) {
                return Err(self.err(spec.into.span(), "`into`: the direction into the gap must not be zero"));
            }
            let follows = match &spec.follows {
                Some(f) => Some(self.rigid_name(f, "follows", rigid)?.name.clone()),
                None => None,
            };
            let nodes = match &spec.nodes {
                Some(n) => Some(self.node_set(mesh, "nodes", n)?),
                None => None,
            };
            let max_depth = match &spec.max_depth {
                Some(m) if !(*m.get_ref() > 0.0 && m.get_ref().is_finite()) => {
                    return Err(self.err(m.span(), format!("`max_depth` must be a positive length, got {}", m.get_ref())));
                }
                Some(m) => Some(*m.get_ref()),
                None => None,
            };
            out.push(ExtrusionGap { name, edge, into, follows, nodes, max_depth });
        }
        Ok(out)
    }

    /// A gland's or gap's name: not empty, not repeated.
    fn seal_name<'a>(&self, name: &Spanned<String>, what: &str, taken: impl IntoIterator<Item = &'a str>) -> Result<String, InputError> {
        let n = name.get_ref();
        if n.is_empty() {
            return Err(self.err(name.span(), format!("`name`: a {what} needs a name")));
        }
        if taken.into_iter().any(|t| t == n) {
            return Err(self.err(name.span(), format!("two {what}s are named `{n}`")));
        }
        Ok(n.clone())
    }

    /// The rigid body a key names.
    fn rigid_name<'r>(&self, name: &Spanned<String>, key: &str, rigid: &'r [RigidBody]) -> Result<&'r RigidBody, InputError> {
        rigid.iter().find(|b| &b.name == name.get_ref()).ok_or_else(|| {
            let known: Vec<&str> = rigid.iter().map(|b| b.name.as_str()).collect();
            self.unknown_name(name.span(), key, "rigid surface", name.get_ref(), &known)
        })
    }
}
