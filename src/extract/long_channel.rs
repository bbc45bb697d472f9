//! The long-channel reference (MODEL.md section 5): a cross-section solved
//! at a uniform channel quasi-Fermi level V gives the sheet density
//! N_s(V_G, V); a long device carries (gradual channel, Pao and Sah,
//! Solid-State Electronics 9, 927, 1966)
//! `I_D L / W = q mu int_0^{V_DS} N_s(V_G, V) dV`,
//! and V_t,long solves `I_D L / W = I_cc` at V_DS,lin. The same extraction
//! serves the planar 1D column and the fin or wire cross-section.

use crate::device::Scenario;
use crate::physics::Q_C;
use crate::solve::{UniformChannel, UniformSolveError};

/// Gauss-Legendre nodes and weights on [-1, 1], 8 points (digits as tabulated).
#[allow(clippy::excessive_precision)]
const GL8: [(f64, f64); 8] = [
    (-0.960_289_856_497_536_3, 0.101_228_536_290_376_26),
    (-0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (-0.525_532_409_916_329_0, 0.313_706_645_877_887_3),
    (-0.183_434_642_495_649_8, 0.362_683_783_378_362_0),
    (0.183_434_642_495_649_8, 0.362_683_783_378_362_0),
    (0.525_532_409_916_329_0, 0.313_706_645_877_887_3),
    (0.796_666_477_413_626_7, 0.222_381_034_453_374_47),
    (0.960_289_856_497_536_3, 0.101_228_536_290_376_26),
];

/// Long-channel figures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct LongChannel {
    /// Threshold voltage at V_DS,lin, V.
    pub vt_v: f64,
    /// Subthreshold swing in the middle of the SS window at V_DS,lin, mV/dec.
    pub ss_mv_per_dec: f64,
}

/// Failure of the long-channel reference.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum LongChannelError {
    #[error(transparent)]
    Solve(#[from] UniformSolveError),
    #[error("the long-channel current does not reach the criterion within the gate sweep {0:.3} to {1:.3} V; widen bias.vgs_start_V/vgs_stop_V by 0.5 V, or keep bias.auto_extend = true and raise bias.extend_limit_V by 0.5 V")]
    NotBracketed(f64, f64),
}

impl From<crate::solve::SolveError> for LongChannelError {
    fn from(e: crate::solve::SolveError) -> Self {
        LongChannelError::Solve(e.into())
    }
}

/// Long-channel I_D L / W (A) of a cross-section: q mu int_0^{V_DS} N_s dV
/// by 8-point Gauss-Legendre quadrature.
pub fn pao_sah_current_l_over_w(
    dev: &mut UniformChannel,
    vgs: f64,
    vds: f64,
) -> Result<f64, LongChannelError> {
    let half = 0.5 * vds;
    let mut sum = 0.0;
    for (t, w) in GL8 {
        sum += w * dev.sheet_density(vgs, half * (1.0 + t))?;
    }
    // |int_0^vds N dV| = |half| * sum
    Ok(Q_C * dev.mobility_nm2_per_vs * half.abs() * sum)
}

/// V_t,long (constant current I_cc at V_DS,lin, bias grid of `s`) and the
/// long-channel SS of a cross-section; also returns the Newton steps spent.
pub fn extract_long_channel(
    col: &mut UniformChannel,
    s: &Scenario,
) -> Result<(LongChannel, usize), LongChannelError> {
    let b = &s.bias;
    let sign = s.polarity.sign();
    let target = s.extraction.current_criterion_a;
    let vds = b.vds_lin_v;
    // Gate voltages from the off end toward the on end; with bias.auto_extend
    // the same grid continues beyond the on end (and, when the first point
    // is already on, beyond the off end), as the drain sweeps do.
    let g = crate::solve::ramp::GateGrid::of(s);
    let grid: Vec<f64> = (0..=g.max_index).map(|j| g.vgs(j)).collect();
    let log_i = |col: &mut UniformChannel, vg: f64| -> Result<f64, LongChannelError> {
        Ok(pao_sah_current_l_over_w(col, vg, vds)?.log10())
    };
    let lt = target.log10();
    let mut prev: Option<(f64, f64)> = None;
    let mut bracket = None;
    for &vg in &grid {
        let li = log_i(col, vg)?;
        if li >= lt {
            bracket = prev.map(|p| (p, (vg, li)));
            break;
        }
        prev = Some((vg, li));
    }
    if bracket.is_none() && prev.is_none() {
        // Already on at the off end: walk toward off.
        let mut next = (g.vgs(0), log_i(col, g.vgs(0))?);
        for j in (g.min_index..0).rev() {
            let vg = g.vgs(j);
            let li = log_i(col, vg)?;
            if li < lt {
                bracket = Some(((vg, li), next));
                break;
            }
            next = (vg, li);
        }
    }
    let ((mut va, mut la), (mut vb, mut lb)) =
        bracket.ok_or(LongChannelError::NotBracketed(b.vgs_start_v, b.vgs_stop_v))?;
    // Illinois false position on log10 I (monotone in V_G).
    let mut side = 0i32;
    let mut vt_v = va;
    for _ in 0..60 {
        vt_v = vb - (lb - lt) * (vb - va) / (lb - la);
        let lv = log_i(col, vt_v)?;
        if (lv - lt).abs() < 1e-10 || (vb - va).abs() < 1e-9 {
            break;
        }
        if (lv - lt) * (lb - lt) > 0.0 {
            vb = vt_v;
            lb = lv;
            if side == 1 {
                la = lt + 0.5 * (la - lt);
            }
            side = 1;
        } else {
            va = vt_v;
            la = lv;
            if side == -1 {
                lb = lt + 0.5 * (lb - lt);
            }
            side = -1;
        }
    }
    // SS at the middle of the SS window (1e-2 of the criterion): about 2 decades below V_t.
    let mut v_mid = vt_v - sign * 0.12;
    for _ in 0..30 {
        let d = 1e-3 * sign;
        let l0 = log_i(col, v_mid)?;
        let slope = (log_i(col, v_mid + d)? - l0) / d;
        let step = (lt - 2.0 - l0) / slope;
        v_mid += step;
        if step.abs() < 1e-6 {
            break;
        }
    }
    let h = 2e-3;
    let slope = (log_i(col, v_mid + h)? - log_i(col, v_mid - h)?) / (2.0 * h);
    let steps = col.steps;
    Ok((
        LongChannel {
            vt_v,
            ss_mv_per_dec: 1000.0 / slope.abs(),
        },
        steps,
    ))
}

/// Depth (nm) below the top silicon surface of a planar column at which the
/// majority-carrier density recovers to half the channel doping `na` (nm^-3),
/// log-linear between nodes, from the column's last solve; None when it never does.
pub fn depletion_depth_nm(col: &UniformChannel, na: f64) -> Option<f64> {
    let p = &col.problem;
    let target = 0.5 * na;
    let mut prev: Option<(f64, f64)> = None;
    for j in 0..p.ny {
        let k = j * p.nx;
        if p.semi_area[k] <= 0.0 {
            continue;
        }
        let y = p.y.nodes[j];
        let m = col.majority_density(k);
        if m >= target {
            return Some(match prev {
                Some((y0, m0)) if m0 > 0.0 => {
                    let t = (target.ln() - m0.ln()) / (m.ln() - m0.ln());
                    y0 + t.clamp(0.0, 1.0) * (y - y0)
                }
                _ => y,
            });
        }
        prev = Some((y, m));
    }
    None
}
