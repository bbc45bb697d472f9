//! Fins and wires solved in 3D: verification of the dimension-generic
//! discretisation and of the 3D structure (each check names its source).
//!
//! Run: `cargo test --release --test fins3d`

mod common;

use gatehold::device::{parse_device, Polarity, Scenario};
use gatehold::discretize::{CellKind, NodeKind, Problem};
use gatehold::extract::electrical_length::electrical_length;
use gatehold::extract::{band_edge_ev, barrier, extract_long_channel, ramp_figures};
use gatehold::mesh::Line;
use gatehold::physics::{Silicon, EPS_SI, EPS_SIO2, Q_OVER_EPS0_V_NM};
use gatehold::progress::Silent;
use gatehold::solve::{DeviceSolver, NewtonOptions, PoissonSolver, QuasiFermi, UniformChannel};
use gatehold::structure::{along_channel, along_channel_extruded, along_fin};
use gatehold::theory::short_channel::fit_lambda_from_dibl;

fn device(text: &str) -> Scenario {
    parse_device(text).expect("test device")
}

fn planar(arch: &str) -> Scenario {
    device(&format!(
        r#"
name = "extrude"
architecture = "{arch}"
[geometry]
gate_length_nm = 16
body_thickness_nm = 6
box_thickness_nm = 10
source_drain_length_nm = 10
gate_height_nm = 5
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.6
[doping]
channel_cm3 = 1e15
junction_gradient_nm_per_decade = 2
[bias]
vgs_start_V = -0.6
vgs_stop_V = 0.5
vgs_step_V = 0.05
[mesh]
max_step_nm = 1.0
"#
    ))
}

/// Small tri-gate for the 3D checks (coarse mesh, short source and drain).
fn small_fin(arch: &str) -> Scenario {
    device(&common::small_fin_text(arch, "", 0.05))
}

#[test]
fn extruded_planar_sections_reproduce_the_2d_solve() {
    // Common practice (extrusion invariance of box integration): a planar
    // section extruded in the third direction with zero-flux side faces has
    // the same solution on every layer as the 2D section.
    for arch in ["double-gate", "thin-body"] {
        let s = planar(arch);
        let a2 = along_channel(&s);
        let a3 = along_channel_extruded(&s, 3.0, 2);
        let (p2, p3) = (&a2.problem, &a3.problem);
        assert_eq!(p3.nz, 3);
        let mut d2 = DeviceSolver::new(&s, &a2, PoissonSolver::new(p2).unwrap());
        let mut d3 = DeviceSolver::new(&s, &a3, PoissonSolver::new(p3).unwrap());
        common::tight(&mut d2);
        common::tight(&mut d3);
        let psi2 = d2.initial_state(0.1, 0.3).unwrap();
        let psi3 = d3.initial_state(0.1, 0.3).unwrap();
        let n2 = p2.node_count();
        let mut worst: f64 = 0.0;
        for k in 0..p3.nz {
            for n in 0..n2 {
                worst = worst.max((psi3[n + k * n2] - psi2[n]).abs());
            }
        }
        println!("{arch}: largest |psi_3d - psi_2d| = {worst:.3e} V");
        assert!(worst < 1e-6, "{arch}: {worst}");
        // The roll-off split's barrier-top density is per nm of width in both
        // (docs/electrical-length.md): the extruded section's cross-section
        // integral over its 3 nm depth is divided by that depth.
        let (e2, e3) = (
            electrical_length(p2, &psi2, s.polarity),
            electrical_length(p3, &psi3, s.polarity),
        );
        println!(
            "{arch}: N_top {:.6e} (2D) vs {:.6e} (extruded) nm^-2; L_elec {:.4} vs {:.4} nm",
            e2.n_top_per_nm2, e3.n_top_per_nm2, e2.l_elec_nm, e3.l_elec_nm
        );
        assert!((e3.n_top_per_nm2 / e2.n_top_per_nm2 - 1.0).abs() < 1e-4);
        assert!((e3.l_elec_nm - e2.l_elec_nm).abs() < 1e-4);
        let target = s.extraction.current_criterion_a / (s.geometry.gate_length_nm * 1e-3);
        for vds in [s.bias.vds_lin_v, s.bias.vds_sat_v] {
            let r2 = d2.gate_ramp(vds, None, &Silent).unwrap();
            let r3 = d3.gate_ramp(vds, None, &Silent).unwrap();
            let (vt2, _) = ramp_figures(&r2, target).expect("2D figures");
            let (vt3, _) = ramp_figures(&r3, target).expect("3D figures");
            println!("{arch} V_DS = {vds}: V_t 2D {vt2:.6} V, extruded {vt3:.6} V");
            assert!((vt2 - vt3).abs() < 1e-4, "{arch}: {vt2} vs {vt3}");
        }
    }
}

/// Manufactured 3D solution with a dielectric jump (silicon below z0 with a
/// fixed charge, oxide above, no carriers): u = sin(pi x) sin(pi y) h(z),
/// h = a z + b z^2 in silicon, h = cosh(sqrt2 pi (1 - z)) in the oxide
/// (harmonic), u and eps du/dz continuous at z0; u = 0 on the faces x, y in
/// {0, 1} and z = 0, zero flux on z = 1. Largest nodal error on a smoothly
/// graded n^3 mesh.
fn manufactured_error_3d(n: usize) -> f64 {
    use std::f64::consts::{PI, SQRT_2};
    let z0 = 0.4;
    let (es, ed) = (EPS_SI, EPS_SIO2);
    let k = SQRT_2 * PI;
    let hh = (k * (1.0 - z0)).cosh();
    let dd = ed * (-k * (k * (1.0 - z0)).sinh());
    let bq = (dd / es - hh / z0) / z0;
    let aq = hh / z0 - bq * z0;
    let h = |z: f64| {
        if z <= z0 {
            aq * z + bq * z * z
        } else {
            (k * (1.0 - z)).cosh()
        }
    };
    let exact = |x: f64, y: f64, z: f64| (PI * x).sin() * (PI * y).sin() * h(z);
    let graded = |a: f64, b: f64, cells: usize| -> Vec<f64> {
        (0..=cells)
            .map(|i| {
                let t = i as f64 / cells as f64;
                a + (b - a) * (t + 0.06 * (2.0 * PI * t).sin())
            })
            .collect()
    };
    let padded = |v: Vec<f64>| {
        let mut out = vec![-0.1];
        out.extend(v);
        out.push(1.1);
        Line { nodes: out }
    };
    let x = padded(graded(0.0, 1.0, n));
    let y = padded(graded(0.0, 1.0, n));
    let mut zs = graded(0.0, z0, (n * 2) / 5);
    zs.extend(graded(z0, 1.0, (n * 3) / 5).into_iter().skip(1));
    // z: metal below 0 (Dirichlet), zero flux on the top face z = 1 (h'(1) = 0).
    let mut zn = vec![-0.1];
    zn.extend(zs);
    let z = Line { nodes: zn };
    let mut si = Silicon::at(300.0);
    si.ni = 1e-300; // no carriers: a linear problem with the doping as fixed charge
    let avg_sin = |a: f64, b: f64| ((PI * a).cos() - (PI * b).cos()) / (PI * (b - a));
    let rho_avg = |x0: f64, x1: f64, y0: f64, y1: f64, za: f64, zb: f64| {
        let sxy = avg_sin(x0, x1) * avg_sin(y0, y1);
        let hz = aq * 0.5 * (za + zb) + bq * (za * za + za * zb + zb * zb) / 3.0;
        // -div(eps grad u) = -es sin sin (2 b - 2 pi^2 h) in silicon.
        -es * sxy * (2.0 * bq - 2.0 * PI * PI * hz) / Q_OVER_EPS0_V_NM
    };
    let inside = |v: f64| (0.0..=1.0).contains(&v);
    let p = Problem::new_3d(
        x,
        y,
        z,
        si,
        |x, y, z| {
            if !inside(x) || !inside(y) || z < 0.0 {
                CellKind::Metal(0)
            } else if z < z0 {
                CellKind::Semi
            } else {
                CellKind::Dielectric(ed)
            }
        },
        |_, _, _| None,
        rho_avg,
    );
    let mut solver = PoissonSolver::new(&p).unwrap();
    let mut psi = vec![0.0; p.node_count()];
    let qf = QuasiFermi::uniform(p.nx, 0.0, 0.0);
    let rep = solver
        .solve(
            &p,
            &mut psi,
            &qf,
            &NewtonOptions::for_thermal_voltage(si.thermal_v),
        )
        .unwrap();
    assert!(rep.converged(), "{rep:?}");
    let mut err: f64 = 0.0;
    for (n, kind) in p.nodes.iter().enumerate() {
        if *kind == NodeKind::Free {
            let (x, y, z) = p.coords_nm(n);
            err = err.max((psi[n] - exact(x, y, z)).abs());
        }
    }
    err
}

#[test]
fn discretisation_3d_is_second_order_with_a_dielectric_jump() {
    // Common practice: observed order log2(e_h / e_{h/2}) of a manufactured
    // solution (Roache, Verification and Validation in Computational Science
    // and Engineering, 1998).
    let errs: Vec<f64> = [8, 16, 32]
        .iter()
        .map(|&n| manufactured_error_3d(n))
        .collect();
    let orders: Vec<f64> = errs.windows(2).map(|w| (w[0] / w[1]).log2()).collect();
    println!("max errors {errs:?}, observed orders {orders:?}");
    let last = *orders.last().unwrap();
    assert!((1.8..=2.2).contains(&last), "observed order {last}");
}

#[test]
fn half_and_full_fin_domains_agree() {
    // Mirror symmetry about y = 0 (DEVICE-FORMAT.md, "Fins and wires solved in
    // 3D"): the half domain with a zero-field symmetry plane equals the full one.
    for arch in ["tri-gate", "gate-all-around"] {
        let worst = common::half_full_largest_difference(&small_fin(arch));
        println!("{arch}: largest |psi_half - psi_full| = {worst:.3e} V");
        assert!(worst < 1e-9, "{arch}: {worst}");
    }
}

#[test]
fn p_channel_fin_is_the_mirror_image() {
    // MODEL.md section 3: a p-channel device is the mirror image of the
    // n-channel one (donors, work function mirrored about midgap, biases negated).
    let worst = common::mirror_largest_sum(&small_fin("tri-gate"));
    println!("largest |psi_n + psi_p| = {worst:.3e} V");
    assert!(worst < 1e-9, "{worst}");
}

/// Barrier lowering of one fin at gate length `l_nm`, from the off-state
/// potentials at V_DS,lin and V_DS,sat (equilibrium at `bias.off_vgs_V`, then
/// the drain ramped: the same bias points as the report's barrier lowering).
/// Returns (E_b,lin - E_b,sat on the report's leakiest lines, eV; the
/// potentials at lin and sat; the problem).
fn off_state_pair(s: &Scenario, l_nm: f64) -> (Vec<f64>, Vec<f64>, Problem) {
    let sc = s.with_gate_length(l_nm).unwrap();
    let st = along_fin(&sc);
    let mut d = DeviceSolver::new(&sc, &st, PoissonSolver::new(&st.problem).unwrap());
    let v = sc.bias.off_vgs_v;
    let eq = d.equilibrium(v).unwrap();
    let lin = d.ramp_drain(&eq, v, sc.bias.vds_lin_v).unwrap();
    let sat = d.ramp_drain(&eq, v, sc.bias.vds_sat_v).unwrap();
    (lin, sat, st.problem)
}

/// Highest channel-carrier band edge along line `line` (fixed y, z), eV.
fn line_top_ev(p: &Problem, psi: &[f64], line: usize, polarity: Polarity) -> f64 {
    (0..p.nx)
        .map(|i| i + line * p.nx)
        .filter(|&k| p.semi_area[k] > 0.0)
        .map(|k| band_edge_ev(p, psi[k], polarity))
        .fold(f64::NEG_INFINITY, f64::max)
}

#[test]
fn natural_length_fitted_to_3d_barrier_lowering_matches_the_cross_section() {
    // lambda fitted to the solved 3D barrier lowering over L from 3 to 8
    // lambda is within 10 % of the numeric cross-section lambda (Frank, Taur
    // and Wong, IEEE EDL 19(10), 385, 1998; Colinge, Solid-State Electronics
    // 48, 897, 2004). The fit is the one `gatehold scan` makes for planar
    // sections (`lambda_fitted_barrier`): a line of ln(BL) against L_g, lambda =
    // -1/(2 slope), the leading exp(-L/(2 lambda)) term of Liu et al. (IEEE TED
    // 40(1), 86, 1993).
    //
    // Well posed (docs/fins-3d.md, "Verification"):
    // - abrupt junctions at the gate edges (the small fin's default), so L_g
    //   is the length the source and drain act over up to a constant offset
    //   that the slope does not see;
    // - the default mesh (max_step_nm = 0.5), whose x lines are refined at the
    //   gate centre. The barrier is the largest nodal band edge on a line;
    //   between V_DS,lin and V_DS,sat its top moves about 0.6 nm towards the
    //   source, and with x steps of 1.5-3 nm there (the mesh before the
    //   centre refinement, max_step_nm = 0.5-1.0) the nodal maximum cannot
    //   follow: at max_step_nm = 1 the wire's barrier lowering at 3 lambda
    //   read 48.8 meV against 68.4 meV on a mesh twice as fine, which made
    //   the earlier fit 4.46 nm;
    // - one path for all lengths: the leakiest line of the shortest length at
    //   V_DS,sat, held fixed. Natural-length theory says the drain's
    //   perturbation decays as exp(-L/(2 lambda)) on every line; the leakiest
    //   line of a tri-gate moves up the fin as L grows (z = 5.7 nm at 3
    //   lambda, 2.1 nm at 8 lambda), where the same perturbation is smaller,
    //   so the report's barrier lowering (leakiest line per bias) mixes lines.
    //   Printed beside it; the wire's leakiest line is its centre at every L.
    for arch in ["tri-gate", "gate-all-around"] {
        let mut s = small_fin(arch);
        s.mesh.max_step_nm = 0.5;
        let lam = gatehold::evaluate::natural_length(&s, &Silent)
            .unwrap()
            .lambda_numeric_nm;
        let lengths: Vec<f64> = [3.0, 4.5, 6.0, 8.0].iter().map(|k| k * lam).collect();
        let solved: Vec<(Vec<f64>, Vec<f64>, Problem)> =
            lengths.iter().map(|&l| off_state_pair(&s, l)).collect();
        let pol = s.polarity;
        let (_, sat0, p0) = &solved[0];
        let fixed = barrier(p0, sat0, pol).line;
        let mut on_line = Vec::new();
        let mut leakiest = Vec::new();
        for (l, (lin, sat, p)) in lengths.iter().zip(&solved) {
            let bl_fixed =
                1000.0 * (line_top_ev(p, lin, fixed, pol) - line_top_ev(p, sat, fixed, pol));
            let (bl, bs) = (barrier(p, lin, pol), barrier(p, sat, pol));
            on_line.push((*l, bl_fixed));
            leakiest.push((*l, 1000.0 * (bl.height_ev - bs.height_ev)));
            println!(
                "{arch} L = {l:.2} nm: barrier lowering {bl_fixed:.2} meV on the fixed line; leakiest lines {:.2} meV \
                 (lin z {:.2} nm, sat z {:.2} nm), {} nodes",
                1000.0 * (bl.height_ev - bs.height_ev),
                bl.z_nm,
                bs.z_nm,
                p.node_count()
            );
        }
        let fit = fit_lambda_from_dibl(&on_line, 0.0).unwrap();
        let fit_leakiest = fit_lambda_from_dibl(&leakiest, 0.0).unwrap();
        let (y, z) = (p0.y.nodes[fixed % p0.ny], p0.z.nodes[fixed / p0.ny]);
        println!(
            "{arch}: lambda numeric (cross-section) {lam:.3} nm; fitted to the 3D barrier lowering on the line \
             y = {y:.2}, z = {z:.2} nm: {:.3} nm (R^2 {:.5}, {:+.1} %); on the leakiest lines: {:.3} nm ({:+.1} %); \
             both Liu terms on the fixed line: {:.3} nm",
            fit.lambda_nm,
            fit.r_squared,
            100.0 * (fit.lambda_nm / lam - 1.0),
            fit_leakiest.lambda_nm,
            100.0 * (fit_leakiest.lambda_nm / lam - 1.0),
            fit_both_terms(&on_line)
        );
        assert!(
            (fit.lambda_nm / lam - 1.0).abs() < 0.10,
            "{arch}: fitted {} vs numeric {lam}",
            fit.lambda_nm
        );
        assert!(fit.r_squared > 0.99, "{arch}: {fit:?}");
        // `gatehold scan` makes the same fit on the same path (the shortest
        // length's leakiest line at V_DS,sat), so a user sees this check.
        let r = gatehold::evaluate::scan::scan(&s, &lengths, &Silent).unwrap();
        let p = r.lambda_fitted_barrier_fixed_path.expect("fixed-path fit");
        println!(
            "{arch}: scan's fixed-path fit {:.3} nm on y = {:.2}, z = {:.2} nm",
            p.fit.lambda_nm, p.path_y_nm, p.path_z_nm
        );
        assert!(
            (p.path_y_nm - y).abs() < 1e-9 && (p.path_z_nm - z).abs() < 1e-9,
            "{arch}: scan's path ({}, {}) vs ({y}, {z})",
            p.path_y_nm,
            p.path_z_nm
        );
        assert!(
            (p.fit.lambda_nm / fit.lambda_nm - 1.0).abs() < 1e-3,
            "{arch}: scan {} vs {}",
            p.fit.lambda_nm,
            fit.lambda_nm
        );
    }
}

/// Least-squares fit of ln(BL) = ln A + ln(exp(-L/(2 lambda)) + 2 exp(-L/lambda))
/// over lambda (A eliminated): both terms of the Liu et al. (IEEE TED 40(1),
/// 86, 1993) barrier lowering, so that lengths down to 3 lambda are not biased
/// by the second term. Golden-section search on the residual.
fn fit_both_terms(pts: &[(f64, f64)]) -> f64 {
    let ssr = |lam: f64| {
        let r: Vec<f64> = pts
            .iter()
            .map(|&(l, bl)| bl.ln() - ((-l / (2.0 * lam)).exp() + 2.0 * (-l / lam).exp()).ln())
            .collect();
        let mean = r.iter().sum::<f64>() / r.len() as f64;
        r.iter().map(|v| (v - mean).powi(2)).sum::<f64>()
    };
    let (mut a, mut b) = (0.2, 50.0);
    let g = 0.5 * (5f64.sqrt() - 1.0);
    for _ in 0..200 {
        let (c, d) = (b - g * (b - a), a + g * (b - a));
        if ssr(c) < ssr(d) {
            b = d;
        } else {
            a = c;
        }
    }
    0.5 * (a + b)
}

#[test]
fn two_term_fit_recovers_a_known_lambda() {
    // The fit above on exact Liu et al. (1993) barrier lowering (both terms): lambda comes back.
    let pts: Vec<(f64, f64)> = [9.0, 14.0, 19.0, 25.0]
        .iter()
        .map(|&l| (l, 800.0 * ((-l / 6.4f64).exp() + 2.0 * (-l / 3.2f64).exp())))
        .collect();
    assert!((fit_both_terms(&pts) - 3.2).abs() < 1e-6);
}

#[test]
fn rolloff_split_of_a_fin_compares_densities_per_width() {
    // The roll-off split of docs/electrical-length.md (its derivation in
    // extract::electrical_length::split_rolloff): the barrier-top column
    // density is compared with the long channel's threshold density per nm of
    // width, so a 3D fin's cross-section integral is divided by its width W
    // (before that, every fin's electrostatic part was off by SS_long log10 W,
    // about -86 mV for this 26 nm wide tri-gate, and the rest by +86 mV).
    // Checks: the parts sum to the total up to the derived rest (as
    // tests/answer.rs holds for a planar section, 0.5 mV); at a long fin both
    // the electrostatic part and the rest are small (the channel charge at
    // V_t, SS_long log10(L_elec(V_t)/L_elec), is about 1-2 mV whatever the
    // length); at a short fin the electrostatic part is tens of mV with the
    // roll-off's sign (Liu et al., IEEE TED 40(1), 86, 1993: the barrier falls
    // as exp(-L/(2 lambda))).
    let mut s = small_fin("tri-gate");
    s.bias.vgs_step_v = 0.0125;
    let mut parts = Vec::new();
    for l in [14.0, 200.0] {
        let r = common::solve_fin_at(&s, l);
        assert!(r.problems.is_empty(), "L = {l}: {:?}", r.problems);
        let (total, es, len, rest) = (
            r.vt_rolloff_mv.unwrap(),
            r.vt_rolloff_electrostatic_mv.unwrap(),
            r.vt_rolloff_length_mv.unwrap(),
            r.vt_rolloff_residual_mv.unwrap(),
        );
        let (ss_long, ss_lin) = (r.ss_long_mv_per_dec.unwrap(), r.ss_lin_mv_per_dec.unwrap());
        let (le, le_vt) = (r.l_elec_nm.unwrap(), r.l_elec_at_vt_nm.unwrap());
        let predicted = (ss_long - ss_lin) * (le / l).log10() + ss_long * (le_vt / le).log10();
        println!(
            "L = {l} nm: roll-off {total:.2} mV = electrostatic {es:.2} + electrical length {len:.2} + rest {rest:.2} \
             (derived rest {predicted:.2}); L_elec {le:.2} nm, at V_t {le_vt:.2} nm; {} nodes",
            r.nodes
        );
        // The V_t interpolation between bias points is the remainder: 0.5-1 mV
        // at vgs_step_V = 0.05, under 0.1 mV at 0.0125 (measured).
        assert!(
            (rest - predicted).abs() < 0.5,
            "L = {l}: rest {rest} mV vs derived {predicted} mV"
        );
        parts.push((total, es, rest));
    }
    let (short, long) = (parts[0], parts[1]);
    // Measured (max_step_nm = 1): 200 nm: -2.62 = +1.20 - 2.34 - 1.48 mV;
    // 14 nm: -54.8 = -34.0 - 35.7 + 15.0 mV.
    assert!(
        long.1.abs() < 3.0 && long.2.abs() < 3.0,
        "long fin: {long:?}"
    );
    assert!(short.0 < -20.0 && short.1 < -20.0, "short fin: {short:?}");
    assert!(short.1.abs() > 10.0 * long.1.abs(), "{short:?} vs {long:?}");
}

/// The Pao-Sah V_t,long of `s`'s cross-section solved on the very y and z
/// lines of its 3D mesh (the half section y >= 0, materials of the 3D cells
/// at mid-channel, the channel doping), so that a comparison with the 3D
/// solve sees no difference of meshes. Returns (V_t,long V, nodes).
fn vt_long_on_3d_lines(s: &Scenario) -> (f64, usize) {
    let st = along_fin(s);
    let p3 = &st.problem;
    let xm = 0.5 * (st.gate_start_nm + st.gate_end_nm);
    let cx = (0..p3.nx - 1)
        .find(|&c| p3.x.nodes[c + 1] >= xm)
        .expect("mid-channel cell");
    let cell = |line: &Line, v: f64| {
        (0..line.len() - 1)
            .find(|&c| line.nodes[c + 1] > v)
            .unwrap_or(line.len() - 2)
    };
    let net = -s.polarity.sign() * s.doping.channel_per_nm3;
    let mut p = Problem::new(
        p3.y.clone(),
        p3.z.clone(),
        Silicon::at(s.temperature_k),
        |yc, zc| p3.cell_3d(cx, cell(&p3.y, yc), cell(&p3.z, zc)),
        |_, _| None,
        |_, _, _, _| net,
    );
    p.symmetry_factor = p3.symmetry_factor;
    let nodes = p.node_count();
    let mut ch = UniformChannel::new(
        s,
        p,
        p3.current_width_nm,
        "fin cross-section on the 3D lines",
    )
    .unwrap();
    let (lc, _) = extract_long_channel(&mut ch, s).expect("long-channel reference");
    (lc.vt_v, nodes)
}

#[test]
fn long_tri_gate_approaches_the_cross_section_pao_sah_threshold() {
    // Pao and Sah, Solid-State Electronics 9, 927, 1966: a long channel's
    // threshold is the cross-section's uniform-channel V_t,long. The 3D V_t,lin
    // approaches it as L grows: at 250, 500 and 1000 nm the gap to the Pao-Sah
    // V_t,long of the cross-section on the same y-z lines (so the mesh error
    // cancels) shrinks, and is under 1 mV at 1 um. What remains is physical:
    // the source and drain reach a fixed length Delta L into the channel, so
    // the gap is about SS log10(1 - Delta L / L), falling as 1/L (docs/electrical-length.md).
    // The finer bias step keeps the V_t interpolation error (about 1 mV at
    // 0.05 V on this fin) below the gaps.
    let mut s = small_fin("tri-gate");
    s.bias.vgs_step_v = 0.0125;
    let (vt_same, section_nodes) = vt_long_on_3d_lines(&s);
    let mut gaps = Vec::new();
    for l in [250.0, 500.0, 1000.0] {
        let r = common::solve_fin_at(&s, l);
        assert!(r.problems.is_empty(), "L = {l}: {:?}", r.problems);
        let vt = r.vt_lin_v.unwrap();
        let gap = 1000.0 * (vt - vt_same);
        let gap_fine = 1000.0 * (vt - r.vt_long_v.unwrap());
        println!(
            "L = {l} nm: V_t,lin {vt:.6} V; gap to V_t,long on the 3D lines ({vt_same:.6} V, {section_nodes} nodes) \
             {gap:+.3} mV, gap x L {:.0} mV nm; to the finer cross-section ({:.6} V) {gap_fine:+.3} mV; \
             L_elec {:.1} nm; {} nodes",
            gap * l,
            r.vt_long_v.unwrap(),
            r.l_elec_nm.unwrap_or(f64::NAN),
            r.nodes
        );
        gaps.push(gap);
    }
    assert!(
        gaps[0].abs() > gaps[1].abs() && gaps[1].abs() > gaps[2].abs(),
        "the gap does not shrink with L: {gaps:?} mV"
    );
    assert!(gaps[2].abs() < 1.0, "gap at 1 um {} mV", gaps[2]);
    // ... and falls as 1/L: gap x L at 1 um within 30 % of that at 500 nm
    // (measured -348, -327, -294 mV nm at 250, 500, 1000 nm).
    let ratio = (gaps[2] * 1000.0) / (gaps[1] * 500.0);
    assert!((0.7..1.3).contains(&ratio), "gap x L ratio {ratio}");
}

#[test]
#[ignore = "about a minute: cargo test --release --test fins3d -- --ignored mesh_is_converged"]
fn default_3d_mesh_is_converged_per_fin_architecture() {
    // Common practice (mesh refinement study): V_t within 1 mV and DIBL within
    // 3 % of a mesh twice as fine (mesh.refinement = 2).
    for arch in ["tri-gate", "gate-all-around", "capped-fin"] {
        let mut s = small_fin(arch);
        s.mesh.max_step_nm = 0.5;
        s.bias.vgs_step_v = 0.025;
        if arch == "capped-fin" {
            s.geometry.cap_thickness_nm = 3.0;
        }
        common::assert_3d_mesh_converged(arch, &s, 20.0);
    }
}
