//! `olli material` as scripts use it: exit codes, CSV columns, messages that
//! name the file and the parameter.

use std::path::PathBuf;
use std::process::{Command, Output};

fn temp_path(name: &str) -> PathBuf {
    std::env::temp_dir().join(format!("olli-cli-material-{}-{name}", std::process::id()))
}

fn write_toml(name: &str, text: &str) -> PathBuf {
    let p = temp_path(name);
    std::fs::write(&p, text).unwrap();
    p
}

fn olli(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_olli")).arg("material").args(args).output().unwrap()
}

fn stderr(o: &Output) -> String {
    String::from_utf8_lossy(&o.stderr).into_owned()
}

#[test]
fn file_input_writes_csv_with_expected_columns() {
    let toml = write_toml("nh.toml", "[material]\nmodel = \"neo-hookean\"\nshear_modulus = 0.8\nbulk_modulus = 8e6\n");
    let csv = temp_path("nh.csv");
    let out = olli(&[toml.to_str().unwrap(), "--stretch", "0.5:3:6", "--csv", csv.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = text.lines();
    let header: Vec<&str> = lines.next().unwrap().split(',').collect();
    for col in ["mode", "stretch", "nominal_stress", "true_stress", "lateral_stretch_2", "lateral_stretch_3"] {
        assert!(header.contains(&col), "missing column {col} in {header:?}");
    }
    let rows: Vec<Vec<&str>> = lines.map(|l| l.split(',').collect()).collect();
    assert_eq!(rows.len(), 5 * 6, "five modes × six stretches");
    let col = |name: &str| header.iter().position(|h| *h == name).unwrap();
    // Uniaxial λ = 2 of an incompressible neo-Hookean solid: P = μ(λ − λ⁻²) = 0.8·1.75
    // (Treloar 1943, Trans. Faraday Soc. 39:241, from memory); κ = 10⁷ μ, so 1e-5.
    let row = rows.iter().find(|r| r[0] == "uniaxial" && r[col("stretch")] == "2").unwrap();
    let p: f64 = row[col("nominal_stress")].parse().unwrap();
    let sigma: f64 = row[col("true_stress")].parse().unwrap();
    assert!((p - 1.4).abs() < 1e-5 * 1.4, "P = {p}");
    assert!((sigma - 2.8).abs() < 1e-5 * 2.8, "σ = {sigma}");
    let t: f64 = row[col("lateral_stretch_2")].parse().unwrap();
    assert!((t - 0.5f64.sqrt()).abs() < 1e-5, "t = {t}");
    let _ = std::fs::remove_file(toml);
    let _ = std::fs::remove_file(csv);
}

#[test]
fn options_input_runs_one_mode() {
    let out = olli(&[
        "--model",
        "eight-chain",
        "--param",
        "shear_modulus=0.6",
        "--param",
        "locking_stretch=5",
        "--param",
        "bulk_modulus=1000",
        "--mode",
        "uniaxial",
        "--stretch",
        "1:2:3",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let text = String::from_utf8_lossy(&out.stdout);
    assert!(text.contains("uniaxial") && !text.contains("equibiaxial:"), "{text}");
    assert!(text.contains("Drucker stability: stable"), "{text}");
}

/// Runs a bad material table and checks exit code 2 and that the message
/// contains every expected fragment.
fn rejects(name: &str, table: &str, expected: &[&str]) {
    let toml = write_toml(name, table);
    let out = olli(&[toml.to_str().unwrap()]);
    let msg = stderr(&out);
    assert_eq!(out.status.code(), Some(2), "{name}: {msg}");
    assert!(msg.contains(name), "{name}: message does not name the file: {msg}");
    for e in expected {
        assert!(msg.contains(e), "{name}: message lacks `{e}`: {msg}");
    }
    let _ = std::fs::remove_file(toml);
}

#[test]
fn bad_parameters_exit_2_naming_file_and_parameter() {
    rejects("neg-mu.toml", "[material]\nmodel = \"neo-hookean\"\nshear_modulus = -1.0\nbulk_modulus = 100\n", &["shear_modulus", ":3:"]);
    rejects(
        "lock.toml",
        "[material]\nmodel = \"eight-chain\"\nshear_modulus = 1\nlocking_stretch = 1.0\nbulk_modulus = 100\n",
        &["locking_stretch", ":4:"],
    );
    rejects("kappa.toml", "[material]\nmodel = \"yeoh\"\nc10 = 0.5\nc20 = 0\nc30 = 0\nbulk_modulus = 0\n", &["bulk_modulus"]);
    rejects(
        "model.toml",
        "[material]\nmodel = \"neo-hooke\"\nshear_modulus = 1\nbulk_modulus = 100\n",
        &["neo-hooke", "did you mean `neo-hookean`"],
    );
    rejects("missing.toml", "[material]\nmodel = \"eight-chain\"\nshear_modulus = 1\nbulk_modulus = 100\n", &["locking_stretch"]);
    rejects("extra.toml", "[material]\nmodel = \"neo-hookean\"\nshear_modulus = 1\nc20 = 0.1\nbulk_modulus = 100\n", &["c20", ":4:"]);
    rejects(
        "typo.toml",
        "[material]\nmodel = \"mooney-rivlin\"\nc10 = 0.3\nc01 = 0.1\nbulk_modulos = 100\n",
        &["bulk_modulos", "did you mean `bulk_modulus`", ":5:"],
    );
    rejects("mr-sum.toml", "[material]\nmodel = \"mooney-rivlin\"\nc10 = 0.1\nc01 = -0.2\nbulk_modulus = 100\n", &["c10 + c01"]);
    rejects("syntax.toml", "[material]\nmodel = \"yeoh\nc10 = 0.5\n", &["line 2"]);
    rejects("table.toml", "[materials]\nmodel = \"yeoh\"\n", &["did you mean `material`"]);
    rejects(
        "type.toml",
        "[material]\nmodel = \"neo-hookean\"\nshear_modulus = \"soft\"\nbulk_modulus = 100\n",
        &["shear_modulus", "number"],
    );
}

#[test]
fn bad_options_exit_2() {
    for (args, expected) in [
        (vec!["--model", "yeoh", "--param", "c10=0.5", "--param", "c20=x"], "c20=x"),
        (vec!["--model", "eight-chain", "--param", "shear_modulus=1", "--param", "lockin_stretch=3"], "did you mean `locking_stretch`"),
        (vec!["--model", "neo-hookean", "--param", "shear_modulus=1", "--param", "bulk_modulus=10", "--stretch", "2:1:5"], "--stretch"),
        (vec!["--model", "neo-hookean", "--param", "shear_modulus=1", "--param", "bulk_modulus=10", "--mode", "torsion"], "torsion"),
    ] {
        let out = olli(&args);
        let msg = stderr(&out);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {msg}");
        assert!(msg.contains(expected), "{args:?}: {msg}");
    }
}

#[test]
fn plots_draw_every_mode_through_the_shared_module() {
    let dir = temp_path("plots");
    let out = olli(&[
        "--model",
        "neo-hookean",
        "--param",
        "shear_modulus=0.5",
        "--param",
        "bulk_modulus=1000",
        "--stretch",
        "0.6:2.5:12",
        "--plots",
        dir.to_str().unwrap(),
        "--format",
        "svg",
    ]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let modes = std::fs::read_to_string(dir.join("material_modes.svg")).unwrap();
    for label in ["uniaxial", "equibiaxial", "planar", "simple-shear", "stretch λ", "nominal stress [F/L²]"] {
        assert!(modes.contains(label), "material_modes.svg lacks `{label}`");
    }
    // Four deviatoric curves, each drawn 2 px wide along the data and as a legend sample.
    assert_eq!(modes.matches("stroke-width=\"2\" points=").count(), 2 * 4);
    let volumetric = std::fs::read_to_string(dir.join("material_volumetric.svg")).unwrap();
    assert!(volumetric.contains("volumetric"));
    let _ = std::fs::remove_dir_all(&dir);
}

#[test]
fn a_material_with_memory_draws_relaxation_dynamic_moduli_and_a_mullins_cycle() {
    let toml = write_toml(
        "memory.toml",
        "[material]\nmodel = \"neo-hookean\"\nshear_modulus = 0.8\nbulk_modulus = 2000\nprony = [[0.3, 0.01], [0.2, 10.0]]\nmullins = { r = 2.0, m = 0.1, beta = 0.05 }\n",
    );
    let dir = temp_path("memory-plots");
    let out = olli(&[toml.to_str().unwrap(), "--plots", dir.to_str().unwrap(), "--format", "svg"]);
    assert_eq!(out.status.code(), Some(0), "{}", stderr(&out));
    let read = |f: &str| std::fs::read_to_string(dir.join(f)).unwrap_or_else(|e| panic!("{f}: {e}"));
    assert!(read("material_relaxation.svg").contains("relaxed modulus"));
    let dynamic = read("material_dynamic_moduli.svg");
    assert!(dynamic.contains("storage G′") && dynamic.contains("loss G″"));
    assert!(read("material_loss_angle.svg").contains("loss angle δ"));
    let cycle = read("material_mullins.svg");
    for label in ["first loading to 1.5", "unloading from 1.5", "reloading to 2", "unloading from 2"] {
        assert!(cycle.contains(label), "material_mullins.svg lacks `{label}`");
    }
    let _ = std::fs::remove_dir_all(&dir);
    // Bad memory keys are located in the file.
    let bad = write_toml(
        "bad-memory.toml",
        "[material]\nmodel = \"neo-hookean\"\nshear_modulus = 0.8\nbulk_modulus = 2000\nprony = [[0.7, 1.0], [0.4, 2.0]]\n",
    );
    let out = olli(&[bad.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(2), "{}", stderr(&out));
    assert!(stderr(&out).contains(":5:") && stderr(&out).contains("less than 1"), "{}", stderr(&out));
}
