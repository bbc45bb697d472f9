//! Geometry sweeps: plans ([`plan`]), parallel runs into HDF5 checkpoints,
//! resume, shards and merge.
//!
//! Entry points: [`plan::load_plan`], [`run_sweep`], [`merge`], and
//! [`shortest::per_series`] for the shortest compliant length of each series.
//!
//! - Points run in parallel on a rayon pool of `jobs` threads; each point is
//!   independent (its own mesh and solver), so results do not depend on the
//!   thread count. Finished points are collected by index.
//! - After every finished point the whole file is rewritten atomically
//!   (temporary file + rename, [`crate::io::hdf5::write_sweep`]): a run killed
//!   at any moment leaves a readable file holding every point finished so far,
//!   sorted by `point_index`. A complete file therefore holds one element per
//!   point in plan order. A rewrite costs O(points) (measured: 5 ms at 100
//!   points, 19 ms at 1000, 120 ms at 10 000 points of 51 bias values, fsync
//!   included), so once rewrites get costly points are checkpointed in
//!   batches ([`CHECKPOINT_COST_RATIO`]): a kill then loses at most the points
//!   finished since the last checkpoint, a window ~10x the rewrite time.
//! - A failed point is recorded (`status` = the reason, figures NaN) and the
//!   sweep goes on.
//! - Shard `I/N` runs the points with `index % N == I`; [`merge`] joins shard
//!   files into the file an unsharded run would have written.

pub mod plan;
pub mod shortest;

use std::path::Path;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use std::sync::mpsc;
use std::time::{Instant, SystemTime};

use rayon::prelude::*;

use crate::evaluate::{evaluate, DeviceReport, Reference, Status, CAUTION};
use crate::io::hdf5::{read_sweep, write_sweep, write_sweep_with};
use crate::io::{rfc3339, AxisColumn, CurveData, IoError, MapData, PointRow, SweepFile, SweepMeta};
use crate::progress::Silent;

pub use plan::{load_plan, parse_plan, Plan, PlanError};

/// The model statement stored in every sweep file.
pub fn model_summary() -> String {
    format!(
        "gatehold {}: 2D nonlinear Poisson (box integration) on the along-channel cross-section of each \
         planar device, drain current from a quasi-Fermi level uniform over each cross-section; V_t at \
         constant current, SS, DIBL, barrier lowering and V_t roll-off against a long-channel reference. {CAUTION}",
        env!("CARGO_PKG_VERSION")
    )
}

/// Which slice of the plan a run computes: points with `index % count == index_of_shard`.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Shard {
    pub index: usize,
    pub count: usize,
}

impl Shard {
    pub const ALL: Shard = Shard { index: 0, count: 1 };

    pub fn holds(&self, point: usize) -> bool {
        point % self.count == self.index
    }
}

impl std::str::FromStr for Shard {
    type Err = SweepError;
    /// "I/N" with 0 <= I < N.
    fn from_str(s: &str) -> Result<Self, SweepError> {
        let bad = |why: &str| SweepError::Shard {
            value: s.to_string(),
            reason: why.to_string(),
        };
        let (a, b) = s
            .split_once('/')
            .ok_or_else(|| bad("expected I/N, e.g. 0/4 (I from 0)"))?;
        let index: usize = a
            .trim()
            .parse()
            .map_err(|_| bad("I is not a non-negative integer"))?;
        let count: usize = b
            .trim()
            .parse()
            .map_err(|_| bad("N is not a positive integer"))?;
        if count == 0 {
            return Err(bad("N must be at least 1"));
        }
        if index >= count {
            return Err(bad("I must be below N (shards are numbered from 0)"));
        }
        Ok(Shard { index, count })
    }
}

/// A checkpoint is written once the time since the previous one is at least
/// this many times what the previous one took: every point while the file is
/// small (a 1000-point file rewrites in ~20 ms), batches of points once
/// rewrites get costly, so file I/O stays below ~10 % of the run.
pub const CHECKPOINT_COST_RATIO: u32 = 10;

/// Why a sweep, resume or merge could not run (failed points are not errors).
#[derive(Debug, thiserror::Error)]
pub enum SweepError {
    #[error(transparent)]
    Plan(#[from] PlanError),
    #[error(transparent)]
    Io(#[from] IoError),
    #[error("--shard {value}: {reason}")]
    Shard { value: String, reason: String },
    #[error("{path} already exists (use resume to continue it, or remove it)")]
    Exists { path: String },
    #[error("cannot resume {path}: {reason}")]
    Resume { path: String, reason: String },
    #[error("cannot merge: {0}")]
    Merge(String),
    #[error("refusing to write {out}: it is {what} (choose another output file)")]
    OverwritesInput { out: String, what: String },
    #[error("thread pool: {0}")]
    Pool(String),
}

/// How to run a sweep.
#[derive(Debug, Clone)]
pub struct SweepOptions {
    /// Worker threads (points solved at once); 0 = rayon's default (all cores).
    pub jobs: usize,
    pub shard: Shard,
    /// Continue an existing partial file instead of refusing to overwrite it.
    pub resume: bool,
    /// Overwrite an existing file.
    pub overwrite: bool,
    /// Stop (as if interrupted) after this many points were computed in this run.
    pub stop_after: Option<usize>,
    /// Stored in the file's `command_line` attribute.
    pub command_line: String,
    /// Set (e.g. by a Ctrl-C handler) to stop: no new point starts, the
    /// points running finish and are written, and the run returns incomplete.
    pub interrupt: Option<std::sync::Arc<AtomicBool>>,
}

impl Default for SweepOptions {
    fn default() -> Self {
        SweepOptions {
            jobs: 0,
            shard: Shard::ALL,
            resume: false,
            overwrite: false,
            stop_after: None,
            command_line: String::new(),
            interrupt: None,
        }
    }
}

/// Progress of a sweep (the library never prints).
pub trait SweepObserver: Sync {
    /// Before solving: points this run will compute, of `in_shard`, with `done` already in the file.
    fn started(&self, _to_run: usize, _in_shard: usize, _done: usize) {}
    /// A point finished (on disk at once, or with the next checkpoint batch).
    fn point_done(&self, _index: usize, _status: &Status) {}
}

/// Ignores progress.
pub struct Quiet;
impl SweepObserver for Quiet {}

/// What a run did.
#[derive(Debug, Clone, PartialEq)]
pub struct SweepSummary {
    /// Points of this shard in the plan.
    pub in_shard: usize,
    /// Points found already finished in the file (resume).
    pub resumed: usize,
    /// Points computed by this run.
    pub computed: usize,
    /// Points in the file whose status is not "ok".
    pub failed: usize,
    /// True when the file holds every point of the shard.
    pub complete: bool,
    pub elapsed_s: f64,
}

/// The length-independent reference of each point's cross-section, solved
/// once per distinct cross-section among `points` (in parallel); `Err` holds
/// why a reference could not be built.
pub struct References {
    /// (a scenario of the cross-section, its reference).
    distinct: Vec<(usize, Result<Reference, String>)>,
    /// For each plan point, the index into `distinct` (None: not needed by this run).
    of_point: Vec<Option<usize>>,
}

impl References {
    /// Solves the references needed by the plan points `todo`.
    pub fn solve(plan: &Plan, todo: &[usize]) -> References {
        let mut firsts: Vec<usize> = Vec::new();
        let mut of_point = vec![None; plan.points.len()];
        for &i in todo {
            let s = &plan.points[i].scenario;
            let k = match firsts
                .iter()
                .position(|&f| plan.points[f].scenario.same_cross_section(s))
            {
                Some(k) => k,
                None => {
                    firsts.push(i);
                    firsts.len() - 1
                }
            };
            of_point[i] = Some(k);
        }
        let distinct = firsts
            .par_iter()
            .with_max_len(1)
            .map(|&f| {
                let r = Reference::of(&plan.points[f].scenario, &Silent).map_err(|e| e.to_string());
                (f, r)
            })
            .collect();
        References { distinct, of_point }
    }

    /// Number of distinct cross-sections solved.
    pub fn len(&self) -> usize {
        self.distinct.len()
    }

    pub fn is_empty(&self) -> bool {
        self.distinct.is_empty()
    }

    /// The reference of plan point `index`.
    pub fn of(&self, index: usize) -> Option<&Result<Reference, String>> {
        self.of_point
            .get(index)
            .copied()
            .flatten()
            .map(|k| &self.distinct[k].1)
    }
}

/// Evaluates one plan point into a row (never fails: a failure is the row's
/// status). The row's `figures` are left empty; the named figures come beside
/// it (empty for a failed point) and [`place_row`] puts them in file order.
pub fn run_plan_point(
    plan: &Plan,
    index: usize,
    reference: &Result<Reference, String>,
    with_map: bool,
) -> (PointRow, Vec<(String, Option<f64>)>) {
    let p = &plan.points[index];
    let t = Instant::now();
    let mut row = PointRow {
        index,
        axis: p.values.clone(),
        figures: Vec::new(),
        status: Status::Ok,
        method: None,
        warnings: p.scenario.warnings.clone(),
        meets_criteria: crate::evaluate::CriteriaVerdict::Unknown,
        newton_steps: 0,
        vds_v: (p.scenario.bias.vds_lin_v, p.scenario.bias.vds_sat_v),
        elapsed_s: 0.0,
        curve: CurveData::default(),
        map: None,
    };
    let mut named = Vec::new();
    let result = match reference {
        Ok(r) => {
            // Sweep files store curves: `bias.points = "auto"` solves the whole grid.
            let mut sc = p.scenario.clone();
            sc.bias.points = sc.bias.points.with_whole_curve();
            evaluate(&sc, r, &Silent).map_err(|e| e.to_string())
        }
        Err(e) => Err(e.clone()),
    };
    match result {
        Ok(ev) => {
            let r = &ev.report;
            named = r
                .scalars()
                .into_iter()
                .map(|(k, v)| (k.to_string(), v))
                .collect();
            row.status = r.status();
            row.method = Some(r.method);
            row.warnings = r.warnings.clone();
            row.meets_criteria = plan.criteria.judge(
                r.dibl_mv_per_v,
                r.ss_lin_mv_per_dec,
                r.ss_sat_mv_per_dec,
                r.vt_rolloff_mv,
            );
            row.newton_steps = r.newton_steps_total as i64;
            let nan = |v: &Vec<Option<f64>>| v.iter().map(|x| x.unwrap_or(f64::NAN)).collect();
            row.curve = CurveData {
                vgs_v: r.vgs_v.clone(),
                id_lin: nan(&r.id_lin),
                id_sat: nan(&r.id_sat),
            };
            if with_map {
                row.map = ev.solution.as_ref().map(MapData::of);
            }
        }
        Err(e) => row.status = Status::Failed(format!("failed: {e}")),
    }
    row.elapsed_s = t.elapsed().as_secs_f64();
    (row, named)
}

/// Inserts a solved row into `file` at its index position, with its figures in
/// the file's column order; a figure the file has no column for yet gets a new
/// column (NaN for the rows already there), so new report figures flow in.
pub fn place_row(file: &mut SweepFile, mut row: PointRow, named: &[(String, Option<f64>)]) {
    for (name, _) in named {
        if !file.figures.contains(name) {
            file.figures.push(name.clone());
            for r in &mut file.rows {
                r.figures.push(None);
            }
        }
    }
    row.figures = file
        .figures
        .iter()
        .map(|f| named.iter().find(|(n, _)| n == f).and_then(|(_, v)| *v))
        .collect();
    let at = file.rows.partition_point(|r| r.index < row.index);
    if file.rows.get(at).is_some_and(|r| r.index == row.index) {
        file.rows[at] = row;
    } else {
        file.rows.insert(at, row);
    }
}

/// An empty sweep file for `plan` and this run's shard: metadata, axis columns, and
/// the figure columns of [`DeviceReport::scalar_names`].
pub fn new_file(plan: &Plan, opts: &SweepOptions) -> SweepFile {
    let now = rfc3339(SystemTime::now());
    SweepFile {
        meta: SweepMeta {
            tool_version: env!("CARGO_PKG_VERSION").into(),
            plan: plan.text.clone(),
            created: now.clone(),
            command_line: opts.command_line.clone(),
            model_summary: model_summary(),
            started: now,
            finished: String::new(),
            shard_index: opts.shard.index,
            shard_count: opts.shard.count,
            points_total: plan.points.len(),
            base_device: plan.base_text.clone(),
            inputs: plan.inputs.clone(),
        },
        axes: plan
            .columns()
            .iter()
            .map(|k| AxisColumn {
                key: k.key.clone(),
                numeric: k.numeric,
            })
            .collect(),
        figures: DeviceReport::scalar_names().map(str::to_string).collect(),
        rows: Vec::new(),
    }
}

/// Runs (or resumes) a sweep into `out`. Errors only for problems that stop
/// the whole run (file exists, resume mismatch, I/O); failed points are
/// counted in the summary.
pub fn run_sweep(
    plan: &Plan,
    out: &Path,
    opts: &SweepOptions,
    observer: &dyn SweepObserver,
) -> Result<SweepSummary, SweepError> {
    let t0 = Instant::now();
    for (k, input) in plan.input_paths.iter().enumerate() {
        if same_file(out, input) {
            return Err(SweepError::OverwritesInput {
                out: out.display().to_string(),
                what: format!(
                    "the plan's {} file {}",
                    if k == 0 { "own" } else { "base device" },
                    input.display()
                ),
            });
        }
    }
    // A temporary file left by a run killed mid-write holds nothing the
    // output file does not (it is renamed over it only once complete).
    let _ = std::fs::remove_file(crate::io::hdf5::tmp_path(out));
    let mut file = if out.exists() {
        if opts.resume {
            let f = read_sweep(out)?;
            let bad = |reason: String| SweepError::Resume {
                path: out.display().to_string(),
                reason,
            };
            if f.meta.plan != plan.text {
                return Err(bad("the plan text differs from the plan stored in the file (attribute `plan`); resume needs the identical plan".into()));
            }
            if let Some(why) = inputs_differ(&f.meta.inputs, &plan.inputs) {
                return Err(bad(why));
            }
            if (f.meta.shard_index, f.meta.shard_count) != (opts.shard.index, opts.shard.count) {
                return Err(bad(format!(
                    "the file holds shard {}/{}, this run asks for {}/{}",
                    f.meta.shard_index, f.meta.shard_count, opts.shard.index, opts.shard.count
                )));
            }
            f
        } else if opts.overwrite {
            new_file(plan, opts)
        } else {
            return Err(SweepError::Exists {
                path: out.display().to_string(),
            });
        }
    } else {
        new_file(plan, opts)
    };
    let resumed = file.rows.len();
    let todo = file.missing();
    let in_shard = file.meta.points_in_shard();
    file.meta.finished.clear();
    if !opts.command_line.is_empty() && resumed > 0 {
        file.meta.command_line = format!("{}\n{}", file.meta.command_line, opts.command_line);
    }
    write_sweep(out, &file)?;
    observer.started(todo.len(), in_shard, resumed);

    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(opts.jobs)
        .build()
        .map_err(|e| SweepError::Pool(e.to_string()))?;
    let references = pool.install(|| References::solve(plan, &todo));
    let stop = AtomicBool::new(false);
    let interrupted = || {
        opts.interrupt
            .as_ref()
            .is_some_and(|i| i.load(Ordering::SeqCst))
    };
    let started = AtomicUsize::new(0);
    let limit = opts.stop_after.unwrap_or(usize::MAX);
    let (tx, rx) = mpsc::channel::<(PointRow, Vec<(String, Option<f64>)>)>();
    let mut computed = 0usize;
    let mut write_err: Option<IoError> = None;
    std::thread::scope(|s| {
        s.spawn(|| {
            pool.install(|| {
                todo.par_iter().with_max_len(1).for_each_with(tx, |tx, &i| {
                    // A point starts only while the budget allows (stop_after, or a write error).
                    if stop.load(Ordering::SeqCst)
                        || interrupted()
                        || started.fetch_add(1, Ordering::SeqCst) >= limit
                    {
                        return;
                    }
                    let reference = references
                        .of(i)
                        .expect("every point to run has a reference");
                    let _ = tx.send(run_plan_point(plan, i, reference, plan.maps.contains(&i)));
                });
            });
        });
        let mut last_write = Instant::now();
        let mut write_cost = std::time::Duration::ZERO;
        let mut dirty = false;
        for (row, named) in rx {
            let (index, status) = (row.index, row.status.clone());
            place_row(&mut file, row, &named);
            computed += 1;
            dirty = true;
            // Checkpoint unless the last rewrite was costly relative to the time since it.
            if last_write.elapsed() >= CHECKPOINT_COST_RATIO * write_cost {
                let t = Instant::now();
                if let Err(e) = write_sweep(out, &file) {
                    write_err.get_or_insert(e);
                    stop.store(true, Ordering::SeqCst);
                    continue;
                }
                dirty = false;
                write_cost = t.elapsed();
                last_write = Instant::now();
            }
            observer.point_done(index, &status);
        }
        if dirty && write_err.is_none() {
            if let Err(e) = write_sweep(out, &file) {
                write_err = Some(e);
            }
        }
    });
    if let Some(e) = write_err {
        return Err(e.into());
    }
    let complete = file.is_complete();
    if complete {
        file.meta.finished = rfc3339(SystemTime::now());
        let answer = shortest::stored_answer(&file, &plan.criteria);
        write_sweep_with(out, &file, answer.as_ref())?;
    }
    Ok(SweepSummary {
        in_shard,
        resumed,
        computed,
        failed: file.rows.iter().filter(|r| !r.status.is_ok()).count(),
        complete,
        elapsed_s: t0.elapsed().as_secs_f64(),
    })
}

/// Joins shard files into one file equal, point for point, to an unsharded run.
/// Checks: every part holds the same plan, shards are complete, no point is
/// held twice and none is missing (the error lists the indices).
pub fn merge(parts: &[&Path], out: &Path, command_line: &str) -> Result<SweepFile, SweepError> {
    if parts.is_empty() {
        return Err(SweepError::Merge("no input files".into()));
    }
    if let Some(p) = parts.iter().find(|p| same_file(out, p)) {
        return Err(SweepError::OverwritesInput {
            out: out.display().to_string(),
            what: format!("one of the files to merge ({})", p.display()),
        });
    }
    let files: Vec<SweepFile> = parts
        .iter()
        .map(|p| read_sweep(p))
        .collect::<Result<_, _>>()?;
    let first = &files[0];
    for (f, p) in files.iter().zip(parts).skip(1) {
        if f.meta.plan != first.meta.plan {
            return Err(SweepError::Merge(format!(
                "{} holds a different plan from {}",
                p.display(),
                parts[0].display()
            )));
        }
        if let Some(why) = inputs_differ(&first.meta.inputs, &f.meta.inputs) {
            return Err(SweepError::Merge(format!(
                "{} and {} were run from different inputs: {why}",
                parts[0].display(),
                p.display()
            )));
        }
        if f.axes != first.axes || f.figures != first.figures {
            return Err(SweepError::Merge(format!(
                "{} has different columns from {}",
                p.display(),
                parts[0].display()
            )));
        }
    }
    let total = first.meta.points_total;
    let mut seen: Vec<Option<usize>> = vec![None; total];
    let mut dup = Vec::new();
    let mut rows = Vec::with_capacity(total);
    for (k, f) in files.iter().enumerate() {
        for r in &f.rows {
            if r.index >= total {
                return Err(SweepError::Merge(format!(
                    "{}: point_index {} beyond the plan's {total} points",
                    parts[k].display(),
                    r.index
                )));
            }
            match seen[r.index] {
                Some(j) => dup.push(format!(
                    "{} (in {} and {})",
                    r.index,
                    parts[j].display(),
                    parts[k].display()
                )),
                None => {
                    seen[r.index] = Some(k);
                    rows.push(r.clone());
                }
            }
        }
    }
    if !dup.is_empty() {
        return Err(SweepError::Merge(format!(
            "duplicate points: {}",
            dup.join(", ")
        )));
    }
    let missing: Vec<usize> = (0..total).filter(|&i| seen[i].is_none()).collect();
    if !missing.is_empty() {
        return Err(SweepError::Merge(format!(
            "{} missing point(s): {}",
            missing.len(),
            ranges(&missing)
        )));
    }
    rows.sort_by_key(|r| r.index);
    let started = files
        .iter()
        .map(|f| f.meta.started.clone())
        .min()
        .unwrap_or_default();
    let finished = files
        .iter()
        .map(|f| f.meta.finished.clone())
        .max()
        .unwrap_or_default();
    let merged = SweepFile {
        meta: SweepMeta {
            created: rfc3339(SystemTime::now()),
            command_line: format!(
                "{command_line}\n(merged from: {})",
                files
                    .iter()
                    .map(|f| f.meta.command_line.as_str())
                    .collect::<Vec<_>>()
                    .join(" | ")
            ),
            started,
            finished,
            shard_index: 0,
            shard_count: 1,
            ..first.meta.clone()
        },
        axes: first.axes.clone(),
        figures: first.figures.clone(),
        rows,
    };
    let criteria = plan::criteria_of_text(&merged.meta.plan).unwrap_or_default();
    let answer = shortest::stored_answer(&merged, &criteria);
    write_sweep_with(out, &merged, answer.as_ref())?;
    Ok(merged)
}

/// True when `a` and `b` name the same existing file (same device and
/// inode on Unix, so links and `./` spellings are caught).
pub fn same_file(a: &Path, b: &Path) -> bool {
    let (Ok(ma), Ok(mb)) = (std::fs::metadata(a), std::fs::metadata(b)) else {
        return false;
    };
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        ma.dev() == mb.dev() && ma.ino() == mb.ino()
    }
    #[cfg(not(unix))]
    {
        let _ = (ma, mb);
        matches!((a.canonicalize(), b.canonicalize()), (Ok(x), Ok(y)) if x == y)
    }
}

/// Why the inputs recorded in a file (`stored`) differ from `now`, naming
/// the file; None when every input's hash agrees. A file with no inputs
/// recorded (format 1) cannot be checked and is refused.
pub fn inputs_differ(
    stored: &[crate::io::InputRecord],
    now: &[crate::io::InputRecord],
) -> Option<String> {
    if stored.is_empty() || now.is_empty() {
        return Some(
            "the file records no input hashes (written by gatehold before format 2), so its base device cannot be checked; rerun it with --force".into(),
        );
    }
    for n in now {
        match stored.iter().find(|s| s.role == n.role) {
            None => return Some(format!("the file records no {} file", n.role)),
            Some(s) if s.sha256 != n.sha256 => {
                return Some(format!(
                    "the {} file {} changed: sha256 {} now, {} when {} was written",
                    n.role, n.file, n.sha256, s.sha256, s.file
                ))
            }
            Some(_) => {}
        }
    }
    None
}

/// "0-3, 7, 9-10" for a sorted index list.
pub fn ranges(v: &[usize]) -> String {
    let mut out = Vec::new();
    let mut i = 0;
    while i < v.len() {
        let mut j = i;
        while j + 1 < v.len() && v[j + 1] == v[j] + 1 {
            j += 1;
        }
        out.push(if i == j {
            v[i].to_string()
        } else {
            format!("{}-{}", v[i], v[j])
        });
        i = j + 1;
    }
    out.join(", ")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shard_parsing_and_ranges() {
        assert_eq!(
            "1/4".parse::<Shard>().unwrap(),
            Shard { index: 1, count: 4 }
        );
        for bad in ["4/4", "1", "a/2", "0/0"] {
            let e = bad.parse::<Shard>().unwrap_err().to_string();
            assert!(e.contains(bad), "{e}");
        }
        assert_eq!(ranges(&[0, 1, 2, 3, 7, 9, 10]), "0-3, 7, 9-10");
    }
}
