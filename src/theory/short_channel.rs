//! Short-channel estimates from the natural length: the quasi-2D model of
//! Liu et al. (IEEE Trans. Electron Devices 40(1), 86, 1993), as written in
//! MODEL.md section 6 (from memory there; the lead's 2D solves check it):
//!
//! - dV_t(L) = -[2 (V_bi - phi_s) + V_DS] [exp(-L/(2 lambda)) + 2 exp(-L/lambda)]
//! - DIBL = exp(-L/(2 lambda)) + 2 exp(-L/lambda)  (V/V)
//! - SS(L) = SS_long / (1 - 2 exp(-L/(2 lambda)))
//!
//! V_bi - phi_s is the height, in volts, of the source barrier at
//! threshold: with potentials measured from the source Fermi level (the
//! model's reference cancels in the difference), V_bi is the source/drain
//! potential at charge neutrality, `V_T asinh(N_SD / (2 n_i))`, and phi_s the
//! channel potential at the long-channel threshold. For fins and wires phi_s
//! is taken at the leakiest point of the cross-section (the silicon node with
//! the highest barrier, i.e. the lowest potential for electrons), from the
//! cross-section solve at V_t,long and V = 0; for planar devices
//! ([`planar_barrier_v`]) at the top silicon surface of the long-channel
//! column at V_t,long. Signs follow the polarity: a
//! p-channel device's roll-off is positive (|V_t| falls).
//!
//! The model is a screening estimate; it assumes L well above lambda, and
//! breaks down (an error, not a number) where 1 - 2 exp(-L/(2 lambda)) <= 0.

use super::lambda::{section_natural_lengths, Verdict};
use super::TheoryError;
use crate::crosssection::{FinChannel, WIDTH_DEFINITION};
use crate::device::Scenario;
use crate::long_channel::extract_long_channel;
use crate::physics::PER_CM3_TO_PER_NM3;

/// exp(-L/(2 lambda)) + 2 exp(-L/lambda): the Liu et al. 1993 short-channel factor.
pub fn liu_factor(gate_length_nm: f64, lambda_nm: f64) -> f64 {
    (-gate_length_nm / (2.0 * lambda_nm)).exp() + 2.0 * (-gate_length_nm / lambda_nm).exp()
}

/// Threshold shift dV_t (V) at drain bias magnitude `vds_abs_v` for an
/// n-channel device (negative: roll-off); multiply by -1 for p-channel.
pub fn threshold_shift_v(
    gate_length_nm: f64,
    lambda_nm: f64,
    barrier_v: f64,
    vds_abs_v: f64,
) -> f64 {
    -(2.0 * barrier_v + vds_abs_v) * liu_factor(gate_length_nm, lambda_nm)
}

/// DIBL of the model, mV/V.
pub fn dibl_mv_per_v(gate_length_nm: f64, lambda_nm: f64) -> f64 {
    1000.0 * liu_factor(gate_length_nm, lambda_nm)
}

/// SS(L) of the model, mV/dec; an error where the model breaks down.
pub fn swing_mv_per_dec(
    ss_long_mv_per_dec: f64,
    gate_length_nm: f64,
    lambda_nm: f64,
) -> Result<f64, TheoryError> {
    let d = 1.0 - 2.0 * (-gate_length_nm / (2.0 * lambda_nm)).exp();
    if d <= 0.0 {
        return Err(TheoryError::ModelBreakdown(format!(
            "L = {gate_length_nm:.3} nm is below 2 ln 2 lambda = {:.3} nm: the gate has lost the barrier (SS diverges)",
            2.0 * std::f64::consts::LN_2 * lambda_nm
        )));
    }
    Ok(ss_long_mv_per_dec / d)
}

/// Short-channel estimates at one gate length.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct ShortChannelEstimate {
    pub gate_length_nm: f64,
    pub lambda_nm: f64,
    /// V_bi - phi_s, V.
    pub barrier_v: f64,
    /// Threshold roll-off V_t(L) - V_t,long at V_DS,lin and V_DS,sat, V.
    pub roll_off_lin_v: f64,
    pub roll_off_sat_v: f64,
    pub dibl_mv_per_v: f64,
    pub ss_mv_per_dec: f64,
}

/// The model's figures at `gate_length_nm` (drain biases as typed, signed;
/// `sign` +1 for n-channel, -1 for p-channel).
pub fn estimate(
    gate_length_nm: f64,
    lambda_nm: f64,
    barrier_v: f64,
    vds_lin_v: f64,
    vds_sat_v: f64,
    ss_long_mv_per_dec: f64,
    sign: f64,
) -> Result<ShortChannelEstimate, TheoryError> {
    for (what, v) in [("gate_length_nm", gate_length_nm), ("lambda_nm", lambda_nm)] {
        if !(v.is_finite() && v > 0.0) {
            return Err(TheoryError::InvalidInput {
                what: what.into(),
                value: v,
                reason: "must be finite and > 0".into(),
            });
        }
    }
    Ok(ShortChannelEstimate {
        gate_length_nm,
        lambda_nm,
        barrier_v,
        roll_off_lin_v: sign
            * threshold_shift_v(gate_length_nm, lambda_nm, barrier_v, vds_lin_v.abs()),
        roll_off_sat_v: sign
            * threshold_shift_v(gate_length_nm, lambda_nm, barrier_v, vds_sat_v.abs()),
        dibl_mv_per_v: dibl_mv_per_v(gate_length_nm, lambda_nm),
        ss_mv_per_dec: swing_mv_per_dec(ss_long_mv_per_dec, gate_length_nm, lambda_nm)?,
    })
}

/// Result of [`fit_lambda_from_dibl`].
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct LambdaFit {
    pub lambda_nm: f64,
    /// exp(intercept): the fitted prefactor A of DIBL = A exp(-L/(2 lambda)), V/V (1 in the model).
    pub prefactor: f64,
    /// Coefficient of determination of the line.
    pub r_squared: f64,
    pub points: usize,
}

/// Fits lambda from (gate length nm, DIBL mV/V) pairs.
///
/// What is fitted, exactly: a least-squares line ln(DIBL_i - floor) = a + b L_i
/// (DIBL in V/V), and lambda = -1/(2 b). That is the leading term
/// exp(-L/(2 lambda)) of the Liu et al. 1993 DIBL; the 2 exp(-L/lambda) term
/// is neglected, which biases lambda low (about 3 % for L from 6 to 12 lambda) unless every L is
/// well above 6 lambda. `floor_mv_per_v` is subtracted from every DIBL
/// explicitly (e.g. the constant-current long-channel floor of MODEL.md
/// section 5; pass 0 to fit the values as given). Needs two distinct gate
/// lengths and every DIBL above the floor.
pub fn fit_lambda_from_dibl(
    points: &[(f64, f64)],
    floor_mv_per_v: f64,
) -> Result<LambdaFit, TheoryError> {
    if points.len() < 2 {
        return Err(TheoryError::InvalidInput {
            what: "DIBL points".into(),
            value: points.len() as f64,
            reason: "need at least two (L, DIBL) pairs".into(),
        });
    }
    let mut xs = Vec::with_capacity(points.len());
    let mut ys = Vec::with_capacity(points.len());
    for &(l, d) in points {
        let v = (d - floor_mv_per_v) / 1000.0;
        if !(l.is_finite() && l > 0.0) {
            return Err(TheoryError::InvalidInput {
                what: "gate length nm".into(),
                value: l,
                reason: "must be finite and > 0".into(),
            });
        }
        if !(v.is_finite() && v > 0.0) {
            return Err(TheoryError::InvalidInput {
                what: format!("DIBL at L = {l} nm, mV/V"),
                value: d,
                reason: format!("must exceed the floor {floor_mv_per_v} mV/V"),
            });
        }
        xs.push(l);
        ys.push(v.ln());
    }
    let n = xs.len() as f64;
    let mx = xs.iter().sum::<f64>() / n;
    let my = ys.iter().sum::<f64>() / n;
    let sxx: f64 = xs.iter().map(|x| (x - mx).powi(2)).sum();
    let sxy: f64 = xs.iter().zip(&ys).map(|(x, y)| (x - mx) * (y - my)).sum();
    let syy: f64 = ys.iter().map(|y| (y - my).powi(2)).sum();
    if sxx <= 0.0 {
        return Err(TheoryError::InvalidInput {
            what: "gate lengths".into(),
            value: mx,
            reason: "all equal: no slope".into(),
        });
    }
    let b = sxy / sxx;
    if b >= 0.0 {
        return Err(TheoryError::InvalidInput {
            what: "slope of ln DIBL vs L, 1/nm".into(),
            value: b,
            reason: "DIBL does not fall with gate length".into(),
        });
    }
    let a = my - b * mx;
    Ok(LambdaFit {
        lambda_nm: -1.0 / (2.0 * b),
        prefactor: a.exp(),
        r_squared: if syy > 0.0 {
            sxy * sxy / (sxx * syy)
        } else {
            1.0
        },
        points: xs.len(),
    })
}

/// Source/drain potential at charge neutrality, V (relative to the intrinsic
/// level, source Fermi level at 0): sign V_T asinh(N_SD / (2 n_i)).
pub fn source_drain_potential_v(s: &Scenario) -> f64 {
    let si = crate::physics::Silicon::at(s.temperature_k);
    si.ohmic_potential(
        0.0,
        s.polarity.sign() * s.doping.source_drain_cm3 * PER_CM3_TO_PER_NM3,
    )
}

/// V_bi - phi_s (V, polarity-signed) of a planar device: phi_s is the
/// surface potential (top silicon node, y = 0) of the long-channel 1D column
/// at V_t,long and V = 0; also returns V_t,long (V) and SS_long (mV/dec). For
/// use with [`estimate`] beside the 2D along-channel solves.
pub fn planar_barrier_v(s: &Scenario) -> Result<(f64, f64, f64), TheoryError> {
    if !s.architecture.is_planar() {
        return Err(TheoryError::NotApplicable {
            what: "planar barrier".into(),
            architecture: s.architecture,
        });
    }
    let (lc, _) = crate::long_channel::long_channel(s)?;
    let mut col =
        crate::long_channel::Column::new(s).map_err(crate::long_channel::LongChannelError::from)?;
    col.sheet_density(lc.vt_v, 0.0)?;
    let p = &col.problem;
    let j0 = p.y.index_of(0.0).ok_or_else(|| TheoryError::InvalidInput {
        what: "silicon surface y_nm".into(),
        value: 0.0,
        reason: "not a mesh line".into(),
    })?;
    let phi_s = col.potential()[j0 * p.nx];
    Ok((
        s.polarity.sign() * (source_drain_potential_v(s) - phi_s),
        lc.vt_v,
        lc.ss_mv_per_dec,
    ))
}

/// Predictions for a fin or wire device: long-channel V_t and SS from the
/// cross-section nonlinear Poisson solve (Pao-Sah), corner inversion, and
/// the theory (Liu et al. 1993 with the numeric body lambda) at the
/// scenario's gate length. Every short-channel figure here is theory, not a
/// 2D along-channel solve.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct FinPrediction {
    pub name: String,
    pub architecture: String,
    /// Always "theory: Liu et al. 1993 quasi-2D model with the numeric body natural length".
    pub kind: String,
    /// Device width W, nm, and how it is defined.
    pub width_nm: f64,
    pub width_definition: String,
    pub gate_length_nm: f64,
    pub lambda_nm: f64,
    pub body_mode_silicon_fraction: f64,
    pub lambda_dielectric_path_nm: Option<f64>,
    pub dielectric_path_region: Option<String>,
    pub lg_over_lambda: f64,
    pub verdict: Verdict,
    /// Long-channel threshold (I_D = I_cc W/L at V_DS,lin, Pao-Sah), V.
    pub vt_long_v: f64,
    pub ss_long_mv_per_dec: f64,
    /// Channel-carrier density at the top corner (x = W/2, y = 0) over that at
    /// the centre of the top silicon face, at V_t,long and V = 0.
    pub corner_to_top_centre_ratio: f64,
    /// ... and over that at the middle of the side face (x = W/2, y = H/2).
    pub corner_to_side_centre_ratio: f64,
    /// phi_s: potential of the leakiest silicon node at V_t,long, V.
    pub channel_potential_at_threshold_v: f64,
    /// V_bi: source/drain potential at neutrality, V.
    pub source_drain_potential_v: f64,
    /// V_bi - phi_s (polarity-signed, positive for a barrier), V.
    pub barrier_v: f64,
    /// Theory at the gate length.
    pub vt_lin_v: f64,
    pub vt_sat_v: f64,
    pub roll_off_lin_v: f64,
    pub roll_off_sat_v: f64,
    pub dibl_mv_per_v: f64,
    pub ss_mv_per_dec: f64,
    /// Newton steps of the cross-section solve (solved once per cross-section in a process;
    /// other gate lengths of the same cross-section reuse it).
    pub newton_steps: usize,
    pub cross_section_nodes: usize,
}

/// Long-channel cross-section solve plus the theory's short-channel figures
/// for a tri-gate, gate-all-around or capped-fin scenario.
pub fn predict_fin(s: &Scenario) -> Result<FinPrediction, TheoryError> {
    if !s.architecture.is_fin() {
        return Err(TheoryError::NotApplicable {
            what: "fin prediction".into(),
            architecture: s.architecture,
        });
    }
    let f = fin_long_channel(s)?;
    let sign = s.polarity.sign();
    let lg = s.geometry.gate_length_nm;
    let lambda = f.lambda_nm;
    let est = estimate(
        lg,
        lambda,
        f.barrier_v,
        s.bias.vds_lin_v,
        s.bias.vds_sat_v,
        f.ss_long_mv_per_dec,
        sign,
    )?;
    Ok(FinPrediction {
        name: s.name.clone(),
        architecture: s.architecture.name().into(),
        kind: "theory: Liu et al. 1993 quasi-2D model with the numeric body natural length".into(),
        width_nm: f.width_nm,
        width_definition: WIDTH_DEFINITION.into(),
        gate_length_nm: lg,
        lambda_nm: lambda,
        body_mode_silicon_fraction: f.silicon_fraction,
        lambda_dielectric_path_nm: f.dielectric_path_nm,
        dielectric_path_region: f.dielectric_path_region.clone(),
        lg_over_lambda: lg / lambda,
        verdict: Verdict::of(lg / lambda),
        vt_long_v: f.vt_long_v,
        ss_long_mv_per_dec: f.ss_long_mv_per_dec,
        corner_to_top_centre_ratio: f.corner_to_top,
        corner_to_side_centre_ratio: f.corner_to_side,
        channel_potential_at_threshold_v: f.phi_s_v,
        source_drain_potential_v: f.vbi_v,
        barrier_v: f.barrier_v,
        vt_lin_v: f.vt_long_v + est.roll_off_lin_v,
        vt_sat_v: f.vt_long_v + est.roll_off_sat_v,
        roll_off_lin_v: est.roll_off_lin_v,
        roll_off_sat_v: est.roll_off_sat_v,
        dibl_mv_per_v: est.dibl_mv_per_v,
        ss_mv_per_dec: est.ss_mv_per_dec,
        newton_steps: f.newton_steps,
        cross_section_nodes: f.nodes,
    })
}

/// The gate-length-independent part of a fin prediction: the cross-section's
/// natural length, long-channel V_t and SS (the Pao-Sah criterion I_cc W/L
/// makes V_t,long independent of L), corner inversion and the barrier.
#[derive(Debug, Clone, PartialEq)]
struct FinLongChannel {
    lambda_nm: f64,
    silicon_fraction: f64,
    dielectric_path_nm: Option<f64>,
    dielectric_path_region: Option<String>,
    vt_long_v: f64,
    ss_long_mv_per_dec: f64,
    corner_to_top: f64,
    corner_to_side: f64,
    phi_s_v: f64,
    vbi_v: f64,
    barrier_v: f64,
    width_nm: f64,
    newton_steps: usize,
    nodes: usize,
}

/// Cross-section results already computed in this process, keyed by the
/// scenario with its name and gate length blanked (a sweep over L solves the
/// cross-section once). Bounded: cleared when it holds this many.
const FIN_CACHE_SIZE: usize = 256;

fn fin_long_channel(s: &Scenario) -> Result<std::sync::Arc<FinLongChannel>, TheoryError> {
    use std::collections::HashMap;
    use std::sync::{Arc, Mutex, OnceLock};
    static CACHE: OnceLock<Mutex<HashMap<String, Arc<FinLongChannel>>>> = OnceLock::new();
    let mut key_scenario = s.clone();
    key_scenario.name.clear();
    key_scenario.geometry.gate_length_nm = 0.0;
    key_scenario.warnings.clear();
    let key = serde_json::to_string(&key_scenario).expect("scenario serialises");
    let cache = CACHE.get_or_init(|| Mutex::new(HashMap::new()));
    if let Some(hit) = cache.lock().expect("fin cache").get(&key) {
        return Ok(hit.clone());
    }
    let computed = Arc::new(compute_fin_long_channel(s)?);
    let mut map = cache.lock().expect("fin cache");
    if map.len() >= FIN_CACHE_SIZE {
        map.clear();
    }
    map.insert(key, computed.clone());
    Ok(computed)
}

fn compute_fin_long_channel(s: &Scenario) -> Result<FinLongChannel, TheoryError> {
    let mut fin = FinChannel::new(s)?;
    let sl = section_natural_lengths(&fin.section)?;
    let (lc, _) = extract_long_channel(&mut fin, s)?;
    fin.line_density(lc.vt_v, 0.0)?;
    let sign = s.polarity.sign();
    let cs = &fin.section;
    let n_corner = fin.carrier_density(cs.corner_node, 0.0);
    let n_top = fin.carrier_density(cs.top_centre_node, 0.0);
    let n_side = fin.carrier_density(cs.side_centre_node, 0.0);
    let p = &cs.problem;
    let psi = fin.potential();
    let phi_s = p
        .semi_area
        .iter()
        .enumerate()
        .filter(|(_, a)| **a > 0.0)
        .map(|(k, _)| psi[k])
        .min_by(|a, b| (sign * a).total_cmp(&(sign * b)))
        .ok_or_else(|| TheoryError::InvalidInput {
            what: "fin silicon area nm^2".into(),
            value: 0.0,
            reason: "no silicon nodes".into(),
        })?;
    let vbi = source_drain_potential_v(s);
    Ok(FinLongChannel {
        lambda_nm: sl.body.lambda_nm,
        silicon_fraction: sl.body.silicon_fraction,
        dielectric_path_nm: sl.dielectric_path.as_ref().map(|m| m.lambda_nm),
        dielectric_path_region: sl
            .dielectric_path
            .as_ref()
            .map(|m| m.region.describe().into()),
        vt_long_v: lc.vt_v,
        ss_long_mv_per_dec: lc.ss_mv_per_dec,
        corner_to_top: n_corner / n_top,
        corner_to_side: n_corner / n_side,
        phi_s_v: phi_s,
        vbi_v: vbi,
        barrier_v: sign * (vbi - phi_s),
        width_nm: cs.width_nm,
        newton_steps: fin.steps,
        nodes: p.node_count(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn model_dibl_is_minus_the_vds_derivative_of_the_shift() {
        // MODEL.md section 6: DIBL = -d(dV_t)/dV_DS.
        let (l, lam, b) = (30.0, 5.0, 0.3);
        let d = (threshold_shift_v(l, lam, b, 0.05) - threshold_shift_v(l, lam, b, 0.8)) / 0.75;
        assert!((d * 1000.0 - dibl_mv_per_v(l, lam)).abs() < 1e-9);
        // Check a value by hand: exp(-3) + 2 exp(-6) = 0.0497871 + 0.0049575.
        assert!(
            (dibl_mv_per_v(l, lam) - 54.7446).abs() < 1e-3,
            "{}",
            dibl_mv_per_v(l, lam)
        );
        assert!(swing_mv_per_dec(60.0, 2.0, 5.0).is_err());
    }

    #[test]
    fn fit_recovers_lambda_from_model_dibl() {
        // DIBL generated by the full Liu model at L = 6..12 lambda: the slope fit of the
        // leading term returns lambda within 4 % (the neglected 2 exp(-L/lambda) term biases it low).
        let lam = 4.0;
        let pts: Vec<(f64, f64)> = [24.0, 30.0, 36.0, 48.0]
            .iter()
            .map(|&l| (l, dibl_mv_per_v(l, lam)))
            .collect();
        let f = fit_lambda_from_dibl(&pts, 0.0).unwrap();
        assert!(f.lambda_nm < lam && f.lambda_nm > 0.96 * lam, "{f:?}");
        // A floor is subtracted explicitly.
        let shifted: Vec<(f64, f64)> = pts.iter().map(|&(l, d)| (l, d + 5.0)).collect();
        let g = fit_lambda_from_dibl(&shifted, 5.0).unwrap();
        assert!((g.lambda_nm - f.lambda_nm).abs() < 1e-9);
        assert!(fit_lambda_from_dibl(&pts[..1], 0.0).is_err());
    }
}

/// What the short-channel model needs from a device; none of it depends on
/// the gate length, so one call serves a whole scan over L.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize)]
pub struct TheoryInputs {
    /// Numeric body natural length, nm.
    pub lambda_nm: f64,
    /// V_bi - phi_s, V.
    pub barrier_v: f64,
    pub vt_long_v: f64,
    pub ss_long_mv_per_dec: f64,
    pub vds_lin_v: f64,
    pub vds_sat_v: f64,
    pub sign: f64,
}

/// The model's inputs for any architecture: the numeric lambda, and the
/// barrier and long-channel figures from the 1D column (planar) or the
/// cross-section (fins and wires).
pub fn theory_inputs(s: &Scenario) -> Result<TheoryInputs, TheoryError> {
    theory_inputs_with_lambda(s, crate::theory::lambda_report(s)?.lambda_numeric_nm)
}

/// [`theory_inputs`] with the numeric natural length already known (nm).
pub fn theory_inputs_with_lambda(
    s: &Scenario,
    lambda_nm: f64,
) -> Result<TheoryInputs, TheoryError> {
    let (barrier_v, vt_long_v, ss_long_mv_per_dec) = if s.architecture.is_planar() {
        planar_barrier_v(s)?
    } else {
        let f = predict_fin(s)?;
        (f.barrier_v, f.vt_long_v, f.ss_long_mv_per_dec)
    };
    Ok(TheoryInputs {
        lambda_nm,
        barrier_v,
        vt_long_v,
        ss_long_mv_per_dec,
        vds_lin_v: s.bias.vds_lin_v,
        vds_sat_v: s.bias.vds_sat_v,
        sign: s.polarity.sign(),
    })
}

impl TheoryInputs {
    /// The model's figures at gate length `l_nm`.
    pub fn at(&self, l_nm: f64) -> Result<ShortChannelEstimate, TheoryError> {
        estimate(
            l_nm,
            self.lambda_nm,
            self.barrier_v,
            self.vds_lin_v,
            self.vds_sat_v,
            self.ss_long_mv_per_dec,
            self.sign,
        )
    }
}
