//! Calipers: the reader's measuring tools, as plain data with their readings.

use crate::beat::{Beat, MarkKind};
use crate::recording::LeadName;
use crate::units::{Hertz, bpm_from_rr_ms};

/// What a caliper measures.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub enum CaliperKind {
    /// Two vertical legs at two times (s); reads ms and bpm.
    Time {
        /// First leg, recording time in s.
        t1_s: f64,
        /// Second leg, recording time in s.
        t2_s: f64,
    },
    /// Two horizontal levels (µV) on one lead, drawn around a time; reads µV / mV.
    Voltage {
        /// Time in s where the caliper stands.
        t_s: f64,
        /// First level, µV.
        uv1: f64,
        /// Second level, µV.
        uv2: f64,
    },
    /// A vertical line through every lead at one time.
    Plumb {
        /// Recording time in s.
        t_s: f64,
    },
}

/// One caliper placed by the reader. A field it does not know is an error when read (a misspelt `lockd: true` in a
/// hand-edited review was dropped without a word), as for every other part of a review.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Caliper {
    /// Stable identifier within a review.
    pub id: u32,
    /// What it measures, and where.
    pub kind: CaliperKind,
    /// Lead the caliper was placed on (voltage calipers), by name.
    #[serde(default)]
    pub lead: Option<String>,
    /// A locked caliper cannot be dragged.
    #[serde(default)]
    pub locked: bool,
    /// Repeat the span along the strip (time calipers).
    #[serde(default)]
    pub march: bool,
}

impl Caliper {
    /// Whether the caliper is drawn on a trace of lead `lead` (`None`: a trace of no lead of the recording): a
    /// caliper placed on a lead (a voltage caliper) only on that lead, its name read as [`LeadName::parse`] reads
    /// it (so `ii` is lead II); any other everywhere.
    #[must_use]
    pub fn shows_on(&self, lead: Option<&LeadName>) -> bool {
        match (&self.lead, lead) {
            (None, _) => true,
            (Some(name), Some(lead)) => LeadName::parse(name) == *lead,
            (Some(_), None) => false,
        }
    }

    /// Interval in ms of a time caliper (always positive), else `None`.
    #[must_use]
    pub fn interval_ms(&self) -> Option<f64> {
        match self.kind {
            CaliperKind::Time { t1_s, t2_s } => Some((t2_s - t1_s).abs() * 1000.0),
            _ => None,
        }
    }

    /// Heart rate in bpm if the time caliper spans one RR interval: 60000 / ms.
    ///
    /// Source: references.md §10 (HR = 60 / RR in s).
    #[must_use]
    pub fn bpm(&self) -> Option<f64> {
        self.interval_ms().and_then(bpm_from_rr_ms)
    }

    /// Voltage difference in µV of a voltage caliper (second level minus first), else `None`.
    #[must_use]
    pub fn amplitude_uv(&self) -> Option<f64> {
        match self.kind {
            CaliperKind::Voltage { uv1, uv2, .. } => Some(uv2 - uv1),
            _ => None,
        }
    }

    /// Times of the marched legs of a time caliper within `[t_min, t_max]`, stepping the span both ways
    /// from the first leg. Empty for other kinds, for marching switched off, or for a span under 1 ms.
    #[must_use]
    pub fn march_times(&self, t_min: f64, t_max: f64) -> Vec<f64> {
        let CaliperKind::Time { t1_s, t2_s } = self.kind else { return Vec::new() };
        let span = (t2_s - t1_s).abs();
        if !self.march || span < 1e-3 || t_max < t_min {
            return Vec::new();
        }
        let start = t1_s.min(t2_s);
        let k0 = ((t_min - start) / span).ceil() as i64;
        let k1 = ((t_max - start) / span).floor() as i64;
        (k0..=k1).take(10_000).map(|k| start + k as f64 * span).collect()
    }

    /// A short readout: `812 ms  73.9 bpm`, `1.25 mV`, or the plumb line's time.
    #[must_use]
    pub fn readout(&self) -> String {
        match self.kind {
            CaliperKind::Time { .. } => {
                let ms = self.interval_ms().unwrap_or(0.0);
                match self.bpm() {
                    Some(bpm) => format!("{ms:.0} ms  {bpm:.1} bpm"),
                    None => format!("{ms:.0} ms"),
                }
            }
            CaliperKind::Voltage { uv1, uv2, .. } => format!("{:.2} mV", (uv2 - uv1) / 1000.0),
            CaliperKind::Plumb { t_s } => format!("{t_s:.3} s"),
        }
    }
}

/// Where a caliper leg placed at time `t` (s) snaps to: the nearest R peak or wave boundary of `beats` (in time
/// order, samples at `fs`) within `tolerance_s`, else `t` itself. Only beats whose R peak lies within a second of
/// `t` are looked at (a beat's boundaries lie well within a second of its R peak), found by bisection, so a
/// 24-hour recording's beats cost no more than a page's.
#[must_use]
pub fn snap_time(beats: &[Beat], fs: Hertz, t: f64, tolerance_s: f64) -> f64 {
    const NEAR_S: f64 = 1.0;
    let first = beats.partition_point(|b| fs.seconds_from_sample(b.r as f64) < t - NEAR_S);
    let marks = beats[first..]
        .iter()
        .take_while(|b| fs.seconds_from_sample(b.r as f64) <= t + NEAR_S)
        .flat_map(|b| std::iter::once(b.r).chain(MarkKind::BOUNDARIES.into_iter().filter_map(|k| b.bounds.get(k))));
    let mut best = (tolerance_s, t);
    for s in marks {
        let st = fs.seconds_from_sample(s as f64);
        if (st - t).abs() < best.0 {
            best = ((st - t).abs(), st);
        }
    }
    best.1
}

#[cfg(test)]
mod tests {
    use super::*;

    fn time(t1: f64, t2: f64, march: bool) -> Caliper {
        Caliper { id: 1, kind: CaliperKind::Time { t1_s: t1, t2_s: t2 }, lead: None, locked: false, march }
    }

    #[test]
    fn time_caliper_reads_ms_and_bpm() {
        // Source: references.md §10: 4 large squares at 25 mm/s = 800 ms -> 75 bpm (HR = 60000 / ms).
        let c = time(1.0, 1.8, false);
        assert!((c.interval_ms().unwrap_or(0.0) - 800.0).abs() < 1e-9);
        assert!((c.bpm().unwrap_or(0.0) - 75.0).abs() < 1e-9);
        assert_eq!(c.readout(), "800 ms  75.0 bpm");
        assert_eq!(time(2.0, 1.0, false).interval_ms(), Some(1000.0));
    }

    #[test]
    fn voltage_caliper_reads_mv() {
        let c = Caliper {
            id: 2,
            kind: CaliperKind::Voltage { t_s: 0.5, uv1: -250.0, uv2: 1000.0 },
            lead: Some("II".into()),
            locked: false,
            march: false,
        };
        assert_eq!(c.amplitude_uv(), Some(1250.0));
        assert_eq!(c.readout(), "1.25 mV");
    }

    #[test]
    fn march_repeats_span() {
        let c = time(1.0, 1.8, true);
        let legs = c.march_times(0.0, 4.0);
        let expect = [0.2, 1.0, 1.8, 2.6, 3.4];
        assert_eq!(legs.len(), expect.len());
        for (a, b) in legs.iter().zip(expect) {
            assert!((a - b).abs() < 1e-9);
        }
        assert!(time(1.0, 1.8, false).march_times(0.0, 4.0).is_empty());
    }

    #[test]
    fn a_voltage_caliper_shows_on_its_own_lead_however_its_name_is_spelled() {
        let on = |name: &str| Caliper {
            id: 2,
            kind: CaliperKind::Voltage { t_s: 1.0, uv1: 0.0, uv2: 1000.0 },
            lead: Some(name.to_string()),
            locked: false,
            march: false,
        };
        let ii = LeadName::parse("II");
        // Before, the Sheet compared the names as text and hid a caliper saved as `ii`, which the PNG drew.
        assert!(on("II").shows_on(Some(&ii)) && on("ii").shows_on(Some(&ii)));
        assert!(!on("V1").shows_on(Some(&ii)) && !on("II").shows_on(None));
        assert!(time(1.0, 2.0, false).shows_on(Some(&ii)) && time(1.0, 2.0, false).shows_on(None));
    }

    #[test]
    fn a_leg_snaps_to_the_nearest_r_peak_or_boundary_within_reach() {
        let fs = Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!());
        // Beats every second (R at 0.5 s, 1.5 s, …) with QRS onset 40 ms and T end 300 ms from their R peak.
        let beats: Vec<Beat> = (0..3600)
            .map(|k| {
                let r = 250 + 500 * k;
                let mut b = Beat::at(r, crate::beat::BeatKind::Dominant);
                b.bounds.qrs_on = Some(r - 20);
                b.bounds.t_end = Some(r + 150);
                b
            })
            .collect();
        let snap = |t: f64| snap_time(&beats, fs, t, 0.02);
        assert!((snap(1000.51) - 1000.5).abs() < 1e-9, "to the R peak");
        assert!((snap(1000.47) - 1000.46).abs() < 1e-9, "to the QRS onset");
        assert!((snap(1000.79) - 1000.8).abs() < 1e-9, "to the T end");
        assert!((snap(1001.1) - 1001.1).abs() < 1e-9, "nothing within 20 ms: stays");
        assert!((snap(-3.0) + 3.0).abs() < 1e-9 && (snap(9999.0) - 9999.0).abs() < 1e-9);
        assert!((snap_time(&[], fs, 2.0, 0.02) - 2.0).abs() < 1e-9);
    }
}
