//! Time-axis marks for views of a whole recording (the Tape): steps a reader counts in on a clock (seconds,
//! minutes, hours), never decimal fractions of an hour, and the `h:mm:ss` label of an elapsed time.

/// Clock steps, s, from one second to a day.
// Common practice, no source: clock faces and Holter reports divide time into 1, 2, 5, 10, 15 and 30 units of
// seconds and minutes, and 1, 2, 3, 6 and 12 hours.
const STEPS_S: [f64; 18] = [
    1.0, 2.0, 5.0, 10.0, 15.0, 30.0, 60.0, 120.0, 300.0, 600.0, 900.0, 1800.0, 3600.0, 7200.0, 10_800.0, 21_600.0,
    43_200.0, 86_400.0,
];

/// The smallest clock step of at least `min_step_s` seconds (whole days beyond a day; 1 s for a non-positive
/// or non-finite request).
#[must_use]
pub fn clock_step_s(min_step_s: f64) -> f64 {
    if !(min_step_s.is_finite() && min_step_s > 0.0) {
        return STEPS_S[0];
    }
    STEPS_S.iter().copied().find(|&s| s >= min_step_s).unwrap_or_else(|| (min_step_s / 86_400.0).ceil() * 86_400.0)
}

/// Marks every `step_s` seconds from the first multiple at or after `from_s` up to `to_s`, s (empty for a
/// non-positive step or an empty range; at most 10 000 marks).
#[must_use]
pub fn marks(from_s: f64, to_s: f64, step_s: f64) -> Vec<f64> {
    if !(step_s > 0.0 && from_s.is_finite() && to_s.is_finite()) || to_s < from_s {
        return Vec::new();
    }
    let first = (from_s / step_s).ceil() as i64;
    (first..).map(|k| k as f64 * step_s).take_while(|&t| t <= to_s).take(10_000).collect()
}

/// Grid lines of a clock axis over `from_s..=to_s` whose finest step is at least `min_step_s`: each line's time
/// and the step of the coarsest of three clock levels (finest step, about three times it, about nine times it)
/// it falls on, so a view can draw and label the coarser lines more strongly.
#[must_use]
pub fn clock_grid(from_s: f64, to_s: f64, min_step_s: f64) -> Vec<(f64, f64)> {
    let fine = clock_step_s(min_step_s);
    let mid = clock_step_s(fine * 3.0);
    let coarse = clock_step_s(mid * 3.0);
    let on = |t: f64, step: f64| ((t / step).round() * step - t).abs() < 1e-6 * step;
    marks(from_s, to_s, fine)
        .into_iter()
        .map(|t| (t, [coarse, mid].into_iter().find(|&s| on(t, s)).unwrap_or(fine)))
        .collect()
}

/// `h:mm:ss` for an elapsed time in seconds (negative counts as 0; rounded to the second).
#[must_use]
pub fn clock(seconds: f64) -> String {
    let s = seconds.max(0.0).round() as u64;
    format!("{}:{:02}:{:02}", s / 3600, (s / 60) % 60, s % 60)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn steps_are_clock_units() {
        assert_eq!(clock_step_s(0.3), 1.0);
        assert_eq!(clock_step_s(7.0), 10.0);
        assert_eq!(clock_step_s(40.0), 60.0);
        assert_eq!(clock_step_s(2500.0), 3600.0);
        // A day over ~8 marks: every 3 hours, not every 10 000 s.
        assert_eq!(clock_step_s(86_400.0 / 8.0), 10_800.0);
        assert_eq!(clock_step_s(100_000.0), 172_800.0);
        assert_eq!(clock_step_s(f64::NAN), 1.0);
    }

    #[test]
    fn marks_fall_on_multiples_of_the_step() {
        assert_eq!(marks(0.0, 86_400.0, 21_600.0), vec![0.0, 21_600.0, 43_200.0, 64_800.0, 86_400.0]);
        assert_eq!(marks(5.0, 31.0, 10.0), vec![10.0, 20.0, 30.0]);
        assert!(marks(10.0, 5.0, 1.0).is_empty());
        assert!(marks(0.0, 10.0, 0.0).is_empty());
    }

    #[test]
    fn grid_levels_nest() {
        // A day with lines at least 1 h apart: every hour, every 3 h stronger, every 12 h strongest.
        let g = clock_grid(0.0, 86_400.0, 2500.0);
        assert_eq!(g.len(), 25);
        assert_eq!(g[1], (3600.0, 3600.0));
        assert_eq!(g[3], (10_800.0, 10_800.0));
        assert_eq!(g[12], (43_200.0, 43_200.0));
        // Every level is a multiple of the finer ones, whatever the finest step.
        for min in [0.5, 1.5, 4.0, 12.0, 40.0, 100.0, 250.0, 700.0, 1000.0, 2000.0, 5000.0, 9000.0] {
            let g = clock_grid(0.0, 200_000.0, min);
            let fine = g[1].0;
            assert!(g.iter().all(|&(t, s)| s >= fine && (t / s).fract() == 0.0), "min {min}");
        }
    }

    #[test]
    fn clock_labels() {
        assert_eq!(clock(3725.0), "1:02:05");
        assert_eq!(clock(86_400.0), "24:00:00");
        assert_eq!(clock(-3.0), "0:00:00");
    }
}
