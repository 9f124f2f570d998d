//! `kelp lsp`: the language server over stdio (tower-lsp-server on tokio).
//!
//! Scheduling. Every document edit is applied synchronously, under one lock and before
//! any `.await`, so edits are never reordered; a change whose version is not newer than
//! the document's is dropped. Each edit re-parses and re-checks the text and computes
//! every statement's key (`kelp_evaluator::statement_keys`); what the document shows is
//! composed at once from the views of statements already evaluated (`doc.rs`), so
//! evaluated diagnostics never vanish. The new version goes to the document's own
//! evaluation thread (`worker.rs`), which replays unchanged statements, computes the
//! rest, and cancels work the new version no longer needs. Publication goes through one
//! task that always sends the newest state, so an older version never overwrites a newer.

mod actions;
mod analysis;
mod assist;
mod complete;
mod convert;
mod doc;
mod framing;
mod hover;
mod navigate;
mod stdio;
mod worker;

use doc::Doc;
use kelp_lang::Span;
use std::collections::HashMap;
use std::sync::{Arc, Mutex};
use std::time::Duration;
use tokio::sync::mpsc::{unbounded_channel, UnboundedReceiver, UnboundedSender};
use tower_lsp_server::jsonrpc::Result;
use tower_lsp_server::ls_types::*;
use tower_lsp_server::{Client, LanguageServer, LspService};

/// The command behind the code lenses: evaluate the file and report one value.
const EVALUATE: &str = "kelp.evaluate";
/// Writes one `sample` or `plot` (arguments: document URI, statement index).
const WRITE: &str = "kelp.write";

/// Longest a command's own evaluation may run before it is abandoned.
const EVAL_BUDGET: Duration = Duration::from_secs(30);
/// An evaluation running longer than this shows work-done progress.
const PROGRESS_AFTER: Duration = Duration::from_millis(500);

/// What the client said it can do, and the server's options (`initializationOptions`).
#[derive(Clone, Debug)]
pub(crate) struct Options {
    /// Hover as markdown (else plain text).
    pub markdown: bool,
    /// The client accepts server-created work-done progress.
    pub progress: bool,
    /// Facts about curves (K603) as diagnostics too; by default only in hover and inlays.
    pub facts_as_diagnostics: bool,
}

impl Default for Options {
    fn default() -> Self {
        Options { markdown: true, progress: false, facts_as_diagnostics: false }
    }
}

#[derive(Default)]
pub(crate) struct State {
    docs: HashMap<Uri, Doc>,
    /// The workspace folders the client named (outputs are written only inside them).
    folders: Vec<std::path::PathBuf>,
    options: Options,
    /// Documents opened so far: a closed and reopened document gets a new identity.
    opened: u64,
    /// Whether the client expands snippets in completions (else plain text is sent).
    snippets: bool,
}

pub struct Backend {
    client: Client,
    state: Arc<Mutex<State>>,
    /// Documents whose diagnostics should be published (the newest state is sent).
    publish: UnboundedSender<Uri>,
}

fn lock(state: &Mutex<State>) -> std::sync::MutexGuard<'_, State> {
    // A panic elsewhere must not wedge the server: the state is still consistent.
    state.lock().unwrap_or_else(|e| e.into_inner())
}

/// Sends each document's newest diagnostics, one publication at a time.
async fn publisher(client: Client, state: Arc<Mutex<State>>, mut rx: UnboundedReceiver<Uri>) {
    while let Some(first) = rx.recv().await {
        let mut uris = vec![first];
        while let Ok(u) = rx.try_recv() {
            if !uris.contains(&u) {
                uris.push(u);
            }
        }
        for uri in uris {
            let now = {
                let st = lock(&state);
                let facts = st.options.facts_as_diagnostics;
                st.docs.get(&uri).map(|d| (d.diagnostics(&uri, facts), d.version))
            };
            match now {
                Some((diags, version)) => client.publish_diagnostics(uri, diags, Some(version)).await,
                None => client.publish_diagnostics(uri, vec![], None).await,
            }
        }
    }
}

/// Serves on stdin/stdout until the client exits.
pub fn run() -> i32 {
    // Large stacks: the parser, checker and evaluator recurse over the syntax tree, whose
    // depth the parser bounds (K106) at a size a 2 MiB default stack cannot hold.
    let rt = match tokio::runtime::Builder::new_multi_thread()
        .worker_threads(2)
        .thread_stack_size(crate::STACK_BYTES)
        .max_blocking_threads(16)
        .enable_all()
        .build()
    {
        Ok(rt) => rt,
        Err(e) => {
            eprintln!("kelp lsp: cannot start the runtime: {e}");
            return 2;
        }
    };
    rt.block_on(async {
        let (service, socket) = LspService::new(|client| {
            let state = Arc::new(Mutex::new(State::default()));
            let (tx, rx) = unbounded_channel();
            tokio::spawn(publisher(client.clone(), state.clone(), rx));
            Backend { client, state, publish: tx }
        });
        // Malformed input gets error replies and a panicking handler an error reply for its
        // request only (`stdio.rs`); neither ends the server.
        stdio::serve(std::io::stdin(), tokio::io::stdout(), service, socket).await;
    });
    0
}

/// `kelp/evaluated`: sent after each evaluation of a document, with what it did (for
/// clients that show it, and for tests that check superseded work stops).
struct Evaluated;

impl notification::Notification for Evaluated {
    type Params = serde_json::Value;
    const METHOD: &'static str = "kelp/evaluated";
}

/// Cancels a token when dropped: a request future dropped by `$/cancelRequest` stops its
/// evaluation.
struct CancelOnDrop(kelp_evaluator::CancelToken);

impl Drop for CancelOnDrop {
    fn drop(&mut self) {
        self.0.cancel();
    }
}

/// The whole file evaluated on a blocking thread, stopped when the caller goes away.
async fn evaluate_now<T: Send + 'static>(
    text: String,
    mode: kelp_evaluator::Mode,
    read: impl FnOnce(&kelp_evaluator::Evaluation) -> T + Send + 'static,
) -> Option<T> {
    let token = kelp_evaluator::CancelToken::new();
    let _guard = CancelOnDrop(token.clone());
    let job = tokio::task::spawn_blocking(move || {
        std::panic::catch_unwind(std::panic::AssertUnwindSafe(|| {
            let checked = kelp_lang::check(&text);
            read(&kelp_evaluator::evaluate_cancellable(&checked, &text, &mode, &token))
        }))
        .ok()
    });
    match tokio::time::timeout(EVAL_BUDGET, job).await {
        Ok(Ok(e)) => e,
        _ => None,
    }
}

impl Backend {
    fn lock(&self) -> std::sync::MutexGuard<'_, State> {
        lock(&self.state)
    }

    /// The evaluation thread of a newly opened document, reporting back into the state.
    fn start_worker(&self, uri: &Uri, identity: u64) -> Option<worker::Worker> {
        let (state, publish, uri_done) = (self.state.clone(), self.publish.clone(), uri.clone());
        let (client_done, handle_done) = (self.client.clone(), tokio::runtime::Handle::current());
        let done = move |d: worker::Done| {
            let mut st = lock(&state);
            let Some(doc) = st.docs.get_mut(&uri_done).filter(|doc| doc.identity == identity) else { return };
            doc.views.extend(d.views);
            doc.failed = d.failed;
            if doc.busy == Some(d.generation) {
                doc.busy = None;
            }
            // Keep views of this version only once they outnumber its statements well.
            if doc.views.len() > 2 * doc.keys.len() + 64 {
                let keep: std::collections::HashSet<_> = doc.keys.iter().flatten().copied().collect();
                doc.views.retain(|k, _| keep.contains(k));
            }
            doc.compose();
            let note = serde_json::json!({
                "uri": uri_done.as_str(), "version": d.version, "complete": d.complete,
                "replayed": d.replayed, "computed": d.computed, "ms": d.took.as_secs_f64() * 1e3,
                "pending": doc.pending,
            });
            drop(st);
            let _ = publish.send(uri_done.clone());
            let client = client_done.clone();
            handle_done.spawn(async move { client.send_notification::<Evaluated>(note).await });
        };
        let (state, client, uri_started) = (self.state.clone(), self.client.clone(), uri.clone());
        let handle = tokio::runtime::Handle::current();
        let started = move |generation: u64| {
            let progress = {
                let mut st = lock(&state);
                let progress = st.options.progress;
                match st.docs.get_mut(&uri_started).filter(|doc| doc.identity == identity) {
                    Some(doc) => doc.busy = Some(generation),
                    None => return,
                }
                progress
            };
            if progress {
                let (state, client, uri) = (state.clone(), client.clone(), uri_started.clone());
                handle.spawn(async move { show_progress(client, state, uri, identity, generation).await });
            }
        };
        match worker::Worker::spawn(crate::STACK_BYTES, done, started) {
            Ok(w) => Some(w),
            Err(e) => {
                eprintln!("kelp lsp: cannot start an evaluation thread: {e}");
                None
            }
        }
    }

    /// Composes the document's view now, queues its publication and sends the version to
    /// its evaluation thread.
    fn refresh(&self, uri: &Uri) {
        let mut st = self.lock();
        let Some(doc) = st.docs.get_mut(uri) else { return };
        doc.compose();
        if doc.pending > 0 {
            if let Some(w) = &doc.worker {
                w.submit(worker::Job {
                    generation: doc.generation,
                    version: doc.version,
                    text: Arc::from(doc.text.as_str()),
                    checked: doc.checked.clone(),
                    keys: doc.keys.clone(),
                });
            }
        }
        let _ = self.publish.send(uri.clone());
    }

    /// `kelp.write`: evaluates the document and writes the one output statement asked for,
    /// inside the document's folder tree, with work-done progress and a message naming the file.
    async fn write_output(&self, params: ExecuteCommandParams) -> Result<Option<LSPAny>> {
        use tower_lsp_server::jsonrpc::Error;
        let uri = params.arguments.first().and_then(|v| v.as_str()).map(str::to_string);
        let index = params.arguments.get(1).and_then(|v| v.as_u64()).map(|v| v as usize);
        let (Some(uri), Some(index)) = (uri, index) else {
            return Err(Error::invalid_params("kelp.write takes a document URI and a statement index"));
        };
        let uri: Uri = uri.parse().map_err(|_| Error::invalid_params("not a URI"))?;
        let Some(path) = uri.to_file_path() else {
            return Err(Error::invalid_params("outputs are written only for documents on disk"));
        };
        let base = path.parent().map(|p| p.to_path_buf()).unwrap_or_default();
        let (text, folders) = {
            let st = self.lock();
            let Some(doc) = st.docs.get(&uri) else { return Err(Error::invalid_params("the document is not open")) };
            (doc.text.clone(), st.folders.clone())
        };
        // Outputs land inside the workspace: a document outside every workspace folder the
        // client named gets nothing written (no folders named: the document's own folder).
        if !folders.is_empty() && !folders.iter().any(|f| path.starts_with(f)) {
            let message = "kelp wrote nothing: the document is outside the workspace folders".to_string();
            self.client.show_message(MessageType::WARNING, message).await;
            return Ok(Some(serde_json::json!({ "written": [] })));
        }
        let progress = match params.work_done_progress_params.work_done_token {
            Some(token) => Some(self.client.progress(token, "kelp: writing output".to_string()).begin().await),
            None => None,
        };
        // Outputs are written whole or not at all (`output::write`), so cancelling is safe.
        let job = evaluate_now(text, kelp_evaluator::Mode::Run { base, only: Some(index) }, |e| {
            let errors: Vec<String> =
                e.diagnostics.iter().filter(|d| d.is_error()).map(|d| d.message.clone()).collect();
            (e.outputs.clone(), errors)
        });
        let (message, written) = match job.await {
            Some((outputs, errors)) => {
                if outputs.is_empty() {
                    (format!("kelp wrote nothing: {}", errors.join("; ")), vec![])
                } else {
                    (format!("kelp wrote {}", outputs.join(", ")), outputs)
                }
            }
            None => {
                (String::from("kelp: the output could not be written (evaluation failed or took too long)"), vec![])
            }
        };
        if let Some(p) = progress {
            p.finish_with_message(message.clone()).await;
        }
        let kind = if written.is_empty() { MessageType::WARNING } else { MessageType::INFO };
        self.client.show_message(kind, message).await;
        Ok(Some(serde_json::json!({ "written": written })))
    }
}

/// Work-done progress while an evaluation of this document runs past `PROGRESS_AFTER`.
async fn show_progress(client: Client, state: Arc<Mutex<State>>, uri: Uri, identity: u64, generation: u64) {
    let busy = |state: &Mutex<State>| {
        lock(state).docs.get(&uri).is_some_and(|d| d.identity == identity && d.busy.is_some_and(|g| g >= generation))
    };
    tokio::time::sleep(PROGRESS_AFTER).await;
    if !busy(&state) {
        return;
    }
    let token = NumberOrString::String(format!("kelp-eval-{identity}-{generation}"));
    let created = client
        .send_request::<request::WorkDoneProgressCreate>(WorkDoneProgressCreateParams { token: token.clone() })
        .await;
    if created.is_err() {
        return;
    }
    let p = client.progress(token, "kelp: evaluating").begin().await;
    while busy(&state) {
        tokio::time::sleep(Duration::from_millis(100)).await;
    }
    p.finish().await;
}

/// The identifier around a byte offset.
fn word_at(text: &str, at: usize) -> Option<(usize, usize)> {
    let is_id = |c: u8| c.is_ascii_alphanumeric() || c == b'_';
    let b = text.as_bytes();
    let at = at.min(b.len());
    let mut s = at;
    while s > 0 && is_id(b[s - 1]) {
        s -= 1;
    }
    let mut e = at;
    while e < b.len() && is_id(b[e]) {
        e += 1;
    }
    (s < e).then_some((s, e))
}

impl LanguageServer for Backend {
    async fn initialize(&self, params: InitializeParams) -> Result<InitializeResult> {
        {
            let mut st = self.lock();
            let caps = &params.capabilities;
            let formats =
                caps.text_document.as_ref().and_then(|t| t.hover.as_ref()).and_then(|h| h.content_format.as_ref());
            st.options.markdown = formats.is_none_or(|f| f.contains(&MarkupKind::Markdown));
            st.options.progress = caps.window.as_ref().and_then(|w| w.work_done_progress).unwrap_or(false);
            let opts = params.initialization_options.as_ref();
            st.options.facts_as_diagnostics =
                opts.and_then(|o| o.get("curveFactsAsDiagnostics")).and_then(|v| v.as_bool()).unwrap_or(false);
            #[allow(deprecated)]
            let root = params.root_uri.iter().filter_map(|u| u.to_file_path().map(|p| p.to_path_buf())).collect();
            st.folders = match &params.workspace_folders {
                Some(f) => f.iter().filter_map(|w| w.uri.to_file_path().map(|p| p.to_path_buf())).collect(),
                None => root,
            };
            let item = params.capabilities.text_document.as_ref().and_then(|t| t.completion.as_ref());
            st.snippets = item.and_then(|c| c.completion_item.as_ref()).and_then(|i| i.snippet_support) == Some(true);
        }
        Ok(InitializeResult {
            server_info: Some(ServerInfo { name: "kelp".into(), version: Some(env!("CARGO_PKG_VERSION").into()) }),
            capabilities: ServerCapabilities {
                position_encoding: Some(PositionEncodingKind::UTF16),
                text_document_sync: Some(TextDocumentSyncCapability::Kind(TextDocumentSyncKind::INCREMENTAL)),
                hover_provider: Some(HoverProviderCapability::Simple(true)),
                definition_provider: Some(OneOf::Left(true)),
                references_provider: Some(OneOf::Left(true)),
                rename_provider: Some(OneOf::Right(RenameOptions {
                    prepare_provider: Some(true),
                    work_done_progress_options: Default::default(),
                })),
                code_action_provider: Some(CodeActionProviderCapability::Options(CodeActionOptions {
                    code_action_kinds: Some(vec![CodeActionKind::QUICKFIX, CodeActionKind::REFACTOR]),
                    ..Default::default()
                })),
                document_symbol_provider: Some(OneOf::Left(true)),
                document_formatting_provider: Some(OneOf::Left(true)),
                completion_provider: Some(CompletionOptions {
                    trigger_characters: Some(vec!["(".into(), ",".into()]),
                    ..Default::default()
                }),
                signature_help_provider: Some(SignatureHelpOptions {
                    trigger_characters: Some(vec!["(".into(), ",".into()]),
                    ..Default::default()
                }),
                folding_range_provider: Some(FoldingRangeProviderCapability::Simple(true)),
                semantic_tokens_provider: Some(SemanticTokensServerCapabilities::SemanticTokensOptions(
                    SemanticTokensOptions {
                        legend: SemanticTokensLegend {
                            token_types: assist::TOKEN_TYPES.iter().map(|t| SemanticTokenType::new(t)).collect(),
                            token_modifiers: vec![],
                        },
                        full: Some(SemanticTokensFullOptions::Bool(true)),
                        range: None,
                        ..Default::default()
                    },
                )),
                inlay_hint_provider: Some(OneOf::Left(true)),
                code_lens_provider: Some(CodeLensOptions { resolve_provider: Some(false) }),
                workspace: Some(WorkspaceServerCapabilities {
                    workspace_folders: Some(WorkspaceFoldersServerCapabilities {
                        supported: Some(true),
                        change_notifications: Some(OneOf::Left(true)),
                    }),
                    file_operations: None,
                }),
                execute_command_provider: Some(ExecuteCommandOptions {
                    commands: vec![EVALUATE.to_string(), WRITE.to_string()],
                    ..Default::default()
                }),
                ..ServerCapabilities::default()
            },
            ..Default::default()
        })
    }

    async fn shutdown(&self) -> Result<()> {
        Ok(())
    }

    async fn did_change_workspace_folders(&self, params: DidChangeWorkspaceFoldersParams) {
        let mut st = self.lock();
        let path = |w: &WorkspaceFolder| w.uri.to_file_path().map(|p| p.to_path_buf());
        let removed: Vec<std::path::PathBuf> = params.event.removed.iter().filter_map(path).collect();
        st.folders.retain(|f| !removed.contains(f));
        st.folders.extend(params.event.added.iter().filter_map(path));
    }

    async fn did_open(&self, params: DidOpenTextDocumentParams) {
        let d = params.text_document;
        let identity = {
            let mut st = self.lock();
            st.opened += 1;
            st.opened
        };
        let worker = self.start_worker(&d.uri, identity);
        {
            let mut doc = Doc::new(d.text, d.version, identity);
            doc.worker = worker;
            self.lock().docs.insert(d.uri.clone(), doc);
        }
        self.refresh(&d.uri);
    }

    async fn did_change(&self, params: DidChangeTextDocumentParams) {
        let uri = params.text_document.uri;
        {
            // All edits applied here, synchronously, in order.
            let mut st = self.lock();
            let Some(doc) = st.docs.get_mut(&uri) else { return };
            if params.text_document.version <= doc.version {
                return; // stale or repeated notification
            }
            for change in params.content_changes {
                let range =
                    change.range.map(|r| (convert::offset(&doc.index, r.start), convert::offset(&doc.index, r.end)));
                doc.edit(range, &change.text);
            }
            doc.version = params.text_document.version;
            doc.recheck();
        }
        self.refresh(&uri);
    }

    async fn did_close(&self, params: DidCloseTextDocumentParams) {
        let uri = params.text_document.uri;
        // Dropping the document drops its worker, which cancels what it runs.
        self.lock().docs.remove(&uri);
        let _ = self.publish.send(uri);
    }

    async fn hover(&self, params: HoverParams) -> Result<Option<Hover>> {
        let p = params.text_document_position_params;
        let st = self.lock();
        let Some(doc) = st.docs.get(&p.text_document.uri) else { return Ok(None) };
        Ok(hover::hover(doc, p.position, st.options.markdown))
    }

    async fn goto_definition(&self, params: GotoDefinitionParams) -> Result<Option<GotoDefinitionResponse>> {
        let p = params.text_document_position_params;
        let st = self.lock();
        Ok(st.docs.get(&p.text_document.uri).and_then(|d| navigate::definition(d, &p.text_document.uri, p.position)))
    }

    async fn references(&self, params: ReferenceParams) -> Result<Option<Vec<Location>>> {
        let p = params.text_document_position;
        let st = self.lock();
        let Some(doc) = st.docs.get(&p.text_document.uri) else { return Ok(None) };
        Ok(navigate::references(doc, &p.text_document.uri, p.position, params.context.include_declaration))
    }

    async fn prepare_rename(&self, params: TextDocumentPositionParams) -> Result<Option<PrepareRenameResponse>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        navigate::prepare_rename(doc, params.position)
    }

    async fn rename(&self, params: RenameParams) -> Result<Option<WorkspaceEdit>> {
        let p = params.text_document_position;
        let st = self.lock();
        let Some(doc) = st.docs.get(&p.text_document.uri) else { return Ok(None) };
        navigate::rename(doc, &p.text_document.uri, p.position, params.new_name)
    }

    async fn document_symbol(&self, params: DocumentSymbolParams) -> Result<Option<DocumentSymbolResponse>> {
        let st = self.lock();
        Ok(st.docs.get(&params.text_document.uri).map(navigate::outline))
    }

    async fn code_action(&self, params: CodeActionParams) -> Result<Option<CodeActionResponse>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        Ok(Some(actions::code_actions(doc, &params.text_document.uri, &params)))
    }

    async fn completion(&self, params: CompletionParams) -> Result<Option<CompletionResponse>> {
        let p = params.text_document_position;
        let st = self.lock();
        Ok(st.docs.get(&p.text_document.uri).map(|d| complete::completion(d, p.position, st.snippets)))
    }

    async fn signature_help(&self, params: SignatureHelpParams) -> Result<Option<SignatureHelp>> {
        let p = params.text_document_position_params;
        let st = self.lock();
        Ok(st.docs.get(&p.text_document.uri).and_then(|d| complete::signature_help(d, p.position)))
    }

    async fn formatting(&self, params: DocumentFormattingParams) -> Result<Option<Vec<TextEdit>>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        let formatted = kelp_lang::fmt::format(&doc.text);
        if formatted == doc.text {
            return Ok(Some(vec![]));
        }
        let whole = Span::new(0, doc.text.len());
        Ok(Some(vec![TextEdit { range: convert::range(&doc.index, whole), new_text: formatted }]))
    }

    async fn folding_range(&self, params: FoldingRangeParams) -> Result<Option<Vec<FoldingRange>>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        let checked = &doc.checked;
        let stmts: Vec<(usize, usize)> = checked.program.stmts.iter().map(|s| (s.span.start, s.span.end)).collect();
        Ok(Some(
            assist::folds(&doc.text, &stmts)
                .into_iter()
                .map(|(a, b)| FoldingRange { start_line: a, end_line: b, ..Default::default() })
                .collect(),
        ))
    }

    async fn code_lens(&self, params: CodeLensParams) -> Result<Option<Vec<CodeLens>>> {
        let uri = params.text_document.uri;
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let mut lenses = Vec::new();
        for s in &doc.checked.symbols {
            let def = format!("{:?}", s.def);
            if def != "Let" && def != "Wave" {
                continue;
            }
            let title = match doc.value(&s.name) {
                Some(v) => {
                    let mut d = v.display.clone();
                    if d.chars().count() > 60 {
                        d = d.chars().take(57).collect::<String>() + "...";
                    }
                    format!("{} = {d}", s.name)
                }
                None => format!("evaluate {}", s.name),
            };
            let line = convert::position(&doc.index, doc.checked.program.stmts[s.stmt].span.start).line;
            let at = Position { line, character: 0 };
            lenses.push(CodeLens {
                range: Range { start: at, end: at },
                command: Some(Command {
                    title,
                    command: EVALUATE.to_string(),
                    arguments: Some(vec![serde_json::json!(uri.as_str()), serde_json::json!(s.name)]),
                }),
                data: None,
            });
        }
        // Above each `sample` and `plot`: write that output.
        for (i, stmt) in doc.checked.program.stmts.iter().enumerate() {
            if let kelp_lang::ast::StmtKind::Output { path, .. } = &stmt.kind {
                let line = convert::position(&doc.index, stmt.span.start).line;
                let at = Position { line, character: 0 };
                lenses.push(CodeLens {
                    range: Range { start: at, end: at },
                    command: Some(Command {
                        title: format!("write {}", path.value),
                        command: WRITE.to_string(),
                        arguments: Some(vec![serde_json::json!(uri.as_str()), serde_json::json!(i)]),
                    }),
                    data: None,
                });
            }
        }
        Ok(Some(lenses))
    }

    async fn execute_command(&self, params: ExecuteCommandParams) -> Result<Option<LSPAny>> {
        use tower_lsp_server::jsonrpc::Error;
        if params.command == WRITE {
            return self.write_output(params).await;
        }
        if params.command != EVALUATE {
            return Err(Error::invalid_params(format!("unknown command `{}`", params.command)));
        }
        let arg = |i: usize| params.arguments.get(i).and_then(|v| v.as_str()).map(str::to_string);
        let (Some(uri), Some(name)) = (arg(0), arg(1)) else {
            return Err(Error::invalid_params("kelp.evaluate takes a document URI and a name"));
        };
        let uri: Uri = uri.parse().map_err(|_| Error::invalid_params("not a URI"))?;
        let (text, known) = {
            let st = self.lock();
            let Some(doc) = st.docs.get(&uri) else {
                return Err(Error::invalid_params("the document is not open"));
            };
            (doc.text.clone(), doc.value(&name).cloned())
        };
        // Progress only when the client offered a token: no request back to the client
        // is awaited from here.
        let progress = match params.work_done_progress_params.work_done_token {
            Some(token) => Some(self.client.progress(token, format!("kelp: evaluating {name}")).begin().await),
            None => None,
        };
        let shown = match known {
            Some(v) => Some(v),
            None => match evaluate_now(text, kelp_evaluator::Mode::Check, {
                let name = name.clone();
                move |e| e.values.iter().find(|v| v.name == name).map(|v| analysis::shown(&v.name, &v.value))
            })
            .await
            {
                Some(found) => found,
                None => {
                    if let Some(p) = progress {
                        p.finish_with_message("abandoned").await;
                    }
                    return Err(Error::internal_error());
                }
            },
        };

        let message = match &shown {
            Some(v) if v.error_bound > 0.0 => format!("{name} = {} (± {:.1e})", v.display, v.error_bound),
            Some(v) => format!("{name} = {}", v.display),
            None => format!("{name} has no value: see its diagnostics"),
        };
        if let Some(p) = progress {
            p.finish_with_message(message.clone()).await;
        }
        self.client.show_message(MessageType::INFO, message).await;
        Ok(shown.map(
            |v| serde_json::json!({"name": v.name, "kind": v.kind, "value": v.display, "error_bound": v.error_bound}),
        ))
    }

    async fn semantic_tokens_full(&self, params: SemanticTokensParams) -> Result<Option<SemanticTokensResult>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        // LSP's relative encoding: each token as (line delta, start delta, length, type, 0),
        // lengths in UTF-16 units; a token spanning lines is cut at its first line.
        let mut data = Vec::new();
        let (mut prev_line, mut prev_start) = (0u32, 0u32);
        for (span, kind) in assist::semantic(&doc.text) {
            let start = convert::position(&doc.index, span.start);
            let line_end = doc.text[span.start..span.end].find(['\n', '\r']).map_or(span.end, |i| span.start + i);
            let end = convert::position(&doc.index, line_end);
            let length = end.character.saturating_sub(start.character);
            if length == 0 {
                continue;
            }
            let delta_line = start.line - prev_line;
            let delta_start = if delta_line == 0 { start.character - prev_start } else { start.character };
            data.push(SemanticToken { delta_line, delta_start, length, token_type: kind, token_modifiers_bitset: 0 });
            prev_line = start.line;
            prev_start = start.character;
        }
        Ok(Some(SemanticTokensResult::Tokens(SemanticTokens { result_id: None, data })))
    }

    async fn inlay_hint(&self, params: InlayHintParams) -> Result<Option<Vec<InlayHint>>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        let mut hints = Vec::new();
        let hint = |at: usize, label: String| InlayHint {
            position: convert::position(&doc.index, at),
            label: InlayHintLabel::String(format!("  {label}")),
            kind: None,
            text_edits: None,
            tooltip: None,
            padding_left: Some(true),
            padding_right: None,
            data: None,
        };
        let stmts = &doc.checked.program.stmts;
        for s in &doc.checked.symbols {
            // After a curve: its genus or what stands in the way; after a matrix value: its size.
            let Some(v) = doc.value(&s.name) else { continue };
            let label = match (&v.fact, v.kind.as_str()) {
                (Some(f), _) => f.clone(),
                (None, "matrix") => size_of(&v.display),
                _ => continue,
            };
            hints.push(hint(stmts[s.stmt].span.end, label));
        }
        // After each claim: whether it holds, is false, or is undecided (or still pending).
        for (i, stmt) in stmts.iter().enumerate() {
            if !matches!(stmt.kind, kelp_lang::ast::StmtKind::Expect { .. }) {
                continue;
            }
            let Some(k) = doc.keys.get(i).copied().flatten() else { continue };
            let label = match doc.views.get(&k).and_then(|v| v.marks.first()) {
                Some(m) => match m.passed {
                    Some(true) => "✓ holds",
                    Some(false) => "✗ false",
                    None => "? undecided",
                },
                None if doc.views.contains_key(&k) => continue,
                None => "… evaluating",
            };
            hints.push(hint(stmt.span.end, label.to_string()));
        }
        hints.sort_by_key(|h| (h.position.line, h.position.character));
        Ok(Some(hints))
    }
}

/// "r x c" of a displayed matrix `[[a, b], [c, d]]`.
fn size_of(display: &str) -> String {
    let rows = display.matches("],").count() + 1;
    let first = display.trim_start_matches('[').split(']').next().unwrap_or("");
    let cols = first.split(", ").count();
    format!("{rows} x {cols}")
}
