//! Headless subcommands, one file each. Every `run` returns the process exit code, or an error that `main`
//! reports once on stderr with exit code 2.

pub mod agreement;
pub mod beats;
pub mod convert;
pub mod info;
pub mod measure;
pub mod render;
pub mod review;
pub mod synth;
