//! Benchmarks of the core solve (targets live here, not in tests).
//!
//! - `refactorisation`: one numeric Cholesky + solve of the double-gate demo
//!   device's Jacobian (symbolic analysis done once, outside the timing).
//! - `full_extraction/<device>`: `evaluate_alone` (long-channel reference,
//!   both drain sweeps, every figure) on each demo device in `meshes/`
//!   (bulk, thin-body, double-gate), with the default adaptive bias points,
//!   and `grid/<device>` with every gate voltage of the grid (what
//!   `run --curves` and `run --plots` solve).
//!   Targets: bulk and thin-body at most 0.3 s (goal 0.1 s), double gate at
//!   most 0.1 s (goal 0.05 s) on a 2-core machine.
//!
//! Run: `cargo bench --bench extraction`

use criterion::{criterion_group, criterion_main, Criterion};
use gatehold::device::{load_device, BiasPoints};
use gatehold::evaluate::evaluate_alone;
use gatehold::progress::Silent;
use gatehold::solve::{neutral_guess, PoissonSolver, QuasiFermi};
use gatehold::structure::along_channel;

fn demo_device(name: &str) -> gatehold::device::Scenario {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("meshes")
        .join(format!("{name}.toml"));
    load_device(&path).expect("demo device")
}

fn bench(c: &mut Criterion) {
    let s = demo_device("double-gate");
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
    let mut g = c.benchmark_group("full_extraction");
    g.sample_size(10);
    for name in ["bulk", "thin-body", "double-gate"] {
        let s = demo_device(name);
        g.bench_function(name, |b| {
            b.iter(|| evaluate_alone(&s, &Silent).expect("run").report.vt_lin_v)
        });
    }
    g.finish();
    let mut g = c.benchmark_group("grid");
    g.sample_size(10);
    for name in ["bulk", "thin-body", "double-gate"] {
        let mut s = demo_device(name);
        s.bias.points = BiasPoints::Grid;
        g.bench_function(name, |b| {
            b.iter(|| evaluate_alone(&s, &Silent).expect("run").report.vt_lin_v)
        });
    }
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
