//! The one diagnostic type. Parser, checker and evaluator all produce it; the terminal
//! (ariadne, see `render`) and the language server render it.

use crate::span::Span;

#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Severity {
    Error,
    Warning,
    Information,
    Hint,
}

impl Severity {
    pub fn as_str(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
            Severity::Information => "information",
            Severity::Hint => "hint",
        }
    }
}

/// A machine-readable repair: replace each span (byte offsets into the same text) by its
/// string. Editors apply it as a quick fix; the terminal shows its title as `help:`.
#[derive(Clone, Debug, PartialEq)]
pub struct Fix {
    pub title: String,
    pub edits: Vec<(Span, String)>,
}

impl Fix {
    /// A fix that replaces one span.
    pub fn replace(title: impl Into<String>, span: Span, with: impl Into<String>) -> Self {
        Fix { title: title.into(), edits: vec![(span, with.into())] }
    }

    /// The text with the edits applied (edits must not overlap).
    pub fn apply(&self, text: &str) -> String {
        let mut edits = self.edits.clone();
        edits.sort_by_key(|(s, _)| std::cmp::Reverse(s.start));
        let mut out = text.to_string();
        for (s, with) in edits {
            out.replace_range(s.start.min(out.len())..s.end.min(out.len()), &with);
        }
        out
    }
}

/// A secondary span with its own short message ("first defined here").
#[derive(Clone, Debug, PartialEq)]
pub struct Label {
    pub span: Span,
    pub message: String,
}

#[derive(Clone, Debug, PartialEq)]
pub struct Diagnostic {
    pub severity: Severity,
    /// Stable code, documented in `lang/LANGUAGE.md` (for example `K202`).
    pub code: Code,
    pub message: String,
    pub span: Span,
    pub labels: Vec<Label>,
    pub notes: Vec<String>,
    /// Repairs a tool may offer (did-you-mean, a missing argument, a wider tolerance).
    pub fixes: Vec<Fix>,
}

impl Diagnostic {
    pub fn new(severity: Severity, code: Code, span: Span, message: impl Into<String>) -> Self {
        Diagnostic { severity, code, message: message.into(), span, labels: vec![], notes: vec![], fixes: vec![] }
    }
    pub fn error(code: Code, span: Span, message: impl Into<String>) -> Self {
        Self::new(Severity::Error, code, span, message)
    }
    pub fn warning(code: Code, span: Span, message: impl Into<String>) -> Self {
        Self::new(Severity::Warning, code, span, message)
    }
    pub fn info(code: Code, span: Span, message: impl Into<String>) -> Self {
        Self::new(Severity::Information, code, span, message)
    }
    pub fn with_label(mut self, span: Span, message: impl Into<String>) -> Self {
        self.labels.push(Label { span, message: message.into() });
        self
    }
    pub fn with_note(mut self, note: impl Into<String>) -> Self {
        self.notes.push(note.into());
        self
    }
    pub fn with_fix(mut self, fix: Fix) -> Self {
        self.fixes.push(fix);
        self
    }
    pub fn is_error(&self) -> bool {
        self.severity == Severity::Error
    }
}

macro_rules! codes {
    ($($name:ident = $code:literal : $summary:literal,)*) => {
        /// Every diagnostic code kelp emits. The numbering groups them: 1xx syntax,
        /// 2xx names, 3xx kinds and shapes, 4xx curve equations, 5xx settings, regions
        /// and outputs, 6xx evaluation, 7xx claims, 8xx mathematics not supported yet.
        #[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
        pub enum Code { $($name,)* }

        impl Code {
            pub const ALL: &'static [Code] = &[$(Code::$name,)*];
            pub fn as_str(self) -> &'static str {
                match self { $(Code::$name => $code,)* }
            }
            pub fn summary(self) -> &'static str {
                match self { $(Code::$name => $summary,)* }
            }
        }
    };
}

codes! {
    BadToken = "K101": "a character or literal that is not part of the language",
    UnexpectedToken = "K102": "the statement does not parse at this token",
    UnclosedDelimiter = "K103": "a bracket or string is not closed",
    UnknownStatement = "K104": "a line does not start with a statement keyword",
    NumberTooLarge = "K105": "a literal is outside the supported size",
    TooComplex = "K106": "a statement nested too deeply or too long to process safely",

    DuplicateName = "K201": "a name is defined twice",
    UndefinedName = "K202": "a name is used but never defined",
    UnknownFunction = "K203": "a call to a function that does not exist",
    UnknownKeyword = "K204": "a keyword argument the function does not take",
    MissingArgument = "K205": "a required argument is missing",
    TooManyArguments = "K206": "more positional arguments than the function takes",
    CyclicDefinition = "K207": "definitions depend on each other in a cycle",
    DuplicateArgument = "K208": "the same keyword argument is given twice",

    WrongKind = "K301": "a value of the wrong kind (a wave where a curve is needed, ...)",
    ShapeMismatch = "K302": "vector or matrix sizes do not fit together",
    RaggedMatrix = "K303": "matrix rows of different lengths",
    NotAWaveConstructor = "K304": "a `wave` statement whose right side is not a wave constructor",
    WithinWithoutEquality = "K305": "`within` used on a claim that is not an `==` comparison",
    BadIndex = "K306": "an index outside the vector or matrix, or not a whole number",

    UnknownVariable = "K401": "a curve equation uses a variable other than x, y (affine) or x, y, z (projective)",
    NotHomogeneous = "K402": "a projective equation (one using z) whose terms have different degrees",
    DegreeTooLow = "K403": "a curve equation of degree < 1 (constant or identically zero)",
    NotPolynomial = "K404": "a curve equation that is not a polynomial with rational coefficients",
    DegreeTooHigh = "K405": "a curve equation above the supported degree",

    UnknownSetting = "K501": "a `set` of a setting that does not exist",
    DuplicateSetting = "K502": "a setting is given twice",
    BadSettingValue = "K503": "a setting's value is out of its range",
    EmptyRange = "K504": "a range whose end is not above its start",
    BadStep = "K505": "a step that is zero or negative",
    UnknownAxis = "K506": "a region axis other than x, y, t",
    DuplicateAxis = "K507": "a region names the same axis twice",
    AbsolutePath = "K510": "an output path that is absolute",
    PathEscapes = "K511": "an output path that leaves the experiment's folder tree",
    BadOutputFormat = "K512": "an output path whose extension is not a supported format",
    OutputFailed = "K513": "an output could not be written",

    EvalFailed = "K601": "a value could not be computed (division by zero, bad argument)",
    DependsOnFailed = "K602": "a value depends on one that failed",
    ValueInfo = "K603": "facts about a computed value (information)",
    NotRiemannMatrix = "K604": "a matrix used as a Riemann matrix is not symmetric or its imaginary part is not positive definite",
    BudgetExceeded = "K605": "a computation needs more work than its limit allows",
    ModelLimits = "K606": "a result in physical units, with the limits of the model it comes from",

    ClaimFailed = "K701": "a claim is false",
    ClaimUndecided = "K702": "a claim cannot be decided within its tolerance",
    ClaimNotBoolean = "K703": "a claim whose value is not true/false",

    NotSupported = "K801": "mathematics that kelp does not compute yet",
}

impl std::fmt::Display for Code {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(self.as_str())
    }
}

/// Sort diagnostics by position, then severity, for stable output.
pub fn sort(diags: &mut [Diagnostic]) {
    diags.sort_by(|a, b| (a.span.start, a.span.end, a.severity).cmp(&(b.span.start, b.span.end, b.severity)));
}
