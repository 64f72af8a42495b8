//! Pictures of a run and its report page, drawn from the results folder
//! alone (plus the job, when at hand, for the rigid surfaces and the contact
//! sets): force–travel and stiffness charts ([`forces`]), contact pressure
//! along each rigid surface ([`contact`]; in 3-D the footprint laid flat,
//! [`footprint`]), contour pictures of the deformed
//! shape ([`section`]) and `index.html` ([`page`]).
//!
//! A run that stopped early has the same files up to its last converged
//! increment, so it gets the same pictures; a missing column, array or
//! summary leaves out only what needs it.

pub mod contact;
pub mod footprint;
pub mod forces;
pub mod page;
pub mod results;
pub mod section;

use std::path::{Path, PathBuf};

use crate::job::Job;
use crate::plot::{self, ColorMap, Format, PlotError};
use results::{Frame, RunResults};
use section::{Field, View};

/// Something that stops the pictures of a run.
#[derive(Debug, thiserror::Error)]
pub enum ReportError {
    /// A results file could not be read.
    #[error("{file}: cannot read: {source}")]
    Read {
        /// The file.
        file: PathBuf,
        /// What the operating system reported.
        source: std::io::Error,
    },
    /// A results file is malformed.
    #[error("{file}, line {line}: {message}")]
    Parse {
        /// The file.
        file: PathBuf,
        /// 1-based line of the problem.
        line: usize,
        /// What is wrong there.
        message: String,
    },
    /// A `.vtu` frame could not be read.
    #[error(transparent)]
    Mesh(#[from] olli_mesh::MeshError),
    /// A picture could not be drawn or written.
    #[error(transparent)]
    Plot(#[from] PlotError),
    /// A picture or page could not be written.
    #[error("{file}: cannot write: {source}")]
    Write {
        /// The file.
        file: PathBuf,
        /// What the operating system reported.
        source: std::io::Error,
    },
    /// `--frames` named a frame the results do not hold.
    #[error("frame {asked} was asked for, but the results hold frames 1 to {available}")]
    NoSuchFrame {
        /// The frame number asked for (from 1).
        asked: usize,
        /// How many frames the results hold.
        available: usize,
    },
}

/// Which saved frames get contour pictures and contact-pressure charts.
#[derive(Debug, Clone, PartialEq, Default)]
pub enum FrameChoice {
    /// The last saved frame of each stage (its end, or the last converged
    /// increment of a stopped run). Default.
    #[default]
    StageEnds,
    /// Every saved frame.
    All,
    /// These frames, numbered from 1 in the order of the `.pvd` collection.
    Numbers(Vec<usize>),
}

impl std::str::FromStr for FrameChoice {
    type Err = String;

    /// `ends`, `all`, or frame numbers separated by commas (`1,4,7`).
    fn from_str(s: &str) -> Result<Self, String> {
        match s.trim() {
            "ends" => Ok(FrameChoice::StageEnds),
            "all" => Ok(FrameChoice::All),
            list => list
                .split(',')
                .map(|n| match n.trim().parse::<usize>() {
                    Ok(k) if k >= 1 => Ok(k),
                    _ => Err(format!("`{n}` is not a frame number (give `ends`, `all`, or numbers from 1 such as `1,4,7`)")),
                })
                .collect::<Result<Vec<_>, _>>()
                .map(FrameChoice::Numbers),
        }
    }
}

/// What to draw and how.
#[derive(Debug, Clone, PartialEq)]
pub struct Options {
    /// Picture format. Default PNG.
    pub format: Format,
    /// Field of the contour pictures. Default max principal log strain.
    pub field: Field,
    /// Colour map. Default viridis.
    pub colors: ColorMap,
    /// View axis of 3-D parts. Default: chosen from the shape and the motion ([`View::choose`]).
    pub view: Option<View>,
    /// Frames drawn. Default: the end of each stage.
    pub frames: FrameChoice,
}

impl Default for Options {
    fn default() -> Self {
        Options { format: Format::Png, field: Field::default(), colors: ColorMap::default(), view: None, frames: FrameChoice::default() }
    }
}

/// A picture written, for the report page.
#[derive(Debug, Clone, PartialEq)]
pub struct Picture {
    /// File name inside the output folder.
    pub file: String,
    /// One line saying what it shows.
    pub caption: String,
}

/// Stage name and load factor of a `.pvd` time (stage index + load factor).
pub fn stage_of(time: f64, stages: &[String]) -> (String, f64) {
    let index = (time - 1e-9).floor().max(0.0);
    let name = stages.get(index as usize).cloned().unwrap_or_else(|| format!("stage {}", index as usize + 1));
    (name, time - index)
}

/// The frames to draw (indices into the run's frames) for `choice`.
pub fn chosen_frames(r: &RunResults, choice: &FrameChoice) -> Result<Vec<usize>, ReportError> {
    match choice {
        FrameChoice::StageEnds => Ok(stage_ends(r)),
        FrameChoice::All => Ok((0..r.frames.len()).collect()),
        FrameChoice::Numbers(list) => list
            .iter()
            .map(|&k| {
                if (1..=r.frames.len()).contains(&k) {
                    Ok(k - 1)
                } else {
                    Err(ReportError::NoSuchFrame { asked: k, available: r.frames.len() })
                }
            })
            .collect(),
    }
}

/// The last saved frame of each stage (the end of a stage, or the last
/// converged increment of a stopped one).
pub fn stage_ends(r: &RunResults) -> Vec<usize> {
    let mut chosen: Vec<usize> = Vec::new();
    for (i, f) in r.frames.iter().enumerate() {
        let stage = (f.time - 1e-9).floor();
        match chosen.last() {
            Some(&j) if (r.frames[j].time - 1e-9).floor() == stage => *chosen.last_mut().unwrap() = i,
            _ => chosen.push(i),
        }
    }
    chosen
}

/// Draws every picture of the run in `folder` into `out` (created if
/// missing); `job` adds the rigid surfaces and the contact-pressure charts.
pub fn draw_all(folder: &Path, out: &Path, job: Option<&Job>, options: &Options) -> Result<(RunResults, Vec<Picture>), ReportError> {
    let r = RunResults::read(folder)?;
    std::fs::create_dir_all(out).map_err(|source| ReportError::Write { file: out.to_path_buf(), source })?;
    let mut pictures = Vec::new();
    let mut save = |stem: &str, caption: String, figure: &dyn Fn(&Path) -> Result<(), PlotError>| -> Result<(), ReportError> {
        let file = options.format.file_name(stem);
        figure(&out.join(&file))?;
        pictures.push(Picture { file, caption });
        Ok(())
    };
    for (stem, chart) in forces::force_charts(&r) {
        let caption = chart.title.clone();
        save(&stem, caption, &|p| plot::write(&chart, p, options.format))?;
    }
    let stages = r.history.stage_names();
    let title = r.title();
    let analysis = r.summary_text("analysis").unwrap_or("").to_string();
    for (k, &i) in chosen_frames(&r, &options.frames)?.iter().enumerate() {
        let frame = Frame::read(&r.frames[i].file)?;
        let (stage, load) = stage_of(r.frames[i].time, &stages);
        let when = format!("stage `{stage}`, load factor {}", plot::number(load));
        let view = (frame.mesh.dimension == 3).then(|| options.view.unwrap_or_else(|| View::choose(&frame.mesh, &frame.deformed())));
        let rigid = match (job, view) {
            (Some(j), Some(v)) => contact::rigid_outlines_3d(j, &frame.deformed(), r.frames[i].time, v),
            (Some(j), None) => contact::rigid_outlines(j, &frame.mesh, r.frames[i].time),
            (None, _) => Vec::new(),
        };
        let heading = format!("{title}: {when}");
        if let Some((contour, _)) = section::section_plot(&frame, options.field, &heading, &analysis, options.colors, view, &rigid) {
            let caption = format!("{} on the deformed shape, {when}", options.field.axis().quantity);
            save(&format!("section_{}", k + 1), caption, &|p| plot::write(&contour, p, options.format))?;
        }
        if let Some(job) = job {
            for (name, chart) in contact::pressure_charts(job, &frame, &r, i, &heading) {
                let caption = format!("contact pressure along `{name}`, {when}");
                save(&format!("contact_{name}_{}", k + 1), caption, &|p| plot::write(&chart, p, options.format))?;
            }
            for (name, print) in footprint::footprints(job, &frame, &r, i, &heading, options.colors) {
                let caption = format!("contact pressure on the rubber faces facing `{name}`, laid flat, {when}");
                save(&format!("footprint_{name}_{}", k + 1), caption, &|p| plot::write(&print.map, p, options.format))?;
                let caption = format!("contact pressure through the peak on `{name}`, {when}");
                save(&format!("contact_{name}_{}", k + 1), caption, &|p| plot::write(&print.profile, p, options.format))?;
            }
        }
    }
    Ok((r, pictures))
}

/// Draws every picture ([`draw_all`]) and writes the report page
/// `index.html` beside them in `out`; returns the pictures written.
pub fn write_report(folder: &Path, out: &Path, job: Option<&Job>, options: &Options) -> Result<Vec<Picture>, ReportError> {
    let (results, pictures) = draw_all(folder, out, job, options)?;
    let path = out.join(page::PAGE_FILE);
    crate::output::write_atomic(&path, page::html(&results, &pictures).as_bytes())
        .map_err(|source| ReportError::Write { file: path, source })?;
    Ok(pictures)
}

/// The job a results folder came from, when its file (the summary's `job`,
/// as given to `olli run`, else relative to the folder's parent) can still
/// be read; `None` otherwise (the pictures then leave out the rigid
/// surfaces and the contact-pressure charts).
pub fn find_job(folder: &Path) -> Option<Job> {
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(folder.join(crate::output::SUMMARY_FILE)).ok()?).ok()?;
    let given = PathBuf::from(summary.get("job")?.as_str()?);
    let candidates =
        [Some(given.clone()), folder.parent().map(|p| p.join(&given)), folder.parent().and_then(|p| p.parent()).map(|p| p.join(&given))];
    candidates.into_iter().flatten().filter(|p| p.is_file()).find_map(|p| crate::job::load(&p).ok())
}
