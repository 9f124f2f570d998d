//! Reading LSP frames (`Content-Length` headers, then a JSON-RPC body) from a byte stream
//! that may be hostile. Every defect becomes an error reply for the client and the reader
//! carries on; only the end of input ends it. tower-lsp-server's own decoder ends its
//! input stream after the first bad frame, which would end the server, so the server only
//! ever sees frames that passed through here.

use serde_json::{json, Value};
use std::io::{self, BufRead, Read};
use tower_lsp_server::jsonrpc::{Request, Response};

/// Largest body accepted. A declared length above it is treated as garbage (the bytes
/// after the header are searched for the next frame) rather than buffered.
pub const MAX_BODY: usize = 64 << 20;
/// Longest header line; a longer one means the frame boundary is lost.
const MAX_HEADER_LINE: usize = 4096;
/// JSON-RPC 2.0 error codes (JSON-RPC 2.0 specification, section 5.1).
pub const PARSE_ERROR: i64 = -32700;
pub const INVALID_REQUEST: i64 = -32600;

/// What one read produced.
#[derive(Debug, PartialEq)]
pub enum Frame {
    /// A body that is a JSON-RPC request, notification or response.
    Message(Vec<u8>),
    /// Something unusable: the error reply to send, and what happened (for stderr).
    Bad { reply: Value, note: String },
    /// End of input.
    End,
}

pub struct Framer<R> {
    input: R,
    /// Set after a resynchronisation consumed `Content-Length:` of the next header.
    pending_header: Option<Vec<u8>>,
}

enum Line {
    Text(Vec<u8>),
    TooLong(Vec<u8>),
    Eof { partial: bool },
}

impl<R: BufRead> Framer<R> {
    pub fn new(input: R) -> Self {
        Framer { input, pending_header: None }
    }

    pub fn next_frame(&mut self) -> io::Result<Frame> {
        let mut length: Option<Result<usize, String>> = None;
        let mut started = false;
        loop {
            let prefix = self.pending_header.take().unwrap_or_default();
            let line = match self.line_after(prefix)? {
                Line::Text(l) => l,
                Line::Eof { partial } if !started && !partial => return Ok(Frame::End),
                Line::Eof { .. } => {
                    return Ok(bad(PARSE_ERROR, Value::Null, "the input ended inside a message header"))
                }
                Line::TooLong(l) => return self.lost("a header line longer than 4096 bytes", &l),
            };
            let text = String::from_utf8_lossy(&line);
            let text = text.trim_end_matches(['\r', '\n']);
            if text.is_empty() {
                if !started {
                    continue; // blank lines between frames are harmless
                }
                break;
            }
            started = true;
            let name = text.split_once(':').map(|(n, _)| n).filter(|n| is_token(n));
            let Some(name) = name else {
                return self.lost(&format!("a header line that is no `Name: value` ({})", shorten(text)), &line);
            };
            // Header names are case-insensitive (as in HTTP, whose header format LSP uses).
            if name.eq_ignore_ascii_case("content-length") {
                let v = text[name.len() + 1..].trim();
                length =
                    Some(v.parse::<usize>().map_err(|_| format!("Content-Length `{}` is not a length", shorten(v))));
            }
        }
        let length = match length {
            None => return self.lost("a header without Content-Length", b""),
            Some(Err(why)) => return self.lost(&why, b""),
            Some(Ok(n)) if n > MAX_BODY => {
                return self.lost(&format!("Content-Length {n} is above the limit of {MAX_BODY} bytes"), b"")
            }
            Some(Ok(n)) => n,
        };
        let mut body = Vec::with_capacity(length.min(1 << 20));
        let got = Read::take(&mut self.input, length as u64).read_to_end(&mut body)?;
        if got < length {
            let note = format!("the input ended after {got} of {length} body bytes");
            return Ok(bad(PARSE_ERROR, Value::Null, &note));
        }
        Ok(check_body(body))
    }

    /// Reads one line (through `\n`), bounded in length, after `prefix` already read.
    fn line_after(&mut self, mut line: Vec<u8>) -> io::Result<Line> {
        if line.ends_with(b"\n") {
            return Ok(Line::Text(line));
        }
        let partial = !line.is_empty();
        let n = Read::take(&mut self.input, MAX_HEADER_LINE as u64).read_until(b'\n', &mut line)?;
        if line.ends_with(b"\n") {
            return Ok(Line::Text(line));
        }
        if n == 0 && !partial {
            return Ok(Line::Eof { partial: false });
        }
        if line.len() >= MAX_HEADER_LINE {
            return Ok(Line::TooLong(line));
        }
        Ok(Line::Eof { partial: true })
    }

    /// The frame boundary is lost: skips to the next `Content-Length:` (in the rest of
    /// the line just read, or further on) and reports a parse error for what was skipped.
    /// The mark is searched anywhere, not only at a line start: after a too-short length
    /// the next header follows the unread tail of the body on the same line.
    fn lost(&mut self, why: &str, line: &[u8]) -> io::Result<Frame> {
        const MARK: &[u8] = b"Content-Length:";
        let mut skipped = 0usize;
        if let Some(at) = line.windows(MARK.len()).skip(1).position(|w| w == MARK) {
            self.pending_header = Some(line[at + 1..].to_vec());
            skipped = at + 1;
        } else {
            skipped += line.len();
            // No proper prefix of MARK is also its suffix, so a mismatch restarts the match
            // at the current byte.
            let mut k = 0usize;
            'scan: loop {
                let buf = self.input.fill_buf()?;
                if buf.is_empty() {
                    break 'scan;
                }
                let mut used = buf.len();
                for (i, &b) in buf.iter().enumerate() {
                    k = if b == MARK[k] { k + 1 } else { usize::from(b == MARK[0]) };
                    if k == MARK.len() {
                        used = i + 1;
                        self.pending_header = Some(MARK.to_vec());
                        break;
                    }
                }
                self.input.consume(used);
                skipped += used;
                if self.pending_header.is_some() {
                    skipped -= MARK.len();
                    break 'scan;
                }
            }
        }
        let found = if self.pending_header.is_some() { "resuming at the next Content-Length" } else { "to the end" };
        let note = format!("{why}; the message boundary is lost, {skipped} bytes skipped {found}");
        Ok(bad(PARSE_ERROR, Value::Null, &note))
    }
}

/// An HTTP header name (RFC 9110 token; letters, digits and `-` are what LSP uses).
fn is_token(name: &str) -> bool {
    !name.is_empty() && name.bytes().all(|b| b.is_ascii_alphanumeric() || b == b'-')
}

/// A complete body: a JSON-RPC message, or the reply that says why it is not one.
pub fn check_body(body: Vec<u8>) -> Frame {
    let Ok(text) = std::str::from_utf8(&body) else {
        return bad(PARSE_ERROR, Value::Null, "the message body is not UTF-8");
    };
    let value: Value = match serde_json::from_str(text) {
        Ok(v) => v,
        Err(e) => return bad(PARSE_ERROR, Value::Null, &format!("the message body is not JSON ({e})")),
    };
    // The same test tower-lsp-server's decoder applies (a response, else a request), so
    // what passes here never stops its input stream.
    if serde_json::from_str::<Response>(text).is_ok() || serde_json::from_str::<Request>(text).is_ok() {
        return Frame::Message(body);
    }
    // A request whose id can be read gets its answer under that id (JSON-RPC 2.0, sec. 5:
    // the id is null only when it cannot be detected).
    let id = match (&value["method"], &value["id"]) {
        (Value::Null, _) => Value::Null,
        (_, id @ (Value::Number(_) | Value::String(_))) => id.clone(),
        _ => Value::Null,
    };
    bad(INVALID_REQUEST, id, "the message is JSON but not a JSON-RPC 2.0 request, notification or response")
}

fn bad(code: i64, id: Value, note: &str) -> Frame {
    let reply = json!({"jsonrpc": "2.0", "id": id, "error": {"code": code, "message": format!("kelp: {note}")}});
    Frame::Bad { reply, note: note.to_string() }
}

fn shorten(s: &str) -> String {
    if s.chars().count() <= 40 {
        s.to_string()
    } else {
        s.chars().take(40).collect::<String>() + "..."
    }
}

/// One frame as written to the client or to the server: canonical header, then body.
pub fn encode(body: &[u8]) -> Vec<u8> {
    let mut out = format!("Content-Length: {}\r\n\r\n", body.len()).into_bytes();
    out.extend_from_slice(body);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn frames(input: &[u8]) -> Vec<Frame> {
        let mut f = Framer::new(io::BufReader::with_capacity(7, input));
        let mut out = Vec::new();
        loop {
            match f.next_frame().unwrap() {
                Frame::End => return out,
                fr => out.push(fr),
            }
        }
    }

    fn code(f: &Frame) -> i64 {
        match f {
            Frame::Bad { reply, .. } => reply["error"]["code"].as_i64().unwrap(),
            Frame::Message(_) => 0,
            Frame::End => 1,
        }
    }

    const GOOD: &str = r#"{"jsonrpc":"2.0","id":2,"method":"shutdown"}"#;

    fn good() -> Vec<u8> {
        encode(GOOD.as_bytes())
    }

    fn then_good(bad: &[u8]) -> Vec<u8> {
        let mut v = bad.to_vec();
        v.extend(good());
        v
    }

    // Expected codes: JSON-RPC 2.0 specification, sec. 5.1 (-32700 parse error, -32600
    // invalid request); recovery at the next frame: common practice, no source.

    #[test]
    fn well_formed_frames_pass_unchanged() {
        let mut input = good();
        input.extend(b"content-length: 2\nContent-Type: application/vscode-jsonrpc; charset=utf-8\n\n[]");
        let got = frames(&input);
        assert_eq!(got[0], Frame::Message(GOOD.as_bytes().to_vec()));
        assert_eq!(code(&got[1]), INVALID_REQUEST, "a JSON array is no LSP message");
    }

    #[test]
    fn a_body_that_is_not_json_is_a_parse_error_and_reading_goes_on() {
        let got = frames(&then_good(&encode(b"{not json")));
        assert_eq!(got.iter().map(code).collect::<Vec<_>>(), vec![PARSE_ERROR, 0]);
        let Frame::Bad { reply, .. } = &got[0] else { unreachable!() };
        assert_eq!(reply["id"], Value::Null);
        assert_eq!(reply["jsonrpc"], "2.0");
        let got = frames(&then_good(&encode(b"\xff\xfe")));
        assert_eq!(got.iter().map(code).collect::<Vec<_>>(), vec![PARSE_ERROR, 0]);
    }

    #[test]
    fn json_that_is_not_json_rpc_is_an_invalid_request_under_its_id() {
        let got = frames(&then_good(&encode(br#"{"jsonrpc":"2.0","id":7,"method":5}"#)));
        assert_eq!(code(&got[0]), INVALID_REQUEST);
        let Frame::Bad { reply, .. } = &got[0] else { unreachable!() };
        assert_eq!(reply["id"], 7);
        let got = frames(&then_good(&encode(br#"{"jsonrpc":"1.0","id":"a","method":"x"}"#)));
        let Frame::Bad { reply, .. } = &got[0] else { unreachable!() };
        assert_eq!((reply["id"].as_str(), code(&got[0])), (Some("a"), INVALID_REQUEST));
        assert_eq!(code(&got[1]), 0);
    }

    #[test]
    fn broken_headers_resynchronise_at_the_next_content_length() {
        for bad in [
            &b"Content-Lenght 12\r\n\r\nxxxx"[..],
            b"Content-Type: a\r\n\r\n{}",
            b"Content-Length: 1x\r\n\r\n{}",
            b"Content-Length: -3\r\n\r\n{}",
            b"Content-Length: 99999999999999999999999\r\n\r\n{}",
            b"Content-Length: 99999999999\r\n\r\n{}",
        ] {
            let got = frames(&then_good(bad));
            assert_eq!(
                got.iter().map(code).collect::<Vec<_>>(),
                vec![PARSE_ERROR, 0],
                "{}",
                String::from_utf8_lossy(bad)
            );
            assert_eq!(got[1], Frame::Message(GOOD.as_bytes().to_vec()));
        }
    }

    #[test]
    fn an_over_long_header_line_is_skipped() {
        let mut bad = vec![b'x'; 10_000];
        bad.extend(b"\r\n");
        let got = frames(&then_good(&bad));
        assert_eq!(got.iter().map(code).collect::<Vec<_>>(), vec![PARSE_ERROR, 0]);
    }

    #[test]
    fn a_too_short_length_costs_one_error_per_piece_then_recovers() {
        // The body's tail runs into the next header on one line: one error for the cut
        // body, one for the tail, and the next frame is read whole.
        let got = frames(&then_good(b"Content-Length: 5\r\n\r\n{\"jsonrpc\":\"2.0\",\"method\":\"initialized\"}"));
        assert_eq!(got.iter().map(code).collect::<Vec<_>>(), vec![PARSE_ERROR, PARSE_ERROR, 0], "{got:?}");
        assert_eq!(got.last(), Some(&Frame::Message(GOOD.as_bytes().to_vec())));
    }

    #[test]
    fn input_cut_off_inside_a_frame_is_reported_then_ends() {
        for cut in [&b"Content-Length: 100\r\n\r\n{\"jsonrpc\""[..], b"Content-Length: 10", b"Content-Length: 10\r\n"] {
            let mut input = good();
            input.extend(cut);
            let got = frames(&input);
            assert_eq!(
                got.iter().map(code).collect::<Vec<_>>(),
                vec![0, PARSE_ERROR],
                "{}",
                String::from_utf8_lossy(cut)
            );
        }
        assert!(frames(b"").is_empty());
        assert!(frames(b"\r\n").is_empty(), "blank lines alone are no message");
    }
}
