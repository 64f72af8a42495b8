//! Output of `olli material`: one table per mode on stdout with its Drucker
//! verdict, and a CSV file written atomically (temporary file + rename, so a
//! reader never sees half a file).

use std::io::Write;
use std::path::Path;

use olli_solver::material::homogeneous::{HomogeneousError, Mode, Point};
use olli_solver::material::stability::{drucker_margin, ModeStability};
use olli_solver::material::Material;

use super::spec::MaterialSpec;

/// Everything computed for one mode.
pub struct ModeResult {
    pub mode: Mode,
    pub points: Vec<Point>,
    /// Why the sweep stopped before an end of the range, if it did.
    pub stops: Vec<HomogeneousError>,
    pub stability: ModeStability,
}

fn describe_mode(mode: Mode) -> &'static str {
    match mode {
        Mode::Uniaxial => "uniaxial tension/compression (lateral stress solved to zero)",
        Mode::Equibiaxial => "equibiaxial (thickness stress solved to zero)",
        Mode::Planar => "planar / pure shear (width held, thickness stress solved to zero)",
        Mode::SimpleShear => "simple shear at held thickness (stretch = principal stretch, γ = λ − 1/λ; stresses are the 12 components)",
        Mode::Volumetric => "volumetric (hydrostatic; stretch = J^(1/3); true stress = pressure, positive in tension)",
    }
}

/// One line: where Drucker stability ends in this mode (the shared wording).
pub fn stability_verdict(s: &ModeStability) -> String {
    olli_app::stability_text::verdict(s, None)
}

fn is_stable(material: &Material, p: &Point) -> bool {
    drucker_margin(material, p.principal_stretches).is_ok_and(|m| m > 0.0)
}

pub fn print_report(spec: &MaterialSpec, material: &Material, results: &[ModeResult]) {
    println!("material ({}): {}", spec.source, spec.describe());
    println!(
        "small-strain: shear modulus {:.6}, bulk modulus {:.6}, Poisson's ratio {:.6}",
        material.shear_modulus(),
        material.bulk_modulus(),
        material.poisson_ratio()
    );
    for r in results {
        println!();
        println!("{}: {}", r.mode.name(), describe_mode(r.mode));
        let shear = r.mode == Mode::SimpleShear;
        print!("{:>10}", "stretch");
        if shear {
            print!(" {:>10}", "shear γ");
        }
        println!(
            " {:>15} {:>15} {:>11} {:>11} {:>12} {:>8}",
            "nominal_stress", "true_stress", "lateral_2", "lateral_3", "volume_ratio", "drucker"
        );
        for p in &r.points {
            print!("{:>10.4}", p.stretch);
            if shear {
                print!(" {:>10.4}", p.amount_of_shear);
            }
            println!(
                " {:>15.6e} {:>15.6e} {:>11.6} {:>11.6} {:>12.6} {:>8}",
                p.nominal_stress,
                p.true_stress,
                p.lateral_stretches[0],
                p.lateral_stretches[1],
                p.volume_ratio,
                if is_stable(material, p) { "stable" } else { "lost" }
            );
        }
        for e in &r.stops {
            println!("  response stops: {e}");
        }
        println!("  Drucker stability: {}", stability_verdict(&r.stability));
    }
    println!();
    println!("Drucker stability summary:");
    for r in results {
        println!("  {:<13} {}", r.mode.name(), stability_verdict(&r.stability));
    }
}

/// CSV columns, in order.
pub const CSV_HEADER: &str =
    "mode,stretch,amount_of_shear,nominal_stress,true_stress,lateral_stretch_2,lateral_stretch_3,volume_ratio,drucker_stable";

fn csv_text(material: &Material, results: &[ModeResult]) -> String {
    let mut out = String::from(CSV_HEADER);
    out.push('\n');
    for r in results {
        for p in &r.points {
            out.push_str(&format!(
                "{},{},{},{},{},{},{},{},{}\n",
                r.mode.name(),
                p.stretch,
                p.amount_of_shear,
                p.nominal_stress,
                p.true_stress,
                p.lateral_stretches[0],
                p.lateral_stretches[1],
                p.volume_ratio,
                is_stable(material, p)
            ));
        }
    }
    out
}

/// Writes the CSV to a temporary file beside `path`, then renames it over `path`.
pub fn write_csv(path: &Path, material: &Material, results: &[ModeResult]) -> std::io::Result<()> {
    let name = path.file_name().ok_or_else(|| std::io::Error::other("not a file name"))?;
    let tmp = path.with_file_name(format!(".{}.tmp{}", name.to_string_lossy(), std::process::id()));
    let written = std::fs::File::create(&tmp).and_then(|mut f| {
        f.write_all(csv_text(material, results).as_bytes())?;
        f.sync_all()
    });
    let result = written.and_then(|()| std::fs::rename(&tmp, path));
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}
