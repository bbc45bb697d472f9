//! Bias continuation: equilibrium at a first gate voltage, the drain ramped
//! up, then gate voltages of the grid `vgs_start_V + k vgs_step_V` solved in
//! any order the caller asks ([`GateWalker`]), each from the last converged
//! state (a linear predictor between neighbouring grid points). The whole
//! grid ([`DeviceSolver::gate_ramp`]) is one such order; the extraction's
//! adaptive choice (`extract::adaptive`) another.

use std::collections::BTreeMap;

use super::{neutral_guess, DeviceSolver, QuasiFermi, SolveError, SolveReport};
use crate::device::Scenario;
use crate::progress::Observer;

/// Largest drain-bias step while ramping, V.
const VDS_RAMP_STEP_V: f64 = 0.2;

/// Gate voltages never leave this range, V (the `LIMITS` of `bias.vgs_start_V`/`vgs_stop_V`).
const VGS_BOUND_V: f64 = 5.0;

/// One solved bias point.
#[derive(Debug, Clone, PartialEq)]
pub struct BiasPoint {
    pub vgs_v: f64,
    /// Signed drain current per width, A/um; `None` when the point did not converge.
    pub current_a_per_um: Option<f64>,
    pub report: SolveReport,
}

/// The solved points of one drain bias, in ramp order (from the off end).
#[derive(Debug, Clone, PartialEq)]
pub struct GateRamp {
    pub vds_v: f64,
    pub points: Vec<BiasPoint>,
    /// Potential at the off-state gate voltage (None if it did not converge).
    pub off_psi: Option<Vec<f64>>,
    pub newton_steps: usize,
    pub factorisations: usize,
    /// Gate voltages solved beyond the user's range (`bias.auto_extend`):
    /// the furthest point beyond each end that was needed, V.
    pub extended_to_v: Vec<f64>,
}

/// The gate-voltage grid in ramp order: index 0 is the off end of the
/// user's range, `last` its on end; negative indices and indices above
/// `last` extend the range (never beyond `bias.extend_limit_V` nor 5 V).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GateGrid {
    /// Gate voltage of index 0, V.
    pub first_v: f64,
    /// Signed step toward the on state, V.
    pub step_v: f64,
    /// Index of the on end of the user's range.
    pub last: i64,
    /// Allowed indices (the user's range plus any extension).
    pub min_index: i64,
    pub max_index: i64,
}

impl GateGrid {
    /// The grid of the scenario's `bias` keys.
    pub fn of(s: &Scenario) -> GateGrid {
        let b = &s.bias;
        let n = b.gate_voltages().len() as i64 - 1;
        let up = s.polarity.sign() > 0.0;
        let (first_v, step_v) = if up {
            (b.vgs_start_v, b.vgs_step_v)
        } else {
            (b.vgs_start_v + n as f64 * b.vgs_step_v, -b.vgs_step_v)
        };
        let mut g = GateGrid {
            first_v,
            step_v,
            last: n,
            min_index: 0,
            max_index: n,
        };
        if b.auto_extend {
            let extra = (b.extend_limit_v / b.vgs_step_v + 1e-9).floor() as i64;
            g.min_index = -extra;
            g.max_index = n + extra;
            while g.min_index < 0 && g.vgs(g.min_index).abs() > VGS_BOUND_V + 1e-9 {
                g.min_index += 1;
            }
            while g.max_index > n && g.vgs(g.max_index).abs() > VGS_BOUND_V + 1e-9 {
                g.max_index -= 1;
            }
        }
        g
    }

    /// Gate voltage of index `j`, V.
    pub fn vgs(&self, j: i64) -> f64 {
        self.first_v + j as f64 * self.step_v
    }

    /// Whether `j` lies in the user's range.
    pub fn in_range(&self, j: i64) -> bool {
        (0..=self.last).contains(&j)
    }

    /// The (possibly fractional) index of gate voltage `v`.
    pub fn index_of(&self, v: f64) -> f64 {
        (v - self.first_v) / self.step_v
    }
}

/// Solves grid points of one drain bias in the order asked, each from the
/// last converged state; keeps every solved point.
pub struct GateWalker<'w, 'a> {
    solver: &'w mut DeviceSolver<'a>,
    observer: &'w dyn Observer,
    pub vds_v: f64,
    pub grid: GateGrid,
    /// Last converged potential and its gate voltage.
    psi: Vec<f64>,
    at_v: f64,
    /// The converged state before it, for the linear predictor (gate voltage, potential).
    prev: Option<(f64, Vec<f64>)>,
    /// Converged states at the lowest and highest solved grid indices, from
    /// which a point beyond either end is continued (three states at most are kept).
    ends: [Option<(i64, Vec<f64>)>; 2],
    solved: BTreeMap<i64, BiasPoint>,
    off_psi: Option<Vec<f64>>,
    f0: usize,
    steps0: usize,
}

impl<'w, 'a> GateWalker<'w, 'a> {
    /// At gate voltage `v0` with the drain ramped to `vds`, from the
    /// equilibrium `eq` at `v0` when given (else solved here).
    pub fn start(
        solver: &'w mut DeviceSolver<'a>,
        vds: f64,
        v0: f64,
        eq: Option<&[f64]>,
        observer: &'w dyn Observer,
    ) -> Result<Self, SolveError> {
        let grid = GateGrid::of(solver.scenario);
        let (f0, steps0) = (solver.solver.factorisations, solver.steps);
        let psi = match eq {
            Some(eq) => solver.ramp_drain(eq, v0, vds)?,
            None => solver.initial_state(v0, vds)?,
        };
        let off_psi = ((v0 - solver.scenario.bias.off_vgs_v).abs() < 1e-9).then(|| psi.clone());
        Ok(GateWalker {
            solver,
            observer,
            vds_v: vds,
            grid,
            psi,
            at_v: v0,
            prev: None,
            ends: [None, None],
            solved: BTreeMap::new(),
            off_psi,
            f0,
            steps0,
        })
    }

    /// The current at grid index `j` (solving it if needed); `None`: did not converge.
    /// A jump of several steps that fails is retried through its midpoint.
    pub fn at(&mut self, j: i64) -> Result<Option<f64>, SolveError> {
        if let Some(p) = self.solved.get(&j) {
            return Ok(p.current_a_per_um);
        }
        let vg = self.grid.vgs(j);
        let here = self.grid.index_of(self.at_v);
        if let Some(i) = self.try_point(vg)? {
            return Ok(Some(i));
        }
        let span = j as f64 - here;
        if span.abs() > 1.5 {
            self.solved.remove(&j);
            let mid = (here + 0.5 * span).round() as i64;
            if self.at(mid)?.is_some() {
                return self.at(j);
            }
        }
        Ok(None)
    }

    /// Solves `vg` from the last converged state (predictor when it continues
    /// a step of the same size and direction), records a grid point.
    fn try_point(&mut self, vg: f64) -> Result<Option<f64>, SolveError> {
        let vds = self.vds_v;
        let j = self.grid.index_of(vg).round() as i64;
        // Continue from the nearest converged state.
        let here = (vg - self.at_v).abs();
        let best = self
            .ends
            .iter()
            .flatten()
            .map(|(k, _)| (*k, (self.grid.vgs(*k) - vg).abs()))
            .min_by(|a, b| a.1.total_cmp(&b.1));
        if let Some((k, _)) = best.filter(|b| b.1 < here - 1e-9) {
            let e = self.ends.iter().flatten().find(|(i, _)| *i == k);
            self.psi = e.expect("end state").1.clone();
            self.at_v = self.grid.vgs(k);
            self.prev = None;
        }
        let mut guess = self.psi.clone();
        let predicted = match &self.prev {
            Some((pv, pp)) if ((vg - self.at_v) - (self.at_v - pv)).abs() < 1e-9 => {
                for (g, (a, b)) in guess.iter_mut().zip(self.psi.iter().zip(pp)) {
                    *g += a - b;
                }
                true
            }
            _ => false,
        };
        let (mut rep, mut t) = self.solver.solve_bias_point(&mut guess, vg, vds)?;
        if !rep.converged() && predicted {
            guess.copy_from_slice(&self.psi);
            (rep, t) = self.solver.solve_bias_point(&mut guess, vg, vds)?;
        }
        self.observer.bias_point(vds, vg, rep.converged());
        let converged = rep.converged();
        self.solved.insert(
            j,
            BiasPoint {
                vgs_v: vg,
                current_a_per_um: converged.then_some(t.current_a_per_um),
                report: rep,
            },
        );
        if converged {
            if (vg - self.solver.scenario.bias.off_vgs_v).abs() < 1e-9 {
                self.off_psi = Some(guess.clone());
            }
            if self.ends[0].as_ref().is_none_or(|e| j < e.0) {
                self.ends[0] = Some((j, guess.clone()));
            }
            if self.ends[1].as_ref().is_none_or(|e| j > e.0) {
                self.ends[1] = Some((j, guess.clone()));
            }
            let old = std::mem::replace(&mut self.psi, guess);
            self.prev = Some((self.at_v, old));
            self.at_v = vg;
            Ok(Some(t.current_a_per_um))
        } else {
            Ok(None)
        }
    }

    /// Solves the off-state gate voltage (`bias.off_vgs_V`) when it is not a
    /// grid point already solved; its potential is kept for the barrier.
    pub fn off_point(&mut self) -> Result<(), SolveError> {
        if self.off_psi.is_some() {
            return Ok(());
        }
        let off = self.solver.scenario.bias.off_vgs_v;
        let mut trial = self.psi.clone();
        let (rep, _) = self.solver.solve_bias_point(&mut trial, off, self.vds_v)?;
        if rep.converged() {
            self.off_psi = Some(trial);
        }
        Ok(())
    }

    /// The current of every solved grid point, by index.
    pub fn solved(&self) -> impl Iterator<Item = (i64, Option<f64>)> + '_ {
        self.solved.iter().map(|(&j, p)| (j, p.current_a_per_um))
    }

    /// The solved points in ramp order, with the solver's counts.
    pub fn finish(self) -> GateRamp {
        let g = self.grid;
        let mut extended_to_v = Vec::new();
        if let Some((&j, _)) = self.solved.first_key_value().filter(|(j, _)| **j < 0) {
            extended_to_v.push(g.vgs(j));
        }
        if let Some((&j, _)) = self.solved.last_key_value().filter(|(j, _)| **j > g.last) {
            extended_to_v.push(g.vgs(j));
        }
        GateRamp {
            vds_v: self.vds_v,
            points: self.solved.into_values().collect(),
            off_psi: self.off_psi,
            newton_steps: self.solver.steps - self.steps0,
            factorisations: self.solver.solver.factorisations - self.f0,
            extended_to_v,
        }
    }
}

impl DeviceSolver<'_> {
    /// Equilibrium (no drain bias) at gate voltage `vgs`, from local neutrality.
    pub fn equilibrium(&mut self, vgs: f64) -> Result<Vec<f64>, SolveError> {
        let p = self.problem();
        let mut psi = neutral_guess(p, &QuasiFermi::uniform(p.nx, 0.0, 0.0));
        let (rep, _) = self.solve_bias_point(&mut psi, vgs, 0.0)?;
        if !rep.converged() {
            return Err(SolveError::Factorisation(format!(
                "equilibrium at V_G = {vgs:.3} V failed: {}",
                rep.reason()
            )));
        }
        Ok(psi)
    }

    /// From the equilibrium `eq` at gate voltage `vgs`, the drain ramped up
    /// to `vds` in steps of at most 0.2 V with a linear predictor.
    pub fn ramp_drain(&mut self, eq: &[f64], vgs: f64, vds: f64) -> Result<Vec<f64>, SolveError> {
        let mut psi = eq.to_vec();
        let mut prev: Option<Vec<f64>> = None;
        let ramp = (vds.abs() / VDS_RAMP_STEP_V).ceil().max(1.0) as usize;
        for k in 1..=ramp {
            let v = vds * k as f64 / ramp as f64;
            let mut guess = psi.clone();
            if let Some(pp) = &prev {
                for (g, (a, b)) in guess.iter_mut().zip(psi.iter().zip(pp)) {
                    *g += a - b;
                }
            }
            let (mut rep, _) = self.solve_bias_point(&mut guess, vgs, v)?;
            if !rep.converged() && prev.is_some() {
                guess.copy_from_slice(&psi);
                (rep, _) = self.solve_bias_point(&mut guess, vgs, v)?;
            }
            if !rep.converged() {
                return Err(SolveError::Factorisation(format!(
                    "drain ramp failed at V_DS = {v:.3} V: {}",
                    rep.reason()
                )));
            }
            prev = Some(std::mem::replace(&mut psi, guess));
        }
        Ok(psi)
    }

    /// Equilibrium at the first gate voltage, then the drain ramped up to `vds`.
    pub fn initial_state(&mut self, vgs: f64, vds: f64) -> Result<Vec<f64>, SolveError> {
        let eq = self.equilibrium(vgs)?;
        self.ramp_drain(&eq, vgs, vds)
    }

    /// Every gate voltage of the user's grid at drain bias `vds`, from the
    /// off end, and the off-state point; `eq`: the equilibrium at the off end
    /// of the grid (`GateGrid::vgs(0)`) when already solved.
    pub fn gate_ramp(
        &mut self,
        vds: f64,
        eq: Option<&[f64]>,
        observer: &dyn Observer,
    ) -> Result<GateRamp, SolveError> {
        let grid = GateGrid::of(self.scenario);
        let off = self.scenario.bias.off_vgs_v;
        let mut w = GateWalker::start(self, vds, grid.vgs(0), eq, observer)?;
        for j in 0..=grid.last {
            // The off-state point, from the state before it, when it falls between grid points.
            if j > 0 && (off - grid.vgs(j - 1)) * (grid.vgs(j) - off) > 0.0 {
                w.off_point()?;
            }
            w.at(j)?;
        }
        w.off_point()?;
        Ok(w.finish())
    }
}
