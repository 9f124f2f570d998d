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

/// Offsets of each coordinate's phase powers in a z's block of `SumInput::pow`, and the
/// block's length: coordinate j holds exp(i phi_j)^v for |v| <= half_j at `off[j] + v + half_j`.
pub fn pow_offsets(half: &[i64]) -> (Vec<usize>, usize) {
    let mut off = Vec::with_capacity(half.len());
    let mut total = 0;
    for &h in half {
        off.push(total);
        total += (2 * h + 1) as usize;
    }
    (off, total)
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
    /// Phase powers, one block of `pow_len` per z laid out by [`pow_offsets`] of the tables'
    /// half-widths (entries the enumeration cannot reach may be left 0).
    pub pow: &'a [C64],
    pub pow_off: &'a [usize],
    pub pow_len: usize,
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
    /// acc[b * nm + i]: the sum for z number b and monomial i (nm monomials).
    pub acc: Vec<C64>,
    /// Running compensation of `acc` (line sums are added with TwoSum, so the
    /// accumulation over many lines costs no more than one rounding).
    comp: Vec<C64>,
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
    let max_order = inp.orders.iter().copied().max().unwrap_or(0) as usize;
    let zero = C64::new(0.0, 0.0);
    let mut w = Walker {
        inp,
        n: vec![0; g],
        part: vec![0.0; g * (g + 1)],
        prod: vec![zero; nb * (g + 1)],
        lin: vec![vec![zero; g + 1]; inp.dirs.len()],
        out: SumOutput {
            acc: vec![zero; nb * nm],
            comp: vec![zero; nb * nm],
            abs: vec![0.0; nm],
            abs0: 0.0,
            grow: vec![0.0; nm],
            weight_err: vec![0.0; nm],
            points: 0,
            lines: 0,
            max_line: 0,
        },
        line_acc: vec![zero; if inp.dirs.is_empty() { 0 } else { nb * nm }],
        powers: maxe.iter().map(|&e| vec![zero; e as usize + 1]).collect(),
        order_err: vec![0.0; max_order + 1],
        weights: vec![zero; nm],
        t: vec![zero; 2 * nb],
        rho: vec![zero; 2 * nb],
        jet: jet_exponents(inp),
    };
    w.prod[g * nb..].copy_from_slice(inp.k);
    for i in 0..inp.dirs.len() {
        w.lin[i][g] = inp.dir_const[i];
    }
    w.level(g - 1, inp.r2, 0.0);
    let mut out = w.out;
    for (a, c) in out.acc.iter_mut().zip(&out.comp) {
        *a += c;
    }
    // The weights' rounding was summed per total order k as sum |t| (sigma + d)^(k-1).
    for (mi, &k) in inp.orders.iter().enumerate() {
        if k > 0 {
            out.weight_err[mi] = k as f64 * inp.dir_err * w.order_err[k as usize];
        }
    }
    out
}

/// ceil(x) for |x| <= h + 1, and a value beyond -h - 1 or h + 1 on the same side
/// otherwise (the callers clamp to [-h, h]); without a libm call on targets that lack a
/// rounding instruction.
#[inline(always)]
fn ceil_within(x: f64, h: i64) -> i64 {
    let lim = (h + 1) as f64;
    let x = x.clamp(-lim, lim);
    let i = x as i64;
    if (i as f64) < x {
        i + 1
    } else {
        i
    }
}

/// floor(x), as [`ceil_within`].
#[inline(always)]
fn floor_within(x: f64, h: i64) -> i64 {
    let lim = (h + 1) as f64;
    let x = x.clamp(-lim, lim);
    let i = x as i64;
    if (i as f64) > x {
        i - 1
    } else {
        i
    }
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
    /// part[j * (g + 1) + k] = sum_{i >= k} C_ji (n_i + s_i) (i > j): the centre's partial
    /// sums, updated when n_k changes so a level's centre costs one addition.
    part: Vec<f64>,
    /// prod[j * nb + b]: the product of the phase factors of coordinates >= j (prod[g] = K).
    prod: Vec<C64>,
    /// lin[i][j]: 2 pi i m.d_i restricted to coordinates >= j.
    lin: Vec<Vec<C64>>,
    out: SumOutput,
    powers: Vec<Vec<C64>>,
    /// order_err[k]: sum over terms of |t| (sigma + d)^(k-1).
    order_err: Vec<f64>,
    weights: Vec<C64>,
    /// Current term and ratio per z: forward in [..nb], backward in [nb..].
    t: Vec<C64>,
    rho: Vec<C64>,
    /// Sums along the current line, per z and monomial (derivative passes only).
    line_acc: Vec<C64>,
    /// For a jet (one direction, every monomial a single power e <= `JET_MAX`): each
    /// monomial's exponent.
    jet: Option<Vec<usize>>,
}

/// The highest order a jet pass takes by [`Walker::jet_line`].
const JET_MAX: usize = 4;

fn jet_exponents(inp: &SumInput) -> Option<Vec<usize>> {
    if inp.dirs.len() != 1 || inp.monos.iter().any(|m| m.len() != 1 || m[0] as usize > JET_MAX) {
        return None;
    }
    Some(inp.monos.iter().map(|m| m[0] as usize).collect())
}

impl Walker<'_> {
    /// Coordinate `j` given the later ones; `r2` is the squared radius left and `used`
    /// the squared norm of the later coordinates' part of w.
    fn level(&mut self, j: usize, r2: f64, used: f64) {
        let inp = self.inp;
        let c = inp.c;
        let g = c.nrows();
        let nb = inp.k.len();
        let gj = c[(j, j)];
        let stride = g + 1;
        let centre = inp.s[j] + self.part[j * stride + j + 1] / gj;
        let half = r2.max(0.0).sqrt() / gj;
        let h = inp.tables.half[j];
        let lo = ceil_within(-centre - half, h).max(-h);
        let hi = floor_within(-centre + half, h).min(h);
        if lo > hi {
            return;
        }
        if j == 0 {
            self.line(lo, hi, centre, used);
            return;
        }
        let off = inp.pow_off[j];
        for v in lo..=hi {
            self.n[j] = v;
            let x = v as f64 + inp.s[j];
            for i in 0..j {
                self.part[i * stride + j] = self.part[i * stride + j + 1] + c[(i, j)] * x;
            }
            let mut shared = inp.tables.diag(j, v);
            for k in j + 1..g {
                shared *= inp.tables.cross(j, k, v, self.n[k]);
            }
            let idx = off + (v + h) as usize;
            let (below, above) = self.prod.split_at_mut((j + 1) * nb);
            let below = &mut below[j * nb..];
            for b in 0..nb {
                below[b] = above[b] * shared * inp.pow[b * inp.pow_len + idx];
            }
            for i in 0..inp.dirs.len() {
                self.lin[i][j] = self.lin[i][j + 1] + inp.dirs[i][j] * v as f64;
            }
            let wj = gj * (v as f64 + centre);
            self.level(j - 1, r2 - wj * wj, used + wj * wj);
        }
    }

    /// The innermost line n_0 = lo..=hi. Lines longer than 6 are walked outwards from the
    /// point nearest their centre in both directions, so that the recurrences' rounding
    /// (which grows with the number of steps) is smallest on the largest terms; shorter
    /// ones (most of them in skewed lattices) from one end. The factors are formed once,
    /// at the start point m: forward t(k + 1) = t(k) rho(k), rho(k + 1) = rho(k) q; the
    /// backward walk starts from t(m) times its own first ratio (the ratio of consecutive
    /// ratios is exp(2 pi i tau'_00) either way), so its term k points out of m is k
    /// recurrence steps from t(m) and is charged as such.
    #[inline(always)]
    fn line(&mut self, lo: i64, hi: i64, centre: f64, used: f64) {
        let len = (hi - lo + 1) as usize;
        self.out.points += len;
        self.out.lines += 1;
        if self.out.lines % 32 == 0 {
            crate::limits::checkpoint();
        }
        self.out.max_line = self.out.max_line.max(len);
        let mid = if len > 6 { ((-centre).round() as i64).clamp(lo, hi) } else { lo };
        let (nf, nbk) = ((hi - mid + 1) as usize, (mid - lo) as usize);
        let inp = self.inp;
        let tb = inp.tables;
        let g = inp.c.nrows();
        let nb = inp.k.len();
        let h0 = tb.half[0];
        let g0 = inp.c[(0, 0)];
        let x0 = mid as f64 + centre;
        let mut first = tb.diag(0, mid) * (-(used + g0 * g0 * x0 * x0)).exp();
        // P = prod_k exp(2 pi i X'_0k n_k), the n-dependent part of the forward ratio; the
        // backward ratio's is its conjugate, which carries the same error bound as the
        // product of the tables at v = -1 it stands for (conjugation is exact).
        let mut p = C64::new(1.0, 0.0);
        for k in 1..g {
            first *= tb.cross(0, k, mid, self.n[k]);
            if len > 1 {
                p *= tb.cross(0, k, 1, self.n[k]);
            }
        }
        // |w|^2 changes by g0^2 (2 x0 +- 1) from one point to the next; within the ellipsoid
        // that ratio lies in [e^-R^2, e^R^2], so it is only formed when a next point exists.
        let lambda_f = if nf > 1 {
            tb.step[(mid + h0) as usize] * p * (-g0 * g0 * (2.0 * x0 + 1.0)).exp()
        } else {
            C64::new(0.0, 0.0)
        };
        let lambda_b = if nbk > 0 {
            (tb.step[(mid - 1 + h0) as usize] * p).conj() * (-g0 * g0 * (1.0 - 2.0 * x0)).exp()
        } else {
            C64::new(0.0, 0.0)
        };
        let (off0, plen) = (inp.pow_off[0], inp.pow_len);
        let imid = off0 + (mid + h0) as usize;
        for b in 0..nb {
            let pw = &inp.pow[b * plen..];
            let t = self.prod[nb + b] * pw[imid] * first;
            self.t[b] = t;
            self.rho[b] = lambda_f * pw[off0 + (h0 + 1) as usize];
            if nbk > 0 {
                let rb = lambda_b * pw[off0 + (h0 - 1) as usize];
                self.t[nb + b] = t * rb;
                self.rho[nb + b] = rb * inp.q;
            }
        }
        if inp.dirs.is_empty() {
            self.plain_line(nf, nbk, x0, used);
        } else if let Some(n) = self.jet.as_ref().map(|e| e.iter().copied().max().unwrap_or(0) + 1) {
            match n {
                1 => self.jet_line::<1>(nf, nbk, mid, x0, used),
                2 => self.jet_line::<2>(nf, nbk, mid, x0, used),
                3 => self.jet_line::<3>(nf, nbk, mid, x0, used),
                4 => self.jet_line::<4>(nf, nbk, mid, x0, used),
                _ => self.jet_line::<{ JET_MAX + 1 }>(nf, nbk, mid, x0, used),
            }
        } else {
            self.line_acc.iter_mut().for_each(|a| *a = C64::new(0.0, 0.0));
            for step in 0..nf {
                self.deriv_step(mid + step as i64, step as f64, x0 + step as f64, used, 0);
            }
            for step in 1..=nbk {
                self.deriv_step(mid - step as i64, step as f64, x0 - step as f64, used, nb);
            }
            for ((a, c), x) in self.out.acc.iter_mut().zip(self.out.comp.iter_mut()).zip(&self.line_acc) {
                add_compensated(a, c, *x);
            }
        }
    }

    /// A line without derivative weights: `nf` points forward from the start m (steps
    /// 0..nf), `nbk` backward (steps 1..=nbk), one compensated addition per z.
    #[inline(always)]
    fn plain_line(&mut self, nf: usize, nbk: usize, x0: f64, used: f64) {
        let inp = self.inp;
        let nb = inp.k.len();
        let nm = inp.monos.len();
        let q = inp.q;
        let g0 = inp.c[(0, 0)];
        let [c1, c2, c3] = inp.growth;
        let mut abs = 0.0;
        let mut grow = 0.0;
        for b in 0..nb {
            let mut sum = C64::new(0.0, 0.0);
            let (mut t, mut rho) = (self.t[b], self.rho[b]);
            if b == 0 {
                // Moments sum m k^j of the moduli per direction; |w|^2 = used + g0^2 (x0 +- k)^2
                // is expanded once per line.
                let (mut s0, mut s1f, mut s2) = (0.0, 0.0, 0.0);
                walk_moments(nf, (t, rho), q, 0.0, &mut sum, &mut s0, &mut s1f, &mut s2);
                let mut s1b = 0.0;
                walk_moments(nbk, (self.t[nb], self.rho[nb]), q, 1.0, &mut sum, &mut s0, &mut s1b, &mut s2);
                abs = s0;
                let w2 = used * s0 + g0 * g0 * (x0 * x0 * s0 + 2.0 * x0 * (s1f - s1b) + s2);
                grow = c1 * (s1f + s1b) + c2 * s2 + c3 * w2.max(0.0);
            } else {
                for _ in 0..nf {
                    sum += t;
                    t *= rho;
                    rho *= q;
                }
                let (mut t, mut rho) = (self.t[nb + b], self.rho[nb + b]);
                for _ in 0..nbk {
                    sum += t;
                    t *= rho;
                    rho *= q;
                }
            }
            let row = b * nm..(b + 1) * nm;
            for (a, c) in self.out.acc[row.clone()].iter_mut().zip(self.out.comp[row].iter_mut()) {
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
    }

    /// A line of a jet pass (see [`jet_exponents`]), N = highest exponent + 1: the same
    /// walk, sums and bookkeeping as [`Walker::deriv_step`] with the weights s^e
    /// (s = 2 pi i m.d) applied by Horner's scheme, t s^e = (t s^(e-1)) s: e complex
    /// products per weighted term as before (s^e by e - 1 products, then times t), without
    /// a product per monomial. The weights' moduli for the bound are |s|^e (computed
    /// modulus; |s^e| = |s|^e, and its few roundings are covered like those of the other
    /// moduli sums, see `rounding.rs`), at most the |re| + |im| of the power used before.
    #[inline(never)]
    fn jet_line<const N: usize>(&mut self, nf: usize, nbk: usize, mid: i64, x0: f64, used: f64) {
        let inp = self.inp;
        let nb = inp.k.len();
        let nm = inp.monos.len();
        let q = inp.q;
        let d0 = inp.dirs[0][0];
        let lin1 = self.lin[0][1];
        let g0 = inp.c[(0, 0)];
        let [c1, c2, c3] = inp.growth;
        let derr = inp.dir_err;
        let zero = C64::new(0.0, 0.0);
        let (mut abs, mut grow, mut oerr) = ([0.0; N], [0.0; N], [0.0; N]);
        for b in 0..nb {
            let mut acc = [zero; N];
            // Forward: steps 0..nf from m; backward: steps 1..=nbk.
            for (side, n, dir, k0) in [(0, nf, 1i64, 0i64), (nb, nbk, -1, 1)] {
                let (mut t, mut rho) = (self.t[side + b], self.rho[side + b]);
                for k in k0..k0 + n as i64 {
                    let v = mid + dir * k;
                    let s = lin1 + d0 * v as f64;
                    if b == 0 {
                        let tabs = t.re.abs() + t.im.abs();
                        let kf = k as f64;
                        let wk = g0 * (x0 + (dir * k) as f64);
                        let tg = tabs * (kf * (c1 + c2 * kf) + c3 * (used + wk * wk));
                        let m = (s.re * s.re + s.im * s.im).sqrt();
                        let (mut pa, mut pg) = (tabs, tg);
                        for e in 0..N {
                            abs[e] += pa;
                            grow[e] += pg;
                            pa *= m;
                            pg *= m;
                        }
                        // The weights' rounding: |t| (sigma + d)^(k-1) per total order k.
                        let sig = s.re.abs() + s.im.abs() + derr;
                        let mut po = tabs;
                        for o in oerr.iter_mut().skip(1) {
                            *o += po;
                            po *= sig;
                        }
                    }
                    let mut tt = t;
                    for a in acc.iter_mut() {
                        *a += tt;
                        tt *= s;
                    }
                    t *= rho;
                    rho *= q;
                }
            }
            let exps = self.jet.as_deref().unwrap_or(&[]);
            let row = b * nm..(b + 1) * nm;
            for ((a, c), &e) in self.out.acc[row.clone()].iter_mut().zip(self.out.comp[row].iter_mut()).zip(exps) {
                add_compensated(a, c, acc[e]);
            }
        }
        let exps = self.jet.as_deref().unwrap_or(&[]);
        for (mi, &e) in exps.iter().enumerate() {
            self.out.abs[mi] += abs[e];
            self.out.grow[mi] += grow[e];
        }
        self.out.abs0 += abs[0];
        for (o, x) in self.order_err.iter_mut().zip(&oerr).skip(1) {
            *o += x;
        }
    }

    /// One point of a line with derivative weights: n_0 = `v`, `kf` recurrence steps from
    /// the line's start, x = n_0 + centre; terms and ratios at `t[side..]`, `rho[side..]`.
    fn deriv_step(&mut self, v: i64, kf: f64, x: f64, used: f64, side: usize) {
        let inp = self.inp;
        let nb = inp.k.len();
        let nm = inp.monos.len();
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
        let t0 = self.t[side];
        let tabs = t0.re.abs() + t0.im.abs();
        // Powers of sigma + d (sigma = sum |s_i|, d the largest rounding of an s_i) for
        // the weights' error: k d (sigma + d)^(k-1) for a weight of total order k, summed
        // per order with the term's modulus (`run` multiplies by k d).
        let mut pw = tabs;
        for e in self.order_err.iter_mut().skip(1) {
            *e += pw;
            pw *= sigma + inp.dir_err;
        }
        self.out.abs0 += tabs;
        let wk = inp.c[(0, 0)] * x;
        let [c1, c2, c3] = inp.growth;
        let tgrow = tabs * (kf * (c1 + c2 * kf) + c3 * (used + wk * wk));
        let (abs, grow) = (&mut self.out.abs[..nm], &mut self.out.grow[..nm]);
        for (mi, mo) in inp.monos.iter().enumerate() {
            // One direction (a jet): the weight is a power itself.
            let wgt = if let [e] = mo[..] {
                self.powers[0][e as usize]
            } else {
                let mut wgt = C64::new(1.0, 0.0);
                for (i, &e) in mo.iter().enumerate() {
                    if e > 0 {
                        wgt *= self.powers[i][e as usize];
                    }
                }
                wgt
            };
            self.weights[mi] = wgt;
            // |re| + |im| bounds the modulus within sqrt 2 without a hypot per term
            // (which was a third of a wave grid's time).
            let wabs = wgt.re.abs() + wgt.im.abs();
            abs[mi] += tabs * wabs;
            grow[mi] += tgrow * wabs;
        }
        let q = inp.q;
        for b in 0..nb {
            let t = self.t[side + b];
            for (acc, w) in self.line_acc[b * nm..(b + 1) * nm].iter_mut().zip(&self.weights) {
                *acc += t * w;
            }
            self.t[side + b] = t * self.rho[side + b];
            self.rho[side + b] *= q;
        }
    }
}

/// One walk along a line: n terms t, t rho, t rho^2 q, ... (each ratio times q), summed
/// into `sum`, with the moments of their moduli m: sum m, sum m k, sum m k^2 for
/// k = k0, k0 + 1, ... (the forward and the backward walk of a line share this).
#[inline(always)]
#[allow(clippy::too_many_arguments)]
fn walk_moments(
    n: usize,
    (mut t, mut rho): (C64, C64),
    q: C64,
    k0: f64,
    sum: &mut C64,
    s0: &mut f64,
    s1: &mut f64,
    s2: &mut f64,
) {
    let mut kf = k0;
    for _ in 0..n {
        *sum += t;
        let m = t.re.abs() + t.im.abs();
        let mk = m * kf;
        *s0 += m;
        *s1 += mk;
        *s2 += mk * kf;
        kf += 1.0;
        t *= rho;
        rho *= q;
    }
}
