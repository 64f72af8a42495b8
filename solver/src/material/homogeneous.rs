//! Homogeneous deformations of one material, computed through the general
//! 3-D routine [`Material::response`]: the same stress and tangent the
//! elements use, so a curve from here is a check of what a mesh will see.
//!
//! Modes (loading direction 1; `λ` is the prescribed stretch):
//!
//! * uniaxial: `F = diag(λ, t, t)`, `t` solved so that the lateral stress is
//!   zero;
//! * equibiaxial: `F = diag(λ, λ, t)`, `t` solved for zero thickness stress;
//! * planar (pure shear): `F = diag(λ, 1, t)`, `t` solved for zero thickness
//!   stress;
//! * simple shear: `F = I + γ e1⊗e2` with `γ = λ − 1/λ`, so that `λ` is the
//!   larger principal stretch. The thickness is held (J = 1 exactly, as in a
//!   bonded quadruple-shear piece); reported stresses are the shear
//!   components `P12 = σ12`;
//! * volumetric: `F = λ I` (`λ` is the linear stretch, `J = λ³`); the true
//!   stress is the pressure σ11 (positive in tension).
//!
//! The lateral stretch is found by Newton's method on its logarithm using the
//! consistent tangent, so the result is exact to the solver tolerance for any
//! bulk modulus; with a large κ it approaches the incompressible closed forms.

use nalgebra::Matrix3;
use thiserror::Error;

use super::error::MaterialError;
use super::Material;

/// A homogeneous test.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mode {
    /// Uniaxial tension or compression, lateral faces free.
    Uniaxial,
    /// Equal stretch in two directions, the third free.
    Equibiaxial,
    /// Planar (pure shear): stretched in one direction, held in the second, free in the third.
    Planar,
    /// Simple shear.
    SimpleShear,
    /// Equal stretch in all three directions (volume change).
    Volumetric,
}

impl Mode {
    /// Every mode, in report order.
    pub const ALL: [Mode; 5] = [Mode::Uniaxial, Mode::Equibiaxial, Mode::Planar, Mode::SimpleShear, Mode::Volumetric];

    /// Name on the command line and in CSV files.
    pub fn name(self) -> &'static str {
        match self {
            Mode::Uniaxial => "uniaxial",
            Mode::Equibiaxial => "equibiaxial",
            Mode::Planar => "planar",
            Mode::SimpleShear => "simple-shear",
            Mode::Volumetric => "volumetric",
        }
    }

    /// Parses a mode name.
    pub fn from_name(name: &str) -> Option<Mode> {
        Mode::ALL.into_iter().find(|m| m.name() == name)
    }

    fn has_lateral_unknown(self) -> bool {
        matches!(self, Mode::Uniaxial | Mode::Equibiaxial | Mode::Planar)
    }

    /// Diagonal stretches `(λ1, λ2, λ3)` for lateral stretch `t`.
    fn diagonal(self, stretch: f64, t: f64) -> [f64; 3] {
        match self {
            Mode::Uniaxial => [stretch, t, t],
            Mode::Equibiaxial => [stretch, stretch, t],
            Mode::Planar => [stretch, 1.0, t],
            Mode::SimpleShear => [1.0, 1.0, 1.0],
            Mode::Volumetric => [stretch; 3],
        }
    }
}

/// Controls of the lateral-stretch solve.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Settings {
    /// Converged when the lateral stress is below `tolerance` × (μ + |S11|).
    /// Default 1e-12: far below any printed digit, well above round-off.
    pub tolerance: f64,
    /// Newton iterations before giving up. Default 60; a good start needs 3–6.
    pub max_iterations: usize,
}

impl Default for Settings {
    fn default() -> Self {
        Settings { tolerance: 1e-12, max_iterations: 60 }
    }
}

impl Settings {
    /// Checks the settings: a positive finite tolerance, at least one iteration.
    pub fn validate(&self) -> Result<(), HomogeneousError> {
        let bad = |field: &'static str, value: f64, requirement: &'static str| HomogeneousError::BadSettings { field, value, requirement };
        if !(self.tolerance > 0.0 && self.tolerance.is_finite()) {
            return Err(bad("tolerance", self.tolerance, "positive and finite"));
        }
        if self.max_iterations == 0 {
            return Err(bad("max_iterations", 0.0, "at least 1"));
        }
        Ok(())
    }

    /// The settings, if [`Self::validate`] accepts them.
    pub fn checked(self) -> Result<Self, HomogeneousError> {
        self.validate().map(|_| self)
    }
}

/// One point of a homogeneous response.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Point {
    /// Prescribed stretch λ (simple shear: the larger principal stretch;
    /// volumetric: the linear stretch J^(1/3)).
    pub stretch: f64,
    /// Amount of shear γ = λ − 1/λ (simple shear only, else 0).
    pub amount_of_shear: f64,
    /// Nominal (first Piola–Kirchhoff) stress P11, or P12 in simple shear.
    pub nominal_stress: f64,
    /// True (Cauchy) stress σ11, or σ12 in simple shear.
    pub true_stress: f64,
    /// Stretches in directions 2 and 3 (simple shear: the smaller principal
    /// stretch 1/λ and the held thickness stretch 1).
    pub lateral_stretches: [f64; 2],
    /// Volume ratio J = det F.
    pub volume_ratio: f64,
    /// Principal stretches of the state, loading direction first.
    pub principal_stretches: [f64; 3],
    /// The deformation gradient.
    pub deformation_gradient: Matrix3<f64>,
}

/// Why a point of a homogeneous response could not be computed.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum HomogeneousError {
    /// The material could not be evaluated at this stretch.
    #[error("{mode} at stretch {stretch}: {source}")]
    Material {
        /// The test, e.g. `uniaxial`.
        mode: &'static str,
        /// The applied stretch.
        stretch: f64,
        /// What the material reported.
        #[source]
        source: MaterialError,
    },
    /// The free lateral stretch of the test was not found.
    #[error("{mode} at stretch {stretch}: lateral stretch not converged (stress residual {residual:.3e} after {iterations} iterations)")]
    NotConverged {
        /// The test, e.g. `uniaxial`.
        mode: &'static str,
        /// The applied stretch.
        stretch: f64,
        /// Lateral stress left (stress units).
        residual: f64,
        /// Iterations made.
        iterations: usize,
    },
    /// A [`Settings`] value out of range (NaN included).
    #[error("homogeneous test settings: `{field}` must be {requirement}, got {value}")]
    BadSettings {
        /// The field of [`Settings`].
        field: &'static str,
        /// The value given.
        value: f64,
        /// What it must be.
        requirement: &'static str,
    },
    /// The stretch is not positive and finite.
    #[error("{mode}: stretch {stretch} must be positive and finite")]
    BadStretch {
        /// The test, e.g. `uniaxial`.
        mode: &'static str,
        /// The applied stretch.
        stretch: f64,
    },
}

/// Lateral stretch `t` of the incompressible material in `mode`: a start
/// for the lateral solve, and the trend used to carry a solution to a
/// neighbouring stretch.
pub fn incompressible_lateral(mode: Mode, stretch: f64) -> f64 {
    match mode {
        Mode::Uniaxial => 1.0 / stretch.sqrt(),
        Mode::Equibiaxial => 1.0 / (stretch * stretch),
        Mode::Planar => 1.0 / stretch,
        Mode::SimpleShear | Mode::Volumetric => 1.0,
    }
}

fn diag_c(l: [f64; 3]) -> Matrix3<f64> {
    Matrix3::from_diagonal(&nalgebra::Vector3::new(l[0] * l[0], l[1] * l[1], l[2] * l[2]))
}

/// Lateral stress (S22 in uniaxial, where S33 = S22 by symmetry; S33
/// otherwise), its derivative with respect to u = ln t, and S11.
fn lateral_residual(material: &Material, mode: Mode, stretch: f64, t: f64) -> Result<(f64, f64, f64), MaterialError> {
    let r = material.response(&diag_c(mode.diagonal(stretch, t)))?;
    let (res, slope) = match mode {
        Mode::Uniaxial => (r.stress[(1, 1)], (r.tangent[(1, 1)] + r.tangent[(1, 2)]) * t * t),
        _ => (r.stress[(2, 2)], r.tangent[(2, 2)] * t * t),
    };
    Ok((res, slope, r.stress[(0, 0)]))
}

/// Zero of the lateral stress in u = ln t: Newton steps (at most a factor
/// e^0.5 each), kept inside a bracket once one is known and replaced by
/// bisection when they leave it or the slope is not positive; a state the
/// material rejects (e.g. chain locking at a trial point) halves the step.
fn solve_lateral(material: &Material, mode: Mode, stretch: f64, t0: f64, settings: &Settings) -> Result<f64, HomogeneousError> {
    let name = mode.name();
    let scale = material.shear_modulus();
    let (mut lo, mut hi) = (f64::NEG_INFINITY, f64::INFINITY);
    let mut u = t0.ln();
    let mut last_good: Option<(f64, f64)> = None; // (u, step that led on from it)
    let mut residual = f64::INFINITY;
    for iterations in 0..=settings.max_iterations {
        let (res, slope, s11) = match lateral_residual(material, mode, stretch, u.exp()) {
            Ok(v) => v,
            Err(source) => match last_good {
                // Back off towards the last admissible point.
                Some((good, step)) if step.abs() > 1e-12 => {
                    last_good = Some((good, 0.5 * step));
                    u = good + 0.5 * step;
                    continue;
                }
                _ => return Err(HomogeneousError::Material { mode: name, stretch, source }),
            },
        };
        residual = res.abs() / (scale + s11.abs());
        if residual <= settings.tolerance || hi - lo <= 1e-15 * u.abs().max(1.0) {
            return Ok(u.exp());
        }
        if iterations == settings.max_iterations {
            break;
        }
        if res < 0.0 {
            lo = lo.max(u);
        } else {
            hi = hi.min(u);
        }
        let newton = if slope > 0.0 { Some((-res / slope).clamp(-0.5, 0.5)) } else { None };
        let bracketed = lo.is_finite() && hi.is_finite();
        let step = match newton {
            Some(du) if !bracketed || (u + du > lo && u + du < hi) => du,
            _ if bracketed => 0.5 * (lo + hi) - u,
            // No usable slope and no bracket: the lateral stress rises with
            // the lateral stretch in any stable state, so step against it.
            _ => -0.5 * res.signum(),
        };
        last_good = Some((u, step));
        u += step;
        if step.abs() <= 1e-15 * u.abs().max(1.0) {
            return Ok(u.exp());
        }
    }
    Err(HomogeneousError::NotConverged { mode: name, stretch, residual, iterations: settings.max_iterations })
}

/// The response of `material` in `mode` at `stretch`. `guess` is a start for
/// the lateral stretch (`None`: the incompressible value).
pub fn point(material: &Material, mode: Mode, stretch: f64, guess: Option<f64>, settings: &Settings) -> Result<Point, HomogeneousError> {
    let name = mode.name();
    settings.validate()?;
    if !(stretch.is_finite() && stretch > 0.0) {
        return Err(HomogeneousError::BadStretch { mode: name, stretch });
    }
    let wrap = |source| HomogeneousError::Material { mode: name, stretch, source };
    if mode == Mode::SimpleShear {
        let gamma = stretch - 1.0 / stretch;
        let mut f = Matrix3::identity();
        f[(0, 1)] = gamma;
        let r = material.response(&(f.transpose() * f)).map_err(wrap)?;
        let p = f * r.stress;
        let sigma = p * f.transpose();
        return Ok(Point {
            stretch,
            amount_of_shear: gamma,
            nominal_stress: p[(0, 1)],
            true_stress: sigma[(0, 1)],
            lateral_stretches: [1.0 / stretch, 1.0],
            volume_ratio: 1.0,
            principal_stretches: [stretch, 1.0 / stretch, 1.0],
            deformation_gradient: f,
        });
    }
    let t0 = guess.filter(|g| g.is_finite() && *g > 0.0).unwrap_or_else(|| incompressible_lateral(mode, stretch));
    let t = if mode.has_lateral_unknown() { solve_lateral(material, mode, stretch, t0, settings)? } else { 1.0 };
    let l = mode.diagonal(stretch, t);
    let r = material.response(&diag_c(l)).map_err(wrap)?;
    let j = l[0] * l[1] * l[2];
    let s11 = r.stress[(0, 0)];
    Ok(Point {
        stretch,
        amount_of_shear: 0.0,
        nominal_stress: l[0] * s11,
        true_stress: l[0] * l[0] * s11 / j,
        lateral_stretches: [l[1], l[2]],
        volume_ratio: j,
        principal_stretches: l,
        deformation_gradient: Matrix3::from_diagonal(&nalgebra::Vector3::new(l[0], l[1], l[2])),
    })
}

/// The response at each of `stretches`, returned in the given order. The
/// points are solved outward from λ = 1 (ascending above 1, descending below),
/// each starting from its neighbour's lateral stretch, so a strongly
/// compressed or stretched state is reached by continuation. Each side stops
/// at its first failure (e.g. an eight-chain material reaching its locking
/// stretch): the points computed before it are returned with the error.
pub fn sweep(material: &Material, mode: Mode, stretches: &[f64], settings: &Settings) -> (Vec<Point>, Vec<HomogeneousError>) {
    let mut order: Vec<usize> = (0..stretches.len()).collect();
    order.sort_by(|&a, &b| stretches[a].total_cmp(&stretches[b]));
    let split = order.partition_point(|&i| stretches[i] < 1.0);
    let (below, above) = order.split_at(split);
    let mut solved: Vec<Option<Point>> = vec![None; stretches.len()];
    let mut errors = Vec::new();
    for side in [Box::new(above.iter()) as Box<dyn Iterator<Item = &usize>>, Box::new(below.iter().rev())] {
        // Start from the reference state λ = 1, t = 1.
        let mut previous = (1.0, 1.0);
        for &i in side {
            let s = stretches[i];
            let guess = previous.1 * incompressible_lateral(mode, s) / incompressible_lateral(mode, previous.0);
            match point(material, mode, s, Some(guess), settings) {
                Ok(p) => {
                    // Direction 3 carries the unknown lateral stretch in every mode that has one.
                    previous = (s, p.principal_stretches[2]);
                    solved[i] = Some(p);
                }
                Err(e) => {
                    errors.push(e);
                    break;
                }
            }
        }
    }
    (solved.into_iter().flatten().collect(), errors)
}
