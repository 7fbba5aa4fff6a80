//! Speed of the measurement engine (`cargo bench -p isoline-core --bench analysis`), plain timing with
//! std::time (no harness). Targets (design.md): full analysis of a 10-s 12-lead 500 Hz recording ≤ 20 ms on
//! one core; beat detection on a 24-h 3-lead 250 Hz recording ≤ 2 s.

use std::path::PathBuf;
use std::time::{Duration, Instant};

use isoline_core::recording::{Lead, LeadName, Recording};
use isoline_core::{delineate, detect, filter, io};

fn data(rel: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/data").join(rel)
}

/// CPU time of this thread (Linux `/proc/thread-self/schedstat`, ns on CPU), so the figures hold on a busy
/// machine too; `None` elsewhere.
fn cpu_time() -> Option<Duration> {
    let s = std::fs::read_to_string("/proc/thread-self/schedstat").ok()?;
    s.split_whitespace().next()?.parse::<u64>().ok().map(Duration::from_nanos)
}

fn cpu_ms(a: Option<Duration>, b: Option<Duration>, runs: usize) -> String {
    match (a, b) {
        (Some(a), Some(b)) => format!("{:.1} ms CPU per run", (b - a).as_secs_f64() * 1e3 / runs as f64),
        _ => "CPU time unavailable".to_string(),
    }
}

fn median(mut v: Vec<Duration>) -> Duration {
    v.sort();
    v[v.len() / 2]
}

fn open(rel: &str) -> Result<Recording, String> {
    io::open(&data(rel), &io::OpenOptions::default()).map(|o| o.recording).map_err(|e| e.to_string())
}

/// Filters, detection, delineation and the representative beat.
fn full_analysis(raw: &Recording) -> usize {
    let f = filter::apply(raw, &filter::FilterSettings::default());
    let mut beats = detect::detect_beats(&f.recording);
    delineate::delineate_beats(&f.recording, &mut beats);
    let rep = delineate::representative_beat(&f.recording, &beats);
    beats.len() + rep.map_or(0, |r| r.n_beats)
}

fn main() -> Result<(), String> {
    // 10-s 12-lead 500 Hz: LUDB record 1.
    let ludb = open("ludb/1.hea")?;
    let mut times = Vec::new();
    let mut sink = 0;
    let c0 = cpu_time();
    for _ in 0..30 {
        let t = Instant::now();
        sink += full_analysis(&ludb);
        times.push(t.elapsed());
    }
    let c1 = cpu_time();
    println!(
        "full analysis, 10-s 12-lead 500 Hz (LUDB 1): median {:.1} ms wall over {} runs, {} (target ≤ 20 ms)",
        median(times.clone()).as_secs_f64() * 1e3,
        times.len(),
        cpu_ms(c0, c1, times.len())
    );

    // 24-h 3-lead 250 Hz: QT Database sel100 (15 min, 2 leads) repeated 96 times, third lead = difference.
    let qt = open("qtdb/sel100.hea")?;
    let n = 24 * 3600 * 250;
    let tile = |l: &[f32]| -> Vec<f32> { l.iter().copied().cycle().take(n).collect() };
    let (a, b) = (tile(&qt.leads[0].samples), tile(&qt.leads[1].samples));
    let c: Vec<f32> = a.iter().zip(&b).map(|(x, y)| x - y).collect();
    let day = Recording {
        leads: vec![
            Lead { name: LeadName::parse("A"), samples: a },
            Lead { name: LeadName::parse("B"), samples: b },
            Lead { name: LeadName::parse("C"), samples: c },
        ],
        ..qt
    };
    // The detector prepares long leads on every core (rayon); measured as it runs, and held to one core.
    let one_core = rayon::ThreadPoolBuilder::new().num_threads(1).build().map_err(|e| e.to_string())?;
    for (label, pool) in [("all cores", None), ("one core", Some(&one_core))] {
        let mut times = Vec::new();
        let mut count = 0;
        for _ in 0..3 {
            let t = Instant::now();
            count = match pool {
                Some(p) => p.install(|| detect::detect_beats(&day).len()),
                None => detect::detect_beats(&day).len(),
            };
            times.push(t.elapsed());
        }
        println!(
            "beat detection, 24-h 3-lead 250 Hz, {label} ({}): median {:.2} s wall over 3 runs, {count} beats (target ≤ 2 s)",
            pool.map_or_else(rayon::current_num_threads, |p| p.current_num_threads()),
            median(times).as_secs_f64(),
        );
    }
    std::hint::black_box(sink);
    Ok(())
}
