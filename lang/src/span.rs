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
/// line/column in UTF-8 or UTF-16 units and back. Line breaks are `\n`, `\r\n` (one
/// break) and a lone `\r`, as in LSP 3.17 and as the lexer counts them. A byte-order
/// mark is text here (one UTF-16 unit on line 0): LSP positions count the document as
/// the client holds it, and a client that keeps the mark counts it.
#[derive(Clone, Debug)]
pub struct LineIndex {
    starts: Vec<usize>,
    text: String,
    /// Bytes at the start of line 0 that are no column (a byte-order mark, in files).
    skip: usize,
}

impl LineIndex {
    pub fn new(text: &str) -> Self {
        let mut starts = vec![0];
        let bytes = text.as_bytes();
        for (i, &b) in bytes.iter().enumerate() {
            if b == b'\n' || (b == b'\r' && bytes.get(i + 1) != Some(&b'\n')) {
                starts.push(i + 1);
            }
        }
        LineIndex { starts, text: text.to_string(), skip: 0 }
    }

    /// For a file as read from disk (the command line's reports): a leading byte-order
    /// mark is no text, as for the lexer and for editors, which do not show it, so line 0
    /// counts its columns after it. Byte offsets stay those of the whole file.
    pub fn of_file(text: &str) -> Self {
        let mut idx = LineIndex::new(text);
        if text.starts_with('\u{FEFF}') {
            idx.skip = '\u{FEFF}'.len_utf8();
        }
        idx
    }

    /// Where the columns of a line start.
    fn line_start(&self, line: usize) -> usize {
        if line == 0 {
            self.skip
        } else {
            self.starts[line]
        }
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
        let start = self.line_start(line);
        let mut seg = self.text.get(start..offset).unwrap_or("");
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
        let start = self.line_start(line);
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

/// The lines of a text without their breaks, split as `LineIndex` splits them (`\n`,
/// `\r\n`, lone `\r`); a text ending in a break has no empty last line (as `str::lines`).
pub fn lines(text: &str) -> impl Iterator<Item = &str> {
    let mut rest = text;
    std::iter::from_fn(move || {
        if rest.is_empty() {
            return None;
        }
        let (line, next) = match rest.find(['\n', '\r']) {
            Some(i) if rest[i..].starts_with("\r\n") => (&rest[..i], &rest[i + 2..]),
            Some(i) => (&rest[..i], &rest[i + 1..]),
            None => (rest, ""),
        };
        rest = next;
        Some(line)
    })
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

    #[test]
    fn lone_cr_and_mixed_endings_are_line_breaks() {
        // LSP 3.17, "Text Documents": the end-of-line sequences are '\n', '\r\n' and '\r'.
        let text = "a\rb\r\nc\nd\r\re";
        let idx = LineIndex::new(text);
        assert_eq!(idx.line_count(), 6);
        for (ch, line) in [('a', 0), ('b', 1), ('c', 2), ('d', 3), ('e', 5)] {
            let at = text.find(ch).unwrap();
            assert_eq!(idx.line_col(at, Encoding::Utf16), LineCol { line, character: 0 }, "{ch}");
            assert_eq!(idx.offset(LineCol { line, character: 0 }, Encoding::Utf16), at);
        }
        // Past the end of a line clamps to it, before its break.
        assert_eq!(idx.offset(LineCol { line: 0, character: 9 }, Encoding::Utf8), 1);
        assert_eq!(idx.offset(LineCol { line: 4, character: 9 }, Encoding::Utf8), text.find("\re").unwrap());
    }

    #[test]
    fn a_byte_order_mark_counts_in_documents_not_in_files() {
        // LSP positions are over the text the client holds (LSP 3.17, "Position"): a mark
        // it kept is one UTF-16 unit (U+FEFF is in the BMP). Files as editors show them
        // hide it (common practice, no source).
        let text = "\u{FEFF}ab\ncd";
        let b = text.find('b').unwrap();
        let held = LineIndex::new(text);
        assert_eq!(held.line_col(b, Encoding::Utf16), LineCol { line: 0, character: 2 });
        assert_eq!(held.offset(LineCol { line: 0, character: 2 }, Encoding::Utf16), b);
        let file = LineIndex::of_file(text);
        assert_eq!(file.line_col(b, Encoding::Utf16), LineCol { line: 0, character: 1 });
        assert_eq!(file.line_col(b, Encoding::Utf8), LineCol { line: 0, character: 1 });
        assert_eq!(file.offset(LineCol { line: 0, character: 1 }, Encoding::Utf16), b);
        assert_eq!(file.offset(LineCol { line: 0, character: 0 }, Encoding::Utf16), 3);
        assert_eq!(file.line_col(0, Encoding::Utf16), LineCol { line: 0, character: 0 });
        let d = text.find('d').unwrap();
        assert_eq!(file.line_col(d, Encoding::Utf16), LineCol { line: 1, character: 1 });
    }

    #[test]
    fn lines_split_at_every_break() {
        // LSP 3.17 line ends; the last-line rule is that of `str::lines` (std docs).
        assert_eq!(lines("a\rb\r\nc\n\rd\r").collect::<Vec<_>>(), ["a", "b", "c", "", "d"]);
        assert_eq!(lines("a\n").collect::<Vec<_>>(), "a\n".lines().collect::<Vec<_>>());
        assert_eq!(lines("").count(), 0);
    }

    /// Line and column by a second, independent route: the text before the offset with
    /// every line break rewritten to `\n`, then counted.
    fn reference(text: &str, offset: usize, enc: Encoding) -> LineCol {
        let before = text[..offset].replace("\r\n", "\n").replace('\r', "\n");
        let last = before.rsplit('\n').next().unwrap();
        let character = match enc {
            Encoding::Utf8 => last.len(),
            Encoding::Utf16 => last.encode_utf16().count(),
        };
        LineCol { line: before.matches('\n').count() as u32, character: character as u32 }
    }

    proptest::proptest! {
        #[test]
        fn positions_round_trip_with_any_line_endings(
            parts in proptest::collection::vec(
                proptest::sample::select(vec!["a", "é", "🌊", " ", "\n", "\r", "\r\n", "\u{FEFF}", "x1"]),
                0..40,
            )
        ) {
            let text: String = parts.concat();
            let idx = LineIndex::new(&text);
            proptest::prop_assert_eq!(
                idx.line_count(),
                reference(&text, text.len(), Encoding::Utf8).line as usize + 1
            );
            for enc in [Encoding::Utf8, Encoding::Utf16] {
                for o in (0..=text.len()).filter(|&o| text.is_char_boundary(o)) {
                    // The middle of a CRLF is the end of its line, not an offset of its own.
                    let inside_crlf = o > 0 && text[..o].ends_with('\r') && text[o..].starts_with('\n');
                    let lc = idx.line_col(o, enc);
                    if inside_crlf {
                        proptest::prop_assert_eq!(lc, reference(&text, o - 1, enc));
                        continue;
                    }
                    proptest::prop_assert_eq!(lc, reference(&text, o, enc), "offset {}", o);
                    proptest::prop_assert_eq!(idx.offset(lc, enc), o);
                }
            }
        }
    }
}
