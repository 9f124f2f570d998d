//! The server's connection to the client. Bytes from the client pass through `framing`
//! (on a thread of their own: a blocking read cannot be cancelled, and must not hold up
//! the exit) and only well-formed frames reach tower-lsp-server, through an in-memory
//! pipe; error replies for the rest, and everything the server writes, go to the client
//! through one writer, a whole frame at a time, so bytes never interleave. A request
//! whose handler panics gets an InternalError reply; the server serves on.

use super::framing::{encode, Frame, Framer};
use std::future::Future;
use std::panic::{catch_unwind, AssertUnwindSafe};
use std::pin::Pin;
use std::task::{Context, Poll};
use tokio::io::{AsyncBufReadExt, AsyncRead, AsyncReadExt, AsyncWrite, AsyncWriteExt, BufReader};
use tokio::sync::mpsc;
use tower::Service;
use tower_lsp_server::jsonrpc::{Error, ErrorCode, Id, Request, Response};
use tower_lsp_server::{ClientSocket, Server};

/// Serves `service` on `input`/`output` until the client exits or the input ends.
pub async fn serve<S>(
    input: impl std::io::Read + Send + 'static,
    output: impl AsyncWrite + Unpin + Send + 'static,
    service: S,
    socket: ClientSocket,
) where
    S: Service<Request, Response = Option<Response>> + Send + 'static,
    S::Error: Into<Box<dyn std::error::Error + Send + Sync>> + Send + 'static,
    S::Future: Send + 'static,
{
    let (mut to_server, server_in) = tokio::io::duplex(1 << 16);
    let (server_out, from_server) = tokio::io::duplex(1 << 16);
    let (out_tx, mut out_rx) = mpsc::channel::<Vec<u8>>(64);
    let (in_tx, mut in_rx) = mpsc::channel::<Frame>(16);

    let read = std::thread::Builder::new().name("kelp-lsp-input".into()).spawn(move || {
        let mut framer = Framer::new(std::io::BufReader::with_capacity(1 << 16, input));
        loop {
            let frame = framer.next_frame().unwrap_or_else(|e| {
                eprintln!("kelp lsp: cannot read the input: {e}");
                Frame::End
            });
            let end = frame == Frame::End;
            if in_tx.blocking_send(frame).is_err() || end {
                return;
            }
        }
    });
    if let Err(e) = read {
        eprintln!("kelp lsp: cannot start the input thread: {e}");
        return;
    }

    let replies = out_tx.clone();
    let pump_in = tokio::spawn(async move {
        while let Some(frame) = in_rx.recv().await {
            match frame {
                Frame::Message(body) => {
                    if to_server.write_all(&encode(&body)).await.is_err() {
                        break; // the server has stopped
                    }
                }
                Frame::Bad { reply, note } => {
                    eprintln!("kelp lsp: {note}");
                    let _ = replies.send(encode(reply.to_string().as_bytes())).await;
                }
                Frame::End => break,
            }
        }
        // Dropping `to_server` tells the server its input ended.
    });
    let writer = tokio::spawn(async move {
        let mut output = output;
        while let Some(frame) = out_rx.recv().await {
            if output.write_all(&frame).await.is_err() || output.flush().await.is_err() {
                break; // the client is gone
            }
        }
    });
    let pump_out = async move {
        let mut from_server = BufReader::new(from_server);
        while let Some(body) = server_frame(&mut from_server).await {
            if out_tx.send(encode(&body)).await.is_err() {
                break;
            }
        }
    };
    let server = Server::new(server_in, server_out, socket).serve(CatchPanic(service));
    tokio::join!(server, pump_out);
    // After `exit` the input may still be open: stop forwarding it, then let the writer
    // drain what is queued (it ends when the last sender is gone).
    pump_in.abort();
    let _ = pump_in.await;
    let _ = writer.await;
}

/// One frame as tower-lsp-server writes it (`Content-Length: n`, blank line, body).
async fn server_frame(r: &mut (impl AsyncRead + Unpin + AsyncBufReadExt)) -> Option<Vec<u8>> {
    let mut length = None;
    loop {
        let mut line = String::new();
        if r.read_line(&mut line).await.ok()? == 0 {
            return None;
        }
        let line = line.trim_end();
        if line.is_empty() {
            break;
        }
        if let Some(v) = line.strip_prefix("Content-Length:") {
            length = v.trim().parse::<usize>().ok();
        }
    }
    let mut body = vec![0; length?];
    r.read_exact(&mut body).await.ok()?;
    Some(body)
}

/// A service whose request futures may panic, made into one that answers InternalError
/// for that request instead (notifications: nothing) and stays usable.
pub struct CatchPanic<S>(pub S);

impl<S> Service<Request> for CatchPanic<S>
where
    S: Service<Request, Response = Option<Response>>,
    S::Future: Send + 'static,
    S::Error: Send + 'static,
{
    type Response = Option<Response>;
    type Error = S::Error;
    type Future = Pin<Box<dyn Future<Output = Result<Option<Response>, S::Error>> + Send>>;

    fn poll_ready(&mut self, cx: &mut Context<'_>) -> Poll<Result<(), S::Error>> {
        self.0.poll_ready(cx)
    }

    fn call(&mut self, req: Request) -> Self::Future {
        let id = req.id().cloned();
        let method = req.method().to_string();
        match catch_unwind(AssertUnwindSafe(|| self.0.call(req))) {
            Ok(fut) => Box::pin(Unwinding { fut: Box::pin(fut), id, method }),
            Err(p) => Box::pin(std::future::ready(Ok(failed(id, &method, &*p)))),
        }
    }
}

struct Unwinding<F> {
    fut: Pin<Box<F>>,
    id: Option<Id>,
    method: String,
}

impl<F, E> Future for Unwinding<F>
where
    F: Future<Output = Result<Option<Response>, E>>,
{
    type Output = Result<Option<Response>, E>;

    fn poll(mut self: Pin<&mut Self>, cx: &mut Context<'_>) -> Poll<Self::Output> {
        let this = &mut *self;
        match catch_unwind(AssertUnwindSafe(|| this.fut.as_mut().poll(cx))) {
            Ok(p) => p,
            // Ready now, so the panicked future is never polled again.
            Err(p) => Poll::Ready(Ok(failed(this.id.take(), &this.method, &*p))),
        }
    }
}

fn failed(id: Option<Id>, method: &str, payload: &(dyn std::any::Any + Send)) -> Option<Response> {
    let what = payload
        .downcast_ref::<&str>()
        .map(|s| s.to_string())
        .or_else(|| payload.downcast_ref::<String>().cloned())
        .unwrap_or_else(|| "no message".into());
    eprintln!("kelp lsp: {method} failed ({what}); the server carries on");
    let message = format!("kelp: an internal error stopped {method}; other requests are unaffected");
    id.map(|id| Response::from_error(id, Error { code: ErrorCode::InternalError, message: message.into(), data: None }))
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::{json, Value};
    use tower_lsp_server::jsonrpc::Result as RpcResult;
    use tower_lsp_server::ls_types::{InitializeParams, InitializeResult};
    use tower_lsp_server::{LanguageServer, LspService};

    /// A fake server: `initialize` and `shutdown` work; `kelp/boom` (a custom method)
    /// panics, as a bug in a handler would.
    struct Fake;

    impl LanguageServer for Fake {
        async fn initialize(&self, _: InitializeParams) -> RpcResult<InitializeResult> {
            Ok(InitializeResult::default())
        }
        async fn shutdown(&self) -> RpcResult<()> {
            Ok(())
        }
    }

    impl Fake {
        async fn boom(&self, _: Value) -> RpcResult<Value> {
            panic!("a bug in one handler")
        }
        async fn boom_note(&self, _: Value) {
            panic!("a bug in a notification handler")
        }
    }

    fn frame(v: Value) -> Vec<u8> {
        encode(v.to_string().as_bytes())
    }

    /// Input fed from a channel, as a pipe would be (`initialize` must be answered before
    /// the rest is sent: tower-lsp-server refuses requests until then).
    struct Pipe(std::sync::mpsc::Receiver<Vec<u8>>, Vec<u8>);

    impl std::io::Read for Pipe {
        fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
            if self.1.is_empty() {
                self.1 = self.0.recv().unwrap_or_default();
            }
            let n = buf.len().min(self.1.len());
            buf[..n].copy_from_slice(&self.1[..n]);
            self.1.drain(..n);
            Ok(n)
        }
    }

    /// Runs the fake server: initializes it, then sends `rest` and ends the input;
    /// returns every message it wrote.
    fn session(rest: Vec<u8>) -> Vec<Value> {
        let rt = tokio::runtime::Builder::new_multi_thread().worker_threads(1).enable_all().build().unwrap();
        let (client_end, server_end) = tokio::io::duplex(1 << 16);
        let (tx, rx) = std::sync::mpsc::channel();
        rt.block_on(async move {
            let (service, socket) = LspService::build(|_| Fake)
                .custom_method("kelp/boom", Fake::boom)
                .custom_method("kelp/boomNote", Fake::boom_note)
                .finish();
            let serving = tokio::spawn(serve(Pipe(rx, vec![]), server_end, service, socket));
            let mut r = BufReader::new(client_end);
            tx.send(frame(json!({"jsonrpc": "2.0", "id": 1, "method": "initialize", "params": {"capabilities": {}}})))
                .unwrap();
            let mut out = vec![serde_json::from_slice(&server_frame(&mut r).await.unwrap()).unwrap()];
            tx.send(rest).unwrap();
            drop(tx);
            while let Some(body) = server_frame(&mut r).await {
                out.push(serde_json::from_slice(&body).unwrap());
            }
            serving.await.unwrap();
            out
        })
    }

    fn reply<'a>(out: &'a [Value], id: &Value) -> &'a Value {
        out.iter()
            .find(|m| &m["id"] == id && m.get("method").is_none())
            .unwrap_or_else(|| panic!("no reply {id}: {out:?}"))
    }

    // Expected codes: JSON-RPC 2.0 specification, sec. 5.1 (-32700 parse error, -32603
    // internal error); "the server serves on": common practice, no source.

    #[test]
    fn a_panicking_request_gets_internal_error_and_the_server_serves_on() {
        let mut input = frame(json!({"jsonrpc": "2.0", "method": "initialized", "params": {}}));
        input.extend(frame(json!({"jsonrpc": "2.0", "id": 2, "method": "kelp/boom", "params": {}})));
        input.extend(frame(json!({"jsonrpc": "2.0", "method": "kelp/boomNote", "params": {}})));
        input.extend(frame(json!({"jsonrpc": "2.0", "id": 3, "method": "kelp/boom", "params": {}})));
        input.extend(frame(json!({"jsonrpc": "2.0", "id": 4, "method": "shutdown"})));
        let out = session(input);
        for id in [2, 3] {
            assert_eq!(reply(&out, &json!(id))["error"]["code"], -32603, "{out:?}");
        }
        assert_eq!(reply(&out, &json!(4))["result"], Value::Null);
        assert!(reply(&out, &json!(4)).get("error").is_none());
    }

    #[test]
    fn malformed_input_gets_error_replies_and_the_server_serves_on() {
        let mut input = encode(b"{ not json");
        input.extend(b"Content-Type: nothing else\r\n\r\n{}");
        input.extend(frame(json!({"jsonrpc": "2.0", "id": 2, "method": "shutdown"})));
        input.extend(b"Content-Length: 50\r\n\r\n{\"jsonrpc\"");
        let out = session(input);
        let errors: Vec<&Value> = out.iter().filter(|m| m["id"].is_null()).collect();
        assert_eq!(errors.len(), 3, "{out:?}");
        assert!(errors.iter().all(|m| m["error"]["code"] == -32700), "{errors:?}");
        assert!(reply(&out, &json!(1))["result"]["capabilities"].is_object());
        assert_eq!(reply(&out, &json!(2))["result"], Value::Null);
    }
}
