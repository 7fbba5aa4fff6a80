//! Applying edits to the review's document (calipers, marks, reviewed values).

use isoline_core::caliper::CaliperKind;

use super::IsolineApp;
use super::command::Command;
use super::state::{self, Part, Tool};

impl IsolineApp {
    /// Applies a document edit; false when it does not apply (unknown caliper, locked, …).
    pub(super) fn apply_edit(&mut self, cmd: &Command) -> bool {
        let rate = self.loaded.as_ref().map_or(500.0, |l| l.recording.sample_rate.hz());
        let doc = &mut self.doc;
        match cmd {
            Command::AddCaliper { kind, lead } => {
                doc.next_caliper_id += 1;
                let id = doc.next_caliper_id;
                doc.calipers.push(state::new_caliper(id, *kind, lead.clone()));
                self.ui_state.selected = Some((id, Part::Second));
                self.tool = Tool::Pointer;
            }
            Command::MoveCaliper { id, kind } => match doc.caliper_mut(*id) {
                Some(c) if !c.locked => c.kind = *kind,
                _ => return false,
            },
            Command::Nudge(n) => {
                let Some((id, part)) = self.ui_state.selected else { return false };
                let Some(c) = doc.caliper_mut(id).filter(|c| !c.locked) else { return false };
                let dt = *n as f64 / rate;
                c.kind = match (c.kind, part) {
                    (CaliperKind::Time { t1_s, t2_s }, Part::First) => CaliperKind::Time { t1_s: t1_s + dt, t2_s },
                    (CaliperKind::Time { t1_s, t2_s }, Part::Second) => CaliperKind::Time { t1_s, t2_s: t2_s + dt },
                    (CaliperKind::Plumb { t_s }, _) => CaliperKind::Plumb { t_s: t_s + dt },
                    // Voltage levels step by 10 µV (0.1 mm at 10 mm/mV) per press.
                    (CaliperKind::Voltage { t_s, uv1, uv2 }, Part::First) => {
                        CaliperKind::Voltage { t_s, uv1: uv1 + 10.0 * *n as f64, uv2 }
                    }
                    (CaliperKind::Voltage { t_s, uv1, uv2 }, Part::Second) => {
                        CaliperKind::Voltage { t_s, uv1, uv2: uv2 + 10.0 * *n as f64 }
                    }
                };
            }
            Command::DeleteCaliper(id) => {
                let n = doc.calipers.len();
                doc.calipers.retain(|c| c.id != *id);
                if doc.calipers.len() == n {
                    return false;
                }
                if self.ui_state.selected.is_some_and(|s| s.0 == *id) {
                    self.ui_state.selected = None;
                }
            }
            Command::SetLocked(id, b) => match doc.caliper_mut(*id) {
                Some(c) => c.locked = *b,
                None => return false,
            },
            Command::SetMarch(id, b) => match doc.caliper_mut(*id) {
                Some(c) => c.march = *b,
                None => return false,
            },
            Command::MoveMark(kind, s) => {
                doc.marks.insert(*kind, *s);
            }
            Command::ResetMark(kind) => {
                doc.marks.remove(kind);
            }
            Command::SetReviewed(key, v) => {
                // A value given (or cleared) without a reason drops the reason given with an earlier one.
                doc.reasons.remove(key);
                match v {
                    Some(v) => {
                        doc.reviewed.insert(key.clone(), *v);
                    }
                    None => {
                        doc.reviewed.remove(key);
                    }
                }
            }
            Command::SetReviewedWhy(key, v, why) => {
                doc.reviewed.insert(key.clone(), *v);
                doc.reasons.insert(key.clone(), why.clone());
            }
            Command::TakeCaliper { id, key } => {
                let Some(ms) = doc.caliper(*id).and_then(isoline_core::caliper::Caliper::interval_ms) else {
                    return false;
                };
                doc.reviewed.insert(key.clone(), ms);
                doc.reasons.remove(key);
            }
            _ => return false,
        }
        true
    }
}
