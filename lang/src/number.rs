//! Exact reading of numeric literals: `0.1` is 1/10, `1e-10` is 1/10^10.

use num_bigint::BigInt;
use num_rational::BigRational;
use num_traits::{One, Zero};

/// Literals past these sizes are refused rather than expanded (a 10^6-digit literal or
/// `1e1000000` would take the machine's memory and time for nothing). The digit limit is
/// the `max_digits` setting (default `MAX_LITERAL_DIGITS`), at most `MAX_LITERAL_DIGITS_HARD`,
/// which is all [`parse_exact`] takes.
pub const MAX_LITERAL_DIGITS: usize = 10_000;
pub const MAX_LITERAL_DIGITS_HARD: usize = 100_000;
pub const MAX_DECIMAL_EXPONENT: i64 = 10_000;

/// Why a literal would be refused at the default digit limit.
pub fn literal_error(text: &str) -> Option<String> {
    literal_error_with(text, MAX_LITERAL_DIGITS)
}

/// Why a literal would be refused with at most `max_digits` digits, without building the
/// number (the checker validates every literal; only the evaluator needs its value).
pub fn literal_error_with(text: &str, max_digits: usize) -> Option<String> {
    let (mantissa, exp) = match text.find(['e', 'E']) {
        Some(i) => match text[i + 1..].parse::<i64>() {
            Ok(e) => (&text[..i], e),
            Err(_) => {
                return Some(format!("the exponent of `{text}` is too large (at most {MAX_DECIMAL_EXPONENT} in size)"))
            }
        },
        None => (text, 0),
    };
    if exp.abs() > MAX_DECIMAL_EXPONENT {
        return Some(format!("the exponent of `{text}` is too large (at most {MAX_DECIMAL_EXPONENT} in size)"));
    }
    let digits = mantissa.bytes().filter(|b| *b != b'.').count();
    if digits > max_digits {
        return Some(format!(
            "a literal of {digits} digits is longer than the supported {max_digits} (the `max_digits` setting)"
        ));
    }
    if digits == 0
        || mantissa.bytes().filter(|b| *b == b'.').count() > 1
        || !mantissa.bytes().all(|b| b.is_ascii_digit() || b == b'.')
    {
        return Some(format!("`{text}` is not a number"));
    }
    None
}

/// Parses an integer or decimal literal exactly. The error says why it was refused.
pub fn parse_exact(text: &str) -> Result<BigRational, String> {
    let (mantissa, exp) = match text.find(['e', 'E']) {
        Some(i) => {
            let e: i64 = text[i + 1..].parse().map_err(|_| {
                format!("the exponent of `{text}` is too large (at most {MAX_DECIMAL_EXPONENT} in size)")
            })?;
            (&text[..i], e)
        }
        None => (text, 0),
    };
    if exp.abs() > MAX_DECIMAL_EXPONENT {
        return Err(format!("the exponent of `{text}` is too large (at most {MAX_DECIMAL_EXPONENT} in size)"));
    }
    let (int_part, frac_part) = match mantissa.find('.') {
        Some(i) => (&mantissa[..i], &mantissa[i + 1..]),
        None => (mantissa, ""),
    };
    if int_part.len() + frac_part.len() > MAX_LITERAL_DIGITS_HARD {
        return Err(format!(
            "a literal of {} digits is longer than the supported {MAX_LITERAL_DIGITS_HARD}",
            int_part.len() + frac_part.len()
        ));
    }
    let digits = format!("{int_part}{frac_part}");
    let n: BigInt = digits.parse().map_err(|_| format!("`{text}` is not a number"))?;
    let shift = exp - frac_part.len() as i64;
    let ten = BigInt::from(10);
    let p = num_traits::pow(ten, shift.unsigned_abs() as usize);
    Ok(if shift >= 0 { BigRational::from_integer(n * p) } else { BigRational::new(n, p) })
}

/// The nearest f64 of an exact rational, also for numerators and denominators
/// beyond the f64 range (scaled by powers of two before dividing).
pub fn to_f64(q: &BigRational) -> f64 {
    if q.is_zero() {
        return 0.0;
    }
    let (n, d) = (q.numer(), q.denom());
    let nb = n.bits() as i64;
    let db = d.bits() as i64;
    // Keep 64 significant bits of each before converting.
    let ns = (nb - 64).max(0);
    let ds = (db - 64).max(0);
    let nf = f64_of(&(n >> ns as usize));
    let df = f64_of(&(d >> ds as usize));
    let mut r = nf / df;
    // Scale by 2^(ns - ds) in steps that cannot overflow on the way.
    let mut e = ns - ds;
    while e != 0 && r.is_finite() && r != 0.0 {
        let s = e.clamp(-1000, 1000);
        r *= 2f64.powi(s as i32);
        e -= s;
    }
    r
}

fn f64_of(n: &BigInt) -> f64 {
    use num_traits::ToPrimitive;
    n.to_f64().unwrap_or(f64::NAN)
}

pub fn is_integer(q: &BigRational) -> bool {
    q.denom().is_one()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(n: i64, d: i64) -> BigRational {
        BigRational::new(n.into(), d.into())
    }

    #[test]
    fn decimals_are_exact() {
        assert_eq!(parse_exact("0.1").unwrap(), q(1, 10));
        assert_eq!(parse_exact("1e-10").unwrap(), q(1, 10_000_000_000));
        assert_eq!(parse_exact("3.5E+2").unwrap(), q(350, 1));
        assert_eq!(parse_exact("007").unwrap(), q(7, 1));
        assert!(parse_exact("1e100000").is_err());
    }

    #[test]
    fn conversion_to_f64_handles_huge_parts() {
        assert_eq!(to_f64(&q(1, 3)), 1.0 / 3.0);
        let big = parse_exact("1e400").unwrap();
        assert!(to_f64(&big).is_infinite());
        let tiny_ratio = parse_exact("1e400").unwrap() / parse_exact("3e400").unwrap();
        assert!((to_f64(&tiny_ratio) - 1.0 / 3.0).abs() < 1e-16);
    }
}

#[cfg(test)]
mod literal_checks {
    use super::*;

    /// The cheap check refuses exactly what the exact parser refuses.
    #[test]
    fn literal_error_agrees_with_parse_exact() {
        for t in ["0", "12", "0.5", "1e-10", "2.5E3", "1e99999999", "1e10001", "007", "1.2.3", ".", "1e"] {
            assert_eq!(literal_error_with(t, MAX_LITERAL_DIGITS_HARD).is_some(), parse_exact(t).is_err(), "{t}");
        }
        let long = "9".repeat(MAX_LITERAL_DIGITS_HARD + 1);
        assert!(literal_error_with(&long, MAX_LITERAL_DIGITS_HARD).is_some() && parse_exact(&long).is_err());
        let medium = "9".repeat(MAX_LITERAL_DIGITS + 1);
        assert!(literal_error(&medium).is_some() && parse_exact(&medium).is_ok());
    }
}
