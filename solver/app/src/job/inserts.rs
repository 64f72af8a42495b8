//! `[[insert]]`: bonded rigid parts. Components are checked against the
//! analysis (3-D: x, y, z and rotations about x, y, z; plane strain: x, y
//! and the rotation about z; axisymmetric: the axial translation z), a
//! component prescribed and loaded in one stage is an error, and every
//! stage an insert drives counts as loaded.

use olli_mesh::Mesh;

use super::build::Builder;
use super::diagnostics::{nearest, InputError};
use super::schema::{AnalysisKind, JobFile, StageComponents};
use olli_solver::insert::{InsertResult, COMPONENTS};
use olli_solver::model::{Insert, InsertDrive, InsertStage, Stage};

/// Job-file names of the translations and rotations an analysis allows,
/// with their model component index.
fn allowed(kind: AnalysisKind, rotation: bool) -> &'static [(&'static str, usize)] {
    match (kind, rotation) {
        (AnalysisKind::Solid, false) => &[("x", 0), ("y", 1), ("z", 2)],
        (AnalysisKind::Solid, true) => &[("x", 3), ("y", 4), ("z", 5)],
        (AnalysisKind::PlaneStrain, false) => &[("x", 0), ("y", 1)],
        (AnalysisKind::PlaneStrain, true) => &[("z", 5)],
        (AnalysisKind::Axisymmetric, false) => &[("z", 1)],
        (AnalysisKind::Axisymmetric, true) => &[],
    }
}

/// Names of the components an analysis allows (`x`, `rz`, ...).
fn component_names(kind: AnalysisKind) -> Vec<&'static str> {
    let mut v: Vec<(&str, usize)> = allowed(kind, false).to_vec();
    v.extend(allowed(kind, true).iter().copied());
    v.iter().map(|&(_, k)| COMPONENTS[k]).collect()
}

/// The `history.csv` columns of one insert with their units, in order:
/// `insert_<name>_<component>` (length; rotations in degrees), then
/// `insert_<name>_force_<x|y|z>` and `insert_<name>_moment_<x|y|z>` (what
/// the rubber exerts on the insert; moments about its moved reference point).
pub fn insert_columns(kind: AnalysisKind, name: &str) -> Vec<(String, &'static str)> {
    let mut c: Vec<(String, &'static str)> = Vec::new();
    for (_, k) in allowed(kind, false).iter().chain(allowed(kind, true)) {
        c.push((format!("insert_{name}_{}", COMPONENTS[*k]), if *k < 3 { "length" } else { "degree" }));
    }
    for (n, _) in allowed(kind, false) {
        c.push((format!("insert_{name}_force_{n}"), "force"));
    }
    for (n, _) in allowed(kind, true) {
        c.push((format!("insert_{name}_moment_{n}"), "force·length"));
    }
    c
}

/// The values of [`insert_columns`] for one converged increment.
pub fn insert_values(kind: AnalysisKind, r: &InsertResult) -> Vec<f64> {
    let mut v = Vec::new();
    for (_, k) in allowed(kind, false).iter().chain(allowed(kind, true)) {
        v.push(if *k < 3 { r.displacement[*k] } else { r.rotation[*k - 3].to_degrees() });
    }
    for (_, k) in allowed(kind, false) {
        v.push(r.force[*k]);
    }
    for (_, k) in allowed(kind, true) {
        v.push(r.moment[*k - 3]);
    }
    v
}

impl Builder<'_> {
    pub(super) fn inserts(
        &self,
        file: &JobFile,
        mesh: &Mesh,
        kind: AnalysisKind,
        stages: &mut [Stage],
        loaded: &mut [bool],
    ) -> Result<Vec<Insert>, InputError> {
        let mut out: Vec<Insert> = Vec::new();
        let dim = kind.components().len();
        for ins in &file.insert {
            let spec = ins.get_ref();
            let name = spec.name.get_ref().clone();
            if name.is_empty() || name.contains([',', '"', ' ']) {
                return Err(self.err(spec.name.span(), "`name`: give a name without spaces, commas or quotes"));
            }
            if out.iter().any(|o| o.name == name) {
                return Err(self.err(spec.name.span(), format!("two inserts are named `{name}`")));
            }
            let set = self.node_set(mesh, "nodes", &spec.nodes)?;
            let r = spec.reference.get_ref();
            if r.len() != dim || r.iter().any(|v| !v.is_finite()) {
                return Err(self.err(spec.reference.span(), format!("`reference`: give {dim} finite coordinates")));
            }
            let mut reference = [0.0; 3];
            reference[..dim].copy_from_slice(r);
            let mut free = [false; 6];
            if let Some(f) = &spec.free {
                let names = component_names(kind);
                for c in f.get_ref() {
                    let Some(k) = COMPONENTS.iter().position(|n| n == c).filter(|_| names.contains(&c.as_str())) else {
                        let hint = nearest(c, names.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                        return Err(self.err(
                            f.span(),
                            format!(
                                "`free`: no component `{c}` for an insert in {} analysis (use {}){hint}",
                                kind.name(),
                                names.join(", ")
                            ),
                        ));
                    };
                    free[k] = true;
                }
            }
            let stage_names: Vec<&str> = stages.iter().map(|s| s.name.as_str()).collect();
            let mut drives: Vec<[Option<InsertDrive>; 6]> = vec![[None; 6]; stages.len()];
            let keys = [
                ("move", &spec.moves, false, false),
                ("turn", &spec.turn, true, false),
                ("force", &spec.force, false, true),
                ("moment", &spec.moment, true, true),
            ];
            for (key, table, rotation, load) in keys {
                let Some(table) = table else { continue };
                self.insert_drives(kind, key, table, rotation, load, &stage_names, &mut drives)?;
            }
            for (i, d) in drives.into_iter().enumerate() {
                if d.iter().any(Option::is_some) {
                    stages[i].inserts.push(InsertStage { insert: name.clone(), components: d });
                    self.set_ramp(&mut stages[i], &name, &spec.ramp)?;
                    loaded[i] = true;
                }
            }
            out.push(Insert { name, set, reference, free });
        }
        Ok(out)
    }

    /// One of `move`, `turn`, `force`, `moment` into the per-stage drives.
    #[allow(clippy::too_many_arguments)]
    fn insert_drives(
        &self,
        kind: AnalysisKind,
        key: &str,
        table: &StageComponents,
        rotation: bool,
        load: bool,
        stage_names: &[&str],
        drives: &mut [[Option<InsertDrive>; 6]],
    ) -> Result<(), InputError> {
        let names = allowed(kind, rotation);
        for (stage, comps) in table.get_ref() {
            let Some(i) = stage_names.iter().position(|s| s == stage) else {
                return Err(self.unknown_name(table.span(), key, "stage", stage, stage_names));
            };
            if names.is_empty() {
                return Err(self.err(comps.span(), format!("`{key}`: {} analysis has no rotation components", kind.name())));
            }
            for (c, &v) in comps.get_ref() {
                let Some(&(_, k)) = names.iter().find(|(n, _)| n == c) else {
                    let list: Vec<&str> = names.iter().map(|(n, _)| *n).collect();
                    let hint = nearest(c, list.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                    return Err(self.err(
                        comps.span(),
                        format!(
                            "`{key}`: unknown component `{c}` for an insert in {} analysis (use {}){hint}",
                            kind.name(),
                            list.join(", ")
                        ),
                    ));
                };
                if !v.is_finite() {
                    return Err(self.err(comps.span(), format!("`{key}`: component `{c}` must be a finite number")));
                }
                let drive = match (rotation, load) {
                    (false, false) => InsertDrive::Move(v),
                    (true, false) => InsertDrive::Move(v.to_radians()),
                    (_, true) => InsertDrive::Load(v),
                };
                if let Some(old) = drives[i][k] {
                    let both = matches!(old, InsertDrive::Move(_)) != matches!(drive, InsertDrive::Move(_));
                    let what = if both { "is both prescribed and loaded" } else { "is given twice" };
                    return Err(self.err(comps.span(), format!("`{key}`: component `{}` {what} in stage `{stage}`", COMPONENTS[k])));
                }
                drives[i][k] = Some(drive);
            }
        }
        Ok(())
    }
}
