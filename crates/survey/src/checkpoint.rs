//! A survey's checkpoint: one JSON line of header (input checksum, parameters, shard), then one
//! line per finished tile with its measured craters. Appending a line is the only write, so a
//! run killed at any moment leaves at worst a torn last line, which is ignored on resume.

use crate::model::{InputFile, Shard, SurveyParameters};
use crate::run::Found;
use crate::SurveyError;
use serde::{Deserialize, Serialize};
use std::collections::BTreeMap;
use std::io::{BufRead, Write};
use std::path::{Path, PathBuf};

const CHECKPOINT_VERSION: u32 = 1;

#[derive(Serialize, Deserialize, PartialEq)]
struct Header {
    checkpoint_version: u32,
    input_sha256: String,
    parameters: SurveyParameters,
    shard: Option<Shard>,
}

#[derive(Serialize, Deserialize)]
struct TileLine {
    tile: usize,
    found: Vec<Found>,
}

pub struct Checkpoint {
    path: PathBuf,
    file: std::fs::File,
    finished: BTreeMap<usize, Vec<Found>>,
}

fn io_err(path: &Path, e: impl std::fmt::Display) -> SurveyError {
    SurveyError::Io { path: path.display().to_string(), reason: e.to_string() }
}

impl Checkpoint {
    /// Open the checkpoint for this survey, loading the tiles it already holds, or start one.
    pub fn open(path: &Path, input: &InputFile, parameters: &SurveyParameters, shard: Option<Shard>) -> Result<Checkpoint, SurveyError> {
        let header = Header { checkpoint_version: CHECKPOINT_VERSION, input_sha256: input.sha256.clone(), parameters: parameters.clone(), shard };
        let mut finished = BTreeMap::new();
        if path.exists() {
            let f = std::fs::File::open(path).map_err(|e| io_err(path, e))?;
            let mut lines = std::io::BufReader::new(f).lines();
            let first = lines.next().transpose().map_err(|e| io_err(path, e))?.unwrap_or_default();
            let theirs: Option<Header> = serde_json::from_str(&first).ok();
            if theirs.as_ref() != Some(&header) {
                return Err(SurveyError::Parameters(format!(
                    "the checkpoint {} belongs to another survey (different input, parameters or shard); delete it to start afresh",
                    path.display()
                )));
            }
            for line in lines {
                let Ok(line) = line else { break };
                // A torn last line (the run was killed mid-write) is simply not a finished tile.
                if let Ok(t) = serde_json::from_str::<TileLine>(&line) {
                    finished.insert(t.tile, t.found);
                }
            }
        }
        // Rewrite header plus the good lines, so a torn line never sits before new ones.
        let mut text = serde_json::to_string(&header).map_err(|e| io_err(path, e))? + "\n";
        for (tile, found) in &finished {
            text += &(serde_json::to_string(&TileLine { tile: *tile, found: found.clone() }).map_err(|e| io_err(path, e))? + "\n");
        }
        crate::io::write_atomic(path, text.as_bytes()).map_err(|e| io_err(path, e))?;
        let file = std::fs::OpenOptions::new().append(true).open(path).map_err(|e| io_err(path, e))?;
        Ok(Checkpoint { path: path.to_path_buf(), file, finished })
    }

    pub fn finished(&self) -> &BTreeMap<usize, Vec<Found>> {
        &self.finished
    }

    /// Append a finished tile and push it to disk.
    pub fn record(&mut self, tile: usize, found: &[Found]) -> Result<(), SurveyError> {
        let line = serde_json::to_string(&TileLine { tile, found: found.to_vec() }).map_err(|e| io_err(&self.path, e))? + "\n";
        self.file.write_all(line.as_bytes()).map_err(|e| io_err(&self.path, e))?;
        self.file.sync_data().map_err(|e| io_err(&self.path, e))
    }
}

/// Where a survey written to `out` keeps its checkpoint.
pub fn path_beside(out: &Path) -> PathBuf {
    let mut name = out.file_name().map(|n| n.to_os_string()).unwrap_or_default();
    name.push(".checkpoint");
    out.with_file_name(name)
}
