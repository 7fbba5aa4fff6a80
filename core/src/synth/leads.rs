//! The cardiac dipole of each wave and its projection to leads.
//!
//! Components: x points to the patient's left (lead I), y points down (inferior, +90° in the frontal plane),
//! z points forward (anterior). A frontal direction α (degrees, the usual hexaxial convention: I 0°, aVF +90°)
//! is (cos α, sin α, 0). Limb leads I and II are projections on their hexaxial directions; III, aVR, aVL and aVF
//! are derived from I and II with [`Recording::derive_limb_leads`](crate::Recording::derive_limb_leads), so
//! Einthoven's and Goldberger's relations hold to float precision. Chest leads are projections on directions
//! in the horizontal (x–z) plane with a gain for each lead.

use super::SynthSpec;
use super::shape::Dipoles;
use crate::recording::StandardLead;

/// Which leads a synthetic recording has.
#[derive(Debug, Clone, Copy, PartialEq, Eq, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "kebab-case")]
pub enum LeadSet {
    /// The twelve standard leads (I, II, III, aVR, aVL, aVF, V1–V6).
    Standard12,
    /// An ambulatory set: I, II, V5.
    Ambulatory3,
    /// I and II.
    Pair,
    /// II alone.
    Single,
}

impl LeadSet {
    /// The set with `n` leads (12, 3, 2 or 1).
    #[must_use]
    pub fn from_count(n: usize) -> Option<Self> {
        match n {
            12 => Some(Self::Standard12),
            3 => Some(Self::Ambulatory3),
            2 => Some(Self::Pair),
            1 => Some(Self::Single),
            _ => None,
        }
    }

    /// Number of leads in the finished recording.
    #[must_use]
    pub fn count(self) -> usize {
        match self {
            Self::Standard12 => 12,
            Self::Ambulatory3 => 3,
            Self::Pair => 2,
            Self::Single => 1,
        }
    }

    /// Leads projected from the dipole, in output order; for `Standard12`, III, aVR, aVL and aVF follow I and
    /// II by derivation.
    #[must_use]
    pub fn projected(self) -> &'static [StandardLead] {
        use StandardLead as L;
        match self {
            Self::Standard12 => &[L::I, L::II, L::V1, L::V2, L::V3, L::V4, L::V5, L::V6],
            Self::Ambulatory3 => &[L::I, L::II, L::V5],
            Self::Pair => &[L::I, L::II],
            Self::Single => &[L::II],
        }
    }
}

/// Horizontal-plane direction (degrees from x towards anterior z) and gain of each chest lead.
/// From memory: approximate directions of V1–V6 round the chest; gains (nearness of the electrode to the
/// heart) are chosen to give the usual R-wave progression. Common practice, no source.
const CHEST: [(StandardLead, f64, f64); 6] = [
    (StandardLead::V1, 115.0, 2.0),
    (StandardLead::V2, 94.0, 2.8),
    (StandardLead::V3, 75.0, 2.8),
    (StandardLead::V4, 60.0, 2.6),
    (StandardLead::V5, 30.0, 2.2),
    (StandardLead::V6, 0.0, 1.7),
];

/// Unit vector (times gain for chest leads) that a lead projects the dipole on; `None` for III, aVR, aVL,
/// aVF, which are derived.
#[must_use]
pub fn projection(lead: StandardLead) -> Option<[f64; 3]> {
    match lead {
        StandardLead::I | StandardLead::II => {
            let a = lead.frontal_angle_deg()?.to_radians();
            Some([a.cos(), a.sin(), 0.0])
        }
        _ => CHEST.iter().find(|c| c.0 == lead).map(|&(_, deg, gain)| {
            let b = f64::to_radians(deg);
            [gain * b.cos(), 0.0, gain * b.sin()]
        }),
    }
}

fn dipole(frontal: f64, axis_deg: f64, anterior: f64) -> [f64; 3] {
    let a = axis_deg.to_radians();
    [frontal * a.cos(), frontal * a.sin(), anterior]
}

/// Dipoles of a sinus beat. Q, R and S share the frontal direction `axis_deg` (Q and S opposite to R), so the
/// frontal QRS axis by net area is exactly `axis_deg`.
///
/// Heights relative to R: Q −1/6 and S −1/4, the paper's a·b² ratios (McSharry et al. 2003, Table 1); P 0.15
/// and T 0.3 (Common practice, no source: usual adult lead-II proportions). The anterior parts (septal Q to
/// the front, R and S slightly to the back) give an rS complex in V1 and qRs in V6 (Common practice, no source).
#[must_use]
pub fn sinus_dipoles(spec: &SynthSpec) -> Dipoles {
    let r = spec.r_amplitude_uv;
    [
        dipole(0.15 * r, spec.p_axis_deg, 0.03 * r),
        dipole(-r / 6.0, spec.axis_deg, 0.08 * r),
        dipole(r, spec.axis_deg, -0.15 * r),
        dipole(-0.25 * r, spec.axis_deg, -0.08 * r),
        dipole(0.3 * r, spec.t_axis_deg, 0.08 * r),
    ]
}

/// Frontal direction of ectopic beats relative to the sinus QRS axis, degrees.
pub const ECTOPIC_AXIS_TURN_DEG: f64 = -135.0;

/// Dipoles of an ectopic (ventricular) beat: a QRS turned by [`ECTOPIC_AXIS_TURN_DEG`], larger and pointing
/// forward, with a T wave opposite to it (discordant). The P entry is unused (ectopic beats have no P).
/// Common practice, no source.
#[must_use]
pub fn ectopic_dipoles(spec: &SynthSpec) -> Dipoles {
    let r = spec.r_amplitude_uv;
    let axis = spec.axis_deg + ECTOPIC_AXIS_TURN_DEG;
    [
        [0.0; 3],
        dipole(-0.1 * r, axis, -0.05 * r),
        dipole(1.3 * r, axis, 0.45 * r),
        dipole(-0.3 * r, axis, -0.1 * r),
        dipole(-0.45 * r, axis, -0.15 * r),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn counts_and_projected_leads_agree() {
        for n in [12, 3, 2, 1] {
            let set = LeadSet::from_count(n);
            assert_eq!(set.map(LeadSet::count), Some(n));
        }
        assert_eq!(LeadSet::from_count(5), None);
        assert_eq!(LeadSet::Ambulatory3.projected(), &[StandardLead::I, StandardLead::II, StandardLead::V5]);
        assert!(projection(StandardLead::AVR).is_none());
        // Lead II lies at +60° (references.md §5).
        let ii = projection(StandardLead::II).unwrap_or_default();
        assert!((ii[0] - 0.5).abs() < 1e-12 && (ii[1] - 3f64.sqrt() / 2.0).abs() < 1e-12);
    }
}
