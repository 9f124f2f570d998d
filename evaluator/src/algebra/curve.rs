//! Singular points of the projective closure of a plane curve over Q, exactly, and the
//! facts built on them: smoothness, delta invariants, genus, and what is decided about
//! irreducibility.
//!
//! Method. A shear x -> x + c y (c the least integer >= 0 with F(c, 1, 0) != 0) makes
//! F monic in y up to a constant, so (0 : 1 : 0) is off the curve and resultants in y
//! have no spurious roots. The x-coordinates of the affine singular points are then
//! the common roots of Res_y(f, f_x + t f_y) for all t, i.e. the gcd over t = 0..=d
//! (common practice: a common root y of f and f_x + t f_y for infinitely many t is a
//! common root of f, f_x, f_y). Points at infinity (1 : y : 0) are common roots of the
//! three partials there: a univariate gcd. Rational points are found exactly; points
//! with irrational coordinates are counted and given by a defining polynomial with
//! numerical approximations.

use super::bivar::{resultant_v, P2};
use super::local::{self, Local};
use super::local_ext;
use super::roots;
use super::tower;
use super::upoly::UPoly;
use kelp_lang::poly::Poly;
use num_bigint::BigInt;
use num_complex::Complex64 as C64;
use num_rational::BigRational;
use num_traits::{One, Zero};

#[derive(Clone, Debug)]
pub struct SingularPoint {
    /// Projective coordinates in the user's variables, scaled so the last non-zero one is 1.
    pub coords: [BigRational; 3],
    pub local: Result<Local, String>,
    /// Whether a tangent line at the point is a component of the curve.
    pub line_component: bool,
}

/// Singular points with irrational coordinates, not yet analysed exactly.
#[derive(Clone, Debug)]
pub struct IrrationalPoints {
    /// Where they lie: "x-coordinate a root of ..." or "at infinity, ...".
    pub description: String,
    /// At least this many points.
    pub count: usize,
    /// Approximate x-coordinates (affine) or y/x slopes (at infinity) with inclusion radii.
    pub approx: Vec<(C64, f64)>,
    /// Invariants shared by all these (conjugate) points, when computed.
    pub local: Option<Result<Local, String>>,
}

#[derive(Clone, Debug)]
pub struct CurveFacts {
    pub degree: u32,
    /// The equation has a repeated factor: singular along a whole component.
    pub non_reduced: bool,
    pub rational: Vec<SingularPoint>,
    pub irrational: Vec<IrrationalPoints>,
    /// The curve is y^m = f(x) (or x^m = f(y)) with f square-free and nonconstant, hence
    /// irreducible by Capelli's theorem: y^m - f is reducible over C(x) only when f is a
    /// p-th power for a prime p | m, or -4 times a fourth power when 4 | m (Lang,
    /// *Algebra*, VI Thm 9.1), and a square-free f is neither.
    pub capelli_irreducible: bool,
}

fn q(n: i64) -> BigRational {
    BigRational::from_integer(BigInt::from(n))
}

/// F(x + c y, y, z).
fn shear(f: &Poly, c: i64) -> Poly {
    if c == 0 {
        return f.clone();
    }
    let xs = Poly::var(0).add(&Poly::var(1).scale(&q(c)));
    let mut out = Poly::zero();
    for (m, coef) in &f.terms {
        let t = xs.pow(m[0]).mul(&Poly::var(1).pow(m[1])).mul(&Poly::var(2).pow(m[2]));
        out = out.add(&t.scale(coef));
    }
    out
}

/// p(u, v) as a polynomial in v with coefficients in Q[u].
fn as_rpoly(p: &P2) -> tower::RPoly {
    let d = p.deg_v().unwrap_or(0) as usize;
    let mut out: Vec<Vec<BigRational>> = vec![Vec::new(); d + 1];
    for (&(i, j), c) in &p.terms {
        let row = &mut out[j as usize];
        if row.len() <= i as usize {
            row.resize(i as usize + 1, BigRational::zero());
        }
        row[i as usize] = c.clone();
    }
    out.into_iter().map(UPoly::new).collect()
}

/// F(1, y, 0) as a polynomial in y.
fn at_infinity(f: &Poly) -> UPoly {
    let d = f.degree().unwrap_or(0) as usize;
    let mut c = vec![BigRational::zero(); d + 1];
    for (m, v) in &f.terms {
        if m[2] == 0 {
            c[m[1] as usize] += v;
        }
    }
    UPoly::new(c)
}

pub fn homogeneous(poly: &Poly, projective: bool) -> Poly {
    if projective {
        poly.clone()
    } else {
        poly.homogenize()
    }
}

/// [`analyse`] once per equation per process (an editor re-evaluates the file on every
/// edit; the singular points of an unchanged curve are not recomputed).
pub fn analyse_memo(poly: &Poly, projective: bool) -> std::sync::Arc<CurveFacts> {
    use crate::memo::Memo;
    use std::sync::{Arc, OnceLock};
    static MEMO: OnceLock<Memo<(String, bool), Arc<CurveFacts>>> = OnceLock::new();
    MEMO.get_or_init(Memo::new).get_or((poly.to_string(), projective), || Arc::new(analyse(poly, projective)))
}

pub fn analyse(poly: &Poly, projective: bool) -> CurveFacts {
    let f = homogeneous(poly, projective);
    let d = f.degree().unwrap_or(0);
    // The least c >= 0 with F(c, 1, 0) != 0 (F(x, y, 0) is not identically zero unless z
    // divides F, which the non-reduced / reducible checks below see as well).
    let fx1 = {
        // F(x, 1, 0) as a polynomial in x.
        let mut c = vec![BigRational::zero(); d as usize + 1];
        for (m, v) in &f.terms {
            if m[2] == 0 {
                c[m[0] as usize] += v;
            }
        }
        UPoly::new(c)
    };
    let c = (0..=d as i64 + 1).find(|&c| !fx1.eval(&q(c)).is_zero()).unwrap_or(0);
    let g = shear(&f, c);
    let back = |x: &BigRational, y: &BigRational, z: &BigRational| -> [BigRational; 3] {
        let mut p = [x + y * q(c), y.clone(), z.clone()];
        // Scale so that the last non-zero coordinate is 1.
        if let Some(k) = (0..3).rev().find(|&k| !p[k].is_zero()) {
            let s = p[k].clone();
            for v in p.iter_mut() {
                *v = &*v / &s;
            }
        }
        p
    };
    let capelli_irreducible = crate::periods::shape::recognise(poly, projective).is_some_and(|s| {
        let fd = s.f.derivative();
        s.f.coprime_mod_p(&fd) == Some(true) || s.f.gcd(&fd).degree() == Some(0)
    });
    let mut facts =
        CurveFacts { degree: d, non_reduced: false, rational: vec![], irrational: vec![], capelli_irreducible };

    // Affine chart z = 1 of the sheared curve.
    let fa = P2::chart(&g, 2);
    let (fu, fv) = (fa.deriv(0), fa.deriv(1));
    let mut h = UPoly::zero();
    for t in 0..=d as i64 {
        crate::limits::checkpoint();
        let r = resultant_v(&fa, &fu.scale_add(&fv, &q(t)));
        // Most curves are smooth: a certificate mod p settles coprimality at once.
        if !h.is_zero() && h.coprime_mod_p(&r) == Some(true) {
            h = UPoly::one();
            break;
        }
        h = h.gcd(&r);
        if h.degree() == Some(0) {
            break;
        }
    }
    if h.is_zero() {
        facts.non_reduced = true;
        return facts;
    }
    let h = h.squarefree();
    let xs = h.rational_roots();
    for x0 in &xs {
        crate::limits::checkpoint();
        let gy = fa.at_u(x0).gcd(&fu.at_u(x0)).gcd(&fv.at_u(x0));
        let ys = gy.rational_roots();
        for y0 in &ys {
            crate::limits::checkpoint();
            let at = fa.shift(x0, y0);
            let local = local::analyse(&at);
            let line_component = has_line_component(&at);
            facts.rational.push(SingularPoint { coords: back(x0, y0, &q(1)), local, line_component });
        }
        let mut rest_y = gy.squarefree();
        for y0 in &ys {
            crate::limits::checkpoint();
            rest_y = rest_y.divrem(&UPoly::new(vec![-y0.clone(), BigRational::one()])).0;
        }
        if rest_y.degree().unwrap_or(0) > 0 {
            // Points (x0, y) with y a root of rest_y: analysed over Q[y]/(rest_y).
            let gen = UPoly::new(vec![BigRational::zero(), BigRational::one()]);
            let x0c = UPoly::new(vec![x0.clone()]);
            for (h4, local) in local_ext::analyse(&fa, &rest_y, &x0c, &gen) {
                crate::limits::checkpoint();
                let approx =
                    roots::complex_roots(&h4).into_iter().map(|z| (z, roots::inclusion_radius(&h4, z))).collect();
                facts.irrational.push(IrrationalPoints {
                    description: format!(
                        "affine points with {} = {x0} and y a root of {}",
                        if c == 0 { "x".to_string() } else { format!("x - {c}*y") },
                        h4.primitive().show("y")
                    ),
                    count: h4.degree().unwrap_or(0),
                    approx,
                    local: Some(local),
                });
            }
        }
    }
    let mut rest = h.clone();
    for x0 in &xs {
        crate::limits::checkpoint();
        rest = rest.divrem(&UPoly::new(vec![-x0.clone(), BigRational::one()])).0;
    }
    if rest.degree().unwrap_or(0) > 0 {
        // Above the irrational roots of `rest`: how many distinct common roots y of f,
        // f_x, f_y, exactly, by gcds over Q[x]/(rest) that split it where needed.
        let (rf, ru, rv) = (as_rpoly(&fa), as_rpoly(&fu), as_rpoly(&fv));
        let what = match c {
            0 => "x".to_string(),
            1 => "x - y".to_string(),
            _ => format!("x - {c}*y"),
        };
        for (h1, g1) in tower::gcd(&rest, &rf, &ru) {
            crate::limits::checkpoint();
            for (h2, g2) in tower::gcd(&h1, &g1, &rv) {
                crate::limits::checkpoint();
                for (h3, sq) in tower::squarefree(&h2, &g2) {
                    crate::limits::checkpoint();
                    let k = sq.len().saturating_sub(1);
                    if k == 0 {
                        continue;
                    }
                    let approx = |h: &UPoly| -> Vec<(C64, f64)> {
                        roots::complex_roots(h).into_iter().map(|z| (z, roots::inclusion_radius(h, z))).collect()
                    };
                    if k > 1 {
                        facts.irrational.push(IrrationalPoints {
                            description: format!(
                                "{k} affine points above each root of {} (x = {what})",
                                h3.primitive().show("x")
                            ),
                            count: k * h3.degree().unwrap_or(0),
                            approx: approx(&h3),
                            local: None,
                        });
                        continue;
                    }
                    // One point above each root: y = -s0 / s1 in Q[x]/(h3).
                    let beta = sq[0].neg().mul(&tower::xgcd_mod(&sq[1], &h3).1).rem(&h3);
                    let gen = UPoly::new(vec![BigRational::zero(), BigRational::one()]);
                    for (h4, local) in local_ext::analyse(&fa, &h3, &gen, &beta) {
                        crate::limits::checkpoint();
                        let beta4 = beta.rem(&h4);
                        facts.irrational.push(IrrationalPoints {
                            description: format!(
                                "({what}, y) = (t, {}) with t a root of {}",
                                beta4.show("t"),
                                h4.primitive().show("t")
                            ),
                            count: h4.degree().unwrap_or(0),
                            approx: approx(&h4),
                            local: Some(local),
                        });
                    }
                }
            }
        }
    }

    // Points at infinity (1 : y : 0) of the sheared curve.
    let gi = at_infinity(&g.derivative(0)).gcd(&at_infinity(&g.derivative(1))).gcd(&at_infinity(&g.derivative(2)));
    if gi.is_zero() {
        facts.non_reduced = true;
        return facts;
    }
    if gi.degree().unwrap_or(0) > 0 {
        let chart = P2::chart(&g, 0); // x = 1: variables (y, z)
        let ys = gi.rational_roots();
        for y0 in &ys {
            crate::limits::checkpoint();
            let at = chart.shift(y0, &q(0));
            let local = local::analyse(&at);
            let line_component = has_line_component(&at);
            facts.rational.push(SingularPoint { coords: back(&q(1), y0, &q(0)), local, line_component });
        }
        let sf = gi.squarefree();
        let extra = sf.degree().unwrap_or(0).saturating_sub(ys.len());
        if extra > 0 {
            let mut rest = sf.clone();
            for y0 in &ys {
                crate::limits::checkpoint();
                rest = rest.divrem(&UPoly::new(vec![-y0.clone(), BigRational::one()])).0;
            }
            let gen = UPoly::new(vec![BigRational::zero(), BigRational::one()]);
            for (h4, local) in local_ext::analyse(&chart, &rest, &gen, &UPoly::zero()) {
                crate::limits::checkpoint();
                let approx =
                    roots::complex_roots(&h4).into_iter().map(|z| (z, roots::inclusion_radius(&h4, z))).collect();
                facts.irrational.push(IrrationalPoints {
                    description: format!(
                        "points at infinity (1 : y : 0) with y a root of {}",
                        h4.primitive().show("y")
                    ),
                    count: h4.degree().unwrap_or(0),
                    approx,
                    local: Some(local),
                });
            }
        }
    }
    facts
}

/// Whether the curve (moved so the point is the origin) contains one of its tangent
/// lines there, over C: along v = t u the terms of total degree k sum to c_k(t) s^k, so
/// a tangent slope t (a root of the square-free tangent cone S) spans a component
/// exactly when S and every c_k have the common root t; u = 0 is checked directly.
fn has_line_component(p: &P2) -> bool {
    let (t, drop) = p.tangent_cone();
    if drop > 0 && p.terms.keys().all(|&(i, _)| i > 0) {
        return true;
    }
    let d = p.total_degree().unwrap_or(0) as usize;
    let mut c = vec![vec![BigRational::zero(); d + 1]; d + 1];
    for (&(i, j), v) in &p.terms {
        c[(i + j) as usize][j as usize] += v;
    }
    let mut g = t.squarefree();
    for ck in c {
        if g.degree().unwrap_or(0) == 0 {
            return false;
        }
        g = g.gcd(&UPoly::new(ck));
    }
    g.degree().unwrap_or(0) > 0
}

/// Why a curve has no genus (yet).
#[derive(Clone, Debug, PartialEq)]
pub enum NoGenus {
    NonReduced(String),
    Reducible(String),
    Unsupported(String),
}

impl NoGenus {
    pub fn message(&self) -> &str {
        match self {
            NoGenus::NonReduced(m) | NoGenus::Reducible(m) | NoGenus::Unsupported(m) => m,
        }
    }
}

impl CurveFacts {
    pub fn smooth(&self) -> bool {
        !self.non_reduced && self.rational.is_empty() && self.irrational.is_empty()
    }
    pub fn singular_count(&self) -> usize {
        self.rational.len() + self.irrational.iter().map(|i| i.count).sum::<usize>()
    }
    /// The geometric genus, or why it is not given.
    pub fn genus(&self) -> Result<i64, NoGenus> {
        let d = self.degree as i64;
        let arithmetic = (d - 1) * (d - 2) / 2;
        if self.non_reduced {
            return Err(NoGenus::NonReduced(
                "the equation has a repeated factor, so the curve is singular along a whole component".into(),
            ));
        }
        let mut delta = 0i64;
        let mut bound = 0u64;
        for i in &self.irrational {
            match &i.local {
                Some(Ok(l)) => {
                    delta += l.delta as i64 * i.count as i64;
                    bound += l.split_bound() * i.count as u64;
                }
                Some(Err(why)) => {
                    return Err(NoGenus::Unsupported(format!("at the singular points {}: {why}", i.description)))
                }
                None => {
                    return Err(NoGenus::Unsupported(format!(
                        "the singular points {} are not classified yet (several points above one root need a \
                         further field extension)",
                        i.description
                    )))
                }
            }
        }
        for p in &self.rational {
            match &p.local {
                Ok(l) => delta += l.delta as i64,
                Err(why) => return Err(NoGenus::Unsupported(format!("at {}: {why}", show_point(&p.coords)))),
            }
        }
        let g = arithmetic - delta;
        if self.rational.is_empty() && self.irrational.is_empty() {
            // A reducible curve is singular where its components meet (Bezout).
            return Ok(g);
        }
        if g < 0 {
            return Err(NoGenus::Reducible(format!(
                "the curve is reducible over C: (d-1)(d-2)/2 - sum of delta = {arithmetic} - {delta} = {g} < 0, \
                 and an irreducible curve has genus >= 0"
            )));
        }
        // If F = G H with deg G = a, deg H = d - a, the common points of G and H carry
        // intersection number a (d - a) in all (Bezout), and at each point at most its
        // `split_bound`. A split whose a (d - a) exceeds the sum of the bounds is impossible.
        if let Some(p) = self.rational.iter().find(|p| p.line_component) {
            return Err(NoGenus::Reducible(format!(
                "the curve is reducible: it contains a line (one of its tangent lines) through its singular point {}",
                show_point(&p.coords)
            )));
        }
        let bound: u64 =
            bound + self.rational.iter().filter_map(|p| p.local.as_ref().ok()).map(Local::split_bound).sum::<u64>();
        let open: Vec<i64> = (1..=d / 2).filter(|&a| (a * (d - a)) as u64 <= bound).collect();
        // A line component meets the rest in singular points along one of their tangent
        // lines; every tangent line at every rational singular point was tested above (at
        // irrational points the test is not built yet, so a line stays possible there).
        let open: Vec<i64> = open.into_iter().filter(|&a| a != 1 || !self.irrational.is_empty()).collect();
        if open.is_empty() || self.capelli_irreducible {
            return Ok(g);
        }
        Err(NoGenus::Unsupported(format!(
            "irreducibility is not decided yet: the singular points leave room for a component of degree {} \
             (factorisation over C is not built yet)",
            open.iter().map(|a| a.to_string()).collect::<Vec<_>>().join(" or ")
        )))
    }
    /// Lines for an information diagnostic and hover: each singular point with type and delta.
    pub fn summary(&self) -> Vec<String> {
        let mut out = Vec::new();
        if self.non_reduced {
            out.push("the equation has a repeated factor (singular along a component)".into());
            return out;
        }
        for p in &self.rational {
            out.push(match &p.local {
                Ok(l) => format!(
                    "{}: {}, multiplicity {}, delta {}, {} branch{}, Milnor number {}",
                    show_point(&p.coords),
                    l.kind,
                    l.multiplicity,
                    l.delta,
                    l.branches,
                    if l.branches == 1 { "" } else { "es" },
                    l.milnor
                ),
                Err(why) => format!("{}: not classified ({why})", show_point(&p.coords)),
            });
        }
        for i in &self.irrational {
            out.push(match &i.local {
                Some(Ok(l)) => format!(
                    "{} conjugate point(s) {}: each {}, multiplicity {}, delta {}",
                    i.count, i.description, l.kind, l.multiplicity, l.delta
                ),
                Some(Err(why)) => format!("{} point(s) {}: not classified ({why})", i.count, i.description),
                None => format!("{} singular point(s) with irrational coordinates: {}", i.count, i.description),
            });
        }
        out
    }
}

pub fn show_point(c: &[BigRational; 3]) -> String {
    format!("({} : {} : {})", c[0], c[1], c[2])
}
