//! Holomorphic differentials P(x, y) dx / G_y on a plane curve of degree d: deg P <= d - 3,
//! and P satisfies the adjoint conditions at every singular point and its infinitely near
//! points (`near`; at an ordinary m-fold point: vanishing to order m - 1; conventions file,
//! classical). Singular points known numerically give numerical conditions; the basis is
//! their null space, and its dimension must equal the exact genus.

use super::near::{conditions, LocalPoly};
use super::plane::Plane;
use crate::algebra::bivar::P2;
use kelp_lang::number::to_f64;
use nalgebra::DMatrix;
use num_bigint::BigInt;
use num_complex::Complex64 as C64;
use num_rational::BigRational;
use num_traits::Zero;

/// A singular point with rational coordinates (x0, y0) in the chart, and the curve's
/// Taylor coefficients there, exact.
#[derive(Clone, Debug)]
pub struct ExactPoint {
    x0: BigRational,
    y0: BigRational,
    /// taylor[i][j]: coefficient of u^i v^j in G(x0 + u, y0 + v).
    taylor: Vec<Vec<BigRational>>,
}

fn binom(n: u32, k: u32) -> BigRational {
    let v = (0..k).fold(BigInt::from(1), |acc, i| acc * BigInt::from(n - i) / BigInt::from(i + 1));
    BigRational::from_integer(v)
}

impl ExactPoint {
    pub fn new(chart: &P2, x0: &BigRational, y0: &BigRational) -> ExactPoint {
        let d = chart.terms.keys().map(|&(i, j)| (i + j) as usize).max().unwrap_or(0);
        let mut taylor = vec![vec![BigRational::zero(); d + 1]; d + 1];
        for (&(a, b), c) in &chart.terms {
            for i in 0..=a {
                let xa = c * binom(a, i) * x0.pow((a - i) as i32);
                for j in 0..=b {
                    taylor[i as usize][j as usize] += &xa * binom(b, j) * y0.pow((b - j) as i32);
                }
            }
        }
        ExactPoint { x0: x0.clone(), y0: y0.clone(), taylor }
    }
    fn curve(&self, i: usize, j: usize) -> f64 {
        self.taylor.get(i).and_then(|r| r.get(j)).map_or(0.0, to_f64)
    }
    /// Coefficient of u^i v^j in (x0 + u)^a (y0 + v)^b.
    fn monomial(&self, a: u32, b: u32, i: usize, j: usize) -> f64 {
        let (i, j) = (i as u32, j as u32);
        to_f64(&(binom(a, i) * self.x0.pow((a - i) as i32) * binom(b, j) * self.y0.pow((b - j) as i32)))
    }
}

pub struct Differentials {
    /// Monomials x^a y^b, a + b <= d - 3.
    pub monomials: Vec<(u32, u32)>,
    /// Column l: the coefficients of P_l in the monomials.
    pub basis: DMatrix<C64>,
    pub names: Vec<String>,
}

fn falling(n: u32, k: u32) -> f64 {
    (0..k).map(|i| (n - i) as f64).product()
}

fn monomial_name(a: u32, b: u32) -> String {
    let part = |v: &str, e: u32| match e {
        0 => String::new(),
        1 => v.to_string(),
        _ => format!("{v}^{e}"),
    };
    let s = [part("x", a), part("y", b)].into_iter().filter(|p| !p.is_empty()).collect::<Vec<_>>().join(" ");
    if s.is_empty() {
        "1".into()
    } else {
        s
    }
}

/// `singular`: (x0, y0, multiplicity) in the chart of `plane`; `delta` receives the sum of
/// the delta invariants found on the way (to be checked against the exact algebra).
pub fn holomorphic(
    plane: &Plane,
    singular: &[(C64, C64, u32)],
    exact: &[Option<ExactPoint>],
    shear: Option<C64>,
    genus: usize,
    delta: &mut u64,
) -> Result<Differentials, String> {
    let d = plane.d as u32;
    let monomials: Vec<(u32, u32)> =
        (0..=d.saturating_sub(3)).flat_map(|t| (0..=t).map(move |b| (t - b, b))).filter(|_| d >= 3).collect();
    let k = monomials.len();
    if singular.is_empty() {
        if k != genus {
            return Err(format!("{k} differentials of degree <= d - 3 for a smooth curve of genus {genus}"));
        }
        let names = monomials.iter().map(|&(a, b)| format!("{} dx/G_y", monomial_name(a, b))).collect();
        return Ok(Differentials { monomials, basis: DMatrix::identity(k, k), names });
    }
    let mut rows: Vec<Vec<C64>> = vec![];
    for (idx, &(x0, y0, _)) in singular.iter().enumerate() {
        // The curve and P's monomials as polynomials in (u, v) = (x - x0, y - y0).
        let n = plane.d;
        let mut curve = LocalPoly::zero(1, n);
        let fact = |k: usize| (1..=k).map(|v| v as f64).product::<f64>();
        let mut p = LocalPoly::zero(k, n);
        if let Some(Some(e)) = exact.get(idx) {
            // A rational point: the expansions exactly, rounded once. In floating point the
            // curve's low-order terms there are a cancellation of large terms, which moves
            // the tangent and the infinitely near points and so the conditions (observed:
            // tau off by 1e-8 at a tacnode after a projective change).
            for i in 0..=n {
                for j in 0..=n - i {
                    curve.c[i][j][0] = C64::new(e.curve(i, j), 0.0);
                }
            }
            for (col, &(a, b)) in monomials.iter().enumerate() {
                for i in 0..=a as usize {
                    for j in 0..=b as usize {
                        p.c[i][j][col] = C64::new(e.monomial(a, b, i, j), 0.0);
                    }
                }
            }
        } else {
            for i in 0..=n {
                for j in 0..=n - i {
                    curve.c[i][j][0] = plane.partial(i, j, x0, y0) / (fact(i) * fact(j));
                }
            }
            for (col, &(a, b)) in monomials.iter().enumerate() {
                for i in 0..=a as usize {
                    for j in 0..=b as usize {
                        p.c[i][j][col] += x0.powi(a as i32 - i as i32)
                            * y0.powi(b as i32 - j as i32)
                            * (falling(a, i as u32) / fact(i))
                            * (falling(b, j as u32) / fact(j));
                    }
                }
            }
        }
        let mut point_rows = vec![];
        *delta += conditions(&curve, &p, &mut point_rows, 0, shear)?;
        for row in point_rows {
            let norm = row.iter().map(|v| v.norm()).fold(0.0, f64::max).max(1e-300);
            rows.push(row.into_iter().map(|v| v / norm).collect());
        }
    }
    // Zero rows pad the matrix to square, so the SVD yields the whole null space.
    let r = rows.len().max(k);
    let mut c = DMatrix::<C64>::zeros(r, k);
    for (i, row) in rows.iter().enumerate() {
        for (j, v) in row.iter().enumerate() {
            c[(i, j)] = *v;
        }
    }
    let svd = c.svd(false, true);
    let v_t = svd.v_t.ok_or("singular value decomposition failed")?;
    let top = svd.singular_values.iter().copied().fold(0.0, f64::max).max(1e-300);
    let null: Vec<usize> = (0..svd.singular_values.len()).filter(|&i| svd.singular_values[i] < 1e-8 * top).collect();
    if null.len() != genus {
        let smallest_kept = (0..svd.singular_values.len())
            .filter(|i| !null.contains(i))
            .map(|i| svd.singular_values[i] / top)
            .fold(f64::INFINITY, f64::min);
        return Err(format!(
            "the adjoint conditions leave {} differentials, but the genus is {genus} (smallest kept singular value {smallest_kept:.1e})",
            null.len()
        ));
    }
    let mut basis = DMatrix::<C64>::zeros(k, genus);
    for (l, &i) in null.iter().enumerate() {
        for j in 0..k {
            basis[(j, l)] = v_t[(i, j)].conj();
        }
    }
    let names = (1..=genus).map(|l| format!("P{l} dx/G_y (adjoint, deg P <= {})", d - 3)).collect();
    Ok(Differentials { monomials, basis, names })
}
