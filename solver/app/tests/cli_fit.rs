//! `olli fit` as a user runs it: the demo data fitted and compared, the
//! material table it writes read back by `olli material` and by a job file,
//! plots that are not blank, and bad data reported by file and line with
//! exit code 2 and nothing written.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn temp_dir(name: &str) -> PathBuf {
    let d = std::env::temp_dir().join(format!("olli-cli-fit-{}-{name}", std::process::id()));
    let _ = std::fs::remove_dir_all(&d);
    std::fs::create_dir_all(&d).unwrap();
    d
}

fn olli(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_olli")).args(args).output().unwrap()
}

fn text(o: &Output) -> (String, String) {
    (String::from_utf8_lossy(&o.stdout).into_owned(), String::from_utf8_lossy(&o.stderr).into_owned())
}

/// The committed demo data (invented by examples/fit/make_demo_data.py).
fn demo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../examples/fit/compound-a.csv")
}

#[test]
fn demo_data_fit_writes_a_table_that_olli_material_and_job_files_accept() {
    let dir = temp_dir("demo");
    let table = dir.join("a.toml");
    let plots = dir.join("plots");
    let out = olli(&[
        "fit",
        demo().to_str().unwrap(),
        "--model",
        "yeoh",
        "--model",
        "ogden",
        "--model",
        "neo-hookean",
        "--output",
        table.to_str().unwrap(),
        "--plot",
        plots.to_str().unwrap(),
    ]);
    let (stdout, stderr) = text(&out);
    assert_eq!(out.status.code(), Some(0), "{stderr}");
    // The data were made from a two-term Ogden model with 1.5 % noise: it
    // must rank first, and the I1-only models must be warned about in the
    // equibiaxial test or the uniaxial one.
    let comparison = stdout.split("comparison").nth(1).expect("a comparison table");
    let first = comparison.lines().nth(2).unwrap();
    assert!(first.contains("ogden-2"), "{first}");
    assert!(stdout.contains("warning: yeoh fits"), "{stdout}");
    for key in ["small-strain shear modulus", "relative RMS", "correlation of the constants", "Drucker stability", "bulk modulus"] {
        assert!(stdout.contains(key), "missing `{key}` in\n{stdout}");
    }
    let written = std::fs::read_to_string(&table).unwrap();
    assert!(written.contains("model = \"ogden\"") && written.contains("mu = [") && written.contains("alpha = ["), "{written}");
    // olli material reads it as is.
    let m = olli(&["material", table.to_str().unwrap(), "--mode", "uniaxial", "--stretch", "1:3:3"]);
    assert_eq!(m.status.code(), Some(0), "{}", text(&m).1);
    // …and so does a job file, as [materials.<name>].
    let body = written.replace("[material]", "[materials.compound-a]");
    let job = format!(
        "title = \"fit check\"\nanalysis = \"plane-strain\"\n[mesh]\ngenerate = \"rectangle\"\norigin = [0.0, 0.0]\nsize = [10.0, 5.0]\ndivisions = [2, 1]\n\n{body}\n\
         [[region]]\nelements = \"all\"\nmaterial = \"compound-a\"\n[[support]]\nnodes = \"left\"\nfix = [\"x\", \"y\"]\n\
         [[motion]]\nnodes = \"right\"\nstage = \"pull\"\ndisplacement = {{ x = 1.0, y = 0.0 }}\n[[stage]]\nname = \"pull\"\n"
    );
    let job_path = dir.join("job.toml");
    std::fs::write(&job_path, job).unwrap();
    let c = olli(&["check", job_path.to_str().unwrap()]);
    assert_eq!(c.status.code(), Some(0), "{}", text(&c).1);
    assert!(text(&c).0.contains("material compound-a (ogden)"), "{}", text(&c).0);

    // Plots: one per model and one per test comparing models, not blank.
    for stem in ["fit-ogden-2", "fit-yeoh", "fit-neo-hookean", "compare-uniaxial", "compare-equibiaxial", "compare-planar", "volumetric"] {
        let png = plots.join(format!("{stem}.png"));
        let decoder = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(&png).unwrap()));
        let mut reader = decoder.read_info().unwrap();
        let mut buf = vec![0; reader.output_buffer_size()];
        let info = reader.next_frame(&mut buf).unwrap();
        let px = &buf[..info.buffer_size()];
        let mean = px.iter().map(|&v| v as f64).sum::<f64>() / px.len() as f64;
        let variance = px.iter().map(|&v| (v as f64 - mean).powi(2)).sum::<f64>() / px.len() as f64;
        assert!(variance > 100.0, "{stem}.png looks blank (variance {variance})");
    }
    // The SVG holds one curve (a long polyline) per test for each model, and
    // one per model in each comparison.
    let curves = |stem: &str| {
        let svg = std::fs::read_to_string(plots.join(format!("{stem}.svg"))).unwrap();
        svg.split("<polyline")
            .skip(1)
            .filter(|p| p.split("points=\"").nth(1).is_some_and(|pts| pts.split('"').next().unwrap().split(' ').count() >= 50))
            .count()
    };
    assert_eq!(curves("fit-yeoh"), 3);
    assert_eq!(curves("fit-ogden-2"), 3);
    assert_eq!(curves("compare-uniaxial"), 3);
}

/// Runs `olli fit` on `csv` text and returns (exit code, stderr), checking
/// that no output file appears.
fn bad(name: &str, csv: &str) -> (Option<i32>, String) {
    let dir = temp_dir(name);
    let data = dir.join(format!("{name}.csv"));
    std::fs::write(&data, csv).unwrap();
    let table = dir.join("out.toml");
    let out =
        olli(&["fit", data.to_str().unwrap(), "--model", "neo-hookean", "--bulk-modulus", "1000", "--output", table.to_str().unwrap()]);
    assert!(!table.exists(), "{name}: an output file was written");
    (out.status.code(), text(&out).1)
}

#[test]
fn bad_data_names_the_file_and_line_and_writes_nothing() {
    let header = "mode,stretch,nominal_stress\n";
    let cases = [
        ("empty", String::new(), "empty.csv: empty file"),
        ("missing", "mode,stretch\nuniaxial,1.5\n".to_string(), "missing.csv line 1: no `nominal_stress` column"),
        ("negative", format!("{header}uniaxial,1.5,0.4\nuniaxial,-1.2,0.1\n"), "negative.csv line 3: stretch -1.2 is not positive"),
        ("zero", format!("{header}uniaxial,0,0.4\n"), "zero.csv line 2: stretch 0 is not positive"),
        ("mode", format!("{header}uniaxial,1.5,0.4\nbiaxial,1.2,0.3\n"), "mode.csv line 3: unknown mode `biaxial`"),
        ("nan", format!("{header}uniaxial,1.5,NaN\n"), "nan.csv line 2: `nominal_stress` is `NaN`, not a finite number"),
    ];
    for (name, csv, want) in cases {
        let (code, stderr) = bad(name, &csv);
        assert_eq!(code, Some(2), "{name}: {stderr}");
        assert!(stderr.contains(want), "{name}: expected `{want}` in: {stderr}");
        assert!(!stderr.contains("panicked"), "{name}: {stderr}");
    }
}

#[test]
fn unknown_model_is_refused_with_the_known_names() {
    let out = olli(&["fit", demo().to_str().unwrap(), "--model", "yeo"]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = text(&out).1;
    assert!(stderr.contains("unknown model `yeo`") && stderr.contains("did you mean `yeoh`?"), "{stderr}");
}
