//! Local invariants of a plane curve at a point moved to the origin: multiplicity,
//! tangent directions, the tree of infinitely near points by successive blow-ups, the
//! delta invariant (sum of m(m-1)/2 over the tree), the number of branches, the Milnor
//! number by Milnor's formula mu = 2 delta - r + 1, and the singularity type.

use super::bivar::P2;
use super::upoly::UPoly;

#[derive(Clone, Debug, PartialEq)]
pub struct Local {
    pub multiplicity: u32,
    /// Multiplicities of the tangent directions (sorted, descending; they sum to m).
    pub tangents: Vec<u32>,
    pub delta: u64,
    pub branches: u32,
    pub milnor: u64,
    /// Multiplicities of the singular infinitely near points, the point itself first.
    pub tree: Vec<u32>,
    pub kind: String,
    /// The tangent lines with rational slope: `Some(t)` for v = t u, `None` for u = 0.
    pub rational_tangents: Vec<Option<num_rational::BigRational>>,
    /// Whether every tangent direction is rational.
    pub tangents_rational: bool,
}

impl Local {
    /// An upper bound of the intersection number at this point of two curves G, H with
    /// F = G H: by Noether's formula it is the sum over common infinitely near points of
    /// m_q(G) m_q(H) <= floor(m_q^2 / 4), and 0 at a unibranch point.
    pub fn split_bound(&self) -> u64 {
        if self.branches < 2 {
            return 0;
        }
        self.tree.iter().map(|&m| (m as u64 * m as u64) / 4).sum()
    }
}

/// Why a point could not be analysed exactly yet.
pub type Unsupported = String;

pub fn analyse(p: &P2) -> Result<Local, Unsupported> {
    let m = p.order().unwrap_or(0);
    let mut tree = Vec::new();
    let (delta, branches) = walk(p, 0, &mut tree)?;
    let tangents = directions(p)?;
    let milnor = (2 * delta + 1).saturating_sub(branches as u64);
    // Cross-check with the Milnor number computed directly as the local intersection
    // multiplicity of the partial derivatives (Fulton's algorithm).
    match super::bivar::intersection_at_origin(&p.deriv(0), &p.deriv(1)) {
        Some(mu) if mu == milnor => {}
        Some(mu) => {
            return Err(format!(
            "internal cross-check failed: Milnor's formula gives mu = {milnor} (delta {delta}, {branches} branches) \
                 but the intersection of the partial derivatives gives {mu}; not reporting either"
        ))
        }
        None => return Err("the partial derivatives share a component: the point is not isolated".into()),
    }
    let kind = name(m, &tangents, milnor);
    let (t, drop) = p.tangent_cone();
    let mut rational_tangents: Vec<Option<num_rational::BigRational>> =
        t.rational_roots().into_iter().map(Some).collect();
    if drop > 0 {
        rational_tangents.push(None);
    }
    let tangents_rational = rational_tangents.len() == tangents.len();
    Ok(Local { multiplicity: m, tangents, delta, branches, milnor, tree, kind, rational_tangents, tangents_rational })
}

/// Multiplicities of the tangent directions at the origin, descending.
fn directions(p: &P2) -> Result<Vec<u32>, Unsupported> {
    let (t, drop) = p.tangent_cone();
    let mut out = Vec::new();
    if drop > 0 {
        out.push(drop);
    }
    // Multiplicity of each distinct root of T(1, t): peel off gcd(T, T') repeatedly.
    let mut rest = t.clone();
    let mut level = 1;
    while rest.degree().unwrap_or(0) > 0 {
        crate::limits::checkpoint();
        let g = rest.gcd(&rest.derivative());
        // Roots of rest / g are the distinct roots of rest; those not in g have
        // multiplicity `level` in T.
        let distinct = rest.divrem(&g).0;
        let next_distinct = if g.degree().unwrap_or(0) > 0 { g.squarefree() } else { UPoly::one() };
        let here = distinct.degree().unwrap_or(0) - next_distinct.degree().unwrap_or(0);
        out.extend(std::iter::repeat_n(level, here));
        rest = g;
        level += 1;
    }
    out.sort_unstable_by(|a, b| b.cmp(a));
    Ok(out)
}

fn walk(p: &P2, depth: usize, tree: &mut Vec<u32>) -> Result<(u64, u32), Unsupported> {
    if depth > 64 {
        return Err("the tree of infinitely near points is deeper than 64 blow-ups".into());
    }
    let m = p.order().unwrap_or(0);
    if m == 0 {
        return Ok((0, 0));
    }
    if m == 1 {
        return Ok((0, 1));
    }
    tree.push(m);
    let mut delta = (m as u64) * (m as u64 - 1) / 2;
    let (t, drop) = p.tangent_cone();
    let s = t.squarefree();
    let multiple = t.gcd(&t.derivative());
    let mult_sf = if multiple.degree().unwrap_or(0) > 0 { multiple.squarefree() } else { UPoly::one() };
    let n_distinct = s.degree().unwrap_or(0);
    let n_multiple = mult_sf.degree().unwrap_or(0);
    // A simple tangent direction carries one smooth branch.
    let mut branches = (n_distinct - n_multiple) as u32;
    if n_multiple > 0 {
        let roots = mult_sf.rational_roots();
        if roots.len() < n_multiple {
            return Err(format!(
                "a repeated tangent direction with irrational slope (roots of {}) needs arithmetic in a number field, \
                 which is not built yet",
                mult_sf.primitive().show("t")
            ));
        }
        for t0 in roots {
            crate::limits::checkpoint();
            let (d, r) = walk(&p.blow_up(m, &t0), depth + 1, tree)?;
            delta += d;
            branches += r;
        }
    }
    match drop {
        0 => {}
        1 => branches += 1,
        _ => {
            let (d, r) = walk(&p.blow_up_other(m), depth + 1, tree)?;
            delta += d;
            branches += r;
        }
    }
    Ok((delta, branches))
}

/// The usual names: A_k, D_k, E6, E7, E8 (simple singularities, classified by the
/// multiplicity, the tangent directions and mu), ordinary m-fold points, otherwise a
/// plain description.
pub(crate) fn name(m: u32, tangents: &[u32], mu: u64) -> String {
    match (m, tangents) {
        (0 | 1, _) => "smooth point".into(),
        (2, _) => match mu {
            1 => "A1 (node)".into(),
            2 => "A2 (cusp)".into(),
            3 => "A3 (tacnode)".into(),
            k => format!("A{k}"),
        },
        (3, [1, 1, 1]) => "D4 (ordinary triple point)".into(),
        (3, [2, 1]) => format!("D{mu}"),
        (3, [3]) if (6..=8).contains(&mu) => format!("E{mu}"),
        (3, _) => format!("non-simple triple point (mu = {mu})"),
        (m, t) if t.iter().all(|&v| v == 1) => format!("ordinary {m}-fold point"),
        (m, _) => format!("non-simple {m}-fold point (mu = {mu})"),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use num_bigint::BigInt;
    use num_rational::BigRational;

    fn p2(terms: &[((u32, u32), i64)]) -> P2 {
        let mut p = P2::default();
        for &(m, c) in terms {
            p.add_term(m, BigRational::from_integer(BigInt::from(c)));
        }
        p
    }

    #[test]
    fn classical_simple_singularities() {
        // Normal forms and their (mu, delta, r): A_k: y^2 - x^(k+1), mu = k,
        // delta = floor((k+1)/2), r = 2 if k odd else 1; D_k: x^2 y - y^(k-1), mu = k;
        // E6: x^3 - y^4; E7: x^3 - x y^3; E8: x^3 - y^5 (Greuel, Lossen, Shustin,
        // *Introduction to Singularities and Deformations*, I.2; values from memory).
        for k in 1..=9u32 {
            let l = analyse(&p2(&[((0, 2), 1), ((k + 1, 0), -1)])).unwrap();
            assert_eq!(l.milnor, k as u64, "A{k}");
            assert_eq!(l.delta, k.div_ceil(2) as u64, "A{k}");
            assert_eq!(l.branches, if k % 2 == 1 { 2 } else { 1 });
        }
        for k in 4..=9u32 {
            let l = analyse(&p2(&[((2, 1), 1), ((0, k - 1), -1)])).unwrap();
            let want = if k == 4 { "D4 (ordinary triple point)".to_string() } else { format!("D{k}") };
            assert_eq!((l.milnor, l.kind.clone()), (k as u64, want));
        }
        let e6 = analyse(&p2(&[((3, 0), 1), ((0, 4), -1)])).unwrap();
        let e7 = analyse(&p2(&[((3, 0), 1), ((1, 3), -1)])).unwrap();
        let e8 = analyse(&p2(&[((3, 0), 1), ((0, 5), -1)])).unwrap();
        assert_eq!((e6.kind.as_str(), e6.delta), ("E6", 3));
        assert_eq!((e7.kind.as_str(), e7.delta), ("E7", 4));
        assert_eq!((e8.kind.as_str(), e8.delta), ("E8", 4));
        // An ordinary quadruple point: xy(x - y)(x + y), delta = 6.
        let q = analyse(&p2(&[((3, 1), 1), ((1, 3), -1)])).unwrap();
        assert_eq!((q.kind.as_str(), q.delta, q.branches), ("ordinary 4-fold point", 6, 4));
    }

    #[test]
    fn irrational_repeated_directions_are_refused() {
        // (y^2 - 2 x^2)^2 + x^5: repeated tangent directions y = +-sqrt(2) x.
        let base = p2(&[((0, 4), 1), ((2, 2), -4), ((4, 0), 4), ((5, 0), 1)]);
        assert!(analyse(&base).unwrap_err().contains("irrational"));
    }
}
