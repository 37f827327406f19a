//! Text files from outside: UTF-8 decoding that says where it fails.
//!
//! Facility files and keymaps are read as bytes and decoded here, so that a
//! file saved in another encoding (or damaged) is refused at the line and
//! column of its first bad byte, like any other mistake in it.

use std::fmt;

/// Where a file stops being UTF-8.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NotUtf8 {
    /// Line of the first bad byte, from 1.
    pub line: usize,
    /// Column (in characters) of the first bad byte, from 1.
    pub column: usize,
    /// The first bad byte.
    pub byte: u8,
}

impl fmt::Display for NotUtf8 {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "not UTF-8 text (byte 0x{:02x}); save the file as UTF-8", self.byte)
    }
}

/// The bytes as text, or where they stop being UTF-8.
pub fn decode(bytes: &[u8]) -> Result<&str, NotUtf8> {
    std::str::from_utf8(bytes).map_err(|e| {
        let good = &bytes[..e.valid_up_to()];
        // Everything before the bad byte is valid UTF-8 by the definition of valid_up_to.
        let good = std::str::from_utf8(good).unwrap_or_default();
        let line_start = good.rfind('\n').map_or(0, |i| i + 1);
        NotUtf8 {
            line: good.bytes().filter(|b| *b == b'\n').count() + 1,
            column: good[line_start..].chars().count() + 1,
            byte: bytes[e.valid_up_to()],
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_bad_byte_is_found_by_line_and_character_column() {
        assert_eq!(decode(b"a = 1\n").unwrap(), "a = 1\n");
        let mut bytes = "a = 1\nname = \"Bü".as_bytes().to_vec();
        bytes.extend_from_slice(&[0xff, b'"']);
        let err = decode(&bytes).unwrap_err();
        assert_eq!((err.line, err.column, err.byte), (2, 11, 0xff));
        assert_eq!(decode(&[0xc3]).unwrap_err(), NotUtf8 { line: 1, column: 1, byte: 0xc3 });
    }
}
