//! Identifiers a person writes: tank labels on the glass, system names on the
//! sump, species keys in the facility file.

use std::fmt;

use serde::{Deserialize, Serialize};

/// The longest identifier accepted, in characters: a label fits on a strip of tape.
pub const MAX_ID_LEN: usize = 32;

/// A validated identifier: a tank label (`B2-07`), a system id (`RACK-B`) or a
/// species key (`guppy`).
///
/// One to [`MAX_ID_LEN`] ASCII letters, digits, `-`, `_` or `.`, starting with a
/// letter or digit, so that it can be typed on the command line without quoting
/// and written on tape. Stored exactly as written; the facility rejects two ids
/// that differ only in case, so lookups may ignore case.
#[derive(Debug, Clone, PartialEq, Eq, PartialOrd, Ord, Hash, Serialize, Deserialize)]
#[serde(try_from = "String", into = "String")]
pub struct Id(String);

/// Why a string is not an [`Id`].
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum IdError {
    /// The string is empty.
    #[error("an id cannot be empty")]
    Empty,
    /// The string is longer than [`MAX_ID_LEN`].
    #[error("'{0}' is longer than {MAX_ID_LEN} characters")]
    TooLong(String),
    /// The string has a character outside letters, digits, `-`, `_` and `.`.
    #[error("'{id}' has {what}; use letters, digits, '-', '_' or '.'")]
    BadCharacter {
        /// The rejected string.
        id: String,
        /// The offending character, described.
        what: String,
    },
    /// The string starts with punctuation.
    #[error("'{0}' must start with a letter or digit")]
    BadStart(String),
}

impl Id {
    /// Checks and wraps `text`.
    pub fn new(text: &str) -> Result<Id, IdError> {
        if text.is_empty() {
            return Err(IdError::Empty);
        }
        if text.chars().count() > MAX_ID_LEN {
            return Err(IdError::TooLong(text.to_string()));
        }
        if let Some(bad) = text.chars().find(|c| !(c.is_ascii_alphanumeric() || matches!(c, '-' | '_' | '.'))) {
            let what = if bad.is_whitespace() { "a space".to_string() } else { format!("the character '{bad}'") };
            return Err(IdError::BadCharacter { id: text.to_string(), what });
        }
        if !text.starts_with(|c: char| c.is_ascii_alphanumeric()) {
            return Err(IdError::BadStart(text.to_string()));
        }
        Ok(Id(text.to_string()))
    }

    /// The id as written.
    pub fn as_str(&self) -> &str {
        &self.0
    }

    /// True when `other` names this id, ignoring ASCII case.
    pub fn matches(&self, other: &str) -> bool {
        self.0.eq_ignore_ascii_case(other)
    }
}

impl fmt::Display for Id {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.0)
    }
}

impl AsRef<str> for Id {
    fn as_ref(&self) -> &str {
        &self.0
    }
}

impl std::str::FromStr for Id {
    type Err = IdError;
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        Id::new(s)
    }
}

impl TryFrom<String> for Id {
    type Error = IdError;
    fn try_from(value: String) -> Result<Self, Self::Error> {
        Id::new(&value)
    }
}

impl From<Id> for String {
    fn from(id: Id) -> String {
        id.0
    }
}

impl PartialEq<str> for Id {
    fn eq(&self, other: &str) -> bool {
        self.0 == other
    }
}

impl PartialEq<&str> for Id {
    fn eq(&self, other: &&str) -> bool {
        self.0 == *other
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn labels_people_write_are_accepted() {
        for ok in ["B2-07", "Q1", "rack_a", "tub.14", "7", "Ancistrus-L144"] {
            assert_eq!(Id::new(ok).unwrap().as_str(), ok);
        }
    }

    #[test]
    fn bad_labels_say_why() {
        assert_eq!(Id::new("").unwrap_err().to_string(), "an id cannot be empty");
        assert_eq!(
            Id::new("B2 07").unwrap_err().to_string(),
            "'B2 07' has a space; use letters, digits, '-', '_' or '.'"
        );
        assert_eq!(
            Id::new("tank#3").unwrap_err().to_string(),
            "'tank#3' has the character '#'; use letters, digits, '-', '_' or '.'"
        );
        assert_eq!(Id::new("-A1").unwrap_err().to_string(), "'-A1' must start with a letter or digit");
        assert!(matches!(Id::new(&"x".repeat(33)), Err(IdError::TooLong(_))));
        assert!(Id::new(&"x".repeat(32)).is_ok());
        assert!(Id::new("bücher").is_err());
    }

    #[test]
    fn matching_ignores_case_but_identity_does_not() {
        let id = Id::new("B2-07").unwrap();
        assert!(id.matches("b2-07"));
        assert_ne!(id, Id::new("b2-07").unwrap());
    }
}
