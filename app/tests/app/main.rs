//! The `isoline` program's end-to-end tests, built as one binary: the command line (`cli_*`, running the built
//! binary) and the workstation driven through egui_kittest (`gui_*`).

mod gui_support;

mod cli_beats;
mod cli_io;
mod cli_measure;
mod cli_render;
mod cli_review;
mod cli_synth;
mod cli_usage;
mod gui_beat_lens;
mod gui_calipers;
mod gui_frame_time;
mod gui_review;
mod gui_shell;
