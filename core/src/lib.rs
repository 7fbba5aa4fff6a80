//! # isoline-core
//!
//! Everything Isoline computes, reads, writes or renders, with no GUI dependency: the recording model, readers
//! and writers of open formats, the demo generator, filters, beat detection, wave boundaries, measurements,
//! paper geometry, reviews and the PNG renderer.
//!
//! ```
//! use isoline_core::paper::Paper;
//! // At 25 mm/s one large (5 mm) square is 200 ms.
//! assert!((Paper::STANDARD.seconds_from_mm(5.0) - 0.2).abs() < 1e-12);
//! ```

pub mod analysis;
pub mod beat;
pub mod caliper;
pub mod delineate;
pub mod detect;
pub mod filter;
pub mod gaps;
pub mod io;
pub mod measure;
pub mod paper;
pub mod recording;
pub mod render;
pub mod review;
pub mod synth;
pub mod timescale;
pub mod units;

pub use beat::{Beat, BeatKind, Boundaries, MarkKind};
pub use recording::{Lead, LeadName, Recording, StandardLead};
pub use units::Hertz;

/// The caution shown in the app, the README and every export.
pub const CAUTION: &str = "Review aid only: automated values must be checked by qualified personnel. \
Follow local protocols and licensed practice.";
