//! A minimal LSP client over stdio for tests and benchmarks: Content-Length framing,
//! JSON-RPC 2.0, messages read on a thread.
#![allow(dead_code)]

use serde_json::{json, Value};
use std::io::{BufRead, BufReader, Read, Write};
use std::process::{Child, ChildStdin, Command, Stdio};
use std::sync::mpsc::{channel, Receiver};
use std::time::{Duration, Instant};

pub struct Server {
    child: Child,
    stdin: ChildStdin,
    rx: Receiver<Value>,
    next_id: i64,
}

impl Server {
    /// initialize, initialized, then didOpen of `text` at `uri` (version 1).
    #[allow(dead_code)]
    pub fn open(&mut self, uri: &str, text: &str, aside: &mut Vec<Value>) -> Value {
        let init = self.request("initialize", json!({"processId": null, "rootUri": null, "capabilities": {}}), aside);
        self.notify("initialized", json!({}));
        self.notify(
            "textDocument/didOpen",
            json!({"textDocument": {"uri": uri, "languageId": "kelp", "version": 1, "text": text}}),
        );
        init
    }

    /// The server's process id (for memory readings).
    pub fn pid(&self) -> u32 {
        self.child.id()
    }

    pub fn start() -> Server {
        let mut child = Command::new(env!("CARGO_BIN_EXE_kelp"))
            .arg("lsp")
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .expect("kelp lsp starts");
        let stdin = child.stdin.take().unwrap();
        let stdout = child.stdout.take().unwrap();
        let (tx, rx) = channel();
        std::thread::spawn(move || {
            let mut r = BufReader::new(stdout);
            loop {
                let mut len = 0usize;
                loop {
                    let mut line = String::new();
                    if r.read_line(&mut line).unwrap_or(0) == 0 {
                        return;
                    }
                    let line = line.trim_end();
                    if line.is_empty() {
                        break;
                    }
                    if let Some(v) = line.strip_prefix("Content-Length: ") {
                        len = v.parse().unwrap();
                    }
                }
                let mut body = vec![0; len];
                if r.read_exact(&mut body).is_err() {
                    return;
                }
                if tx.send(serde_json::from_slice(&body).unwrap()).is_err() {
                    return;
                }
            }
        });
        Server { child, stdin, rx, next_id: 1 }
    }

    pub fn send(&mut self, msg: Value) {
        let body = msg.to_string();
        write!(self.stdin, "Content-Length: {}\r\n\r\n{}", body.len(), body).unwrap();
        self.stdin.flush().unwrap();
    }

    pub fn notify(&mut self, method: &str, params: Value) {
        self.send(json!({"jsonrpc": "2.0", "method": method, "params": params}));
    }

    /// Sends a request and waits for its response (other messages are kept aside).
    pub fn request(&mut self, method: &str, params: Value, aside: &mut Vec<Value>) -> Value {
        let id = self.next_id;
        self.next_id += 1;
        self.send(json!({"jsonrpc": "2.0", "id": id, "method": method, "params": params}));
        let deadline = Instant::now() + Duration::from_secs(20);
        loop {
            let m = self
                .rx
                .recv_timeout(deadline.saturating_duration_since(Instant::now()))
                .unwrap_or_else(|_| panic!("no response to {method} in time"));
            if m.get("id") == Some(&json!(id)) && m.get("method").is_none() {
                return m;
            }
            aside.push(m);
        }
    }

    /// Waits for a notification that satisfies `pred`.
    pub fn wait_for(&mut self, aside: &mut Vec<Value>, pred: impl Fn(&Value) -> bool) -> Value {
        if let Some(i) = aside.iter().position(&pred) {
            return aside.remove(i);
        }
        let deadline = Instant::now() + Duration::from_secs(20);
        loop {
            let m = self
                .rx
                .recv_timeout(deadline.saturating_duration_since(Instant::now()))
                .unwrap_or_else(|_| panic!("notification not seen in time; seen {aside:?}"));
            if pred(&m) {
                return m;
            }
            aside.push(m);
        }
    }
}

impl Drop for Server {
    fn drop(&mut self) {
        let _ = self.child.kill();
    }
}

impl Server {
    /// Writes bytes as they are, framed or not (for hostile input).
    pub fn send_raw(&mut self, bytes: &[u8]) {
        self.stdin.write_all(bytes).unwrap();
        self.stdin.flush().unwrap();
    }
}
