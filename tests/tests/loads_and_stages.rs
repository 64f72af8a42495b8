//! Loads, stages and error handling of the driver, checked against statics
//! (equilibrium of the whole body; general mechanics) rather than a
//! published solution.

use std::f64::consts::PI;

use olli_solver::*;
use olli_verification::*;

fn column(analysis: Analysis) -> Model {
    let mesh = match analysis {
        Analysis::Solid3d => block([1.0, 1.0, 3.0], [2, 2, 6], 0.2),
        _ => rectangle(0.5, 1.5, 0.0, 3.0, 3, 6, 0.2),
    };
    Model::single_region(mesh, analysis, neo_hookean(1.0, 1000.0), Formulation::Mixed)
}

#[test]
fn body_force_is_carried_by_the_support() {
    // A column clamped at its base under its own weight b (per unit
    // reference volume): the base reaction balances b × volume exactly
    // (dead load, global equilibrium), to the Newton tolerance.
    let b = -0.05;
    for (analysis, base, axis, volume) in [
        (Analysis::Solid3d, "z0", 2, 3.0),
        (Analysis::Axisymmetric, "t0", 1, PI * (1.5f64.powi(2) - 0.5f64.powi(2)) * 3.0),
        (Analysis::PlaneStrain { thickness: 2.0 }, "t0", 1, 1.0 * 3.0 * 2.0),
    ] {
        let mut model = column(analysis);
        let mut g = [0.0; 3];
        g[axis] = b;
        model.stages.push(Stage {
            name: "gravity".into(),
            supports: vec![Support { set: base.into(), components: [true, true, true] }],
            body_force: Some(g),
            ..Default::default()
        });
        let sol = solve(&model, &mut Quiet).unwrap();
        assert!(sol.completed(), "{analysis:?}: {:?}", sol.termination);
        let r = sol.last().unwrap().reactions[base][axis];
        assert!(rel(r, -b * volume) < 1e-6, "{analysis:?}: reaction {r} vs weight {}", -b * volume);
    }
}

#[test]
fn total_force_on_a_side_set_and_stages_hold_earlier_loads() {
    // Stage 1 pulls the free end with a total force; stage 2 adds nothing:
    // it must start from stage 1's state and keep it (loads are held).
    let mut model = column(Analysis::Solid3d);
    model.stages.push(Stage {
        name: "pull".into(),
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        forces: vec![Force { set: "z1".into(), total: [0.0, 0.0, 0.4] }],
        ..Default::default()
    });
    model.stages.push(Stage { name: "hold".into(), ..Default::default() });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed());
    let end1 = sol.increments.iter().rfind(|r| r.stage == 0).unwrap();
    let end2 = sol.last().unwrap();
    assert_eq!(end2.stage, 1);
    // Base reaction balances the applied total force.
    assert!(rel(end1.reactions["z0"][2], -0.4) < 1e-6);
    // The held stage starts at stage 1's state, which met the force
    // tolerance (1e-6 relative), and may only re-balance within it.
    let scale = end1.displacement.iter().flatten().fold(0.0f64, |m, v| m.max(v.abs()));
    assert!(scale > 0.0);
    for (a, b) in end1.displacement.iter().zip(&end2.displacement) {
        for i in 0..3 {
            assert!((a[i] - b[i]).abs() < 1e-6 * scale, "{} vs {}", a[i], b[i]);
        }
    }
}

#[test]
fn a_run_that_fails_part_way_keeps_its_converged_increments() {
    // Stage 2 allows one Newton iteration per increment and no cutback room,
    // so it must stop; stage 1's increments are returned with the reason.
    let mut model = column(Analysis::Solid3d);
    model.stages.push(Stage {
        name: "pull".into(),
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        motions: vec![Motion { set: "z1".into(), displacement: [None, None, Some(0.3)] }],
        ..Default::default()
    });
    model.stages.push(Stage {
        name: "shear".into(),
        controls: IncrementControls { first: 1.0, min: 0.5, max_iterations: 1, ..Default::default() },
        motions: vec![Motion { set: "z1".into(), displacement: [Some(0.5), None, Some(0.3)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(
        matches!(&sol.termination, Termination::Stopped(SolveError::IncrementTooSmall { stage, .. }) if stage == "shear"),
        "{:?}",
        sol.termination
    );
    assert!(!sol.increments.is_empty());
    assert!(sol.increments.iter().all(|r| r.stage == 0));
    assert!((sol.last().unwrap().load_factor - 1.0).abs() < 1e-12);
}

#[test]
fn unknown_set_names_and_wrong_elements_are_typed_errors() {
    let mut model = column(Analysis::Solid3d);
    model.stages.push(Stage {
        name: "bad".into(),
        supports: vec![Support { set: "nowhere".into(), components: [true; 3] }],
        ..Default::default()
    });
    assert!(matches!(solve(&model, &mut Quiet), Err(SolveError::UnknownSet { name, .. }) if name == "nowhere"));
    let mut model = column(Analysis::Solid3d);
    model.stages.push(Stage { name: "p".into(), pressures: vec![Pressure { set: "nowhere".into(), value: 1.0 }], ..Default::default() });
    assert!(matches!(solve(&model, &mut Quiet), Err(SolveError::UnknownSet { .. })));
    // A 2-D mesh in a 3-D analysis.
    let mut model = column(Analysis::Axisymmetric);
    model.analysis = Analysis::Solid3d;
    model.stages.push(Stage::default());
    assert!(matches!(solve(&model, &mut Quiet), Err(SolveError::Assembly(olli_solver::assembly::AssemblyError::DimensionMismatch { .. }))));
    // No stages.
    let model = column(Analysis::Solid3d);
    assert!(matches!(solve(&model, &mut Quiet), Err(SolveError::NoStages)));
}

#[test]
fn results_carry_point_and_nodal_fields() {
    // Uniaxial stretch λ = 1.3 of a free-sided bar: every point has the
    // homogeneous state, so the fields are checked against it — stretches
    // (λ, λ^-½, λ^-½) to O(μ/κ), max log strain ln λ, J ≈ 1, and the energy
    // density μ/2 (Ī1 − 3) of neo-Hookean (Treloar 1943, from memory).
    let mesh = block([1.0, 1.0, 2.0], [2, 2, 4], 0.0);
    let mut model = Model::single_region(mesh, Analysis::Solid3d, neo_hookean(1.0, 1e4), Formulation::Mixed);
    model.stages.push(Stage {
        name: "pull".into(),
        supports: vec![
            Support { set: "x0".into(), components: [true, false, false] },
            Support { set: "y0".into(), components: [false, true, false] },
            Support { set: "z0".into(), components: [false, false, true] },
        ],
        motions: vec![Motion { set: "z1".into(), displacement: [None, None, Some(0.6)] }],
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    let last = sol.last().unwrap();
    let l: f64 = 1.3;
    let w = 0.5 * (l * l + 2.0 / l - 3.0);
    for p in &last.points.as_ref().unwrap().states {
        assert!(rel(p.stretches[0], l) < 1e-3 && rel(p.stretches[2], l.powf(-0.5)) < 1e-3);
        assert!((p.max_log_strain() - l.ln()).abs() < 1e-3);
        assert!((p.j - 1.0).abs() < 1e-3);
        assert!(rel(p.energy_density, w) < 1e-2);
        // σ_zz = μ(λ² − 1/λ), the others zero.
        assert!(rel(p.cauchy[(2, 2)], l * l - 1.0 / l) < 1e-3);
    }
    let nodal = last.nodal.as_ref().unwrap();
    assert!(nodal.cauchy.iter().all(|s| rel(s[2], l * l - 1.0 / l) < 1e-3));
    assert!(nodal.pressure.iter().all(|p| rel(*p, -(l * l - 1.0 / l) / 3.0) < 1e-3));
}

#[test]
fn loads_follow_their_own_ramps_within_a_stage() {
    // One stage, two loads: the top face moved with a step ramp (all at
    // once) and the body force following a table ramp (full at t = 0.5).
    // Equilibrium fixes the reaction of the dead load at every increment.
    let b = -0.05;
    let mut model = column(Analysis::Solid3d);
    let mut ramps = std::collections::BTreeMap::new();
    ramps.insert("z1".to_string(), Ramp::Step);
    ramps.insert(olli_solver::model::BODY_FORCE_RAMP.to_string(), Ramp::Table(vec![(0.0, 0.0), (0.5, 1.0), (1.0, 1.0)]));
    model.stages.push(Stage {
        name: "ramps".into(),
        controls: IncrementControls { first: 0.25, max: 0.25, ..Default::default() },
        supports: vec![Support { set: "z0".into(), components: [true, true, true] }],
        motions: vec![Motion { set: "z1".into(), displacement: [Some(0.1), None, None] }],
        body_force: Some([0.0, 0.0, b]),
        ramps,
        ..Default::default()
    });
    let sol = solve(&model, &mut Quiet).unwrap();
    assert!(sol.completed());
    assert_eq!(sol.increments.len(), 4);
    let top = model.mesh.node_sets["z1"][0];
    for inc in &sol.increments {
        // Step: the full motion from the first increment on.
        assert!((inc.displacement[top][0] - 0.1).abs() < 1e-12);
        // Table: weight fraction min(2t, 1); the vertical reactions of base
        // and top together carry it.
        let fraction = (2.0 * inc.load_factor).min(1.0);
        let rz = inc.reactions["z0"][2] + inc.reactions["z1"][2];
        assert!((rz + b * 3.0 * fraction).abs() < 1e-6 * 0.15, "t = {}: {rz}", inc.load_factor);
    }
}
