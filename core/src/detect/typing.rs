//! Beat typing: dominant versus other, by correlation with the dominant template (median of beats),
//! QRS energy width and prematurity.

/// Window around the R peak compared with the template, s (before, after).
const WIN_S: (f64, f64) = (0.080, 0.100);
/// Correlation below which a beat's shape differs from the dominant one.
// Common practice, no source: template-matching classifiers use correlation thresholds near 0.9.
const MIN_CORR: f64 = 0.90;
/// An RR below this fraction of the local median RR is premature.
// Common practice, no source: 15 % prematurity is a usual cut for supraventricular ectopy.
const PREMATURE: f64 = 0.85;
/// Most beats used to build the template.
const TEMPLATE_BEATS: usize = 301;

/// Types each beat: `true` = dominant. `leads` are the samples (µV, NaN = invalid), `weights` the leads'
/// detection weights (leads of weight 0 are not compared).
pub fn dominant(leads_in: &[&[f32]], weights: &[f64], r: &[usize], fs: f64) -> Vec<bool> {
    let n = leads_in.first().map_or(0, |l| l.len());
    let (a, b) = ((WIN_S.0 * fs) as usize, (WIN_S.1 * fs) as usize);
    let leads: Vec<usize> = (0..leads_in.len()).filter(|&l| weights[l] > 0.0).collect();
    if r.is_empty() || leads.is_empty() {
        return vec![true; r.len()];
    }
    // Each lead's window with its own mean removed (baseline offsets must not count as shape), leads joined.
    let snippet = |p: usize| -> Option<Vec<f32>> {
        if p < a || p + b >= n {
            return None;
        }
        let mut s = Vec::with_capacity(leads.len() * (a + b + 1));
        for &l in &leads {
            let w = &leads_in[l][p - a..=p + b];
            if !w.iter().all(|v| v.is_finite()) {
                return None;
            }
            let mean = w.iter().sum::<f32>() / w.len() as f32;
            s.extend(w.iter().map(|v| v - mean));
        }
        Some(s)
    };
    let snippets: Vec<Option<Vec<f32>>> = r.iter().map(|&p| snippet(p)).collect();
    let len = leads.len() * (a + b + 1);
    let step = (r.len() / TEMPLATE_BEATS).max(1);
    let pool: Vec<&Vec<f32>> = snippets.iter().step_by(step).flatten().collect();
    let mut template = median_template(&pool, len);
    // Second pass: the template from the beats that resemble the first one.
    let close: Vec<&Vec<f32>> = pool.iter().copied().filter(|s| correlation(s, &template) >= MIN_CORR).collect();
    if close.len() * 3 >= pool.len() {
        template = median_template(&close, len);
    }
    let rr_local = local_median_rr(r);
    snippets
        .iter()
        .enumerate()
        .map(|(i, s)| {
            let shape_ok = s.as_ref().is_none_or(|s| correlation(s, &template) >= MIN_CORR);
            let premature = i > 0 && rr_local[i].is_some_and(|m| ((r[i] - r[i - 1]) as f64) < PREMATURE * m);
            shape_ok && !premature
        })
        .collect()
}

fn median_template(pool: &[&Vec<f32>], len: usize) -> Vec<f32> {
    let mut col = Vec::with_capacity(pool.len());
    (0..len)
        .map(|k| {
            col.clear();
            col.extend(pool.iter().map(|s| s[k]));
            if col.is_empty() {
                return 0.0;
            }
            let mid = col.len() / 2;
            *col.select_nth_unstable_by(mid, f32::total_cmp).1
        })
        .collect()
}

/// Pearson correlation of two equal-length snippets (0 when either is constant).
pub fn correlation(x: &[f32], y: &[f32]) -> f64 {
    let n = x.len().min(y.len()) as f64;
    if n == 0.0 {
        return 0.0;
    }
    let (mut sx, mut sy) = (0.0f64, 0.0f64);
    for (a, b) in x.iter().zip(y) {
        sx += f64::from(*a);
        sy += f64::from(*b);
    }
    let (mx, my) = (sx / n, sy / n);
    let (mut cxy, mut cxx, mut cyy) = (0.0, 0.0, 0.0);
    for (a, b) in x.iter().zip(y) {
        let (dx, dy) = (f64::from(*a) - mx, f64::from(*b) - my);
        cxy += dx * dy;
        cxx += dx * dx;
        cyy += dy * dy;
    }
    if cxx <= 0.0 || cyy <= 0.0 { 0.0 } else { cxy / (cxx * cyy).sqrt() }
}

/// Median of the RR intervals of the 8 beats before and 8 after each beat (samples), `None` for beat 0.
fn local_median_rr(r: &[usize]) -> Vec<Option<f64>> {
    let rr: Vec<f64> = r.windows(2).map(|w| (w[1] - w[0]) as f64).collect();
    let mut buf = Vec::with_capacity(17);
    (0..r.len())
        .map(|i| {
            if i == 0 || rr.is_empty() {
                return None;
            }
            let j = i - 1; // rr[j] ends at beat i
            buf.clear();
            buf.extend_from_slice(&rr[j.saturating_sub(8)..(j + 9).min(rr.len())]);
            buf.sort_by(f64::total_cmp);
            Some(buf[buf.len() / 2])
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn correlation_of_scaled_copy_is_one() {
        let x: Vec<f32> = (0..20).map(|k| (k as f32 * 0.4).sin()).collect();
        let y: Vec<f32> = x.iter().map(|v| 3.0 * v + 1.0).collect();
        assert!((correlation(&x, &y) - 1.0).abs() < 1e-9);
        assert_eq!(correlation(&x, &[0.0; 20]), 0.0);
    }

    #[test]
    fn premature_wide_beat_is_other() {
        let fs = 250.0;
        let n = 250 * 20;
        let mut lead = vec![0.0f32; n];
        let mut r = Vec::new();
        let mut t = 200;
        while t + 200 < n {
            r.push(t);
            t += 250;
        }
        r[10] -= 70; // premature
        for (i, &p) in r.iter().enumerate() {
            let w = if i == 10 { 12.0 } else { 4.0 };
            for k in p - 25..p + 25 {
                let d = (k as f32 - p as f32) / w;
                lead[k] += 1000.0 * (-d * d).exp();
            }
        }
        let dom = dominant(&[lead.as_slice()], &[1.0], &r, fs);
        assert!(!dom[10]);
        assert_eq!(dom.iter().filter(|&&d| d).count(), r.len() - 1);
    }
}
