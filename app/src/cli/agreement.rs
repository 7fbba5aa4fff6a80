//! `isoline agreement REVIEW_A REVIEW_B [...] [--format table|json]`: per measurement, each reader's value on
//! each recording, the differences, and over several recordings the Bland–Altman bias and 95 % limits of
//! agreement (Bland & Altman, Lancet 1986;1(8476):307-10).

use std::fmt::Write as _;
use std::path::PathBuf;
use std::process::ExitCode;

use anyhow::bail;
use isoline_core::CAUTION;
use isoline_core::review::agreement::{Agreement, agreement};
use isoline_core::review::{Review, load};

/// Output format of `agreement`.
#[derive(Debug, Clone, Copy, Default, clap::ValueEnum)]
pub enum AgreementFormat {
    /// Tables for people.
    #[default]
    Table,
    /// One JSON object.
    Json,
}

/// Arguments of `isoline agreement`.
#[derive(Debug, clap::Args)]
pub struct Args {
    /// Review files (.review.ron) by two or more readers, of one or more recordings.
    #[arg(required = true, num_args = 2..)]
    pub files: Vec<PathBuf>,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub format: AgreementFormat,
}

/// Runs the command. Review files are only read.
pub fn run(args: &Args) -> anyhow::Result<ExitCode> {
    let mut reviews: Vec<Review> = Vec::with_capacity(args.files.len());
    for f in &args.files {
        // The error names the file (and line, column, field for a malformed review).
        let r = load(f)?;
        // Compared as it stands, with what its parts contradict said (a file edited by hand).
        for what in r.inconsistencies() {
            to_stderr!("isoline: warning: {}: {what}", f.display());
        }
        reviews.push(r);
    }
    let a = match agreement(&reviews) {
        Ok(a) => a,
        Err(d) => bail!(
            "{} and {} are both reviews by reader {:?} of the same recording",
            args.files[d.first].display(),
            args.files[d.second].display(),
            d.reader
        ),
    };
    if a.readers.len() < 2 {
        bail!("all reviews are by reader {:?}: agreement needs two or more readers", a.readers.join(", "));
    }
    // Before, reviews of different recordings gave tables of dashes and exit 0.
    if a.compared_recordings() == 0 {
        bail!(
            "no recording was read by two of the readers ({} recordings, matched by their signal, not their file \
             name): agreement compares readers on the same recordings",
            a.recordings.len()
        );
    }
    // A draft's values may be automatic ones its reader has not yet checked: its "agreement" may be the engine's
    // with itself, so the drafts are named.
    let drafts: Vec<String> = args
        .files
        .iter()
        .zip(&reviews)
        .filter(|(_, r)| r.stage == isoline_core::review::Stage::Draft)
        .map(|(f, _)| f.display().to_string())
        .collect();
    match args.format {
        AgreementFormat::Json => {
            let files: Vec<String> = args.files.iter().map(|f| f.display().to_string()).collect();
            let v = serde_json::json!({ "files": files, "drafts": drafts, "agreement": a, "caution": CAUTION });
            super::to_stdout(&(serde_json::to_string_pretty(&v)? + "\n"))?;
        }
        AgreementFormat::Table => {
            let mut text = table(&a);
            if !drafts.is_empty() {
                // Before the caution, which ends the table.
                let note = format!(
                    "Still drafts (values their readers may not yet have checked, automatic ones included): {}\n\n",
                    drafts.join(", ")
                );
                text.insert_str(text.rfind(CAUTION).unwrap_or(text.len()), &note);
            }
            super::to_stdout(&text)?;
        }
    }
    Ok(ExitCode::SUCCESS)
}

fn num(v: Option<f64>) -> String {
    v.map_or_else(|| "—".to_owned(), |x| format!("{x:.1}"))
}

/// The comparison as plain-text tables, one per measurement.
#[must_use]
pub fn table(a: &Agreement) -> String {
    let mut out = String::new();
    let _ =
        writeln!(out, "Agreement between readers {} over {} recording(s)", a.readers.join(", "), a.recordings.len());
    let rec_name = |i: usize| {
        let r = &a.recordings[i];
        format!("{} ({})", r.file_name, &r.sha256[..r.sha256.len().min(8)])
    };
    let name_w = (0..a.recordings.len()).map(|i| rec_name(i).chars().count()).max().unwrap_or(9).max(9);
    for k in &a.keys {
        let label = if k.label.is_empty() { k.key.clone() } else { k.label.clone() };
        let _ = writeln!(out, "\n{label} ({}, {})", k.key, if k.unit.is_empty() { "no unit" } else { &k.unit });
        let reader_w: Vec<usize> = a.readers.iter().map(|r| r.chars().count().max(8)).collect();
        let pair_names: Vec<String> = k.pairs.iter().map(|p| format!("{}−{}", p.reader_a, p.reader_b)).collect();
        let pair_w: Vec<usize> = pair_names.iter().map(|n| n.chars().count().max(8)).collect();
        let mut head = format!("  {:<name_w$}", "recording");
        for (r, w) in a.readers.iter().zip(&reader_w) {
            let _ = write!(head, "  {r:>w$}");
        }
        for (n, w) in pair_names.iter().zip(&pair_w) {
            let _ = write!(head, "  {n:>w$}");
        }
        let _ = writeln!(out, "{head}");
        for rv in &k.recordings {
            let mut line = format!("  {:<name_w$}", rec_name(rv.recording));
            for (v, w) in rv.values.iter().zip(&reader_w) {
                let _ = write!(line, "  {:>w$}", num(*v));
            }
            for (p, w) in k.pairs.iter().zip(&pair_w) {
                let d = p.differences.iter().find(|d| d.recording == rv.recording).map(|d| d.difference);
                let _ = write!(line, "  {:>w$}", num(d));
            }
            let _ = writeln!(out, "{line}");
        }
        for p in &k.pairs {
            match p.bland_altman {
                Some(ba) => {
                    let _ = writeln!(
                        out,
                        "  Bland–Altman {}−{} (n = {}): bias {:.2}, SD {:.2}, 95 % limits of agreement {:.2} to {:.2}",
                        p.reader_a, p.reader_b, ba.n, ba.bias, ba.sd, ba.lower, ba.upper
                    );
                }
                None => {
                    let _ = writeln!(
                        out,
                        "  Bland–Altman {}−{}: needs two or more recordings with both values ({} here)",
                        p.reader_a,
                        p.reader_b,
                        p.differences.len()
                    );
                }
            }
        }
    }
    let _ =
        writeln!(out, "\nBland–Altman: bias = mean difference, limits = bias ± 1.96·SD (Bland & Altman, Lancet 1986).");
    let _ = writeln!(out, "{CAUTION}");
    out
}
