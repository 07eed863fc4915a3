pub mod describe;
pub mod site;
pub mod survey;

use anyhow::Context;
use std::path::Path;

/// The caution printed wherever results are presented.
pub const CAUTION: &str = "Screening estimates from orbital data; real site decisions rest on mission-grade analysis and the responsible engineering authority's review.";

pub fn make_demo(out: &Path) -> anyhow::Result<()> {
    std::fs::create_dir_all(out).with_context(|| format!("cannot create {}", out.display()))?;
    let files = synthetic::make_demo_terrain(out).with_context(|| format!("writing the demo terrain into {}", out.display()))?;
    println!("wrote {:?}", files);
    Ok(())
}

pub fn merge(parts: &[std::path::PathBuf], out: &Path) -> anyhow::Result<()> {
    let files = parts
        .iter()
        .map(|p| ::survey::SurveyFile::read(p).with_context(|| format!("reading {}", p.display())))
        .collect::<anyhow::Result<Vec<_>>>()?;
    let merged = ::survey::merge(files).context("merging the shard surveys")?;
    merged.write(out).with_context(|| format!("writing {}", out.display()))?;
    println!("{} candidates from {} shards written to {}", merged.candidates.len(), parts.len(), out.display());
    Ok(())
}

/// A progress bar on stderr, hidden when stderr is not a terminal.
pub fn bar(len: u64, what: &str) -> indicatif::ProgressBar {
    let pb = indicatif::ProgressBar::new(len);
    pb.set_style(
        indicatif::ProgressStyle::with_template("{spinner} {msg} [{bar:30}] {pos}/{len} ({elapsed}, eta {eta})")
            .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar())
            .progress_chars("=> "),
    );
    pb.set_message(what.to_string());
    pb
}
