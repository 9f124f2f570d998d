//! Wave-level checks; values against outside references are in tests/tests/waves.rs.

use super::rational::RationalWave;
use super::soliton::Soliton;
use super::{Wave, WaveKind};
use crate::num::Num;

fn soliton(kappa: &[f64], a: &[&[i64]]) -> Result<Soliton, String> {
    let a: Vec<Vec<Num>> = a.iter().map(|r| r.iter().map(|&v| Num::int(v)).collect()).collect();
    Soliton::new(kappa, &a)
}

// Far from the front the one-soliton u decays like e^{-|k1 - k2| |x|}; a naive sum of
// exponentials overflows at x = 800 (e^800 > 1e308), the log-sum-exp form does not.
// Closed form from the conventions file: u = ((k1 - k2)^2 / 2) sech^2((theta_1 - theta_2) / 2).
#[test]
fn far_field_does_not_overflow() {
    let w = Wave { kind: WaveKind::Soliton(soliton(&[-1.0, 1.0], &[&[1, 1]]).unwrap()), origin: String::new() };
    for x in [-800.0, -30.0, 0.0, 30.0, 800.0] {
        let p = w.at(x, 0.0, 0.0).unwrap();
        let want = 2.0 / (x as f64).cosh().powi(2);
        assert!(p.kp.u.re.is_finite() && (p.kp.u.re - want).abs() < 1e-14, "x = {x}: {}", p.kp.u);
    }
}

// Kodama–Williams: a negative maximal minor makes the wave irregular; the data given in
// any order of kappa is sorted with its columns.
#[test]
fn regularity_follows_the_minors() {
    let ok = soliton(&[1.0, -1.0, 0.0], &[&[1, 1, 1]]).unwrap();
    assert!(ok.negative_minor().is_none());
    let bad = soliton(&[-1.0, 0.0, 1.0, 2.0], &[&[1, 0, -1, 0], &[0, 1, 0, 1]]).unwrap();
    assert!(bad.negative_minor().is_some());
    assert!(soliton(&[-1.0, 1.0], &[&[0, 0]]).is_err(), "rank 0 is refused");
    assert!(soliton(&[1.0, 1.0], &[&[1, 2]]).is_err(), "repeated kappa is refused");
}

// s_(1) = t1 gives tau = x, u = -2 / x^2 (common practice): a pole at x = 0 is reported.
#[test]
fn rational_pole_is_reported() {
    let w = Wave { kind: WaveKind::Rational(RationalWave::new(&[1], &[]).unwrap()), origin: String::new() };
    let p = w.at(2.0, 0.0, 0.0).unwrap();
    assert!((p.kp.u.re + 0.5).abs() < 1e-15);
    assert!(w.at(0.0, 0.0, 0.0).is_err());
    assert!(RationalWave::new(&[1, 2], &[]).is_err(), "parts must not increase");
}
