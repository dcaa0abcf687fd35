//! Problems found in a design file, as plain data pointing into the text.
//!
//! The library never prints: the command line renders these with the
//! file's text (see `cli::diagnostics`).

use std::fmt;
use std::ops::Range;

/// One problem in a design file.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("{key}: {message}")]
pub struct DesignError {
    /// Dotted key path, e.g. `coil.trace_width`; `syntax` for TOML syntax
    /// errors.
    pub key: String,
    /// Byte range in the design file text the problem points at.
    pub span: Option<Range<usize>>,
    /// What is wrong.
    pub message: String,
    /// What would be accepted, or how to fix it.
    pub help: Option<String>,
}

impl DesignError {
    /// Line and column (1-based; column counted in characters) of the start
    /// of the span in `text`, if there is a span.
    pub fn line_col(&self, text: &str) -> Option<(usize, usize)> {
        self.span.as_ref().map(|s| line_col(text, s.start))
    }
}

/// Line and column (1-based; column in characters) of byte `offset` in
/// `text`. Offsets past the end point at the end.
pub fn line_col(text: &str, offset: usize) -> (usize, usize) {
    let mut offset = offset.min(text.len());
    while !text.is_char_boundary(offset) {
        offset -= 1;
    }
    let before = &text[..offset];
    let line = before.matches('\n').count() + 1;
    let line_start = before.rfind('\n').map_or(0, |i| i + 1);
    let col = text[line_start..offset].chars().count() + 1;
    (line, col)
}

/// One or more problems in a design file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct DesignErrors {
    /// The problems, in the order they were found (never empty).
    pub errors: Vec<DesignError>,
}

impl DesignErrors {
    /// The first problem.
    pub fn first(&self) -> &DesignError {
        &self.errors[0]
    }

    /// Whether a problem names `key`.
    pub fn has_key(&self, key: &str) -> bool {
        self.errors.iter().any(|e| e.key == key)
    }
}

impl From<DesignError> for DesignErrors {
    fn from(e: DesignError) -> DesignErrors {
        DesignErrors { errors: vec![e] }
    }
}

impl fmt::Display for DesignErrors {
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

impl std::error::Error for DesignErrors {}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn line_and_column() {
        let t = "a = 1\nbé = 2\n";
        assert_eq!(line_col(t, 0), (1, 1));
        assert_eq!(line_col(t, 4), (1, 5));
        assert_eq!(line_col(t, 6), (2, 1));
        // 'é' is two bytes; the '=' after "bé " is column 4.
        assert_eq!(line_col(t, 10), (2, 4));
        assert_eq!(line_col(t, 999), (3, 1));
    }
}
