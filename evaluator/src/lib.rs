//! Evaluation of a checked kelp program: typed values in dependency order, claims with
//! tolerances and error bounds, and (as the mathematics lands) exact curve algebra,
//! theta functions, Riemann matrices, KP waves and outputs.

mod abel_fn;
pub mod algebra;
mod bounded;
pub mod curve_fn;
mod equivalence_fn;
pub mod eval;
mod igusa_fn;
pub mod incremental;
mod jacobian_fn;
pub mod json;
pub mod limits;
pub mod linalg;
mod matrix_bound;
mod matrix_fn;
mod memo;
pub mod num;
pub mod output;
pub mod periods;
pub mod rounding;
mod symplectic_fn;
mod tau_fn;
pub mod theta;
mod theta_fn;
pub mod value;
mod wave_fn;
pub mod waves;

pub use eval::{evaluate, evaluate_cancellable, Evaluation, Expectation, Mode, NamedValue};
pub use incremental::{statement_keys, Incremental, Key, Reuse};
pub use limits::CancelToken;
pub use value::{Value, Valued};
