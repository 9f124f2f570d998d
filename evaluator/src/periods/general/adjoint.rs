//! Holomorphic differentials P(x, y) dx / G_y on a plane curve of degree d: deg P <= d - 3,
//! and at every singular point of multiplicity m whose infinitely near points are all
//! smooth (nodes, cusps, ordinary multiple points: one blow-up resolves them) P vanishes
//! to order m - 1 (the adjoint conditions; conventions file, classical). Singular points
//! with coordinates known numerically give numerical conditions; the basis is their null
//! space, and its dimension must equal the exact genus.

use super::plane::Plane;
use nalgebra::DMatrix;
use num_complex::Complex64 as C64;

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

/// `singular`: (x0, y0, multiplicity) in the chart of `plane`.
pub fn holomorphic(plane: &Plane, singular: &[(C64, C64, u32)], genus: usize) -> Result<Differentials, String> {
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
    for &(x0, y0, m) in singular {
        for order in 0..m.saturating_sub(1) {
            for beta in 0..=order {
                let alpha = order - beta;
                let row: Vec<C64> = monomials
                    .iter()
                    .map(|&(a, b)| {
                        if a < alpha || b < beta {
                            return C64::new(0.0, 0.0);
                        }
                        x0.powi((a - alpha) as i32) * y0.powi((b - beta) as i32) * falling(a, alpha) * falling(b, beta)
                    })
                    .collect();
                let n = row.iter().map(|v| v.norm()).fold(0.0, f64::max).max(1e-300);
                rows.push(row.into_iter().map(|v| v / n).collect());
            }
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
