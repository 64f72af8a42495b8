//! The load program of a job: stages with their increment controls, and the
//! supports, motions, pressures, forces and body forces assigned to them
//! (a load without `stage` belongs to the first). Components are checked
//! against the analysis kind; a stage that nothing loads is an error.

use std::collections::BTreeMap;

use olli_mesh::Mesh;
use toml::Spanned;

use super::build::Builder;
use super::diagnostics::{nearest, InputError};
use super::schema::{AnalysisKind, JobFile, RampSpec, RotationSpec, StageSpec};
use olli_solver::model::{
    Control, Force, Harmonic, IncrementControls, Insert, InsertDrive, Motion, Pressure, Ramp, RotationMotion, Stage, Support,
    ARC_LENGTH_MAX_INCREMENTS, BODY_FORCE_RAMP,
};

/// Default first increment of a stage with a duration (fraction of the
/// stage): relaxation is fastest at the start, and increments then grow by
/// 1.5 after every fast convergence (about 20 increments to reach 1/4 of the
/// stage).
pub const DURATION_FIRST_INCREMENT: f64 = 1e-4;

impl Builder<'_> {
    /// Component values `{ x = .., z = .. }` as an array for this analysis.
    pub(super) fn components(&self, kind: AnalysisKind, map: &Spanned<BTreeMap<String, f64>>) -> Result<[Option<f64>; 3], InputError> {
        let names = kind.components();
        let mut out = [None; 3];
        if map.get_ref().is_empty() {
            return Err(self.err(map.span(), format!("give at least one component ({})", names.join(", "))));
        }
        for (k, v) in map.get_ref() {
            let Some(i) = names.iter().position(|n| n == k) else {
                let hint = nearest(k, names.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                return Err(
                    self.err(map.span(), format!("unknown component `{k}` for {} analysis (use {}){hint}", kind.name(), names.join(", ")))
                );
            };
            if !v.is_finite() {
                return Err(self.err(map.span(), format!("component `{k}` must be a finite number")));
            }
            out[i] = Some(*v);
        }
        Ok(out)
    }

    /// A motion's `rotation` as a rigid turn of `set` (translated by the
    /// given displacement components, others 0).
    fn rotation_motion(
        &self,
        kind: AnalysisKind,
        set: String,
        spec: &Spanned<RotationSpec>,
        translation: [Option<f64>; 3],
    ) -> Result<RotationMotion, InputError> {
        let r = spec.get_ref();
        let span = spec.span();
        let dim = kind.components().len();
        if kind == AnalysisKind::Axisymmetric {
            return Err(self.err(
                span,
                "`rotation`: an axisymmetric section cannot turn in its plane; use a plane-strain or 3-D analysis, or an [[insert]]",
            ));
        }
        if !r.angle.is_finite() {
            return Err(self.err(span, "`rotation`: `angle` (degrees) must be a finite number"));
        }
        if r.center.len() != dim || r.center.iter().any(|v| !v.is_finite()) {
            return Err(self.err(span, format!("`rotation`: `center` needs {dim} finite coordinates, got {:?}", r.center)));
        }
        let axis = match (&r.axis, dim) {
            (None, 2) => [0.0, 0.0, 1.0],
            (Some(_), 2) => return Err(self.err(span, "`rotation`: a 2-D section turns about the out-of-plane axis; leave `axis` out")),
            (None, _) => return Err(self.err(span, "`rotation`: give the `axis` direction, e.g. `axis = [0.0, 0.0, 1.0]`")),
            (Some(a), _) => {
                let norm = a.iter().map(|v| v * v).sum::<f64>().sqrt();
                if a.len() != 3 || !norm.is_finite() || norm == 0.0 {
                    return Err(self.err(span, format!("`rotation`: `axis` needs 3 finite numbers, not all zero, got {a:?}")));
                }
                [a[0] / norm, a[1] / norm, a[2] / norm]
            }
        };
        let mut center = [0.0; 3];
        center[..dim].copy_from_slice(&r.center);
        let angle = r.angle.to_radians();
        Ok(RotationMotion { set, rotation: axis.map(|v| v * angle), center, translation: translation.map(|v| v.unwrap_or(0.0)) })
    }

    pub(super) fn stage_index(&self, stages: &[Spanned<StageSpec>], name: &Option<Spanned<String>>) -> Result<usize, InputError> {
        let Some(name) = name else { return Ok(0) };
        stages.iter().position(|s| s.get_ref().name.get_ref() == name.get_ref()).ok_or_else(|| {
            let names: Vec<&str> = stages.iter().map(|s| s.get_ref().name.get_ref().as_str()).collect();
            self.unknown_name(name.span(), "stage", "stage", name.get_ref(), &names)
        })
    }

    /// The stage of a `release` key: a stage after `from`, the stage the
    /// constraint starts in (none without the key).
    pub(super) fn release_stage(
        &self,
        stages: &[Spanned<StageSpec>],
        release: &Option<Spanned<String>>,
        from: usize,
    ) -> Result<Option<usize>, InputError> {
        let Some(name) = release else { return Ok(None) };
        let Some(at) = stages.iter().position(|s| s.get_ref().name.get_ref() == name.get_ref()) else {
            let names: Vec<&str> = stages.iter().map(|s| s.get_ref().name.get_ref().as_str()).collect();
            return Err(self.unknown_name(name.span(), "release", "stage", name.get_ref(), &names));
        };
        if at <= from {
            return Err(self.err(
                name.span(),
                format!(
                    "`release`: stage `{}` does not come after stage `{}`, where this constraint starts; name a later stage",
                    name.get_ref(),
                    stages[from].get_ref().name.get_ref()
                ),
            ));
        }
        Ok(Some(at))
    }

    /// A ramp as written, checked: `linear`, `step`, or a table of
    /// (stage fraction, fraction) points with strictly increasing fractions
    /// of the stage within [0, 1].
    pub(super) fn ramp(&self, spec: &Option<Spanned<RampSpec>>) -> Result<Option<Ramp>, InputError> {
        let Some(r) = spec else { return Ok(None) };
        let bad = |m: String| self.err(r.span(), format!("`ramp`: {m}"));
        match r.get_ref() {
            RampSpec::Named(name) => match name.as_str() {
                "linear" => Ok(Some(Ramp::Linear)),
                "step" => Ok(Some(Ramp::Step)),
                other => {
                    let hint = nearest(other, ["linear", "step"]).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                    Err(bad(format!("unknown ramp `{other}` (use \"linear\", \"step\" or a table [[t, fraction], ...]){hint}")))
                }
            },
            RampSpec::Table(points) => {
                if points.len() < 2 {
                    return Err(bad("a table needs at least two [t, fraction] points".into()));
                }
                if points.iter().flatten().any(|v| !v.is_finite()) {
                    return Err(bad("table values must be finite".into()));
                }
                if points.windows(2).any(|w| w[1][0] <= w[0][0]) || points[0][0] < 0.0 || points[points.len() - 1][0] > 1.0 {
                    return Err(bad("table stage fractions t must increase strictly within [0, 1]".into()));
                }
                Ok(Some(Ramp::Table(points.iter().map(|p| (p[0], p[1])).collect())))
            }
        }
    }

    /// Records the ramp of the load on `key` in `stage`; two different ramps
    /// for one set in one stage are an error.
    pub(super) fn set_ramp(&self, stage: &mut Stage, key: &str, spec: &Option<Spanned<RampSpec>>) -> Result<(), InputError> {
        let Some(ramp) = self.ramp(spec)? else { return Ok(()) };
        if let Some(old) = stage.ramps.get(key) {
            if *old != ramp {
                let span = spec.as_ref().map(|s| s.span()).unwrap_or(0..0);
                return Err(self.err(span, format!("`ramp`: stage `{}` already ramps `{key}` differently", stage.name)));
            }
        }
        stage.ramps.insert(key.to_string(), ramp);
        Ok(())
    }

    /// The stages, and the inserts (whose drives the stages hold).
    pub(super) fn stages(&self, file: &JobFile, mesh: &Mesh, kind: AnalysisKind) -> Result<(Vec<Stage>, Vec<Insert>), InputError> {
        if file.stage.is_empty() {
            return Err(self.err(0..0, "no [[stage]]: add at least one, e.g. `[[stage]] name = \"load\"`"));
        }
        let mut stages = Vec::new();
        for (i, s) in file.stage.iter().enumerate() {
            let spec = s.get_ref();
            if file.stage[..i].iter().any(|o| o.get_ref().name.get_ref() == spec.name.get_ref()) {
                return Err(self.err(spec.name.span(), format!("two stages are named `{}`", spec.name.get_ref())));
            }
            let duration = self.duration(s)?;
            let harmonic = self.harmonic(s, i == 0)?;
            let control = self.control(s)?;
            stages.push(Stage {
                name: spec.name.get_ref().clone(),
                duration,
                harmonic,
                controls: self.controls(s)?,
                control,
                ..Default::default()
            });
        }
        // A stage with a duration holds the loads while time passes.
        let mut loaded: Vec<bool> = stages.iter().map(|s| s.duration.is_some()).collect();
        for sup in &file.support {
            let spec = sup.get_ref();
            let set = self.node_set(mesh, "nodes", &spec.nodes)?;
            let names = kind.components();
            let mut components = [false; 3];
            for c in spec.fix.get_ref() {
                let Some(i) = names.iter().position(|n| n == c) else {
                    let hint = nearest(c, names.iter().copied()).map(|n| format!("; did you mean `{n}`?")).unwrap_or_default();
                    return Err(self.err(
                        spec.fix.span(),
                        format!("unknown component `{c}` for {} analysis (use {}){hint}", kind.name(), names.join(", ")),
                    ));
                };
                components[i] = true;
            }
            if !components.iter().any(|&c| c) {
                return Err(self.err(spec.fix.span(), "`fix` names no component"));
            }
            let from = self.stage_index(&file.stage, &spec.stage)?;
            if let Some(at) = self.release_stage(&file.stage, &spec.release, from)? {
                stages[at].releases.push(Support { set: set.clone(), components });
                loaded[at] = true;
            }
            stages[from].supports.push(Support { set, components });
        }
        for m in &file.motion {
            let spec = m.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let set = self.node_set(mesh, "nodes", &spec.nodes)?;
            let displacement = spec.displacement.as_ref().map(|d| self.components(kind, d)).transpose()?;
            self.set_ramp(&mut stages[i], &set, &spec.ramp)?;
            if let Some(at) = self.release_stage(&file.stage, &spec.release, i)? {
                // A turn holds every component; a plain motion those it names.
                let components = match (&spec.rotation, displacement) {
                    (Some(_), _) => [true; 3],
                    (None, Some(d)) => d.map(|v| v.is_some()),
                    (None, None) => [false; 3],
                };
                stages[at].releases.push(Support { set: set.clone(), components });
                loaded[at] = true;
            }
            match (&spec.rotation, displacement) {
                (Some(turn), translation) => {
                    let turn = self.rotation_motion(kind, set, turn, translation.unwrap_or([None; 3]))?;
                    stages[i].rotations.push(turn);
                }
                (None, Some(displacement)) => stages[i].motions.push(Motion { set, displacement }),
                (None, None) => return Err(self.err(m.span(), "a [[motion]] needs `displacement`, `rotation` or both")),
            }
            loaded[i] = true;
        }
        for p in &file.pressure {
            let spec = p.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let name = spec.sides.get_ref();
            self.side_set(mesh, &spec.sides, "a pressure acts on")?;
            if !spec.value.is_finite() {
                return Err(self.err(p.span(), "pressure `value` must be a finite number"));
            }
            if let Some(label) = &spec.name {
                let other = file
                    .pressure
                    .iter()
                    .map(|q| q.get_ref())
                    .find(|q| q.name.as_ref().is_some_and(|n| n.get_ref() == label.get_ref()) && q.sides.get_ref() != name);
                if let Some(o) = other {
                    return Err(self.err(
                        label.span(),
                        format!(
                            "`name`: pressure `{}` is also used on side set `{}`; one name, one side set",
                            label.get_ref(),
                            o.sides.get_ref()
                        ),
                    ));
                }
            }
            self.set_ramp(&mut stages[i], name, &spec.ramp)?;
            stages[i].pressures.push(Pressure { set: name.clone(), value: spec.value });
            loaded[i] = true;
        }
        for f in &file.force {
            let spec = f.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let set = self.node_set(mesh, "set", &spec.set)?;
            let total = self.components(kind, &spec.total)?.map(|v| v.unwrap_or(0.0));
            self.set_ramp(&mut stages[i], &set, &spec.ramp)?;
            stages[i].forces.push(Force { set, total });
            loaded[i] = true;
        }
        for b in &file.body_force {
            let spec = b.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            if stages[i].body_force.is_some() {
                return Err(self.err(b.span(), format!("stage `{}` has two body forces; give one with all components", stages[i].name)));
            }
            self.set_ramp(&mut stages[i], BODY_FORCE_RAMP, &spec.ramp)?;
            stages[i].body_force = Some(self.components(kind, &spec.per_volume)?.map(|v| v.unwrap_or(0.0)));
            loaded[i] = true;
        }
        self.rigid_motions(file, kind, &mut stages, &mut loaded)?;
        self.fluid_pressures(file, &mut stages, &mut loaded)?;
        let inserts = self.inserts(file, mesh, kind, &mut stages, &mut loaded)?;
        self.check_conflicts(file, mesh, kind, &stages, &inserts)?;
        self.check_harmonic(file, &stages)?;
        if let Some(i) = loaded.iter().position(|&l| !l) {
            let name = &stages[i].name;
            return Err(self.err(
                file.stage[i].span(),
                format!("stage `{name}` has no loads: give it a [[motion]], [[pressure]], [[fluid]], [[force]] or [[body_force]] with `stage = \"{name}\"`, or move a [[rigid]] surface or an [[insert]] in it"),
            ));
        }
        self.check_arc_length(file, &stages, &inserts)?;
        Ok((stages, inserts))
    }

    /// The stage's `control` (and `max_increments`, which only arc-length stages take).
    fn control(&self, s: &Spanned<StageSpec>) -> Result<Control, InputError> {
        let spec = s.get_ref();
        let name = spec.name.get_ref();
        let arc = match &spec.control {
            None => false,
            Some(c) => match c.get_ref().as_str() {
                "load" => false,
                "arc-length" => true,
                other => {
                    let hint = nearest(other, ["load", "arc-length"]).map(|k| format!("; did you mean `{k}`?")).unwrap_or_default();
                    return Err(
                        self.err(c.span(), format!("stage `{name}`: unknown `control` `{other}` (use \"load\" or \"arc-length\"){hint}"))
                    );
                }
            },
        };
        match (&spec.max_increments, arc) {
            (Some(m), false) => {
                Err(self
                    .err(m.span(), format!("stage `{name}`: `max_increments` belongs to arc-length stages (`control = \"arc-length\"`)")))
            }
            (Some(m), true) if *m.get_ref() == 0 => Err(self.err(m.span(), format!("stage `{name}`: `max_increments` must be at least 1"))),
            (m, true) => Ok(Control::ArcLength { max_increments: m.as_ref().map_or(ARC_LENGTH_MAX_INCREMENTS, |m| *m.get_ref()) }),
            (None, false) => Ok(Control::Load),
        }
    }

    /// Arc-length stages scale their loads by the load factor they find:
    /// they must be driven by loads alone, ramped linearly, with no time
    /// and no bonded inserts in the model.
    fn check_arc_length(&self, file: &JobFile, stages: &[Stage], inserts: &[Insert]) -> Result<(), InputError> {
        for (spec, stage) in file.stage.iter().zip(stages) {
            let Control::ArcLength { .. } = stage.control else { continue };
            let span = spec.get_ref().control.as_ref().map(|c| c.span()).unwrap_or(spec.span());
            let refuse = |why: &str| Err(self.err(span.clone(), format!("stage `{}`: `control = \"arc-length\"` {why}", stage.name)));
            if !stage.motions.is_empty() || !stage.rotations.is_empty() || !stage.rigid_motions.is_empty() || !stage.inserts.is_empty() {
                return refuse("drives stages loaded by forces, pressures or fluids; this stage moves a set, a rigid surface or an insert (use load control)");
            }
            let loads =
                !stage.pressures.is_empty() || !stage.forces.is_empty() || !stage.fluid_pressures.is_empty() || stage.body_force.is_some();
            if !loads {
                return refuse("needs a [[pressure]], [[force]], [[fluid]] or [[body_force]] changing in this stage");
            }
            if stage.duration.is_some() {
                return refuse("cannot be combined with `duration` (the load factor it finds is not the time)");
            }
            if stage.ramps.values().any(|r| *r != Ramp::Linear) {
                return refuse("scales all loads of the stage together: give them no `ramp`");
            }
            if !inserts.is_empty() {
                return refuse("is not available in a model with [[insert]]s");
            }
        }
        Ok(())
    }

    /// The stage's `duration`, checked.
    fn duration(&self, s: &Spanned<StageSpec>) -> Result<Option<f64>, InputError> {
        let spec = s.get_ref();
        let name = spec.name.get_ref();
        let Some(d) = &spec.duration else { return Ok(None) };
        let value = *d.get_ref();
        if !(value.is_finite() && value > 0.0) {
            return Err(self.err(d.span(), format!("stage `{name}`: `duration` must be a positive time, got {value}")));
        }
        Ok(Some(value))
    }

    /// The stage's `harmonic` table, checked: not the first stage, no
    /// duration, at least one frequency, each positive and finite.
    fn harmonic(&self, s: &Spanned<StageSpec>, first: bool) -> Result<Option<Harmonic>, InputError> {
        let spec = s.get_ref();
        let name = spec.name.get_ref();
        let Some(h) = &spec.harmonic else { return Ok(None) };
        let bad = |m: String| Err(self.err(h.span(), format!("stage `{name}`: {m}")));
        if first {
            return bad("a harmonic stage cannot come first; it vibrates about the state a static stage before it reaches".into());
        }
        if spec.duration.is_some() {
            return bad("a harmonic stage takes no `duration` (it vibrates about a state; give the hold as a stage before it)".into());
        }
        let frequencies = &h.get_ref().frequencies;
        if frequencies.is_empty() {
            return bad("`harmonic.frequencies` is empty; give at least one frequency (cycles per time unit)".into());
        }
        if let Some(f) = frequencies.iter().find(|f| !(f.is_finite() && **f > 0.0)) {
            return bad(format!("`harmonic.frequencies` must all be positive (cycles per time unit), got {f}"));
        }
        Ok(Some(Harmonic { frequencies: frequencies.clone() }))
    }

    /// A harmonic stage is driven by motions and inserts alone (their
    /// displacements, turns, forces and moments are amplitudes): no other
    /// load, turn, release or rigid move, and at least one non-zero amplitude.
    fn check_harmonic(&self, file: &JobFile, stages: &[Stage]) -> Result<(), InputError> {
        for (i, st) in stages.iter().enumerate().filter(|(_, st)| st.harmonic.is_some()) {
            let other = [
                (!st.pressures.is_empty(), "a [[pressure]]"),
                (!st.forces.is_empty(), "a [[force]]"),
                (st.body_force.is_some(), "a [[body_force]]"),
                (!st.fluid_pressures.is_empty(), "a [[fluid]] pressure"),
                (!st.rigid_motions.is_empty(), "a [[rigid]] move"),
                (!st.rotations.is_empty(), "a turning [[motion]]"),
                (!st.releases.is_empty(), "a release"),
            ];
            let span = file.stage[i].span();
            if let Some((_, what)) = other.iter().find(|(has, _)| *has) {
                return Err(self.err(
                    span,
                    format!(
                        "harmonic stage `{}` has {what}; a harmonic stage is driven by [[motion]] and [[insert]] amplitudes alone",
                        st.name
                    ),
                ));
            }
            let moved = st.motions.iter().any(|m| m.displacement.iter().any(|v| v.is_some_and(|a| a != 0.0)));
            let insert = |d: &Option<InsertDrive>| matches!(d, Some(InsertDrive::Move(a) | InsertDrive::Load(a)) if *a != 0.0);
            let driven = moved || st.inserts.iter().any(|i| i.components.iter().any(insert));
            if !driven {
                return Err(self.err(
                    span,
                    format!(
                        "harmonic stage `{}` drives nothing: give a [[motion]] with `stage = \"{}\"` and a non-zero `displacement` (the amplitude), or an [[insert]] `move`, `turn`, `force` or `moment` in it",
                        st.name, st.name
                    ),
                ));
            }
        }
        Ok(())
    }

    fn controls(&self, s: &Spanned<StageSpec>) -> Result<IncrementControls, InputError> {
        let spec = s.get_ref();
        let d = IncrementControls::default();
        // A stage in time starts small and grows geometrically (relaxation is fastest at first).
        let first = if spec.duration.is_some() { DURATION_FIRST_INCREMENT } else { d.first };
        let c = IncrementControls {
            first: spec.first_increment.unwrap_or(first),
            min: spec.min_increment.unwrap_or(d.min),
            max: spec.max_increment.unwrap_or(0.25),
            max_iterations: spec.max_iterations.unwrap_or(d.max_iterations),
            force_tolerance: spec.force_tolerance.unwrap_or(d.force_tolerance),
            stabilization: spec.stabilization.unwrap_or(d.stabilization),
            ..d
        };
        let bad = |m: String| self.err(s.span(), format!("stage `{}`: {m}", spec.name.get_ref()));
        if !(c.min > 0.0 && c.min <= c.first && c.first <= c.max && c.max <= 1.0) {
            return Err(bad(format!(
                "increments must satisfy 0 < min_increment ≤ first_increment ≤ max_increment ≤ 1 (got {}, {}, {})",
                c.min, c.first, c.max
            )));
        }
        if c.max_iterations == 0 {
            return Err(bad("`max_iterations` must be at least 1".into()));
        }
        if !(c.stabilization >= 0.0 && c.stabilization < 1.0) {
            return Err(bad(format!("`stabilization` must be in [0, 1), got {}", c.stabilization)));
        }
        if !(c.force_tolerance > 0.0 && c.force_tolerance < 1.0) {
            return Err(bad(format!("`force_tolerance` must be in (0, 1), got {}", c.force_tolerance)));
        }
        Ok(c)
    }
}
