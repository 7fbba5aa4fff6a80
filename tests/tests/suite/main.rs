//! Isoline's reference and end-to-end tests, built as one binary. Each module covers one area; every check
//! against an outside source names it beside the check. Run one area with a filter, e.g.
//! `cargo test --release -p isoline-tests -- accuracy_boundaries`.

mod render_common;
mod review_support;

mod accuracy_artefacts;
mod accuracy_boundaries;
mod accuracy_detection;
mod accuracy_fast_rates;
mod accuracy_hrv;
mod accuracy_intervals;
mod accuracy_invariance;
mod accuracy_lead_subsets;
mod accuracy_noise;
mod accuracy_pauses;
mod accuracy_rhythm;
mod accuracy_t_waves;
mod accuracy_typing;
mod accuracy_windowed;
mod io_edf;
mod io_fuzz;
mod io_holter;
mod io_wfdb;
mod measure_formulas;
mod measure_losses;
mod measure_ludb;
mod measure_synth;
mod measure_synth_long_pr;
mod measure_synth_p;
mod qrs_edges;
mod qrs_leads;
mod render_geometry;
mod render_privacy;
mod render_snapshot;
mod review_agreement;
mod review_identity;
mod review_load;
mod review_roundtrip;
mod review_save;
mod review_stage;
mod synth;
mod t_leads;
