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
//! cross-section solve at V_t,long and V = 0; for planar devices at the top
//! silicon surface of the long-channel column at V_t,long. Both come from
//! `crate::evaluate::reference`, which solves; this module only evaluates.
//! Signs follow the polarity: a p-channel device's roll-off is positive (|V_t| falls).
//!
//! The model is a screening estimate; it assumes L well above lambda, and
//! breaks down (an error, not a number) where 1 - 2 exp(-L/(2 lambda)) <= 0.

use super::TheoryError;
use crate::device::{Polarity, Scenario};

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
/// a p-channel device's roll-off has the opposite sign).
pub fn estimate(
    gate_length_nm: f64,
    lambda_nm: f64,
    barrier_v: f64,
    vds_lin_v: f64,
    vds_sat_v: f64,
    ss_long_mv_per_dec: f64,
    polarity: Polarity,
) -> Result<ShortChannelEstimate, TheoryError> {
    let sign = polarity.sign();
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
    si.ohmic_potential(0.0, s.polarity.sign() * s.doping.source_drain_per_nm3)
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

/// What the short-channel model needs from a device, all from solved inputs
/// (the numeric natural length, the long-channel reference and its barrier);
/// none of it depends on the gate length, so one value serves a whole scan over L.
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
    pub polarity: Polarity,
}

/// Which length the model's L stands for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum TheoryLength {
    /// The printed gate length L_g (the default).
    #[default]
    Gate,
    /// The electrical channel length L_elec from the solve: graded and abrupt
    /// junctions then get different theory figures. L_elec is shorter than
    /// the distance the electrostatics act over (it also counts the
    /// source/drain electrons spilling into the channel ends), so this reads
    /// pessimistic; it brackets the model from the other side.
    Electrical,
}

impl TheoryLength {
    /// "gate" or "electrical".
    pub fn name(&self) -> &'static str {
        match self {
            TheoryLength::Gate => "gate",
            TheoryLength::Electrical => "electrical",
        }
    }

    /// From "gate" or "electrical".
    pub fn from_name(s: &str) -> Option<TheoryLength> {
        match s {
            "gate" => Some(TheoryLength::Gate),
            "electrical" => Some(TheoryLength::Electrical),
            _ => None,
        }
    }
}

impl TheoryInputs {
    /// The model at the length `which` names: L_g, or `l_elec_nm` (an error
    /// when the electrical length is asked for and not known).
    pub fn at_length(
        &self,
        gate_length_nm: f64,
        l_elec_nm: Option<f64>,
        which: TheoryLength,
    ) -> Result<ShortChannelEstimate, TheoryError> {
        match which {
            TheoryLength::Gate => self.at(gate_length_nm),
            TheoryLength::Electrical => match l_elec_nm {
                Some(l) => self.at(l),
                None => Err(TheoryError::ModelBreakdown(format!(
                    "no electrical channel length at L_g = {gate_length_nm} nm (not solved)"
                ))),
            },
        }
    }

    /// The model's figures at gate length `l_nm`.
    pub fn at(&self, l_nm: f64) -> Result<ShortChannelEstimate, TheoryError> {
        estimate(
            l_nm,
            self.lambda_nm,
            self.barrier_v,
            self.vds_lin_v,
            self.vds_sat_v,
            self.ss_long_mv_per_dec,
            self.polarity,
        )
    }
}

#[cfg(test)]
mod length_tests {
    use super::*;

    #[test]
    fn theory_at_the_electrical_length_differs_from_the_gate_length() {
        let t = TheoryInputs {
            lambda_nm: 5.0,
            barrier_v: 0.5,
            vt_long_v: 0.3,
            ss_long_mv_per_dec: 60.0,
            vds_lin_v: 0.05,
            vds_sat_v: 0.8,
            polarity: Polarity::N,
        };
        let g = t.at_length(40.0, Some(30.0), TheoryLength::Gate).unwrap();
        let e = t
            .at_length(40.0, Some(30.0), TheoryLength::Electrical)
            .unwrap();
        assert_eq!(g, t.at(40.0).unwrap());
        assert_eq!(e, t.at(30.0).unwrap());
        // Shorter L: larger DIBL (Liu et al. 1993 factor decreasing in L).
        assert!(e.dibl_mv_per_v > g.dibl_mv_per_v);
        assert!(t.at_length(40.0, None, TheoryLength::Electrical).is_err());
        assert_eq!(
            TheoryLength::from_name("electrical"),
            Some(TheoryLength::Electrical)
        );
    }
}
