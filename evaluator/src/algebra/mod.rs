//! Exact algebra over Q for plane curves: univariate polynomials, numerical roots with
//! inclusion radii, bivariate polynomials, singular points and their local invariants.

pub mod bivar;
pub mod curve;
pub mod jinv;
pub mod local;
pub mod local_ext;
pub mod roots;
#[cfg(test)]
mod tests;
pub mod tower;
pub mod upoly;
pub mod zpoly;
