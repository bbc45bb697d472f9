//! CSV export of a sweep's `points` table (one row per point, plan order).

use std::io::Write;

use super::{units_of, AxisValue, SweepFile};

fn quote(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_string()
    }
}

/// Numbers are written with Rust's `{}` for f64: plain decimal digits
/// (`12`, `0`, `0.0123`), never `1.2e1`, and they round-trip exactly.
///
/// Writes the header (`name [units]`) and one row per point: point_index,
/// axis columns, figures (empty when missing), status, meets_criteria,
/// method, warnings (joined with "; ").
pub fn write_points<W: Write>(f: &SweepFile, mut w: W) -> std::io::Result<()> {
    let mut head = vec!["point_index".to_string()];
    head.extend(f.axes.iter().map(|a| {
        if a.numeric {
            format!("{} [{}]", a.key, units_of(&a.key))
        } else {
            a.key.clone()
        }
    }));
    head.extend(f.figures.iter().map(|n| format!("{n} [{}]", units_of(n))));
    head.push("status".into());
    head.push("meets_criteria".into());
    head.push("method".into());
    head.push("warnings".into());
    writeln!(
        w,
        "{}",
        head.iter().map(|h| quote(h)).collect::<Vec<_>>().join(",")
    )?;
    for r in &f.rows {
        let mut cells = vec![r.index.to_string()];
        cells.extend(r.axis.iter().map(|v| match v {
            AxisValue::Number(x) => format!("{x}"),
            AxisValue::Text(s) => quote(s),
        }));
        cells.extend(
            r.figures
                .iter()
                .map(|v| v.map(|x| format!("{x}")).unwrap_or_default()),
        );
        cells.push(quote(r.status.as_str()));
        cells.push(r.meets_criteria.code().to_string());
        cells.push(r.method.map(|m| m.name()).unwrap_or("").to_string());
        cells.push(quote(&r.warnings.join("; ")));
        writeln!(w, "{}", cells.join(","))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    #[test]
    fn numbers_are_plain_and_round_trip() {
        for x in [12.0, 0.0, -0.0123, 1e-7, 2.5e-12, 123456.789] {
            let t = format!("{x}");
            assert!(!t.contains('e'), "{t}");
            assert_eq!(t.parse::<f64>().unwrap(), x, "{t}");
        }
    }
}
