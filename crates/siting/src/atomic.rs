//! Atomic file replacement: write a temporary file in the target's directory, flush it to
//! disk, then rename it over the target. A reader sees the old file or the new one, never a
//! half-written one; on any error the temporary file is removed and the old file stays.

use std::fs::File;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicU64, Ordering};

use crate::SitingError;

static COUNTER: AtomicU64 = AtomicU64::new(0);

/// A temporary path beside `target` that keeps its extension (GDAL picks drivers by it).
fn temp_path(target: &Path) -> PathBuf {
    let name = target
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_else(|| "out".into());
    let n = COUNTER.fetch_add(1, Ordering::Relaxed);
    let ext = target
        .extension()
        .map(|e| format!(".{}", e.to_string_lossy()))
        .unwrap_or_default();
    target.with_file_name(format!(".{name}.partial-{}-{n}{ext}", std::process::id()))
}

/// Write `bytes` to `path` atomically.
pub fn write_bytes(path: &Path, bytes: &[u8]) -> Result<(), SitingError> {
    write_with(path, |tmp| {
        let mut f = File::create(tmp)?;
        f.write_all(bytes)?;
        f.sync_all()
    })
}

/// Let `fill` create and write the file at a temporary path (e.g. through GDAL), then move
/// it over `path`. `fill` must have closed the file when it returns.
pub fn write_with<F>(path: &Path, fill: F) -> Result<(), SitingError>
where
    F: FnOnce(&Path) -> std::io::Result<()>,
{
    let tmp = temp_path(path);
    let io = |source| SitingError::Write {
        path: path.to_path_buf(),
        source,
    };
    let result = fill(&tmp)
        .and_then(|()| File::open(&tmp)?.sync_all())
        .and_then(|()| std::fs::rename(&tmp, path));
    if let Err(e) = result {
        // The temporary file may not exist (creation failed); nothing else to clean.
        let _ = std::fs::remove_file(&tmp);
        return Err(io(e));
    }
    // Make the rename itself durable; not every platform lets a directory be opened.
    if let Some(dir) = path.parent().filter(|d| !d.as_os_str().is_empty()) {
        if let Ok(d) = File::open(dir) {
            let _ = d.sync_all();
        }
    }
    Ok(())
}
