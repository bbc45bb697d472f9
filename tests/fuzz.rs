//! Hostile-input fuzzer, through the release binary.
//!
//! Generates malformed and hostile device files, plan files, sweep files and
//! command lines (huge, tiny, negative, NaN, infinite and wrong-type values
//! for every key of the validator's key table, missing and unknown keys,
//! garbage text, non-regular and oversized files, bad shards, bad `--jobs`,
//! bad `--lengths`, truncated and bit-flipped sweep files, ...), runs each through the binary with a per-input
//! time-out, and classifies the outcome:
//!
//! - refused: exit 1 or 64 with an error on stderr that names the key, file
//!   or option at fault (the case's expected token);
//! - accepted: exit 0 or 2;
//! - failures: a panic (exit 101 or "panicked" on stderr), a time-out, a
//!   refusal that does not name what is at fault, any other exit.
//!
//! Accepted inputs stay cheap: device files go through `gatehold check`
//! (validation and the mesh estimate, no solve) and `gatehold lambda` (the
//! natural-length eigenproblem); solving commands get small devices.
//!
//! The full run (about 5,000 inputs, a few minutes on 2 cores):
//!
//!     cargo test --release --test fuzz -- --ignored --nocapture
//!
//! The normal suite runs a fixed sample of about 100 of the same inputs.

use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

use toml::Value;

const BIN: &str = env!("CARGO_BIN_EXE_gatehold");
/// Per-input time-out.
const TIMEOUT: Duration = Duration::from_secs(30);

/// One hostile input: files to create, the command line (`{dir}` is
/// replaced by the case's folder), and the token a refusal must name.
struct Case {
    label: String,
    files: Vec<(String, Vec<u8>)>,
    args: Vec<String>,
    token: String,
}

#[derive(Debug, Default)]
struct Counts {
    refused: usize,
    accepted: usize,
    panics: Vec<String>,
    timeouts: Vec<String>,
    unnamed: Vec<String>,
    other: Vec<String>,
}

impl Counts {
    fn failures(&self) -> usize {
        self.panics.len() + self.timeouts.len() + self.unnamed.len() + self.other.len()
    }
}

const ARCHS: [&str; 6] = [
    "double-gate",
    "thin-body",
    "bulk",
    "tri-gate",
    "gate-all-around",
    "capped-fin",
];

/// The template of `arch` made cheap (1 nm mesh, 0.05 V gate steps).
fn base_device(arch: &str) -> toml::Table {
    let out = Command::new(BIN).args(["template", arch]).output().unwrap();
    let mut t: toml::Table = String::from_utf8(out.stdout).unwrap().parse().unwrap();
    set(&mut t, "mesh.max_step_nm", Value::Float(1.0));
    set(&mut t, "bias.vgs_step_V", Value::Float(0.05));
    t
}

/// Sets a dotted key (`gate_stack.N.key` addresses layer N), creating tables.
fn set(t: &mut toml::Table, key: &str, v: Value) {
    let parts: Vec<&str> = key.split('.').collect();
    if parts[0] == "gate_stack" && parts.len() == 3 {
        let i: usize = parts[1].parse().unwrap();
        if let Some(Value::Array(a)) = t.get_mut("gate_stack") {
            if let Some(Value::Table(l)) = a.get_mut(i) {
                l.insert(parts[2].into(), v);
            }
        }
        return;
    }
    let mut cur = t;
    for p in &parts[..parts.len() - 1] {
        cur = cur
            .entry(p.to_string())
            .or_insert_with(|| Value::Table(Default::default()))
            .as_table_mut()
            .unwrap();
    }
    cur.insert(parts[parts.len() - 1].into(), v);
}

fn remove(t: &mut toml::Table, key: &str) {
    let parts: Vec<&str> = key.split('.').collect();
    match parts.as_slice() {
        [k] => {
            t.remove(*k);
        }
        [a, b] => {
            if let Some(Value::Table(s)) = t.get_mut(*a) {
                s.remove(*b);
            }
        }
        _ => {}
    }
}

/// Hostile values for a numeric key.
fn hostile_values() -> Vec<(&'static str, Value)> {
    let f = Value::Float;
    vec![
        ("1e300", f(1e300)),
        ("-1e300", f(-1e300)),
        ("1e-300", f(1e-300)),
        ("-1e-300", f(-1e-300)),
        ("1e7", f(1e7)),
        ("1e15", f(1e15)),
        ("-1", f(-1.0)),
        ("0", Value::Integer(0)),
        ("i64 max", Value::Integer(i64::MAX)),
        ("i64 min", Value::Integer(i64::MIN)),
        ("nan", f(f64::NAN)),
        ("inf", f(f64::INFINITY)),
        ("-inf", f(f64::NEG_INFINITY)),
        ("5e-324", f(5e-324)),
        ("string", Value::String("ten".into())),
        ("bool", Value::Boolean(true)),
        (
            "array",
            Value::Array(vec![Value::Integer(1), Value::Integer(2)]),
        ),
        ("table", Value::Table(toml::Table::new())),
    ]
}

fn toml_text(t: &toml::Table) -> Vec<u8> {
    toml::to_string(t).unwrap().into_bytes()
}

fn device_case(label: String, text: Vec<u8>, token: &str, cmd: &str) -> Case {
    Case {
        label,
        files: vec![("dev.toml".into(), text)],
        args: vec![cmd.into(), "{dir}/dev.toml".into()],
        token: token.into(),
    }
}

/// Every generated input.
fn cases() -> Vec<Case> {
    let mut v = Vec::new();
    let keys = gatehold::device::known_keys();
    let numeric: Vec<String> = keys
        .iter()
        .filter(|k| gatehold::device::limit_of(k).is_some())
        .cloned()
        .chain([
            "doping.channel_cm3".into(),
            "doping.junction_offset_nm".into(),
        ])
        .collect();
    // 1. Every numeric key of the key table x hostile values x architectures,
    //    validated (`check`) and, for a third of them, `lambda`.
    for arch in ARCHS {
        let base = base_device(arch);
        for key in &numeric {
            let key = key.replace(".N.", ".1.");
            for (k, (name, val)) in hostile_values().into_iter().enumerate() {
                let mut t = base.clone();
                set(&mut t, &key, val);
                let cmd = if k % 3 == 0 { "lambda" } else { "check" };
                v.push(device_case(
                    format!("{arch}: {key} = {name} ({cmd})"),
                    toml_text(&t),
                    &key,
                    cmd,
                ));
            }
        }
        // 2. Every string key with wrong or unknown values.
        for key in [
            "name",
            "architecture",
            "polarity",
            "geometry.spacer",
            "geometry.box_material",
            "geometry.cap_material",
            "gate_stack.0.material",
        ] {
            for (name, val) in [
                ("number", Value::Integer(7)),
                ("unknown", Value::String("unobtainium".into())),
                ("empty", Value::String(String::new())),
                ("control", Value::String("\u{0}\u{7}\u{1b}[2J".into())),
                ("long", Value::String("x".repeat(100_000))),
            ] {
                let mut t = base.clone();
                set(&mut t, key, val);
                v.push(device_case(
                    format!("{arch}: {key} = {name}"),
                    toml_text(&t),
                    key,
                    "check",
                ));
            }
        }
        // 3. Missing keys (required ones must be refused naming the key).
        for key in &keys {
            if key.contains(".N.") || !keys.iter().any(|k| k == key) {
                continue;
            }
            let mut t = base.clone();
            remove(&mut t, key);
            v.push(device_case(
                format!("{arch}: without {key}"),
                toml_text(&t),
                key,
                "check",
            ));
        }
        // 4. Unknown and misspelt keys.
        for (k, key) in keys.iter().enumerate().filter(|(k, _)| k % 2 == 0) {
            if key.contains(".N.") {
                continue;
            }
            let mut t = base.clone();
            let bad = if k % 4 == 0 {
                format!("{key}x")
            } else {
                key.replacen('_', "", 1)
            };
            if keys.contains(&bad) {
                continue;
            }
            set(&mut t, &bad, Value::Integer(1));
            v.push(device_case(
                format!("{arch}: unknown key {bad}"),
                toml_text(&t),
                &bad,
                "check",
            ));
        }
        // 5. Layers: none, empty, both material and permittivity, 10,000 of them.
        for (name, layers) in [
            ("no layer", Value::Array(vec![])),
            (
                "empty layer",
                Value::Array(vec![Value::Table(toml::Table::new())]),
            ),
            ("not a table", Value::Array(vec![Value::Integer(3)])),
            ("a table", Value::Table(toml::Table::new())),
            (
                "10000 layers",
                Value::Array(
                    (0..10_000)
                        .map(|_| {
                            let mut l = toml::Table::new();
                            l.insert("material".into(), Value::String("SiO2".into()));
                            l.insert("thickness_nm".into(), Value::Float(0.1));
                            Value::Table(l)
                        })
                        .collect(),
                ),
            ),
        ] {
            let mut t = base.clone();
            t.insert("gate_stack".into(), layers);
            v.push(device_case(
                format!("{arch}: gate_stack {name}"),
                toml_text(&t),
                "gate_stack",
                "check",
            ));
        }
    }
    // 6. Text that is not a device file.
    let dg = String::from_utf8(toml_text(&base_device("double-gate"))).unwrap();
    let mut seed = 0x2545_f491_4f6c_dd1du64;
    let mut rnd = move || {
        seed ^= seed << 13;
        seed ^= seed >> 7;
        seed ^= seed << 17;
        seed
    };
    for cut in (1..dg.len()).step_by(23) {
        v.push(device_case(
            format!("truncated at {cut}"),
            dg.as_bytes()[..cut].to_vec(),
            "dev.toml",
            "check",
        ));
    }
    for k in 0..60 {
        let n = (rnd() % 4000) as usize + 1;
        let bytes: Vec<u8> = if k % 2 == 0 {
            (0..n).map(|_| rnd() as u8).collect()
        } else {
            (0..n)
                .map(|_| b"[]=\".#\n azAZ09_-{},"[(rnd() % 19) as usize])
                .collect()
        };
        v.push(device_case(
            format!("garbage {k}"),
            bytes,
            "dev.toml",
            "check",
        ));
    }
    // 7. Files that are not regular or are too big, for every file-reading command.
    for cmd in ["run", "lambda", "check", "scan", "sweep", "merge", "plot"] {
        for (name, path) in [
            ("/dev/zero", "/dev/zero".to_string()),
            ("/dev/urandom", "/dev/urandom".to_string()),
            ("a folder", "{dir}".to_string()),
            ("missing", "{dir}/missing.toml".to_string()),
            ("2 MiB", "{dir}/big.toml".to_string()),
        ] {
            let mut args = vec![cmd.to_string(), path.clone()];
            match cmd {
                "scan" => args.extend(["--lengths".into(), "20".into()]),
                "sweep" | "merge" | "plot" => args.extend(["--out".into(), "{dir}/o.h5".into()]),
                _ => {}
            }
            let token = path.replace("{dir}/", "").replace("{dir}", "");
            v.push(Case {
                label: format!("{cmd} on {name}"),
                files: vec![("big.toml".into(), b"# x\n".repeat(600_000))],
                args,
                token: if token.is_empty() {
                    "not a regular file".into()
                } else {
                    token
                },
            });
        }
    }
    // 8. Plan files.
    let base_file = ("dev.toml".to_string(), dg.clone().into_bytes());
    let plan = |label: String, text: String, token: &str| Case {
        label,
        files: vec![base_file.clone(), ("plan.toml".into(), text.into_bytes())],
        args: vec!["check".into(), "--plan".into(), "{dir}/plan.toml".into()],
        token: token.into(),
    };
    for key in &numeric {
        let key = key.replace(".N.", ".1.");
        for (name, val) in hostile_values() {
            let mut axes = toml::Table::new();
            axes.insert(key.clone(), Value::Array(vec![Value::Integer(20), val]));
            let mut root = toml::Table::new();
            root.insert("base".into(), Value::String("dev.toml".into()));
            root.insert("axes".into(), Value::Table(axes));
            v.push(plan(
                format!("plan axis {key} = [20, {name}]"),
                toml::to_string(&root).unwrap(),
                &key,
            ));
        }
    }
    for (label, text, token) in [
        ("no base", "[axes]\n\"geometry.gate_length_nm\" = [20]\n".to_string(), "base"),
        ("base /dev/zero", "base = \"/dev/zero\"\n".to_string(), "/dev/zero"),
        ("base /dev/urandom", "base = \"/dev/urandom\"\n".to_string(), "/dev/urandom"),
        ("base folder", "base = \".\"\n".to_string(), "not a regular file"),
        ("base missing", "base = \"nope.toml\"\n".to_string(), "nope.toml"),
        ("base number", "base = 3\n".to_string(), "base"),
        ("base itself", "base = \"plan.toml\"\n".to_string(), "plan.toml"),
        ("base with unknown key", "base = \"plan.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [20]\n".to_string(), "plan.toml"),
        ("unknown top key", "base = \"dev.toml\"\naxis = 1\n".to_string(), "axis"),
        ("unknown axis", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_lenght_nm\" = [20]\n".to_string(), "gate_lenght_nm"),
        ("empty axis", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = []\n".to_string(), "geometry.gate_length_nm"),
        ("step 0", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, step = 0 }\n".to_string(), "step"),
        ("step away", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, step = -1 }\n".to_string(), "step"),
        ("step tiny", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, step = 1e-300 }\n".to_string(), "step"),
        ("range nan", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = nan, stop = 20, step = 1 }\n".to_string(), "start"),
        ("range inf", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = inf, step = 1 }\n".to_string(), "stop"),
        ("range missing", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10 }\n".to_string(), "stop"),
        ("range extra", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, step = 1, by = 2 }\n".to_string(), "by"),
        ("huge product", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = { start = 10, stop = 20, step = 0.01 }\n\"gate.workfunction_eV\" = { start = 4.0, stop = 5.0, step = 0.001 }\n\"geometry.body_thickness_nm\" = { start = 5, stop = 10, step = 0.001 }\n".to_string(), "points"),
        ("mixed axis", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [10, \"x\"]\n".to_string(), "geometry.gate_length_nm"),
        ("zip mismatch", "base = \"dev.toml\"\n[zip]\n\"geometry.gate_length_nm\" = [10, 20]\n\"gate.workfunction_eV\" = [4.5]\n".to_string(), "zip"),
        ("zip and axes", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [10]\n[zip]\n\"geometry.gate_length_nm\" = [10]\n".to_string(), "geometry.gate_length_nm"),
        ("layer 5", "base = \"dev.toml\"\n[axes]\n\"gate_stack.5.thickness_nm\" = [1]\n".to_string(), "gate_stack.5"),
        ("layer -1", "base = \"dev.toml\"\n[axes]\n\"gate_stack.-1.thickness_nm\" = [1]\n".to_string(), "gate_stack"),
        ("maps out of range", "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [10]\n[output]\nmaps = [5]\n".to_string(), "output.maps"),
        ("maps negative", "base = \"dev.toml\"\n[output]\nmaps = [-1]\n".to_string(), "output.maps"),
        ("maps text", "base = \"dev.toml\"\n[output]\nmaps = \"some\"\n".to_string(), "output.maps"),
        ("criteria nan", "base = \"dev.toml\"\n[criteria]\ndibl_max_mV_per_V = nan\n".to_string(), "criteria.dibl_max_mV_per_V"),
        ("criteria negative", "base = \"dev.toml\"\n[criteria]\nss_max_mV_per_dec = -1\n".to_string(), "criteria.ss_max_mV_per_dec"),
        ("criteria unknown", "base = \"dev.toml\"\n[criteria]\nion_min = 1\n".to_string(), "criteria.ion_min"),
        ("criteria text", "base = \"dev.toml\"\n[criteria]\nvt_rolloff_max_mV = \"x\"\n".to_string(), "criteria.vt_rolloff_max_mV"),
        ("architecture axis", "base = \"dev.toml\"\n[axes]\narchitecture = [\"double-gate\", \"quad-gate\"]\n".to_string(), "architecture"),
        ("inline base bad", "[base]\nname = 1\n".to_string(), "name"),
        ("syntax", "base = \"dev.toml\"\n[axes\n".to_string(), "plan"),
    ] {
        v.push(plan(format!("plan: {label}"), text, token));
    }
    // 9. Command lines: options with hostile values.
    let dev = |extra: &[&str]| -> Vec<String> { extra.iter().map(|s| s.to_string()).collect() };
    for jobs in [
        "0",
        "-1",
        "99999999999",
        "18446744073709551616",
        "abc",
        "1.5",
        "",
    ] {
        for cmd in ["scan", "sweep", "demo"] {
            let mut args = match cmd {
                "scan" => dev(&["scan", "{dir}/dev.toml", "--lengths", "20"]),
                "sweep" => dev(&["sweep", "{dir}/plan.toml", "--out", "{dir}/o.h5", "--quiet"]),
                _ => dev(&["demo", "--out", "{dir}/demo", "--lengths", "0.01"]),
            };
            args.push(format!("--jobs={jobs}"));
            v.push(Case {
                label: format!("{cmd} --jobs={jobs}"),
                files: vec![
                    base_file.clone(),
                    (
                        "plan.toml".into(),
                        b"base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [25]\n"
                            .to_vec(),
                    ),
                ],
                args,
                // The demo's 0.01 nm length is refused naming the gate length.
                token: if cmd == "demo" && jobs.parse::<u64>().is_ok() {
                    "length".into()
                } else {
                    "jobs".into()
                },
            });
        }
    }
    let many: Vec<String> = (0..5000).map(|k| (20 + k).to_string()).collect();
    for lengths in [
        "nan",
        "inf",
        "-inf",
        "1e300",
        "1e-300",
        "0",
        "-0",
        "-5",
        "",
        ",",
        "20,,30",
        "x",
        "1e6",
        "100001",
        "20,30,20",
        &vec!["20"; 5000].join(","),
        &many.join(","),
    ] {
        v.push(Case {
            label: format!("scan --lengths={}", &lengths[..lengths.len().min(20)]),
            files: vec![base_file.clone()],
            args: dev(&["scan", "{dir}/dev.toml", &format!("--lengths={lengths}")]),
            token: "length".into(),
        });
    }
    for shard in [
        "-1/2",
        "2/2",
        "0/0",
        "1",
        "a/b",
        "1/",
        "/2",
        "0/18446744073709551616",
        "99999999999999999999/1",
        " 0/2",
        "0/2/3",
    ] {
        v.push(Case {
            label: format!("sweep --shard={shard}"),
            files: vec![
                base_file.clone(),
                ("plan.toml".into(), b"base = \"dev.toml\"\n".to_vec()),
            ],
            args: dev(&[
                "sweep",
                "{dir}/plan.toml",
                "--out",
                "{dir}/o.h5",
                &format!("--shard={shard}"),
            ]),
            token: "shard".into(),
        });
    }
    for args in [
        vec!["frobnicate"],
        vec!["run"],
        vec!["run", "--no-such-option", "x.toml"],
        vec!["template", "quad-gate"],
        vec!["template", ""],
        vec!["demo", "--dibl-max=nan"],
        vec!["demo", "--ss-max=-1"],
        vec!["demo", "--lengths=1e300"],
        vec!["sweep", "{dir}/plan.toml"],
        vec!["merge", "--out", "{dir}/o.h5"],
    ] {
        v.push(Case {
            label: format!("command line {}", args.join(" ")),
            files: vec![],
            args: dev(&args),
            token: match args[..] {
                ["frobnicate"] => "frobnicate",
                ["run"] => "DEVICE",
                ["run", ..] => "no-such-option",
                ["template", ..] => "architecture",
                ["demo", "--dibl-max=nan"] => "dibl",
                ["demo", "--ss-max=-1"] => "ss",
                ["demo", ..] => "length",
                ["sweep", ..] => "--out",
                _ => "PARTS",
            }
            .into(),
        });
    }
    // 10. Sweep files that are not sweep files (merge and plot).
    let not_h5: Vec<(&str, Vec<u8>)> = vec![
        ("text", b"hello".to_vec()),
        ("hdf5 signature only", b"\x89HDF\r\n\x1a\n".to_vec()),
        (
            "hdf5 signature and zeros",
            [b"\x89HDF\r\n\x1a\n".to_vec(), vec![0u8; 4096]].concat(),
        ),
        (
            "hdf5 signature and garbage",
            [
                b"\x89HDF\r\n\x1a\n".to_vec(),
                (0..4096).map(|_| rnd() as u8).collect(),
            ]
            .concat(),
        ),
        ("empty", vec![]),
    ];
    for (name, bytes) in not_h5 {
        for cmd in ["merge", "plot"] {
            v.push(Case {
                label: format!("{cmd} a file that is {name}"),
                files: vec![("part.h5".into(), bytes.clone())],
                args: dev(&[cmd, "{dir}/part.h5", "--out", "{dir}/out"]),
                token: "part.h5".into(),
            });
        }
    }
    // 11. Damaged sweep files: a real one truncated and with bytes flipped.
    let real = real_sweep_file();
    for k in 1..40 {
        let cut = real.len() * k / 40;
        v.push(Case {
            label: format!("merge a sweep file cut at {cut} of {} bytes", real.len()),
            files: vec![("part.h5".into(), real[..cut].to_vec())],
            args: dev(&["merge", "{dir}/part.h5", "--out", "{dir}/out.h5"]),
            token: "part.h5".into(),
        });
    }
    for k in 0..120 {
        let mut bytes = real.clone();
        for _ in 0..(1 + k % 4) {
            let at = (rnd() as usize) % bytes.len();
            bytes[at] ^= (rnd() as u8) | 1;
        }
        let cmd = if k % 2 == 0 { "merge" } else { "plot" };
        v.push(Case {
            label: format!("{cmd} a sweep file with flipped bytes ({k})"),
            files: vec![("part.h5".into(), bytes)],
            args: dev(&[cmd, "{dir}/part.h5", "--out", "{dir}/out.h5"]),
            token: "part.h5".into(),
        });
    }
    v
}

/// A small real sweep file (two tiny double-gate points), written once.
fn real_sweep_file() -> Vec<u8> {
    static F: std::sync::OnceLock<Vec<u8>> = std::sync::OnceLock::new();
    F.get_or_init(|| {
        let d = tempfile::tempdir().unwrap();
        let mut t = base_device("double-gate");
        set(&mut t, "geometry.body_thickness_nm", Value::Integer(5));
        set(&mut t, "geometry.source_drain_length_nm", Value::Integer(8));
        set(&mut t, "geometry.gate_height_nm", Value::Integer(5));
        std::fs::write(d.path().join("dev.toml"), toml_text(&t)).unwrap();
        std::fs::write(
            d.path().join("plan.toml"),
            "base = \"dev.toml\"\n[axes]\n\"geometry.gate_length_nm\" = [15, 20]\n[output]\nmaps = [0]\n",
        )
        .unwrap();
        let st = Command::new(BIN)
            .args(["sweep", "plan.toml", "--out", "s.h5", "--quiet"])
            .current_dir(d.path())
            .status()
            .unwrap();
        assert!(st.code().is_some_and(|c| c == 0 || c == 2), "{st}");
        std::fs::read(d.path().join("s.h5")).unwrap()
    })
    .clone()
}

/// Runs one case; returns (exit code or None on time-out, stderr).
fn run_case(case: &Case, dir: &Path) -> (Option<i32>, String) {
    for (name, bytes) in &case.files {
        std::fs::write(dir.join(name), bytes).unwrap();
    }
    let d = dir.display().to_string();
    let args: Vec<String> = case.args.iter().map(|a| a.replace("{dir}", &d)).collect();
    let err_path = dir.join("stderr.txt");
    let mut child = Command::new(BIN)
        .args(&args)
        .current_dir(dir)
        .stdin(Stdio::null())
        .stdout(Stdio::null())
        .stderr(std::fs::File::create(&err_path).unwrap())
        .spawn()
        .unwrap();
    let t = Instant::now();
    let code = loop {
        if let Some(st) = child.try_wait().unwrap() {
            break Some(st.code().unwrap_or(-1));
        }
        if t.elapsed() > TIMEOUT {
            let _ = child.kill();
            let _ = child.wait();
            break None;
        }
        std::thread::sleep(Duration::from_millis(5));
    };
    let stderr = std::fs::read_to_string(&err_path).unwrap_or_default();
    (code, stderr)
}

fn fuzz(every: usize) -> Counts {
    let all = cases();
    let chosen: Vec<&Case> = all.iter().step_by(every).collect();
    let root = tempfile::tempdir().unwrap();
    let counts = std::sync::Mutex::new(Counts::default());
    let next = std::sync::atomic::AtomicUsize::new(0);
    let t0 = Instant::now();
    std::thread::scope(|s| {
        for w in 0..2 {
            let (chosen, counts, next, root) = (&chosen, &counts, &next, root.path());
            s.spawn(move || loop {
                let k = next.fetch_add(1, std::sync::atomic::Ordering::SeqCst);
                let Some(case) = chosen.get(k) else { break };
                let dir: PathBuf = root.join(format!("w{w}-{k}"));
                std::fs::create_dir_all(&dir).unwrap();
                let (code, stderr) = run_case(case, &dir);
                let _ = std::fs::remove_dir_all(&dir);
                let first = stderr
                    .lines()
                    .find(|l| l.contains("error"))
                    .unwrap_or("")
                    .to_string();
                let what = format!(
                    "{}: {:?} {}",
                    case.label,
                    code,
                    &first[..first.len().min(300)]
                );
                let mut c = counts.lock().unwrap();
                match code {
                    None => c.timeouts.push(what),
                    Some(101) => c.panics.push(what),
                    _ if stderr.contains("panicked") => c.panics.push(what),
                    Some(0) | Some(2) => c.accepted += 1,
                    Some(1) | Some(64) => {
                        let lower = stderr.to_lowercase();
                        if stderr.contains("error") && lower.contains(&case.token.to_lowercase()) {
                            c.refused += 1;
                        } else {
                            c.unnamed
                                .push(format!("{what} (expected it to name `{}`)", case.token));
                        }
                    }
                    Some(_) => c.other.push(what),
                }
            });
        }
    });
    let c = counts.into_inner().unwrap();
    println!(
        "fuzz: {} inputs in {:.0} s: {} refused with a named error, {} accepted, {} panics, {} time-outs, {} unnamed refusals, {} other",
        chosen.len(),
        t0.elapsed().as_secs_f64(),
        c.refused,
        c.accepted,
        c.panics.len(),
        c.timeouts.len(),
        c.unnamed.len(),
        c.other.len()
    );
    for (kind, list) in [
        ("PANIC", &c.panics),
        ("TIMEOUT", &c.timeouts),
        ("UNNAMED", &c.unnamed),
        ("OTHER", &c.other),
    ] {
        for w in list {
            println!("{kind} {w}");
        }
    }
    c
}

/// The full fuzz run: at least 2,000 inputs, no panic, no time-out, every refusal named.
#[test]
#[ignore = "about 5,000 inputs, a few minutes: cargo test --release --test fuzz -- --ignored --nocapture"]
fn fuzz_full() {
    let c = fuzz(1);
    assert!(c.refused + c.accepted + c.failures() >= 2000);
    assert_eq!(c.failures(), 0, "{c:#?}");
}

/// A fixed sample of about 100 of the same inputs, in the normal suite.
#[test]
fn fuzz_sample() {
    let n = cases().len();
    let c = fuzz(n / 100);
    assert!(c.refused + c.accepted >= 90);
    assert_eq!(c.failures(), 0, "{c:#?}");
}
