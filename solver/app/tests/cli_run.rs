//! `olli run` and `olli check` as scripts use them: exit codes, the files
//! written (and not written), `history.csv` columns, `summary.json`, `.vtu`
//! arrays read back with vtkio, and the message of every kind of bad input;
//! `olli plot` and `olli run --plots`: the pictures and `index.html`, SVG
//! text holding the curves and labels, a folder without results.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use vtkio::model::{Attribute, DataSet, Vtk};

/// A small axisymmetric bush: rubber tube r ∈ [10, 25], z ∈ [0, 40]
/// (invented numbers), pin pushed along z, sleeve held.
const BUSH: &str = r#"
title = "test bush"
analysis = "axisymmetric"

[mesh]
generate = "rectangle"
origin = [10.0, 0.0]
size = [15.0, 40.0]
divisions = [4, 8]

[[select]]
name = "pin"
nodes = { line = { point = [10.0, 0.0], direction = [0.0, 1.0] } }

[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 1000.0

[[region]]
elements = "all"
material = "soft"

[[support]]
nodes = "right"
fix = ["r", "z"]

[[motion]]
nodes = "pin"
stage = "push"
displacement = { r = 0.0, z = 0.5 }

[[stage]]
name = "push"
"#;

struct Scratch(PathBuf);

impl Scratch {
    fn new(name: &str) -> Self {
        let dir = std::env::temp_dir().join(format!("olli-cli-run-{}-{name}", std::process::id()));
        let _ = std::fs::remove_dir_all(&dir);
        std::fs::create_dir_all(&dir).unwrap();
        Scratch(dir)
    }

    fn job(&self, text: &str) -> PathBuf {
        let p = self.0.join("job.toml");
        std::fs::write(&p, text).unwrap();
        p
    }

    fn out(&self) -> PathBuf {
        self.0.join("out")
    }
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

fn olli(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_olli")).args(args).output().unwrap()
}

fn text(o: &Output) -> String {
    format!("{}{}", String::from_utf8_lossy(&o.stdout), String::from_utf8_lossy(&o.stderr))
}

fn run(job: &Path, out: &Path) -> Output {
    olli(&["run", job.to_str().unwrap(), "--output", out.to_str().unwrap()])
}

/// Array names with their lengths.
type Arrays = Vec<(String, usize)>;

/// Point count, cell count, and the point and cell arrays of a `.vtu` file.
fn arrays(path: &Path) -> (usize, usize, Arrays, Arrays) {
    let vtk = Vtk::import(path).unwrap();
    let DataSet::UnstructuredGrid { pieces, .. } = vtk.data else { panic!("not an unstructured grid") };
    let piece = pieces[0].load_piece_data(None).unwrap();
    let list = |a: &[Attribute]| {
        a.iter()
            .map(|a| match a {
                Attribute::DataArray(d) => (d.name.clone(), d.data.len()),
                Attribute::Field { name, .. } => (name.clone(), 0),
            })
            .collect::<Vec<_>>()
    };
    (piece.num_points(), piece.cells.types.len(), list(&piece.data.point), list(&piece.data.cell))
}

/// The frame files a `.pvd` collection lists, in order.
fn pvd_files(dir: &Path) -> Vec<String> {
    let pvd = std::fs::read_to_string(dir.join("job.pvd")).unwrap();
    pvd.lines().filter_map(|l| l.split("file=\"").nth(1)).map(|f| f.trim_end_matches("\"/>").to_string()).collect()
}

#[test]
fn run_writes_history_summary_and_readable_frames() {
    let s = Scratch::new("ok");
    let out = run(&s.job(BUSH), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let header = history.lines().next().unwrap();
    assert_eq!(
        header,
        "stage,increment,load_factor,time,applied_pin_r,applied_pin_z,reaction_right_r,reaction_right_z,reaction_pin_r,reaction_pin_z,newton_iterations"
    );
    let rows: Vec<Vec<&str>> = history.lines().skip(1).map(|l| l.split(',').collect()).collect();
    assert!(rows.len() >= 4, "at least 1/max_increment = 4 increments");
    let last = rows.last().unwrap();
    assert_eq!(last[2].parse::<f64>().unwrap(), 1.0);
    // Equilibrium: what the pin takes, the sleeve gives back (axial, full 2π).
    let (pin, sleeve): (f64, f64) = (last[9].parse().unwrap(), last[7].parse().unwrap());
    assert!(pin > 0.0 && (pin + sleeve).abs() < 1e-6 * pin, "pin {pin}, sleeve {sleeve}");
    // The applied travel follows the linear ramp: 0.5 mm × load factor at every row.
    for row in &rows {
        let (t, travel): (f64, f64) = (row[2].parse().unwrap(), row[5].parse().unwrap());
        assert!((travel - 0.5 * t).abs() < 1e-12, "travel {travel} at load factor {t}");
    }

    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "converged");
    let pin_json = summary["reactions"]["pin"]["z"].as_f64().unwrap();
    assert!((pin_json - pin).abs() < 1e-9 * pin, "summary {pin_json} vs history {pin}");
    assert_eq!(summary["units"]["reaction_pin_z"], "force");
    assert_eq!(summary["units"]["applied_pin_z"], "length");
    assert_eq!(summary["applied"]["applied_pin_z"], 0.5);
    assert!(summary["peaks"]["displacement"]["value"].as_f64().unwrap() >= 0.5 - 1e-12);
    assert!(s.out().join("olli.log").exists());

    let frames = pvd_files(&s.out());
    assert_eq!(frames.len(), rows.len(), "every increment is saved by default");
    let (np, nc, point, cell) = arrays(&s.out().join(frames.last().unwrap()));
    assert_eq!((np, nc), (5 * 9, 4 * 8));
    let want_point = [
        ("displacement", 3),
        ("cauchy_stress", 6),
        ("pressure", 1),
        ("von_mises", 1),
        ("max_principal_log_strain", 1),
        ("energy_density", 1),
        ("reaction", 3),
    ];
    for (name, comps) in want_point {
        assert!(point.contains(&(name.to_string(), comps * np)), "point array {name}: {point:?}");
    }
    for name in ["material", "volume_ratio", "element_pressure"] {
        assert!(cell.contains(&(name.to_string(), nc)), "cell array {name}: {cell:?}");
    }
    let leftovers = std::fs::read_dir(s.out()).unwrap().filter(|e| e.as_ref().unwrap().path().extension().is_some_and(|x| x == "tmp"));
    assert_eq!(leftovers.count(), 0, "no temporary files left behind");
}

#[test]
fn quiet_prints_only_the_summary() {
    let s = Scratch::new("quiet");
    let job = s.job(BUSH);
    let out = olli(&["run", job.to_str().unwrap(), "--output", s.out().to_str().unwrap(), "--quiet"]);
    assert_eq!(out.status.code(), Some(0));
    assert!(out.stderr.is_empty(), "{}", String::from_utf8_lossy(&out.stderr));
    let stdout = String::from_utf8_lossy(&out.stdout);
    assert!(stdout.contains("converged") && stdout.contains("reaction pin") && stdout.contains("wall time"), "{stdout}");
}

#[test]
fn progress_lines_when_not_a_terminal() {
    let s = Scratch::new("lines");
    let out = run(&s.job(BUSH), &s.out());
    let err = String::from_utf8_lossy(&out.stderr);
    assert!(err.contains("stage `push` (1 of 1)"), "{err}");
    assert!(err.contains("increment 1: load factor 0.1000"), "{err}");
}

#[test]
fn output_every_keeps_the_stage_end() {
    let s = Scratch::new("every");
    // A first run with every increment saved, then a second into the same folder.
    assert_eq!(run(&s.job(BUSH), &s.out()).status.code(), Some(0));
    assert!(s.out().join("job_0002.vtu").exists());
    let job = s.job(&format!("{BUSH}\n[output]\nevery = 100\nfields = [\"displacement\"]\n"));
    let out = run(&job, &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    assert_eq!(pvd_files(&s.out()), ["job_0001.vtu"], "only the end of the stage");
    assert!(!s.out().join("job_0002.vtu").exists(), "frames of the earlier run in this folder are removed");
    let (_, _, point, cell) = arrays(&s.out().join("job_0001.vtu"));
    assert_eq!(point.len(), 1);
    assert!(cell.is_empty());
}

/// Bad input: exit code 2, the message, and no output folder.
fn rejects(job_text: &str, want: &[&str]) {
    // Tests run in parallel: every call gets its own folder.
    static CALLS: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let s = Scratch::new(&format!("bad{}", CALLS.fetch_add(1, std::sync::atomic::Ordering::Relaxed)));
    let job = s.job(job_text);
    let out = run(&job, &s.out());
    let msg = text(&out);
    assert_eq!(out.status.code(), Some(2), "{msg}");
    for w in want {
        assert!(msg.contains(w), "expected `{w}` in: {msg}");
    }
    assert!(!s.out().exists(), "nothing may be written for bad input");
    let check = olli(&["check", job.to_str().unwrap()]);
    assert_eq!(check.status.code(), Some(2), "{}", text(&check));
}

#[test]
fn unknown_key_is_located_with_a_suggestion() {
    rejects(
        &BUSH.replace("shear_modulus = 0.5", "shear_modulas = 0.5"),
        &["job.toml:17:1", "shear_modulas", "did you mean `shear_modulus`?"],
    );
    rejects(
        &BUSH.replace("[[stage]]\nname = \"push\"", "[[stage]]\nname = \"push\"\nfirst_incremnt = 0.2"),
        &["first_incremnt", "did you mean `first_increment`?"],
    );
}

#[test]
fn wrong_type_is_located() {
    rejects(&BUSH.replace("bulk_modulus = 1000.0", "bulk_modulus = \"stiff\""), &["job.toml:18:16", "invalid type"]);
}

#[test]
fn missing_material_is_named() {
    rejects(&BUSH.replace("material = \"soft\"", "material = \"sotf\""), &["no material named `sotf`", "did you mean `soft`?"]);
}

#[test]
fn unknown_set_is_named_with_a_suggestion() {
    rejects(&BUSH.replace("nodes = \"right\"", "nodes = \"rigth\""), &["job.toml:25:", "no set named `rigth`", "did you mean `right`?"]);
}

#[test]
fn negative_modulus_is_rejected_at_its_key() {
    rejects(&BUSH.replace("shear_modulus = 0.5", "shear_modulus = -0.5"), &["job.toml:17:", "material `soft`", "shear_modulus"]);
}

#[test]
fn stage_without_loads_is_rejected() {
    rejects(&format!("{BUSH}\n[[stage]]\nname = \"hold\"\n"), &["stage `hold` has no loads"]);
}

#[test]
fn unreadable_mesh_file_is_reported() {
    let job =
        BUSH.replace("generate = \"rectangle\"\norigin = [10.0, 0.0]\nsize = [15.0, 40.0]\ndivisions = [4, 8]", "file = \"missing.msh\"");
    rejects(&job, &["[mesh]", "missing.msh", "cannot read"]);
}

#[test]
fn rigid_surface_without_a_shape_is_rejected() {
    rejects(&format!("{BUSH}\n[[rigid]]\nname = \"plate\"\ntouches = \"right\"\n"), &["rigid `plate`", "give its shape"]);
}

#[test]
fn rigid_surface_of_the_wrong_dimension_is_rejected() {
    let job = format!("{BUSH}\n[[rigid]]\nname = \"plate\"\ntouches = \"right\"\nplane = {{ point = [0, 0, 0], normal = [0, 0, 1] }}\n");
    rejects(&job, &["`plane` is a 3-D shape", "axisymmetric"]);
}

#[test]
fn rigid_surface_on_an_unknown_side_set_is_named_with_a_suggestion() {
    let job = format!("{BUSH}\n[[rigid]]\nname = \"plate\"\ntouches = \"rigth\"\nline = {{ point = [0, 0], direction = [1, 0] }}\n");
    rejects(&job, &["no side set named `rigth`", "did you mean `right`?"]);
}

#[test]
fn impossible_load_stops_and_keeps_converged_increments() {
    // The pin is driven 20 mm outward through a 15 mm wall: the rubber
    // must invert before the end, whatever the increment size.
    let s = Scratch::new("stop");
    let job = BUSH
        .replace("displacement = { r = 0.0, z = 0.5 }", "displacement = { r = 20.0, z = 0.0 }")
        .replace("name = \"push\"\n", "name = \"push\"\nmin_increment = 1e-3\n");
    let out = run(&s.job(&job), &s.out());
    let msg = text(&out);
    assert_eq!(out.status.code(), Some(1), "{msg}");
    assert!(msg.contains("STOPPED in stage `push`"), "{msg}");
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let rows = history.lines().count() - 1;
    assert!(rows >= 1, "some increments converge before the wall collapses");
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "stopped");
    assert_eq!(summary["stopped_in_stage"], "push");
    assert!(summary["reason"].as_str().unwrap().contains("minimum"), "{}", summary["reason"]);
    let lf = summary["last_increment"]["load_factor"].as_f64().unwrap();
    assert!(lf > 0.0 && lf < 1.0, "stopped part-way: {lf}");
    let frames = pvd_files(&s.out());
    let (np, _, point, _) = arrays(&s.out().join(frames.last().unwrap()));
    assert!(point.contains(&("displacement".to_string(), 3 * np)));
}

#[test]
fn check_reports_counts_moduli_and_warnings() {
    let s = Scratch::new("check");
    let job = s.job(&BUSH.replace("material = \"soft\"", "material = \"soft\"\nformulation = \"displacement\""));
    let out = olli(&["check", job.to_str().unwrap()]);
    let msg = text(&out);
    assert_eq!(out.status.code(), Some(0), "{msg}");
    for want in ["nodes: 45", "elements: 32", "node set pin: 9", "side set right: 8", "Drucker-stable", "job is valid"] {
        assert!(msg.contains(want), "expected `{want}` in: {msg}");
    }
    // μ = 0.5, κ = 1000: ν = (3κ − 2μ)/(6κ + 2μ) = 2999/6001 (Lamé relations, general elasticity).
    assert!(msg.contains(&format!("Poisson's ratio {:.5}", 2999.0 / 6001.0)), "{msg}");
    assert!(msg.contains("nearly incompressible") && msg.contains("mixed"), "{msg}");
    assert!(!s.out().exists(), "check writes nothing");
}

#[test]
fn a_step_ramp_applies_the_whole_motion_in_the_first_increment() {
    let s = Scratch::new("ramp");
    let job = BUSH.replace("displacement = { r = 0.0, z = 0.5 }", "displacement = { r = 0.0, z = 0.5 }\nramp = \"step\"");
    let out = run(&s.job(&job), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let header: Vec<&str> = history.lines().next().unwrap().split(',').collect();
    let col = header.iter().position(|c| *c == "reaction_pin_z").unwrap();
    let rows: Vec<f64> = history.lines().skip(1).map(|l| l.split(',').nth(col).unwrap().parse().unwrap()).collect();
    assert!(rows.len() >= 2, "several increments");
    // Hyperelastic: the same displacement gives the same force at every increment.
    assert!((rows[0] - rows[rows.len() - 1]).abs() <= 1e-6 * rows[0].abs(), "{rows:?}");
}

#[test]
fn unknown_ramp_is_located_with_a_suggestion() {
    let job = BUSH.replace("displacement = { r = 0.0, z = 0.5 }", "displacement = { r = 0.0, z = 0.5 }\nramp = \"stpe\"");
    rejects(&job, &["unknown ramp `stpe`", "did you mean `step`?"]);
}

/// The bush with a fluid entering at the outer face (r = 25) in stage `push`.
fn bush_with_fluid(source: &str, stage: &str) -> String {
    format!("{BUSH}\n[[fluid]]\nname = \"oil\"\nsides = \"top\"\nsource = {source}\nstage = \"{stage}\"\npressure = 0.1\n")
}

#[test]
fn fluid_bad_input_is_located() {
    // The top side set runs from r = 10 to 25 at z = 40: a point at z = 30 is off it.
    let job = bush_with_fluid("[20.0, 30.0]", "push");
    let line = job.lines().position(|l| l.starts_with("source =")).unwrap() + 1;
    rejects(&job, &[&format!("job.toml:{line}:"), "fluid `oil`: source point (20, 30) is not on side set `top`"]);
    let job = bush_with_fluid("[20.0, 40.0]", "pump");
    let line = job.lines().position(|l| l.starts_with("stage = \"pump\"")).unwrap() + 1;
    rejects(&job, &[&format!("job.toml:{line}:"), "no stage named `pump`", "did you mean `push`?"]);
    rejects(&bush_with_fluid("[20.0]", "push"), &["`source`: give 2 finite coordinates"]);
    rejects(&bush_with_fluid("[20.0, 40.0]", "push").replace("sides = \"top\"", "sides = \"pin\""), &["`pin` is not a side set"]);
}

#[test]
fn fluid_on_a_valid_source_runs_and_reports_its_columns() {
    let s = Scratch::new("fluid");
    let out = run(&s.job(&bush_with_fluid("[20.0, 40.0]", "push")), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let header = history.lines().next().unwrap();
    assert!(header.ends_with(",fluid_oil_pressure,fluid_oil_wetted_length,newton_iterations"), "{header}");
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["fluids"]["oil"]["pressure"], 0.1);
    // No contact: the whole top face (15 mm, squeezed a little) is wetted.
    let wetted = summary["fluids"]["oil"]["wetted_length"].as_f64().unwrap();
    assert!((wetted - 15.0).abs() < 0.05, "{wetted}");
    let (_, _, point, _) = arrays(&s.out().join("job_0001.vtu"));
    assert!(point.iter().any(|(name, _)| name == "fluid_pressure"), "{point:?}");
}

/// For the pictures: a small plane-strain block (invented numbers) pressed by a rigid plate:
/// a reaction, a rigid surface with contact, two stages.
const BLOCK: &str = r#"
title = "test block"
analysis = "plane-strain"

[mesh]
generate = "rectangle"
size = [2.0, 1.0]
divisions = [4, 2]

[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 500.0

[[region]]
elements = "all"
material = "soft"

[[support]]
nodes = "bottom"
fix = ["x", "y"]

[[rigid]]
name = "plate"
touches = "top"
line = { point = [-1.0, 1.0], direction = [-1.0, 0.0] }
move = { press = [0.0, -0.1], hold = [0.0, -0.1] }

[[stage]]
name = "press"
first_increment = 0.25

[[stage]]
name = "hold"
"#;

#[test]
fn run_with_plots_then_plot_as_svg() {
    let s = Scratch::new("plots-svg");
    let job = s.job(BLOCK);
    let out = s.out();
    let run = olli(&["run", job.to_str().unwrap(), "--output", out.to_str().unwrap(), "--quiet", "--plots"]);
    assert_eq!(run.status.code(), Some(0), "{}", text(&run));
    for file in ["force.png", "stiffness.png", "section_1.png", "contact_plate_1.png", "section_2.png", "index.html"] {
        assert!(out.join(file).is_file(), "{file} missing: {}", text(&run));
    }
    let png = std::fs::read(out.join("force.png")).unwrap();
    assert_eq!(&png[..8], b"\x89PNG\r\n\x1a\n");

    let svg_dir = s.0.join("svg");
    let plot = olli(&["plot", out.to_str().unwrap(), "--output", svg_dir.to_str().unwrap(), "--format", "svg", "--field", "von-mises"]);
    assert_eq!(plot.status.code(), Some(0), "{}", text(&plot));
    let force = std::fs::read_to_string(svg_dir.join("force.svg")).unwrap();
    // The reaction's y force and the plate's y force (x components are zero: no friction).
    // Curves are drawn 2 px wide, once along the data and once as a legend sample.
    assert_eq!(force.matches("stroke-width=\"2\" points=").count(), 2 * 2, "two force curves");
    for label in ["reaction bottom, y", "rigid plate, y", "end of `press`", "force [F]", "test block"] {
        assert!(force.contains(label), "force.svg lacks `{label}`");
    }
    let section = std::fs::read_to_string(svg_dir.join("section_2.svg")).unwrap();
    assert!(section.contains("von Mises stress") && section.contains("rigid `plate`") && section.contains("undeformed"));
    let html = std::fs::read_to_string(svg_dir.join("index.html")).unwrap();
    assert!(html.contains("<img src=\"force.svg\""));
}

#[test]
fn plot_of_a_folder_without_results_is_bad_input() {
    let s = Scratch::new("plot-empty");
    let out = olli(&["plot", s.0.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2));
    let msg = text(&out);
    assert!(msg.contains("history.csv") && msg.contains("cannot read"), "{msg}");
    assert!(!s.0.join("index.html").exists(), "nothing written");
}

/// Regression: `[output] folder = "."` deleted a `history.csv`, `summary.json`
/// or `olli.log` already in the job's folder. Files olli did not write (not
/// listed in its marker) are never removed or overwritten: `olli check` and
/// `olli run` refuse with exit 2 and nothing is written.
#[test]
fn files_olli_did_not_write_are_never_deleted() {
    let s = Scratch::new("foreign");
    let job = s.job(&format!("{BUSH}\n[output]\nfolder = \".\"\n"));
    let mine = s.0.join("history.csv");
    std::fs::write(&mine, "my own measurements\n").unwrap();
    for command in ["check", "run"] {
        let o = olli(&[command, job.to_str().unwrap()]);
        assert_eq!(o.status.code(), Some(2), "{command}: {}", text(&o));
        assert!(text(&o).contains("holds history.csv, which olli did not write"), "{}", text(&o));
    }
    assert_eq!(std::fs::read_to_string(&mine).unwrap(), "my own measurements\n");
    let names: Vec<_> = std::fs::read_dir(&s.0).unwrap().map(|e| e.unwrap().file_name()).collect();
    assert_eq!(names.len(), 2, "nothing but the job and the user's file: {names:?}");
}

/// Once olli wrote a folder's results, a second run replaces them and removes
/// a stale temporary file of its own (a kill mid-write leaves `.<name>.<pid>.tmp`).
#[test]
fn a_rerun_replaces_its_own_results_and_removes_stale_temporaries() {
    let s = Scratch::new("rerun");
    let job = s.job(BUSH);
    assert_eq!(run(&job, &s.out()).status.code(), Some(0));
    let stale = s.out().join(".summary.json.999999.tmp");
    std::fs::write(&stale, "half a summary").unwrap();
    let user = s.out().join("notes.txt");
    std::fs::write(&user, "keep me").unwrap();
    assert_eq!(run(&job, &s.out()).status.code(), Some(0));
    assert!(!stale.exists(), "stale temporary file left behind");
    assert!(user.exists(), "a file olli did not write was removed");
    assert!(s.out().join("summary.json").exists());
}

/// Regression: an output folder that is a file was found by `olli run` only,
/// after `olli check` called the job valid.
#[test]
fn an_output_folder_that_is_a_file_fails_olli_check() {
    let s = Scratch::new("folder-file");
    std::fs::write(s.0.join("results.txt"), "x").unwrap();
    let job = s.job(&format!("{BUSH}\n[output]\nfolder = \"results.txt\"\n"));
    let o = olli(&["check", job.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("results.txt is a file, not a folder"), "{}", text(&o));
}

/// Regression: a killed run left no `summary.json`, so a script could not
/// tell an interrupted run from a running one. It now exists from the start
/// with status `running`; here the file is read while `olli run` works on a
/// job large enough to take a while.
#[test]
fn summary_says_running_while_the_run_works() {
    let s = Scratch::new("running");
    let job = s.job(&BUSH.replace("divisions = [4, 8]", "divisions = [40, 80]"));
    let mut child = Command::new(env!("CARGO_BIN_EXE_olli"))
        .args(["run", job.to_str().unwrap(), "--output", s.out().to_str().unwrap(), "--quiet"])
        .spawn()
        .unwrap();
    let summary = s.out().join("summary.json");
    let mut seen_running = false;
    for _ in 0..400 {
        if let Ok(text) = std::fs::read_to_string(&summary) {
            let v: serde_json::Value = serde_json::from_str(&text).unwrap();
            if v["status"] == "running" {
                seen_running = true;
                break;
            }
        }
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    let status = child.wait().unwrap();
    assert!(seen_running, "summary.json never said running");
    assert_eq!(status.code(), Some(0));
    let v: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(&summary).unwrap()).unwrap();
    assert_eq!(v["status"], "converged");
}

/// The bush with its pin as a bonded insert pushed along the axis instead of a motion.
fn bush_with_insert(insert: &str) -> String {
    BUSH.replace("[[motion]]\nnodes = \"pin\"\nstage = \"push\"\ndisplacement = { r = 0.0, z = 0.5 }\n", insert)
}

const PIN_INSERT: &str = "[[insert]]\nname = \"pin\"\nnodes = \"pin\"\nreference = [0.0, 0.0]\nmove = { push = { z = 0.5 } }\n";

#[test]
fn insert_columns_summary_and_run_summary() {
    let s = Scratch::new("insert");
    let out = run(&s.job(&bush_with_insert(PIN_INSERT)), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    assert!(text(&out).contains("insert pin: z = 0.500000"), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let header = history.lines().next().unwrap();
    assert_eq!(
        header,
        "stage,increment,load_factor,time,reaction_right_r,reaction_right_z,insert_pin_z,insert_pin_force_z,newton_iterations"
    );
    let last: Vec<f64> = history.lines().last().unwrap().split(',').skip(1).map(|v| v.parse().unwrap()).collect();
    // The rubber pulls the pin back with what the sleeve holds (full 2π).
    let (z, force, sleeve) = (last[5], last[6], last[4]);
    assert_eq!(z, 0.5);
    assert!(force < 0.0 && (force - sleeve).abs() < 1e-6 * force.abs(), "pin {force}, sleeve {sleeve}");
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert!((summary["inserts"]["pin"]["force_z"].as_f64().unwrap() - force).abs() < 1e-9 * force.abs());
    assert_eq!(summary["units"]["insert_pin_force_z"], "force");
    // The same push by a motion gives the same force (the insert holds r at zero like the motion).
    let m = Scratch::new("insert-motion");
    assert_eq!(run(&m.job(BUSH), &m.out()).status.code(), Some(0));
    let h = std::fs::read_to_string(m.out().join("history.csv")).unwrap();
    // Columns: stage, increment, load_factor, time, applied_pin_r, applied_pin_z, reaction_right_r, _z, reaction_pin_r, _z.
    let pin: f64 = h.lines().last().unwrap().split(',').nth(9).unwrap().parse().unwrap();
    assert!((pin + force).abs() < 1e-8 * pin, "motion {pin}, insert {force}");
}

#[test]
fn bad_insert_input_is_located() {
    rejects(&bush_with_insert(&PIN_INSERT.replace("z = 0.5", "w = 0.5")), &["job.toml:", "unknown component `w`", "use z"]);
    rejects(
        &bush_with_insert(&format!("{PIN_INSERT}turn = {{ push = {{ z = 1.0 }} }}\n")),
        &["job.toml:", "`turn`: axisymmetric analysis has no rotation components"],
    );
    rejects(
        &bush_with_insert(&format!("{PIN_INSERT}force = {{ push = {{ z = 10.0 }} }}\n")),
        &["job.toml:", "component `z` is both prescribed and loaded in stage `push`"],
    );
    rejects(&bush_with_insert(&PIN_INSERT.replace("push = {", "pushh = {")), &["job.toml:", "no stage named `pushh`"]);
    rejects(
        &BUSH.replace("fix = [\"r\", \"z\"]", "fix = [\"r\", \"z\"]\nmoment_about = [0.0, 0.0]"),
        &["job.toml:", "`moment_about`: an axisymmetric reaction has no moment"],
    );
    rejects(
        &bush_with_insert(&format!("{PIN_INSERT}\n[[insert]]\nname = \"pin2\"\nnodes = \"bottom\"\nreference = [0.0, 0.0]\n")),
        &["job.toml:", "node 0 is also bonded to insert `pin`"],
    );
}

#[test]
fn constraints_that_disagree_are_located_and_agreeing_ones_pass() {
    // A motion of the top edge to z = 0.3 meets the pin's motion (0.5) and the sleeve's support (0) at the corners.
    let top = "[[motion]]\nnodes = \"top\"\nstage = \"push\"\ndisplacement = { z = 0.3 }\n";
    rejects(
        &format!("{BUSH}{top}"),
        &[
            "job.toml:38:16",
            "stage `push`: node",
            "component `z` is moved to 0.5 by the motion on `pin` but moved to 0.3 by the motion on `top`",
        ],
    );
    let top_only = BUSH.replace("displacement = { r = 0.0, z = 0.5 }", "displacement = { r = 0.0 }");
    rejects(
        &format!("{top_only}{top}"),
        &["job.toml:", "component `z` is held at 0 by the support on `right` but moved to 0.3 by the motion on `top`"],
    );
    // The pin's motion and an insert on the pin's corner node.
    rejects(
        &format!("{BUSH}\n[[insert]]\nname = \"edge\"\nnodes = \"bottom\"\nreference = [0.0, 0.0]\n"),
        &["job.toml:", "by the motion on `pin` but held at 0 by insert `edge`"],
    );
    // Agreeing: the top edge held at r = 0 by a motion while the sleeve holds r at 0 too.
    let s = Scratch::new("agree");
    let agree = "[[motion]]\nnodes = \"top\"\nstage = \"push\"\ndisplacement = { r = 0.0 }\n";
    let out = olli(&["check", s.job(&format!("{BUSH}{agree}")).to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
}

/// Regression: a killed run left no word of it (issue 18). SIGTERM ends the
/// run with exit status 143 (128 + 15, the shell's convention), `summary.json`
/// says `interrupted` with the last converged increment, and every converged
/// increment is kept in `history.csv` and the frames.
#[test]
fn sigterm_leaves_an_interrupted_summary_and_the_converged_increments() {
    let s = Scratch::new("sigterm");
    let slow = BUSH
        .replace("divisions = [4, 8]", "divisions = [40, 80]")
        .replace("name = \"push\"\n", "name = \"push\"\nfirst_increment = 0.01\nmax_increment = 0.01\n");
    let job = s.job(&slow);
    let mut child = Command::new(env!("CARGO_BIN_EXE_olli"))
        .args(["run", job.to_str().unwrap(), "--output", s.out().to_str().unwrap(), "--quiet"])
        .spawn()
        .unwrap();
    let summary = s.out().join("summary.json");
    let read =
        || -> serde_json::Value { std::fs::read_to_string(&summary).ok().and_then(|t| serde_json::from_str(&t).ok()).unwrap_or_default() };
    let t0 = std::time::Instant::now();
    while read()["last_increment"].is_null() {
        assert!(t0.elapsed() < std::time::Duration::from_secs(30), "no increment converged");
        assert!(child.try_wait().unwrap().is_none(), "the run ended before its first increment");
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    assert_eq!(read()["status"], "running");
    let killed = Command::new("kill").args(["-TERM", &child.id().to_string()]).status().unwrap();
    assert!(killed.success());
    let status = child.wait().unwrap();
    assert_eq!(status.code(), Some(143), "the run ended by itself before the signal; make the job slower");
    let v = read();
    assert_eq!(v["status"], "interrupted");
    let last = v["last_increment"]["load_factor"].as_f64().unwrap();
    assert!(last > 0.0 && last < 1.0, "{v:#}");
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let rows: Vec<&str> = history.lines().skip(1).collect();
    assert_eq!(v["increments"].as_u64(), Some(rows.len() as u64));
    let last_row_factor: f64 = rows.last().unwrap().split(',').nth(2).unwrap().parse().unwrap();
    assert!((last_row_factor - last).abs() <= 1e-12 * last.max(1.0), "{last_row_factor} vs {last}");
    let frames = std::fs::read_dir(s.out()).unwrap().filter(|e| e.as_ref().unwrap().path().extension().is_some_and(|x| x == "vtu")).count();
    assert!(frames >= 1, "no frame kept");
    let log = std::fs::read_to_string(s.out().join("olli.log")).unwrap();
    assert!(log.contains("interrupted by SIGTERM"), "{log}");
}

/// [`BUSH`] made of a viscoelastic rubber (`prony`), pushed at once and then
/// held for 1000 time units.
fn relaxing_bush() -> String {
    BUSH.replace("bulk_modulus = 1000.0", "bulk_modulus = 1000.0\nprony = [[0.3, 1.0], [0.2, 50.0]]")
        .replace("[[stage]]\nname = \"push\"", "[[stage]]\nname = \"push\"\nfirst_increment = 0.5\nmax_increment = 0.5")
        + "\n[[stage]]\nname = \"hold\"\nduration = 1000.0\n"
}

#[test]
fn a_held_stage_relaxes_over_its_duration_with_time_in_the_history() {
    let s = Scratch::new("hold");
    let out = run(&s.job(&relaxing_bush()), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let header: Vec<&str> = history.lines().next().unwrap().split(',').collect();
    assert_eq!(header[..4], ["stage", "increment", "load_factor", "time"]);
    let col = header.iter().position(|c| *c == "reaction_pin_z").unwrap();
    let rows: Vec<(String, f64, f64)> = history
        .lines()
        .skip(1)
        .map(|l| {
            let v: Vec<&str> = l.split(',').collect();
            (v[0].to_string(), v[3].parse().unwrap(), v[col].parse().unwrap())
        })
        .collect();
    // The push takes no time; the hold's time grows geometrically to its duration.
    assert!(rows.iter().filter(|r| r.0 == "push").all(|r| r.1 == 0.0));
    let hold: Vec<_> = rows.iter().filter(|r| r.0 == "hold").collect();
    assert!(hold.len() > 10 && (hold.last().unwrap().1 - 1000.0).abs() < 1e-6, "{} rows", hold.len());
    assert!(hold.windows(2).all(|w| w[1].1 > w[0].1 && w[1].2.abs() < w[0].2.abs()), "time grows and the force relaxes");
    // After 20 times the longest relaxation time the force is the relaxed one:
    // g∞ = 0.5 of the instantaneous force, within the redistribution of a
    // nearly incompressible bush (common practice: a few per cent).
    let (pushed, relaxed) = (rows.iter().rfind(|r| r.0 == "push").unwrap().2, hold.last().unwrap().2);
    assert!((relaxed / pushed - 0.5).abs() < 0.03, "relaxed/pushed = {}", relaxed / pushed);
}

#[test]
fn bad_prony_terms_and_durations_are_located() {
    let prony = |terms: &str| relaxing_bush().replace("prony = [[0.3, 1.0], [0.2, 50.0]]", &format!("prony = {terms}"));
    rejects(&prony("[[-0.1, 1.0]]"), &["job.toml:19:", "material `soft`", "prony", "positive"]);
    rejects(&prony("[[0.6, 1.0], [0.4, 5.0]]"), &["job.toml:19:", "prony", "less than 1"]);
    rejects(&prony("[[0.2, 0.0]]"), &["job.toml:19:", "prony", "tau_i"]);
    rejects(&prony("[[0.2, 1.0, 3.0]]"), &["job.toml:19:", "each term is [g_i, tau_i], got 3 numbers"]);
    rejects(
        &relaxing_bush().replace("duration = 1000.0", "duration = -5.0"),
        &["job.toml:", "stage `hold`", "`duration` must be a positive time"],
    );
}

#[test]
fn a_harmonic_stage_first_is_refused() {
    let job = relaxing_bush().replace("name = \"push\"\n", "name = \"push\"\nharmonic = { frequencies = [1.0, 10.0] }\n");
    rejects(&job, &["job.toml:", "stage `push`", "harmonic stage cannot come first"]);
}
