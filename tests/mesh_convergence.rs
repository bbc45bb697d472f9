//! The default mesh is converged for each along-channel architecture
//! (MODEL.md section 3): V_t within 0.5 mV and DIBL within 2 % of a mesh twice
//! as fine (every step, the grading and the maximum halved: `mesh.refinement = 2`).
//! Devices: the demo devices in meshes/, gate sweep narrowed to the threshold region.

mod common;

use common::*;
use gatehold::device::load_device;

fn check(file: &str) {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("meshes")
        .join(file);
    let mut s = load_device(&path).unwrap();
    s.bias.vgs_start_v = -0.3;
    s.bias.vgs_stop_v = 0.45;
    s.bias.vgs_step_v = 0.025;
    let mut got = Vec::new();
    for r in [1.0, 2.0] {
        s.mesh.refinement = r;
        let rep = solve_device(&s).report;
        assert!(
            rep.problems.is_empty(),
            "{file} refinement {r}: {:?}",
            rep.problems
        );
        got.push((
            rep.vt_lin_v.unwrap(),
            rep.vt_sat_v.unwrap(),
            rep.dibl_mv_per_v.unwrap(),
            rep.unknowns,
        ));
    }
    let (d, f) = (got[0], got[1]);
    let dvl = 1e3 * (d.0 - f.0);
    let dvs = 1e3 * (d.1 - f.1);
    let ddibl = (d.2 - f.2) / f.2;
    println!(
        "{file}: {} vs {} unknowns; V_t,lin {:.5}/{:.5} V ({dvl:+.3} mV), V_t,sat {:.5}/{:.5} V ({dvs:+.3} mV), DIBL {:.2}/{:.2} mV/V ({:+.2} %)",
        d.3, f.3, d.0, f.0, d.1, f.1, d.2, f.2, 100.0 * ddibl
    );
    assert!(dvl.abs() < 0.5, "{file}: V_t,lin differs by {dvl} mV");
    assert!(dvs.abs() < 0.5, "{file}: V_t,sat differs by {dvs} mV");
    assert!(
        ddibl.abs() < 0.02,
        "{file}: DIBL differs by {} %",
        100.0 * ddibl
    );
}

#[test]
fn double_gate_default_mesh_is_converged() {
    check("double-gate.toml");
}

#[test]
fn thin_body_default_mesh_is_converged() {
    check("thin-body.toml");
}

#[test]
fn bulk_default_mesh_is_converged() {
    check("bulk.toml");
}
