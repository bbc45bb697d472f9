//! Small-signal capacitances from the solve, and the on-current and delay
//! estimates built on them.
//!
//! C_ij = -dQ_i/dV_j (i != j) and C_ii = dQ_i/dV_i, with Q_i the charge of
//! electrode or region i from Gauss's law on the boxes
//! ([`Problem::node_charges_c_per_um`]). The derivatives come from the
//! linearised system at a converged solution, J dpsi = b, with the Jacobian
//! Newton uses (its symbolic factorisation reused): raising the potential of
//! terminal j by 1 V with the quasi-Fermi levels held gives b, and dpsi gives
//! every node's dQ. Held quasi-Fermi levels are exact for a gate step at
//! V_DS = 0: the carriers stay in equilibrium with the grounded source and
//! drain (quasi-static capacitance).
//!
//! A device's gate charge is split by where the opposite charge sits:
//! `gate_total = 2 gate_contact + 2 gate_source_drain + gate_channel + gate_other`,
//! where `gate_contact` is the capacitance to one contact plug and
//! `gate_source_drain` to the source/drain-type silicon beyond one gate edge
//! (the ohmic contact faces included) (both per side: the two sides agree at
//! V_DS = 0), `gate_channel` is the silicon between the gate edges
//! (inversion and depletion charge; its on-state value over L_g is the
//! inversion capacitance of the on-current estimate), and `gate_other` the
//! rest: back plane, substrate contact and channel-type silicon beyond the
//! gate edges (bulk body). Units: F per um of width (a double gate counts
//! both gates).

use serde::Serialize;

use crate::device::Scenario;
use crate::discretize::{NodeKind, Problem};
use crate::solve::{DeviceSolver, PoissonSolver, QuasiFermi, SolveError};
use crate::structure::{AlongChannel, GATE, PLUG_DRAIN, PLUG_SOURCE};

/// Gate-voltage step of the continuation from V_G = 0 to V_DD, V.
const GATE_STEP_V: f64 = 0.1;

/// Why the capacitances are missing.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum CapacitanceError {
    #[error(transparent)]
    Solve(#[from] SolveError),
    #[error("capacitance: the equilibrium solve at V_G = {gate_v} V, V_DS = 0 did not converge: {reason}")]
    NotConverged { gate_v: f64, reason: String },
}

/// The gate's capacitances in one state, F/um.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct GateCapacitance {
    /// C_gg = dQ_gate/dV_gate.
    pub gate_total: f64,
    /// To one contact plug (0 without plugs).
    pub gate_contact: f64,
    /// To the source/drain-type silicon beyond one gate edge.
    pub gate_source_drain: f64,
    /// To the silicon between the gate edges (intrinsic).
    pub gate_channel: f64,
    /// The rest (back plane, substrate, bulk body beyond the gate edges).
    pub gate_other: f64,
}

/// The `capacitance` object of `run --json` (a contract: `unit`, `off`, `on`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CapacitanceFigures {
    pub unit: &'static str,
    /// V_G = 0, V_DS = 0.
    pub off: GateCapacitance,
    /// V_G = V_DD = bias.vds_sat_V, V_DS = 0.
    pub on: GateCapacitance,
    pub relation: &'static str,
}

/// The relation between the figures, as printed in the JSON.
pub const RELATION: &str =
    "gate_total = 2 gate_contact + 2 gate_source_drain + gate_channel + gate_other \
(gate_contact and gate_source_drain per side; quasi-static, V_DS = 0)";

/// Where a node's charge is counted in the gate's partition.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Region {
    Gate,
    PlugSource,
    PlugDrain,
    /// Semiconductor between the gate edges (edges included).
    Channel,
    /// Source/drain-type semiconductor before the gate (ohmic contact included).
    Source,
    Drain,
    /// Everything else: dielectric nodes (no charge), back plane, substrate contact, body.
    Other,
}

/// The region of every node of a planar structure.
pub fn regions(s: &Scenario, a: &AlongChannel) -> Vec<Region> {
    let p = &a.problem;
    let sign = s.polarity.sign();
    (0..p.node_count())
        .map(|k| {
            let x = p.x.nodes[k % p.nx];
            match p.nodes[k] {
                NodeKind::Electrode(GATE) => Region::Gate,
                NodeKind::Electrode(PLUG_SOURCE) => Region::PlugSource,
                NodeKind::Electrode(PLUG_DRAIN) => Region::PlugDrain,
                NodeKind::Electrode(_) => Region::Other,
                _ if p.semi_area[k] == 0.0 => Region::Other,
                _ if x >= a.gate_start_nm - 1e-9 && x <= a.gate_end_nm + 1e-9 => Region::Channel,
                NodeKind::Contact(c) if c == crate::structure::SUBSTRATE => Region::Other,
                _ if sign * p.net_doping[k] <= 0.0 => Region::Other,
                _ if x < a.gate_start_nm => Region::Source,
                _ => Region::Drain,
            }
        })
        .collect()
}

/// dQ_k/dV (C/um per V = F/um) of every node when the Dirichlet nodes marked
/// in `raised` rise by 1 V, linearised at `psi` with quasi-Fermi levels `qf`.
pub fn charge_response(
    p: &Problem,
    solver: &mut PoissonSolver,
    psi: &[f64],
    qf: &QuasiFermi,
    raised: &[bool],
) -> Result<Vec<f64>, SolveError> {
    let dpsi = potential_response(p, solver, psi, qf, raised)?;
    Ok(p.node_charges_c_per_um(&dpsi))
}

/// dpsi_k/dV of every node (V/V) when the Dirichlet nodes marked in
/// `raised` rise by 1 V, linearised at `psi` with quasi-Fermi levels `qf`.
pub fn potential_response(
    p: &Problem,
    solver: &mut PoissonSolver,
    psi: &[f64],
    qf: &QuasiFermi,
    raised: &[bool],
) -> Result<Vec<f64>, SolveError> {
    let e: Vec<f64> = raised.iter().map(|&r| if r { 1.0 } else { 0.0 }).collect();
    let mut b: Vec<f64> = solver
        .unknown_nodes()
        .iter()
        .map(|&k| p.flux(&e, k).1)
        .collect();
    solver.solve_linearised(p, psi, qf, &mut b)?;
    let mut dpsi = e;
    for (&k, v) in solver.unknown_nodes().iter().zip(&b) {
        dpsi[k] = *v;
    }
    Ok(dpsi)
}

/// The Maxwell matrix M_ij = dQ_i/dV_j (F/um) of `terminals` terminals,
/// node k belonging to terminal `terminal_of[k]` (its Dirichlet nodes are
/// raised; its free nodes' charges count too). C_ij = -M_ij off the
/// diagonal, C_ii = M_ii.
pub fn maxwell_matrix(
    p: &Problem,
    solver: &mut PoissonSolver,
    psi: &[f64],
    qf: &QuasiFermi,
    terminal_of: &[Option<usize>],
    terminals: usize,
) -> Result<Vec<Vec<f64>>, SolveError> {
    // Column j: the terminals' charges when terminal j rises by 1 V.
    let mut columns = Vec::with_capacity(terminals);
    for j in 0..terminals {
        let raised: Vec<bool> = (0..p.node_count())
            .map(|k| p.nodes[k] != NodeKind::Free && terminal_of[k] == Some(j))
            .collect();
        let dq = charge_response(p, solver, psi, qf, &raised)?;
        let mut column = vec![0.0; terminals];
        for (q, t) in dq.iter().zip(terminal_of) {
            if let Some(i) = *t {
                column[i] += q;
            }
        }
        columns.push(column);
    }
    Ok((0..terminals)
        .map(|i| columns.iter().map(|c| c[i]).collect())
        .collect())
}

/// The gate's capacitances at the converged equilibrium `psi` (V_DS = 0).
pub fn gate_capacitance(
    s: &Scenario,
    a: &AlongChannel,
    solver: &mut PoissonSolver,
    psi: &[f64],
) -> Result<GateCapacitance, SolveError> {
    let p = &a.problem;
    let qf = QuasiFermi::uniform(p.nx, 0.0, 0.0);
    let raised: Vec<bool> = p
        .nodes
        .iter()
        .map(|n| *n == NodeKind::Electrode(GATE))
        .collect();
    let dq = charge_response(p, solver, psi, &qf, &raised)?;
    let region = regions(s, a);
    let sum = |r: Region| -> f64 {
        dq.iter()
            .zip(&region)
            .filter(|(_, g)| **g == r)
            .map(|(q, _)| q)
            .sum()
    };
    Ok(GateCapacitance {
        gate_total: sum(Region::Gate),
        gate_contact: -0.5 * (sum(Region::PlugSource) + sum(Region::PlugDrain)),
        gate_source_drain: -0.5 * (sum(Region::Source) + sum(Region::Drain)),
        gate_channel: -sum(Region::Channel),
        gate_other: -sum(Region::Other),
    })
}

/// Off (V_G = 0) and on (V_G = V_DD = `bias.vds_sat_V`) capacitances at
/// V_DS = 0: equilibrium solves (gate continuation in 0.1 V steps), then the
/// linearised gate response at each.
pub fn device_capacitance(
    s: &Scenario,
    a: &AlongChannel,
    solver: PoissonSolver,
) -> Result<CapacitanceFigures, CapacitanceError> {
    let mut ds = DeviceSolver::new(s, a, solver);
    let mut psi = ds.initial_state(0.0, 0.0)?;
    let off = gate_capacitance(s, a, &mut ds.solver, &psi)?;
    let vdd = s.bias.vds_sat_v;
    let steps = (vdd.abs() / GATE_STEP_V).ceil().max(1.0) as usize;
    for k in 1..=steps {
        let vg = vdd * k as f64 / steps as f64;
        let (rep, _) = ds.solve_bias_point(&mut psi, vg, 0.0)?;
        if !rep.converged() {
            return Err(CapacitanceError::NotConverged {
                gate_v: vg,
                reason: rep.reason(),
            });
        }
    }
    let on = gate_capacitance(s, a, &mut ds.solver, &psi)?;
    Ok(CapacitanceFigures {
        unit: "F/um",
        off,
        on,
        relation: RELATION,
    })
}

/// Screening estimate of the on-current per um of width, A/um: the
/// virtual-source form in saturation (Khakifirooz, Nayfeh and Antoniadis,
/// IEEE TED 56(8), 1674, 2009), I_on/W = C_inv (V_DD - V_t,sat) v_x0, with
/// C_inv = on-state gate-to-channel capacitance / L_g. None when V_DD does
/// not exceed V_t,sat (magnitudes for p-channel devices).
pub fn on_current_a_per_um(
    gate_channel_on_f_per_um: f64,
    gate_length_nm: f64,
    vdd_v: f64,
    vt_sat_v: f64,
    injection_velocity_nm_per_s: f64,
) -> Option<f64> {
    let overdrive = vdd_v.abs() - vt_sat_v * vdd_v.signum();
    if !(overdrive > 0.0 && gate_channel_on_f_per_um > 0.0) {
        return None;
    }
    let c_inv_f_per_um2 = gate_channel_on_f_per_um / (gate_length_nm * 1e-3);
    Some(c_inv_f_per_um2 * overdrive * injection_velocity_nm_per_s * 1e-3)
}

/// Delay estimate tau = (C_gg + 2 C_gc) V_DD / I_on, ps, with C_gg and
/// C_gc (one plug) the means of their off and on values (the trapezoid rule
/// for the charge a 0 to V_DD gate swing moves).
pub fn delay_ps(c: &CapacitanceFigures, vdd_v: f64, ion_a_per_um: f64) -> f64 {
    let cgg = 0.5 * (c.off.gate_total + c.on.gate_total);
    let cgc = 0.5 * (c.off.gate_contact + c.on.gate_contact);
    1e12 * (cgg + 2.0 * cgc) * vdd_v.abs() / ion_a_per_um.abs()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn on_current_units() {
        // 1e-15 F/um over 0.02 um = 5e-14 F/um^2 (5 uF/cm^2); overdrive
        // 0.5 V; v = 1e7 cm/s = 1e14 nm/s = 1e11 um/s:
        // 5e-14 * 0.5 * 1e11 = 2.5e-3 A/um (hand calculation of the virtual-source form).
        let i = on_current_a_per_um(1e-15, 20.0, 0.8, 0.3, 1e14).unwrap();
        assert!((i - 2.5e-3).abs() < 1e-15, "{i}");
        // p-channel: V_DD = -0.8, V_t = -0.3 gives the same magnitude.
        let ip = on_current_a_per_um(1e-15, 20.0, -0.8, -0.3, 1e14).unwrap();
        assert!((ip - i).abs() < 1e-15);
        assert!(on_current_a_per_um(1e-15, 20.0, 0.8, 0.9, 1e14).is_none());
    }
}
