//! Which files a report may replace, for the command line and the window alike. A report never replaces a file given as input in
//! the same call (same canonical path, or the same file by device and inode), nor a file
//! that isochore did not write itself: each folder that receives reports keeps a small
//! manifest, [`MANIFEST`], listing the files isochore wrote there with their size and
//! modification time. An existing file is replaced only when the manifest lists it with
//! the same size and time, i.e. it is isochore's own and unchanged since. Anything else is
//! refused before a single report is written, with the file named.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};
use std::time::UNIX_EPOCH;

/// Name of the manifest kept in every folder that receives reports.
pub const MANIFEST: &str = ".isochore-written";

/// How a file is recognised again: canonical path and, on unix, device and inode.
#[derive(Debug, Clone)]
struct Identity {
    canonical: Option<PathBuf>,
    node: Option<(u64, u64)>,
}

#[cfg(unix)]
fn node_of(m: &std::fs::Metadata) -> Option<(u64, u64)> {
    use std::os::unix::fs::MetadataExt;
    Some((m.dev(), m.ino()))
}

#[cfg(not(unix))]
fn node_of(_m: &std::fs::Metadata) -> Option<(u64, u64)> {
    None
}

/// The canonical form of a path that may not exist yet (its folder canonicalised).
fn canonical(p: &Path) -> Option<PathBuf> {
    if let Ok(c) = p.canonicalize() {
        return Some(c);
    }
    let name = p.file_name()?;
    let dir = match p.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => Path::new("."),
    };
    dir.canonicalize().ok().map(|d| d.join(name))
}

impl Identity {
    fn of(p: &Path) -> Self {
        Identity {
            canonical: canonical(p),
            node: std::fs::metadata(p).ok().as_ref().and_then(node_of),
        }
    }

    fn same(&self, other: &Identity) -> bool {
        matches!((&self.canonical, &other.canonical), (Some(a), Some(b)) if a == b)
            || matches!((self.node, other.node), (Some(a), Some(b)) if a == b)
    }
}

/// Size and modification time (ns since 1970) of a file, as the manifest records them.
fn stamp(p: &Path) -> Option<(u64, u128)> {
    let m = std::fs::metadata(p).ok()?;
    let t = m
        .modified()
        .ok()?
        .duration_since(UNIX_EPOCH)
        .ok()?
        .as_nanos();
    Some((m.len(), t))
}

fn folder_of(p: &Path) -> PathBuf {
    match p.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    }
}

/// Reads a folder's manifest: file name → (size, time). A missing or unreadable manifest
/// lists nothing (so nothing there counts as isochore's).
fn read_manifest(dir: &Path) -> BTreeMap<String, (u64, u128)> {
    let mut m = BTreeMap::new();
    let Ok(text) = std::fs::read_to_string(dir.join(MANIFEST)) else {
        return m;
    };
    for line in text.lines().filter(|l| !l.starts_with('#')) {
        let mut parts = line.splitn(3, '\t');
        let (Some(size), Some(time), Some(name)) = (parts.next(), parts.next(), parts.next())
        else {
            continue;
        };
        if let (Ok(s), Ok(t)) = (size.parse(), time.parse()) {
            m.insert(name.to_string(), (s, t));
        }
    }
    m
}

/// The guard of one run: the inputs, and the manifests of the folders written to.
pub struct OverwriteGuard {
    inputs: Vec<(PathBuf, Identity)>,
}

impl OverwriteGuard {
    /// A guard protecting `inputs` (the data and project files the report is made from, as
    /// the user named them).
    pub fn new(inputs: &[PathBuf]) -> Self {
        OverwriteGuard {
            inputs: inputs
                .iter()
                .map(|p| (p.clone(), Identity::of(p)))
                .collect(),
        }
    }

    /// Why `target` may not be written, or `None` when it may.
    pub fn refusal(&self, target: &Path) -> Option<String> {
        let id = Identity::of(target);
        if let Some((input, _)) = self.inputs.iter().find(|(_, i)| i.same(&id)) {
            return Some(if input.as_path() == target {
                format!(
                    "{}: this is an input of the same command; a report never overwrites its input (choose another name or folder for the report)",
                    target.display()
                )
            } else {
                format!(
                    "{}: this is the input {} of the same command; a report never overwrites its input (choose another name or folder for the report)",
                    target.display(),
                    input.display()
                )
            });
        }
        let meta = std::fs::symlink_metadata(target).ok()?;
        if meta.is_dir() {
            return Some(format!(
                "{}: a folder of that name is in the way of a report file",
                target.display()
            ));
        }
        let name = target.file_name()?.to_string_lossy().into_owned();
        let ours = read_manifest(&folder_of(target)).get(&name).copied();
        if meta.is_file() && ours.is_some() && ours == stamp(target) {
            return None;
        }
        Some(format!(
            "{}: the file exists and {}; isochore does not overwrite it (move it away, or choose another name or folder for the report)",
            target.display(),
            if ours.is_some() {
                "was changed since isochore wrote it"
            } else {
                "was not written by isochore"
            }
        ))
    }

    /// Records `written` in the manifests of their folders, so a later run may replace
    /// them.
    ///
    /// # Errors
    /// A message naming the manifest when it cannot be written.
    pub fn record(&self, written: &[PathBuf]) -> Result<(), String> {
        let mut by_dir: BTreeMap<PathBuf, Vec<&PathBuf>> = BTreeMap::new();
        for p in written {
            by_dir.entry(folder_of(p)).or_default().push(p);
        }
        for (dir, files) in by_dir {
            let mut m = read_manifest(&dir);
            for f in files {
                let (Some(name), Some(st)) = (f.file_name(), stamp(f)) else {
                    continue;
                };
                m.insert(name.to_string_lossy().into_owned(), st);
            }
            // Forget files that are gone.
            m.retain(|name, _| dir.join(name).is_file());
            let mut text = String::from(
                "# Files written here by isochore (size in bytes, modification time in ns, name).\n# isochore replaces only these, and only while unchanged.\n",
            );
            for (name, (size, time)) in &m {
                text.push_str(&format!("{size}\t{time}\t{name}\n"));
            }
            let path = dir.join(MANIFEST);
            crate::write_atomic(&path, text.as_bytes()).map_err(|e| e.to_string())?;
        }
        Ok(())
    }
}
