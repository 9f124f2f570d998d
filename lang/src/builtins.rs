//! The built-in functions: their parameters, result kind and documentation. The checker
//! validates calls against this table; the language server shows it on hover.

/// What a parameter accepts.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ParamKind {
    Number,
    Curve,
    Wave,
    /// A matrix (list of equal-length lists).
    Matrix,
    Vector,
    /// A list of vectors (directions for `along`).
    VectorList,
    /// A vector or list (for `count`).
    Collection,
    /// A point `(x, y)` or `(x : y : z)`.
    Point,
    /// A point, or a list of points (a divisor, with `counts`).
    Points,
    /// Characteristics `[a, b]`, a 2 x g matrix.
    Characteristic,
    /// `true` or `false`.
    Bool,
    /// A curve, or a 1 x 1 Riemann matrix (for `j_invariant`).
    CurveOrMatrix,
    /// A number, vector or matrix (entrywise functions: `re`, `conj`, ...).
    Numeric,
}

#[derive(Clone, Copy, Debug)]
pub struct Param {
    pub name: &'static str,
    pub kind: ParamKind,
    pub required: bool,
}

/// Whether the call takes region axes (`x in A..B`, `t = A`).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum RegionUse {
    None,
    Required,
    Optional,
}

/// The kind a call yields (shapes are filled in by the checker where known).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Yields {
    Number,
    Bool,
    List,
    Matrix,
    Vector,
    Wave,
    /// The kind of the first argument (entrywise functions); the checker also derives
    /// shapes of `transpose`, `identity`, `zeros` and indexing.
    SameKind,
}

#[derive(Clone, Copy, Debug)]
pub struct Builtin {
    pub name: &'static str,
    pub positional: &'static [Param],
    pub keywords: &'static [Param],
    pub region: RegionUse,
    pub yields: Yields,
    pub signature: &'static str,
    pub summary: &'static str,
}

impl Builtin {
    pub fn is_wave_constructor(&self) -> bool {
        self.yields == Yields::Wave
    }
}

const fn p(name: &'static str, kind: ParamKind) -> Param {
    Param { name, kind, required: true }
}
const fn opt(name: &'static str, kind: ParamKind) -> Param {
    Param { name, kind, required: false }
}

use ParamKind as K;

pub const BUILTINS: &[Builtin] = &[
    Builtin {
        name: "degree",
        positional: &[p("curve", K::Curve)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "degree(C)",
        summary: "Total degree of the curve's equation (an integer).",
    },
    Builtin {
        name: "genus",
        positional: &[p("curve", K::Curve)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "genus(C)",
        summary: "Geometric genus of an irreducible curve: (d-1)(d-2)/2 minus the delta invariants of its singular points.",
    },
    Builtin {
        name: "smooth",
        positional: &[p("curve", K::Curve)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Bool,
        signature: "smooth(C)",
        summary: "Whether the projective closure of the curve has no singular point.",
    },
    Builtin {
        name: "singular_points",
        positional: &[p("curve", K::Curve)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::List,
        signature: "singular_points(C)",
        summary: "Projective singular points, each with multiplicity, type and delta invariant.",
    },
    Builtin {
        name: "j_invariant",
        positional: &[p("curve", K::CurveOrMatrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "j_invariant(C) or j_invariant(T)",
        summary: "Exact j-invariant (a rational) of a genus-1 curve, or j(tau) of a 1 x 1 Riemann matrix with an error bound.",
    },
    Builtin {
        name: "tau",
        positional: &[p("curve", K::Curve)],
        keywords: &[opt("reduce", K::Bool)],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "tau(C, reduce = true)",
        summary: "A Riemann matrix of the curve (symmetric, positive-definite imaginary part) with an error estimate; Siegel-reduced unless `reduce = false`. Curves y^m = f(x) so far.",
    },
    Builtin {
        name: "a_periods",
        positional: &[p("curve", K::Curve)],
        keywords: &[opt("reduce", K::Bool)],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "a_periods(C, reduce = true)",
        summary: "The a-period matrix A of the curve: A[l, k] is the integral of the l-th holomorphic differential (see `differentials`) over the cycle a_k, with an error bound; tau = A^-1 B. The cycles are those of `tau(C, reduce = ...)`.",
    },
    Builtin {
        name: "b_periods",
        positional: &[p("curve", K::Curve)],
        keywords: &[opt("reduce", K::Bool)],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "b_periods(C, reduce = true)",
        summary: "The b-period matrix B of the curve: B[l, k] is the integral of the l-th holomorphic differential over the cycle b_k, with an error bound; tau = A^-1 B.",
    },
    Builtin {
        name: "differentials",
        positional: &[p("curve", K::Curve)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::List,
        signature: "differentials(C)",
        summary: "The basis of holomorphic differentials the periods use, as exact forms over Q (for example `x dx/y^2`), in the order of the rows of `a_periods` and `b_periods`.",
    },
    Builtin {
        name: "even_thetas",
        positional: &[p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::List,
        signature: "even_thetas(T)",
        summary: "The even theta constants theta[a, b](0 | T) over the half-integer characteristics, in binary order (bit k of the index is 2 a_k for k < g, 2 b_(k-g) above), with a bound covering each.",
    },
    Builtin {
        name: "hyperelliptic",
        positional: &[p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Bool,
        signature: "hyperelliptic(T)",
        summary: "Whether T can be the Riemann matrix of a hyperelliptic curve, by counting vanishing even theta constants: false when too few can vanish (proved by the bounds), true in genus 1 and for indecomposable genus 2; otherwise undecided (a value is never proved zero).",
    },
    Builtin {
        name: "siegel_transform",
        positional: &[p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "siegel_transform(T)",
        summary: "The integer symplectic matrix G = [[A, B], [C, D]] (2g x 2g, exact) of Siegel's reduction of the Riemann matrix T: `siegel_reduced(T)` is `symplectic_act(G, T)`.",
    },
    Builtin {
        name: "siegel_reduced",
        positional: &[p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "siegel_reduced(T)",
        summary: "T moved by Siegel's reduction into the reduced domain (|Re T_ij| <= 1/2, Im T LLL-reduced, |T_11| >= 1), with a bound covering T's own error.",
    },
    Builtin {
        name: "symplectic_act",
        positional: &[p("gamma", K::Matrix), p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "symplectic_act(G, T)",
        summary: "(A T + B)(C T + D)^-1 for an integer symplectic G = [[A, B], [C, D]] (checked exactly; the failing relation is named), with a bound.",
    },
    Builtin {
        name: "abel_jacobi",
        positional: &[p("curve", K::Curve), p("points", K::Points)],
        keywords: &[opt("counts", K::Vector), opt("from", K::Point), opt("reduce", K::Bool)],
        region: RegionUse::None,
        yields: Yields::Vector,
        signature: "abel_jacobi(C, D, counts = [n1, n2, ...], from = P0, reduce = true)",
        summary: "The Abel–Jacobi image of a point or of the divisor n1 P1 + n2 P2 + ... (counts default to 1) from the base point P0, in the normalised coordinates of `tau(C, reduce = ...)` (lattice Z^g + T Z^g), reduced to a + T b with every a_k, b_k in [-1/2, 1/2), with a bound. Curves y^m = f(x) so far.",
    },
    Builtin {
        name: "riemann_constant",
        positional: &[p("curve", K::Curve)],
        keywords: &[opt("from", K::Point), opt("reduce", K::Bool)],
        region: RegionUse::None,
        yields: Yields::Vector,
        signature: "riemann_constant(C, from = P0, reduce = true)",
        summary: "Riemann's constant vector K for the base point P0 and the basis of `tau(C, reduce = ...)`: theta(abel_jacobi(C, D) - K) = 0 for every effective divisor D of degree g - 1; reduced like `abel_jacobi`. Curves y^m = f(x) so far.",
    },
    Builtin {
        name: "lattice_coords",
        positional: &[p("tau", K::Matrix), p("z", K::Vector)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Vector,
        signature: "lattice_coords(T, z)",
        summary: "The real coordinates [a_1, ..., a_g, b_1, ..., b_g] of z in the lattice basis: z = a + T b. A point of the lattice has whole coordinates, a half-period half-whole ones.",
    },
    Builtin {
        name: "equivalent",
        positional: &[p("tau", K::Matrix), p("other", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Bool,
        signature: "equivalent(T1, T2)",
        summary: "Whether the Riemann matrices are related by Sp(2g, Z): true when an integer symplectic Gamma with Gamma . T1 = T2 within the tolerance is found (named in the message), false when a theta-constant invariant proves otherwise, else undecided.",
    },
    Builtin {
        name: "transform_between",
        positional: &[p("tau", K::Matrix), p("other", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "transform_between(T1, T2)",
        summary: "An integer symplectic Gamma = [[A, B], [C, D]] with (A T1 + B)(C T1 + D)^-1 = T2 within the tolerance; an error when the invariants prove there is none, undecided when none was found.",
    },
    Builtin {
        name: "theta_moduli",
        positional: &[p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Vector,
        signature: "theta_moduli(T)",
        summary: "The sorted values |theta[m](0)|^8 / max over the even characteristics m: an Sp(2g, Z) invariant of T, with a bound.",
    },
    Builtin {
        name: "schottky_value",
        positional: &[p("tau", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "schottky_value(T)",
        summary: "|2^g sum theta_m^16 - (sum theta_m^8)^2| / (2^g sum |theta_m|^16) over the even theta constants: Igusa's form, scale-free, with a bound. In genus 4 it vanishes exactly on the closure of the Jacobian locus (identically below genus 4), so `expect schottky_value(T) > 1e-6` proves T is not a Jacobian.",
    },
    Builtin {
        name: "igusa_invariants",
        positional: &[p("curve_or_tau", K::CurveOrMatrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Vector,
        signature: "igusa_invariants(X)",
        summary: "The absolute invariants [I2^5 / I10, I2^3 I4 / I10, I2^2 I6 / I10] of a genus-2 curve, from its equation y^2 = f(x) (deg f = 5 or 6) or from its 2 x 2 Riemann matrix (Rosenhain's form from theta constants), with a bound: equal for isomorphic curves and for Sp(4, Z)-equivalent matrices.",
    },
    Builtin {
        name: "intersection_matrix",
        positional: &[p("curve", K::Curve)],
        keywords: &[opt("reduce", K::Bool)],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "intersection_matrix(C, reduce = true)",
        summary: "The intersection numbers of the cycles a_1..a_g, b_1..b_g that `tau(C, reduce = ...)` uses, computed from the lifted cycles (exact integers): the standard symplectic form [[0, I], [-I, 0]] when the homology basis is right.",
    },
    Builtin {
        name: "is_riemann",
        positional: &[p("matrix", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Bool,
        signature: "is_riemann(M)",
        summary: "Whether M is symmetric within the tolerance and its imaginary part is positive definite.",
    },
    Builtin {
        name: "theta",
        positional: &[p("tau", K::Matrix), p("z", K::Vector)],
        keywords: &[opt("char", K::Characteristic), opt("along", K::VectorList)],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "theta(T, z, char = [a, b], along = [d1, d2, ...])",
        summary: "Riemann theta value at z for the Riemann matrix T; `char` gives half-integer characteristics, `along` directions of a derivative.",
    },
    Builtin {
        name: "krichever",
        positional: &[p("curve", K::Curve)],
        keywords: &[p("at", K::Point), opt("shift", K::Vector)],
        region: RegionUse::None,
        yields: Yields::Wave,
        signature: "krichever(C, at = P, shift = D)",
        summary: "Krichever's KP wave of the curve from the smooth point P.",
    },
    Builtin {
        name: "theta_wave",
        positional: &[p("tau", K::Matrix)],
        keywords: &[p("u", K::Vector), p("v", K::Vector), p("w", K::Vector), p("c", K::Number), opt("shift", K::Vector)],
        region: RegionUse::None,
        yields: Yields::Wave,
        signature: "theta_wave(T, u = U, v = V, w = W, c = c, shift = D)",
        summary: "u = 2 d^2/dx^2 log theta(U x + V y + W t + D) + c from explicit data.",
    },
    Builtin {
        name: "soliton",
        positional: &[],
        keywords: &[p("kappa", K::Vector), p("a", K::Matrix)],
        region: RegionUse::None,
        yields: Yields::Wave,
        signature: "soliton(kappa = K, a = A)",
        summary: "Line-soliton from distinct real kappa and a full-rank k x n matrix A (a point of the Grassmannian).",
    },
    Builtin {
        name: "rational",
        positional: &[],
        keywords: &[p("partition", K::Vector), opt("times", K::Vector)],
        region: RegionUse::None,
        yields: Yields::Wave,
        signature: "rational(partition = L, times = [t4, t5, ...])",
        summary: "Rational KP solution whose tau function is the Schur polynomial of the partition L.",
    },
    Builtin {
        name: "shallow_water",
        positional: &[p("wave", K::Wave)],
        keywords: &[p("depth", K::Number), p("epsilon", K::Number), opt("gravity", K::Number)],
        region: RegionUse::None,
        yields: Yields::Wave,
        signature: "shallow_water(W, depth = h, epsilon = e, gravity = g)",
        summary: "W read as surface elevation eta = e h u in metres over x, y in metres and t in seconds, for still depth h (m) and gravity g (default 9.80665 m/s^2), by the dimensional KP-II of Ablowitz & Segur (1979). A weakly nonlinear long-wave model: not for coastal engineering or safety decisions.",
    },
    Builtin {
        name: "kp_residual",
        positional: &[p("wave", K::Wave)],
        keywords: &[],
        region: RegionUse::Required,
        yields: Yields::Number,
        signature: "kp_residual(W, x in A..B, y in A..B, t = T)",
        summary: "Largest KP residual over the region's sample points, relative to the size of its terms at the same point (the message states the absolute residual and both scales).",
    },
    Builtin {
        name: "regular",
        positional: &[p("wave", K::Wave)],
        keywords: &[],
        region: RegionUse::Optional,
        yields: Yields::Bool,
        signature: "regular(W [, region])",
        summary: "Whether u stays finite (its tau function keeps its sign).",
    },
    Builtin {
        name: "value",
        positional: &[p("wave", K::Wave), p("x", K::Number), p("y", K::Number), p("t", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "value(W, x, y, t)",
        summary: "The wave's u at the point (x, y, t).",
    },
    Builtin {
        name: "count",
        positional: &[p("list", K::Collection)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "count(L)",
        summary: "Number of entries of a list or vector.",
    },
    Builtin {
        name: "abs",
        positional: &[p("z", K::Numeric)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::SameKind,
        signature: "abs(z)",
        summary: "Absolute value (modulus of a complex number); entrywise on vectors and matrices.",
    },
    Builtin {
        name: "re",
        positional: &[p("z", K::Numeric)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::SameKind,
        signature: "re(z)",
        summary: "Real part; entrywise on vectors and matrices.",
    },
    Builtin {
        name: "im",
        positional: &[p("z", K::Numeric)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::SameKind,
        signature: "im(z)",
        summary: "Imaginary part; entrywise on vectors and matrices.",
    },
    Builtin {
        name: "conj",
        positional: &[p("z", K::Numeric)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::SameKind,
        signature: "conj(z)",
        summary: "Complex conjugate; entrywise on vectors and matrices (not the conjugate transpose).",
    },
    Builtin {
        name: "exp",
        positional: &[p("z", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "exp(z)",
        summary: "The exponential e^z of a real or complex number.",
    },
    Builtin {
        name: "log",
        positional: &[p("z", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "log(z)",
        summary: "Natural logarithm, principal branch: imaginary part in (-pi, pi]. Refused at 0 and where the error bound reaches the cut (-inf, 0].",
    },
    Builtin {
        name: "sqrt",
        positional: &[p("z", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "sqrt(z)",
        summary: "Square root, principal branch (real part >= 0); exact for squares of rationals.",
    },
    Builtin {
        name: "det",
        positional: &[p("M", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "det(M)",
        summary: "Determinant of a square matrix: exact over Q for rational entries, otherwise with a proven error bound.",
    },
    Builtin {
        name: "inverse",
        positional: &[p("M", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::SameKind,
        signature: "inverse(M)",
        summary: "Inverse of a square matrix: exact over Q for rational entries, otherwise with a proven error bound; refused when the matrix cannot be shown invertible.",
    },
    Builtin {
        name: "transpose",
        positional: &[p("M", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "transpose(M)",
        summary: "The transposed matrix (rows become columns; no conjugation).",
    },
    Builtin {
        name: "trace",
        positional: &[p("M", K::Matrix)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "trace(M)",
        summary: "Sum of the diagonal entries of a square matrix.",
    },
    Builtin {
        name: "identity",
        positional: &[p("n", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Matrix,
        signature: "identity(n)",
        summary: "The n x n identity matrix (exact).",
    },
    Builtin {
        name: "zeros",
        positional: &[p("n", K::Number), opt("columns", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::SameKind,
        signature: "zeros(n) or zeros(rows, columns)",
        summary: "The zero vector of length n, or the zero matrix of the given size (exact).",
    },
];

pub fn lookup(name: &str) -> Option<&'static Builtin> {
    BUILTINS.iter().find(|b| b.name == name)
}

/// A setting `set` accepts: its default, the range a value must lie in (open below for
/// limits, closed for tolerances), whether it counts something (a whole number), and its
/// meaning.
#[derive(Clone, Copy, Debug)]
pub struct Setting {
    pub name: &'static str,
    pub default: f64,
    pub min: f64,
    pub max: f64,
    /// Whether `min` itself is allowed.
    pub min_included: bool,
    pub whole: bool,
    pub meaning: &'static str,
}

impl Setting {
    pub fn allows(&self, v: f64) -> bool {
        let above = if self.min_included { v >= self.min } else { v > self.min };
        above && v <= self.max && !(self.whole && v.fract() != 0.0)
    }

    /// The allowed values in words, for diagnostics.
    pub fn range_text(&self) -> String {
        let what = if self.whole { "a whole number" } else { "a number" };
        if self.min_included {
            format!("{what} from {:e} to {:e}", self.min, self.max)
        } else {
            format!("{what} above {} and at most {}", self.min, self.max)
        }
    }
}

const fn setting(name: &'static str, default: f64, min: f64, max: f64, whole: bool, meaning: &'static str) -> Setting {
    Setting { name, default, min, max, min_included: false, whole, meaning }
}

/// The finest tolerance and accuracy a setting may ask for: a few units of double
/// precision's rounding (2.2e-16) on values of size about 1, which theta values, periods and
/// waves can reach; finer ones could only end in undecided claims.
pub const FINEST: f64 = 1e-15;
/// The coarsest: above this an absolute tolerance stops telling values of size 1 apart
/// (and the Riemann-matrix and theta checks that use it would accept anything).
pub const COARSEST: f64 = 0.1;

const fn tolerance_setting(name: &'static str, default: f64, meaning: &'static str) -> Setting {
    Setting { name, default, min: FINEST, max: COARSEST, min_included: true, whole: false, meaning }
}

/// Every setting. The limits can also be given on the command line (`--limit NAME=VALUE`),
/// which overrides the file.
pub const SETTINGS: &[Setting] = &[
    tolerance_setting("tolerance", 1e-10, "default absolute tolerance of `==` between numerical values"),
    tolerance_setting("accuracy", 1e-12, "requested absolute accuracy of numerical results (theta values, periods)"),
    setting("max_points", 4e6, 0.0, 4e7, true, "largest number of sample points of one region"),
    setting("max_lattice_points", 2e7, 0.0, 2e8, true, "largest estimated number of lattice points of one theta value"),
    setting(
        "max_degree",
        12.0,
        0.0,
        24.0,
        true,
        "largest curve degree the exact curve algebra and Riemann matrices take",
    ),
    setting("max_genus", 50.0, 0.0, 200.0, true, "largest genus of a Riemann matrix"),
    setting("time_budget", 120.0, 0.0, 86400.0, false, "seconds one statement may take before it is stopped"),
    setting(
        "max_digits",
        10000.0,
        0.0,
        100000.0,
        true,
        "largest number of digits of a numeric literal (coefficients included)",
    ),
];

pub fn setting_named(name: &str) -> Option<&'static Setting> {
    SETTINGS.iter().find(|s| s.name == name)
}
