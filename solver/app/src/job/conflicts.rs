//! Constraints that disagree: a node component that a support, a motion or
//! an insert would hold at two different values in one stage (two motions
//! of one set included), and a node bonded to two inserts, are located
//! errors; a released constraint no longer holds. Agreeing constraints (a
//! symmetry plane's zero and a motion's zero on a shared edge) stay legal.

use std::collections::BTreeMap;
use std::ops::Range;

use olli_mesh::Mesh;
use olli_solver::model::{Insert, InsertDrive, Stage};

use super::build::Builder;
use super::diagnostics::InputError;
use super::schema::{AnalysisKind, JobFile};

/// What one constraint does to one node component during a stage.
#[derive(Debug, Clone, PartialEq)]
enum Claim {
    /// Held at a value that does not change in the stage.
    Held(f64),
    /// Held where it is at the start of the stage (a support that a later stage adds).
    HeldInPlace,
    /// Moved to a value by the end of the stage, along a ramp (by name of its key).
    Moved { to: f64, ramp: String },
    /// Anything else (a rotating or loaded insert, a turned set).
    Other,
}

/// The stage of a set component's latest motion, its value (`None`: a rigid
/// turn), where the motion was written, and whether it is released by the
/// stage being checked.
type LatestMotion = (usize, Option<f64>, Range<usize>, bool);

/// A constraint's claim with what to call it and where it was written.
struct Holder {
    what: String,
    span: Range<usize>,
    claim: Claim,
}

fn agree(a: &Claim, b: &Claim) -> bool {
    match (a, b) {
        (Claim::Held(x), Claim::Held(y)) => x == y,
        (Claim::Moved { to: x, ramp: r }, Claim::Moved { to: y, ramp: s }) => x == y && r == s,
        // A component held at x starts the stage at x: moving it to x keeps it there.
        (Claim::Held(x), Claim::Moved { to: y, .. }) | (Claim::Moved { to: y, .. }, Claim::Held(x)) => x == y,
        // Held where it is agrees with anything else that holds it still.
        (Claim::HeldInPlace, Claim::Held(_) | Claim::HeldInPlace) | (Claim::Held(_), Claim::HeldInPlace) => true,
        _ => false,
    }
}

fn describe(c: &Claim) -> String {
    match c {
        Claim::Held(v) => format!("held at {v}"),
        Claim::HeldInPlace => "held where it is at the stage start".into(),
        Claim::Moved { to, .. } => format!("moved to {to}"),
        Claim::Other => "moved with its rotation or load".into(),
    }
}

impl Builder<'_> {
    /// Checks every stage for node components held at two values.
    pub(super) fn check_conflicts(
        &self,
        file: &JobFile,
        mesh: &Mesh,
        kind: AnalysisKind,
        stages: &[Stage],
        inserts: &[Insert],
    ) -> Result<(), InputError> {
        let dim = kind.components().len();
        // Bonded nodes: one insert each.
        let mut owner: BTreeMap<usize, usize> = BTreeMap::new();
        for (b, ins) in inserts.iter().enumerate() {
            for n in mesh.nodes_of_set(&ins.set).unwrap_or_default() {
                if let Some(&a) = owner.get(&n) {
                    return Err(self.err(
                        file.insert[b].get_ref().nodes.span(),
                        format!(
                            "insert `{}`: node {n} is also bonded to insert `{}`; a node can be bonded to one insert only",
                            ins.name, inserts[a].name
                        ),
                    ));
                }
                owner.insert(n, b);
            }
        }
        let ramp_key = |stage: &Stage, key: &str| format!("{:?}", stage.ramps.get(key).cloned().unwrap_or_default());
        // Per insert and component: held value (None when loaded) after each stage.
        let mut held: Vec<[Option<f64>; 6]> = inserts.iter().map(|i| i.free.map(|f| if f { None } else { Some(0.0) })).collect();
        for (si, stage) in stages.iter().enumerate() {
            let mut claims: BTreeMap<usize, Vec<Holder>> = BTreeMap::new();
            for sup in &file.support {
                let spec = sup.get_ref();
                let from = self.stage_index(&file.stage, &spec.stage)?;
                if si < from || self.release_stage(&file.stage, &spec.release, from)?.is_some_and(|r| r <= si) {
                    continue;
                }
                // From the first stage a support holds at zero; from a later one, where the nodes are then.
                let claim = if from == 0 { Claim::Held(0.0) } else { Claim::HeldInPlace };
                let names = kind.components();
                for n in mesh.nodes_of_set(spec.nodes.get_ref()).unwrap_or_default() {
                    for (i, c) in names.iter().enumerate() {
                        if spec.fix.get_ref().iter().any(|f| f == c) {
                            let what = format!("the support on `{}`", spec.nodes.get_ref());
                            claims.entry(n * dim + i).or_default().push(Holder { what, span: spec.fix.span(), claim: claim.clone() });
                        }
                    }
                }
            }
            // The latest motion of each set and component up to this stage
            // (`None`: a rigid turn, which holds every component where it leaves it).
            let mut latest: BTreeMap<(String, usize), LatestMotion> = BTreeMap::new();
            for m in &file.motion {
                let spec = m.get_ref();
                let at = self.stage_index(&file.stage, &spec.stage)?;
                // A harmonic stage's motions are amplitudes about the static state, not positions.
                if at > si || stages[at].harmonic.is_some() {
                    continue;
                }
                let released = self.release_stage(&file.stage, &spec.release, at)?.is_some_and(|r| r <= si);
                let values = match (&spec.rotation, &spec.displacement) {
                    (Some(_), _) => [Some(None); 3],
                    (None, Some(d)) => self.components(kind, d)?.map(|v| v.map(Some)),
                    (None, None) => [None; 3],
                };
                let span = match (&spec.rotation, &spec.displacement) {
                    (Some(r), _) => r.span(),
                    (None, Some(d)) => d.span(),
                    (None, None) => m.span(),
                };
                for (i, v) in values.iter().enumerate().take(dim) {
                    if let Some(v) = v {
                        let key = (spec.nodes.get_ref().clone(), i);
                        if let Some((_, Some(other), ..)) = latest.get(&key).filter(|(s, other, ..)| *s == at && other != v) {
                            return Err(self.err(
                                span.clone(),
                                format!(
                                    "stage `{}`: two motions of `{}` move component `{}` to {other} and to {}; give one of them only",
                                    file.stage[at].get_ref().name.get_ref(),
                                    key.0,
                                    kind.components()[i],
                                    v.map(|v| v.to_string()).unwrap_or_else(|| "a turn".into())
                                ),
                            ));
                        }
                        if latest.get(&key).is_none_or(|(s, ..)| *s <= at) {
                            latest.insert(key, (at, *v, span.clone(), released));
                        }
                    }
                }
            }
            for ((set, i), (at, v, span, released)) in latest {
                if released {
                    continue;
                }
                let claim = match v {
                    None => Claim::Other,
                    Some(v) if at == si => Claim::Moved { to: v, ramp: ramp_key(stage, &set) },
                    Some(v) => Claim::Held(v),
                };
                for n in mesh.nodes_of_set(&set).unwrap_or_default() {
                    let what = format!("the motion on `{set}`");
                    claims.entry(n * dim + i).or_default().push(Holder { what, span: span.clone(), claim: claim.clone() });
                }
            }
            for (b, ins) in inserts.iter().enumerate() {
                let before = held[b];
                let mut after = before;
                for d in stage.inserts.iter().filter(|d| d.insert == ins.name && stage.harmonic.is_none()) {
                    for k in 0..6 {
                        match d.components[k] {
                            Some(InsertDrive::Move(v)) => after[k] = Some(v),
                            Some(InsertDrive::Load(_)) => after[k] = None,
                            None => {}
                        }
                    }
                }
                held[b] = after;
                let still = (3..6).all(|k| before[k] == Some(0.0) && after[k] == Some(0.0));
                // Node component i of the analysis ↔ insert translation (axisymmetric: r is always held at 0).
                let translation = |i: usize| if kind == AnalysisKind::Axisymmetric && i == 0 { None } else { Some(i) };
                for n in mesh.nodes_of_set(&ins.set).unwrap_or_default() {
                    for i in 0..dim {
                        let claim = match translation(i) {
                            _ if !still => Claim::Other,
                            None => Claim::Held(0.0),
                            Some(k) => match (before[k], after[k]) {
                                (Some(a), Some(z)) if a == z => Claim::Held(z),
                                (Some(_), Some(z)) => Claim::Moved { to: z, ramp: ramp_key(stage, &ins.name) },
                                _ => Claim::Other,
                            },
                        };
                        let what = format!("insert `{}`", ins.name);
                        claims.entry(n * dim + i).or_default().push(Holder { what, span: file.insert[b].get_ref().nodes.span(), claim });
                    }
                }
            }
            for (dof, list) in &claims {
                for (k, h) in list.iter().enumerate().skip(1) {
                    if let Some(g) = list[..k].iter().find(|g| !agree(&g.claim, &h.claim)) {
                        let (node, comp) = (dof / dim, kind.components()[dof % dim]);
                        return Err(self.err(
                            h.span.clone(),
                            format!(
                                "stage `{}`: node {node} component `{comp}` is {} by {} but {} by {}; give one of them only, or make them agree",
                                stage.name,
                                describe(&g.claim),
                                g.what,
                                describe(&h.claim),
                                h.what
                            ),
                        ));
                    }
                }
            }
        }
        Ok(())
    }
}
