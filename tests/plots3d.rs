//! The 3D fin figures (cross-section at the barrier, along-channel slice
//! through the leakiest line, band edge along it), asserted on their
//! descriptions built from real 3D solves on small coarse meshes, and the
//! files written by the library and by `gatehold run --plots`.
//!
//! Run: `cargo test --release --test plots3d`

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

use gatehold::device::{parse_device, Scenario};
use gatehold::evaluate::{evaluate_alone, DeviceSolution};
use gatehold::plot::fin::{fin_figures, FinFigures, Plane, Slice};
use gatehold::plot::map::Region;
use gatehold::progress::Silent;
use gatehold::structure::{BACK_PLANE, GATE};

/// A small fin or wire (6 x 10 nm body, 14 nm gate, coarse 3D mesh).
fn small(arch: &str, extra_geometry: &str) -> String {
    common::small_fin_text(arch, extra_geometry, 0.025)
}

fn solve(text: &str) -> (Scenario, DeviceSolution) {
    let s = parse_device(text).expect("test device");
    let ev = evaluate_alone(&s, &Silent).expect("3D solve");
    let sol = ev.solution_3d.expect("a fin is solved in 3D by default");
    (s, sol)
}

fn tri_gate() -> &'static (Scenario, DeviceSolution) {
    static S: OnceLock<(Scenario, DeviceSolution)> = OnceLock::new();
    S.get_or_init(|| solve(&small("tri-gate", "")))
}

fn figures() -> &'static FinFigures {
    static F: OnceLock<FinFigures> = OnceLock::new();
    F.get_or_init(|| fin_figures(&tri_gate().1, ""))
}

/// Whether (a, b) lies in (or on the edge of) a cell of region `r` of the slice.
fn in_region(s: &Slice, (a, b): (f64, f64), keep: &dyn Fn(Region) -> bool) -> bool {
    let (x, y) = (&s.map.x_nm, &s.map.y_nm);
    let nx = x.len();
    (0..y.len() - 1).any(|j| {
        (0..nx - 1).any(|i| {
            keep(s.regions[i + j * (nx - 1)])
                && x[i] - 1e-9 <= a
                && a <= x[i + 1] + 1e-9
                && y[j] - 1e-9 <= b
                && b <= y[j + 1] + 1e-9
        })
    })
}

/// The region of the slice cell whose centre is nearest (a, b).
fn region_at(s: &Slice, (a, b): (f64, f64)) -> Region {
    let (x, y) = (&s.map.x_nm, &s.map.y_nm);
    let nx = x.len();
    let i = (0..nx - 1).find(|&i| x[i] <= a && a <= x[i + 1]).unwrap();
    let j = (0..y.len() - 1)
        .find(|&j| y[j] <= b && b <= y[j + 1])
        .unwrap();
    s.regions[i + j * (nx - 1)]
}

#[test]
fn cross_section_lies_at_the_barrier_within_a_mesh_step() {
    // Common practice (a slice is the mesh plane nearest the asked position).
    let (_, sol) = tri_gate();
    let c = figures().cross_section.as_ref().expect("cross-section");
    let b = sol.barrier_sat.expect("converged off state at V_DS,sat");
    assert_eq!(c.plane, Plane::CrossSection);
    assert_eq!(c.target_nm, b.x_nm);
    assert!(c.step_nm > 0.0);
    assert!(
        (c.position_nm - b.x_nm).abs() <= 0.5 * c.step_nm + 1e-9,
        "slice at x = {} nm, barrier at {} nm, step {} nm",
        c.position_nm,
        b.x_nm,
        c.step_nm
    );
    assert_eq!(c.vds_v, sol.sat.vds_v);
    // The title names device, L_g, V_GS, V_DS and x of the slice.
    for part in [
        "small-tri-gate",
        "L_g = 14 nm",
        "V_GS = 0 V (off)",
        "V_DS = 0.8 V",
        &format!("x = {:.1} nm", c.position_nm),
    ] {
        assert!(c.title.contains(part), "{part:?} not in {:?}", c.title);
    }
    // Every node value is the 3D solution at that mesh x (the centre line
    // y = 0 against the problem directly).
    let p = &sol.structure.problem;
    let psi = sol.sat.off_psi.as_ref().unwrap();
    let ib = p.x.nodes.iter().position(|&x| x == c.position_nm).unwrap();
    let nxs = c.map.x_nm.len();
    let centre = c.map.x_nm.iter().position(|&y| y == 0.0).unwrap();
    for k in 0..p.nz {
        assert_eq!(c.psi_v[centre + k * nxs], psi[ib + p.nx * (p.ny * k)]);
    }
}

#[test]
fn mirrored_cross_section_is_symmetric() {
    // The structure is mirror-symmetric about y = 0 (DEVICE-FORMAT.md, fins
    // solved in 3D), so the full-width picture of the half must be too.
    let c = figures().cross_section.as_ref().unwrap();
    assert!(c.mirrored);
    let (y, z) = (&c.map.x_nm, &c.map.y_nm);
    let n = y.len();
    assert_eq!(n, 2 * tri_gate().1.structure.problem.ny - 1);
    for i in 0..n {
        assert_eq!(y[i], -y[n - 1 - i], "y nodes not antisymmetric at {i}");
    }
    for k in 0..z.len() {
        for i in 0..n {
            assert_eq!(c.psi_v[i + k * n], c.psi_v[n - 1 - i + k * n]);
        }
    }
    for k in 0..z.len() - 1 {
        for i in 0..n - 1 {
            assert_eq!(
                c.regions[i + k * (n - 1)],
                c.regions[n - 2 - i + k * (n - 1)]
            );
            assert_eq!(
                c.map.eps_r[i + k * (n - 1)],
                c.map.eps_r[n - 2 - i + k * (n - 1)]
            );
        }
    }
}

#[test]
fn leakiest_line_and_barrier_top_are_marked_in_silicon() {
    // Common practice (the leakiest path is a line of silicon nodes; the
    // extraction takes it over nodes that touch silicon).
    let f = figures();
    let (_, sol) = tri_gate();
    let b = sol.barrier_sat.unwrap();
    let si = |r: Region| r == Region::Silicon;
    let c = f.cross_section.as_ref().unwrap();
    assert!(!c.marks.is_empty());
    assert_eq!(c.marks[0].at, (b.y_nm, b.z_nm));
    for m in &c.marks {
        assert!(in_region(c, m.at, &si), "mark {:?} not in silicon", m.at);
    }
    let a = f.along_channel.as_ref().unwrap();
    assert_eq!(a.plane, Plane::AlongChannel);
    // The along-channel plane is the leakiest line's own mesh y.
    assert_eq!(a.position_nm, b.y_nm);
    assert_eq!(a.marks[0].at, (b.x_nm, b.z_nm));
    assert!(in_region(a, a.marks[0].at, &si));
    let line = a
        .guides
        .iter()
        .find(|g| g.label.starts_with("leakiest line"))
        .expect("leakiest line drawn");
    assert_eq!(line.segment[0].1, b.z_nm);
    assert_eq!(line.segment[1].1, b.z_nm);
    // Junctions at the doping profile's edges.
    let d = &sol.structure.doping;
    for (e, name) in [
        (d.source_edge, "source junction"),
        (d.drain_edge, "drain junction"),
    ] {
        let g = a.guides.iter().find(|g| g.label == name).expect(name);
        assert_eq!(g.segment[0].0, e);
    }
    // The described figures hold the marks and guides.
    let fig = a.figure().unwrap();
    assert_eq!(fig.marks, a.marks);
    assert_eq!(fig.guides, a.guides);
    assert!(fig.contacts.iter().any(|c| c.name == "source"));
    assert!(fig.contacts.iter().any(|c| c.name == "drain"));
}

#[test]
fn band_profile_maximum_is_the_reported_barrier() {
    // MODEL.md (extraction): the barrier is the maximum of the channel-carrier
    // band edge along the leakiest line.
    let (_, sol) = tri_gate();
    let band = figures().band.as_ref().expect("band figure");
    let r = &sol.report;
    assert_eq!(band.traces.len(), 2);
    for (t, want) in band.traces.iter().zip([r.barrier_lin_ev, r.barrier_sat_ev]) {
        let top = t
            .points
            .iter()
            .map(|p| p.1)
            .fold(f64::NEG_INFINITY, f64::max);
        let want = want.expect("reported barrier");
        assert!(
            (top - want).abs() < 1e-12,
            "{}: profile maximum {top} eV, reported {want} eV",
            t.label
        );
    }
    assert!(band.traces[0].label.starts_with("V_DS = 0.05 V"));
    assert!(band.traces[1].label.starts_with("V_DS = 0.8 V"));
    // Barrier lowering: the sat profile lies lower at its top.
    assert!(r.barrier_sat_ev.unwrap() < r.barrier_lin_ev.unwrap());
}

#[test]
fn regions_follow_the_tri_gate_geometry() {
    // Independent derivation from the device file: fin 6 x 10 nm centred on
    // y = 0 under 1 nm SiO2, gate metal around it, 8 nm buried oxide (eps
    // 3.9) under z = 10 nm and the back plane below.
    let c = figures().cross_section.as_ref().unwrap();
    let eps_box = 3.9;
    assert_eq!(region_at(c, (0.0, 5.0)), Region::Silicon);
    assert_eq!(region_at(c, (2.9, 0.1)), Region::Silicon);
    assert_eq!(region_at(c, (3.5, 5.0)), Region::GateStack(eps_box));
    assert_eq!(region_at(c, (0.0, -0.5)), Region::GateStack(eps_box));
    assert_eq!(region_at(c, (6.0, 5.0)), Region::Electrode(GATE));
    assert_eq!(region_at(c, (0.0, 14.0)), Region::BuriedOxide);
    assert_eq!(region_at(c, (7.0, 14.0)), Region::BuriedOxide);
    assert_eq!(
        region_at(c, (0.0, *c.map.y_nm.last().unwrap() - 0.1)),
        Region::Electrode(BACK_PLANE)
    );
    let fig = c.figure().unwrap();
    // Outlines on both fin faces and the stack's outer face, mirrored.
    for y in [-4.0, -3.0, 3.0, 4.0] {
        assert!(
            fig.outlines
                .iter()
                .any(|s| s[0].0 == y && s[1].0 == y && s[0].1 >= 0.0 && s[1].1 <= 10.0),
            "no outline at y = {y}"
        );
    }
    let names: Vec<&str> = fig.labels.iter().map(|l| l.text).collect();
    for n in ["gate", "buried oxide", "back plane"] {
        assert!(names.contains(&n), "{n} not labelled: {names:?}");
    }
    // Labels sit on their own region.
    for l in &fig.labels {
        let r = region_at(c, l.at);
        let ok = match l.text {
            "gate" => r == Region::Electrode(GATE),
            "buried oxide" => r == Region::BuriedOxide,
            "back plane" => r == Region::Electrode(BACK_PLANE),
            _ => true,
        };
        assert!(ok, "label {} at {:?} lies in {r:?}", l.text, l.at);
    }
    // No source or drain bar on a cross-section.
    assert!(fig.contacts.is_empty(), "{:?}", fig.contacts);
    assert_eq!(fig.x_desc, "y across the fin, 0 at its centre (nm)");
    assert_eq!(fig.value_desc, "potential (V)");
}

#[test]
fn capped_fin_shows_its_cap_and_a_wire_has_no_buried_oxide() {
    // Independent derivation from the device files: the cap sits on the fin
    // top (0 > z > -3 nm, |y| < 3 nm); a gate-all-around wire has gate
    // stack below it, no buried oxide.
    let (_, capped) = solve(&small(
        "capped-fin",
        "cap_thickness_nm = 3\ncap_material = \"Si3N4\"",
    ));
    let f = fin_figures(&capped, "_capped");
    let c = f.cross_section.as_ref().unwrap();
    assert_eq!(region_at(c, (0.0, -1.5)), Region::Cap);
    assert_eq!(region_at(c, (0.0, 5.0)), Region::Silicon);
    assert!(c.figure().unwrap().labels.iter().any(|l| l.text == "cap"));
    assert!(c.stem.ends_with("_capped"));
    let (_, wire) = solve(&small("gate-all-around", ""));
    let f = fin_figures(&wire, "");
    let c = f.cross_section.as_ref().unwrap();
    assert!(!c.regions.contains(&Region::BuriedOxide));
    assert_eq!(region_at(c, (0.0, 10.5)), Region::GateStack(3.9));
    assert_eq!(region_at(c, (0.0, 12.0)), Region::Electrode(GATE));
    let a = f.along_channel.as_ref().unwrap();
    // Under the wire, beside the gate: spacer; under the gate: stack.
    assert_eq!(region_at(a, (2.0, 10.5)), Region::Spacer);
    assert_eq!(region_at(a, (15.0, 10.5)), Region::GateStack(3.9));
}

#[test]
fn no_converged_off_state_gives_notes_not_files() {
    // Common practice (absent data is said, never drawn as an empty figure).
    let mut sol = tri_gate().1.clone();
    sol.lin.off_psi = None;
    sol.sat.off_psi = None;
    sol.barrier_lin = None;
    sol.barrier_sat = None;
    let f = fin_figures(&sol, "");
    assert!(f.cross_section.is_none() && f.along_channel.is_none() && f.band.is_none());
    assert!(f.iv.is_some());
    assert!(f.notes.iter().all(|n| n.expected));
    assert!(f
        .notes
        .iter()
        .any(|n| n.reason.contains("no converged off-state potential")));
    let dir = scratch("no-off-state");
    let out = gatehold::plot::fin_plots(&sol, &dir, "").unwrap();
    let names: Vec<String> = out
        .files
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names, ["iv.png", "iv.svg"]);
    assert!(out.figures_missing());
    // Only V_DS,sat missing: the maps fall back to V_DS,lin and say so.
    let mut sol = tri_gate().1.clone();
    sol.sat.off_psi = None;
    sol.barrier_sat = None;
    let f = fin_figures(&sol, "");
    let c = f.cross_section.unwrap();
    assert_eq!(c.vds_v, sol.lin.vds_v);
    assert!(c.title.contains("V_DS = 0.05 V"), "{}", c.title);
    assert_eq!(f.band.unwrap().traces.len(), 1);
}

fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(format!("plots3d-{name}"));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// Non-empty PNG (by its signature) or SVG (an svg element).
fn assert_image(path: &Path) {
    let bytes = std::fs::read(path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    assert!(
        bytes.len() > 1000,
        "{} is {} bytes",
        path.display(),
        bytes.len()
    );
    match path.extension().and_then(|e| e.to_str()) {
        Some("png") => assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n", "{}", path.display()),
        Some("svg") => assert!(String::from_utf8_lossy(&bytes).contains("<svg")),
        other => panic!("unexpected file {other:?}"),
    }
}

#[test]
fn run_writes_the_fin_figures() {
    // Common practice (the command a user runs writes the files it names).
    let dir = scratch("run");
    let device = dir.join("fin.toml");
    std::fs::write(&device, small("tri-gate", "")).unwrap();
    let plots = dir.join("plots");
    let out = Command::new(env!("CARGO_BIN_EXE_gatehold"))
        .args(["run", "--quiet"])
        .arg(&device)
        .arg("--plots")
        .arg(&plots)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(0), "{err}");
    for stem in ["iv", "cross_section", "along_channel", "band"] {
        for ext in ["png", "svg"] {
            let p = plots.join(format!("{stem}.{ext}"));
            assert!(err.contains(&format!("wrote {}", p.display())), "{err}");
            assert_image(&p);
        }
    }
    assert!(!err.contains("not drawn yet"), "{err}");
}

#[test]
fn a_corner_line_is_marked_on_both_sides_and_sliced_through_the_fin() {
    // Common practice (a fin's corners are where its leakiest path often
    // runs): a leakiest line on the fin's side face at its top corner,
    // y = W/2 = 3 nm, z = 0, is drawn at +-y on the mirrored cross-section,
    // and the along-channel plane at that y shows the fin's silicon beside it.
    let mut sol = tri_gate().1.clone();
    let p = &sol.structure.problem;
    let j =
        p.y.nodes
            .iter()
            .position(|&y| (y - 3.0).abs() < 1e-9)
            .unwrap();
    let k = p.z.nodes.iter().position(|&z| z.abs() < 1e-9).unwrap();
    let mut b = sol.barrier_sat.unwrap();
    b.line = j + p.ny * k;
    b.y_nm = 3.0;
    b.z_nm = 0.0;
    sol.barrier_sat = Some(b);
    let f = fin_figures(&sol, "");
    let c = f.cross_section.as_ref().unwrap();
    let at: Vec<(f64, f64)> = c.marks.iter().map(|m| m.at).collect();
    assert_eq!(at, [(3.0, 0.0), (-3.0, 0.0)]);
    assert!(
        c.marks[0].label.contains("y = ±3.0 nm"),
        "{}",
        c.marks[0].label
    );
    for m in &c.marks {
        assert!(in_region(c, m.at, &|r| r == Region::Silicon));
    }
    let a = f.along_channel.as_ref().unwrap();
    assert_eq!(a.position_nm, 3.0);
    // Under the gate, just below the top surface: the fin's silicon.
    assert_eq!(region_at(a, (15.0, 0.2)), Region::Silicon);
    assert_eq!(region_at(a, (15.0, -0.5)), Region::GateStack(3.9));
    assert!(a.title.contains("y = 3.0 nm"), "{}", a.title);
}
