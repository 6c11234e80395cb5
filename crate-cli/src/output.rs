//! Files written whole or not at all (`OutputPlan`): every output of a command is first written
//! to a temporary file beside its target, and only when all of them are written are they
//! renamed into place, so a failed run (full disk, bad path, Ctrl-C) leaves every existing file
//! as it was. Also refuses an output that names an input or another output, and tracks whether
//! standard output could be written (`stdout_failed`).

use std::io::Write as _;
use std::path::{Path, PathBuf};
use std::sync::atomic::{AtomicBool, Ordering};

use tempfile::NamedTempFile;

use crate::options::CliError;

/// Set when a line could not be written to standard output for a reason other than a closed
/// pipe (a full disk, `> /dev/full`): the command then fails with exit code 1.
static STDOUT_FAILED: AtomicBool = AtomicBool::new(false);

/// Writes one line on standard output. A closed pipe (`ramulus grow | head`) is not an error;
/// any other failure is remembered for `stdout_failed`.
pub fn say_line(text: std::fmt::Arguments<'_>) {
    let mut stdout = std::io::stdout().lock();
    let written = stdout
        .write_fmt(text)
        .and_then(|()| stdout.write_all(b"\n"))
        .and_then(|()| stdout.flush());
    if let Err(error) = written {
        if error.kind() != std::io::ErrorKind::BrokenPipe {
            STDOUT_FAILED.store(true, Ordering::SeqCst);
        }
    }
}

/// Whether some output line could not be written (see `say_line`).
pub fn stdout_failed() -> bool {
    STDOUT_FAILED.load(Ordering::SeqCst)
}

/// The files a command reads and the files it will write, checked against each other before any
/// work is done, then written together at the end.
#[derive(Default)]
pub struct OutputPlan {
    /// (flag, path as given, resolved path) of every input file.
    inputs: Vec<(&'static str, String, PathBuf)>,
    /// (flag, path as given, resolved path) of every output file.
    outputs: Vec<(&'static str, String, PathBuf)>,
    /// Finished contents waiting to be renamed into place, with their target.
    staged: Vec<(NamedTempFile, String, PathBuf)>,
}

impl OutputPlan {
    /// Notes an input file given by `flag`.
    pub fn input(&mut self, flag: &'static str, path: &str) {
        self.inputs.push((flag, path.to_string(), resolved(path)));
    }

    /// Notes an output file given by `flag`; refuses one that names an input or an earlier
    /// output (the same file reached by any spelling of its path).
    pub fn output(&mut self, flag: &'static str, path: &str) -> Result<(), CliError> {
        let target = resolved(path);
        // Renaming a finished file into place would replace a device (`/dev/full`), a pipe or
        // a socket with a plain file, and cannot replace a folder: refuse them up front.
        if std::fs::metadata(&target).is_ok_and(|metadata| !metadata.is_file()) {
            return Err(CliError::Usage(format!(
                "`{flag} {path}` is not a plain file (a folder, device, pipe or socket); an \
                 output is written whole to a temporary file and renamed into place, which \
                 would replace it: give the path of a file"
            )));
        }
        for (other_flag, other_path, other) in self.inputs.iter().chain(&self.outputs) {
            if *other == target {
                return Err(CliError::Usage(format!(
                    "`{flag} {path}` names the same file as `{other_flag} {other_path}`; \
                     give each output its own file, apart from the inputs"
                )));
            }
        }
        self.outputs.push((flag, path.to_string(), target));
        Ok(())
    }

    /// Writes `text` for the output at `path` into a temporary file in the same folder; nothing
    /// at `path` changes until `commit`.
    pub fn stage(&mut self, path: &str, text: &str) -> Result<(), CliError> {
        self.stage_writing(path, |writer| writer.write_all(text.as_bytes()))
    }

    /// Like `stage`, with the contents streamed by `write` into a buffered writer on the
    /// temporary file, so they need not be held in memory whole.
    pub fn stage_writing(
        &mut self,
        path: &str,
        write: impl FnOnce(&mut dyn std::io::Write) -> std::io::Result<()>,
    ) -> Result<(), CliError> {
        // The target as `output` resolved it (an output is always planned before it is staged).
        let target = self
            .outputs
            .iter()
            .find(|(_, given, _)| given == path)
            .map_or_else(|| resolved(path), |(_, _, target)| target.clone());
        let folder = target
            .parent()
            .filter(|folder| !folder.as_os_str().is_empty())
            .unwrap_or(Path::new("."));
        let cannot = |error: std::io::Error| {
            CliError::Failed(format!(
                "{path}: cannot write: {error}; no file was changed"
            ))
        };
        let mut file = crate::interrupt::track(|| {
            let file = NamedTempFile::new_in(folder)?;
            let path = file.path().to_path_buf();
            Ok((file, path))
        })
        .map_err(cannot)?;
        {
            let mut buffered = std::io::BufWriter::with_capacity(1 << 16, file.as_file_mut());
            write(&mut buffered).map_err(cannot)?;
            buffered.flush().map_err(cannot)?;
        }
        file.as_file().sync_all().map_err(cannot)?;
        self.staged.push((file, path.to_string(), target));
        Ok(())
    }

    /// Renames every staged file into place, in the order staged. Temporary files not yet
    /// renamed are removed when a rename fails (or when the plan is dropped unfinished).
    pub fn commit(self) -> Result<(), CliError> {
        for (file, path, target) in self.staged {
            let temporary = file.path().to_path_buf();
            crate::interrupt::settle(&temporary, || file.persist(&target)).map_err(|error| {
                CliError::Failed(format!("{path}: cannot write: {}", error.error))
            })?;
        }
        Ok(())
    }
}

/// The path as the file system will resolve it: the folder made canonical when it exists (so
/// `./a.json`, `a.json` and a symbolic link to the folder agree), the file itself followed when
/// it is a symbolic link to an existing file.
fn resolved(path: &str) -> PathBuf {
    let path = Path::new(path);
    if let Ok(canonical) = std::fs::canonicalize(path) {
        return canonical;
    }
    let folder = match path.parent() {
        Some(folder) if !folder.as_os_str().is_empty() => folder,
        _ => Path::new("."),
    };
    match (std::fs::canonicalize(folder), path.file_name()) {
        (Ok(folder), Some(name)) => folder.join(name),
        _ => path.to_path_buf(),
    }
}
