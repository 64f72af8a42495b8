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
    /// Generate a part mesh and write it as .vtu: from a TOML spec file
    /// (`--spec FILE`) or a generator name with KEY=VALUE options, e.g.
    /// `olli mesh generate seal.vtu cord diameter=3.5 divisions=16`.
    Generate {
        /// The .vtu file to write.
        output: PathBuf,
        /// Generator: rectangle, block, annulus, hollow-cylinder, disc, cord, solid-cylinder.
        #[arg(conflicts_with = "spec")]
        generator: Option<String>,
        /// Generator parameters as KEY=VALUE (VALUE in TOML syntax, e.g. size=[10,5]).
        #[arg(value_name = "KEY=VALUE")]
        options: Vec<String>,
        /// TOML file describing the generator (`generate = "cord"` and its parameters).
        #[arg(long)]
        spec: Option<PathBuf>,
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
        Action::Generate { output, generator, options, spec } => {
            let text = match (spec, generator) {
                (Some(spec), _) => command::generate_file(&spec, &output),
                (None, Some(g)) => {
                    let opts: Vec<&str> = options.iter().map(String::as_str).collect();
                    command::generate_options(&g, &opts, &output)
                }
                (None, None) => Err(MeshError::Spec { message: "give a generator name or --spec FILE".into() }),
            };
            text.map(|t| {
                print!("{t}");
                println!("wrote {}", output.display());
            })
        }
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
