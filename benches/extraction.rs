//! Benchmarks of the core solve (targets live here, not in tests).
//!
//! - `refactorisation`: one numeric Cholesky + solve of the double-gate demo
//!   device's Jacobian (symbolic analysis done once, outside the timing).
//! - `full_extraction`: `evaluate_alone` (reference and both drain ramps) on the double-gate demo device
//!   (two drain sweeps of 51 gate voltages each, long-channel reference, figures).
//!   Target (issue 2): under 0.3 s on the 2-core machine.
//!
//! Run: `cargo bench --bench extraction`

use criterion::{criterion_group, criterion_main, Criterion};
use gatehold::device::load_device;
use gatehold::evaluate::evaluate_alone;
use gatehold::progress::Silent;
use gatehold::solve::{neutral_guess, PoissonSolver, QuasiFermi};
use gatehold::structure::along_channel;

fn demo() -> gatehold::device::Scenario {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("meshes/double-gate.toml");
    load_device(&path).expect("demo device")
}

fn bench(c: &mut Criterion) {
    let s = demo();
    let ac = along_channel(&s);
    let p = &ac.problem;
    let mut solver = PoissonSolver::new(p).expect("symbolic");
    let qf = QuasiFermi::uniform(p.nx, 0.0, 0.0);
    let psi0 = neutral_guess(p, &qf);
    c.bench_function("refactorisation (double-gate demo Jacobian)", |b| {
        b.iter(|| {
            let mut psi = psi0.clone();
            solver.step(p, &mut psi, &qf, 0.1, true).expect("step")
        })
    });
    let mut g = c.benchmark_group("extraction");
    g.sample_size(10);
    g.bench_function(
        "full_extraction (double-gate demo, 2 x 51 bias points)",
        |b| b.iter(|| evaluate_alone(&s, &Silent).expect("run").report.vt_lin_v),
    );
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
