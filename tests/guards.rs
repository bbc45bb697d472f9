//! Guards before allocation, through the real binary: every hostile value is
//! refused with an error naming the key actually at fault, oversized or
//! non-regular input files are refused unread, `--jobs` is capped, and every
//! shipped template runs clean.

use std::path::Path;
use std::process::Command;

const BIN: &str = env!("CARGO_BIN_EXE_gatehold");

const BASE: &str = r#"name = "g"
architecture = "double-gate"
[geometry]
gate_length_nm = 25
body_thickness_nm = 8
[[gate_stack]]
material = "SiO2"
thickness_nm = 1.0
[gate]
workfunction_eV = 4.6
"#;

fn run(args: &[&str], dir: &Path) -> (i32, String, String) {
    let o = Command::new(BIN)
        .args(args)
        .current_dir(dir)
        .output()
        .expect("binary runs");
    (
        o.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&o.stdout).into_owned(),
        String::from_utf8_lossy(&o.stderr).into_owned(),
    )
}

/// `base` with `key = value` set (an existing line of that key replaced,
/// the table created if missing).
fn with(base: &str, key: &str, value: &str) -> String {
    if let Some(k) = key.strip_prefix("gate_stack.0.") {
        return base.replace("thickness_nm = 1.0", &format!("{k} = {value}"));
    }
    let (table, k) = key.split_once('.').unwrap_or(("", key));
    let existing = format!("{k} = ");
    let b = base
        .lines()
        .filter(|l| !l.starts_with(&existing))
        .collect::<Vec<_>>()
        .join("\n")
        + "\n";
    if table.is_empty() {
        format!("{k} = {value}\n{b}")
    } else if b.contains(&format!("[{table}]\n")) {
        b.replace(
            &format!("[{table}]\n"),
            &format!("[{table}]\n{k} = {value}\n"),
        )
    } else {
        format!("{b}[{table}]\n{k} = {value}\n")
    }
}

#[test]
fn hostile_values_are_refused_naming_the_key_at_fault() {
    let dir = tempfile::tempdir().unwrap();
    let cases: &[(&str, &str, &str)] = &[
        ("double-gate", "geometry.body_thickness_nm", "1e300"),
        ("double-gate", "geometry.body_thickness_nm", "1000"),
        ("double-gate", "geometry.gate_height_nm", "1e300"),
        ("double-gate", "geometry.gate_height_nm", "1e-300"),
        ("double-gate", "geometry.source_drain_length_nm", "1e7"),
        ("double-gate", "gate_stack.0.thickness_nm", "1e5"),
        ("thin-body", "geometry.box_thickness_nm", "1e300"),
        ("thin-body", "geometry.box_thickness_nm", "1e-300"),
        ("tri-gate", "geometry.fin_height_nm", "1e300"),
        ("tri-gate", "geometry.fin_height_nm", "1e-300"),
        ("double-gate", "bias.vgs_stop_V", "1e300"),
        ("double-gate", "bias.vgs_start_V", "-1e300"),
        ("double-gate", "bias.vds_lin_V", "1e-300"),
        ("double-gate", "extraction.current_criterion_A", "1e300"),
        ("double-gate", "extraction.current_criterion_A", "1e-300"),
        ("double-gate", "mesh.max_nodes", "1e300"),
    ];
    for (arch, key, value) in cases {
        let mut base = BASE.replace("double-gate", arch);
        if arch.contains("tri") {
            base = base.replace(
                "body_thickness_nm = 8",
                "body_thickness_nm = 8\nfin_height_nm = 20",
            );
        }
        let text = with(&base, key, value);
        let f = dir.path().join("d.toml");
        std::fs::write(&f, &text).unwrap();
        for cmd in ["run", "lambda"] {
            let (code, _, err) = run(&[cmd, "d.toml"], dir.path());
            println!("{cmd} {arch} {key} = {value}: exit {code}: {}", err.trim());
            assert_eq!(code, 1, "{cmd} {key} = {value}: {err}\n{text}");
            assert!(
                err.contains(key),
                "{cmd} {key} = {value} must name {key}: {err}"
            );
            assert!(!err.contains("panicked"), "{err}");
        }
    }
}

#[test]
fn a_mesh_beyond_the_node_budget_is_refused_with_the_override_named() {
    let dir = tempfile::tempdir().unwrap();
    // 1 um of source/drain on a 0.1 nm mesh everywhere (far zones as fine as
    // the channel): far beyond a million nodes.
    let text = format!("{BASE}[mesh]\nmax_step_nm = 0.1\nmax_far_step_nm = 0.1\n").replace(
        "gate_length_nm = 25",
        "gate_length_nm = 25\nsource_drain_length_nm = 1000",
    );
    std::fs::write(dir.path().join("d.toml"), &text).unwrap();
    let (code, _, err) = run(&["lambda", "d.toml"], dir.path());
    println!("{err}");
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("mesh.max_nodes") && err.contains("nodes"),
        "{err}"
    );
    assert!(err.contains("geometry.source_drain_length_nm"), "{err}");
    // Raising the budget lets the same device through validation (lambda
    // solves only the 1D stack, so this stays fast).
    let text = text.replace("max_step_nm = 0.1", "max_step_nm = 0.1\nmax_nodes = 1e7");
    std::fs::write(dir.path().join("d.toml"), &text).unwrap();
    let (code, _, err) = run(&["lambda", "d.toml"], dir.path());
    assert_eq!(code, 0, "{err}");
}

#[test]
fn oversized_and_non_regular_input_files_are_refused_unread() {
    let dir = tempfile::tempdir().unwrap();
    let big = format!("{BASE}\n{}", "# padding\n".repeat(120_000));
    std::fs::write(dir.path().join("big.toml"), big).unwrap();
    let (code, _, err) = run(&["run", "big.toml"], dir.path());
    assert_eq!(code, 1);
    assert!(err.contains("byte limit"), "{err}");
    for dev in ["/dev/zero", "/dev/urandom"] {
        let (code, _, err) = run(&["lambda", dev], dir.path());
        assert_eq!(code, 1, "{dev}: {err}");
        assert!(err.contains("not a regular file"), "{dev}: {err}");
    }
    std::fs::write(
        dir.path().join("plan.toml"),
        "base = \"/dev/zero\"\n[axes]\n\"geometry.gate_length_nm\" = [20, 30]\n",
    )
    .unwrap();
    let (code, _, err) = run(
        &["sweep", "plan.toml", "--out", "o.h5", "--quiet"],
        dir.path(),
    );
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("/dev/zero") && err.contains("not a regular file"),
        "{err}"
    );
    assert!(!dir.path().join("o.h5").exists());
    let (code, _, err) = run(&["sweep", "/dev/zero", "--out", "o.h5"], dir.path());
    assert_eq!(code, 1, "{err}");
    assert!(err.contains("not a regular file"), "{err}");
}

#[test]
fn jobs_beyond_the_core_count_are_capped_with_a_warning() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("d.toml"),
        format!("{BASE}[mesh]\nmax_step_nm = 2.0\n")
            .replace(
                "architecture = \"double-gate\"",
                "architecture = \"tri-gate\"",
            )
            .replace(
                "body_thickness_nm = 8",
                "body_thickness_nm = 8\nfin_height_nm = 20",
            ),
    )
    .unwrap();
    let (code, out, err) = run(
        &[
            "scan",
            "d.toml",
            "--lengths",
            "20,40",
            "--jobs",
            "99999999999",
            "--json",
        ],
        dir.path(),
    );
    assert!(code == 0 || code == 2, "{err}");
    assert!(
        err.contains("--jobs 99999999999") && err.contains("core"),
        "{err}"
    );
    assert!(out.contains("rows"), "{out}");
}

#[test]
fn every_template_runs_clean() {
    let dir = tempfile::tempdir().unwrap();
    for arch in gatehold::device::Architecture::ALL {
        let (code, text, err) = run(&["template", arch.name()], dir.path());
        assert_eq!(code, 0, "{err}");
        std::fs::write(dir.path().join("t.toml"), &text).unwrap();
        let (code, out, err) = run(&["run", "t.toml", "--json", "--quiet"], dir.path());
        let v: serde_json::Value =
            serde_json::from_str(&out).unwrap_or_else(|e| panic!("{arch}: {e}: {out}{err}"));
        println!(
            "{arch}: exit {code}, status {}, vt_lin_V {}",
            v["status"], v["vt_lin_V"]
        );
        assert_eq!(code, 0, "template {arch} must run clean: {out}\n{err}");
        assert!(v["vt_lin_V"].is_number(), "{arch}: {out}");
    }
}

/// The committed reference `docs/device-file.md` is exactly what the
/// validator's tables render (`render::keys::reference_markdown`), so the
/// documentation cannot drift from the keys and ranges actually checked.
#[test]
fn the_committed_key_reference_is_generated_from_the_validator() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/device-file.md");
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    let generated = gatehold::render::keys::reference_markdown();
    assert!(
        committed == generated,
        "docs/device-file.md differs from the key table; regenerate it with\n    cargo run --release -- keys > docs/device-file.md"
    );
    // Every key the validator knows, and every range, is in it.
    for k in gatehold::device::known_keys() {
        assert!(generated.contains(&format!("`{k}")), "{k} missing");
    }
    for l in gatehold::device::LIMITS {
        assert!(generated.contains(&format!("| `{}` |", l.key)), "{}", l.key);
    }
    // The hidden command prints the same text.
    let out = Command::new(env!("CARGO_BIN_EXE_gatehold"))
        .arg("keys")
        .output()
        .unwrap();
    assert_eq!(String::from_utf8_lossy(&out.stdout), generated);
}

/// `lambda`, `run`, `scan`, `sweep` and `check` share one validation: the
/// same hostile device is refused by each with the same message (the key,
/// the value and why), before anything is solved. (`lambda` once printed
/// lambda = 318,299 nm for a 1 mm body and panicked on a 1e-300 nm buried
/// oxide.)
#[test]
fn every_command_refuses_a_hostile_device_with_the_same_error() {
    let dir = tempfile::tempdir().unwrap();
    let thin = BASE.replace("double-gate", "thin-body");
    let cases: &[(&str, String, &str)] = &[
        (
            "body 1 mm",
            with(BASE, "geometry.body_thickness_nm", "1e6"),
            "`geometry.body_thickness_nm` = 1000000:",
        ),
        (
            "box 1e-300",
            with(&thin, "geometry.box_thickness_nm", "1e-300"),
            "`geometry.box_thickness_nm` = 1e-300",
        ),
        (
            "drain 1e-300",
            with(BASE, "bias.vds_lin_V", "1e-300"),
            "`bias.vds_lin_V` = 1e-300",
        ),
        (
            "criterion 1e300",
            with(BASE, "extraction.current_criterion_A", "1e300"),
            "`extraction.current_criterion_A` = 1e300",
        ),
    ];
    for (label, text, expected) in cases {
        std::fs::write(dir.path().join("d.toml"), text).unwrap();
        std::fs::write(dir.path().join("p.toml"), "base = \"d.toml\"\n").unwrap();
        for args in [
            vec!["lambda", "d.toml"],
            vec!["run", "d.toml"],
            vec!["scan", "d.toml", "--lengths", "20,30"],
            vec!["sweep", "p.toml", "--out", "o.h5"],
            vec!["check", "d.toml"],
        ] {
            let (code, _, err) = run(&args, dir.path());
            assert_eq!(code, 1, "{label}: {args:?}: {err}");
            assert!(err.contains(expected), "{label}: {args:?}: {err}");
            assert!(!err.contains("panicked"), "{label}: {args:?}: {err}");
        }
        assert!(!dir.path().join("o.h5").exists());
    }
}

#[test]
fn a_fin_beyond_the_3d_budget_is_refused_before_its_mesh_is_built() {
    // Source: the 3D node budget (`device::check_size_3d`, a tenth of
    // mesh.max_nodes); the 2D cross-section of this fin is small, so only
    // the 3D estimate can refuse it.
    let dir = tempfile::tempdir().unwrap();
    let (code, template, _) = run(&["template", "tri-gate"], dir.path());
    assert_eq!(code, 0);
    let long: String = template
        .lines()
        .map(|l| {
            if l.starts_with("gate_length_nm") {
                "gate_length_nm = 4000".to_string()
            } else if l.starts_with("max_step_nm") {
                // A 3D budget of 100k nodes (a tenth of mesh.max_nodes).
                format!("{l}\nmax_nodes = 1000000")
            } else {
                l.to_string()
            }
        })
        .collect::<Vec<_>>()
        .join("\n");
    std::fs::write(dir.path().join("long.toml"), long).unwrap();
    let (code, _, err) = run(&["run", "--quiet", "long.toml"], dir.path());
    assert_eq!(code, 1, "{err}");
    assert!(
        err.contains("geometry.gate_length_nm") && err.contains("3D fin mesh"),
        "{err}"
    );
    // The theory path builds no 3D mesh and is not refused.
    let (code, _, err) = run(
        &["run", "--quiet", "--fins", "theory", "long.toml"],
        dir.path(),
    );
    assert!(code == 0 || code == 2, "{err}");
}
