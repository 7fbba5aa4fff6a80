//! Gaps: stretches of a recording where no lead has a valid sample. Nothing was recorded there, so two beats on
//! either side are not neighbours (no RR interval spans a gap) and no wave boundary is sought across one.

use std::ops::Range;

/// Stretches (sorted, disjoint sample ranges) where every one of `leads` is invalid (NaN). Leads are equally
/// long; a recording with a lead valid throughout has none, found without a pass over the samples of each
/// instant.
#[must_use]
pub fn find(leads: &[&[f32]]) -> Vec<Range<usize>> {
    let n = leads.first().map_or(0, |l| l.len());
    if leads.is_empty() || leads.iter().any(|l| l.iter().all(|v| v.is_finite())) {
        return Vec::new();
    }
    let mut gaps = Vec::new();
    let mut start = None;
    for k in 0..n {
        let silent = leads.iter().all(|l| !l[k].is_finite());
        match (silent, start) {
            (true, None) => start = Some(k),
            (false, Some(a)) => {
                gaps.push(a..k);
                start = None;
            }
            _ => {}
        }
    }
    gaps.extend(start.map(|a| a..n));
    gaps
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
        let nan = f32::NAN;
        let a = [0.0, nan, nan, nan, 0.0, nan];
        let b = [nan, nan, nan, 0.0, 0.0, nan];
        assert_eq!(find(&[&a, &b]), vec![1..3, 5..6]);
        // One lead whole: no gap, whatever the others hold.
        let whole = [0.0f32; 6];
        assert!(find(&[&a, &b, &whole]).is_empty());
        assert!(find(&[]).is_empty());
        assert_eq!(find(&[&[nan, nan]]), vec![0..2]);
    }

    #[test]
    #[allow(clippy::single_range_in_vec_init)]
    fn overlap_is_strict_at_the_ends() {
        assert!(overlaps(&[10..20], 0, 11) && overlaps(&[10..20], 19, 30));
        assert!(!overlaps(&[10..20], 0, 10) && !overlaps(&[10..20], 20, 30));
        assert!(overlaps(&[2..4, 10..20], 5, 12) && !overlaps(&[2..4, 10..20], 4, 10));
    }
}
