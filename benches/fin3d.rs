//! Benchmarks of the 3D fin solve (targets live here, not in tests).
//!
//! - `fin3d refactorisation`: one numeric Cholesky + solve of the demo
//!   tri-gate's 3D Jacobian (ordering and symbolic analysis done once, outside the timing).
//! - `fin3d full extraction`: `evaluate_alone` (cross-section reference and
//!   both drain ramps of the 3D solve) on the demo tri-gate at its shortest
//!   length. Target (issue 8): <= 10 s and <= 2 GB on the 2-core machine; goal 3 s.
//! - `fin3d bias point, refined`: one bias point (equilibrium, drain ramp to
//!   V_DS,lin) of the demo tri-gate on a mesh refined to about 500k nodes.
//!   Target: <= 4 s; goal 2 s. Above 20k 3D unknowns this uses the
//!   multigrid-preconditioned CG.
//! - `fin3d linear step, cholesky` / `fin3d linear step, multigrid-cg`: one
//!   Newton step (Jacobian refresh: numeric factorisation, or diagonal update
//!   and coarsest factorisation; then the solve) of the demo tri-gate refined
//!   to about 110k nodes, with each linear solver (hierarchy and symbolic
//!   analysis built once, outside the timing).
//!
//! Run: `cargo bench --bench fin3d` (one group: `cargo bench --bench fin3d -- refactorisation`).

use criterion::{criterion_group, criterion_main, Criterion};
use gatehold::device::{parse_device, Scenario};
use gatehold::evaluate::evaluate_alone;
use gatehold::progress::Silent;
use gatehold::solve::{neutral_guess, DeviceSolver, LinearSolver, PoissonSolver, QuasiFermi};
use gatehold::structure::along_fin;

/// The demo's tri-gate at its shortest length (the demo plan's values).
fn demo_tri_gate() -> Scenario {
    let text = gatehold::demo::BASE_DEVICE
        .replace(
            "architecture = \"double-gate\"",
            "architecture = \"tri-gate\"",
        )
        .replace("gate_length_nm = 20", "gate_length_nm = 14");
    parse_device(&text).expect("demo tri-gate")
}

fn bench(c: &mut Criterion) {
    let s = demo_tri_gate();
    let st = along_fin(&s);
    let p = &st.problem;
    let mut solver = PoissonSolver::new(p).expect("symbolic");
    let qf = QuasiFermi::uniform(p.nx, 0.0, 0.0);
    let psi0 = neutral_guess(p, &qf);
    let mut g = c.benchmark_group("fin3d");
    g.sample_size(10);
    g.bench_function(
        format!("refactorisation (demo tri-gate, {} nodes)", p.node_count()),
        |b| {
            b.iter(|| {
                let mut psi = psi0.clone();
                solver.step(p, &mut psi, &qf, 0.1, true).expect("step")
            })
        },
    );
    g.bench_function("full extraction (demo tri-gate, 2 drain biases)", |b| {
        b.iter(|| evaluate_alone(&s, &Silent).expect("run").report.vt_lin_v)
    });
    let mut fine = s.clone();
    fine.mesh.refinement = 2.2;
    let sf = along_fin(&fine);
    g.bench_function(
        format!("bias point, refined ({} nodes)", sf.problem.node_count()),
        |b| {
            b.iter(|| {
                let solver = PoissonSolver::new(&sf.problem).expect("symbolic");
                let mut d = DeviceSolver::new(&fine, &sf, solver);
                d.initial_state(0.0, fine.bias.vds_lin_v)
                    .expect("bias point")
            })
        },
    );
    let mut big = s.clone();
    big.mesh.refinement = 2.5;
    let sb = along_fin(&big);
    let pb = &sb.problem;
    let qfb = QuasiFermi::uniform(pb.nx, 0.0, 0.0);
    let psib = neutral_guess(pb, &qfb);
    for choice in [LinearSolver::Direct, LinearSolver::Multigrid] {
        let mut solver = PoissonSolver::with_linear_solver(pb, choice).expect("setup");
        g.bench_function(
            format!(
                "linear step, {} ({} nodes)",
                choice.as_str(),
                pb.node_count()
            ),
            |b| {
                b.iter(|| {
                    let mut psi = psib.clone();
                    solver.step(pb, &mut psi, &qfb, 0.1, true).expect("step")
                })
            },
        );
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
