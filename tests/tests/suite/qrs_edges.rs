//! Diagnostic: QRS onset and J point of the delineator against the generator's true boundaries, per demo
//! scenario, clean and with the `noisy` scenario's noise over several seeds (samples; measured − truth).

use isoline_core::analysis::analyze;
use isoline_core::filter::FilterSettings;
use isoline_core::synth::{self, Scenario, SynthSpec, TrueKind};

fn row(spec: &SynthSpec) -> String {
    let s = synth::generate(spec).unwrap_or_else(|e| panic!("{}: {e}", spec.scenario));
    let a = analyze(&s.recording, &FilterSettings::default());
    let sinus: Vec<_> = s.truth.beats.iter().filter(|b| b.kind == TrueKind::Sinus).collect();
    let med = |mut v: Vec<i64>| -> f64 {
        if v.is_empty() {
            return f64::NAN;
        }
        v.sort_unstable();
        v[v.len() / 2] as f64
    };
    let t_on = med(sinus.iter().filter_map(|b| b.qrs_on.map(|q| q as i64 - b.r_sample as i64)).collect());
    let t_end = med(sinus.iter().filter_map(|b| b.qrs_end.map(|q| q as i64 - b.r_sample as i64)).collect());
    let (mut on_err, mut end_err) = (Vec::new(), Vec::new());
    for b in &sinus {
        if let Some(d) = a.beats.iter().find(|d| d.r.abs_diff(b.r_sample) <= 10) {
            if let (Some(x), Some(y)) = (d.bounds.qrs_on, b.qrs_on) {
                on_err.push(x as f64 - y as f64);
            }
            if let (Some(x), Some(y)) = (d.bounds.qrs_end, b.qrs_end) {
                end_err.push(x as f64 - y as f64);
            }
        }
    }
    let mean = |v: &[f64]| v.iter().sum::<f64>() / v.len().max(1) as f64;
    let rep = a.representative.as_ref();
    let r_on = rep.and_then(|r| r.bounds.qrs_on.map(|q| q as f64 - r.r_index as f64 - t_on));
    let r_end = rep.and_then(|r| r.bounds.qrs_end.map(|q| q as f64 - r.r_index as f64 - t_end));
    let f = |v: Option<f64>| v.map_or("   —".into(), |x| format!("{x:+4.0}"));
    format!(
        "{:<26} QRS {:>6} / {:>6.1} ms  rep on {} end {}  beats on {:+5.2} end {:+5.2} (n {})",
        spec.scenario,
        a.measurements.intervals.qrs_ms.map_or("—".into(), |x| format!("{x:.1}")),
        s.truth.qrs_ms.unwrap_or(f64::NAN),
        f(r_on),
        f(r_end),
        mean(&on_err),
        mean(&end_err),
        on_err.len()
    )
}

#[test]
#[ignore = "diagnostic print"]
fn qrs_edges_against_synthetic_truth() {
    let noise = Scenario::Noisy.spec().noise;
    for sc in Scenario::ALL.into_iter().filter(|s| *s != Scenario::Holter) {
        let spec = sc.spec();
        println!("{}", row(&spec));
        for seed in 1..=6 {
            let noisy = SynthSpec { noise, seed, scenario: format!("{}+noise#{seed}", spec.scenario), ..spec.clone() };
            println!("{}", row(&noisy));
        }
    }
}

#[test]
#[ignore = "diagnostic print"]
fn qrs_edge_slopes_per_lead() {
    use isoline_core::delineate::Signals;
    let name = std::env::var("SCEN").unwrap_or_else(|_| "normal".into());
    let spec = Scenario::from_name(&name).expect("scenario").spec();
    let s = synth::generate(&spec).expect("synth");
    let a = analyze(&s.recording, &FilterSettings::default());
    let rec = &a.filtered.recording;
    let leads: Vec<&[f32]> = rec.leads.iter().map(|l| l.samples.as_slice()).collect();
    let sig = Signals::new(&leads, spec.rate_hz);
    let b = s.truth.beats[4];
    let (on, end) = (b.qrs_on.expect("on"), b.qrs_end.expect("end"));
    println!("beat r {} true on {} end {}  raw signal (µV) and 40 Hz |slope| / lead peak (%)", b.r_sample, on, end);
    for (li, q) in sig.qrs.iter().enumerate() {
        let raw = &leads[li];
        let sl = |k: usize| ((q[k + 1] - q[k - 1]) * 0.5).abs();
        let peak = (b.r_sample - 30..b.r_sample + 30).map(sl).fold(0.0f32, f32::max);
        let line = |c: usize| -> String {
            (c - 8..=c + 8).map(|k| format!("{:5.1}{}", 100.0 * sl(k) / peak, if k == c { "|" } else { " " })).collect()
        };
        let rawl = |c: usize| -> String { (c - 3..=c + 3).map(|k| format!("{:7.1}", raw[k])).collect() };
        println!("{:>4} on : {}  raw {}", rec.leads[li].name, line(on), rawl(on));
        println!("{:>4} end: {}  raw {}", "", line(end), rawl(end));
    }
}
