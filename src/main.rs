fn main() {
    let path = std::env::args().nth(1).unwrap();
    let s = gatehold::device::load_device(std::path::Path::new(&path)).unwrap();
    let t = std::time::Instant::now();
    let sol = gatehold::run::run_device(&s, &gatehold::run::Silent).unwrap();
    for sw in [&sol.lin, &sol.sat] {
        let st: Vec<usize> = sw.points.iter().map(|p| p.report.steps).collect();
        println!(
            "vds {} steps {:?} newton {} fact {}",
            sw.vds_v, st, sw.newton_steps, sw.factorisations
        );
    }
    eprintln!(
        "{:?} nodes {} unknowns {}",
        t.elapsed(),
        sol.report.nodes,
        sol.report.unknowns
    );
}
