//! Verification of the discretisation and the nonlinear solve against
//! analytic solutions and published equations (sources named at each check).

mod common;

use common::*;
use gatehold::discretize::{CellKind, NodeKind, Problem};
use gatehold::mesh::Line;
use gatehold::physics::{Silicon, EPS_SI, EPS_SIO2, Q_OVER_EPS0_V_NM};
use gatehold::solve::UniformChannel;
use gatehold::solve::{NewtonOptions, PoissonSolver, QuasiFermi};

fn node_at(line: &Line, y: f64) -> usize {
    line.index_of(y)
        .unwrap_or_else(|| panic!("no mesh line at {y}"))
}

/// Taur's analytic solution for an undoped symmetric double gate with
/// electrons only (Y. Taur, IEEE Electron Device Letters 21(5), 245, 2000),
/// derived here independently: psi(y) = psi0 - 2 V_T ln cos(2 beta y / t_si)
/// (y from the centre) solves psi'' = (q n_i/eps_si) exp(psi/V_T) when
/// psi0 = V_T ln(8 V_T beta^2 eps_si / (q n_i t_si^2)); Gauss's law at the
/// surface, eps_ox (psi_g - psi_s)/t_ox = eps_si 4 V_T beta tan(beta)/t_si, fixes beta.
/// Returns (psi0, psi_s) in V.
fn taur(psi_g: f64, tsi: f64, tox: f64, si: &Silicon) -> (f64, f64) {
    let vt = si.thermal_v;
    let psi0 =
        |b: f64| vt * (8.0 * vt * b * b / (Q_OVER_EPS0_V_NM / EPS_SI * si.ni * tsi * tsi)).ln();
    let psis = |b: f64| psi0(b) - 2.0 * vt * b.cos().ln();
    let f = |b: f64| EPS_SIO2 * (psi_g - psis(b)) / tox - EPS_SI * 4.0 * vt * b * b.tan() / tsi;
    let (mut lo, mut hi) = (1e-12, std::f64::consts::FRAC_PI_2 - 1e-15);
    for _ in 0..200 {
        let m = 0.5 * (lo + hi);
        if f(m) > 0.0 {
            lo = m
        } else {
            hi = m
        }
    }
    let b = 0.5 * (lo + hi);
    (psi0(b), psis(b))
}

#[test]
fn taur_formula_checked_by_direct_integration() {
    // Independent check of the closed form: shoot psi'' = (q n_i/eps) e^{psi/V_T}
    // from the centre with RK4 and compare surface potential and gate potential.
    let si = Silicon::at(300.0);
    let (tsi, tox) = (10.0, 1.5);
    for psi_g in [0.2, 0.5, 0.9] {
        let (psi0, psis) = taur(psi_g, tsi, tox, &si);
        let k = Q_OVER_EPS0_V_NM / EPS_SI * si.ni;
        let rhs = |p: f64| k * (p / si.thermal_v).exp();
        let n = 20_000;
        let h = 0.5 * tsi / n as f64;
        let (mut p, mut d) = (psi0, 0.0);
        for _ in 0..n {
            let (k1p, k1d) = (d, rhs(p));
            let (k2p, k2d) = (d + 0.5 * h * k1d, rhs(p + 0.5 * h * k1p));
            let (k3p, k3d) = (d + 0.5 * h * k2d, rhs(p + 0.5 * h * k2p));
            let (k4p, k4d) = (d + h * k3d, rhs(p + h * k3p));
            p += h / 6.0 * (k1p + 2.0 * k2p + 2.0 * k3p + k4p);
            d += h / 6.0 * (k1d + 2.0 * k2d + 2.0 * k3d + k4d);
        }
        let gate = p + EPS_SI / EPS_SIO2 * tox * d;
        println!("psi_g {psi_g}: closed form psi_s {psis:.9}, integrated {p:.9}; gate from Gauss {gate:.9}");
        assert!((p - psis).abs() < 1e-8, "surface potential {p} vs {psis}");
        assert!(
            (gate - psi_g).abs() < 1e-8,
            "gate potential {gate} vs {psi_g}"
        );
    }
}

#[test]
fn undoped_double_gate_matches_taur_2000() {
    // Taur, IEEE EDL 21(5), 245, 2000: centre and surface potentials within 0.1 mV
    // where holes are negligible (psi > 0.15 V: p/n < 1e-5).
    let (tsi, tox) = (10.0, 1.5);
    // Default mesh through weak and moderate inversion (where V_t and SS are
    // extracted); a 4x finer mesh also in strong inversion (V_G = 0.9 V).
    for (r, gates) in [
        (1.0, &[0.2, 0.4, 0.6][..]),
        (4.0, &[0.2, 0.4, 0.6, 0.9][..]),
    ] {
        let s = double_gate(30.0, tsi, tox, &format!("[mesh]\nrefinement = {r}"));
        let mut col = UniformChannel::column(&s).unwrap();
        let si = col.problem.silicon;
        let (jc, js) = (
            node_at(&col.problem.y, 0.5 * tsi),
            node_at(&col.problem.y, 0.0),
        );
        for &vg in gates {
            col.sheet_density(vg, 0.0).unwrap();
            let psi = col.potential();
            let psi_g = si.electrode_potential(vg, 4.61);
            let (p0, ps) = taur(psi_g, tsi, tox, &si);
            let (n0, ns) = (psi[jc * col.problem.nx], psi[js * col.problem.nx]);
            println!("V_G {vg}: centre {n0:.6} vs {p0:.6} V, surface {ns:.6} vs {ps:.6} V");
            assert!(
                (n0 - p0).abs() < 1e-4,
                "centre potential off by {} mV",
                1e3 * (n0 - p0)
            );
            assert!(
                (ns - ps).abs() < 1e-4,
                "surface potential off by {} mV",
                1e3 * (ns - ps)
            );
        }
    }
}

#[test]
fn mos_capacitor_charge_matches_sze() {
    // Exact Poisson-Boltzmann charge of a uniformly doped semiconductor
    // (Sze and Ng, Physics of Semiconductor Devices, 3rd ed., 2007, ch. 4):
    // |Q_s| = sqrt(2) eps_s V_T / L_D * F(psi_s), F^2 = (e^{-b} + b - 1) + (n0/p0)(e^{b} - b - 1),
    // b = psi_s / V_T, L_D = sqrt(eps_s V_T / (q p0)). Within 0.1 %.
    // Default mesh from flat band through depletion and weak inversion; a 4x
    // finer mesh from accumulation to strong inversion (charge layers of
    // classical carriers only ~0.1-0.3 nm thick there).
    for (r, gates) in [
        (1.0, &[-0.3, 0.2, 0.6][..]),
        (4.0, &[-1.2, -0.8, -0.3, 0.2, 0.6, 1.0, 1.4, 1.8][..]),
    ] {
        let na = 1e18;
        let s = device(&format!(
            r#"
name = "moscap"
architecture = "bulk"
[geometry]
gate_length_nm = 100
substrate_depth_nm = 150
[mesh]
refinement = {r}
[[gate_stack]]
material = "SiO2"
thickness_nm = 2
[gate]
workfunction_eV = 4.61
[doping]
channel_cm3 = {na}
"#
        ));
        let mut col = UniformChannel::column(&s).unwrap();
        let si = col.problem.silicon;
        let p = col.problem.clone();
        let p0 = na * 1e-21;
        let psi_bulk = -si.thermal_v * (p0 / (2.0 * si.ni)).asinh();
        let n0 = si.ni * si.ni / p0;
        let js = node_at(&p.y, 0.0);
        let mut seen = (false, false, false);
        let mut worst: f64 = 0.0;
        for &vg in gates {
            col.sheet_density(vg, 0.0).unwrap();
            let psi = col.potential();
            let psis = psi[js * p.nx] - psi_bulk;
            // Numerical charge: sum over the semiconductor boxes of the column, per nm^2.
            let w = p.box_width_x(0);
            let mut q_num = 0.0;
            for j in 0..p.ny {
                let k = j * p.nx;
                if p.semi_area[k] > 0.0 {
                    let (n, h) = p.carriers(psi[k], 0.0, 0.0);
                    q_num += p.semi_area[k] / w * (h - n + p.net_doping[k]);
                }
            }
            let b = psis / si.thermal_v;
            let f = ((-b).exp() + b - 1.0 + n0 / p0 * (b.exp() - b - 1.0)).sqrt();
            let ld = (EPS_SI * si.thermal_v / (Q_OVER_EPS0_V_NM * p0)).sqrt();
            let q_sze =
                -b.signum() * 2f64.sqrt() * EPS_SI / Q_OVER_EPS0_V_NM * si.thermal_v / ld * f;
            println!("V_G {vg:5.2}: psi_s {psis:7.4} V  Q/q numeric {q_num:.6e}  Sze {q_sze:.6e} nm^-2  rel {:.2e}", rel(q_num, q_sze));
            worst = worst.max(rel(q_num, q_sze));
            seen.0 |= psis < 0.0;
            seen.1 |= psis > 0.0 && psis < 2.0 * si.thermal_v * (p0 / si.ni).ln();
            seen.2 |= psis > 2.0 * si.thermal_v * (p0 / si.ni).ln();
        }
        assert!(worst < 1e-3, "charge off by {:.3} %", 100.0 * worst);
        if r > 1.0 {
            assert!(
                seen.0 && seen.1 && seen.2,
                "accumulation, depletion and inversion must all be covered: {seen:?}"
            );
        }
    }
}

/// Manufactured solution with two dielectrics (silicon below y0, oxide above):
/// u = sin(pi x) h(y), h = a y + b y^2 in silicon (fixed charge as source),
/// h = cosh(pi (1 - y)) in the oxide (harmonic), u and eps du/dy continuous at y0.
/// Returns the largest nodal error on a smoothly graded n x n mesh.
fn manufactured_error(n: usize) -> f64 {
    use std::f64::consts::PI;
    let y0 = 0.4;
    let (es, ed) = (EPS_SI, EPS_SIO2);
    let hh = (PI * (1.0 - y0)).cosh();
    let dd = ed * (-PI * (PI * (1.0 - y0)).sinh());
    let bq = (dd / es - hh / y0) / y0;
    let aq = hh / y0 - bq * y0;
    let exact = |x: f64, y: f64| {
        (PI * x).sin()
            * if y <= y0 {
                aq * y + bq * y * y
            } else {
                (PI * (1.0 - y)).cosh()
            }
    };
    let graded = |a: f64, b: f64, cells: usize| -> Vec<f64> {
        (0..=cells)
            .map(|i| {
                let t = i as f64 / cells as f64;
                a + (b - a) * (t + 0.06 * (2.0 * PI * t).sin())
            })
            .collect()
    };
    let mut xs = vec![-0.1];
    xs.extend(graded(0.0, 1.0, n));
    xs.push(1.1);
    let mut ys = vec![-0.1];
    ys.extend(graded(0.0, y0, (n * 2) / 5));
    ys.extend(graded(y0, 1.0, (n * 3) / 5).into_iter().skip(1));
    let mut si = Silicon::at(300.0);
    si.ni = 1e-300; // no carriers: a linear problem with the doping as fixed charge
    let rho_avg = |x0: f64, x1: f64, ya: f64, yb: f64| {
        let sx = ((PI * x0).cos() - (PI * x1).cos()) / (PI * (x1 - x0));
        let hy = aq * 0.5 * (ya + yb) + bq * (ya * ya + ya * yb + yb * yb) / 3.0;
        -es * sx * (2.0 * bq - PI * PI * hy) / Q_OVER_EPS0_V_NM
    };
    let p = Problem::new(
        Line { nodes: xs },
        Line { nodes: ys },
        si,
        |x, y| {
            if !(0.0..=1.0).contains(&x) || y < 0.0 {
                CellKind::Metal(0)
            } else if y < y0 {
                CellKind::Semi
            } else {
                CellKind::Dielectric(ed)
            }
        },
        |_, _| None,
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
    for j in 0..p.ny {
        for i in 0..p.nx {
            let k = i + j * p.nx;
            if p.nodes[k] == NodeKind::Free {
                err = err.max((psi[k] - exact(p.x.nodes[i], p.y.nodes[j])).abs());
            }
        }
    }
    err
}

#[test]
fn discretisation_is_second_order_with_two_dielectrics() {
    // Common practice: observed order log2(e_h / e_{h/2}) of a manufactured solution.
    let errs: Vec<f64> = [10, 20, 40, 80]
        .iter()
        .map(|&n| manufactured_error(n))
        .collect();
    let orders: Vec<f64> = errs.windows(2).map(|w| (w[0] / w[1]).log2()).collect();
    println!("max errors {errs:?}, observed orders {orders:?}");
    let last = *orders.last().unwrap();
    assert!((1.8..=2.2).contains(&last), "observed order {last}");
    assert!(
        orders.iter().all(|o| (1.6..=2.4).contains(o)),
        "orders {orders:?}"
    );
}
