//! Numbers as refusals print them: short, and exact to the digits a user
//! can mean. A value computed from the input (0.1 + 0.2, a pitch minus a
//! gate length) prints as `0.3`, not `0.30000000000000004`.

/// Significant digits a refusal prints: 12. More than any length, voltage or
/// doping in a device file needs, and few enough to hide the rounding of
/// sums and differences of typed values, even with cancellation
/// (20.3 - 20 = 0.3000000000000007 in binary; f64 holds 15 to 17 digits,
/// IEEE 754 binary64).
pub const DIGITS: usize = 12;

/// A number as an error message shows it: rounded to [`DIGITS`] significant
/// digits, then the shortest form of that (`0.3`, `49.9`, `2`); plain digits
/// in the usual range, scientific notation beyond (1e-300 prints as
/// `1e-300`, not 300 zeros).
pub fn show_number(x: f64) -> String {
    if x == 0.0 || !x.is_finite() {
        return format!("{x}");
    }
    // Rust's `{}` prints the shortest digits that read back to the same
    // f64; rounding to DIGITS first drops binary noise beyond them.
    let rounded: f64 = format!("{:.*e}", DIGITS - 1, x).parse().unwrap_or(x);
    if (1e-4..1e7).contains(&rounded.abs()) {
        format!("{rounded}")
    } else {
        format!("{rounded:e}")
    }
}

/// `text` with every decimal number of more than [`DIGITS`] significant
/// digits shown by [`show_number`]; everything else (names such as
/// `gate_stack.0.thickness_nm`, short numbers) is left as it is.
pub fn tidy_numbers(text: &str) -> String {
    let b = text.as_bytes();
    let mut out = String::with_capacity(text.len());
    let mut k = 0;
    while k < b.len() {
        let starts = b[k].is_ascii_digit()
            && (k == 0 || !(b[k - 1].is_ascii_alphanumeric() || b"_.\"".contains(&b[k - 1])));
        if !starts {
            let c = text[k..].chars().next().unwrap_or(' ');
            out.push(c);
            k += c.len_utf8();
            continue;
        }
        let mut end = k;
        while end < b.len() && (b[end].is_ascii_digit() || b[end] == b'.') {
            end += 1;
        }
        let mantissa_end = end;
        // An exponent: e, an optional sign, digits.
        if end < b.len() && (b[end] == b'e' || b[end] == b'E') {
            let mut e = end + 1;
            if e < b.len() && (b[e] == b'+' || b[e] == b'-') {
                e += 1;
            }
            if e < b.len() && b[e].is_ascii_digit() {
                while e < b.len() && b[e].is_ascii_digit() {
                    e += 1;
                }
                end = e;
            }
        }
        let token = &text[k..end];
        let significant = text[k..mantissa_end]
            .bytes()
            .filter(u8::is_ascii_digit)
            .skip_while(|&d| d == b'0')
            .count();
        match token.parse::<f64>() {
            // Long: binary noise beyond DIGITS, or hundreds of zeros (1e-300 via `{}`).
            Ok(x) if significant > DIGITS || token.len() > 24 => out.push_str(&show_number(x)),
            _ => out.push_str(token),
        }
        k = end;
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn computed_values_print_short() {
        // The values a refusal prints, against the decimal a user means
        // (exact decimal arithmetic, done by hand).
        assert_eq!(show_number(0.1 + 0.2), "0.3");
        assert_eq!(show_number(20.1 + 2.0 * 7.1 + 15.6), "49.9");
        assert_eq!(show_number(-(0.7 + 0.1)), "-0.8");
        assert_eq!(show_number(1e-300), "1e-300");
        assert_eq!(show_number(20.3 - 20.0), "0.3");
        assert_eq!(show_number(9.223_372_036_854_776e18), "9.22337203685e18");
        assert_eq!(show_number(123_456.789_012_345), "123456.789012");
        assert_eq!(show_number(0.0), "0");
        assert_eq!(show_number(f64::NAN), "NaN");
        assert_eq!(show_number(f64::NEG_INFINITY), "-inf");
        // Up to 12 significant digits print as typed.
        assert_eq!(show_number(100.000_000_01), "100.00000001");
        assert_eq!(show_number(-1_234.567_890_12), "-1234.56789012");
    }

    #[test]
    fn only_long_numbers_are_rewritten() {
        let x = 0.1 + 0.2;
        assert_eq!(
            tidy_numbers(&format!(
                "`gate_stack.0.thickness_nm` = {x}: sum = {} nm",
                49.900_000_000_000_006
            )),
            "`gate_stack.0.thickness_nm` = 0.3: sum = 49.9 nm"
        );
        assert_eq!(
            tidy_numbers(&format!("{:e} cm^-3", 1.000_000_000_000_000_2e20)),
            "1e20 cm^-3"
        );
        assert_eq!(
            tidy_numbers("range 0.5 to 1e8 V, x2.50000000000000001"),
            "range 0.5 to 1e8 V, x2.50000000000000001"
        );
        assert_eq!(tidy_numbers("-0.30000000000000004 V, µm"), "-0.3 V, µm");
        assert_eq!(tidy_numbers(""), "");
        assert_eq!(
            tidy_numbers(&format!("{} and {}", 1e-300, 1e300)),
            "1e-300 and 1e300"
        );
    }
}
