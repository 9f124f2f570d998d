//! Outputs of `kelp run`: sampled grids (`.csv`, `.json`, `.npy`) and pictures (`.svg`,
//! `.png`), written inside the experiment's folder tree and replaced atomically.

pub mod grid;
pub mod picture;
pub mod sample;
pub mod write;
