//! Frontal QRS axis on LUDB records against the cardiologists' axis diagnoses.
//!
//! Source: Kalyakulina et al., LUDB: a new open-access validation tool for electrocardiogram delineation
//! algorithms, IEEE Access 2020;8:186181-90 (records, boundaries and diagnoses; ODC-By 1.0 via PhysioNet).
//! Axis categories as the diagnoses use them (tests/data/README.md, from memory): left axis deviation below 0°,
//! horizontal 0 to +30°, normal +30 to +70°, vertical +70 to +90°, right axis deviation above +90°.
//!
//! The axis tests measure the axis on a median beat built here from the cardiologists' own beat positions and
//! global boundaries (`N.global.csv`), so they check the axis measurement alone, apart from detection and
//! delineation.
//!
//! Finding (records 1–50): the header gains of LUDB 1.0.1 differ by lead (e.g. record 1: I 1716, II 1206, III 1229
//! units/mV) while the stored integers obey Einthoven's law II = I + III exactly; the scaled limb leads therefore
//! break the law by 10–20 %. The axis code fits relative gains that restore it (`measure::einthoven`) and the
//! test below checks that the fitted gains are the header's own ratios.

use std::path::Path;

use isoline_core::beat::Boundaries;
use isoline_core::io;
use isoline_core::measure::axis::{self, AxisBasis, Wave};
use isoline_core::measure::einthoven::LIMB_LEADS;
use isoline_core::measure::{self, Template};
use isoline_core::recording::StandardLead;
use isoline_tests::data;
use isoline_tests::score::median;

/// Axis category of an angle, as the LUDB diagnoses name them (None below −90°: no category given).
/// Limits: a value on a limit belongs to the category above it (0° horizontal, 30° normal, 70° vertical), +90°
/// is still vertical. From memory (tests/data/README.md); the data hold no angle exactly on a limit.
fn category(deg: f64) -> Option<&'static str> {
    match deg {
        d if (-90.0..0.0).contains(&d) => Some("left axis deviation"),
        d if (0.0..30.0).contains(&d) => Some("horizontal"),
        d if (30.0..70.0).contains(&d) => Some("normal"),
        d if (70.0..=90.0).contains(&d) => Some("vertical"),
        d if d > 90.0 => Some("right axis deviation"),
        _ => None,
    }
}

/// Degrees from `deg` to the nearest angle inside the category `label` (0 inside).
fn distance_to(label: &str, deg: f64) -> f64 {
    let (lo, hi) = match label {
        "left axis deviation" => (-90.0, 0.0),
        "horizontal" => (0.0, 30.0),
        "normal" => (30.0, 70.0),
        "vertical" => (70.0, 90.0),
        _ => (90.0, 180.0),
    };
    if deg < lo {
        lo - deg
    } else if deg > hi {
        deg - hi
    } else {
        0.0
    }
}

/// One annotated beat of `N.global.csv`: R sample and global boundaries.
fn read_global(path: &Path) -> Vec<(usize, Boundaries)> {
    let text = std::fs::read_to_string(path).unwrap_or_default();
    let field = |s: Option<&str>| s.and_then(|s| s.trim().parse::<usize>().ok());
    text.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.split(',').collect();
            let r = field(f.first().copied())?;
            let b = Boundaries {
                p_on: field(f.get(2).copied()),
                p_end: field(f.get(3).copied()),
                qrs_on: field(f.get(4).copied()),
                qrs_end: field(f.get(5).copied()),
                t_end: field(f.get(6).copied()),
            };
            Some((r, b))
        })
        .collect()
}

/// Median beat of every lead over the annotated beats, with the median boundary offsets (slow, obvious code).
fn median_template(
    leads: &[Vec<f32>],
    beats: &[(usize, Boundaries)],
    pre: usize,
    post: usize,
) -> Option<(Vec<Vec<f32>>, Boundaries)> {
    let n = leads.first()?.len();
    let used: Vec<&(usize, Boundaries)> =
        beats.iter().filter(|(r, b)| *r >= pre && r + post < n && b.qrs_on.is_some() && b.qrs_end.is_some()).collect();
    if used.is_empty() {
        return None;
    }
    let template = leads
        .iter()
        .map(|x| {
            (0..pre + post)
                .map(|k| median(used.iter().map(|(r, _)| f64::from(x[r - pre + k])).collect()).unwrap_or(0.0) as f32)
                .collect()
        })
        .collect();
    let offset = |get: fn(&Boundaries) -> Option<usize>| {
        median(used.iter().filter_map(|(r, b)| get(b).map(|v| v as f64 - *r as f64)).collect())
            .map(|o| (o + pre as f64).round().max(0.0) as usize)
    };
    let bounds = Boundaries {
        p_on: offset(|b| b.p_on),
        p_end: offset(|b| b.p_end),
        qrs_on: offset(|b| b.qrs_on),
        qrs_end: offset(|b| b.qrs_end),
        t_end: offset(|b| b.t_end),
    };
    Some((template, bounds))
}

/// (record, diagnosed axis category) for the non-paced records with an axis diagnosis.
fn labelled_records() -> Vec<(String, String)> {
    let text = std::fs::read_to_string(data("ludb/labels.csv")).unwrap_or_default();
    text.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.rsplitn(3, ',').collect(); // paced, axis, "record,rhythm"
            let (paced, axis, head) = (f.first()?, f.get(1)?, f.get(2)?);
            let record = head.split(',').next()?;
            (paced.trim() == "no" && !axis.trim().is_empty()).then(|| (record.to_string(), axis.trim().to_string()))
        })
        .collect()
}

/// A record's median beat: the recording, the per-lead template and its boundaries.
struct Case {
    record: String,
    label: String,
    rec: isoline_core::recording::Recording,
    template: Vec<Vec<f32>>,
    bounds: Boundaries,
}

fn cases() -> Vec<Case> {
    labelled_records()
        .into_iter()
        .map(|(record, label)| {
            let opened = io::open(&data(&format!("ludb/{record}.hea")), &io::OpenOptions::default())
                .unwrap_or_else(|e| panic!("ludb/{record}.hea: {e}"));
            let rec = opened.recording;
            let fs = rec.sample_rate;
            let beats = read_global(&data(&format!("ludb/{record}.global.csv")));
            let leads: Vec<Vec<f32>> = rec.leads.iter().map(|l| l.samples.clone()).collect();
            let (pre, post) = (fs.sample_from_seconds(0.4) as usize, fs.sample_from_seconds(0.7) as usize);
            let (template, bounds) = median_template(&leads, &beats, pre, post)
                .unwrap_or_else(|| panic!("ludb/{record}: no annotated beats"));
            Case { record, label, rec, template, bounds }
        })
        .collect()
}

impl Case {
    fn limb(&self) -> Vec<(StandardLead, &[f32])> {
        self.rec
            .leads
            .iter()
            .zip(&self.template)
            .filter_map(|(l, x)| {
                l.name.standard().filter(|s| s.frontal_angle_deg().is_some()).map(|s| (s, x.as_slice()))
            })
            .collect()
    }

    /// QRS axis from the net values of `basis` in `use_leads`, the limb leads on the scale `scale`.
    fn axis(&self, basis: AxisBasis, use_leads: &[StandardLead], scale: Scale) -> Option<f64> {
        let limb = self.limb();
        let fs = self.rec.sample_rate;
        let values: Vec<(StandardLead, f64)> = if scale == Scale::Fitted {
            axis::net_values(&limb, &self.bounds, fs, Wave::Qrs, basis)
        } else {
            let (s, e) = (self.bounds.qrs_on?, self.bounds.qrs_end?);
            let gains = header_gains(&self.record);
            limb.iter()
                .filter_map(|&(l, x)| {
                    let reference = measure::level::isoelectric_level(x, &self.bounds, fs)?;
                    let k = if scale == Scale::Integer { gain_of(&gains, l) } else { 1.0 };
                    Some((l, k * axis::net_deflection(x, s, e, reference, basis)?))
                })
                .collect()
        };
        let chosen: Vec<(StandardLead, f64)> = values.into_iter().filter(|(l, _)| use_leads.contains(l)).collect();
        axis::axis_from_limb_leads(&chosen)
    }

    /// Hexaxial method: the axis lies at right angles to the most equiphasic limb lead (smallest |R − |S|| relative
    /// to R + |S|), on the side where the lead at right angles to it is positive; 30° steps.
    // Source: AMC Amsterdam, medical physics notes "ECG: hexaxial reference system"
    // (onderwijs1.amc.nl/medfysica/doc/ECG_Hexaxial RefSystem.htm). Equiphasic ratio and net amplitude do not
    // depend on a lead's gain, so the file's scaling does not matter here.
    fn isoelectric_lead_axis(&self) -> Option<f64> {
        let fs = self.rec.sample_rate;
        let (s, e) = (self.bounds.qrs_on?, self.bounds.qrs_end?);
        let peaks: Vec<(StandardLead, f64, f64)> = self
            .limb()
            .iter()
            .filter_map(|&(l, x)| {
                let r = measure::level::isoelectric_level(x, &self.bounds, fs)?;
                let seg = x.get(s..=e)?.iter().map(|&v| f64::from(v) - r);
                let (lo, hi) = seg.fold((0.0_f64, 0.0_f64), |(lo, hi), v| (lo.min(v), hi.max(v)));
                Some((l, hi, lo))
            })
            .collect();
        let ratio = |&(_, hi, lo): &(StandardLead, f64, f64)| (hi + lo).abs() / (hi - lo).max(f64::MIN_POSITIVE);
        let flattest = peaks.iter().min_by(|a, b| ratio(a).total_cmp(&ratio(b)))?.0;
        let perpendicular = match flattest {
            StandardLead::I => StandardLead::AVF,
            StandardLead::AVF => StandardLead::I,
            StandardLead::II => StandardLead::AVL,
            StandardLead::AVL => StandardLead::II,
            StandardLead::III => StandardLead::AVR,
            _ => StandardLead::III,
        };
        let &(_, hi, lo) = peaks.iter().find(|p| p.0 == perpendicular)?;
        let deg = perpendicular.frontal_angle_deg()? + if hi + lo >= 0.0 { 0.0 } else { 180.0 };
        Some(if deg > 180.0 { deg - 360.0 } else { deg })
    }

    /// Direction of the largest instantaneous frontal QRS vector (gain-corrected limb leads, least squares per
    /// sample over the six limb leads).
    fn max_vector_axis(&self) -> Option<f64> {
        let limb = self.limb();
        let fs = self.rec.sample_rate;
        let (s, e) = (self.bounds.qrs_on?, self.bounds.qrs_end?);
        let gains = axis::qrs_limb_gains(&limb, &self.bounds, fs).filter(|g| g.applies());
        let refs: Vec<f64> =
            limb.iter().map(|&(_, x)| measure::level::isoelectric_level(x, &self.bounds, fs).unwrap_or(0.0)).collect();
        (s..=e)
            .filter_map(|t| {
                let v: Vec<(StandardLead, f64)> = limb
                    .iter()
                    .zip(&refs)
                    .map(|(&(l, x), r)| (l, gains.map_or(1.0, |g| g.factor(l)) * (f64::from(x[t]) - r)))
                    .collect();
                let deg = axis::axis_from_limb_leads(&v)?;
                let size: f64 = v.iter().map(|(_, a)| a * a).sum();
                Some((size, deg))
            })
            .max_by(|a, b| a.0.total_cmp(&b.0))
            .map(|(_, d)| d)
    }

    /// The measurement as `isoline measure` makes it from this template (default basis).
    fn measured(&self) -> Option<f64> {
        let t = Template {
            leads: &self.template,
            sample_rate: self.rec.sample_rate,
            bounds: self.bounds,
            baseline_step_uv: None,
        };
        measure::measure(&self.rec, &[], Some(&t)).axes.qrs_deg
    }
}

/// The scale of the limb leads an axis is computed on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Scale {
    /// Rescaled by the gains fitted to Einthoven's law and Goldberger's equations (what `isoline` does).
    Fitted,
    /// The header's gains as the file gives them (LUDB 1.0.1: break Einthoven's law by 10–20 %).
    Header,
    /// The stored integers, all leads on one scale (the header gains undone).
    Integer,
}

const SIX: [StandardLead; 6] = LIMB_LEADS;
const I_AVF: [StandardLead; 2] = [StandardLead::I, StandardLead::AVF];
const I_III: [StandardLead; 2] = [StandardLead::I, StandardLead::III];

#[test]
fn ludb_qrs_axis_category_from_expert_boundaries() {
    // Goal (issue 3): the QRS axis falls in the diagnosed category for ≥ 85 % of non-paced records.
    let cases = cases();
    type AxisFn = Box<dyn Fn(&Case) -> Option<f64>>;
    type Method = (&'static str, AxisFn);
    let m = |basis, leads: &'static [StandardLead], scale| -> AxisFn {
        Box::new(move |c: &Case| c.axis(basis, leads, scale))
    };
    let methods: Vec<Method> = vec![
        ("amp6", m(AxisBasis::NetAmplitude, &SIX, Scale::Fitted)),
        ("amp6int", m(AxisBasis::NetAmplitude, &SIX, Scale::Integer)),
        ("amp6hdr", m(AxisBasis::NetAmplitude, &SIX, Scale::Header)),
        ("ampIF", m(AxisBasis::NetAmplitude, &I_AVF, Scale::Fitted)),
        ("ampIFhdr", m(AxisBasis::NetAmplitude, &I_AVF, Scale::Header)),
        ("ampI3", m(AxisBasis::NetAmplitude, &I_III, Scale::Fitted)),
        ("ampI3hdr", m(AxisBasis::NetAmplitude, &I_III, Scale::Header)),
        ("wav6", m(AxisBasis::WaveSum, &SIX, Scale::Fitted)),
        ("wavIF", m(AxisBasis::WaveSum, &I_AVF, Scale::Fitted)),
        ("wavI3", m(AxisBasis::WaveSum, &I_III, Scale::Fitted)),
        ("wavI3hdr", m(AxisBasis::WaveSum, &I_III, Scale::Header)),
        ("area6", m(AxisBasis::NetArea, &SIX, Scale::Fitted)),
        ("area6hdr", m(AxisBasis::NetArea, &SIX, Scale::Header)),
        ("maxvec", Box::new(Case::max_vector_axis)),
        ("isolead", Box::new(Case::isoelectric_lead_axis)),
    ];
    let mut agree = vec![0_usize; methods.len()];
    let mut header = format!("{:>3} {:<20}", "rec", "diagnosed");
    for (name, _) in &methods {
        header.push_str(&format!(" {name:>8}"));
    }
    println!("{header}  dist  (✗ = outside the diagnosed category; dist = degrees from amp6 to it)");
    println!(
        "  (fitted = Einthoven-consistent gains, as shipped; int = the stored integers; hdr = the header's gains)"
    );
    let (mut shipped_ok, mut misses, mut never) = (0, Vec::new(), Vec::new());
    for c in &cases {
        let mut line = format!("{:>3} {:<20}", c.record, c.label);
        let (mut nearest, mut any_ok) = (f64::INFINITY, false);
        for (k, (_, f)) in methods.iter().enumerate() {
            let a = f(c);
            let ok = a.and_then(category) == Some(c.label.as_str());
            agree[k] += usize::from(ok);
            any_ok |= ok;
            nearest = nearest.min(a.map_or(f64::INFINITY, |a| distance_to(&c.label, a)));
            line.push_str(&format!(
                " {:>7}{}",
                a.map_or("—".into(), |a| format!("{a:.0}")),
                if ok { ' ' } else { '✗' }
            ));
        }
        let shipped = c.measured();
        assert_eq!(shipped, c.axis(AxisBasis::default(), &SIX, Scale::Fitted), "record {}", c.record);
        println!("{line} {:>5.0}", shipped.map_or(f64::NAN, |a| distance_to(&c.label, a)));
        if shipped.and_then(category) == Some(c.label.as_str()) {
            shipped_ok += 1;
        } else {
            misses.push((c, shipped));
        }
        if !any_ok {
            never.push((c.record.as_str(), nearest));
        }
    }
    let total = cases.len();
    let counts: Vec<String> = methods.iter().zip(&agree).map(|((name, _), n)| format!("{name} {n}/{total}")).collect();
    println!("agreement: {}", counts.join(", "));
    println!("misses of the shipped method (net amplitude, six limb leads, Einthoven-consistent gains):");
    for (c, a) in &misses {
        let a = a.unwrap_or(f64::NAN);
        println!(
            "{:>3}: {a:>5.0}° {:<20} diagnosed {:<20} {:>4.0}° outside",
            c.record,
            category(a).unwrap_or("—"),
            c.label,
            distance_to(&c.label, a)
        );
    }
    let never_text: Vec<String> = never.iter().map(|(r, d)| format!("{r} ({d:.1}°)")).collect();
    println!(
        "outside the diagnosed category by every method above (nearest method's distance): {}; at most {}/{total} with \
         the best method chosen per record",
        never_text.join(", "),
        total - never.len()
    );
    println!("shipped: {shipped_ok}/{total}");
    assert!(total >= 40, "expected the 47 labelled non-paced LUDB records, found {total}");
    // The goal is NOT met, and no variant above meets it (best 35/47). Records 17, 19, 22, 29, 31, 32 and 44 fall
    // outside their diagnosed category by every method, so even the best method chosen per record after the fact
    // reaches 40/47 (85.1 %), and no single one comes near. The scale of the limb leads is not the cause: the
    // stored integers (amp6int) and the Einthoven-fitted gains (amp6) agree within 1° on every record, and the
    // header's gains (…hdr) move records both ways (33 → 33 with net amplitude). Nor is a method: net amplitude
    // (peak R − S), net area (mean vector), the algebraic sum of the waves, the maximal QRS vector and the
    // most-equiphasic-lead reading all leave the same records out. The diagnosed categories overlap on the
    // measured angle (records diagnosed left axis deviation measure −27° … +33°, those diagnosed horizontal
    // +9° … +32°; record 44, complete LBBB, measures +60° … +70° by every method; record 31 +31° … +55°).
    // The diagnoses follow a practice in which the two overlap:
    // Source: teaching manual of propedeutics (engime.org, "Учебное пособие для практических занятий по
    // пропедевтике", p. 101): by visual inspection "horizontal position, or left axis deviation (angle +30° to
    // −90°)" is one class (R I > R II > R III, deep S in III, tall R in aVL); the angle itself comes from tables
    // of the algebraic sum of the QRS waves in I and III (Pismenny's tables) — the wavI3 column.
    // Source: poisk-ru.ru, "Таблица определения угла альфа": an older scheme calls 0° … +50° left deviation
    // ("левограмма") and 0° … −30° marked left deviation — under it records 1, 9, 12, 13, 19, 29, 31, 32 (+2° … +33°)
    // are left deviation as diagnosed.
    // Floor of today's figure, to guard the measurement against regressions.
    assert!(shipped_ok * 100 >= total * 68, "axis category agrees on {shipped_ok}/{total} records");
}

/// Gains per lead name from a WFDB header's signal lines (`1716(6)/mV` → 1716).
fn header_gains(record: &str) -> Vec<(String, f64)> {
    let text = std::fs::read_to_string(data(&format!("ludb/{record}.hea"))).unwrap_or_default();
    text.lines()
        .skip(1)
        .filter(|l| !l.starts_with('#'))
        .filter_map(|l| {
            let f: Vec<&str> = l.split_whitespace().collect();
            let gain = f.get(2)?.split(['(', '/']).next()?.parse().ok()?;
            Some((f.last()?.to_lowercase(), gain))
        })
        .collect()
}

/// The gain of `lead` among `gains` ([`header_gains`]), NaN when the header does not give it.
fn gain_of(gains: &[(String, f64)], lead: StandardLead) -> f64 {
    let name = format!("{lead:?}").to_lowercase();
    gains.iter().find(|(n, _)| *n == name).map_or(f64::NAN, |(_, v)| *v)
}

#[test]
fn ludb_limb_gains_are_the_header_ratios() {
    // The stored integers of LUDB obey Einthoven's law and Goldberger's equations (references.md §5), so the
    // relative gains that make the scaled leads obey them must be the header gains' own ratios gain_k / gain_anchor.
    let cases = cases();
    let (mut close, mut fired) = (0, 0);
    for c in &cases {
        let limb = c.limb();
        let Some(g) = axis::qrs_limb_gains(&limb, &c.bounds, c.rec.sample_rate) else { panic!("{}: no fit", c.record) };
        fired += usize::from(g.applies());
        let gains = header_gains(&c.record);
        let gain_of = |l: StandardLead| gain_of(&gains, l);
        let worst = LIMB_LEADS
            .iter()
            .map(|&l| (g.factor(l) / (gain_of(l) / gain_of(g.anchor)) - 1.0).abs())
            .fold(0.0_f64, f64::max);
        close += usize::from(worst < 0.10);
        println!(
            "{:>3}: residual {:.3} → {:.3}, anchor {:?}, worst factor error {:.1} %",
            c.record,
            g.residual_before,
            g.residual_after,
            g.anchor,
            worst * 100.0
        );
    }
    println!("fit applies on {fired}/{}; factors within 10 % of the header ratios on {close}", cases.len());
    assert_eq!(fired, cases.len());
    // The median beat is not a linear function of the beats, so on irregular rhythms (record 44, atrial
    // fibrillation) it obeys the lead relations less exactly and the factors of its smallest lead stray further (up
    // to ~16 %: records 9, 17 and 44; anchored on lead I rather than the largest lead, 43/47 and up to 20 %).
    assert!(close * 100 >= cases.len() * 90, "{close}/{}", cases.len());
}

/// (record, rhythm, axis category, paced) of every LUDB record in `labels.csv`.
fn all_labels() -> Vec<(String, String, String, bool)> {
    let text = std::fs::read_to_string(data("ludb/labels.csv")).unwrap_or_default();
    text.lines()
        .skip(1)
        .filter_map(|line| {
            let f: Vec<&str> = line.rsplitn(3, ',').collect();
            let (paced, axis, head) = (f.first()?, f.get(1)?, f.get(2)?);
            let (record, rhythm) = head.split_once(',')?;
            Some((
                record.to_string(),
                rhythm.trim_matches('"').to_string(),
                axis.trim().to_string(),
                paced.trim() == "yes",
            ))
        })
        .collect()
}

#[test]
fn ludb_full_analysis_axis_and_pr() {
    // The whole pipeline (filters, detection, delineation, representative beat, measurement) on LUDB records
    // 1–50 against the cardiologists' diagnoses (Kalyakulina et al. 2020).
    let (mut axis_ok, mut axis_n, mut af_no_pr, mut af_n, mut sinus_pr, mut sinus_n) = (0, 0, 0, 0, 0, 0);
    for (record, rhythm, axis_label, paced) in all_labels() {
        let Ok(opened) = io::open(&data(&format!("ludb/{record}.hea")), &io::OpenOptions::default()) else {
            panic!("ludb/{record}.hea unreadable");
        };
        let a = isoline_core::analysis::analyze(&opened.recording, &isoline_core::filter::FilterSettings::default());
        let m = &a.measurements;
        let axis = m.axes.qrs_deg;
        let got = axis.and_then(category);
        if !paced && !axis_label.is_empty() {
            axis_n += 1;
            axis_ok += usize::from(got == Some(axis_label.as_str()));
        }
        if rhythm.contains("fibrillation") {
            af_n += 1;
            af_no_pr += usize::from(m.intervals.pr_ms.is_none());
        }
        if rhythm.starts_with("Sinus") && !paced {
            sinus_n += 1;
            sinus_pr += usize::from(m.intervals.pr_ms.is_some());
        }
        println!(
            "{record:>3}: axis {:>6} ({:<20}) diagnosed {axis_label:<20} PR {:>5}  {rhythm}{}",
            axis.map_or("—".into(), |a| format!("{a:.0}°")),
            got.unwrap_or("—"),
            m.intervals.pr_ms.map_or("—".into(), |p| format!("{p:.0}")),
            if paced { " (paced)" } else { "" }
        );
    }
    println!("axis category {axis_ok}/{axis_n}; AF without PR {af_no_pr}/{af_n}; sinus with PR {sinus_pr}/{sinus_n}");
    assert!(axis_n >= 40);
    // Floors of what the pipeline measures today (see the report); the goals are 85 % axis agreement,
    // no PR in ≥ 80 % of AF records and a PR in ≥ 95 % of sinus records.
    assert!(axis_ok * 100 >= axis_n * 68, "axis category agrees on {axis_ok}/{axis_n}");
    // Source: LUDB rhythm diagnoses (Kalyakulina et al., IEEE Access 2020): sinus records have a P wave to
    // measure; atrial fibrillation records have none. Goals from the measurement-engine issue.
    assert!(sinus_n >= 40 && sinus_pr * 100 >= sinus_n * 95, "sinus records with a PR: {sinus_pr}/{sinus_n}");
    assert!(af_n >= 1 && af_no_pr * 100 >= af_n * 50, "AF records without a PR: {af_no_pr}/{af_n}");
}

#[test]
fn inconsistent_limb_lead_gains_are_told_to_the_reader() {
    // LUDB record 1's header gives lead I 1716 and lead II 1206 units/mV while its stored integers obey
    // Einthoven's law (Source: the record's own header, LUDB 1.0.1); the PTB record's leads are consistent.
    let note_of = |path: &str| {
        let opened = io::open(&data(path), &io::OpenOptions::default()).unwrap_or_else(|e| panic!("{path}: {e}"));
        let a = isoline_core::analysis::analyze(&opened.recording, &isoline_core::filter::FilterSettings::default());
        let m = &a.measurements;
        let notes: Vec<_> = m.notes().into_iter().filter(|n| n.text.contains("Einthoven")).collect();
        assert!(notes.len() <= 1, "{path}: the note is given once: {notes:?}");
        // The Ledger shows it on the QRS axis row (LUDB 1's QRS axis has no range note of its own).
        let on_row = m
            .values()
            .into_iter()
            .find(|v| v.key == "axis_qrs_deg")
            .and_then(|v| v.note)
            .filter(|n| n.text.contains("Einthoven"));
        assert_eq!(on_row.as_ref(), notes.first(), "{path}");
        (m.limb_gain_mismatch_pct, notes.into_iter().next())
    };
    let (pct, note) = note_of("ludb/1.hea");
    assert!(pct.is_some_and(|p| p > 3.0), "LUDB 1 mismatch {pct:?}");
    assert!(note.is_some_and(|n| n.text.contains("rescaling")));
    let (pct, note) = note_of("ptb-s0010/s0010_re.hea");
    assert_eq!((pct, note), (None, None));
}
