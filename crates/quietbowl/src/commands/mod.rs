pub mod describe;
pub mod rank;
pub mod site;
pub mod survey;

use anyhow::Context;
use std::path::Path;

pub fn make_demo(out: &Path) -> anyhow::Result<()> {
    std::fs::create_dir_all(out).with_context(|| format!("cannot create {}", out.display()))?;
    let files = synthetic::make_demo_terrain(out)
        .with_context(|| format!("writing the demo terrain into {}", out.display()))?;
    println!("wrote {:?}", files);
    Ok(())
}

pub fn merge(parts: &[std::path::PathBuf], out: &Path) -> anyhow::Result<()> {
    ensure_writable(out).context("writing the merged survey")?;
    let files = parts
        .iter()
        .map(|p| ::survey::SurveyFile::read(p).with_context(|| format!("reading {}", p.display())))
        .collect::<anyhow::Result<Vec<_>>>()?;
    let merged = ::survey::merge(files).context("merging the shard surveys")?;
    merged
        .write(out)
        .with_context(|| format!("writing {}", out.display()))?;
    println!(
        "{} candidates from {} shards written to {}",
        merged.candidates.len(),
        parts.len(),
        out.display()
    );
    Ok(())
}

/// The bundled demo: its stored survey when present (opens at once), else the terrain.
fn demo_file() -> std::path::PathBuf {
    let survey = Path::new("demo-terrain/farside-patch.survey.json");
    if survey.exists() {
        survey.to_path_buf()
    } else {
        Path::new("demo-terrain/farside-patch.tif").to_path_buf()
    }
}

pub fn workbench(
    file: Option<std::path::PathBuf>,
    select_rank: Option<u32>,
    screenshot: Option<std::path::PathBuf>,
) -> anyhow::Result<()> {
    let open = file.unwrap_or_else(demo_file);
    if !open.exists() {
        anyhow::bail!(
            "{} does not exist (run from the repository root for the demo, or name a file)",
            open.display()
        );
    }
    workbench::run(workbench::WorkbenchOptions {
        open: Some(open),
        select_rank: select_rank.or(Some(1)),
        screenshot_to: screenshot,
        ..Default::default()
    })
    .context("running the workbench (it needs a display; under no display use `quietbowl survey` and `rank`)")
}

/// Fail before long work if `out` cannot be written: create and remove a probe file beside it.
pub fn ensure_writable(out: &Path) -> anyhow::Result<()> {
    let dir = match out.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => std::path::PathBuf::from("."),
    };
    let probe = dir.join(format!(".quietbowl-probe-{}.tmp", std::process::id()));
    std::fs::write(&probe, b"")
        .and_then(|_| std::fs::remove_file(&probe))
        .with_context(|| {
            format!(
                "cannot write {}: its folder {} is not writable or does not exist",
                out.display(),
                dir.display()
            )
        })
}

/// A progress bar on stderr, hidden when stderr is not a terminal.
pub fn bar(len: u64, what: &str) -> indicatif::ProgressBar {
    let pb = indicatif::ProgressBar::new(len);
    pb.set_style(
        indicatif::ProgressStyle::with_template(
            "{spinner} {msg} [{bar:30}] {pos}/{len} ({elapsed}, eta {eta})",
        )
        .unwrap_or_else(|_| indicatif::ProgressStyle::default_bar())
        .progress_chars("=> "),
    );
    pb.set_message(what.to_string());
    pb
}
