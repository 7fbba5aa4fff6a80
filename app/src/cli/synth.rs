//! `isoline synth --scenario NAME --out FILE [--seconds N] [--leads N] [--rate HZ] [--seed N] [--truth JSON]`:
//! writes a demo recording from the dynamical ECG model (McSharry et al. 2003) and, if asked, its truth.

use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::{Context, bail};
use isoline_core::io;
use isoline_core::synth::{self, LeadSet, Scenario};

/// Arguments of `isoline synth`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Scenario: normal, long-qt, wide-qrs, first-degree-block, irregular, ectopics, noisy, holter.
    #[arg(long)]
    pub scenario: String,
    /// Output recording: .edf or .csv (format from the extension).
    #[arg(long, short)]
    pub out: PathBuf,
    /// Length in seconds (default: 10, or 24 h for holter).
    #[arg(long)]
    pub seconds: Option<f64>,
    /// Number of leads: 12 (standard), 3 (I, II, V5), 2 (I, II) or 1 (II).
    #[arg(long)]
    pub leads: Option<usize>,
    /// Sampling rate, Hz (default: 500, or 250 for holter).
    #[arg(long)]
    pub rate: Option<f64>,
    /// Seed of every random choice (default 1).
    #[arg(long)]
    pub seed: Option<u64>,
    /// Mains frequency of the hum in noisy scenarios, Hz (50 or 60).
    #[arg(long)]
    pub mains: Option<f64>,
    /// Patient code written into the file (a made-up code for demos; the file is de-identified without it).
    #[arg(long)]
    pub patient: Option<String>,
    /// Write the truth (every beat's boundaries, mean intervals, parameters) as JSON to this file.
    #[arg(long)]
    pub truth: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let Some(scenario) = Scenario::from_name(&args.scenario) else {
        let names: Vec<&str> = Scenario::ALL.iter().map(|s| s.name()).collect();
        bail!("unknown scenario {:?} (expected one of: {})", args.scenario, names.join(", "));
    };
    let ext = args.out.extension().and_then(|e| e.to_str()).map(str::to_ascii_lowercase);
    if !matches!(ext.as_deref(), Some("edf") | Some("csv")) {
        bail!("{}: unknown output type (expected .edf or .csv)", args.out.display());
    }
    let mut spec = scenario.spec();
    if let Some(s) = args.seconds {
        spec.seconds = s;
    }
    if let Some(n) = args.leads {
        spec.leads = LeadSet::from_count(n).with_context(|| format!("--leads {n}: expected 12, 3, 2 or 1"))?;
    }
    if let Some(r) = args.rate {
        spec.rate_hz = r;
    }
    if let Some(s) = args.seed {
        spec.seed = s;
    }
    if let Some(m) = args.mains {
        if m != 50.0 && m != 60.0 {
            bail!("--mains {m}: expected 50 or 60");
        }
        spec.noise.mains_hz = m;
    }
    // The truth and the recording are two files: one written over the other would leave a recording that is not.
    if let Some(t) = &args.truth
        && super::same_file(t, &args.out)
    {
        bail!("{}: --truth and --out name the same file", t.display());
    }
    let demo = synth::generate(&spec).with_context(|| format!("scenario {}", scenario.name()))?;
    let mut rec = demo.recording;
    if let Some(p) = &args.patient {
        rec.meta.patient_id = Some(p.clone());
    }
    match ext.as_deref() {
        Some("csv") => io::csv::write(&args.out, &rec)?,
        // The file names a patient only when a (made-up) code was given on purpose.
        _ => io::edf::write(&args.out, &rec, &io::edf::EdfWriteOptions { identify: args.patient.is_some() })?,
    }
    if let Some(t) = &args.truth {
        let json = demo.truth.to_json().context("serialising the truth")?;
        isoline_core::io::atomic::write_bytes(t, (json + "\n").as_bytes())
            .with_context(|| format!("{}: cannot write the truth", t.display()))?;
    }
    to_stderr!(
        "isoline: wrote {} ({} lead{}, {} Hz, {:.0} s, {} beats) — synthetic demo data. {}",
        args.out.display(),
        rec.leads.len(),
        if rec.leads.len() == 1 { "" } else { "s" },
        rec.sample_rate.hz(),
        rec.duration_s(),
        demo.truth.beats.len(),
        isoline_core::CAUTION
    );
    Ok(ExitCode::SUCCESS)
}
