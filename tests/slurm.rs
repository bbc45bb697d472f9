//! The documented Slurm recipe, run on a real Slurm.
//!
//! Starts a single-node cluster on localhost (munged, slurmctld and slurmd
//! with a generated `slurm.conf`, everything in a temporary folder, on ports
//! of its own), extracts the job-array script and the merge command from
//! `docs/hdf5-schema.md` (so the documentation is what gets tested), submits
//! them on a small plan (tiny double-gate devices, a few gate lengths),
//! waits, and compares the merged file with the unsharded run point for
//! point. The daemons it started are stopped by their process ids.
//!
//! Needs Debian's `slurm-wlm` and `munge`: when they are missing and the test
//! runs as root with apt-get, it installs them; otherwise it is skipped with
//! the reason printed, except under `CI=true`, where it is required.
//!
//!     cargo test --release --test slurm -- --nocapture

mod common;

use std::path::{Path, PathBuf};
use std::process::{Child, Command, Stdio};
use std::time::{Duration, Instant};

use gatehold::io::hdf5::read_sweep;

const DEVICE: &str = common::TINY_DG;

/// Five points over three shards (shards of 2, 2 and 1 points).
const PLAN: &str = r#"base = "dev.toml"
[axes]
"geometry.gate_length_nm" = [10, 12, 15, 20, 30]
"#;

const TOOLS: [&str; 5] = ["munged", "slurmctld", "slurmd", "sbatch", "squeue"];

fn have_tools() -> bool {
    TOOLS.iter().all(|t| {
        ["/usr/sbin", "/usr/bin", "/sbin", "/bin"]
            .iter()
            .any(|d| Path::new(d).join(t).exists())
    })
}

fn is_root() -> bool {
    Command::new("id")
        .arg("-u")
        .output()
        .is_ok_and(|o| String::from_utf8_lossy(&o.stdout).trim() == "0")
}

/// Installs slurm-wlm and munge from Debian's packages (quiet).
fn install() -> Result<(), String> {
    for args in [
        vec!["update", "-qq"],
        vec![
            "install",
            "-y",
            "-qq",
            "--no-install-recommends",
            "slurm-wlm",
            "munge",
        ],
    ] {
        let st = Command::new("apt-get")
            .args(&args)
            .env("DEBIAN_FRONTEND", "noninteractive")
            .stdout(Stdio::null())
            .status()
            .map_err(|e| format!("apt-get: {e}"))?;
        if !st.success() {
            return Err(format!("apt-get {} failed: {st}", args.join(" ")));
        }
    }
    Ok(())
}

/// Daemons this test started; stopped by process id when dropped (also on failure).
struct Daemons(Vec<(&'static str, Child)>);

impl Drop for Daemons {
    fn drop(&mut self) {
        for (name, child) in self.0.iter_mut().rev() {
            let pid = child.id();
            let _ = Command::new("kill")
                .args(["-TERM", &pid.to_string()])
                .status();
            let t = Instant::now();
            while child.try_wait().ok().flatten().is_none() && t.elapsed().as_secs() < 10 {
                std::thread::sleep(Duration::from_millis(50));
            }
            if child.try_wait().ok().flatten().is_none() {
                let _ = child.kill();
            }
            let _ = child.wait();
            println!("stopped {name} (pid {pid})");
        }
    }
}

fn wait_for(what: &str, secs: u64, mut done: impl FnMut() -> bool) {
    let t = Instant::now();
    while !done() {
        assert!(
            t.elapsed().as_secs() < secs,
            "{what}: not done after {secs} s"
        );
        std::thread::sleep(Duration::from_millis(200));
    }
}

/// The fenced `sh` block of `doc` whose text contains `marker`.
fn doc_block(doc: &str, marker: &str) -> String {
    doc.split("```sh\n")
        .skip(1)
        .map(|b| b.split("```").next().unwrap_or(""))
        .find(|b| b.contains(marker))
        .unwrap_or_else(|| panic!("no ```sh block containing {marker:?} in docs/hdf5-schema.md"))
        .to_string()
}

fn slurm_conf(dir: &Path, host: &str, port: u16, cpus: usize) -> String {
    let d = dir.display();
    format!(
        "ClusterName=gatehold-test
SlurmctldHost={host}(127.0.0.1)
SlurmctldPort={port}
SlurmdPort={}
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket={d}/munge.socket
SlurmUser=root
SlurmdUser=root
StateSaveLocation={d}/state
SlurmdSpoolDir={d}/spool
SlurmctldPidFile={d}/slurmctld.pid
SlurmdPidFile={d}/slurmd.pid
SlurmctldLogFile={d}/slurmctld.log
SlurmdLogFile={d}/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/builtin
ReturnToService=2
MpiDefault=none
JobCompType=jobcomp/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
NodeName={host} NodeAddr=127.0.0.1 CPUs={cpus} RealMemory=1000 State=UNKNOWN
PartitionName=debug Nodes={host} Default=YES MaxTime=INFINITE State=UP
",
        port + 1
    )
}

#[test]
fn the_documented_job_array_runs_on_a_real_slurm_and_merges_to_the_unsharded_file() {
    let ci = std::env::var("CI").is_ok_and(|v| v == "true");
    if !have_tools() {
        let can_install = is_root() && Path::new("/usr/bin/apt-get").exists();
        if can_install {
            if let Err(e) = install() {
                assert!(
                    !ci,
                    "CI=true and slurm-wlm/munge could not be installed: {e}"
                );
                println!("SKIP: slurm-wlm/munge could not be installed: {e}");
                return;
            }
        } else {
            assert!(
                !ci,
                "CI=true and slurm-wlm/munge are missing (not root with apt-get to install them)"
            );
            println!("SKIP: slurm-wlm and munge are not installed and this is not root with apt-get (install them with `apt-get install slurm-wlm munge` as root)");
            return;
        }
    }
    let t0 = Instant::now();
    let tmp = tempfile::Builder::new()
        .prefix("gh-slurm")
        .tempdir()
        .unwrap();
    let d = tmp.path().to_path_buf();
    use std::os::unix::fs::PermissionsExt;
    // munged wants its socket folder searchable by all, its key private.
    std::fs::set_permissions(&d, std::fs::Permissions::from_mode(0o711)).unwrap();
    let mut key = vec![0u8; 1024];
    {
        use std::io::Read;
        std::fs::File::open("/dev/urandom")
            .unwrap()
            .read_exact(&mut key)
            .unwrap();
    }
    std::fs::write(d.join("munge.key"), &key).unwrap();
    std::fs::set_permissions(d.join("munge.key"), std::fs::Permissions::from_mode(0o600)).unwrap();
    for sub in ["state", "spool", "work/logs", "work/parts"] {
        std::fs::create_dir_all(d.join(sub)).unwrap();
    }
    let host = String::from_utf8(Command::new("hostname").arg("-s").output().unwrap().stdout)
        .unwrap()
        .trim()
        .to_string();
    // Ports of this run's own (away from the default 6817/6818).
    let port = 20_000 + (std::process::id() % 20_000) as u16 * 2;
    let cpus = std::thread::available_parallelism().map_or(1, |n| n.get());
    let conf = d.join("slurm.conf");
    std::fs::write(&conf, slurm_conf(&d, &host, port, cpus)).unwrap();

    let log = |name: &str| std::fs::File::create(d.join(name)).unwrap();
    let mut daemons = Daemons(Vec::new());
    let munged = Command::new("munged")
        .arg("-F")
        .arg("--force")
        .arg(format!("--socket={}", d.join("munge.socket").display()))
        .arg(format!("--key-file={}", d.join("munge.key").display()))
        .arg(format!("--pid-file={}", d.join("munged.pid").display()))
        .arg(format!("--log-file={}", d.join("munged.log").display()))
        .arg(format!("--seed-file={}", d.join("munged.seed").display()))
        .stdout(log("munged.out"))
        .stderr(log("munged.err"))
        .spawn()
        .expect("munged starts");
    daemons.0.push(("munged", munged));
    wait_for("munged socket", 30, || d.join("munge.socket").exists());
    for (name, args) in [
        ("slurmctld", vec!["-D", "-i", "-f"]),
        ("slurmd", vec!["-D", "-f"]),
    ] {
        let child = Command::new(name)
            .args(&args)
            .arg(&conf)
            .stdout(log(&format!("{name}.out")))
            .stderr(log(&format!("{name}.err")))
            .spawn()
            .unwrap_or_else(|e| panic!("{name} starts: {e}"));
        daemons.0.push((name, child));
    }
    let slurm = |prog: &str| {
        let mut c = Command::new(prog);
        c.env("SLURM_CONF", &conf);
        c
    };
    wait_for("the node to be idle", 60, || {
        slurm("sinfo")
            .args(["-h", "-o", "%t"])
            .output()
            .is_ok_and(|o| String::from_utf8_lossy(&o.stdout).trim() == "idle")
    });
    println!("cluster up in {:.1} s", t0.elapsed().as_secs_f64());

    // The plan, the documented script and the documented merge.
    let work = d.join("work");
    std::fs::write(work.join("dev.toml"), DEVICE).unwrap();
    std::fs::write(work.join("plan.toml"), PLAN).unwrap();
    let doc =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/hdf5-schema.md"))
            .unwrap();
    let script = doc_block(&doc, "#SBATCH --array");
    assert!(script.starts_with("#!/bin/bash"), "{script}");
    std::fs::write(work.join("sweep.sh"), &script).unwrap();
    let merge_cmd = doc_block(&doc, "--dependency=afterany");
    let bin_dir: PathBuf = Path::new(env!("CARGO_BIN_EXE_gatehold"))
        .parent()
        .unwrap()
        .to_path_buf();
    let path = format!(
        "{}:{}",
        bin_dir.display(),
        std::env::var("PATH").unwrap_or_default()
    );
    // Three shards of one CPU each (the options override the #SBATCH lines).
    let out = slurm("sbatch")
        .args([
            "--parsable",
            "--array=0-2",
            "--cpus-per-task=1",
            "--time=00:10:00",
            "sweep.sh",
        ])
        .current_dir(&work)
        .env("PATH", &path)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "sbatch: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let array_id = String::from_utf8(out.stdout).unwrap().trim().to_string();
    let merge_cmd = merge_cmd.replace("<array job id>", &array_id);
    let out = Command::new("bash")
        .arg("-c")
        .arg(&merge_cmd)
        .current_dir(&work)
        .env("PATH", &path)
        .env("SLURM_CONF", &conf)
        .output()
        .unwrap();
    let said = String::from_utf8_lossy(&out.stdout).to_string();
    assert!(
        out.status.success() && said.contains("Submitted batch job"),
        "merge submission: {said} {}",
        String::from_utf8_lossy(&out.stderr)
    );
    wait_for("the array and the merge job", 600, || {
        slurm("squeue")
            .args(["-h", "-o", "%i"])
            .output()
            .is_ok_and(|o| o.status.success() && o.stdout.iter().all(u8::is_ascii_whitespace))
    });
    let slurm_s = t0.elapsed().as_secs_f64();

    // The shards' logs, the merged file, the figures.
    for k in 0..3 {
        assert!(
            work.join(format!("parts/part-{k}.h5")).exists(),
            "shard {k} wrote no file; its log: {}",
            std::fs::read_to_string(work.join(format!("logs/gatehold-sweep-{k}.out")))
                .unwrap_or_default()
        );
    }
    let merged_path = work.join("results.h5");
    assert!(
        merged_path.exists(),
        "no merged file; slurmctld log:\n{}",
        std::fs::read_to_string(d.join("slurmctld.log")).unwrap_or_default()
    );
    let merged = read_sweep(&merged_path).unwrap();
    assert!(merged.is_complete());
    assert_eq!((merged.meta.shard_index, merged.meta.shard_count), (0, 1));
    assert!(std::fs::read_dir(work.join("figures")).unwrap().count() > 0);

    // The unsharded run of the same plan, point for point.
    let whole_path = work.join("whole.h5");
    let st = Command::new(env!("CARGO_BIN_EXE_gatehold"))
        .args(["sweep", "plan.toml", "--out", "whole.h5", "--quiet"])
        .current_dir(&work)
        .status()
        .unwrap();
    assert_eq!(st.code(), Some(0));
    let whole = read_sweep(&whole_path).unwrap();
    assert_eq!(merged.axes, whole.axes);
    assert_eq!(merged.figures, whole.figures);
    assert_eq!(merged.meta.inputs, whole.meta.inputs);
    assert_eq!(merged.rows.len(), 5);
    for (a, b) in merged.rows.iter().zip(&whole.rows) {
        let (mut a, mut b) = (a.clone(), b.clone());
        a.elapsed_s = 0.0;
        b.elapsed_s = 0.0;
        assert_eq!(
            a, b,
            "point {} differs between the Slurm shards and the unsharded run",
            a.index
        );
    }
    println!(
        "slurm: cluster start, 3-task array, merge and plot in {slurm_s:.1} s; whole test {:.1} s",
        t0.elapsed().as_secs_f64()
    );
    drop(daemons);
}
