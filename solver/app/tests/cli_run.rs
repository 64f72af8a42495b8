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
        "stage,increment,load_factor,time,applied_pin_r,applied_pin_z,reaction_right_r,reaction_right_z,reaction_pin_r,reaction_pin_z,peak_max_principal_log_strain,peak_von_mises,min_volume_ratio,newton_iterations"
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
    // What the run cost: the kept ordering has the smaller factor of the two.
    let perf = &summary["performance"];
    let count = |k: &str| perf[k].as_u64().unwrap_or_else(|| panic!("performance.{k}: {perf}"));
    assert!(count("equations") > 0 && count("assemblies") >= count("factorizations") && count("factorizations") > 0);
    let (amd, nd) = (count("factor_entries_amd"), count("factor_entries_nested_dissection"));
    assert_eq!(count("factor_entries"), amd.min(nd));
    assert_eq!(perf["ordering"], if nd < amd { "nested-dissection" } else { "amd" });
    for k in ["assembly_s", "analysis_s", "factorization_s", "solve_s"] {
        assert!(perf[k].as_f64().is_some_and(|v| v >= 0.0), "performance.{k}: {perf}");
    }
    if cfg!(target_os = "linux") {
        assert!(perf["peak_memory_mib"].as_f64().is_some_and(|m| m > 1.0), "{perf}");
    }
    assert!(text(&out).contains(&format!("performance: {} equations, ", count("equations"))), "{}", text(&out));
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
    assert!(
        header.ends_with(
            ",fluid_oil_pressure,fluid_oil_wetted_length,peak_max_principal_log_strain,peak_von_mises,min_volume_ratio,newton_iterations"
        ),
        "{header}"
    );
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

    // Chosen frames: every saved frame, or a list; a frame that does not exist is bad input.
    let frames = pvd_files(&out).len();
    let all_dir = s.0.join("all");
    let plot = olli(&["plot", out.to_str().unwrap(), "--output", all_dir.to_str().unwrap(), "--format", "svg", "--frames", "all"]);
    assert_eq!(plot.status.code(), Some(0), "{}", text(&plot));
    let sections = |dir: &Path| {
        std::fs::read_dir(dir).unwrap().filter(|e| e.as_ref().unwrap().file_name().to_string_lossy().starts_with("section_")).count()
    };
    assert!(frames > 2);
    assert_eq!(sections(&all_dir), frames);
    let two_dir = s.0.join("two");
    let plot = olli(&["plot", out.to_str().unwrap(), "--output", two_dir.to_str().unwrap(), "--format", "svg", "--frames", "1,2"]);
    assert_eq!(plot.status.code(), Some(0), "{}", text(&plot));
    assert_eq!(sections(&two_dir), 2);
    let first = std::fs::read_to_string(two_dir.join("section_1.svg")).unwrap();
    assert!(first.contains("stage `press`"), "the first frame is in the first stage");
    let plot = olli(&["plot", out.to_str().unwrap(), "--output", s.0.join("bad").to_str().unwrap(), "--frames", "99"]);
    assert_eq!(plot.status.code(), Some(2));
    assert!(text(&plot).contains(&format!("frame 99 was asked for, but the results hold frames 1 to {frames}")), "{}", text(&plot));
    let plot = olli(&["plot", out.to_str().unwrap(), "--frames", "first"]);
    assert_eq!(plot.status.code(), Some(2));
    assert!(text(&plot).contains("`first` is not a frame number"), "{}", text(&plot));
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
    assert_eq!(header, "stage,increment,load_factor,time,reaction_right_r,reaction_right_z,insert_pin_z,insert_pin_force_z,peak_max_principal_log_strain,peak_von_mises,min_volume_ratio,newton_iterations");
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

/// Per-increment peaks in `history.csv` and each stage's peaks in
/// `summary.json`, against the closed form of a homogeneous deformation.
/// A plane-strain block 2 × 1 held in y everywhere and in x on the left,
/// pulled on the right to the stretch λ = 1.3 (stage `pull`), then pushed
/// back to λ = 0.8 (stage `push`): every point has F = diag(λ, 1, 1).
const PULL_PUSH: &str = r#"
analysis = "plane-strain"
thickness = 1.0

[mesh]
generate = "rectangle"
size = [2.0, 1.0]
divisions = [4, 2]

[materials.m]
model = "neo-hookean"
shear_modulus = 0.8
bulk_modulus = 40.0

[[region]]
elements = "all"
material = "m"

[[support]]
nodes = "all"
fix = ["y"]

[[support]]
nodes = "left"
fix = ["x"]

[[motion]]
nodes = "right"
stage = "pull"
displacement = { x = 0.6 }

[[motion]]
nodes = "right"
stage = "push"
displacement = { x = -0.4 }

[[stage]]
name = "pull"
first_increment = 0.25
max_increment = 0.25

[[stage]]
name = "push"
first_increment = 0.2
max_increment = 0.2
"#;

const PULL_PUSH_MU: f64 = 0.8;

/// Closed form for F = diag(λ, 1, 1) in the decoupled neo-Hookean model
/// σ = μ J⁻¹ dev(b̄) + U'(J) I with b̄ = J^(−2/3) b (Holzapfel 2000,
/// "Nonlinear Solid Mechanics", §6.4): J = λ, the largest principal log
/// strain is ln max(λ, 1), and the deviator μ J^(−5/3) (λ² − 1)/3 · (2, −1, −1)
/// gives the von Mises stress √(3/2 s:s) = μ λ^(−5/3) |λ² − 1|, whatever the
/// volumetric law U.
fn pull_push_closed_form(lambda: f64) -> [f64; 3] {
    [lambda.max(1.0).ln(), PULL_PUSH_MU * lambda.powf(-5.0 / 3.0) * (lambda * lambda - 1.0).abs(), lambda]
}

fn pull_push_stretch(stage: &str, t: f64) -> f64 {
    match stage {
        "pull" => 1.0 + 0.3 * t,
        _ => 1.3 - 0.5 * t,
    }
}

#[test]
fn peaks_of_every_increment_and_stage_follow_the_closed_form() {
    let s = Scratch::new("peaks");
    let out = s.out();
    let o = run(&s.job(PULL_PUSH), &out);
    assert_eq!(o.status.code(), Some(0), "{}", text(&o));

    let history = std::fs::read_to_string(out.join("history.csv")).unwrap();
    let mut lines = history.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap_or_else(|| panic!("no column {name} in {header:?}"));
    let (c_strain, c_vm, c_j) = (col("peak_max_principal_log_strain"), col("peak_von_mises"), col("min_volume_ratio"));
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    assert_eq!(rows.len(), 4 + 5, "every converged increment has a row");
    for r in &rows {
        let t: f64 = r[2].parse().unwrap();
        let want = pull_push_closed_form(pull_push_stretch(r[0], t));
        for (k, c) in [c_strain, c_vm, c_j].into_iter().enumerate() {
            let got: f64 = r[c].parse().unwrap();
            // The state is uniform, so the only error is Newton's tolerance.
            assert!((got - want[k]).abs() <= 1e-6 * (1.0 + want[k].abs()), "{} t={t} column {}: {got} vs {}", r[0], header[c], want[k]);
        }
    }

    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(out.join("summary.json")).unwrap()).unwrap();
    let peaks = &summary["stage_peaks"];
    let check = |stage: &str, which: &str, lambda: f64, k: usize, increment: u64| {
        let p = &peaks[stage][which];
        let value = p["value"].as_f64().unwrap_or_else(|| panic!("{stage}.{which} missing: {peaks}"));
        let want = pull_push_closed_form(lambda)[k];
        assert!((value - want).abs() <= 1e-6 * (1.0 + want.abs()), "{stage}.{which}: {value} vs {want}");
        assert_eq!(p["increment"].as_u64(), Some(increment), "{stage}.{which}: {p}");
        let at: Vec<f64> = p["at"].as_array().unwrap().iter().map(|v| v.as_f64().unwrap()).collect();
        assert!((0.0..=2.0).contains(&at[0]) && (0.0..=1.0).contains(&at[1]), "{stage}.{which} at {at:?}");
        assert!(p["element"].as_u64().unwrap() < 8);
    };
    // Pulling: strain and stress grow to the end, J is least at the first increment.
    check("pull", "max_principal_log_strain", 1.3, 0, 4);
    check("pull", "von_mises", 1.3, 1, 4);
    check("pull", "min_volume_ratio", 1.075, 2, 1);
    // Pushing back from λ = 1.3: the tensile strain is largest at the first
    // increment (λ = 1.2); μλ^(−5/3)|λ² − 1| is larger at 0.8 (0.418) than at 1.2 (0.260).
    check("push", "max_principal_log_strain", 1.2, 0, 1);
    check("push", "von_mises", 0.8, 1, 5);
    check("push", "min_volume_ratio", 0.8, 2, 5);
}

/// A plane-strain block 2 × 1 bonded to the ground, squeezed by 0.05 from
/// the top (stage `squeeze`), then let go (stage `relax`, `release` on the
/// top's motion). Squeezed much further, the let-go block would sway: its
/// top then carries a dead load of about its shear stiffness μ·A (the
/// P-δ instability of a compressed block with a free top), and a sideways
/// buckled shape is an equilibrium too.
const SQUEEZE_RELAX: &str = r#"
analysis = "plane-strain"
thickness = 1.0

[mesh]
generate = "rectangle"
size = [2.0, 1.0]
divisions = [4, 2]

[materials.m]
model = "neo-hookean"
shear_modulus = 0.8
bulk_modulus = 40.0

[[region]]
elements = "all"
material = "m"

[[support]]
nodes = "bottom"
fix = ["x", "y"]

[[motion]]
nodes = "top"
stage = "squeeze"
displacement = { x = 0.0, y = -0.05 }
release = "relax"

[[stage]]
name = "squeeze"

[[stage]]
name = "relax"
first_increment = 0.25
max_increment = 0.25
"#;

/// Released: the top's reaction at the end of the squeeze becomes a load
/// ramped to zero, so by statics alone the ground's reaction over the relax
/// stage is (1 − t) times its value at the end of the squeeze, and at t = 1
/// nothing loads the block: a hyperelastic body returns to its original
/// shape (zero displacement) and carries no force.
#[test]
fn released_block_relaxes_to_zero_force_and_its_original_shape() {
    let s = Scratch::new("release");
    let out = run(&s.job(SQUEEZE_RELAX), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let mut lines = history.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = header.iter().position(|h| *h == "reaction_bottom_y").unwrap();
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    let squeezed: f64 = rows.iter().rfind(|r| r[0] == "squeeze").unwrap()[col].parse().unwrap();
    assert!(squeezed.abs() > 0.3, "the squeeze loads the ground: {squeezed}");
    let relax: Vec<&Vec<&str>> = rows.iter().filter(|r| r[0] == "relax").collect();
    assert_eq!(relax.len(), 4);
    for r in &relax {
        let t: f64 = r[2].parse().unwrap();
        let got: f64 = r[col].parse().unwrap();
        assert!((got - (1.0 - t) * squeezed).abs() <= 1e-6 * squeezed.abs(), "t = {t}: {got} vs {}", (1.0 - t) * squeezed);
    }
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "converged", "{summary}");
    let moved = summary["peaks"]["displacement"]["value"].as_f64().unwrap();
    assert!(moved < 1e-6, "the block is back in its original shape: largest displacement {moved}");
    let strain = summary["peaks"]["max_principal_log_strain"]["value"].as_f64().unwrap();
    assert!(strain.abs() < 1e-6, "and unstrained: {strain}");
    assert!(summary["reactions"]["bottom"]["y"].as_f64().unwrap().abs() < 1e-6 * squeezed.abs());
}

/// A support added in a later stage holds its nodes where they are at that
/// stage's start: the squeezed block's top, let go by its motion in `relax`
/// but held there by a support starting in `relax`, stays at −0.05, so the
/// block's state, and with it the ground's reaction, does not change at all
/// (statics of an unchanged configuration; before, a support could only
/// hold at zero from the first stage).
#[test]
fn support_added_in_a_later_stage_holds_the_nodes_where_they_are() {
    let s = Scratch::new("support-later");
    let job = format!("{SQUEEZE_RELAX}\n[[support]]\nnodes = \"top\"\nfix = [\"x\", \"y\"]\nstage = \"relax\"\n");
    let out = run(&s.job(&job), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let mut lines = history.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = header.iter().position(|h| *h == "reaction_bottom_y").unwrap();
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    let squeezed: f64 = rows.iter().rfind(|r| r[0] == "squeeze").unwrap()[col].parse().unwrap();
    assert!(squeezed.abs() > 0.3, "the squeeze loads the ground: {squeezed}");
    for r in rows.iter().filter(|r| r[0] == "relax") {
        let got: f64 = r[col].parse().unwrap();
        assert!((got - squeezed).abs() <= 1e-6 * squeezed.abs(), "held in place: {got} vs {squeezed}");
    }
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "converged", "{summary}");
    // Held at zero instead, the block would spring back and the ground's reaction vanish.
    assert!((summary["reactions"]["bottom"]["y"].as_f64().unwrap() - squeezed).abs() <= 1e-6 * squeezed.abs());
}

/// A support that starts in a stage where a motion moves the same
/// component disagrees with it: a located error, nothing written.
#[test]
fn support_added_where_a_motion_moves_is_located() {
    let s = Scratch::new("support-later-moved");
    let job =
        SQUEEZE_RELAX.replace("stage = \"squeeze\"\ndisplacement", "stage = \"relax\"\ndisplacement").replace("release = \"relax\"\n", "")
            + "\n[[support]]\nnodes = \"top\"\nfix = [\"y\"]\nstage = \"relax\"\n";
    let job = job.replace("[[stage]]\nname = \"squeeze\"\n", "[[stage]]\nname = \"squeeze\"\nduration = 1.0\n");
    let o = olli(&["check", s.job(&job).to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("held where it is at the stage start"), "{}", text(&o));
}

/// An output folder that cannot be written (here below /proc, which even
/// root cannot write) is found by `olli check`, before any run.
#[test]
fn an_output_folder_that_cannot_be_written_fails_olli_check() {
    let s = Scratch::new("folder-unwritable");
    let job = s.job(&format!("{BUSH}\n[output]\nfolder = \"/proc/olli-results\"\n"));
    let o = olli(&["check", job.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2), "{}", text(&o));
    assert!(text(&o).contains("/proc/olli-results cannot be written"), "{}", text(&o));
}

#[test]
fn release_in_an_unknown_or_earlier_stage_is_located() {
    rejects(
        &SQUEEZE_RELAX.replace("release = \"relax\"", "release = \"relaxx\""),
        &["job.toml:", "`release`", "relaxx", "did you mean `relax`"],
    );
    rejects(&SQUEEZE_RELAX.replace("release = \"relax\"", "release = \"squeeze\""), &["job.toml:", "`release`", "does not come after"]);
    let support = SQUEEZE_RELAX.replace("fix = [\"x\", \"y\"]", "fix = [\"x\", \"y\"]\nrelease = \"nowhere\"");
    rejects(&support, &["job.toml:", "`release`", "nowhere"]);
}

/// A thick sphere A = 1, B = 1.5 (a quarter of its axisymmetric section,
/// symmetric about z = 0) inflated by an internal pressure of 0.6 μ, more
/// than it can carry.
const SPHERE: &str = r#"
analysis = "axisymmetric"

[mesh]
generate = "annulus"
inner_radius = 1.0
outer_radius = 1.5
angle = 90.0
radial_divisions = 4
circumferential_divisions = 8

[materials.m]
model = "neo-hookean"
shear_modulus = 1.0
bulk_modulus = 1000.0

[[region]]
elements = "all"
material = "m"

[[support]]
nodes = "start"
fix = ["z"]

[[support]]
nodes = "end"
fix = ["r"]

[[pressure]]
sides = "inner"
stage = "inflate"
value = 0.6

[[stage]]
name = "inflate"
"#;

/// The pressure of an incompressible neo-Hookean thick sphere,
/// p = 2μ ∫ from λ_b to λ_a of (λ⁻² + λ⁻⁵) dλ with λ_b³ = 1 + (λ_a³ − 1)(A/B)³
/// (radial equilibrium dσ_r/dr = 2(σ_θ − σ_r)/r with σ_θ − σ_r = μ(λ² − λ⁻⁴),
/// λ = r/R, integrated through the wall; Ogden 1984, "Non-linear Elastic
/// Deformations", chapter 5, the chapter from memory), has a maximum over
/// λ_a: for B/A = 1.5 it is 0.4935 μ (at λ_a ≈ 1.60). Driven by that
/// pressure past it, the run must stop at the maximum and say it is a limit
/// point, not an ordinary non-convergence.
#[test]
fn inflation_past_its_largest_pressure_stops_at_a_limit_point() {
    let p = |la: f64| {
        let lb = (1.0 + (la.powi(3) - 1.0) / 1.5f64.powi(3)).cbrt();
        let g = |l: f64| -1.0 / l - 0.25 / l.powi(4);
        2.0 * (g(la) - g(lb))
    };
    let p_max = (1..40000).map(|k| p(1.0 + 1e-4 * k as f64)).fold(0.0, f64::max);
    assert!((p_max - 0.4935).abs() < 1e-4, "{p_max}");
    let s = Scratch::new("limit");
    let out = run(&s.job(SPHERE), &s.out());
    let msg = text(&out);
    assert_eq!(out.status.code(), Some(1), "{msg}");
    assert!(msg.contains("cannot be increased past pressure") && msg.contains("a limit point"), "{msg}");
    assert!(msg.contains("drive the stage by a motion"), "{msg}");
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    let reached = 0.6 * summary["last_increment"]["load_factor"].as_f64().unwrap();
    // The stop is just below the maximum; the mesh's own maximum differs
    // from the closed form by its discretisation error (0.14 % on this mesh).
    assert!((reached - p_max).abs() < 0.01 * p_max, "stopped at p = {reached}, closed-form maximum {p_max}");
    assert!(summary["reason"].as_str().unwrap().contains("a limit point"), "{summary}");
}

/// The pressure of an incompressible neo-Hookean thick sphere, inner
/// radius A = 1, outer B = 1.5, shear modulus 1, at inner stretch λ_a
/// (Ogden 1984, "Non-linear Elastic Deformations", chapter 5, from memory;
/// see the limit-point test above).
fn thick_sphere_pressure(la: f64) -> f64 {
    let lb = (1.0 + (la.powi(3) - 1.0) / 1.5f64.powi(3)).cbrt();
    let g = |l: f64| -1.0 / l - 0.25 / l.powi(4);
    2.0 * (g(la) - g(lb))
}

/// The same sphere driven by arc-length control (Crisfield 1981) passes its
/// limit point: the load factor rises to the maximum pressure and falls
/// after it, and every increment lies on the closed-form pressure–stretch
/// curve of the incompressible neo-Hookean thick sphere (Ogden 1984) within
/// 1 %, on both sides of the limit. The inner stretch comes from statics
/// alone: the pressure on the deformed inner hemisphere pushes it up by
/// p π a² (its projection on the cut z = 0), which the cut's supports carry,
/// so a = √(|F_z| / (π p)). The stage cannot reach 0.6, so the run stops
/// after its `max_increments`, saying so.
#[test]
fn arc_length_inflation_passes_the_limit_point_on_the_closed_form_curve() {
    let job = SPHERE.replace("name = \"inflate\"\n", "name = \"inflate\"\ncontrol = \"arc-length\"\nmax_increments = 40\n");
    assert_ne!(job, SPHERE);
    let s = Scratch::new("arc-length");
    let out = run(&s.job(&job), &s.out());
    let msg = text(&out);
    assert_eq!(out.status.code(), Some(1), "{msg}");
    assert!(msg.contains("(arc-length): 40 increments reached load factor") && msg.contains("without reaching the end"), "{msg}");
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let mut lines = history.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap_or_else(|| panic!("no {name} in {header:?}"));
    let (lf, pc, fz) = (col("load_factor"), col("applied_inner_pressure"), col("reaction_start_z"));
    let rows: Vec<[f64; 3]> =
        lines.map(|l| l.split(',').collect::<Vec<_>>()).map(|r| [lf, pc, fz].map(|c| r[c].parse::<f64>().unwrap())).collect();
    assert_eq!(rows.len(), 40);
    let (mut before, mut after) = (0, 0);
    for [t, p, f] in &rows {
        assert!((p - 0.6 * t).abs() < 1e-9, "pressure {p} at load factor {t}");
        let la = (f.abs() / (std::f64::consts::PI * p)).sqrt();
        let want = thick_sphere_pressure(la);
        assert!((p - want).abs() <= 0.01 * want, "λ_a = {la:.4}: pressure {p:.5}, closed form {want:.5}");
        if la < 1.5 {
            before += 1;
        } else if la > 1.75 {
            after += 1;
        }
    }
    assert!(before >= 3 && after >= 3, "increments before ({before}) and after ({after}) the limit at λ_a ≈ 1.6");
    // The load factor rises to the maximum (0.4935 / 0.6 = 0.8225 in closed form) and falls after it.
    let top = rows.iter().enumerate().max_by(|a, b| a.1[0].total_cmp(&b.1[0])).unwrap();
    assert!((0.6 * top.1[0] - 0.4935).abs() < 0.01 * 0.4935, "largest pressure {}", 0.6 * top.1[0]);
    assert!(top.0 > 0 && top.0 + 3 < rows.len(), "the peak is inside the run: increment {}", top.0 + 1);
    assert!(rows.windows(2).take(top.0).all(|w| w[1][0] > w[0][0]), "rising before the limit");
    assert!(rows.windows(2).skip(top.0).all(|w| w[1][0] < w[0][0]), "falling after it");
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "stopped", "{summary}");
}

/// `control` takes "load" or "arc-length", and arc-length only where it can drive the stage.
#[test]
fn arc_length_control_is_refused_where_it_cannot_drive_the_stage() {
    let arc =
        |job: &str, stage: &str| job.replace(&format!("name = \"{stage}\"\n"), &format!("name = \"{stage}\"\ncontrol = \"arc-length\"\n"));
    rejects(
        &SPHERE.replace("name = \"inflate\"\n", "name = \"inflate\"\ncontrol = \"arc-lenght\"\n"),
        &["job.toml:", "unknown `control`", "did you mean `arc-length`"],
    );
    rejects(&arc(BUSH, "push"), &["job.toml:", "stage `push`", "moves a set"]);
    rejects(
        &SPHERE.replace("name = \"inflate\"\n", "name = \"inflate\"\nmax_increments = 5\n"),
        &["job.toml:", "`max_increments` belongs to arc-length stages"],
    );
    let timed = arc(SPHERE, "inflate").replace("control = \"arc-length\"\n", "control = \"arc-length\"\nduration = 2.0\n");
    rejects(&timed, &["job.toml:", "cannot be combined with `duration`"]);
}

/// Regression (issue 18): a block pulled by one face with no other support
/// moves as a rigid body, carries no force and is strained nowhere, yet the
/// run stopped at load factor 0.32 ("no convergence, residual 3.2e-15
/// (relative 1.8e-5)"): with nothing loaded, the force scale of the
/// convergence test was 1e-10 of the model's force unit and round-off read
/// as out-of-balance force. Rigid-body kinematics: every node moves by the
/// face's travel, and the reaction is zero.
#[test]
fn stress_free_translation_with_no_other_support_converges() {
    let job = PULL_PUSH
        .replace("[[support]]\nnodes = \"all\"\nfix = [\"y\"]\n\n[[support]]\nnodes = \"left\"\nfix = [\"x\"]\n", "")
        .replace("displacement = { x = 0.6 }", "displacement = { x = 30.0, y = 0.0 }")
        .replace("displacement = { x = -0.4 }", "displacement = { x = 30.0, y = 0.0 }");
    assert!(!job.contains("[[support]]"));
    let s = Scratch::new("translation");
    let out = run(&s.job(&job), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "converged", "{summary}");
    let moved = summary["peaks"]["displacement"]["value"].as_f64().unwrap();
    assert!((moved - 30.0).abs() < 1e-9, "every node moves by 30: {moved}");
    assert!(summary["peaks"]["max_principal_log_strain"]["value"].as_f64().unwrap().abs() < 1e-9);
    assert!(summary["reactions"]["right"]["x"].as_f64().unwrap().abs() < 1e-9, "{summary}");
}

/// Regression (issue 18): a job with no free equations (every node moved)
/// logged `residual -0.00e0` for each increment (the norm of an empty sum).
#[test]
fn a_job_with_no_equations_logs_a_plain_zero_residual() {
    let job = PULL_PUSH
        .replace("[[support]]\nnodes = \"left\"\nfix = [\"x\"]\n", "")
        .replace("[[motion]]\nnodes = \"right\"\nstage = \"pull\"", "[[motion]]\nnodes = \"all\"\nstage = \"pull\"")
        .replace("[[motion]]\nnodes = \"right\"\nstage = \"push\"", "[[motion]]\nnodes = \"all\"\nstage = \"push\"");
    let s = Scratch::new("no-equations");
    let out = run(&s.job(&job), &s.out());
    let log = text(&out);
    assert_eq!(out.status.code(), Some(0), "{log}");
    assert!(log.contains(": 0 equations") && log.contains("residual 0.00e0"), "{log}");
    assert!(!log.contains("residual -0"), "{log}");
}

/// A block held in x on the left and moved in x on the right but held in y
/// nowhere can slide along y: refused before solving, by `olli run` and
/// `olli check`, naming the stage and the free motion.
#[test]
fn part_free_to_slide_is_refused_before_solving() {
    let free = PULL_PUSH.replace("[[support]]\nnodes = \"all\"\nfix = [\"y\"]\n", "");
    assert_ne!(free, PULL_PUSH);
    rejects(&free, &["job.toml:", "stage `pull`", "free to move: translation along y", "support"]);
}

/// Regression (issue 18): two motions of one set in one stage that disagree
/// were accepted, the last silently winning.
#[test]
fn two_motions_of_one_set_that_disagree_are_located() {
    let again = "[[motion]]\nnodes = \"pin\"\nstage = \"push\"\ndisplacement = { z = 0.7 }\n";
    rejects(&format!("{BUSH}{again}"), &["job.toml:", "stage `push`: two motions of `pin` move component `z` to 0.5 and to 0.7"]);
    // The same value twice agrees.
    let s = Scratch::new("same-motion");
    let same = again.replace("0.7", "0.5");
    let out = olli(&["check", s.job(&format!("{BUSH}{same}")).to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
}

/// A plane-strain ring whose inner face a motion turns about the centre
/// (invented numbers): a = 10, b = 20, G = 0.5.
const RING: &str = r#"
analysis = "plane-strain"

[mesh]
generate = "annulus"
inner_radius = 10.0
outer_radius = 20.0
radial_divisions = 4
circumferential_divisions = 32

[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 1000.0

[[region]]
elements = "all"
material = "soft"

[[support]]
nodes = "outer"
fix = ["x", "y"]

[[motion]]
nodes = "inner"
stage = "twist"
rotation = { angle = 6.0, center = [0.0, 0.0] }

[[stage]]
name = "twist"
first_increment = 0.5
max_increment = 0.5
"#;

/// `rotation` on a motion: the turned angle and the reaction moment about
/// the centre in `history.csv` (degrees; moment about `center` by default),
/// and the torque of circular shear, T = 4π G θ / (1/a² − 1/b²) per unit
/// thickness (Rivlin 1949, exact for a neo-Hookean solid; from memory), to
/// the coarse mesh's accuracy.
#[test]
fn rotation_motion_columns_and_torque() {
    let s = Scratch::new("rotation");
    let out = run(&s.job(RING), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let header: Vec<&str> = history.lines().next().unwrap().split(',').collect();
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap_or_else(|| panic!("no column {name} in {header:?}"));
    let (angle, moment) = (col("applied_inner_angle"), col("reaction_inner_moment_z"));
    let rows: Vec<Vec<f64>> = history.lines().skip(1).map(|l| l.split(',').skip(1).map(|v| v.parse().unwrap()).collect()).collect();
    assert_eq!(rows.len(), 2);
    let (a, b, g) = (10.0f64, 20.0f64, 0.5);
    for (row, want_deg) in rows.iter().zip([3.0, 6.0]) {
        assert!((row[angle - 1] - want_deg).abs() < 1e-12, "{row:?}");
        let t = 4.0 * std::f64::consts::PI * g * want_deg.to_radians() / (1.0 / (a * a) - 1.0 / (b * b));
        let got = row[moment - 1];
        assert!((got - t).abs() < 0.02 * t, "torque {got} vs {t}");
    }
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["units"]["applied_inner_angle"], "degree");
}

#[test]
fn bad_rotations_are_located() {
    let turn = "rotation = { angle = 6.0, center = [0.0, 0.0] }";
    rejects(&RING.replace(turn, "rotation = { angle = 6.0, center = [0.0] }"), &["job.toml:27:12", "`center` needs 2 finite coordinates"]);
    rejects(&RING.replace(turn, "rotation = { angle = 6.0, axis = [0.0, 0.0, 1.0], center = [0.0, 0.0] }"), &["leave `axis` out"]);
    rejects(&RING.replace(turn, "rotation = { angle = nan, center = [0.0, 0.0] }"), &["`angle` (degrees) must be a finite number"]);
    rejects(&RING.replace(turn, "rotation = { angle = 6.0, centre = [0.0, 0.0] }"), &["centre"]);
    rejects(&RING.replace(turn, ""), &["needs `displacement`, `rotation` or both"]);
    // A support on the turned set holds what the turn moves.
    rejects(
        &RING.replace("[[support]]\nnodes = \"outer\"", "[[support]]\nnodes = \"all\""),
        &["is held at 0 by the support on `all` but moved with its rotation or load by the motion on `inner`"],
    );
    rejects(
        &BUSH.replace("displacement = { r = 0.0, z = 0.5 }", "rotation = { angle = 6.0, center = [0.0, 0.0] }"),
        &["an axisymmetric section cannot turn in its plane"],
    );
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

/// A cube on three symmetry planes pressed 20 % by a frictionless rigid plane:
/// a homogeneous uniaxial compression, so the contact pressure is the same
/// everywhere and equals the closed-form Cauchy stress of the nearly
/// incompressible neo-Hookean solid, σ = μ (λ² − 1/λ) (Treloar 1975, "The
/// Physics of Rubber Elasticity", ch. 5; Holzapfel 2000, "Nonlinear Solid
/// Mechanics", §6.5), λ = 0.8. The 3-D pictures carry the plane over the
/// outer surface and a footprint of the contact laid flat on it.
#[test]
fn pressed_cube_3d_footprint_and_plane_in_the_pictures() {
    let s = Scratch::new("plots-3d");
    let job = s.job(
        r#"
title = "pressed cube"
analysis = "3d"
[mesh]
generate = "block"
size = [1.0, 1.0, 1.0]
divisions = [3, 3, 2]
[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 5000.0
[[region]]
elements = "all"
material = "soft"
[[support]]
nodes = "left"
fix = ["x"]
[[support]]
nodes = "front"
fix = ["y"]
[[support]]
nodes = "bottom"
fix = ["z"]
[[rigid]]
name = "plate"
touches = "top"
plane = { point = [0.0, 0.0, 1.0], normal = [0.0, 0.0, -1.0] }
move = { press = [0.0, 0.0, -0.2] }
[[stage]]
name = "press"
first_increment = 0.25
"#,
    );
    let out = s.out();
    let run = olli(&["run", job.to_str().unwrap(), "--output", out.to_str().unwrap(), "--quiet"]);
    assert_eq!(run.status.code(), Some(0), "{}", text(&run));
    let svg = s.0.join("svg");
    let plot = olli(&["plot", out.to_str().unwrap(), "--output", svg.to_str().unwrap(), "--format", "svg", "--view", "y"]);
    assert_eq!(plot.status.code(), Some(0), "{}", text(&plot));
    let section = std::fs::read_to_string(svg.join("section_1.svg")).unwrap();
    assert!(section.contains("rigid `plate`"), "the plane is drawn over the 3-D view");
    let footprint = std::fs::read_to_string(svg.join("footprint_plate_1.svg")).unwrap();
    assert!(footprint.contains("contact pressure") && footprint.contains("on the plane, along"), "labelled axes");
    // The peak in the title against the closed form (penalty contact: within 1 %).
    let (mu, stretch): (f64, f64) = (0.5, 0.8);
    let exact = mu * (stretch * stretch - 1.0 / stretch);
    let peak: f64 = footprint
        .split("peak ")
        .nth(1)
        .and_then(|t| t.split(' ').next())
        .and_then(|t| t.parse().ok())
        .unwrap_or_else(|| panic!("no peak in the footprint title: {}", &footprint[..400.min(footprint.len())]));
    assert!((peak - exact.abs()).abs() < 0.01 * exact.abs(), "peak {peak} against {:.5}", exact.abs());
    // The profile through the peak: a flat pressure across the whole face (the deformed face is 1/√0.8 = 1.118 wide).
    let profile = std::fs::read_to_string(svg.join("contact_plate_1.svg")).unwrap();
    assert!(profile.contains("through the peak") && profile.contains("contact, 1.118 L across"), "{}", &profile[..600.min(profile.len())]);
}

/// The relaxing bush, then vibrated in z about the relaxed push.
fn vibrated_bush(frequencies: &str) -> String {
    relaxing_bush()
        + &format!(
            "\n[[stage]]\nname = \"vibrate\"\nharmonic = {{ frequencies = {frequencies} }}\n\n[[motion]]\nnodes = \"pin\"\nstage = \"vibrate\"\ndisplacement = {{ z = 0.01 }}\n"
        )
}

#[test]
fn a_harmonic_stage_writes_the_dynamic_stiffness() {
    let s = Scratch::new("vibrate");
    let out = run(&s.job(&vibrated_bush("[0.001, 0.1, 10.0]")), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let csv = std::fs::read_to_string(s.out().join("dynamic.csv")).unwrap();
    let lines: Vec<&str> = csv.lines().collect();
    assert_eq!(lines[0], "stage,frequency,pin_z_storage,pin_z_loss,pin_z_loss_angle");
    assert_eq!(lines.len(), 4, "{csv}");
    let rows: Vec<Vec<f64>> = lines[1..].iter().map(|l| l.split(',').skip(1).map(|v| v.parse().unwrap()).collect()).collect();
    // Storage stiffness grows with frequency from the relaxed towards the
    // instantaneous modulus (g∞ = 0.5): between 1e-3 and 10 per time unit
    // (ωτ from 0.006 to 3000) it nearly doubles; every loss angle is positive.
    assert!(rows.windows(2).all(|w| w[1][1] > w[0][1]), "{csv}");
    assert!((rows[2][1] / rows[0][1] - 2.0).abs() < 0.1, "{csv}");
    assert!(rows.iter().all(|r| r[2] > 0.0 && r[3] > 0.0 && r[3] < 45.0), "{csv}");
    // The history shows the harmonic stage as one row: the static state it
    // vibrated about (the hold's last row repeated: same time, forces and
    // peaks), under its own name, with no Newton iterations.
    let history = std::fs::read_to_string(s.out().join("history.csv")).unwrap();
    let rows: Vec<Vec<&str>> = history.lines().rev().take(2).map(|l| l.split(',').collect()).collect();
    let (vibrate, hold) = (&rows[0], &rows[1]);
    assert_eq!((vibrate[0], vibrate[1], hold[0]), ("vibrate", "1", "hold"), "{history}");
    let n = vibrate.len();
    assert_eq!(vibrate[2..n - 1], hold[2..n - 1], "{history}");
    assert_eq!(vibrate[n - 1], "0", "{history}");
}

#[test]
fn bad_harmonic_stages_are_located() {
    rejects(&vibrated_bush("[]"), &["job.toml:", "stage `vibrate`", "`harmonic.frequencies` is empty"]);
    rejects(&vibrated_bush("[1.0, -2.0]"), &["job.toml:", "stage `vibrate`", "must all be positive", "-2"]);
    rejects(&vibrated_bush("[0.0]"), &["job.toml:", "stage `vibrate`", "must all be positive"]);
    rejects(
        &vibrated_bush("[1.0]").replace("displacement = { z = 0.01 }", "displacement = { z = 0.0 }"),
        &["job.toml:", "harmonic stage `vibrate` drives nothing"],
    );
    rejects(
        &vibrated_bush("[1.0]").replace("name = \"vibrate\"\n", "name = \"vibrate\"\nduration = 5.0\n"),
        &["job.toml:", "stage `vibrate`", "takes no `duration`"],
    );
}

#[test]
fn bad_mullins_constants_are_located() {
    let softened = |table: &str| BUSH.replace("bulk_modulus = 1000.0", &format!("bulk_modulus = 1000.0\nmullins = {table}"));
    rejects(&softened("{ r = 1.0, m = 0.1 }"), &["job.toml:19:", "material `soft`", "mullins", "greater than 1"]);
    rejects(&softened("{ r = 2.0, m = -0.1 }"), &["job.toml:19:", "mullins", "positive energy"]);
    rejects(&softened("{ r = 2.0, m = 0.1, b = 0.1 }"), &["job.toml:19:", "b"]);
    let s = Scratch::new("mullins");
    let out = run(&s.job(&softened("{ r = 2.0, m = 0.1, beta = 0.05 }")), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
}

/// A fluid whose side set lies wholly inside the rubber (the line shared by
/// two squares, a physical group of an imported Gmsh mesh) has no free
/// facet to enter by: refused at its `sides` key, exit 2, nothing written.
#[test]
fn fluid_on_a_set_without_free_facets_is_located() {
    let msh = "$MeshFormat\n4.1 0 8\n$EndMeshFormat\n$PhysicalNames\n2\n1 2 \"wet\"\n2 3 \"rubber\"\n$EndPhysicalNames\n\
               $Entities\n0 1 1 0\n1 1 0 0 1 1 0 1 2 0\n1 0 0 0 2 1 0 1 3 0\n$EndEntities\n\
               $Nodes\n1 6 1 6\n2 1 0 6\n1\n2\n3\n4\n5\n6\n0 0 0\n1 0 0\n2 0 0\n2 1 0\n1 1 0\n0 1 0\n$EndNodes\n\
               $Elements\n2 3 1 3\n1 1 1 1\n1 2 5\n2 1 3 2\n2 1 2 5 6\n3 2 3 4 5\n$EndElements\n";
    let job = r#"
analysis = "plane-strain"

[mesh]
file = "two.msh"

[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 500.0

[[region]]
elements = "rubber"
material = "soft"

[[select]]
name = "foot"
nodes = { line = { point = [0.0, 0.0], direction = [1.0, 0.0] } }

[[support]]
nodes = "foot"
fix = ["x", "y"]

[[fluid]]
name = "oil"
sides = "wet"
source = [1.0, 0.5]
pressure = 0.1

[[stage]]
name = "pump"
"#;
    static CALLS: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
    let s = Scratch::new(&format!("interior{}", CALLS.fetch_add(1, std::sync::atomic::Ordering::Relaxed)));
    std::fs::write(s.0.join("two.msh"), msh).unwrap();
    let path = s.job(job);
    let line = job.lines().position(|l| l.starts_with("sides = \"wet\"")).unwrap() + 1;
    for args in [vec!["run", path.to_str().unwrap(), "--output", s.out().to_str().unwrap()], vec!["check", path.to_str().unwrap()]] {
        let out = olli(&args);
        let msg = text(&out);
        assert_eq!(out.status.code(), Some(2), "{msg}");
        for want in [format!("job.toml:{line}:"), "fluid `oil`: side set `wet` has no free facet".to_string()] {
            assert!(msg.contains(&want), "expected `{want}` in: {msg}");
        }
        assert!(!s.out().exists(), "nothing may be written for bad input");
    }
}

/// A plane-strain block 2 × 1 (invented numbers) resting in a rectangular
/// groove 3 wide and 1.2 deep, squeezed 0.1 by a cover: a gland of depth 0.9.
const GLAND: &str = r#"
title = "test gland"
analysis = "plane-strain"

[mesh]
generate = "rectangle"
origin = [0.5, 0.0]
size = [2.0, 1.0]
divisions = [8, 4]

[[select]]
name = "middle"
nodes = { line = { point = [1.5, 0.0], direction = [0.0, 1.0] } }

[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 500.0

[[region]]
elements = "all"
material = "soft"

[[support]]
nodes = "middle"
fix = ["x"]

[[rigid]]
name = "groove"
touches = "bottom"
polyline = [[0.0, 1.2], [0.0, 0.0], [3.0, 0.0], [3.0, 1.2]]
bands = 2

[[rigid]]
name = "cover"
touches = "top"
line = { point = [0.0, 1.0], direction = [1.0, 0.0] }
move = { squeeze = [0.0, -0.1] }

[[gland]]
name = "g"
groove = "groove"
closed_by = "cover"

[[stage]]
name = "squeeze"
first_increment = 0.5
max_increment = 0.5
"#;

/// One column of `history.csv` by name.
fn history_column(out: &Path, name: &str) -> Vec<f64> {
    let history = std::fs::read_to_string(out.join("history.csv")).unwrap();
    let header: Vec<&str> = history.lines().next().unwrap().split(',').collect();
    let col = header.iter().position(|c| *c == name).unwrap_or_else(|| panic!("no column {name} in {header:?}"));
    history.lines().skip(1).map(|l| l.split(',').nth(col).unwrap().parse().unwrap()).collect()
}

/// Gland fill, common practice for seal glands (no published source):
/// fill = seal section area / gland section area, squeeze = (free height −
/// gland depth) / free height. For the block in a rectangular groove of
/// width 3 closed at depth 0.9 by hand: fill = (2 × 1) / (3 × 0.9) =
/// 74.07 %, squeeze = (1 − 0.9) / 1 = 10 %. The rubber's section area
/// changes only by its volume strain (bulk modulus 1000 μ: under 0.1 %).
#[test]
fn gland_fill_and_squeeze_of_a_rectangular_groove_match_the_hand_figures() {
    let s = Scratch::new("gland");
    let out = run(&s.job(GLAND), &s.out());
    assert_eq!(out.status.code(), Some(0), "{}", text(&out));
    let (fill, squeeze) = (history_column(&s.out(), "gland_g_fill"), history_column(&s.out(), "gland_g_squeeze"));
    // Increment 1: the cover half-way, at depth 0.95.
    assert!((fill[0] - 100.0 * 2.0 / (3.0 * 0.95)).abs() < 0.1, "{fill:?}");
    assert!((squeeze[0] - 5.0).abs() < 1e-9, "{squeeze:?}");
    let last = fill.len() - 1;
    assert!((fill[last] - 100.0 * 2.0 / (3.0 * 0.9)).abs() < 0.1, "{fill:?}");
    assert!((squeeze[last] - 10.0).abs() < 1e-9, "{squeeze:?}");
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    let g = &summary["glands"]["g"];
    assert!((g["free_area"].as_f64().unwrap() - 2.7).abs() < 1e-9, "{g}");
    assert!((g["depth"].as_f64().unwrap() - 0.9).abs() < 1e-9, "{g}");
    assert!((g["rubber_area"].as_f64().unwrap() - 2.0).abs() < 2e-3, "{g}");
    assert_eq!(summary["units"]["gland_g_fill"], "percent");
    // One band on the groove (the bottom): the block is pressed flat on it, over its whole width.
    assert_eq!(history_column(&s.out(), "rigid_groove_bands")[last], 1.0);
    let width = history_column(&s.out(), "rigid_groove_band1_contact_width")[last];
    assert!(width > 2.0 && width < 2.3, "{width}");
    assert_eq!(history_column(&s.out(), "rigid_groove_band2_contact_width")[last], 0.0);
    assert_eq!(summary["rigid"]["groove"]["bands"], 1.0);
}

/// A block moved bodily 0.3 along x (every node prescribed): its right face
/// (x = 2.5) passes an edge at x = 2.6 by 0.3 t − 0.1 at load factor t, and
/// an edge that follows a surface moved 0.05 by 0.25 t − 0.1 (geometry by
/// hand). The fixed edge's `max_depth` 0.15 is passed at t = 0.9 (0.17):
/// the run stops there, keeps its nine increments and says where and why.
#[test]
fn extrusion_past_an_edge_is_reported_and_stops_the_run_at_max_depth() {
    let job = r#"
title = "test extrusion"
analysis = "plane-strain"

[mesh]
generate = "rectangle"
origin = [0.5, 0.0]
size = [2.0, 1.0]
divisions = [4, 2]

[materials.soft]
model = "neo-hookean"
shear_modulus = 0.5
bulk_modulus = 500.0

[[region]]
elements = "all"
material = "soft"

[[motion]]
nodes = "all"
displacement = { x = 0.3, y = 0.0 }

[[rigid]]
name = "land"
touches = "right"
line = { point = [10.0, 0.0], direction = [0.0, 1.0] }
move = { slide = [0.05, 0.0] }

[[extrusion]]
name = "fixed"
edge = [2.6, 0.0]
into = [2.0, 0.0]
max_depth = 0.15

[[extrusion]]
name = "moving"
edge = [2.6, 0.0]
into = [1.0, 0.0]
follows = "land"
nodes = "right"

[[stage]]
name = "slide"
first_increment = 0.1
max_increment = 0.1
"#;
    let s = Scratch::new("extrusion");
    let out = run(&s.job(job), &s.out());
    let msg = text(&out);
    assert_eq!(out.status.code(), Some(1), "{msg}");
    let fixed = history_column(&s.out(), "extrusion_fixed_depth");
    let moving = history_column(&s.out(), "extrusion_moving_depth");
    assert_eq!(fixed.len(), 9, "{fixed:?}");
    for (k, (f, m)) in fixed.iter().zip(&moving).enumerate() {
        let t = 0.1 * (k + 1) as f64;
        assert!((f - (0.3 * t - 0.1).max(0.0)).abs() < 1e-9, "increment {}: {f}", k + 1);
        assert!((m - (0.25 * t - 0.1).max(0.0)).abs() < 1e-9, "increment {}: {m}", k + 1);
    }
    let summary: serde_json::Value = serde_json::from_str(&std::fs::read_to_string(s.out().join("summary.json")).unwrap()).unwrap();
    assert_eq!(summary["status"], "stopped");
    let reason = summary["reason"].as_str().unwrap();
    for want in [
        "stage `slide` increment 9",
        "0.1700 past the edge of extrusion gap `fixed`",
        "max_depth 0.15",
        "at (2.7700, 0.0000)",
        "back-up ring",
    ] {
        assert!(reason.contains(want), "expected `{want}` in: {reason}");
    }
    assert!((summary["extrusions"]["fixed"]["depth"].as_f64().unwrap() - 0.17).abs() < 1e-9);
    assert!(msg.contains("extrusion gap `fixed`"), "{msg}");
}
