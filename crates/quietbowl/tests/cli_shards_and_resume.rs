//! Survey shards run as separate processes and merged, and a killed survey resumed from its
//! checkpoint, each against an uninterrupted single-process run on the demo terrain.
use std::path::{Path, PathBuf};
use std::process::Command;

fn qb() -> Command {
    Command::new(env!("CARGO_BIN_EXE_quietbowl"))
}

fn demo() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../../demo-terrain/farside-patch.tif")
}

/// Craters of 1.2-4 km over 500 px tiles: 16 tiles, quick in a debug build.
fn survey_args(out: &Path) -> Vec<String> {
    vec![
        "survey".into(),
        demo().display().to_string(),
        "--diameter".into(),
        "1200..4000".into(),
        "--tile".into(),
        "500".into(),
        "--out".into(),
        out.display().to_string(),
    ]
}

fn single_run(dir: &Path) -> Vec<u8> {
    let out = dir.join("single.json");
    let st = qb().args(survey_args(&out)).status().unwrap();
    assert!(st.success());
    std::fs::read(out).unwrap()
}

#[test]
fn shards_in_separate_processes_merge_to_the_single_run() {
    let dir = tempfile::tempdir().unwrap();
    let whole = single_run(dir.path());
    let n = 3;
    let children: Vec<_> = (1..=n)
        .map(|k| {
            let out = dir.path().join(format!("part{k}.json"));
            let mut args = survey_args(&out);
            args.extend(["--shard".into(), format!("{k}/{n}")]);
            (out, qb().args(args).spawn().unwrap())
        })
        .collect();
    let mut parts = Vec::new();
    for (out, mut child) in children {
        assert!(child.wait().unwrap().success());
        parts.push(out);
    }
    let merged = dir.path().join("merged.json");
    let st = qb()
        .arg("merge")
        .args(parts.iter().rev())
        .arg("--out")
        .arg(&merged)
        .status()
        .unwrap();
    assert!(st.success());
    assert!(
        std::fs::read(&merged).unwrap() == whole,
        "merged shards differ from the single run"
    );
    // A missing shard is refused with its number.
    let out = qb()
        .arg("merge")
        .args(&parts[..2])
        .arg("--out")
        .arg(dir.path().join("bad.json"))
        .output()
        .unwrap();
    assert!(!out.status.success());
    assert!(String::from_utf8_lossy(&out.stderr).contains("shard 3/3 is missing"));
    assert!(!dir.path().join("bad.json").exists());
}

#[test]
fn killed_survey_resumes_from_its_checkpoint_and_matches_an_uninterrupted_run() {
    let dir = tempfile::tempdir().unwrap();
    let whole = single_run(dir.path());
    let out = dir.path().join("resumed.json");
    let checkpoint = dir.path().join("resumed.json.checkpoint");
    let mut child = qb().args(survey_args(&out)).spawn().unwrap();
    // Kill it once at least one tile is on disk (header line + one tile line).
    let t0 = std::time::Instant::now();
    while t0.elapsed().as_secs() < 120 {
        let lines = std::fs::read_to_string(&checkpoint)
            .map(|t| t.lines().count())
            .unwrap_or(0);
        if lines >= 2 || child.try_wait().unwrap().is_some() {
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(20));
    }
    let _ = child.kill();
    let _ = child.wait();
    let interrupted = !out.exists();
    if interrupted {
        assert!(checkpoint.exists());
    }
    let res = qb().args(survey_args(&out)).output().unwrap();
    assert!(
        res.status.success(),
        "{}",
        String::from_utf8_lossy(&res.stderr)
    );
    if interrupted {
        assert!(
            String::from_utf8_lossy(&res.stdout).contains("taken from the checkpoint"),
            "{}",
            String::from_utf8_lossy(&res.stdout)
        );
    }
    assert!(
        std::fs::read(&out).unwrap() == whole,
        "resumed survey differs from the uninterrupted run"
    );
    assert!(
        !checkpoint.exists(),
        "the checkpoint is removed once the survey is written"
    );
}
