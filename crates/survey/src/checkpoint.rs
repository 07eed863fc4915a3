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
    header: Header,
    /// Opened on the first finished tile, so a run that fails before any tile leaves nothing.
    file: Option<std::fs::File>,
    finished: BTreeMap<usize, Vec<Found>>,
    /// An existing checkpoint of another survey (other input, parameters or shard) was found
    /// and will be replaced.
    pub discarded_stale: bool,
}

fn io_err(path: &Path, e: impl std::fmt::Display) -> SurveyError {
    SurveyError::Io {
        path: path.display().to_string(),
        reason: e.to_string(),
    }
}

impl Checkpoint {
    /// Load the tiles an existing checkpoint of this same survey holds. A checkpoint of another
    /// survey at the same place is stale (its output path was reused) and is replaced.
    pub fn open(
        path: &Path,
        input: &InputFile,
        parameters: &SurveyParameters,
        shard: Option<Shard>,
    ) -> Result<Checkpoint, SurveyError> {
        let header = Header {
            checkpoint_version: CHECKPOINT_VERSION,
            input_sha256: input.sha256.clone(),
            parameters: parameters.clone(),
            shard,
        };
        let mut finished = BTreeMap::new();
        let mut discarded_stale = false;
        if path.exists() {
            let f = std::fs::File::open(path).map_err(|e| io_err(path, e))?;
            let mut lines = std::io::BufReader::new(f).lines();
            let first = lines
                .next()
                .transpose()
                .map_err(|e| io_err(path, e))?
                .unwrap_or_default();
            if serde_json::from_str::<Header>(&first).ok().as_ref() == Some(&header) {
                for line in lines {
                    let Ok(line) = line else { break };
                    // A torn last line (the run was killed mid-write) is simply not a finished tile.
                    if let Ok(t) = serde_json::from_str::<TileLine>(&line) {
                        finished.insert(t.tile, t.found);
                    }
                }
            } else {
                discarded_stale = true;
            }
        }
        Ok(Checkpoint {
            path: path.to_path_buf(),
            header,
            file: None,
            finished,
            discarded_stale,
        })
    }

    pub fn finished(&self) -> &BTreeMap<usize, Vec<Found>> {
        &self.finished
    }

    /// Append a finished tile and push it to disk. The first call rewrites the file as header
    /// plus the tiles already known, so a torn line never sits before new ones.
    pub fn record(&mut self, tile: usize, found: &[Found]) -> Result<(), SurveyError> {
        let path = self.path.clone();
        if self.file.is_none() {
            let mut text =
                serde_json::to_string(&self.header).map_err(|e| io_err(&path, e))? + "\n";
            for (t, f) in &self.finished {
                text += &(serde_json::to_string(&TileLine {
                    tile: *t,
                    found: f.clone(),
                })
                .map_err(|e| io_err(&path, e))?
                    + "\n");
            }
            terrain::atomic::write_bytes(&path, text.as_bytes()).map_err(|e| io_err(&path, e))?;
            self.file = Some(
                std::fs::OpenOptions::new()
                    .append(true)
                    .open(&path)
                    .map_err(|e| io_err(&path, e))?,
            );
        }
        let line = serde_json::to_string(&TileLine {
            tile,
            found: found.to_vec(),
        })
        .map_err(|e| io_err(&path, e))?
            + "\n";
        let file = self
            .file
            .as_mut()
            .ok_or_else(|| io_err(&path, "checkpoint not open"))?;
        file.write_all(line.as_bytes())
            .map_err(|e| io_err(&path, e))?;
        file.sync_data().map_err(|e| io_err(&path, e))
    }
}

/// Where a survey written to `out` keeps its checkpoint.
pub fn path_beside(out: &Path) -> PathBuf {
    let mut name = out
        .file_name()
        .map(|n| n.to_os_string())
        .unwrap_or_default();
    name.push(".checkpoint");
    out.with_file_name(name)
}
