//! Atomic file replacement, the one helper every quietbowl crate writes files through: the
//! content goes to a temporary file in the target's folder, is flushed to disk, and is then
//! renamed over the target. A reader sees the old file or the whole new one; on any error the
//! temporary file is removed and the old file stays. The temporary files are `tempfile`'s
//! (unique names, removed when dropped); a rename is atomic only within one file system,
//! hence the target's own folder.

use std::fs::File;
use std::io::{self, BufWriter, Write};
use std::path::{Path, PathBuf};

use tempfile::{NamedTempFile, TempDir, TempPath};

/// Write `bytes` to `path` atomically.
pub fn write_bytes(path: &Path, bytes: &[u8]) -> io::Result<()> {
    stage_bytes(path, bytes)?.commit()
}

/// [`write_bytes`] with the content written by `fill` through a buffered writer, so a large
/// file need not be held in memory whole.
pub fn write_with(
    path: &Path,
    fill: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> io::Result<()> {
    stage_with(path, fill)?.commit()
}

/// Let `fill` create and write the file at a temporary path (for libraries that take a path,
/// such as GDAL), then move it over `path`. `fill` must have closed the file when it returns.
pub fn write_by_path(path: &Path, fill: impl FnOnce(&Path) -> io::Result<()>) -> io::Result<()> {
    stage_by_path(path, fill)?.commit()
}

/// A new file written in full beside its target, not yet in place: [`Staged::commit`] moves
/// it there; dropping it removes it. Staging several files before committing any keeps a
/// set of files from being half replaced when one of them fails to write.
#[derive(Debug)]
pub struct Staged {
    held: Held,
    target: PathBuf,
}

#[derive(Debug)]
enum Held {
    File(TempPath),
    /// A temporary folder holding the file under the target's own name: GDAL's GeoPackage
    /// driver refuses a path that already exists, and some drivers pick the format by
    /// extension, so neither an existing temporary file nor a random name will do.
    InFolder(TempDir, PathBuf),
}

/// The target's folder (`.` for a bare file name) and file name.
fn split(target: &Path) -> io::Result<(&Path, &std::ffi::OsStr)> {
    let name = target.file_name().ok_or_else(|| {
        io::Error::new(
            io::ErrorKind::InvalidInput,
            format!("{} names no file", target.display()),
        )
    })?;
    let dir = match target.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    Ok((dir, name))
}

/// Hidden, and named after the target, so a leftover from a killed process says what it was.
fn prefix(name: &std::ffi::OsStr) -> String {
    format!(".{}.", name.to_string_lossy())
}

/// Temporary names: `.<target name>.<random>.partial`.
fn temp_names(prefix: &str) -> tempfile::Builder<'_, 'static> {
    let mut b = tempfile::Builder::new();
    b.prefix(prefix).suffix(".partial");
    b
}

/// Write `bytes` to a temporary file beside `path`.
pub fn stage_bytes(path: &Path, bytes: &[u8]) -> io::Result<Staged> {
    stage_with(path, |w| w.write_all(bytes))
}

/// Write a temporary file beside `path` through a buffered writer.
pub fn stage_with(
    path: &Path,
    fill: impl FnOnce(&mut dyn Write) -> io::Result<()>,
) -> io::Result<Staged> {
    let (dir, name) = split(path)?;
    let tmp = temp_names(&prefix(name)).tempfile_in(dir)?;
    let mut w = BufWriter::with_capacity(1 << 20, tmp);
    fill(&mut w)?;
    let tmp: NamedTempFile = w.into_inner().map_err(|e| e.into_error())?;
    tmp.as_file().sync_all()?;
    Ok(Staged {
        held: Held::File(tmp.into_temp_path()),
        target: path.to_path_buf(),
    })
}

/// Let `fill` create the file at a temporary path beside `path` (same file name, in a
/// temporary folder).
pub fn stage_by_path(
    path: &Path,
    fill: impl FnOnce(&Path) -> io::Result<()>,
) -> io::Result<Staged> {
    let (dir, name) = split(path)?;
    let folder = temp_names(&prefix(name)).tempdir_in(dir)?;
    let file = folder.path().join(name);
    fill(&file)?;
    File::open(&file)?.sync_all()?;
    Ok(Staged {
        held: Held::InFolder(folder, file),
        target: path.to_path_buf(),
    })
}

impl Staged {
    /// The path the file is waiting at.
    pub fn temporary_path(&self) -> &Path {
        match &self.held {
            Held::File(p) => p,
            Held::InFolder(_, p) => p,
        }
    }

    /// Rename the file over its target, then flush the folder so the rename itself survives
    /// a crash (POSIX leaves that to an fsync of the directory).
    pub fn commit(self) -> io::Result<()> {
        match self.held {
            Held::File(p) => p.persist(&self.target).map_err(|e| e.error)?,
            // The folder, empty once the file has moved, is removed when dropped here.
            Held::InFolder(_folder, file) => std::fs::rename(&file, &self.target)?,
        }
        // Not every platform lets a directory be opened; the rename has happened either way.
        if let Ok((dir, _)) = split(&self.target) {
            if let Ok(d) = File::open(dir) {
                let _ = d.sync_all();
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn names(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(dir)
            .map(|d| {
                d.filter_map(|e| e.ok())
                    .map(|e| e.file_name().to_string_lossy().into_owned())
                    .collect()
            })
            .unwrap_or_default();
        v.sort();
        v
    }

    #[test]
    fn failed_fill_keeps_the_old_file_and_leaves_nothing_behind() {
        let dir = tempfile::tempdir().expect("tempdir");
        let path = dir.path().join("out.csv");
        std::fs::write(&path, b"old").expect("write");
        let fail = || io::Error::other("disk full (simulated)");
        assert!(write_with(&path, |w| {
            w.write_all(b"half of the new")?;
            Err(fail())
        })
        .is_err());
        assert!(write_by_path(&path, |p| {
            std::fs::write(p, b"half of the new")?;
            Err(fail())
        })
        .is_err());
        assert_eq!(std::fs::read(&path).expect("read"), b"old");
        assert_eq!(names(dir.path()), vec!["out.csv"]);
    }

    #[test]
    fn staged_file_is_invisible_until_committed() {
        let dir = tempfile::tempdir().expect("tempdir");
        let path = dir.path().join("a.json");
        let staged = stage_bytes(&path, b"new").expect("stage");
        assert!(!path.exists());
        assert_eq!(
            std::fs::read(staged.temporary_path()).expect("read"),
            b"new"
        );
        staged.commit().expect("commit");
        assert_eq!(std::fs::read(&path).expect("read"), b"new");
        // The by-path kind keeps the file's own name while it waits.
        let gpkg = dir.path().join("b.gpkg");
        let staged = stage_by_path(&gpkg, |p| {
            assert_eq!(p.file_name(), gpkg.file_name());
            assert!(!p.exists());
            std::fs::write(p, b"by path")
        })
        .expect("stage");
        drop(staged);
        assert_eq!(names(dir.path()), vec!["a.json"]);
        write_by_path(&gpkg, |p| std::fs::write(p, b"by path")).expect("write");
        assert_eq!(names(dir.path()), vec!["a.json", "b.gpkg"]);
    }

    #[test]
    fn bare_file_name_writes_in_the_current_folder_and_a_folder_is_refused() {
        assert!(write_bytes(Path::new("/"), b"x").is_err());
        assert!(split(Path::new("x.csv")).is_ok_and(|(d, _)| d == Path::new(".")));
    }
}
