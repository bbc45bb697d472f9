//! Bias points where the extraction needs them (`bias.points = "adaptive"`).
//!
//! The figures of MODEL.md section 5 read the I_D-V_G curve only near the
//! threshold current I_t: V_t interpolates between the two grid points that
//! bracket I_t, SS fits the grid points with I_D in [1e-3, 1e-1] I_t. So a
//! drain sweep solves, on the user's grid `vgs_start_V + k vgs_step_V`:
//!
//! 1. the off-state gate voltage (`bias.off_vgs_V`, the barrier's point) and
//!    the grid point nearest it;
//! 2. secant jumps in log10 |I_D| (the first with the ideal swing ln(10) V_T,
//!    which cannot overshoot) toward half a decade below the SS window,
//!    until a solved point lies below the window within about one step of it;
//! 3. every grid point from there, one step at a time, until |I_D| reaches I_t.
//!
//! Every grid point in the SS window and the bracketing pair are therefore
//! the same points the whole grid would solve, and V_t and SS equal the
//! whole-grid figures to the solver's tolerance (tests/adaptive_bias.rs).
//! With `bias.auto_extend` the walk continues beyond either end of the user's
//! range, up to `bias.extend_limit_V`.

use crate::progress::Observer;
use crate::solve::ramp::{GateGrid, GateWalker};
use crate::solve::{DeviceSolver, GateRamp, SolveError};

/// Lower edge of the SS window as a fraction of the threshold current (MODEL.md section 5).
pub const WINDOW_LOW: f64 = 1e-3;
/// Upper edge of the SS window as a fraction of the threshold current (MODEL.md section 5).
pub const WINDOW_HIGH: f64 = 1e-1;

/// Aim of the approach: this many decades below the SS window.
const AIM_BELOW_DECADES: f64 = 0.5;
/// Largest secant jump, grid steps (a failing jump is retried through its midpoint).
const MAX_JUMP_STEPS: i64 = 40;
/// Secant jumps before walking regardless.
const MAX_JUMPS: usize = 8;

/// Solves the grid points the extraction needs at drain bias `vds` for the
/// threshold current `target` (A/um); `eq`: the equilibrium at the off-state
/// gate voltage when already solved.
pub fn adaptive_ramp(
    solver: &mut DeviceSolver,
    vds: f64,
    target: f64,
    eq: Option<&[f64]>,
    observer: &dyn Observer,
) -> Result<GateRamp, SolveError> {
    let thermal_v = solver.structure.problem.silicon.thermal_v;
    let off = solver.scenario.bias.off_vgs_v;
    let mut w = GateWalker::start(solver, vds, off, eq, observer)?;
    let g = w.grid;
    // Decades per grid step at the ideal swing: no device is steeper.
    let ideal = g.step_v.abs() / (std::f64::consts::LN_10 * thermal_v);
    let lo = WINDOW_LOW * target;
    let aim = lo.log10() - AIM_BELOW_DECADES;
    let clamp = |j: i64| j.clamp(g.min_index, g.max_index);
    let j_off = clamp(g.index_of(off).round() as i64);
    if w.at(j_off)?.is_none() {
        return Ok(w.finish());
    }
    // 2. Secant approach toward the window.
    for _ in 0..MAX_JUMPS {
        let pts = converged(&w);
        let below = pts.iter().rev().find(|p| p.1 < lo.log10()).copied();
        let next = match below {
            Some((jb, lb)) => {
                if pts.iter().any(|p| p.0 == jb + 1) {
                    break; // bracketed within one step
                }
                let slope = secant(&pts, jb, ideal, true);
                let steps = ((aim - lb) / slope).floor() as i64;
                if steps <= 1 {
                    break;
                }
                jb + steps.min(MAX_JUMP_STEPS)
            }
            None => {
                // Every solved point is in or above the window: go toward off.
                let (j0, l0) = pts[0];
                let slope = secant(&pts, j0, ideal, false);
                let steps = ((l0 - aim) / slope).ceil().max(1.0) as i64;
                j0 - steps.min(MAX_JUMP_STEPS)
            }
        };
        let next = clamp(next);
        if w.solved().any(|(j, _)| j == next) {
            break; // at the end of the allowed range
        }
        if w.at(next)?.is_none() {
            return Ok(w.finish());
        }
    }
    // 3. Walk up from the highest point below the window to the threshold current.
    let start = converged(&w)
        .iter()
        .rev()
        .find(|p| p.1 < lo.log10())
        .map(|p| p.0);
    if let Some(jb) = start {
        let mut j = jb + 1;
        while j <= g.max_index {
            match w.at(j)? {
                Some(i) if i.abs() >= target => break,
                Some(_) => j += 1,
                None => break,
            }
        }
    }
    w.off_point()?;
    Ok(w.finish())
}

/// After a whole-grid ramp: when the grid does not reach below the SS window
/// or up to the threshold current, extend it step by step (within the
/// allowed range of `bias.auto_extend`/`bias.extend_limit_V`).
pub fn extend_grid_ramp(
    solver: &mut DeviceSolver,
    ramp: GateRamp,
    target: f64,
    observer: &dyn Observer,
) -> Result<GateRamp, SolveError> {
    let g = GateGrid::of(solver.scenario);
    let lo = WINDOW_LOW * target;
    let cur: Vec<Option<f64>> = ramp.points.iter().map(|p| p.current_a_per_um).collect();
    let failed = cur.iter().any(Option::is_none);
    let needs_low = cur.first().copied().flatten().is_some_and(|i| i.abs() > lo);
    let needs_high = cur
        .last()
        .copied()
        .flatten()
        .is_some_and(|i| i.abs() < target);
    if failed || !(needs_low || needs_high) || (g.min_index == 0 && g.max_index == g.last) {
        return Ok(ramp);
    }
    // Re-walk from the needed end: the whole-grid points are kept.
    let from = if needs_low { 0 } else { g.last };
    let mut w = GateWalker::start(solver, ramp.vds_v, g.vgs(from), None, observer)?;
    if needs_low {
        let mut j = -1;
        while j >= g.min_index {
            match w.at(j)? {
                Some(i) if i.abs() <= lo => break,
                Some(_) => j -= 1,
                None => break,
            }
        }
    }
    if needs_high {
        let mut j = g.last + 1;
        while j <= g.max_index {
            match w.at(j)? {
                Some(i) if i.abs() >= target => break,
                Some(_) => j += 1,
                None => break,
            }
        }
    }
    Ok(merge(ramp, w.finish()))
}

/// The grid ramp with the extension's points beyond the user's range added.
fn merge(mut ramp: GateRamp, ext: GateRamp) -> GateRamp {
    let first = ramp.points.first().map(|p| p.vgs_v);
    let last = ramp.points.last().map(|p| p.vgs_v);
    let beyond = |v: f64| {
        let (a, b) = (first.unwrap_or(v), last.unwrap_or(v));
        (v - a) * (b - a) < -1e-12 || (v - b) * (b - a) > 1e-12
    };
    let mut before = Vec::new();
    let mut after = Vec::new();
    for p in ext.points.into_iter().filter(|p| beyond(p.vgs_v)) {
        let v = p.vgs_v;
        if (v - first.unwrap_or(v)) * (last.unwrap_or(v) - first.unwrap_or(v)) < 0.0 {
            before.push(p);
        } else {
            after.push(p);
        }
    }
    before.append(&mut ramp.points);
    before.append(&mut after);
    ramp.points = before;
    ramp.newton_steps += ext.newton_steps;
    ramp.factorisations += ext.factorisations;
    ramp.extended_to_v = ext.extended_to_v;
    ramp
}

/// Converged points as (grid index, log10 |I_D|), ascending index.
fn converged(w: &GateWalker) -> Vec<(i64, f64)> {
    w.solved()
        .filter_map(|(j, i)| i.filter(|x| *x != 0.0).map(|x| (j, x.abs().log10())))
        .collect()
}

/// Decades per grid step near index `j`: the secant through `j` and its
/// nearest solved neighbour, looked for first on the side of the aim (`up`:
/// toward on), else the ideal swing. Never steeper than the ideal swing.
fn secant(pts: &[(i64, f64)], j: i64, ideal: f64, up: bool) -> f64 {
    let here = pts.iter().find(|p| p.0 == j).copied();
    let above = pts.iter().find(|p| p.0 > j);
    let below = pts.iter().rev().find(|p| p.0 < j);
    let other = if up { above.or(below) } else { below.or(above) };
    match (here, other) {
        (Some(a), Some(b)) => {
            let s = (b.1 - a.1) / (b.0 - a.0) as f64;
            if s.is_finite() && s > 0.02 * ideal {
                s.min(ideal)
            } else {
                ideal
            }
        }
        _ => ideal,
    }
}
