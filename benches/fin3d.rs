//! Benchmarks of the 3D fin solve (targets live here, not in tests).
//!
//! - `fin3d refactorisation`: one numeric Cholesky + solve of the demo
//!   tri-gate's 3D Jacobian (ordering and symbolic analysis done once, outside the timing).
//! - `fin3d full extraction`: `evaluate_alone` (cross-section reference and
//!   both drain ramps of the 3D solve) on the demo tri-gate at its shortest
//!   length. Target (issue 8): <= 10 s and <= 2 GB on the 2-core machine; goal 3 s.
//! - `fin3d bias point, refined`: one bias point (equilibrium, drain ramp to
//!   V_DS,lin) of the demo tri-gate on a mesh refined to about 500k nodes.
//!   Target: <= 4 s; goal 2 s.
//!
//! Run: `cargo bench --bench fin3d` (one group: `cargo bench --bench fin3d -- refactorisation`).

use criterion::{criterion_group, criterion_main, Criterion};
use gatehold::device::{parse_device, Scenario};
use gatehold::evaluate::evaluate_alone;
use gatehold::progress::Silent;
use gatehold::solve::{neutral_guess, DeviceSolver, PoissonSolver, QuasiFermi};
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
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
