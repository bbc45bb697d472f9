//! Shared helpers for integration tests.
#![allow(dead_code)]

use gatehold::device::{parse_device, Scenario};

/// A device from TOML text (panics with the error: tests only).
pub fn device(text: &str) -> Scenario {
    parse_device(text).unwrap_or_else(|e| panic!("bad test device: {e}\n{text}"))
}

/// A small, fast double gate (coarse mesh, 0.04 V gate steps) for sweep,
/// cluster and sweep-file tests.
pub const TINY_DG: &str = r#"
name = "tiny-dg"
architecture = "double-gate"
[geometry]
gate_length_nm = 15
body_thickness_nm = 5
source_drain_length_nm = 8
gate_height_nm = 5
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.6
[bias]
vgs_start_V = -0.3
vgs_stop_V = 0.6
vgs_step_V = 0.04
[mesh]
max_step_nm = 1.0
"#;

/// Undoped symmetric double gate with a single SiO2 layer.
pub fn double_gate(lg_nm: f64, tsi_nm: f64, tox_nm: f64, extra: &str) -> Scenario {
    device(&format!(
        r#"
name = "dg-test"
architecture = "double-gate"
[geometry]
gate_length_nm = {lg_nm}
body_thickness_nm = {tsi_nm}
[[gate_stack]]
material = "SiO2"
thickness_nm = {tox_nm}
[gate]
workfunction_eV = 4.61
[doping]
channel_cm3 = 0
{extra}
"#
    ))
}

/// Relative error.
pub fn rel(a: f64, b: f64) -> f64 {
    ((a - b) / b).abs()
}

/// The natural-length report of a device (solving the long-channel column
/// for a bulk device's depletion depth), as `gatehold lambda` computes it.
pub fn lambda_of(
    s: &Scenario,
) -> Result<gatehold::theory::LambdaReport, gatehold::evaluate::ReferenceError> {
    gatehold::evaluate::natural_length(s, &gatehold::progress::Silent)
}

/// One device solved alone (its reference included).
pub fn solve_device(s: &Scenario) -> gatehold::evaluate::DeviceSolution {
    let r = gatehold::evaluate::Reference::of(s, &gatehold::progress::Silent).expect("reference");
    gatehold::evaluate::device::solve_planar(s, &r, &gatehold::progress::Silent).expect("run")
}

/// The report of `s` solved in 3D at gate length `l_nm` (its own reference).
pub fn solve_fin_at(s: &Scenario, l_nm: f64) -> gatehold::evaluate::DeviceReport {
    let sc = s.with_gate_length(l_nm).unwrap();
    let ev = gatehold::evaluate::evaluate_alone(&sc, &gatehold::progress::Silent).unwrap();
    assert_eq!(ev.report.method, gatehold::evaluate::Method::ThreeDSolve);
    ev.report
}

/// Mesh refinement study (common practice): `s` at `l_nm` against the same
/// device with `mesh.refinement = 2`; V_t,lin within 1 mV and DIBL within
/// 3 %. Prints both solves.
pub fn assert_3d_mesh_converged(label: &str, s: &Scenario, l_nm: f64) {
    let a = solve_fin_at(s, l_nm);
    let mut fine = s.clone();
    fine.mesh.refinement = 2.0;
    let b = solve_fin_at(&fine, l_nm);
    for r in [&a, &b] {
        assert!(r.problems.is_empty(), "{label}: {:?}", r.problems);
    }
    let dvt = 1000.0 * (a.vt_lin_v.unwrap() - b.vt_lin_v.unwrap());
    let ddibl = a.dibl_mv_per_v.unwrap() / b.dibl_mv_per_v.unwrap() - 1.0;
    println!(
        "{label}: V_t {:.5} vs {:.5} V ({dvt:.3} mV), DIBL {:.2} vs {:.2} mV/V ({:.2} %), nodes {} vs {}",
        a.vt_lin_v.unwrap(),
        b.vt_lin_v.unwrap(),
        a.dibl_mv_per_v.unwrap(),
        b.dibl_mv_per_v.unwrap(),
        100.0 * ddibl,
        a.nodes,
        b.nodes
    );
    assert!(dvt.abs() < 1.0, "{label}: {dvt} mV");
    assert!(ddibl.abs() < 0.03, "{label}: {ddibl}");
}

/// Tight tolerances so that two solves of the same problem agree far below
/// the default 1e-6 V_T.
pub fn tight(solver: &mut gatehold::solve::DeviceSolver) {
    solver.opts.update_tol_v = 1e-12;
    solver.opts.residual_tol_v = 1e-12;
}

/// Mirror symmetry about y = 0 (DEVICE-FORMAT.md, "Fins and wires solved in
/// 3D"): the largest difference between the half domain (zero-field symmetry
/// plane) and both mirror halves of the full domain, at V_DS = 0 (where the
/// quasi-Fermi level is exactly uniform, so both solves converge to
/// rounding), V.
pub fn half_full_largest_difference(s: &Scenario) -> f64 {
    use gatehold::solve::{DeviceSolver, PoissonSolver};
    let half = gatehold::structure::along_fin(s);
    let full = gatehold::structure::along_fin_full(s);
    let (ph, pf) = (&half.problem, &full.problem);
    assert_eq!(pf.ny, 2 * ph.ny - 1);
    let mut dh = DeviceSolver::new(s, &half, PoissonSolver::new(ph).unwrap());
    let mut df = DeviceSolver::new(s, &full, PoissonSolver::new(pf).unwrap());
    tight(&mut dh);
    tight(&mut df);
    let psi_h = dh.initial_state(0.2, 0.0).unwrap();
    let psi_f = df.initial_state(0.2, 0.0).unwrap();
    let off = ph.ny - 1; // full-domain y index of the half domain's y = 0
    let mut worst: f64 = 0.0;
    for k in 0..ph.nz {
        for j in 0..ph.ny {
            for i in 0..ph.nx {
                let a = psi_h[ph.index(i, j, k)];
                let b = psi_f[pf.index(i, off + j, k)];
                let c = psi_f[pf.index(i, off - j, k)];
                worst = worst.max((a - b).abs()).max((a - c).abs());
            }
        }
    }
    worst
}

/// The p-channel mirror image of `s` (MODEL.md section 3: donors for
/// acceptors, work functions mirrored about midgap, biases negated).
pub fn mirrored(s: &Scenario) -> Scenario {
    let mut p = s.clone();
    p.polarity = gatehold::device::Polarity::P;
    let phi_i = gatehold::physics::Silicon::at(s.temperature_k).phi_i_ev;
    p.gate.workfunction_ev = 2.0 * phi_i - s.gate.workfunction_ev;
    p.gate.back_workfunction_ev = 2.0 * phi_i - s.gate.back_workfunction_ev;
    p.gate.back_bias_v = -s.gate.back_bias_v;
    let b = &s.bias;
    p.bias.vds_lin_v = -b.vds_lin_v;
    p.bias.vds_sat_v = -b.vds_sat_v;
    p.bias.vgs_start_v = -b.vgs_stop_v;
    p.bias.vgs_stop_v = -b.vgs_start_v;
    p.bias.off_vgs_v = -b.off_vgs_v;
    p
}

/// The largest |psi_n + psi_p| of `n` and its mirror image solved in 3D at
/// V_GS = 0.2 V, V_DS = 0.5 V (and their negatives), V: zero for an exact mirror.
pub fn mirror_largest_sum(n: &Scenario) -> f64 {
    use gatehold::solve::{DeviceSolver, PoissonSolver};
    let p = mirrored(n);
    let (sn, sp) = (
        gatehold::structure::along_fin(n),
        gatehold::structure::along_fin(&p),
    );
    let mut dn = DeviceSolver::new(n, &sn, PoissonSolver::new(&sn.problem).unwrap());
    let mut dp = DeviceSolver::new(&p, &sp, PoissonSolver::new(&sp.problem).unwrap());
    let psi_n = dn.initial_state(0.2, 0.5).unwrap();
    let psi_p = dp.initial_state(-0.2, -0.5).unwrap();
    psi_n
        .iter()
        .zip(&psi_p)
        .map(|(a, b)| (a + b).abs())
        .fold(0.0, f64::max)
}

/// A small fin or wire for the 3D checks (6 x 10 nm body, 14 nm gate,
/// short source and drain, coarse 1 nm mesh) with `extra_geometry` lines and
/// gate steps of `vgs_step_v`, as device-file text.
pub fn small_fin_text(arch: &str, extra_geometry: &str, vgs_step_v: f64) -> String {
    format!(
        r#"
name = "small-{arch}"
architecture = "{arch}"
[geometry]
gate_length_nm = 14
body_thickness_nm = 6
fin_height_nm = 10
fin_pitch_nm = 16
box_thickness_nm = 8
source_drain_length_nm = 8
gate_height_nm = 4
{extra_geometry}
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.6
[doping]
channel_cm3 = 1e16
[bias]
vgs_start_V = -0.3
vgs_stop_V = 0.5
vgs_step_V = {vgs_step_v}
[mesh]
max_step_nm = 1.0
"#
    )
}
