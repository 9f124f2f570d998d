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
    /// (c1, c2, c3) of [`SumOutput::grow`].
    pub growth: [f64; 3],
    /// A bound on the absolute rounding of any 2 pi i m.d_i at any point.
    pub dir_err: f64,
    /// Total order of each monomial.
    pub orders: &'a [u32],
}

pub struct SumOutput {
    /// acc[b][i]: the sum for z number b and monomial i.
    pub acc: Vec<Vec<C64>>,
    /// Running compensation of `acc` (line sums are added with TwoSum, so the
    /// accumulation over many lines costs no more than one rounding).
    comp: Vec<Vec<C64>>,
    /// Sum of |term| * |weight| per monomial (the same for every z of a pass), as
    /// |re| + |im|, an upper bound of the modulus.
    pub abs: Vec<f64>,
    /// Sum of |term| (as |re| + |im|) without derivative weights.
    pub abs0: f64,
    /// Per monomial: sum of |term| |weight| (c1 k + c2 k^2 + c3 |w|^2), the part of the
    /// terms' rounding that grows with the step k along the line and with |w|^2.
    pub grow: Vec<f64>,
    /// Per monomial: sum of |term| times the bound on its weight's rounding.
    pub weight_err: Vec<f64>,
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
        out: SumOutput {
            acc: vec![vec![zero; nm]; nb],
            comp: vec![vec![zero; nm]; nb],
            abs: vec![0.0; nm],
            abs0: 0.0,
            grow: vec![0.0; nm],
            weight_err: vec![0.0; nm],
            points: 0,
            lines: 0,
            max_line: 0,
        },
        line_acc: vec![vec![zero; nm]; nb],
        powers: maxe.iter().map(|&e| vec![zero; e as usize + 1]).collect(),
        spow: vec![0.0; inp.orders.iter().copied().max().unwrap_or(0) as usize + 1],
        weights: vec![zero; nm],
        t: vec![zero; nb],
        rho: vec![zero; nb],
    };
    w.prod[g].copy_from_slice(inp.k);
    for i in 0..inp.dirs.len() {
        w.lin[i][g] = inp.dir_const[i];
    }
    w.level(g - 1, inp.r2, 0.0);
    let mut out = w.out;
    for (acc, comp) in out.acc.iter_mut().zip(&out.comp) {
        for (a, c) in acc.iter_mut().zip(comp) {
            *a += c;
        }
    }
    out
}

/// Knuth's TwoSum: s + e = a + b exactly, with s = fl(a + b).
#[inline]
fn two_sum(a: f64, b: f64) -> (f64, f64) {
    let s = a + b;
    let bb = s - a;
    (s, (a - (s - bb)) + (b - bb))
}

/// acc + x with the rounding error kept in `comp`.
#[inline]
fn add_compensated(acc: &mut C64, comp: &mut C64, x: C64) {
    let (re, er) = two_sum(acc.re, x.re);
    let (im, ei) = two_sum(acc.im, x.im);
    *acc = C64::new(re, im);
    *comp += C64::new(er, ei);
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
    /// Powers of sigma + d along the current point (see `line`).
    spow: Vec<f64>,
    weights: Vec<C64>,
    t: Vec<C64>,
    rho: Vec<C64>,
    /// Sums along the current line, per z and monomial.
    line_acc: Vec<Vec<C64>>,
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

    /// The innermost line n_0 = lo..=hi, walked outwards from the point nearest its
    /// centre in both directions, so that the recurrences' rounding (which grows with the
    /// number of steps) is smallest on the largest terms.
    fn line(&mut self, lo: i64, hi: i64, centre: f64, used: f64) {
        let len = (hi - lo + 1) as usize;
        self.out.points += len;
        self.out.lines += 1;
        if self.out.lines % 32 == 0 {
            crate::limits::checkpoint();
        }
        self.out.max_line = self.out.max_line.max(len);
        // Short lines (most of them in skewed lattices) are walked from one end: splitting
        // them would double the work per line for a few steps' worth of rounding.
        let mid = if len > 6 { ((-centre).round() as i64).clamp(lo, hi) } else { lo };
        self.segment(mid, (hi - mid + 1) as usize, 1, centre, used);
        if mid > lo {
            self.segment(mid - 1, (mid - lo) as usize, -1, centre, used);
        }
    }

    /// `len` points from n_0 = `start` in direction `dir` (+1 or -1): factors at the start,
    /// then the recurrence t(k + 1) = t(k) rho(k), rho(k + 1) = rho(k) q (the ratio of
    /// consecutive ratios is exp(2 pi i tau'_00) either way).
    fn segment(&mut self, start: i64, len: usize, dir: i64, centre: f64, used: f64) {
        let inp = self.inp;
        let tb = inp.tables;
        let g = inp.c.nrows();
        let h0 = tb.half[0];
        let g0 = inp.c[(0, 0)];
        let x0 = start as f64 + centre;
        let dirf = dir as f64;
        let mut first = tb.diag(0, start) * (-(used + g0 * g0 * x0 * x0)).exp();
        // Lambda = prod_k exp(+-2 pi i X'_0k n_k) times the diagonal step: the n-dependent part of the ratio.
        let mut lambda = if len > 1 {
            if dir > 0 {
                tb.step[(start + h0) as usize]
            } else {
                tb.step[(start - 1 + h0) as usize].conj()
            }
        } else {
            C64::new(0.0, 0.0)
        };
        for k in 1..g {
            first *= tb.cross(0, k, start, self.n[k]);
            lambda *= tb.cross(0, k, dir, self.n[k]);
        }
        // |w|^2 changes by g0^2 (2 dir x0 + 1) from one point to the next; within the
        // ellipsoid that ratio lies in [e^-R^2, e^R^2], so it is only formed when a next point exists.
        lambda *= if len > 1 { (-g0 * g0 * (2.0 * dirf * x0 + 1.0)).exp() } else { 0.0 };
        let (istart, one) = ((start + h0) as usize, (h0 + dir) as usize);
        for b in 0..self.t.len() {
            self.t[b] = self.prod[1][b] * inp.pow[b][0][istart] * first;
            self.rho[b] = lambda * inp.pow[b][0][one];
        }
        let q = inp.q;
        if inp.dirs.is_empty() {
            let [c1, c2, c3] = inp.growth;
            let (mut abs, mut grow) = (0.0, 0.0);
            for (b, (acc, comp)) in self.out.acc.iter_mut().zip(self.out.comp.iter_mut()).enumerate() {
                let (mut t, mut rho) = (self.t[b], self.rho[b]);
                let mut sum = C64::new(0.0, 0.0);
                if b == 0 {
                    // Moments sum m k^j of the moduli along the line; |w|^2 = used +
                    // g0^2 (x0 + k)^2 is expanded once per line.
                    let (mut s0, mut s1, mut s2, mut kf) = (0.0, 0.0, 0.0, 0.0);
                    for _ in 0..len {
                        sum += t;
                        let m = t.re.abs() + t.im.abs();
                        let mk = m * kf;
                        s0 += m;
                        s1 += mk;
                        s2 += mk * kf;
                        kf += 1.0;
                        t *= rho;
                        rho *= q;
                    }
                    abs += s0;
                    let w2 = used * s0 + g0 * g0 * (x0 * x0 * s0 + 2.0 * dirf * x0 * s1 + s2);
                    grow += c1 * s1 + c2 * s2 + c3 * w2.max(0.0);
                } else {
                    for _ in 0..len {
                        sum += t;
                        t *= rho;
                        rho *= q;
                    }
                }
                for (a, c) in acc.iter_mut().zip(comp.iter_mut()) {
                    add_compensated(a, c, sum);
                }
            }
            for a in self.out.abs.iter_mut() {
                *a += abs;
            }
            self.out.abs0 += abs;
            for a in self.out.grow.iter_mut() {
                *a += grow;
            }
            return;
        }
        for row in self.line_acc.iter_mut() {
            row.iter_mut().for_each(|a| *a = C64::new(0.0, 0.0));
        }
        for step in 0..len {
            let v = start + dir * step as i64;
            let mut sigma = 0.0;
            for i in 0..inp.dirs.len() {
                let s = self.lin[i][1] + inp.dirs[i][0] * v as f64;
                let p = &mut self.powers[i];
                let mut cur = C64::new(1.0, 0.0);
                for slot in p.iter_mut() {
                    *slot = cur;
                    cur *= s;
                }
                sigma += s.re.abs() + s.im.abs();
            }
            // Powers of sigma + d (sigma = sum |s_i|, d the largest rounding of an s_i) for
            // the weights' error: k d (sigma + d)^(k-1) for a weight of total order k.
            let mut pw = 1.0;
            for slot in self.spow.iter_mut() {
                *slot = pw;
                pw *= sigma + inp.dir_err;
            }
            let tabs = self.t[0].re.abs() + self.t[0].im.abs();
            let kf = step as f64;
            self.out.abs0 += tabs;
            let wk = g0 * (x0 + dirf * kf);
            let [c1, c2, c3] = inp.growth;
            let tgrow = tabs * (kf * (c1 + c2 * kf) + c3 * (used + wk * wk));
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
                let wabs = wgt.re.abs() + wgt.im.abs();
                self.out.abs[mi] += tabs * wabs;
                self.out.grow[mi] += tgrow * wabs;
                let k = inp.orders[mi];
                if k > 0 {
                    self.out.weight_err[mi] += tabs * (k as f64 * inp.dir_err) * self.spow[k as usize - 1];
                }
            }
            for b in 0..self.t.len() {
                let t = self.t[b];
                for (acc, w) in self.line_acc[b].iter_mut().zip(&self.weights) {
                    *acc += t * w;
                }
                self.t[b] = t * self.rho[b];
                self.rho[b] *= q;
            }
        }
        for ((acc, comp), line) in self.out.acc.iter_mut().zip(self.out.comp.iter_mut()).zip(&self.line_acc) {
            for ((a, c), x) in acc.iter_mut().zip(comp.iter_mut()).zip(line) {
                add_compensated(a, c, *x);
            }
        }
    }
}
