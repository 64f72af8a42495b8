//! `olli plot RESULTS_DIR [--output DIR] [--format png|svg]`: pictures of a
//! finished or stopped run and its report page `index.html`.
//!
//! Exit codes: 0 pictures written, 2 unreadable results or unwritable output.

use std::path::PathBuf;
use std::process::ExitCode;

use olli_app::plot::{ColorMap, Format};
use olli_app::report::section::{Field, View};
use olli_app::report::{self, FrameChoice, Options};

#[derive(clap::Args)]
#[command(after_help = "Example:\n  olli plot examples/results/seal --format svg")]
pub struct Args {
    /// Results folder of `olli run` (history.csv, summary.json, the .pvd and .vtu frames).
    pub results: PathBuf,
    /// Folder for the pictures and index.html (default: the results folder).
    #[arg(long, value_name = "DIR")]
    pub output: Option<PathBuf>,
    /// Picture format.
    #[arg(long, value_enum, default_value = "png")]
    pub format: Format,
    /// Field of the contour pictures.
    #[arg(long, value_enum, default_value = "max-principal-log-strain")]
    pub field: Field,
    /// Colour map.
    #[arg(long, value_enum, default_value = "viridis")]
    pub colormap: ColorMap,
    /// Axis a 3-D part is seen along (default: chosen from its shape and motion).
    #[arg(long, value_enum)]
    pub view: Option<View>,
    /// Frames drawn as contour pictures and contact-pressure charts: `ends`
    /// (the end of each stage), `all`, or frame numbers from 1 in the order
    /// of the .pvd file, e.g. `1,4,7`.
    #[arg(long, default_value = "ends", value_name = "ends|all|N,N,..")]
    pub frames: FrameChoice,
}

impl Args {
    /// Options for the library.
    pub fn options(&self) -> Options {
        Options { format: self.format, field: self.field, colors: self.colormap, view: self.view, frames: self.frames.clone() }
    }
}

pub fn run(args: Args) -> ExitCode {
    let out = args.output.clone().unwrap_or_else(|| args.results.clone());
    let job = report::find_job(&args.results);
    match report::write_report(&args.results, &out, job.as_ref(), &args.options()) {
        Ok(pictures) => {
            for p in &pictures {
                println!("wrote {}", out.join(&p.file).display());
            }
            if job.is_none() {
                println!("note: the job file was not found, so rigid surfaces and contact-pressure charts are left out");
            }
            println!("report: {}", out.join(report::page::PAGE_FILE).display());
            ExitCode::SUCCESS
        }
        Err(e) => {
            eprintln!("error: {e}");
            ExitCode::from(2)
        }
    }
}
