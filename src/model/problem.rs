//! Problems found in a facility file, each located by file, line and column.

use std::fmt;
use std::path::PathBuf;

use serde::Serialize;

/// How serious a problem is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Severity {
    /// The file loads, but something deserves a look.
    Warning,
    /// The file cannot be used until this is fixed.
    Error,
}

/// One problem in a facility file: where it is and what to do about it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct Problem {
    /// The file, as it was named to the loader.
    pub file: PathBuf,
    /// Line, counted from 1.
    pub line: usize,
    /// Column in characters, counted from 1.
    pub column: usize,
    /// Path of the field in the file (`tanks[3].species`), empty for the whole file.
    pub field: String,
    /// What is wrong, in words a person can act on.
    pub message: String,
    /// Error or warning.
    pub severity: Severity,
}

impl fmt::Display for Problem {
    /// `FILE:LINE:COL: message`, with `warning: ` before the message of a warning.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}:{}:{}: ", self.file.display(), self.line, self.column)?;
        if self.severity == Severity::Warning {
            f.write_str("warning: ")?;
        }
        f.write_str(&self.message)
    }
}

/// Every error found in a facility file (never just the first), in file order.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub struct FacilityErrors {
    /// The errors, sorted by line and column.
    pub errors: Vec<Problem>,
}

impl fmt::Display for FacilityErrors {
    /// One error a line, `FILE:LINE:COL: message`.
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for (i, e) in self.errors.iter().enumerate() {
            if i > 0 {
                writeln!(f)?;
            }
            write!(f, "{e}")?;
        }
        Ok(())
    }
}

/// Why a facility file could not be loaded.
#[derive(Debug, thiserror::Error)]
pub enum LoadError {
    /// The file could not be read.
    #[error("cannot read facility file {}: {source}", path.display())]
    Read {
        /// The file.
        path: PathBuf,
        /// What the system said.
        source: std::io::Error,
    },
    /// The file was read and has errors.
    #[error("{0}")]
    Invalid(FacilityErrors),
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn display_is_file_line_column_message() {
        let problem = |line, column, message: &str, severity| Problem {
            file: "rooms/a.toml".into(),
            line,
            column,
            field: "y".into(),
            message: message.into(),
            severity,
        };
        let p = problem(2, 3, "y is wrong", Severity::Error);
        assert_eq!(p.to_string(), "rooms/a.toml:2:3: y is wrong");
        let w = problem(1, 1, "x is odd", Severity::Warning);
        assert_eq!(w.to_string(), "rooms/a.toml:1:1: warning: x is odd");
        let all = FacilityErrors { errors: vec![w, p] };
        assert_eq!(all.to_string().lines().count(), 2);
    }
}
