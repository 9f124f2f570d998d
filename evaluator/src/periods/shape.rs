//! Recognising curves of the form y^m = f(x) among plane equations.
//!
//! Accepted: an affine or projective equation which, after setting z = 1, is
//! alpha y^m + g(x) = 0 with alpha a nonzero rational and m >= 2 (f = -g / alpha), or the
//! same with the roles of x and y exchanged.

use crate::algebra::upoly::UPoly;
use kelp_lang::poly::Poly;
use num_rational::BigRational;
use num_traits::Zero;
use std::collections::BTreeMap;

#[derive(Clone, Debug)]
pub struct Superelliptic {
    pub m: u32,
    pub f: UPoly,
    /// True when the equation was x^m = f(y) (the variables are exchanged).
    pub swapped: bool,
}

impl Superelliptic {
    pub fn describe(&self) -> String {
        let (v, w) = if self.swapped { ("x", "y") } else { ("y", "x") };
        format!("{v}^{} = {}", self.m, self.f.show(w))
    }
}

/// The curve's y^m = f(x) form when the superelliptic route applies to it (f square-free);
/// `None` sends `tau` and `krichever` to the covering route, which also resolves the
/// singular models y^m = f(x) with a repeated root of f.
pub fn superelliptic_route(poly: &Poly, projective: bool) -> Option<Superelliptic> {
    recognise(poly, projective).filter(|s| super::superelliptic::square_free(&s.f))
}

pub fn recognise(poly: &Poly, projective: bool) -> Option<Superelliptic> {
    // Affine terms (x power, y power) -> coefficient, after z = 1.
    let mut affine: BTreeMap<(u32, u32), BigRational> = BTreeMap::new();
    for (mono, c) in &poly.terms {
        if !projective && mono[2] > 0 {
            return None;
        }
        *affine.entry((mono[0], mono[1])).or_insert_with(BigRational::zero) += c;
    }
    affine.retain(|_, c| !c.is_zero());
    try_form(&affine, false).or_else(|| {
        let swapped: BTreeMap<(u32, u32), BigRational> =
            affine.iter().map(|(&(a, b), c)| ((b, a), c.clone())).collect();
        try_form(&swapped, true)
    })
}

fn try_form(terms: &BTreeMap<(u32, u32), BigRational>, swapped: bool) -> Option<Superelliptic> {
    let mut lead: Option<(u32, BigRational)> = None;
    let mut g: Vec<BigRational> = vec![];
    for (&(i, j), c) in terms {
        if j > 0 {
            if i > 0 || lead.is_some() {
                return None;
            }
            lead = Some((j, c.clone()));
        } else {
            if g.len() <= i as usize {
                g.resize(i as usize + 1, BigRational::zero());
            }
            g[i as usize] = c.clone();
        }
    }
    let (m, alpha) = lead?;
    if m < 2 {
        return None;
    }
    let f = UPoly::new(g.into_iter().map(|c| -c / &alpha).collect());
    (f.degree()? >= 1).then_some(Superelliptic { m, f, swapped })
}
