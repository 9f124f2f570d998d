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
    /// Characteristics `[a, b]`, a 2 x g matrix.
    Characteristic,
    /// `true` or `false`.
    Bool,
    /// A curve, or a 1 x 1 Riemann matrix (for `j_invariant`).
    CurveOrMatrix,
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
    Wave,
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
        positional: &[p("z", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "abs(z)",
        summary: "Absolute value (modulus of a complex number).",
    },
    Builtin {
        name: "re",
        positional: &[p("z", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "re(z)",
        summary: "Real part.",
    },
    Builtin {
        name: "im",
        positional: &[p("z", K::Number)],
        keywords: &[],
        region: RegionUse::None,
        yields: Yields::Number,
        signature: "im(z)",
        summary: "Imaginary part.",
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
