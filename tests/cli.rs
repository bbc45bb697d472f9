//! The real binary in a temporary folder: output contracts and error handling.

use std::process::Command;

fn gatehold() -> Command {
    Command::new(env!("CARGO_BIN_EXE_gatehold"))
}

fn mesh(name: &str) -> String {
    format!("{}/meshes/{name}", env!("CARGO_MANIFEST_DIR"))
}

#[test]
fn run_json_has_the_contract_keys_and_curves_csv_matches() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("curves.csv");
    let out = gatehold()
        .args(["run", &mesh("double-gate.toml"), "--json", "--curves"])
        .arg(&csv)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    // DEVICE-FORMAT / issue contract: these keys, these names.
    for key in [
        "name",
        "architecture",
        "polarity",
        "gate_length_nm",
        "l_met_nm",
        "vt_lin_V",
        "vt_sat_V",
        "ss_lin_mV_per_dec",
        "ss_sat_mV_per_dec",
        "dibl_mV_per_V",
        "vt_long_V",
        "vt_rolloff_mV",
        "barrier_lin_eV",
        "barrier_sat_eV",
        "barrier_lowering_meV",
        "leakiest_depth_nm",
        "natural_length_nm",
        "converged",
        "nodes",
        "newton_steps_total",
        "vgs_V",
        "id_lin",
        "id_sat",
        "current_unit",
    ] {
        assert!(v.get(key).is_some(), "missing key {key}");
    }
    assert_eq!(v["architecture"], "double-gate");
    assert_eq!(v["converged"], true);
    let vt = v["vt_lin_V"].as_f64().unwrap();
    assert!(vt > 0.1 && vt < 0.6, "{vt}");
    assert!(v["dibl_mV_per_V"].as_f64().unwrap() > 0.0);
    assert!(v["current_unit"].as_str().unwrap().contains("A/um"));
    let n = v["vgs_V"].as_array().unwrap().len();
    assert_eq!(n, v["id_lin"].as_array().unwrap().len());
    // The CSV holds the same curves.
    let text = std::fs::read_to_string(&csv).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert!(lines[0].starts_with("vgs_V,id_lin_A_per_um"));
    assert_eq!(lines.len(), n + 1);
    let first: Vec<f64> = lines[1].split(',').map(|x| x.parse().unwrap()).collect();
    assert!((first[1] - v["id_lin"][0].as_f64().unwrap()).abs() <= 1e-6 * first[1].abs());
}

#[test]
fn bad_device_files_fail_with_named_errors_and_no_panic() {
    let dir = tempfile::tempdir().unwrap();
    let base = std::fs::read_to_string(mesh("double-gate.toml")).unwrap();
    let cases = [
        (
            base.replace("gate_length_nm", "gate_lenght_nm"),
            "geometry.gate_length_nm",
        ),
        (
            base.replace("thickness_nm = 0.6", "thickness_nm = -0.6"),
            "gate_stack.0.thickness_nm",
        ),
        (
            base.replace("vgs_stop_V = 0.8", "vgs_stop_V = -0.5"),
            "bias.vgs_stop_V",
        ),
        (
            base.replace("channel_cm3 = 1e15", "channel_cm3 = 1e25"),
            "doping.channel_cm3",
        ),
        (
            base.replace("\"double-gate\"", "\"double-gat\""),
            "double-gate",
        ),
        ("name = \"x\"\n[geometry\n".to_string(), "TOML"),
    ];
    for (i, (text, needle)) in cases.iter().enumerate() {
        let p = dir.path().join(format!("bad{i}.toml"));
        std::fs::write(&p, text).unwrap();
        let out = gatehold().arg("run").arg(&p).output().unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "case {i}: {err}");
        assert!(err.contains(needle), "case {i}: {err}");
        assert!(!err.contains("panicked"), "case {i}: {err}");
    }
    let out = gatehold()
        .args(["run", "/nonexistent/device.toml"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("/nonexistent/device.toml"));
}

#[test]
fn templates_parse_and_lambda_json_has_the_contract_keys() {
    let dir = tempfile::tempdir().unwrap();
    for arch in [
        "bulk",
        "thin-body",
        "double-gate",
        "tri-gate",
        "gate-all-around",
        "capped-fin",
    ] {
        let out = gatehold().args(["template", arch]).output().unwrap();
        assert!(out.status.success());
        let text = String::from_utf8(out.stdout).unwrap();
        gatehold::device::parse_device(&text).unwrap_or_else(|e| panic!("{arch}: {e}"));
        if arch == "thin-body" {
            let p = dir.path().join("tb.toml");
            std::fs::write(&p, &text).unwrap();
            let out = gatehold()
                .arg("lambda")
                .arg(&p)
                .arg("--json")
                .output()
                .unwrap();
            assert!(
                out.status.success(),
                "{}",
                String::from_utf8_lossy(&out.stderr)
            );
            let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
            for key in [
                "lambda_numeric_nm",
                "lambda_dielectric_path_nm",
                "lambda_closed_forms",
                "lg_over_lambda",
            ] {
                assert!(v.get(key).is_some(), "missing {key}");
            }
            let num = v["lambda_numeric_nm"].as_f64().unwrap();
            let yan = v["lambda_closed_forms"]["yan-1992-single-gate"]
                .as_f64()
                .unwrap();
            // A thin body on a buried oxide: the numeric lambda sees the oxide path, the closed form does not.
            assert!(num > yan, "{num} vs {yan}");
            assert!((v["lg_over_lambda"].as_f64().unwrap() - 25.0 / num).abs() < 1e-9);
        }
    }
    let out = gatehold().args(["template", "quad-gate"]).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("gate-all-around"));
}

/// Bad `gatehold pitch` options are usage errors (exit 64, the README's
/// exit-code table) whose message names the option, the value and why; they
/// are refused before any solve. The exit codes of the other commands:
/// `tests/pipeline.rs`.
#[test]
fn bad_pitch_options_are_usage_errors_naming_option_value_and_why() {
    let dg = mesh("double-gate.toml");
    // (options, what stderr must name: the option, the value, the reason)
    let cases: [(&str, [&str; 3]); 8] = [
        ("--pitch -5", ["--pitch", "'-5'", "> 0"]),
        (
            "--pitch 54 --spacer-nm 5,abc",
            ["--spacer-nm", "'abc'", "not a number"],
        ),
        ("--pitch 54 --contact-nm=0", ["--contact-nm", "'0'", "> 0"]),
        (
            "--pitch 54 --spacer-nm 5 --contact-nm 9 --spacer-material SiCO",
            ["--spacer-material", "'SiCO'", "did you mean \"SiOC\""],
        ),
        (
            "--pitch 54 --spacer-nm 5 --contact-nm 9 --spacer-material=",
            ["--spacer-material", "''", "empty"],
        ),
        (
            "--pitch 54 --spacer-nm 5 --dibl-max -1",
            ["--dibl-max", "'-1'", "> 0"],
        ),
        (
            "--pitch 54 --spacer-nm 5",
            ["--contact-nm", "geometry.contact_width_nm", "not given"],
        ),
        (
            "--pitch 20 --spacer-nm 5,6 --contact-nm 10",
            [
                "--pitch 20",
                "gate length 0.000 nm",
                "no split leaves a positive gate length",
            ],
        ),
    ];
    for (options, needles) in cases {
        let out = gatehold()
            .args(["pitch", &dg, "--quiet"])
            .args(options.split_whitespace())
            .output()
            .unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(64), "pitch {options}: {err}");
        for n in needles {
            assert!(err.contains(n), "pitch {options}: no {n:?} in {err}");
        }
        assert!(out.stdout.is_empty(), "pitch {options}: nothing solved");
    }
    // A spacer given by permittivity has no material name for the splits to
    // default to: --spacer-material is then needed.
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("eps.toml");
    let text = std::fs::read_to_string(&dg).unwrap();
    std::fs::write(
        &p,
        text.replace("spacer = \"Si3N4\"", "spacer_permittivity = 3.0"),
    )
    .unwrap();
    let out = gatehold()
        .arg("pitch")
        .arg(&p)
        .args(["--pitch", "54", "--spacer-nm", "5", "--contact-nm", "9"])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(64), "{err}");
    assert!(
        err.contains("--spacer-material: not given") && err.contains("spacer_permittivity = 3"),
        "{err}"
    );
}

/// Refusals print values computed from the input short: 21.3 - 20 - 2 x 0.6
/// is 0.10000000000000075 in binary, 5 + 2 (0.1 + 1.3) is
/// 7.800000000000001; the messages say 0.1 and 7.8 (the decimal sums, by hand).
#[test]
fn refusals_print_computed_values_short() {
    let dir = tempfile::tempdir().unwrap();
    let dg = std::fs::read_to_string(mesh("double-gate.toml")).unwrap();
    let tg = String::from_utf8(
        gatehold()
            .args(["template", "tri-gate"])
            .output()
            .unwrap()
            .stdout,
    )
    .unwrap();
    let cases = [
        (
            dg.replace(
                "source_drain_length_nm = 15",
                "gate_pitch_nm = 21.3\nspacer_thickness_nm = 0.6",
            ),
            "`geometry.contact_width_nm` = 0.1: derived from geometry.gate_pitch_nm = 21.3",
            "0.10000000000000075",
        ),
        (
            tg.replace("body_thickness_nm = 8 ", "body_thickness_nm = 5 ")
                .replace("# fin_pitch_nm = 40 ", "fin_pitch_nm = 7 ")
                .replace("thickness_nm = 0.6", "thickness_nm = 0.1")
                .replace("thickness_nm = 2.0", "thickness_nm = 1.3"),
            "`geometry.fin_pitch_nm` = 7: narrower than the fin plus its gate stack (7.8 nm)",
            "7.800000000000001",
        ),
    ];
    for (k, (text, want, noise)) in cases.iter().enumerate() {
        let p = dir.path().join(format!("d{k}.toml"));
        std::fs::write(&p, text).unwrap();
        let out = gatehold().arg("check").arg(&p).output().unwrap();
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "case {k}: {err}");
        assert!(
            err.contains(want) && !err.contains(noise),
            "case {k}: {err}"
        );
    }
}
