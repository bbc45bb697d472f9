//! The shortest compliant gate length in words: one line per series, for the
//! end of `scan` and `sweep`.

use crate::evaluate::{AnswerKind, Criteria, ShortestAnswer};

/// One series' answer in words (`lambda_nm`: the series' numeric natural length).
pub fn answer_line(label: &str, a: &ShortestAnswer, lambda_nm: Option<f64>) -> String {
    let over = |l: f64| {
        lambda_nm
            .map(|m| format!(", L_g/lambda {:.2}", l / m))
            .unwrap_or_default()
    };
    let limit = a
        .limiting_criterion
        .map(|c| c.name().to_string())
        .unwrap_or_else(|| "none".into());
    let mut o = match (a.kind, a.gate_length_nm) {
        (AnswerKind::Interpolated, Some(l)) => {
            let (s, c) = a.bracket_nm.unwrap_or((f64::NAN, f64::NAN));
            format!(
                "{label}: shortest compliant L_g {l:.1} nm (interpolated between {s} and {c} nm), limited by {limit}{}",
                over(l)
            )
        }
        (AnswerKind::AtShortestSolved, Some(l)) => format!(
            "{label}: the shortest solved L_g {l} nm already complies (no criterion reached; solve shorter lengths){}",
            over(l)
        ),
        (AnswerKind::Swept, Some(l)) => format!(
            "{label}: shortest compliant L_g {l} nm (swept, not interpolated){}",
            over(l)
        ),
        (AnswerKind::NoneCompliant, _) => {
            format!("{label}: no solved length complies (most exceeded at the longest: {limit})")
        }
        _ => format!("{label}: not judged (no criteria or no usable point)"),
    };
    if a.gate_length_nm.is_some() {
        let f = |v: Option<f64>, unit: &str| {
            v.map(|x| format!("{x:.1} {unit}")).unwrap_or("n/a".into())
        };
        o.push_str(&format!(
            "; there DIBL {}, SS {}, |roll-off| {}",
            f(a.dibl_mv_per_v, "mV/V"),
            f(a.ss_mv_per_dec, "mV/dec"),
            f(a.vt_rolloff_abs_mv, "mV")
        ));
    }
    o.push('\n');
    for n in &a.notes {
        o.push_str(&format!("    note: {n}\n"));
    }
    o
}

/// The heading of the answer block.
pub fn heading(c: &Criteria) -> String {
    format!(
        "Shortest compliant gate length with {} (SS: the larger of lin and sat; DIBL and |roll-off| \
         interpolated log-linearly in L_g, SS linearly):\n",
        c.text()
    )
}
