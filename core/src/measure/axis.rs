//! Frontal plane axis of P, QRS and T from the limb leads.
//!
//! Each limb lead sees the projection of the frontal vector on its axis in the hexaxial reference system
//! (I 0°, II +60°, III +120°, aVR −150°, aVL −30°, aVF +90°); the augmented leads carry a factor √3/2
//! (Goldberger, Am Heart J 1942;23:483: aVF = II − I/2 = (√3/2)·M·sin θ). With I and aVF only this gives
//! θ = atan2(2·aVF/√3, I) (references.md §5). With more limb leads the vector is their least-squares fit.
//!
//! Before the fit the limb leads are checked against Einthoven's law and Goldberger's equations on the QRS
//! ([`super::einthoven`]); when the file's per-lead gains break them, the net values are rescaled by the fitted
//! relative gains, so the axis is that of one heart vector seen on one scale.

use crate::beat::Boundaries;
use crate::recording::StandardLead;
use crate::units::Hertz;

use super::einthoven::{LimbGains, limb_gains};
use super::level::{isoelectric_level, pre_p_level};

/// What each lead contributes to the axis.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
pub enum AxisBasis {
    /// Net area of the wave above minus below the reference level.
    NetArea,
    /// Net amplitude: largest positive plus largest negative deflection (the default; on LUDB records 1–50 it
    /// agrees with the cardiologists' axis categories on 33 of 47 records, net area on 30, the algebraic sum of
    /// the waves on 32 — see tests/tests/suite/measure_ludb.rs).
    #[default]
    NetAmplitude,
    /// Algebraic sum of the waves, R − |Q| − |S| (R′, S′ included): the peak of every run of samples on one side
    /// of the reference level, summed with its sign.
    WaveSum,
}

/// Frontal axes in degrees, in (−180°, +180°]; `None` where the wave or the limb leads are missing.
#[derive(Debug, Clone, Copy, Default, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Axes {
    /// P wave axis.
    pub p_deg: Option<f64>,
    /// QRS axis.
    pub qrs_deg: Option<f64>,
    /// T wave axis.
    pub t_deg: Option<f64>,
}

/// Relative gain of a limb lead for a frontal vector of unit size: 1 for I, II, III; √3/2 for aVR, aVL, aVF.
fn lead_gain(lead: StandardLead) -> f64 {
    match lead {
        StandardLead::AVR | StandardLead::AVL | StandardLead::AVF => 3.0_f64.sqrt() / 2.0,
        _ => 1.0,
    }
}

fn normalise_deg(deg: f64) -> f64 {
    if deg <= -180.0 { deg + 360.0 } else { deg }
}

/// θ = atan2(2·aVF/√3, I), degrees; `None` when both are zero or not finite.
#[must_use]
pub fn axis_from_i_avf(i: f64, avf: f64) -> Option<f64> {
    let y = 2.0 * avf / 3.0_f64.sqrt();
    (i.is_finite() && y.is_finite() && (i != 0.0 || y != 0.0)).then(|| normalise_deg(y.atan2(i).to_degrees()))
}

/// Axis (degrees) from net values of any limb leads, by least squares over the hexaxial projections.
/// Chest leads are ignored. `None` with fewer than two distinct limb-lead directions or a zero vector.
#[must_use]
pub fn axis_from_limb_leads(values: &[(StandardLead, f64)]) -> Option<f64> {
    let (mut cc, mut cs, mut ss, mut cv, mut sv) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for &(lead, v) in values {
        let Some(angle) = lead.frontal_angle_deg() else { continue };
        if !v.is_finite() {
            continue;
        }
        let k = lead_gain(lead);
        let (c, s) = (k * angle.to_radians().cos(), k * angle.to_radians().sin());
        cc += c * c;
        cs += c * s;
        ss += s * s;
        cv += c * v;
        sv += s * v;
    }
    let det = cc * ss - cs * cs;
    if det.abs() < 1e-9 {
        return None;
    }
    let a = (ss * cv - cs * sv) / det;
    let b = (cc * sv - cs * cv) / det;
    (a != 0.0 || b != 0.0).then(|| normalise_deg(b.atan2(a).to_degrees()))
}

/// Net deflection of `samples[start..=end]` relative to `reference` (µV·samples for area, µV for amplitude);
/// `None` when any of them is invalid: a lead missing over part of the wave (a channel absent from the file, a
/// representative beat whose lead too few beats held there) has no net value, rather than that of the part left
/// (LUDB 24 with its limb leads off for 5 s read the QRS axis 41° for 27° from the part before R).
#[must_use]
pub fn net_deflection(samples: &[f32], start: usize, end: usize, reference: f64, basis: AxisBasis) -> Option<f64> {
    if start > end || end >= samples.len() {
        return None;
    }
    let wave = &samples[start..=end];
    if !wave.iter().all(|x| x.is_finite()) {
        return None;
    }
    let seg = wave.iter().map(|&x| f64::from(x) - reference);
    match basis {
        AxisBasis::NetArea => Some(seg.sum()),
        AxisBasis::NetAmplitude => {
            let (lo, hi) = seg.fold((0.0_f64, 0.0_f64), |(lo, hi), x| (lo.min(x), hi.max(x)));
            Some(hi + lo)
        }
        AxisBasis::WaveSum => {
            // (sum of finished waves, peak of the current wave)
            let (sum, peak) = seg.fold((0.0_f64, 0.0_f64), |(sum, peak), x| {
                if x == 0.0 || peak == 0.0 || (x > 0.0) == (peak > 0.0) {
                    (sum, if x.abs() > peak.abs() { x } else { peak })
                } else {
                    (sum + peak, x)
                }
            });
            Some(sum + peak)
        }
    }
}

/// Which wave an axis is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Wave {
    /// P onset → P end, against the level before P onset.
    P,
    /// QRS onset → J point, against the PR-segment level.
    Qrs,
    /// J point → T end, against the PR-segment level.
    T,
}

/// Relative gains of the limb leads fitted on the beat's QRS (QRS onset → J point, against the PR-segment
/// level), see [`super::einthoven`]. `None` without all six limb leads or QRS boundaries.
#[must_use]
pub fn qrs_limb_gains(leads: &[(StandardLead, &[f32])], bounds: &Boundaries, fs: Hertz) -> Option<LimbGains> {
    let (start, end) = (bounds.qrs_on?, bounds.qrs_end?);
    let series: Vec<(StandardLead, Vec<f64>)> = leads
        .iter()
        .filter(|(l, _)| l.frontal_angle_deg().is_some())
        .filter_map(|&(l, x)| {
            let reference = isoelectric_level(x, bounds, fs)?;
            let seg = x.get(start..=end)?;
            Some((l, seg.iter().map(|&v| f64::from(v) - reference).collect()))
        })
        .collect();
    let refs: Vec<(StandardLead, &[f64])> = series.iter().map(|(l, v)| (*l, v.as_slice())).collect();
    limb_gains(&refs)
}

/// Net value of one wave in every limb lead present, rescaled by the fitted limb-lead gains when they apply
/// ([`qrs_limb_gains`], [`LimbGains::applies`]). Chest leads are left out.
#[must_use]
pub fn net_values(
    leads: &[(StandardLead, &[f32])],
    bounds: &Boundaries,
    fs: Hertz,
    wave: Wave,
    basis: AxisBasis,
) -> Vec<(StandardLead, f64)> {
    let window = match wave {
        Wave::P => bounds.p_on.zip(bounds.p_end),
        Wave::Qrs => bounds.qrs_on.zip(bounds.qrs_end),
        Wave::T => bounds.qrs_end.zip(bounds.t_end),
    };
    let Some((start, end)) = window else { return Vec::new() };
    let gains = qrs_limb_gains(leads, bounds, fs).filter(LimbGains::applies);
    leads
        .iter()
        .filter(|(l, _)| l.frontal_angle_deg().is_some())
        .filter_map(|&(l, x)| {
            let reference =
                if wave == Wave::P { pre_p_level(x, bounds, fs)? } else { isoelectric_level(x, bounds, fs)? };
            let k = gains.as_ref().map_or(1.0, |g| g.factor(l));
            Some((l, k * net_deflection(x, start, end, reference, basis)?))
        })
        .collect()
}

/// Axis of one wave on a beat: `leads` pairs standard names with their samples on the beat's axis.
#[must_use]
pub fn wave_axis(
    leads: &[(StandardLead, &[f32])],
    bounds: &Boundaries,
    fs: Hertz,
    wave: Wave,
    basis: AxisBasis,
) -> Option<f64> {
    axis_from_limb_leads(&net_values(leads, bounds, fs, wave, basis))
}

/// Axes of P, QRS and T on a beat.
#[must_use]
pub fn axes(leads: &[(StandardLead, &[f32])], bounds: &Boundaries, fs: Hertz, basis: AxisBasis) -> Axes {
    Axes {
        p_deg: wave_axis(leads, bounds, fs, Wave::P, basis),
        qrs_deg: wave_axis(leads, bounds, fs, Wave::Qrs, basis),
        t_deg: wave_axis(leads, bounds, fs, Wave::T, basis),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Projections of a unit frontal vector at `deg` on every limb lead (slow, obvious: the hexaxial geometry).
    fn project(deg: f64) -> Vec<(StandardLead, f64)> {
        StandardLead::ALL
            .into_iter()
            .filter_map(|l| l.frontal_angle_deg().map(|a| (l, lead_gain(l) * (deg - a).to_radians().cos())))
            .collect()
    }

    #[test]
    fn least_squares_matches_i_avf_formula() {
        for deg in (-179..=180).step_by(7) {
            let p = project(f64::from(deg));
            let get = |l| p.iter().find(|(x, _)| *x == l).map_or(0.0, |(_, v)| *v);
            let fast = axis_from_limb_leads(&p).unwrap_or(f64::NAN);
            let formula = axis_from_i_avf(get(StandardLead::I), get(StandardLead::AVF)).unwrap_or(f64::NAN);
            assert!((fast - formula).abs() < 1e-6, "{deg}: {fast} vs {formula}");
            assert!((fast - f64::from(deg)).abs() < 1e-6, "{deg}: {fast}");
        }
    }

    #[test]
    fn too_few_leads_gives_none() {
        assert_eq!(axis_from_limb_leads(&[(StandardLead::I, 1.0)]), None);
        assert_eq!(axis_from_limb_leads(&[(StandardLead::V1, 1.0), (StandardLead::V2, 1.0)]), None);
        assert_eq!(axis_from_i_avf(0.0, 0.0), None);
        assert_eq!(axis_from_limb_leads(&[(StandardLead::I, 0.0), (StandardLead::AVF, 0.0)]), None);
    }

    #[test]
    fn net_amplitude_and_area() {
        let x = [0.0_f32, 10.0, 100.0, -30.0, 0.0];
        assert_eq!(net_deflection(&x, 0, 4, 0.0, AxisBasis::NetAmplitude), Some(70.0));
        assert_eq!(net_deflection(&x, 0, 4, 0.0, AxisBasis::NetArea), Some(80.0));
        assert_eq!(net_deflection(&x, 0, 5, 0.0, AxisBasis::NetArea), None);
        // q −20, R +100, s −30, R′ +40: R − |Q| − |S| + R′ = 90; net amplitude 100 − 30 = 70.
        let qrsr = [0.0_f32, -20.0, -5.0, 60.0, 100.0, 10.0, -30.0, -10.0, 40.0, 0.0];
        assert_eq!(net_deflection(&qrsr, 0, 9, 0.0, AxisBasis::WaveSum), Some(90.0));
        assert_eq!(net_deflection(&qrsr, 0, 9, 0.0, AxisBasis::NetAmplitude), Some(70.0));
        assert_eq!(net_deflection(&[0.0, 0.0], 0, 1, 0.0, AxisBasis::WaveSum), Some(0.0));
        // A lead with no valid sample over the wave has no deflection (not zero, which would pull the axis).
        let missing = [f32::NAN; 4];
        for basis in [AxisBasis::NetAmplitude, AxisBasis::NetArea, AxisBasis::WaveSum] {
            assert_eq!(net_deflection(&missing, 0, 3, 0.0, basis), None, "{basis:?}");
        }
        // Nor has one missing over part of it: the part left is not the wave.
        assert_eq!(net_deflection(&[f32::NAN, 30.0, -10.0, f32::NAN], 0, 3, 0.0, AxisBasis::NetAmplitude), None);
        assert_eq!(net_deflection(&[f32::NAN, 30.0, -10.0, f32::NAN], 1, 2, 0.0, AxisBasis::NetAmplitude), Some(20.0));
    }

    /// Limb leads of a beat whose QRS vector swings through `deg` (slow, obvious: hexaxial projections), with
    /// lead gains multiplied by `scale` as a file with mismatched header gains would give them.
    fn beat_at(deg: f64, scale: [f64; 6]) -> Vec<(StandardLead, Vec<f32>)> {
        let shape: Vec<f64> =
            (0..200)
                .map(|t| {
                    if (100..140).contains(&t) { (f64::from(t - 100) / 40.0 * std::f64::consts::PI).sin() } else { 0.0 }
                })
                .collect();
        let s = (0..200).map(|t| {
            if (100..140).contains(&t) { 0.3 * (f64::from(t - 100) / 20.0 * std::f64::consts::PI).sin() } else { 0.0 }
        });
        let (x, y): (Vec<f64>, Vec<f64>) = shape
            .iter()
            .zip(s)
            .map(|(m, side)| {
                let a = deg.to_radians();
                (1000.0 * (m * a.cos() - side * a.sin()), 1000.0 * (m * a.sin() + side * a.cos()))
            })
            .unzip();
        super::super::einthoven::LIMB_LEADS
            .iter()
            .zip(scale)
            .map(|(&l, k)| {
                let (ang, g) = (l.frontal_angle_deg().unwrap_or(0.0).to_radians(), lead_gain(l));
                (l, x.iter().zip(&y).map(|(a, b)| (k * g * (a * ang.cos() + b * ang.sin())) as f32).collect())
            })
            .collect()
    }

    #[test]
    fn mismatched_limb_gains_are_undone() {
        let fs = Hertz::from_hz(500.0).unwrap_or_else(|_| unreachable!());
        let b = Boundaries { qrs_on: Some(100), qrs_end: Some(140), ..Boundaries::default() };
        for deg in [-45.0, 0.0, 20.0, 60.0, 100.0] {
            let clean = beat_at(deg, [1.0; 6]);
            let bent = beat_at(deg, [1.0, 0.6, 1.9, 1.3, 0.7, 0.5]);
            let cl: Vec<(StandardLead, &[f32])> = clean.iter().map(|(l, x)| (*l, x.as_slice())).collect();
            let bl: Vec<(StandardLead, &[f32])> = bent.iter().map(|(l, x)| (*l, x.as_slice())).collect();
            let want = wave_axis(&cl, &b, fs, Wave::Qrs, AxisBasis::NetArea).unwrap_or(f64::NAN);
            let got = wave_axis(&bl, &b, fs, Wave::Qrs, AxisBasis::NetArea).unwrap_or(f64::NAN);
            assert!((want - deg).abs() < 0.5, "{deg}: clean {want}");
            assert!((got - want).abs() < 0.5, "{deg}: rescaled {got} vs {want}");
            assert!(qrs_limb_gains(&bl, &b, fs).is_some_and(|g| g.applies()));
            assert!(qrs_limb_gains(&cl, &b, fs).is_some_and(|g| !g.applies()));
        }
    }
}
