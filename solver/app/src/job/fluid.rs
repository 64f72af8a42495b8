//! Fluids of a job: each `[[fluid]]` name becomes one solver fluid (its side
//! set and source point) and each table sets that fluid's pressure in its
//! stage. Whether the source lies on the set and the set has a free facet is
//! decided by the solver's own setup, reported here at the table at fault.

use olli_mesh::Mesh;

use super::build::Builder;
use super::diagnostics::InputError;
use super::schema::{AnalysisKind, JobFile};
use olli_solver::assembly::Discretization;
use olli_solver::load::fluid::{FluidError, Fluids};
use olli_solver::model::{Fluid, FluidPressure, Stage};

impl Builder<'_> {
    /// The fluids of the job, one per name, in file order.
    pub(super) fn fluids(&self, file: &JobFile, mesh: &Mesh, kind: AnalysisKind) -> Result<Vec<Fluid>, InputError> {
        let dim = if kind == AnalysisKind::Solid { 3 } else { 2 };
        let mut out: Vec<Fluid> = Vec::new();
        for f in &file.fluid {
            let spec = f.get_ref();
            let name = spec.name.get_ref();
            if name.is_empty() {
                return Err(self.err(spec.name.span(), "`name`: a fluid needs a name (its columns are fluid_<name>_...)"));
            }
            let sides = spec.sides.get_ref();
            self.side_set(mesh, &spec.sides, "a fluid wets")?;
            let p = spec.source.get_ref();
            if p.len() != dim || p.iter().any(|v| !v.is_finite()) {
                return Err(self.err(spec.source.span(), format!("`source`: give {dim} finite coordinates for a {} analysis", kind.name())));
            }
            let mut source = [0.0; 3];
            source[..dim].copy_from_slice(p);
            if !spec.pressure.get_ref().is_finite() {
                return Err(self.err(spec.pressure.span(), "`pressure` must be a finite number"));
            }
            match out.iter().find(|o| &o.name == name) {
                Some(o) if o.sides != *sides || o.source != source => {
                    return Err(self.err(
                        f.span(),
                        format!("fluid `{name}` is already defined with other `sides` or `source`; give each fluid one set and one source"),
                    ));
                }
                Some(_) => {}
                None => out.push(Fluid { name: name.clone(), sides: sides.clone(), source }),
            }
        }
        Ok(out)
    }

    /// Each `[[fluid]]` table's pressure in its stage.
    pub(super) fn fluid_pressures(&self, file: &JobFile, stages: &mut [Stage], loaded: &mut [bool]) -> Result<(), InputError> {
        for f in &file.fluid {
            let spec = f.get_ref();
            let i = self.stage_index(&file.stage, &spec.stage)?;
            let name = spec.name.get_ref();
            if stages[i].fluid_pressures.iter().any(|p| &p.fluid == name) {
                return Err(self.err(f.span(), format!("fluid `{name}` is given twice in stage `{}`", stages[i].name)));
            }
            self.set_ramp(&mut stages[i], name, &spec.ramp)?;
            stages[i].fluid_pressures.push(FluidPressure { fluid: name.clone(), value: *spec.pressure.get_ref() });
            loaded[i] = true;
        }
        Ok(())
    }

    /// Sets the fluids up as the solver will, so a source point off its set
    /// or a set without a free facet is reported at its table.
    pub(super) fn check_fluids(&self, file: &JobFile, disc: &Discretization) -> Result<(), InputError> {
        match Fluids::new(disc) {
            Ok(_) => Ok(()),
            Err(FluidError { fluid, reason }) => {
                let spec = file.fluid.iter().map(|f| f.get_ref()).find(|f| *f.name.get_ref() == fluid);
                let span = match spec {
                    Some(s) if reason.contains("source point") => s.source.span(),
                    Some(s) => s.sides.span(),
                    None => 0..0,
                };
                Err(self.err(span, format!("fluid `{fluid}`: {reason}")))
            }
        }
    }
}
