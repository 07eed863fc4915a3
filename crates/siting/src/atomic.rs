//! Siting's files go through the workspace's one atomic-write helper ([`terrain::atomic`]:
//! a temporary file beside the target, flushed, then renamed over it); here its I/O errors
//! become [`SitingError::Write`] naming the target.

use std::path::Path;

use crate::SitingError;

fn write_error(path: &Path) -> impl FnOnce(std::io::Error) -> SitingError + '_ {
    move |source| SitingError::Write {
        path: path.to_path_buf(),
        source,
    }
}

/// Write `bytes` to `path` atomically.
pub fn write_bytes(path: &Path, bytes: &[u8]) -> Result<(), SitingError> {
    terrain::atomic::write_bytes(path, bytes).map_err(write_error(path))
}

/// Let `fill` create and write the file at a temporary path (e.g. through GDAL), then move
/// it over `path`. `fill` must have closed the file when it returns.
pub fn write_by_path<F>(path: &Path, fill: F) -> Result<(), SitingError>
where
    F: FnOnce(&Path) -> std::io::Result<()>,
{
    terrain::atomic::write_by_path(path, fill).map_err(write_error(path))
}
