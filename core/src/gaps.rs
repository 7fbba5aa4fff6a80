//! Gaps: stretches of a recording, at least [`MIN_GAP_S`] long, where no lead has a valid sample. Nothing was
//! recorded there, so two beats on either side are not neighbours (no RR interval spans a gap, nor ends at a beat
//! whose R peak search it reaches, [`breaks_rr`]) and no wave boundary is sought across one. Shorter losses (a
//! dropped sample, a lost packet) are bridged by interpolation. Also here: the runs of missing samples of one lead
//! ([`invalid_runs`], [`absent_runs`]).

use std::ops::Range;

/// Shortest stretch with no valid sample that counts as a gap, s.
// Measured: a loss in every lead centred on an R peak lost the beat from 28 ms on (12- and 1-lead demos at 500
// Hz; QT Database sel100 at 250 Hz 32 ms, LUDB 1 36 ms), so a shorter loss leaves no beat unfound and the RR
// across it stands, and a boundary bridged by a straight line moves by less than the loss. Single lost samples,
// as wireless recorders drop them, would otherwise break every RR and boundary near them.
pub const MIN_GAP_S: f64 = 0.020;

/// Stretches (sorted, disjoint sample ranges) of at least [`MIN_GAP_S`] where every one of `leads`, sampled at
/// `fs` Hz, is invalid (NaN). Leads are equally long; a recording with a lead valid throughout has none, found
/// without a pass over the samples of each instant.
#[must_use]
pub fn find(leads: &[&[f32]], fs: f64) -> Vec<Range<usize>> {
    let n = leads.first().map_or(0, |l| l.len());
    if leads.is_empty() || leads.iter().any(|l| l.iter().all(|v| v.is_finite())) {
        return Vec::new();
    }
    let min_len = ((MIN_GAP_S * fs).ceil() as usize).max(1);
    let mut gaps = runs_where(n, |k| leads.iter().all(|l| !l[k].is_finite()));
    gaps.retain(|g| g.len() >= min_len);
    gaps
}

/// The runs of invalid (NaN or infinite) samples of one lead, in order.
#[must_use]
pub fn invalid_runs(x: &[f32]) -> Vec<Range<usize>> {
    runs_where(x.len(), |k| !x[k].is_finite())
}

/// The maximal runs of consecutive indices `0..n` where `hit` holds, in order.
#[must_use]
pub fn runs_where(n: usize, hit: impl Fn(usize) -> bool) -> Vec<Range<usize>> {
    let mut runs = Vec::new();
    let mut k = 0;
    while k < n {
        if !hit(k) {
            k += 1;
            continue;
        }
        let start = k;
        while k < n && hit(k) {
            k += 1;
        }
        runs.push(start..k);
    }
    runs
}

/// A lead counts as absent over a run of at least this many seconds of invalid samples: the detector leaves it
/// out of its combined feature there, and the P model leaves it out of a beat whose PR window the run touches.
/// Shorter runs (a lost sample or two) are bridged by interpolation and leave the lead about as it was.
// Common practice, no source: a lost sample or two held or interpolated leave a wave about as it was; 10 ms can
// hold the steep part of a narrow QRS.
pub const ABSENT_RUN_S: f64 = 0.010;

/// The runs of at least [`ABSENT_RUN_S`] of invalid samples of one lead sampled at `fs` Hz, in order.
#[must_use]
pub fn absent_runs(x: &[f32], fs: f64) -> Vec<Range<usize>> {
    absent_among(invalid_runs(x), fs)
}

/// Those of a lead's runs of invalid samples ([`invalid_runs`], at `fs` Hz) that last [`ABSENT_RUN_S`] or more.
#[must_use]
pub fn absent_among(mut runs: Vec<Range<usize>>, fs: f64) -> Vec<Range<usize>> {
    let min_run = absent_run_len(fs);
    runs.retain(|r| r.len() >= min_run);
    runs
}

/// [`ABSENT_RUN_S`] in samples at `fs` Hz (at least 1): the shortest run of invalid samples that leaves a lead
/// absent.
#[must_use]
pub fn absent_run_len(fs: f64) -> usize {
    ((ABSENT_RUN_S * fs).ceil() as usize).max(1)
}

/// True when R peaks `a` < `b` (samples, at `fs` Hz) bound no RR interval: one of `gaps` lies between them or
/// within twice [`crate::detect::R_SEARCH_S`] of either. An R peak is sought within that half-width of the QRS
/// middle the detector finds, which lies within the same distance of the peak; a gap in that search cuts into the
/// QRS or into the samples the peak is placed against, and the largest deflection left may be another part of
/// the beat. Measured on LUDB 24 with every lead lost for 80 ms: over an R peak, the beat was placed on the first
/// sample after the loss, 48 ms late, and the next RR read 1160 ms for 1208; from 46 to 66 ms after it, the R
/// peak was placed 70 ms early (the search's level taken without the samples lost) and the beat typed other by
/// its short RR.
#[must_use]
pub fn breaks_rr(gaps: &[Range<usize>], a: usize, b: usize, fs: f64) -> bool {
    let near = (2.0 * crate::detect::R_SEARCH_S * fs).round() as usize;
    overlaps(gaps, a.saturating_sub(near), b + near + 1)
}

/// True when samples `a..b` overlap one of `gaps` (sorted, disjoint sample ranges).
#[must_use]
pub fn overlaps(gaps: &[Range<usize>], a: usize, b: usize) -> bool {
    let i = gaps.partition_point(|g| g.end <= a);
    gaps.get(i).is_some_and(|g| g.start < b)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_gap_is_where_every_lead_is_invalid() {
        // At 100 Hz a gap is 2 samples or more (20 ms): the single lost sample 8 is bridged, not a gap.
        let nan = f32::NAN;
        let a = [0.0, nan, nan, nan, 0.0, nan, nan, 0.0, nan];
        let b = [nan, nan, nan, 0.0, 0.0, nan, nan, nan, nan];
        assert_eq!(find(&[&a, &b], 100.0), vec![1..3, 5..7]);
        // At 50 Hz one sample is 20 ms, a gap.
        assert_eq!(find(&[&a, &b], 50.0), vec![1..3, 5..7, 8..9]);
        // One lead whole: no gap, whatever the others hold.
        let whole = [0.0f32; 9];
        assert!(find(&[&a, &b, &whole], 100.0).is_empty());
        assert!(find(&[], 100.0).is_empty());
        assert_eq!(find(&[&[nan, nan]], 100.0), vec![0..2]);
        assert!(find(&[&[nan, 0.0, nan]], 100.0).is_empty());
    }

    #[test]
    fn invalid_runs_are_listed_in_order() {
        let nan = f32::NAN;
        assert_eq!(invalid_runs(&[nan, 0.0, nan, f32::INFINITY, 1.0, nan]), vec![0..1, 2..4, 5..6]);
        assert!(invalid_runs(&[0.0, 1.0]).is_empty() && invalid_runs(&[]).is_empty());
        // At 200 Hz a lead is absent over runs of 2 samples (10 ms) or more.
        assert_eq!(absent_runs(&[nan, 0.0, nan, nan, 1.0, nan, nan, nan], 200.0), vec![2..4, 5..8]);
        assert_eq!(absent_runs(&[nan, 0.0, nan], 100.0), vec![0..1, 2..3]);
    }

    #[test]
    #[allow(clippy::single_range_in_vec_init)]
    fn a_gap_near_either_r_peak_breaks_the_rr() {
        // At 100 Hz the R peak search reaches 10 samples from the QRS middle, which lies within 10 of the peak:
        // a gap within 20 samples of either R peak, or between them, leaves no RR.
        let gap = [100..110];
        assert!(breaks_rr(&gap, 50, 150, 100.0));
        assert!(breaks_rr(&gap, 20, 80, 100.0) && breaks_rr(&gap, 129, 200, 100.0));
        assert!(!breaks_rr(&gap, 20, 79, 100.0) && !breaks_rr(&gap, 130, 200, 100.0));
        assert!(!breaks_rr(&[], 0, 10, 100.0));
    }

    #[test]
    #[allow(clippy::single_range_in_vec_init)]
    fn overlap_is_strict_at_the_ends() {
        assert!(overlaps(&[10..20], 0, 11) && overlaps(&[10..20], 19, 30));
        assert!(!overlaps(&[10..20], 0, 10) && !overlaps(&[10..20], 20, 30));
        assert!(overlaps(&[2..4, 10..20], 5, 12) && !overlaps(&[2..4, 10..20], 4, 10));
    }
}
