//! Filling a review from the measurement engine: every automatic value (origin `auto`) and the marks of the
//! representative beat.

use super::ReviewError;
use super::model::{MarkOn, Measurement, Review};
use crate::analysis::Analysis;
use crate::beat::MarkKind;
use crate::measure::MeasuredValue;

/// The review key of a measured value: its key, with `.LEAD` appended for per-lead values
/// (`st_j60_uv.V2`), so that every key in a review is unique.
#[must_use]
pub fn review_key(v: &MeasuredValue) -> String {
    match &v.lead {
        Some(lead) => format!("{}.{lead}", v.key),
        None => v.key.to_owned(),
    }
}

impl Review {
    /// Puts every automatic value of an analysis into the review (see [`Review::put_automatic`]: a reader's
    /// value already there is kept) and the representative beat's boundaries and R peak as automatic marks
    /// on [`MarkOn::Representative`] (sample index and time on the representative beat's own axis).
    ///
    /// # Errors
    /// [`ReviewError::Final`] on a final review.
    pub fn put_analysis(&mut self, analysis: &Analysis) -> Result<(), ReviewError> {
        for v in analysis.measurements.values() {
            self.put_automatic(Measurement::automatic(&review_key(&v), &v.label, v.value, v.unit))?;
        }
        if let Some(rep) = &analysis.representative {
            let fs = rep.sample_rate.hz();
            for kind in MarkKind::BOUNDARIES {
                if let Some(s) = rep.bounds.get(kind) {
                    self.put_automatic_mark(kind, MarkOn::Representative, s, s as f64 / fs)?;
                }
            }
            self.put_automatic_mark(MarkKind::RPeak, MarkOn::Representative, rep.r_index, rep.r_index as f64 / fs)?;
        }
        Ok(())
    }
}
