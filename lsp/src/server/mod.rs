//! `kelp lsp`: the language server over stdio (tower-lsp-server on tokio).
//!
//! Scheduling. Every document edit is applied synchronously, under one lock and before
//! any `.await`, so edits are never reordered; a change whose version is not newer than
//! the document's is dropped. Syntax and checker diagnostics are published at once.
//! Evaluation (curve algebra, theta values) runs on a blocking worker after a pause in
//! typing, bounded in time, and is dropped if the document moved on meanwhile; its
//! results are cached by the text's tokens without comments, so editing a comment,
//! spacing, reopening or undoing re-evaluates nothing (`reuse.rs` moves the stored
//! diagnostics to the new positions).

mod analysis;
mod assist;
mod convert;
mod reuse;

use analysis::{evaluate_text, EvalSummary};
use kelp_lang::span::LineIndex;
use kelp_lang::{check, Span};
use std::collections::HashMap;
use std::sync::{Arc, Mutex};
use std::time::Duration;
use tower_lsp_server::jsonrpc::Result;
use tower_lsp_server::ls_types::*;
use tower_lsp_server::{Client, LanguageServer, LspService, Server};

/// The command behind the code lenses: evaluate the file and report one value.
const EVALUATE: &str = "kelp.evaluate";
/// Writes one `sample` or `plot` (arguments: document URI, statement index).
const WRITE: &str = "kelp.write";

/// Pause after the last keystroke before evaluating.
const DEBOUNCE: Duration = Duration::from_millis(150);
/// Longest an evaluation may run before it is abandoned (its diagnostics say so).
const EVAL_BUDGET: Duration = Duration::from_secs(30);

struct Doc {
    text: String,
    version: i32,
    index: LineIndex,
    /// The checked program of this version (parse + check run once per edit).
    checked: Arc<kelp_lang::check::Checked>,
    /// Bumped on every edit; a finished evaluation publishes only if it is still current.
    generation: u64,
    eval: Option<Arc<EvalSummary>>,
}

impl Doc {
    /// Everything to publish for this version: the checker's diagnostics and, when the
    /// evaluation is known, its diagnostics.
    fn diagnostics(&self, uri: &Uri) -> Vec<Diagnostic> {
        let eval = self.eval.iter().flat_map(|e| e.diagnostics.iter());
        self.checked.diagnostics.iter().chain(eval).map(|d| convert::diagnostic(&self.index, uri, d)).collect()
    }
}

#[derive(Default)]
struct State {
    docs: HashMap<Uri, Doc>,
    /// Evaluations by the text's shape (tokens without comments), with the token spans
    /// of the text they were computed for.
    cache: HashMap<String, (Arc<EvalSummary>, Vec<Span>)>,
    /// The workspace folders the client named (outputs are written only inside them).
    folders: Vec<std::path::PathBuf>,
}

impl State {
    /// A cached evaluation for this text, re-anchored to it.
    fn cached(&self, text: &str) -> Option<Arc<EvalSummary>> {
        let now = reuse::shape(text);
        let (summary, spans) = self.cache.get(&now.key)?;
        if spans == &now.spans {
            return Some(summary.clone());
        }
        let old = reuse::Shape { key: now.key.clone(), spans: spans.clone() };
        Some(Arc::new(reuse::moved(summary, &old, &now)))
    }
}

pub struct Backend {
    client: Client,
    state: Arc<Mutex<State>>,
}

/// Serves on stdin/stdout until the client exits.
pub fn run() -> i32 {
    // Large stacks: the parser, checker and evaluator recurse over the syntax tree, whose
    // depth the parser bounds (K106) at a size a 2 MiB default stack cannot hold.
    let rt = match tokio::runtime::Builder::new_multi_thread()
        .worker_threads(2)
        .thread_stack_size(crate::STACK_BYTES)
        // Superseded evaluations cannot be stopped mid-way; at most 16 run at once (more
        // wait), which also bounds the address space the large stacks reserve.
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
        let (service, socket) =
            LspService::new(|client| Backend { client, state: Arc::new(Mutex::new(State::default())) });
        Server::new(tokio::io::stdin(), tokio::io::stdout(), socket).serve(service).await;
    });
    0
}

impl Backend {
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
        let job = tokio::task::spawn_blocking(move || {
            std::panic::catch_unwind(|| {
                let checked = kelp_lang::check(&text);
                let e =
                    kelp_evaluator::evaluate(&checked, &text, &kelp_evaluator::Mode::Run { base, only: Some(index) });
                let errors: Vec<String> =
                    e.diagnostics.iter().filter(|d| d.is_error()).map(|d| d.message.clone()).collect();
                (e.outputs, errors)
            })
        });
        let (message, written) = match tokio::time::timeout(EVAL_BUDGET, job).await {
            Ok(Ok(Ok((outputs, errors)))) => {
                if outputs.is_empty() {
                    (format!("kelp wrote nothing: {}", errors.join("; ")), vec![])
                } else {
                    (format!("kelp wrote {}", outputs.join(", ")), outputs)
                }
            }
            _ => (String::from("kelp: the output could not be written (evaluation failed or took too long)"), vec![]),
        };
        if let Some(p) = progress {
            p.finish_with_message(message.clone()).await;
        }
        let kind = if written.is_empty() { MessageType::WARNING } else { MessageType::INFO };
        self.client.show_message(kind, message).await;
        Ok(Some(serde_json::json!({ "written": written })))
    }

    fn lock(&self) -> std::sync::MutexGuard<'_, State> {
        // A panic elsewhere must not wedge the server: the state is still consistent.
        self.state.lock().unwrap_or_else(|e| e.into_inner())
    }

    /// Publishes the checker's diagnostics now (with the last evaluation's, if it is for
    /// this very text) and schedules an evaluation.
    async fn refresh(&self, uri: Uri) {
        let (diags, version, generation, text) = {
            let mut st = self.lock();
            let cached = st.docs.get(&uri).and_then(|d| st.cached(&d.text));
            let Some(doc) = st.docs.get_mut(&uri) else { return };
            doc.eval = cached.clone();
            (
                doc.diagnostics(&uri),
                doc.version,
                doc.generation,
                if cached.is_some() { None } else { Some(doc.text.clone()) },
            )
        };
        self.client.publish_diagnostics(uri.clone(), diags, Some(version)).await;
        if let Some(text) = text {
            self.schedule(uri, generation, text);
        }
    }

    fn schedule(&self, uri: Uri, generation: u64, text: String) {
        let state = self.state.clone();
        let client = self.client.clone();
        tokio::spawn(async move {
            tokio::time::sleep(DEBOUNCE).await;
            let current = |st: &State| st.docs.get(&uri).is_some_and(|d| d.generation == generation);
            if !current(&state.lock().unwrap_or_else(|e| e.into_inner())) {
                return;
            }
            let worker_text = text.clone();
            let job = tokio::task::spawn_blocking(move || evaluate_text(&worker_text));
            let summary = match tokio::time::timeout(EVAL_BUDGET, job).await {
                Ok(Ok(s)) => s,
                _ => EvalSummary {
                    diagnostics: vec![kelp_lang::Diagnostic::warning(
                        kelp_lang::Code::BudgetExceeded,
                        Span::new(0, 0),
                        format!("evaluation took longer than {} s and was abandoned", EVAL_BUDGET.as_secs()),
                    )],
                    values: vec![],
                    curve_hints: vec![],
                },
            };
            let summary = Arc::new(summary);
            let publish = {
                let mut st = state.lock().unwrap_or_else(|e| e.into_inner());
                if st.cache.len() > 64 {
                    st.cache.clear();
                }
                let shape = reuse::shape(&text);
                st.cache.insert(shape.key, (summary.clone(), shape.spans));
                if !current(&st) {
                    return;
                }
                let doc = st.docs.get_mut(&uri).unwrap();
                doc.eval = Some(summary.clone());
                (doc.diagnostics(&uri), doc.version)
            };
            client.publish_diagnostics(uri, publish.0, Some(publish.1)).await;
        });
    }

    /// The name (definition or use) under a position, with its symbol index.
    fn symbol_at(&self, uri: &Uri, pos: Position) -> Option<(usize, Span, String)> {
        let st = self.lock();
        let doc = st.docs.get(uri)?;
        let at = convert::offset(&doc.index, pos);
        let checked = &doc.checked;
        let hit = |s: Span| s.start <= at && at <= s.end;
        if let Some((i, s)) = checked.symbols.iter().enumerate().find(|(_, s)| hit(s.span)) {
            return Some((i, s.span, s.name.clone()));
        }
        let r = checked.references.iter().find(|r| hit(r.span))?;
        Some((r.symbol, r.span, r.name.clone()))
    }
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
            #[allow(deprecated)]
            let root = params.root_uri.iter().filter_map(|u| u.to_file_path().map(|p| p.to_path_buf())).collect();
            st.folders = match &params.workspace_folders {
                Some(f) => f.iter().filter_map(|w| w.uri.to_file_path().map(|p| p.to_path_buf())).collect(),
                None => root,
            };
        }
        Ok(InitializeResult {
            server_info: Some(ServerInfo { name: "kelp".into(), version: Some(env!("CARGO_PKG_VERSION").into()) }),
            capabilities: ServerCapabilities {
                position_encoding: Some(PositionEncodingKind::UTF16),
                text_document_sync: Some(TextDocumentSyncCapability::Kind(TextDocumentSyncKind::INCREMENTAL)),
                hover_provider: Some(HoverProviderCapability::Simple(true)),
                definition_provider: Some(OneOf::Left(true)),
                references_provider: Some(OneOf::Left(true)),
                rename_provider: Some(OneOf::Left(true)),
                document_symbol_provider: Some(OneOf::Left(true)),
                document_formatting_provider: Some(OneOf::Left(true)),
                completion_provider: Some(CompletionOptions::default()),
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
        {
            let mut st = self.lock();
            let index = LineIndex::new(&d.text);
            let checked = Arc::new(check(&d.text));
            st.docs.insert(
                d.uri.clone(),
                Doc { text: d.text, version: d.version, index, checked, generation: 0, eval: None },
            );
        }
        self.refresh(d.uri).await;
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
                match change.range {
                    None => doc.text = change.text,
                    Some(r) => {
                        let (a, b) = (convert::offset(&doc.index, r.start), convert::offset(&doc.index, r.end));
                        let (a, b) = (a.min(doc.text.len()), b.min(doc.text.len()).max(a.min(doc.text.len())));
                        if doc.text.is_char_boundary(a) && doc.text.is_char_boundary(b) {
                            doc.text.replace_range(a..b, &change.text);
                        }
                    }
                }
                doc.index = LineIndex::new(&doc.text);
            }
            doc.version = params.text_document.version;
            doc.checked = Arc::new(check(&doc.text));
            doc.generation += 1;
            doc.eval = None;
        }
        self.refresh(uri).await;
    }

    async fn did_close(&self, params: DidCloseTextDocumentParams) {
        let uri = params.text_document.uri;
        self.lock().docs.remove(&uri);
        self.client.publish_diagnostics(uri, vec![], None).await;
    }

    async fn hover(&self, params: HoverParams) -> Result<Option<Hover>> {
        let uri = params.text_document_position_params.text_document.uri;
        let pos = params.text_document_position_params.position;
        let sym = self.symbol_at(&uri, pos);
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let at = convert::offset(&doc.index, pos);
        let (text, span) = if let Some((_, span, name)) = sym {
            let shown = doc.eval.as_ref().and_then(|e| e.values.iter().find(|v| v.name == name).cloned());
            let body = match shown {
                Some(v) => {
                    let mut b = format!("**{}** ({})\n\n```\n{}\n```", v.name, v.kind, v.display);
                    if v.error_bound > 0.0 {
                        b.push_str(&format!("\nerror bound {:.1e}", v.error_bound));
                    }
                    if let Some(d) = &v.detail {
                        b.push_str(&format!("\n\n{d}"));
                    }
                    b
                }
                None if doc.eval.is_none() => format!("**{name}**: being computed"),
                None => format!("**{name}**: no value (see its diagnostics)"),
            };
            (body, span)
        } else if let Some((s, e)) = word_at(&doc.text, at) {
            let word = &doc.text[s..e];
            let Some(b) = kelp_lang::builtins::BUILTINS.iter().find(|b| b.name == word) else { return Ok(None) };
            (format!("```\n{}\n```\n{}", b.signature, b.summary), Span::new(s, e))
        } else {
            return Ok(None);
        };
        // Curve facts: the information diagnostic at the curve's name lists them.
        let mut text = text;
        if let Some(ev) = &doc.eval {
            for d in ev.diagnostics.iter().filter(|d| d.code == kelp_lang::Code::ValueInfo && d.span == span) {
                text.push_str(&format!("\n\n{}", d.message));
                for n in &d.notes {
                    text.push_str(&format!("\n- {n}"));
                }
            }
        }
        Ok(Some(Hover {
            contents: HoverContents::Markup(MarkupContent { kind: MarkupKind::Markdown, value: text }),
            range: Some(convert::range(&doc.index, span)),
        }))
    }

    async fn goto_definition(&self, params: GotoDefinitionParams) -> Result<Option<GotoDefinitionResponse>> {
        let uri = params.text_document_position_params.text_document.uri;
        let Some((sym, _, _)) = self.symbol_at(&uri, params.text_document_position_params.position) else {
            return Ok(None);
        };
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let s = &doc.checked.symbols[sym];
        Ok(Some(GotoDefinitionResponse::Scalar(Location {
            uri: uri.clone(),
            range: convert::range(&doc.index, s.span),
        })))
    }

    async fn references(&self, params: ReferenceParams) -> Result<Option<Vec<Location>>> {
        let uri = params.text_document_position.text_document.uri;
        let Some((sym, _, _)) = self.symbol_at(&uri, params.text_document_position.position) else {
            return Ok(None);
        };
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let checked = &doc.checked;
        let mut spans: Vec<Span> = checked.references.iter().filter(|r| r.symbol == sym).map(|r| r.span).collect();
        if params.context.include_declaration {
            spans.insert(0, checked.symbols[sym].span);
        }
        Ok(Some(
            spans.into_iter().map(|s| Location { uri: uri.clone(), range: convert::range(&doc.index, s) }).collect(),
        ))
    }

    async fn rename(&self, params: RenameParams) -> Result<Option<WorkspaceEdit>> {
        let uri = params.text_document_position.text_document.uri;
        let new = params.new_name;
        let valid = new.chars().next().is_some_and(|c| c.is_ascii_alphabetic() || c == '_')
            && new.chars().all(|c| c.is_ascii_alphanumeric() || c == '_');
        if !valid {
            return Err(tower_lsp_server::jsonrpc::Error::invalid_params(format!("`{new}` is not a valid name")));
        }
        let Some((sym, _, _)) = self.symbol_at(&uri, params.text_document_position.position) else {
            return Ok(None);
        };
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let checked = &doc.checked;
        let mut spans = vec![checked.symbols[sym].span];
        spans.extend(checked.references.iter().filter(|r| r.symbol == sym).map(|r| r.span));
        let edits = spans
            .into_iter()
            .map(|s| TextEdit { range: convert::range(&doc.index, s), new_text: new.clone() })
            .collect();
        Ok(Some(WorkspaceEdit::new(HashMap::from([(uri.clone(), edits)]))))
    }

    async fn document_symbol(&self, params: DocumentSymbolParams) -> Result<Option<DocumentSymbolResponse>> {
        let st = self.lock();
        let Some(doc) = st.docs.get(&params.text_document.uri) else { return Ok(None) };
        let checked = &doc.checked;
        #[allow(deprecated)] // `deprecated` is a required field of the LSP type
        let symbols = checked
            .symbols
            .iter()
            .map(|s| {
                let stmt = checked.program.stmts[s.stmt].span;
                DocumentSymbol {
                    name: s.name.clone(),
                    detail: Some(format!("{:?}", s.def).to_lowercase()),
                    kind: match format!("{:?}", s.def).as_str() {
                        "Curve" => SymbolKind::CLASS,
                        "Wave" => SymbolKind::EVENT,
                        _ => SymbolKind::VARIABLE,
                    },
                    tags: None,
                    deprecated: None,
                    range: convert::range(&doc.index, stmt),
                    selection_range: convert::range(&doc.index, s.span),
                    children: None,
                }
            })
            .collect();
        Ok(Some(DocumentSymbolResponse::Nested(symbols)))
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

    async fn completion(&self, params: CompletionParams) -> Result<Option<CompletionResponse>> {
        let uri = params.text_document_position.text_document.uri;
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let checked = &doc.checked;
        let mut items: Vec<CompletionItem> = Vec::new();
        for k in assist::STATEMENT_KEYWORDS.iter().chain(assist::OTHER_KEYWORDS) {
            items.push(CompletionItem {
                label: k.to_string(),
                kind: Some(CompletionItemKind::KEYWORD),
                ..Default::default()
            });
        }
        for s in &checked.symbols {
            items.push(CompletionItem {
                label: s.name.clone(),
                kind: Some(CompletionItemKind::VARIABLE),
                detail: Some(format!("{:?}", s.def).to_lowercase()),
                ..Default::default()
            });
        }
        for b in kelp_lang::builtins::BUILTINS {
            items.push(CompletionItem {
                label: b.name.to_string(),
                kind: Some(CompletionItemKind::FUNCTION),
                detail: Some(b.signature.to_string()),
                documentation: Some(Documentation::String(b.summary.to_string())),
                insert_text: Some(assist::call_snippet(b)),
                insert_text_format: Some(InsertTextFormat::SNIPPET),
                ..Default::default()
            });
        }
        Ok(Some(CompletionResponse::Array(items)))
    }

    async fn signature_help(&self, params: SignatureHelpParams) -> Result<Option<SignatureHelp>> {
        let uri = params.text_document_position_params.text_document.uri;
        let st = self.lock();
        let Some(doc) = st.docs.get(&uri) else { return Ok(None) };
        let at = convert::offset(&doc.index, params.text_document_position_params.position);
        let Some((b, arg)) = assist::call_at(&doc.text, at) else { return Ok(None) };
        let parameters: Vec<ParameterInformation> = b
            .positional
            .iter()
            .chain(b.keywords)
            .map(|p| ParameterInformation { label: ParameterLabel::Simple(p.name.to_string()), documentation: None })
            .collect();
        let active = arg.min(parameters.len().saturating_sub(1) as u32);
        Ok(Some(SignatureHelp {
            signatures: vec![SignatureInformation {
                label: b.signature.to_string(),
                documentation: Some(Documentation::String(b.summary.to_string())),
                parameters: Some(parameters),
                active_parameter: Some(active),
            }],
            active_signature: Some(0),
            active_parameter: Some(active),
        }))
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
            let shown = doc.eval.as_ref().and_then(|e| e.values.iter().find(|v| v.name == s.name));
            let title = match shown {
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
        let (text, cached) = {
            let st = self.lock();
            let Some(doc) = st.docs.get(&uri) else {
                return Err(Error::invalid_params("the document is not open"));
            };
            (doc.text.clone(), doc.eval.clone())
        };
        // Progress only when the client offered a token: no request back to the client
        // is awaited from here.
        let progress = match params.work_done_progress_params.work_done_token {
            Some(token) => Some(self.client.progress(token, format!("kelp: evaluating {name}")).begin().await),
            None => None,
        };
        let summary = match cached {
            Some(s) => s,
            None => {
                let job = tokio::task::spawn_blocking(move || evaluate_text(&text));
                match tokio::time::timeout(EVAL_BUDGET, job).await {
                    Ok(Ok(s)) => Arc::new(s),
                    _ => {
                        if let Some(p) = progress {
                            p.finish_with_message("abandoned").await;
                        }
                        return Err(Error::internal_error());
                    }
                }
            }
        };
        let shown = summary.values.iter().find(|v| v.name == name).cloned();
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
            let line_end = doc.text[span.start..span.end].find('\n').map_or(span.end, |i| span.start + i);
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
        let Some(eval) = &doc.eval else { return Ok(Some(vec![])) };
        let mut hints = Vec::new();
        for s in &doc.checked.symbols {
            // After a curve: its genus or what stands in the way; after a matrix value: its size.
            let label = if let Some((_, h)) = eval.curve_hints.iter().find(|(n, _)| *n == s.name) {
                h.clone()
            } else if let Some(v) = eval.values.iter().find(|v| v.name == s.name && v.kind == "matrix") {
                size_of(&v.display)
            } else {
                continue;
            };
            let end = doc.checked.program.stmts[s.stmt].span.end;
            hints.push(InlayHint {
                position: convert::position(&doc.index, end),
                label: InlayHintLabel::String(format!("  {label}")),
                kind: None,
                text_edits: None,
                tooltip: None,
                padding_left: Some(true),
                padding_right: None,
                data: None,
            });
        }
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
