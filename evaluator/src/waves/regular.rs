//! `regular` over a bounded region, proved: a certified lower bound of |theta| over a box.
//!
//! At a cell's centre the engine gives theta as a ball (its factor exp(pi y.Y^-1 y) divided
//! out, the same at every point when U, V, W are real); within the cell theta moves by at
//! most (h_x |U| + h_y |V| + h_t |W|) P_1 (see `moments.rs`: |d theta / ds| <= |dz / ds| P_1
//! while Im z is fixed). Cells where the centre's lower bound does not exceed that spread are
//! halved along every axis that has width, up to the point limit. A zero is shown only for
//! a real theta (tau purely imaginary, U, V, W, D real): two points whose balls have
//! opposite signs (intermediate value theorem on the segment between them, inside the box).

use super::theta_wave::ThetaWave;

pub enum Verdict {
    Regular(String),
    Singular(String),
    Undecided(String),
}

/// An axis: its sample values (first and last are the range; one value is a fixed axis).
fn cells(v: &[f64]) -> (Vec<f64>, f64) {
    let h = if v.len() > 1 { (v[v.len() - 1] - v[0]) / (v.len() - 1) as f64 } else { 0.0 };
    (v.to_vec(), h / 2.0)
}

fn show(p: [f64; 3]) -> String {
    format!("({}, {}, {})", crate::num::fmt_f64(p[0]), crate::num::fmt_f64(p[1]), crate::num::fmt_f64(p[2]))
}

/// `budget`: the most theta evaluations; `check` the time limit; `engine` turns the theta
/// engine's refusal into the caller's error.
pub fn theta_regular<E>(
    w: &ThetaWave,
    axes: [&[f64]; 3],
    budget: usize,
    mut check: impl FnMut() -> Result<(), E>,
    engine: impl Fn(String) -> E,
) -> Result<Verdict, E> {
    if !w.real_directions() {
        return Ok(Verdict::Undecided(
            "U, V or W is complex, so Im z (and theta's size) varies over the region: kelp has no gradient bound there"
                .into(),
        ));
    }
    let norm = |d: &[num_complex::Complex64]| d.iter().map(|v| v.norm_sqr()).sum::<f64>().sqrt();
    let speed = [norm(&w.u), norm(&w.v), norm(&w.w)];
    let ax: Vec<(Vec<f64>, f64)> = axes.iter().map(|a| cells(a)).collect();
    let mut stack: Vec<([f64; 3], [f64; 3])> = vec![];
    for &t in &ax[2].0 {
        for &y in &ax[1].0 {
            for &x in &ax[0].0 {
                stack.push(([x, y, t], [ax[0].1, ax[1].1, ax[2].1]));
            }
        }
    }
    let real = w.real_theta();
    let mut signs: [Option<[f64; 3]>; 2] = [None, None];
    let mut lowest = f64::INFINITY;
    let mut evals = 0usize;
    while let Some((c, h)) = stack.pop() {
        check()?;
        evals += 1;
        let (b, p1) = w.tau_ball(c[0], c[1], c[2]).map_err(|e| engine(e.to_string()))?;
        if real && b.c.re.abs() > b.r {
            signs[(b.c.re < 0.0) as usize] = Some(c);
            if let [Some(p), Some(n)] = signs {
                return Ok(Verdict::Singular(format!(
                    "theta is real on the region and has opposite signs at {} and {} (each outside its error ball), so it vanishes between them",
                    show(p),
                    show(n)
                )));
            }
        }
        // Half-widths widened past the rounding of the centres, so neighbouring cells overlap.
        let spread = (0..3).map(|i| (h[i] * (1.0 + 1e-9) + 4.0 * super::ball::U * c[i].abs()) * speed[i]).sum::<f64>()
            * p1
            * 1.01;
        let lower = (b.c.norm() * (1.0 - 4.0 * super::ball::U) - b.r) - spread;
        if lower > 0.0 {
            lowest = lowest.min(lower);
            continue;
        }
        let split: Vec<usize> = (0..3).filter(|&i| h[i] > 0.0).collect();
        if split.is_empty() || evals + stack.len() + (1 << split.len()) > budget {
            return Ok(Verdict::Undecided(format!(
                "|theta| could not be bounded away from 0 near (x, y, t) = {}: |theta| = {:.3e} with error {:.3e} and spread {:.3e} over a cell of half-widths {} (after {evals} evaluations; the limit is the `max_points` setting)",
                show(c),
                b.c.norm(),
                b.r,
                spread,
                show(h)
            )));
        }
        for corner in 0..(1usize << split.len()) {
            let mut cc = c;
            let mut hh = h;
            for (bit, &i) in split.iter().enumerate() {
                hh[i] = h[i] / 2.0;
                cc[i] = c[i] + if corner >> bit & 1 == 1 { hh[i] } else { -hh[i] };
            }
            stack.push((cc, hh));
        }
    }
    Ok(Verdict::Regular(format!(
        "proved: |theta| >= {lowest:.3e} (its factor exp(pi y.Y^-1 y) divided out) on a box containing the region, from {evals} evaluations with a certified gradient bound"
    )))
}
