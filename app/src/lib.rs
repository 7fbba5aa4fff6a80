//! The `isoline` application crate: the workstation window (library part, so UI tests can drive it) and the
//! command line in `main.rs`.

pub mod gui;
