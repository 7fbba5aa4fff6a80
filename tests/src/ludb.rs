//! The LUDB records' per-lead annotations (Kalyakulina et al., IEEE Access 2020;8:186181-90): one WFDB annotation
//! file per lead, each wave marked as `(` onset, a peak label (`p` P wave, `N` QRS, `t` T wave), `)` end.

use isoline_core::Recording;
use isoline_core::analysis::{Analysis, analyze};
use isoline_core::filter::FilterSettings;
use isoline_core::io::{self, wfdb_annotations};

use crate::data;

/// The twelve per-lead annotation files' extensions, in the records' lead order.
pub const LEADS: [&str; 12] = ["i", "ii", "iii", "avr", "avl", "avf", "v1", "v2", "v3", "v4", "v5", "v6"];

/// LUDB record `n`'s waves with peak label `peak` in lead file `lead`: (onset, peak, end) samples of each `(`
/// `peak` `)` triple, in time order. Empty when the file cannot be read.
#[must_use]
pub fn lead_waves(n: usize, lead: &str, peak: &str) -> Vec<(usize, usize, usize)> {
    let Ok(a) = wfdb_annotations::read(&data(&format!("ludb/{n}.{lead}"))) else { return Vec::new() };
    a.windows(3)
        .filter(|w| w[0].label == "(" && w[1].label == peak && w[2].label == ")")
        .map(|w| (w[0].sample as usize, w[1].sample as usize, w[2].sample as usize))
        .collect()
}

/// LUDB record `n` as read; `None` when the shared records do not hold it (no `N.global.csv`).
#[must_use]
pub fn recording(n: usize) -> Option<Recording> {
    if !data(&format!("ludb/{n}.global.csv")).exists() {
        return None;
    }
    let opened = io::open(&data(&format!("ludb/{n}.hea")), &io::OpenOptions::default())
        .unwrap_or_else(|e| panic!("ludb {n}: {e}"));
    Some(opened.recording)
}

/// LUDB record `n` analysed as the workstation analyses it (default filters); `None` when the shared records do not
/// hold it (no `N.global.csv`).
#[must_use]
pub fn analysed(n: usize) -> Option<Analysis> {
    recording(n).map(|r| analyze(&r, &FilterSettings::default()))
}

/// The filtered leads of LUDB record `n`'s analysis `a` (a 10-s record keeps its filtered copy), as the boundary
/// finders' `Signals` are made from.
#[must_use]
pub fn filtered_leads(n: usize, a: &Analysis) -> Vec<&[f32]> {
    let Some(rec) = a.filtered.as_ref() else { panic!("ludb {n}: a 10-s record keeps its filtered copy") };
    rec.leads.iter().map(|l| l.samples.as_slice()).collect()
}
