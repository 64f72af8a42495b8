//! `olli mesh`: generate, inspect and convert meshes. The work is done by the
//! mesh crate's command helpers; this module parses options and prints.

use std::path::PathBuf;
use std::process::ExitCode;

use olli_mesh::command;
use olli_mesh::MeshError;

#[derive(clap::Args)]
pub struct Args {
    #[command(subcommand)]
    action: Action,
}

#[derive(clap::Subcommand)]
enum Action {
    /// Counts (nodes, elements, per type, per named set), bounding box and quality summary.
    Info {
        /// Mesh file (.vtu, .vtk or Gmsh .msh 4.1).
        file: PathBuf,
    },
    /// Read any supported mesh file and write it, with its sets, as .vtu.
    Convert { file: PathBuf, output: PathBuf },
    /// Generate a part mesh from a TOML spec file or from options, and write it as .vtu.
    Generate {
        /// The .vtu file to write.
        output: PathBuf,
        /// TOML file describing the generator (`generate = "cord"`, parameters ...).
        #[arg(long, conflicts_with = "shape")]
        spec: Option<PathBuf>,
        /// Generator name: rectangle, block, annulus, hollow-cylinder, disc, cord, solid-cylinder.
        #[arg(long)]
        shape: Option<String>,
        /// A generator parameter as KEY=VALUE (VALUE in TOML syntax, e.g. size=[10,5]); repeatable.
        #[arg(long = "set", value_name = "KEY=VALUE")]
        set: Vec<String>,
    },
}

pub fn run(args: Args) -> ExitCode {
    let result = match args.action {
        Action::Info { file } => command::info(&file).map(|text| print!("{text}")),
        Action::Convert { file, output } => command::convert(&file, &output).map(|notes| {
            for note in notes {
                eprintln!("note: {note}");
            }
            println!("wrote {}", output.display());
        }),
        Action::Generate { output, spec, shape, set } => generate(output, spec, shape, set),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("olli mesh: {e}");
            // Anything wrong with what the user gave us (including a file that
            // cannot be read) is bad input; only a failed write is not.
            ExitCode::from(if matches!(e, MeshError::Write { .. }) { 1 } else { 2 })
        }
    }
}

fn generate(output: PathBuf, spec: Option<PathBuf>, shape: Option<String>, set: Vec<String>) -> Result<(), MeshError> {
    let text = match (spec, shape) {
        (Some(path), _) => {
            if !set.is_empty() {
                return Err(MeshError::Spec { message: "--set applies to --shape, not to --spec".into() });
            }
            let text = command::generate_file(&path, &output)?;
            print!("{text}");
            return Ok(());
        }
        (None, Some(shape)) => {
            let mut text = format!("generate = {}\n", toml_string(&shape));
            for pair in &set {
                let (key, value) = pair.split_once('=').ok_or_else(|| MeshError::Spec {
                    message: format!("--set {pair}: expected KEY=VALUE"),
                })?;
                text.push_str(&format!("{} = {}\n", key.trim(), value.trim()));
            }
            text
        }
        (None, None) => {
            return Err(MeshError::Spec { message: "give --spec FILE or --shape NAME".into() });
        }
    };
    let spec = olli_mesh::GeneratorSpec::from_toml(&text)?;
    let mesh = olli_mesh::generate(&spec)?;
    olli_mesh::write_vtu(&mesh, &output)?;
    print!("{}", olli_mesh::summary(&mesh));
    println!("wrote {}", output.display());
    Ok(())
}

fn toml_string(s: &str) -> String {
    format!("\"{}\"", s.replace('\\', "\\\\").replace('"', "\\\""))
}
