//! Theory beside the 2D solves (MODEL.md section 6; issue checks).

mod common;

use common::*;
use gatehold::evaluate::scan::scan;
use gatehold::evaluate::Status;
use gatehold::progress::Silent;

#[test]
fn high_k_at_equal_eot_loses_more_control() {
    // Fringe-induced barrier lowering: at equal EOT (1.0 nm SiO2 against 5.64 nm
    // of eps 22), the closed forms are equal but the physically thick high-k
    // layer lets the drain's field reach the channel: the numeric natural length
    // and the solved DIBL are larger (Frank, Taur and Wong, IEEE EDL 19(10), 385, 1998).
    let bias = "[bias]\nvgs_start_V = -0.3\nvgs_stop_V = 0.5\nvgs_step_V = 0.025\n";
    let sio2 = double_gate(25.0, 8.0, 1.0, bias);
    let mut hik = sio2.clone();
    hik.stack[0].eps_r = 22.0;
    hik.stack[0].thickness_nm = 5.64;
    hik.stack[0].material = "eps=22".into();
    assert!((sio2.eot_nm() - hik.eot_nm()).abs() < 1e-3);
    let (a, b) = rayon::join(|| solve_device(&sio2).report, || solve_device(&hik).report);
    let (la, lb) = (lambda_of(&sio2).unwrap(), lambda_of(&hik).unwrap());
    let (da, db) = (a.dibl_mv_per_v.unwrap(), b.dibl_mv_per_v.unwrap());
    println!(
        "SiO2: lambda {:.3} nm, DIBL {da:.1} mV/V, SS {:.1}; high-k: lambda {:.3} nm, DIBL {db:.1} mV/V, SS {:.1} \
         (DIBL +{:.0} %, lambda +{:.0} %)",
        la.lambda_numeric_nm,
        a.ss_lin_mv_per_dec.unwrap(),
        lb.lambda_numeric_nm,
        b.ss_lin_mv_per_dec.unwrap(),
        100.0 * (db / da - 1.0),
        100.0 * (lb.lambda_numeric_nm / la.lambda_numeric_nm - 1.0)
    );
    assert!((a.natural_length_nm.unwrap() - b.natural_length_nm.unwrap()).abs() < 1e-3);
    assert!(lb.lambda_numeric_nm > 1.15 * la.lambda_numeric_nm);
    // Measured: +53 % DIBL and +22 % lambda at L_g = 25 nm; require at least +30 % and +15 %.
    assert!(db > 1.3 * da, "DIBL {da} vs {db}");
    assert!(b.ss_lin_mv_per_dec.unwrap() > a.ss_lin_mv_per_dec.unwrap());
}

#[test]
fn fitted_lambda_from_double_gate_solves_matches_the_numeric_lambda() {
    // Issue check: lambda fitted from 2D solves at several gate lengths within
    // 20 % of the numeric lambda. The barrier lowering (the electrostatic
    // measure, exp(-L/(2 lambda)) per Liu et al., IEEE TED 40(1), 86, 1993) meets it
    // closely. The constant-current DIBL fit reads long: besides the barrier
    // term it holds a slowly decaying part (the drain shortens the low-density
    // stretch that sets the subthreshold current, about 1/L), reported on the issue.
    let s = double_gate(
        25.0,
        8.0,
        1.0,
        "[bias]\nvgs_start_V = -0.4\nvgs_stop_V = 0.5\nvgs_step_V = 0.025\n",
    );
    let r = scan(&s, &[20.0, 25.0, 30.0, 35.0, 40.0], &Silent).unwrap();
    let num = r.lambda_numeric_nm;
    let fb = r.lambda_fitted_barrier.unwrap();
    let fd = r.lambda_fitted.unwrap();
    println!(
        "lambda numeric {num:.3} nm; fitted to barrier lowering {:.3} nm (R^2 {:.5}); fitted to DIBL {:.3} nm (R^2 {:.4})",
        fb.lambda_nm, fb.r_squared, fd.lambda_nm, fd.r_squared
    );
    assert!(
        rel(fb.lambda_nm, num) < 0.05,
        "barrier fit {} vs numeric {num} (measured within 2 %)",
        fb.lambda_nm
    );
    assert!(fb.r_squared > 0.999);
    // The DIBL fit is longer than the numeric lambda, for the reason above.
    assert!(fd.lambda_nm > num);
    for row in &r.rows {
        assert_eq!(row.status, Status::Ok);
    }
}
