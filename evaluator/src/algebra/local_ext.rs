//! Local invariants at singular points whose coordinates lie in R = Q[x]/(h), h
//! square-free: the same tree of infinitely near points as `local`, computed once for
//! all roots of h. Whenever a coefficient is zero at some roots of h and not at others,
//! h splits and each piece is analysed on its own (dynamic evaluation), so every piece
//! gets invariants that hold at all of its roots (Galois conjugates share them).

use super::bivar::P2;
use super::local::Local;
use super::tower;
use super::upoly::UPoly;
use num_bigint::BigInt;
use num_rational::BigRational;
use std::collections::BTreeMap;

/// A polynomial in (u, v) with coefficients in R.
#[derive(Clone, Debug, Default)]
struct RP2 {
    terms: BTreeMap<(u32, u32), UPoly>,
}

enum Fail {
    /// h = h1 h2 with both factors non-trivial.
    Split(UPoly, UPoly),
    Unsupported(String),
}

struct Ring<'a> {
    h: &'a UPoly,
}

impl Ring<'_> {
    fn mul(&self, a: &UPoly, b: &UPoly) -> UPoly {
        a.mul(b).rem(self.h)
    }
    /// `Ok(true)`: a unit at every root of h; `Ok(false)`: zero at every root.
    fn nonzero(&self, a: &UPoly) -> Result<bool, Fail> {
        let a = a.rem(self.h);
        if a.is_zero() {
            return Ok(false);
        }
        let g = a.gcd(self.h);
        if g.degree() == Some(0) {
            return Ok(true);
        }
        Err(Fail::Split(g.clone(), self.h.divrem(&g).0.monic()))
    }
    fn inv(&self, a: &UPoly) -> UPoly {
        tower::xgcd_mod(a, self.h).1
    }
    fn add_term(&self, p: &mut RP2, m: (u32, u32), c: UPoly) {
        let e = p.terms.entry(m).or_default();
        *e = e.add(&c).rem(self.h);
    }
    fn powers(&self, a: &UPoly, n: u32) -> Vec<UPoly> {
        let mut out = vec![UPoly::one()];
        for _ in 0..n {
            crate::limits::checkpoint();
            let next = self.mul(out.last().unwrap(), a);
            out.push(next);
        }
        out
    }
}

fn binomial(n: u32, k: u32) -> BigRational {
    let mut r = BigInt::from(1);
    for i in 0..k {
        r = r * BigInt::from(n - i) / BigInt::from(i + 1);
    }
    BigRational::from_integer(r)
}

/// Invariants at the points (a, b) of the chart polynomial `f`, for a, b in Q[x]/(h):
/// one result per piece of a splitting of h.
pub fn analyse(f: &P2, h: &UPoly, a: &UPoly, b: &UPoly) -> Vec<(UPoly, Result<Local, String>)> {
    let mut out = Vec::new();
    let mut work = vec![h.clone()];
    while let Some(h) = work.pop() {
        crate::limits::checkpoint();
        if h.degree().unwrap_or(0) == 0 {
            continue;
        }
        match piece(f, &h, a, b) {
            Ok(l) => out.push((h, Ok(l))),
            Err(Fail::Split(h1, h2)) => {
                work.push(h1);
                work.push(h2);
            }
            Err(Fail::Unsupported(why)) => out.push((h, Err(why))),
        }
    }
    out
}

fn piece(f: &P2, h: &UPoly, a: &UPoly, b: &UPoly) -> Result<Local, Fail> {
    let r = Ring { h };
    let deg = f.total_degree().unwrap_or(0);
    let (pa, pb) = (r.powers(a, deg), r.powers(b, deg));
    let mut g = RP2::default();
    for (&(i, j), c) in &f.terms {
        crate::limits::checkpoint();
        for k in 0..=i {
            let ck = r.mul(&pa[(i - k) as usize], &UPoly::new(vec![binomial(i, k) * c]));
            for l in 0..=j {
                let cl = r.mul(&ck, &pb[(j - l) as usize].scale(&binomial(j, l)));
                r.add_term(&mut g, (k, l), cl);
            }
        }
    }
    let mut tree = Vec::new();
    let (delta, branches, m, distinct) = walk(&r, &g, 0, &mut tree)?;
    let milnor = (2 * delta + 1).saturating_sub(branches as u64);
    let tangents = if distinct == m {
        vec![1; m as usize]
    } else if distinct == 1 {
        vec![m]
    } else if m == 3 {
        vec![2, 1]
    } else {
        vec![0]
    };
    let kind = super::local::name(m, &tangents, milnor);
    Ok(Local {
        multiplicity: m,
        tangents,
        delta,
        branches,
        milnor,
        tree,
        kind,
        rational_tangents: vec![],
        tangents_rational: false,
    })
}

/// (delta, branches, multiplicity, distinct tangent directions) at the origin.
fn walk(r: &Ring, g: &RP2, depth: usize, tree: &mut Vec<u32>) -> Result<(u64, u32, u32, u32), Fail> {
    if depth > 64 {
        return Err(Fail::Unsupported("the tree of infinitely near points is deeper than 64 blow-ups".into()));
    }
    // Multiplicity: the lowest total degree with a non-zero coefficient.
    let mut m = None;
    let mut live = RP2::default();
    for (&(i, j), c) in &g.terms {
        crate::limits::checkpoint();
        if r.nonzero(c)? {
            live.terms.insert((i, j), c.clone());
            m = Some(m.map_or(i + j, |v: u32| v.min(i + j)));
        }
    }
    let Some(m) = m else { return Err(Fail::Unsupported("the polynomial vanishes identically".into())) };
    if m <= 1 {
        return Ok((0, m, m, m));
    }
    tree.push(m);
    let mut delta = (m as u64) * (m as u64 - 1) / 2;
    // Tangent cone T(1, t) over R, and the multiplicity `drop` of the direction u = 0.
    let mut t: Vec<UPoly> = vec![UPoly::zero(); m as usize + 1];
    for (&(i, j), c) in &live.terms {
        crate::limits::checkpoint();
        if i + j == m {
            t[j as usize] = c.clone();
        }
    }
    while t.last().is_some_and(UPoly::is_zero) {
        t.pop();
    }
    let drop = m - (t.len() as u32).saturating_sub(1);
    let lin = |p: &[UPoly]| -> Result<(Vec<UPoly>, usize), Fail> {
        // gcd(p, p') over R, one piece only (else split).
        let mut pieces = tower::gcd(r.h, &p.to_vec(), &tower::derivative(&p.to_vec()));
        if pieces.len() > 1 {
            let (h1, _) = pieces.swap_remove(0);
            return Err(Fail::Split(h1.clone(), r.h.divrem(&h1).0.monic()));
        }
        let g = pieces.pop().map(|(_, g)| g).unwrap_or_default();
        let d = g.len().saturating_sub(1);
        Ok((g, d))
    };
    let deg_t = t.len().saturating_sub(1);
    let (mult, deg_mult) = if deg_t > 0 { lin(&t)? } else { (vec![], 0) };
    let n_distinct = deg_t - deg_mult;
    let (n_multiple, mult_sf) = if deg_mult > 0 {
        let (gg, dgg) = lin(&mult)?;
        (deg_mult - dgg, tower::divide(r.h, &mult, &gg))
    } else {
        (0, vec![])
    };
    let mut branches = (n_distinct - n_multiple) as u32;
    if n_multiple > 0 {
        if mult_sf.len() != 2 {
            return Err(Fail::Unsupported(
                "several repeated tangent directions at an irrational point need a further field extension, which \
                 is not built yet"
                    .into(),
            ));
        }
        // The one repeated direction t0 = -s0 / s1 lies in R.
        if !r.nonzero(&mult_sf[1])? {
            return Err(Fail::Unsupported("a degenerate tangent cone".into()));
        }
        let t0 = r.mul(&mult_sf[0].neg(), &r.inv(&mult_sf[1]));
        let (d, br, _, _) = walk(r, &blow_up(r, &live, m, &t0), depth + 1, tree)?;
        delta += d;
        branches += br;
    }
    match drop {
        0 => {}
        1 => branches += 1,
        _ => {
            let mut up = RP2::default();
            for (&(i, j), c) in &live.terms {
                crate::limits::checkpoint();
                r.add_term(&mut up, (i, i + j - m), c.clone());
            }
            let (d, br, _, _) = walk(r, &up, depth + 1, tree)?;
            delta += d;
            branches += br;
        }
    }
    let distinct = n_distinct as u32 + u32::from(drop > 0);
    Ok((delta, branches, m, distinct))
}

/// g(u, u (w + t0)) / u^m over R.
fn blow_up(r: &Ring, g: &RP2, m: u32, t0: &UPoly) -> RP2 {
    let deg = g.terms.keys().map(|&(_, j)| j).max().unwrap_or(0);
    let pt = r.powers(t0, deg);
    let mut out = RP2::default();
    for (&(i, j), c) in &g.terms {
        crate::limits::checkpoint();
        for l in 0..=j {
            let cl = r.mul(c, &pt[(j - l) as usize].scale(&binomial(j, l)));
            r.add_term(&mut out, (i + j - m, l), cl);
        }
    }
    out
}
