//! Plots that say what they show: the figure descriptions (styles, labels,
//! missing points, criteria lines, compliant-length marks, per-point names,
//! V_t and threshold-current lines, map regions) asserted on real sweep
//! files, and every written file checked to be non-empty and to decode.

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;
use std::sync::OnceLock;

use gatehold::evaluate::{Criteria, Status};
use gatehold::io::{hdf5::read_sweep, SweepFile};
use gatehold::plot::describe::{length_figures, point_figures};
use gatehold::plot::figure::{Figure, Glyph, LineStyle, MarkerStyle, Style};
use gatehold::plot::map::Region;

fn gatehold() -> Command {
    Command::new(env!("CARGO_BIN_EXE_gatehold"))
}

fn base_device() -> String {
    std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("meshes/double-gate.toml"))
        .unwrap()
        .replace("vgs_step_V = 0.02", "vgs_step_V = 0.025")
}

/// A fresh folder under cargo's scratch space for integration tests.
fn scratch(name: &str) -> PathBuf {
    let dir = Path::new(env!("CARGO_TARGET_TMPDIR")).join(format!("plots-{name}"));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

/// Sweeps `plan` (with `base.toml` = `base`) through the binary into a file in `dir`.
fn sweep(dir: &Path, base: &str, plan: &str) -> SweepFile {
    std::fs::write(dir.join("base.toml"), base).unwrap();
    std::fs::write(dir.join("plan.toml"), plan).unwrap();
    let out = dir.join("sweep.h5");
    let st = gatehold()
        .args(["sweep", "-q", "--force"])
        .arg(dir.join("plan.toml"))
        .arg("--out")
        .arg(&out)
        .output()
        .unwrap();
    assert!(
        st.status.code() == Some(0),
        "sweep failed: {}",
        String::from_utf8_lossy(&st.stderr)
    );
    read_sweep(&out).unwrap()
}

/// A double-gate sweep (3 lengths x 2 bodies, a map of point 2, criteria in
/// the plan), solved once for this file's tests.
fn solved() -> &'static (PathBuf, SweepFile) {
    static S: OnceLock<(PathBuf, SweepFile)> = OnceLock::new();
    S.get_or_init(|| {
        let dir = scratch("solved");
        let f = sweep(
            &dir,
            &base_device(),
            r#"base = "base.toml"
fins = "theory"
[axes]
"geometry.gate_length_nm" = [14, 20, 30]
"geometry.body_thickness_nm" = [6, 8]
[output]
maps = [2]
[criteria]
dibl_max_mV_per_V = 100
ss_max_mV_per_dec = 80
"#,
        );
        (dir, f)
    })
}

/// A tri-gate sweep: theory points only (the plan key `fins = "theory"`: no along-channel solve).
fn theory_only() -> &'static (PathBuf, SweepFile) {
    static S: OnceLock<(PathBuf, SweepFile)> = OnceLock::new();
    S.get_or_init(|| {
        let dir = scratch("theory-only");
        let t = gatehold().args(["template", "tri-gate"]).output().unwrap();
        let f = sweep(
            &dir,
            &String::from_utf8(t.stdout).unwrap(),
            r#"base = "base.toml"
fins = "theory"
[axes]
"geometry.gate_length_nm" = [14, 20, 30]
"geometry.body_thickness_nm" = [6, 8]
[criteria]
dibl_max_mV_per_V = 100
"#,
        );
        (dir, f)
    })
}

fn figure<'a>(figs: &'a [Figure], stem: &str) -> &'a Figure {
    figs.iter()
        .find(|f| f.stem == stem)
        .unwrap_or_else(|| panic!("no figure {stem}"))
}

fn col(f: &SweepFile, name: &str) -> Vec<f64> {
    f.figure(name).unwrap()
}

#[test]
fn solved_series_are_solid_and_filled_theory_dashed_hollow_and_labelled() {
    // Source: docs/hdf5-schema.md, Figures (the figure conventions).
    let f = &solved().1;
    let figs = length_figures(f, &Criteria::default());
    assert_eq!(figs.len(), 3);
    for fig in &figs {
        let solved: Vec<_> = fig
            .traces
            .iter()
            .filter(|t| t.style.line == LineStyle::Solid)
            .collect();
        let theory: Vec<_> = fig
            .traces
            .iter()
            .filter(|t| t.style.line == LineStyle::Dashed)
            .collect();
        assert_eq!(solved.len(), 2, "{}: one solved trace per body", fig.stem);
        assert_eq!(theory.len(), 2, "{}: one theory trace per body", fig.stem);
        for t in &solved {
            assert_eq!(t.style, Style::solved(t.style.colour));
            assert!(!t.label.contains("theory"), "{}", t.label);
            assert_eq!(t.points.len(), 3, "{}: three lengths", t.label);
        }
        for t in &theory {
            assert_eq!(t.style.marker, MarkerStyle::Hollow);
            assert!(t.label.ends_with("(theory)"), "{}", t.label);
            // The theory of a series takes that series' colour.
            let base = t.label.trim_end_matches(" (theory)");
            let s = solved
                .iter()
                .find(|s| s.label == base)
                .expect("matching solved series");
            assert_eq!(s.style.colour, t.style.colour);
        }
        // The legend shows every trace as drawn: same style, same label.
        let legend = fig.legend();
        for t in &fig.traces {
            assert!(legend
                .iter()
                .any(|e| e.glyph == Glyph::Trace(t.style) && e.label == t.label));
        }
        assert!(fig.levels.is_empty() && fig.marks.is_empty() && fig.missing.is_empty());
    }
}

#[test]
fn a_theory_only_series_is_never_drawn_like_a_solve() {
    // Source: docs/hdf5-schema.md, Figures; fins are theory points (`run --json` method "theory").
    let f = &theory_only().1;
    let figs = length_figures(f, &Criteria::default());
    assert!(!figs.is_empty());
    for fig in &figs {
        assert_eq!(
            fig.traces.len(),
            2,
            "{}: one trace per body, no duplicate",
            fig.stem
        );
        for t in &fig.traces {
            assert_eq!(t.style, Style::theory(t.style.colour), "{}", t.label);
            assert!(t.label.contains("(theory)"), "{}", t.label);
        }
    }
}

#[test]
fn failed_points_are_crossed_on_the_axis_and_counted_in_the_legend() {
    // Source: docs/hdf5-schema.md, Figures (points without a value crossed on the axis, counted).
    let mut f = solved().1.clone();
    let lg = col(&f, "gate_length_nm");
    for k in [0, 3] {
        let r = &mut f.rows[k];
        r.status = Status::Failed("failed: made to fail by the test".into());
        r.figures.iter_mut().for_each(|v| *v = None);
        r.curve = Default::default();
    }
    let figs = length_figures(&f, &Criteria::default());
    for fig in &figs {
        let mut xs: Vec<f64> = fig.missing.iter().map(|m| m.x).collect();
        xs.sort_by(f64::total_cmp);
        let mut want = vec![lg[0], lg[3]];
        want.sort_by(f64::total_cmp);
        assert_eq!(xs, want, "{}", fig.stem);
        let entry = fig
            .legend()
            .into_iter()
            .find(|e| e.glyph == Glyph::Missing)
            .unwrap();
        assert!(entry.label.contains("2 points"), "{}", entry.label);
        let drawn: usize = fig
            .traces
            .iter()
            .filter(|t| t.style.line == LineStyle::Solid)
            .map(|t| t.points.len())
            .sum();
        assert_eq!(drawn, 4, "{}: 6 points, 2 failed", fig.stem);
    }
}

#[test]
fn criteria_are_lines_at_their_values_and_the_shortest_compliant_length_is_ringed() {
    // Source: docs/hdf5-schema.md, Figures (criteria); the shortest compliant length recomputed here
    // from the file's columns (the larger SS of lin and sat, |roll-off|).
    let f = &solved().1;
    let c = Criteria {
        dibl_max_mv_per_v: Some(100.0),
        ss_max_mv_per_dec: Some(80.0),
        vt_rolloff_max_mv: Some(60.0),
    };
    let figs = length_figures(f, &c);
    let levels =
        |stem: &str| -> Vec<f64> { figure(&figs, stem).levels.iter().map(|l| l.y).collect() };
    assert_eq!(levels("dibl"), vec![100.0]);
    assert_eq!(levels("ss"), vec![80.0]);
    assert!(levels("vt_rolloff").contains(&-60.0));
    let (lg, dibl, ssl, sss, roll) = (
        col(f, "gate_length_nm"),
        col(f, "dibl_mV_per_V"),
        col(f, "ss_lin_mV_per_dec"),
        col(f, "ss_sat_mV_per_dec"),
        col(f, "vt_rolloff_mV"),
    );
    let body = |k: usize| f.rows[k].axis[1].to_string();
    // Per series: the shortest solved compliant length and the longest
    // solved length below it (the interpolated answer lies between them).
    let mut want: Vec<(f64, f64)> = Vec::new();
    for b in ["6", "8"] {
        let ok = |k: usize| dibl[k] <= 100.0 && ssl[k].max(sss[k]) <= 80.0 && roll[k].abs() <= 60.0;
        let best = (0..f.rows.len())
            .filter(|&k| body(k) == b && ok(k))
            .map(|k| lg[k])
            .fold(f64::INFINITY, f64::min);
        if best.is_finite() {
            let below = (0..f.rows.len())
                .filter(|&k| body(k) == b && lg[k] < best)
                .map(|k| lg[k])
                .fold(f64::NEG_INFINITY, f64::max);
            want.push((below, best));
        }
    }
    assert!(
        !want.is_empty(),
        "the test sweep should have a compliant length"
    );
    for stem in ["dibl", "ss", "vt_rolloff"] {
        let fig = figure(&figs, stem);
        let mut got: Vec<f64> = fig.marks.iter().map(|m| m.x).collect();
        got.sort_by(f64::total_cmp);
        let mut w = want.clone();
        w.sort_by(|a, b| a.1.total_cmp(&b.1));
        assert_eq!(got.len(), w.len(), "{stem}: {got:?} against {w:?}");
        for (x, (lo, hi)) in got.iter().zip(&w) {
            assert!(
                *x > *lo && *x <= *hi,
                "{stem}: ring at {x} outside ({lo}, {hi}]"
            );
        }
        // Each ring sits on its series' trace: on a point, or between two
        // neighbouring points with a value between theirs.
        for m in &fig.marks {
            assert!(fig.traces.iter().any(|t| {
                t.style.colour == m.colour
                    && (t.points.contains(&(m.x, m.y))
                        || t.points.windows(2).any(|q| {
                            q[0].0 < m.x
                                && m.x < q[1].0
                                && m.y >= q[0].1.min(q[1].1) - 1e-9
                                && m.y <= q[0].1.max(q[1].1) + 1e-9
                        }))
            }));
        }
        assert!(fig.legend().iter().any(|e| e.glyph == Glyph::Mark));
    }
    // The file's own [criteria] (DIBL 100, SS 80, no roll-off bound) are the default.
    let from_file = gatehold::plot::plan_criteria(f).unwrap();
    assert_eq!(from_file.dibl_max_mv_per_v, Some(100.0));
    assert_eq!(from_file.ss_max_mv_per_dec, Some(80.0));
    assert_eq!(from_file.vt_rolloff_max_mv, None);
}

#[test]
fn per_point_figures_carry_axis_values_vt_and_the_threshold_current() {
    // Source: docs/hdf5-schema.md, Figures; the threshold current is I_cc W / L_g (the
    // constant-current V_t definition, MODEL.md), I_cc from the base device.
    let f = &solved().1;
    let (points, notes) = point_figures(f);
    assert!(notes.is_empty(), "{notes:?}");
    assert_eq!(points.len(), 1, "one point holds a map");
    let p = &points[0];
    let iv = p.iv.as_ref().expect("I_D-V_G figure");
    assert_eq!(iv.stem, "iv_Lg-20nm_tsi-6nm");
    assert!(
        iv.title.contains("L_g = 20 nm") && iv.title.contains("tsi = 6 nm"),
        "{}",
        iv.title
    );
    let map = p.map.as_ref().expect("map figure");
    assert_eq!(map.stem, "potential_map_Lg-20nm_tsi-6nm");
    assert!(map.title.contains("L_g = 20 nm"));
    assert_eq!(p.band.as_ref().unwrap().stem, "band_Lg-20nm_tsi-6nm");
    // V_t cuts at the stored V_t of that point (row 2).
    let (vtl, vts) = (col(f, "vt_lin_V")[2], col(f, "vt_sat_V")[2]);
    let cuts: Vec<f64> = iv.cuts.iter().map(|c| c.x).collect();
    assert_eq!(cuts, vec![vtl, vts]);
    let s = common::device(&base_device());
    let ith = s.extraction.current_criterion_a / (20.0 * 1e-3);
    assert_eq!(iv.levels.len(), 1);
    let got = iv.levels[0].y;
    assert!(
        common::rel(got, ith) < 1e-3,
        "threshold current {got:e} vs I_cc W/L {ith:e}"
    );
}

#[test]
fn maps_outline_the_stack_the_spacers_the_gate_and_the_contacts() {
    // Source: docs/hdf5-schema.md, Figures; regions as built by structure::planar.
    let f = &solved().1;
    let (points, _) = point_figures(f);
    let m = points[0].map.as_ref().unwrap();
    let md = m.map;
    let (nx, ny) = (md.nx(), md.ny());
    let regions: Vec<Region> = (0..ny - 1)
        .flat_map(|j| (0..nx - 1).map(move |i| (i, j)))
        .map(|(i, j)| m.region_of(i, j))
        .collect();
    // Two stack layers (SiO2 3.9 and HfO2, by permittivity), spacers, gate, silicon.
    let mut stack: Vec<f64> = regions
        .iter()
        .filter_map(|r| match r {
            Region::GateStack(e) => Some(*e),
            _ => None,
        })
        .collect();
    stack.sort_by(f64::total_cmp);
    stack.dedup();
    assert_eq!(stack.len(), 2, "{stack:?}");
    assert!(regions.contains(&Region::Spacer) && regions.contains(&Region::Silicon));
    assert!(regions.contains(&Region::Electrode(0)));
    // The stack's top (y = -2.6 nm) and the silicon surface are outlined under the gate.
    for y in [-2.6, 0.0] {
        assert!(
            m.outlines.iter().any(|s| (s[0].1 - y).abs() < 1e-9
                && (s[1].1 - y).abs() < 1e-9
                && s[0].0 >= md.gate_start_nm - 1e-9
                && s[1].0 <= md.gate_end_nm + 1e-9),
            "no outline at y = {y}"
        );
    }
    let names: Vec<&str> = m.contacts.iter().map(|c| c.name).collect();
    assert_eq!(names, vec!["source", "drain"]);
    let labels: Vec<&str> = m.labels.iter().map(|l| l.text).collect();
    assert_eq!(
        labels.iter().filter(|l| **l == "spacer").count(),
        2,
        "{labels:?}"
    );
    assert!(labels.contains(&"gate"));
}

fn assert_files_decode(files: &[PathBuf]) {
    assert!(!files.is_empty());
    for p in files {
        let len = std::fs::metadata(p).unwrap().len();
        assert!(len > 1000, "{} has {len} bytes", p.display());
        match p.extension().and_then(|e| e.to_str()) {
            Some("png") => {
                let img = image::open(p).unwrap().to_rgb8();
                assert!(img.width() >= 900 && img.height() >= 500);
                let coloured = img.pixels().filter(|px| px.0 != [255, 255, 255]).count();
                assert!(
                    coloured as f64 > 0.02 * (img.width() * img.height()) as f64,
                    "{} is nearly blank",
                    p.display()
                );
            }
            Some("svg") => {
                let t = std::fs::read_to_string(p).unwrap();
                assert!(t.contains("<svg") && t.trim_end().ends_with("</svg>"));
                // No tick or label reads "-0" or "-0.0" (plotters writes text
                // content on a line of its own).
                let signed_zero = t
                    .lines()
                    .map(str::trim)
                    .find(|l| l.starts_with("-0") && l[1..].chars().all(|c| c == '0' || c == '.'));
                assert_eq!(signed_zero, None, "{}", p.display());
            }
            other => panic!("unexpected file {other:?}"),
        }
    }
}

#[test]
fn every_written_figure_is_non_empty_and_decodes() {
    // Source: common practice (PNG and SVG readers accept what we write).
    let f = &solved().1;
    let dir = tempfile::tempdir().unwrap();
    let out =
        gatehold::plot::sweep_plots_with(f, dir.path(), &gatehold::plot::plan_criteria(f).unwrap())
            .unwrap();
    assert!(out.notes.is_empty(), "{:?}", out.notes);
    // 3 figures against L_g and the map point's iv, map, band; PNG and SVG each.
    assert_eq!(out.files.len(), 12, "{:?}", out.files);
    assert_files_decode(&out.files);
    let written = std::fs::read_dir(dir.path()).unwrap().count();
    assert_eq!(written, out.files.len());
}

#[test]
fn points_without_curves_get_no_figure_and_no_file() {
    // Source: docs/hdf5-schema.md, Figures (a fin sweep has no I_D-V_G curves: no figure, no file).
    let f = &theory_only().1;
    let (points, notes) = point_figures(f);
    assert!(points.is_empty());
    assert_eq!(notes.len(), 1, "{notes:?}");
    // A theory point never had curves: nothing is missing (exit 0, not 2).
    assert!(!notes[0].expected);
    let dir = tempfile::tempdir().unwrap();
    let out = gatehold::plot::sweep_plots_with(f, dir.path(), &Criteria::default()).unwrap();
    assert_eq!(out.files.len(), 6, "{:?}", out.files);
    assert_files_decode(&out.files);
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 6);
}

#[test]
fn the_plot_command_takes_criteria_and_notes_what_it_leaves_out() {
    // Source: docs/hdf5-schema.md, Figures (--dibl-max, --ss-max, --vt-rolloff-max on plot).
    let (dir, _) = theory_only();
    let out = dir.join("plots-cli");
    let st = gatehold()
        .arg("plot")
        .arg(dir.join("sweep.h5"))
        .arg("--out")
        .arg(&out)
        .args(["--dibl-max", "80", "--vt-rolloff-max", "40"])
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&st.stderr);
    assert_eq!(st.status.code(), Some(0), "{err}");
    assert!(err.contains("note: no I_D-V_G figure"), "{err}");
    let listed = String::from_utf8_lossy(&st.stdout);
    assert_eq!(listed.lines().count(), 6, "{listed}");
    assert!(std::fs::read_dir(&out)
        .unwrap()
        .all(|e| e.unwrap().metadata().unwrap().len() > 0));
    let bad = gatehold()
        .arg("plot")
        .arg(dir.join("sweep.h5"))
        .arg("--out")
        .arg(&out)
        .arg("--ss-max=-3")
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&bad.stderr);
    assert_eq!(bad.status.code(), Some(1), "{err}");
    assert!(err.contains("--ss-max = -3"), "{err}");
}

#[test]
fn device_plots_of_a_solved_device_decode_and_mark_the_report_threshold() {
    // Source: docs/hdf5-schema.md, Figures; the threshold line is the report's own I_cc W/L_g.
    let s = common::device(&base_device());
    let sol = common::solve_device(&s);
    let map = gatehold::io::MapData::of(&sol);
    let (fig, notes) = gatehold::plot::describe::device_figures(&sol, &map);
    assert!(notes.is_empty(), "{notes:?}");
    let fig = fig.unwrap();
    let iv = fig.iv.as_ref().unwrap();
    assert_eq!(iv.levels[0].y, sol.report.threshold_current_a_per_um);
    assert!(iv.title.contains("L_g = 20 nm"), "{}", iv.title);
    let dir = tempfile::tempdir().unwrap();
    let files = gatehold::plot::device_plots(&sol, dir.path()).unwrap();
    assert_eq!(files.len(), 6);
    assert_files_decode(&files);
}

#[test]
fn a_map_point_without_converged_current_is_reported_missing_with_exit_2() {
    // Source: README exit codes (2: finished, some figure missing); docs/hdf5-schema.md, Figures.
    let mut f = solved().1.clone();
    let k = f.rows.iter().position(|r| r.map.is_some()).unwrap();
    let c = &mut f.rows[k].curve;
    c.id_lin.iter_mut().for_each(|v| *v = f64::NAN);
    c.id_sat.iter_mut().for_each(|v| *v = f64::NAN);
    let (points, notes) = point_figures(&f);
    // The map and band still hold a converged potential: drawn.
    assert_eq!(points.len(), 1);
    assert!(points[0].iv.is_none() && points[0].map.is_some() && points[0].band.is_some());
    assert_eq!(notes.len(), 1);
    assert!(
        notes[0].expected && notes[0].reason.contains("L_g = 20 nm"),
        "{notes:?}"
    );
    let dir = scratch("no-current");
    let file = dir.join("broken.h5");
    gatehold::io::hdf5::write_sweep(&file, &f).unwrap();
    let st = gatehold()
        .arg("plot")
        .arg(&file)
        .arg("--out")
        .arg(dir.join("out"))
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&st.stderr);
    assert_eq!(st.status.code(), Some(2), "{err}");
    assert!(err.contains("no converged drain current"), "{err}");
    // The figures against L_g, the map and the band are still written, and no I_D-V_G file.
    let names: Vec<String> = std::fs::read_dir(dir.join("out"))
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    assert_eq!(names.len(), 10, "{names:?}");
    assert!(names.iter().all(|n| !n.starts_with("iv_")));
}
