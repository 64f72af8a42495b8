//! A generator call as data: one TOML table (or serde value) that says which
//! part family to mesh and with which parameters. `olli mesh generate` and
//! the `[mesh]` table of a job file share it.
//!
//! ```toml
//! generate = "cord"
//! center = [20.0, 1.75]
//! diameter = 3.5
//! divisions = 16
//! order = "quadratic"
//! ```
//!
//! Derived shapes nest their section:
//! ```toml
//! generate = "sweep"
//! angle = 90.0
//! divisions = 6
//! [section]
//! generate = "rectangle"
//! origin = [10.0, 0.0]
//! size = [5.0, 20.0]
//! ```

use crate::error::MeshError;
use crate::generate::{self, AnnulusParams, BlockParams, CircleParams, RectangleParams};
use crate::model::Mesh;

/// Which generator to run, with its parameters (each field has a default,
/// documented on the parameter structs).
#[derive(Debug, Clone, PartialEq, serde::Deserialize, serde::Serialize)]
#[serde(tag = "generate", rename_all = "kebab-case")]
pub enum GeneratorSpec {
    /// A 2-D rectangle of quadrilaterals or triangles.
    Rectangle(RectangleParams),
    /// A 3-D block of hexahedra or wedges.
    Block(BlockParams),
    /// A 2-D annulus (ring) section, e.g. a bushing in the r–z or x–y plane.
    Annulus(AnnulusParams),
    /// A 3-D hollow cylinder: the annulus extruded along its axis.
    HollowCylinder(AnnulusParams),
    /// A 2-D disc (full circle), e.g. a mount disc seen from above.
    Disc(CircleParams),
    /// A 2-D circular cord section, e.g. an O-ring cross-section.
    Cord(CircleParams),
    /// A 3-D solid cylinder: the disc extruded along its axis.
    SolidCylinder(CircleParams),
    /// A 2-D section extruded along z by `length` in `layers` layers (caps `start`, `end`).
    Extrude {
        /// The 2-D section to extrude (a 2-D generator).
        section: Box<GeneratorSpec>,
        /// Extruded length along z, in mesh length units.
        length: f64,
        /// Number of element layers along z.
        layers: usize,
    },
    /// An r–z section swept by `angle` degrees (default 360) in `divisions` layers.
    Sweep {
        /// The r–z section to sweep (x = r, y = z; a 2-D generator).
        section: Box<GeneratorSpec>,
        /// Swept angle in degrees, default 360 (a closed ring).
        #[serde(default = "full_turn")]
        angle: f64,
        /// Number of element layers around the axis.
        divisions: usize,
    },
}

impl GeneratorSpec {
    /// Builds a spec from a generator name and `key=value` options, as typed
    /// on a command line: `cord`, `["diameter=3.5", "center=[20, 1.75]", "order=quadratic"]`.
    /// Values are TOML; a bare word that is not valid TOML is taken as a string.
    pub fn from_options(generator: &str, options: &[&str]) -> Result<Self, MeshError> {
        let mut text = format!("generate = {}\n", toml_string(generator));
        for opt in options {
            let (key, value) =
                opt.split_once('=').ok_or_else(|| MeshError::Spec { message: format!("option `{opt}` is not of the form key=value") })?;
            let (key, value) = (key.trim(), value.trim());
            let literal =
                if toml::from_str::<toml::Table>(&format!("v = {value}")).is_ok() { value.to_string() } else { toml_string(value) };
            text.push_str(&format!("{key} = {literal}\n"));
        }
        Self::from_toml(&text)
    }
}

fn toml_string(s: &str) -> String {
    toml::Value::String(s.to_string()).to_string()
}

/// Line of the first `key =` whose key is quoted in the message as `key`.
fn key_line(text: &str, message: &str) -> Option<usize> {
    let key = message.split('`').nth(1)?;
    text.lines()
        .position(|l| {
            let l = l.trim_start();
            l.strip_prefix(key).is_some_and(|rest| rest.trim_start().starts_with('='))
        })
        .map(|i| i + 1)
}

fn full_turn() -> f64 {
    360.0
}

impl GeneratorSpec {
    /// Reads a spec from TOML text; errors name the line and key at fault.
    pub fn from_toml(text: &str) -> Result<Self, MeshError> {
        toml::from_str(text).map_err(|e| {
            let mut message = e.to_string().trim_end().to_string();
            // Tagged enums buffer their content and lose spans: find the key by name.
            if e.span().is_none() {
                if let Some(line) = key_line(text, &message) {
                    message = format!("line {line}: {message}");
                }
            }
            MeshError::Spec { message }
        })
    }
}

/// Runs the generator a spec describes.
pub fn generate(spec: &GeneratorSpec) -> Result<Mesh, MeshError> {
    match spec {
        GeneratorSpec::Rectangle(p) => generate::rectangle(p),
        GeneratorSpec::Block(p) => generate::block(p),
        GeneratorSpec::Annulus(p) => generate::annulus(p),
        GeneratorSpec::HollowCylinder(p) => generate::hollow_cylinder(p),
        GeneratorSpec::Disc(p) => generate::disc(p),
        GeneratorSpec::Cord(p) => generate::cord(p),
        GeneratorSpec::SolidCylinder(p) => generate::solid_cylinder(p),
        GeneratorSpec::Extrude { section, length, layers } => generate::extrude(&generate_2d(section)?, *length, *layers),
        GeneratorSpec::Sweep { section, angle, divisions } => generate::sweep(&generate_2d(section)?, *angle, *divisions),
    }
}

fn generate_2d(spec: &GeneratorSpec) -> Result<Mesh, MeshError> {
    let mesh = generate(spec)?;
    if mesh.dimension != 2 {
        return Err(MeshError::param("section", "must describe a 2-D generator"));
    }
    Ok(mesh)
}
