fn main() {
    let path = std::env::args().nth(1).unwrap();
    let s = gatehold::device::load_device(std::path::Path::new(&path)).unwrap();
    let t = std::time::Instant::now();
    let sol = gatehold::run::run_device(&s, &gatehold::run::Silent).unwrap();
    let mut r = sol.report.clone();
    r.vgs_v.clear(); r.id_lin.clear(); r.id_sat.clear();
    println!("{}", serde_json::to_string_pretty(&r).unwrap());
    eprintln!("{:?}", t.elapsed());
}
