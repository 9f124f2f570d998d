//! The lattice sum itself: Fincke–Pohst enumeration of the ellipsoid in the reduced
//! basis, with every exponential taken from tables or recurrences.
//!
//! In reduced coordinates n (m = U n + a', the characteristic shifted by an integer
//! vector so that the ellipsoid's centre lies within 1/2 of the origin, which changes
//! the indexing of the series, not its value), a term has modulus exp(-|w|^2), known
//! from the enumeration, and phase
//!   k_arg + pi n^T X' n + n . phi,   X' = Re U^T tau U.
//! The phase factors exp(i pi X'_jj n_j^2) and exp(2 pi i X'_jk n_j n_k) depend on tau
//! only and are tabulated once per matrix; powers of exp(i phi_j) once per evaluation.
//! Only unit-modulus numbers are multiplied across levels, so nothing overflows however
//! skewed the lattice. Along the innermost line the ratio of consecutive terms is itself
//! geometric (two real exponentials per line for the moduli), so a point costs two
//! complex multiplications.

use nalgebra::DMatrix;
use num_complex::Complex64 as C64;
use std::f64::consts::PI;

/// Phases exp(i pi X'_jj v^2), exp(i pi X'_00 (2v + 1)) and exp(2 pi i X'_jk v w) for
/// |v|, |w| <= n_j, n_k.
#[derive(Clone, Debug)]
pub struct Tables {
    /// Half-widths of the tabulated ranges per coordinate.
    pub half: Vec<i64>,
    diag: Vec<Vec<C64>>,
    step: Vec<C64>,
    /// cross[j][k] for k > j: row-major over (v + n_j, w + n_k).
    cross: Vec<Vec<Vec<C64>>>,
}

impl Tables {
    pub fn new(taur: &DMatrix<C64>, half: Vec<i64>) -> Tables {
        let g = taur.nrows();
        let i_pi = C64::new(0.0, PI);
        let taur = taur.map(|v| C64::new(v.re, 0.0));
        let diag = (0..g)
            .map(|j| (-half[j]..=half[j]).map(|v| (i_pi * taur[(j, j)] * (v * v) as f64).exp()).collect())
            .collect();
        let step = (-half[0]..=half[0]).map(|v| (i_pi * taur[(0, 0)] * (2 * v + 1) as f64).exp()).collect();
        let cross = (0..g)
            .map(|j| {
                (0..g)
                    .map(|k| {
                        if k <= j {
                            return Vec::new();
                        }
                        let mut t = Vec::with_capacity(((2 * half[j] + 1) * (2 * half[k] + 1)) as usize);
                        for v in -half[j]..=half[j] {
                            for w in -half[k]..=half[k] {
                                t.push((i_pi * 2.0 * taur[(j, k)] * (v * w) as f64).exp());
                            }
                        }
                        t
                    })
                    .collect()
            })
            .collect();
        Tables { half, diag, step, cross }
    }

    #[inline]
    fn diag(&self, j: usize, v: i64) -> C64 {
        self.diag[j][(v + self.half[j]) as usize]
    }
    #[inline]
    fn cross(&self, j: usize, k: usize, v: i64, w: i64) -> C64 {
        let width = 2 * self.half[k] + 1;
        self.cross[j][k][((v + self.half[j]) * width + w + self.half[k]) as usize]
    }
}

/// Half-widths that hold every point of the ellipsoid |C'(n + s')| <= r for any centre
/// |s'_j| <= 1/2: |n_j| <= r sqrt((pi Y')^-1_jj) + 1/2.
pub fn half_widths(yred_inv_diag: &[f64], r: f64) -> Vec<i64> {
    yred_inv_diag.iter().map(|d| (r * (d / PI).sqrt() + 0.5).ceil() as i64).collect()
}

/// One pass's inputs, in reduced coordinates. A pass serves a batch of z that share
/// Im z (so the ellipsoid, the moduli and the derivative weights are shared) and differ
/// in Re z (so each has its own phases).
pub struct SumInput<'a> {
    pub tables: &'a Tables,
    /// Upper-triangular factor of pi Y'.
    pub c: &'a DMatrix<f64>,
    /// Centre offset s' (|s'_j| <= 1/2).
    pub s: &'a [f64],
    /// Squared radius of the ellipsoid.
    pub r2: f64,
    /// Per z: phase powers pow[b][j][v + half_j] = exp(i phi_j)^v.
    pub pow: &'a [Vec<Vec<C64>>],
    /// Per z: the common phase exp(i k_arg).
    pub k: &'a [C64],
    /// exp(2 pi i tau'_00): the second ratio along a line (phase and modulus).
    pub q: C64,
    /// Directions of derivatives in reduced coordinates (U^T d) times 2 pi i, and the
    /// constant part 2 pi i a'.d.
    pub dirs: &'a [Vec<C64>],
    pub dir_const: &'a [C64],
    pub monos: &'a [Vec<u32>],
}

pub struct SumOutput {
    /// acc[b][i]: the sum for z number b and monomial i.
    pub acc: Vec<Vec<C64>>,
    /// Sum of |term| * |weight| per monomial (the same for every z of a pass).
    pub abs: Vec<f64>,
    pub points: usize,
    pub lines: usize,
    pub max_line: usize,
}

pub fn run(inp: &SumInput) -> SumOutput {
    let g = inp.c.nrows();
    let nb = inp.k.len();
    let nm = inp.monos.len();
    let maxe: Vec<u32> = (0..inp.dirs.len()).map(|i| inp.monos.iter().map(|m| m[i]).max().unwrap_or(0)).collect();
    let zero = C64::new(0.0, 0.0);
    let mut w = Walker {
        inp,
        n: vec![0; g],
        prod: vec![vec![zero; nb]; g + 1],
        lin: vec![vec![zero; g + 1]; inp.dirs.len()],
        out: SumOutput { acc: vec![vec![zero; nm]; nb], abs: vec![0.0; nm], points: 0, lines: 0, max_line: 0 },
        powers: maxe.iter().map(|&e| vec![zero; e as usize + 1]).collect(),
        weights: vec![zero; nm],
        t: vec![zero; nb],
        rho: vec![zero; nb],
    };
    w.prod[g].copy_from_slice(inp.k);
    for i in 0..inp.dirs.len() {
        w.lin[i][g] = inp.dir_const[i];
    }
    w.level(g - 1, inp.r2, 0.0);
    w.out
}

struct Walker<'a> {
    inp: &'a SumInput<'a>,
    n: Vec<i64>,
    /// prod[j][b]: the product of the phase factors of coordinates >= j (prod[g] = K).
    prod: Vec<Vec<C64>>,
    /// lin[i][j]: 2 pi i m.d_i restricted to coordinates >= j.
    lin: Vec<Vec<C64>>,
    out: SumOutput,
    powers: Vec<Vec<C64>>,
    weights: Vec<C64>,
    t: Vec<C64>,
    rho: Vec<C64>,
}

impl Walker<'_> {
    /// Coordinate `j` given the later ones; `r2` is the squared radius left and `used`
    /// the squared norm of the later coordinates' part of w.
    fn level(&mut self, j: usize, r2: f64, used: f64) {
        let inp = self.inp;
        let c = inp.c;
        let g = c.nrows();
        let gj = c[(j, j)];
        let mut partial = 0.0;
        for k in j + 1..g {
            partial += c[(j, k)] * (self.n[k] as f64 + inp.s[k]);
        }
        let centre = inp.s[j] + partial / gj;
        let half = r2.max(0.0).sqrt() / gj;
        let h = inp.tables.half[j];
        let lo = ((-centre - half).ceil() as i64).max(-h);
        let hi = ((-centre + half).floor() as i64).min(h);
        if lo > hi {
            return;
        }
        if j == 0 {
            self.line(lo, hi, centre, used);
            return;
        }
        for v in lo..=hi {
            self.n[j] = v;
            let mut shared = inp.tables.diag(j, v);
            for k in j + 1..g {
                shared *= inp.tables.cross(j, k, v, self.n[k]);
            }
            let idx = (v + h) as usize;
            let (below, above) = self.prod.split_at_mut(j + 1);
            for (b, out) in below[j].iter_mut().enumerate() {
                *out = above[0][b] * shared * inp.pow[b][j][idx];
            }
            for i in 0..inp.dirs.len() {
                self.lin[i][j] = self.lin[i][j + 1] + inp.dirs[i][j] * v as f64;
            }
            let wj = gj * (v as f64 + centre);
            self.level(j - 1, r2 - wj * wj, used + wj * wj);
        }
    }

    /// The innermost line n_0 = lo..=hi: factors at its start, then the recurrence
    /// t(v+1) = t(v) rho(v), rho(v+1) = rho(v) q.
    fn line(&mut self, lo: i64, hi: i64, centre: f64, used: f64) {
        let inp = self.inp;
        let tb = inp.tables;
        let g = inp.c.nrows();
        let h0 = tb.half[0];
        let g0 = inp.c[(0, 0)];
        let x0 = lo as f64 + centre;
        let len = (hi - lo + 1) as usize;
        let mut start = tb.diag(0, lo) * (-(used + g0 * g0 * x0 * x0)).exp();
        // Lambda = prod_k exp(2 pi i X'_0k n_k): the n-dependent part of the ratio.
        let mut lambda = tb.step[(lo + h0) as usize];
        for k in 1..g {
            start *= tb.cross(0, k, lo, self.n[k]);
            lambda *= tb.cross(0, k, 1, self.n[k]);
        }
        // |w|^2 grows by g0^2 (2 x0 + 1) from one point to the next; within the ellipsoid
        // that ratio lies in [e^-R^2, e^R^2], so it is only formed when a next point exists.
        lambda *= if len > 1 { (-g0 * g0 * (2.0 * x0 + 1.0)).exp() } else { 0.0 };
        let (ilo, one) = ((lo + h0) as usize, (h0 + 1) as usize);
        for b in 0..self.t.len() {
            self.t[b] = self.prod[1][b] * inp.pow[b][0][ilo] * start;
            self.rho[b] = lambda * inp.pow[b][0][one];
        }
        self.out.points += len;
        self.out.lines += 1;
        if self.out.lines % 32 == 0 {
            crate::limits::checkpoint();
        }
        self.out.max_line = self.out.max_line.max(len);
        let q = inp.q;
        if inp.dirs.is_empty() {
            let mut abs = 0.0;
            for (b, acc) in self.out.acc.iter_mut().enumerate() {
                let (mut t, mut rho) = (self.t[b], self.rho[b]);
                let mut sum = C64::new(0.0, 0.0);
                for _ in 0..len {
                    sum += t;
                    if b == 0 {
                        abs += t.re.abs() + t.im.abs();
                    }
                    t *= rho;
                    rho *= q;
                }
                for a in acc.iter_mut() {
                    *a += sum;
                }
            }
            for a in self.out.abs.iter_mut() {
                *a += abs;
            }
            return;
        }
        for step in 0..len {
            let v = lo + step as i64;
            for i in 0..inp.dirs.len() {
                let s = self.lin[i][1] + inp.dirs[i][0] * v as f64;
                let p = &mut self.powers[i];
                let mut cur = C64::new(1.0, 0.0);
                for slot in p.iter_mut() {
                    *slot = cur;
                    cur *= s;
                }
            }
            let tabs = self.t[0].re.abs() + self.t[0].im.abs();
            for (mi, mo) in inp.monos.iter().enumerate() {
                let mut wgt = C64::new(1.0, 0.0);
                for (i, &e) in mo.iter().enumerate() {
                    if e > 0 {
                        wgt *= self.powers[i][e as usize];
                    }
                }
                self.weights[mi] = wgt;
                // |re| + |im| bounds the modulus within sqrt 2 without a hypot per term
                // (which was a third of a wave grid's time).
                self.out.abs[mi] += tabs * (wgt.re.abs() + wgt.im.abs());
            }
            for b in 0..self.t.len() {
                let t = self.t[b];
                for (acc, w) in self.out.acc[b].iter_mut().zip(&self.weights) {
                    *acc += t * w;
                }
                self.t[b] = t * self.rho[b];
                self.rho[b] *= q;
            }
        }
    }
}
