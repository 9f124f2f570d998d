//! Byte spans and the one place where byte offsets become line/column positions.

/// A half-open byte range `start..end` into the source text.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, Default, PartialOrd, Ord)]
pub struct Span {
    pub start: usize,
    pub end: usize,
}

impl Span {
    pub fn new(start: usize, end: usize) -> Self {
        Span { start, end }
    }
    /// The smallest span covering both.
    pub fn join(self, other: Span) -> Span {
        Span::new(self.start.min(other.start), self.end.max(other.end))
    }
    pub fn range(self) -> std::ops::Range<usize> {
        self.start..self.end
    }
    pub fn len(self) -> usize {
        self.end - self.start
    }
    pub fn is_empty(self) -> bool {
        self.start == self.end
    }
}

impl From<std::ops::Range<usize>> for Span {
    fn from(r: std::ops::Range<usize>) -> Self {
        Span::new(r.start, r.end)
    }
}

/// A 0-based line and a character offset in the encoding the consumer asked for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, PartialOrd, Ord)]
pub struct LineCol {
    pub line: u32,
    pub character: u32,
}

/// How columns are counted at an edge (JSON output, language server).
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Encoding {
    Utf8,
    Utf16,
}

/// Line starts of one document version. Built once per text; converts byte offsets to
/// line/column in UTF-8 or UTF-16 units and back. A `\r\n` counts as one line break.
#[derive(Clone, Debug)]
pub struct LineIndex {
    starts: Vec<usize>,
    text: String,
}

impl LineIndex {
    pub fn new(text: &str) -> Self {
        let mut starts = vec![0];
        for (i, b) in text.bytes().enumerate() {
            if b == b'\n' {
                starts.push(i + 1);
            }
        }
        LineIndex { starts, text: text.to_string() }
    }

    pub fn line_count(&self) -> usize {
        self.starts.len()
    }

    /// Clamps the offset into the text and onto a character boundary.
    fn clamp(&self, offset: usize) -> usize {
        let mut o = offset.min(self.text.len());
        while !self.text.is_char_boundary(o) {
            o -= 1;
        }
        o
    }

    pub fn line_col(&self, offset: usize, enc: Encoding) -> LineCol {
        let offset = self.clamp(offset);
        let line = match self.starts.binary_search(&offset) {
            Ok(l) => l,
            Err(l) => l - 1,
        };
        let start = self.starts[line];
        let mut seg = &self.text[start..offset];
        // A position on the '\r' of a CRLF pair belongs to the line end.
        if let Some(s) = seg.strip_suffix('\r') {
            seg = s;
        }
        let character = match enc {
            Encoding::Utf8 => seg.len(),
            Encoding::Utf16 => seg.chars().map(char::len_utf16).sum(),
        };
        LineCol { line: line as u32, character: character as u32 }
    }

    /// The byte offset of a line/column; columns past the line end clamp to it.
    pub fn offset(&self, pos: LineCol, enc: Encoding) -> usize {
        let line = pos.line as usize;
        if line >= self.starts.len() {
            return self.text.len();
        }
        let start = self.starts[line];
        let end = self.starts.get(line + 1).copied().unwrap_or(self.text.len());
        let content = self.text[start..end].trim_end_matches(['\n', '\r']);
        let mut units = 0usize;
        for (i, ch) in content.char_indices() {
            if units >= pos.character as usize {
                return start + i;
            }
            units += match enc {
                Encoding::Utf8 => ch.len_utf8(),
                Encoding::Utf16 => ch.len_utf16(),
            };
        }
        start + content.len()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn utf16_columns_count_surrogate_pairs() {
        // "é" is 2 bytes / 1 UTF-16 unit; the emoji is 4 bytes / 2 units.
        let text = "a\né🌊x\r\ny";
        let idx = LineIndex::new(text);
        let x = text.find('x').unwrap();
        assert_eq!(idx.line_col(x, Encoding::Utf16), LineCol { line: 1, character: 3 });
        assert_eq!(idx.line_col(x, Encoding::Utf8), LineCol { line: 1, character: 6 });
        assert_eq!(idx.offset(LineCol { line: 1, character: 3 }, Encoding::Utf16), x);
        let y = text.find('y').unwrap();
        assert_eq!(idx.line_col(y, Encoding::Utf16), LineCol { line: 2, character: 0 });
        // The CR of a CRLF is not a column of its own.
        let cr = text.find('\r').unwrap();
        assert_eq!(idx.line_col(cr, Encoding::Utf16), LineCol { line: 1, character: 4 });
    }
}
