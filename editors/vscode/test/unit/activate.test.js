// out/extension.js activated against a fake `vscode`: the LanguageClient it builds.
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const path = require("node:path");
const os = require("node:os");
const { OUT, loadWith, fakeVscode, fakeClientLibrary, fakeContext } = require("../fakes");

function activateWith({ settings, folders, failStart } = {}) {
  const vscode = fakeVscode({ settings, folders });
  const library = fakeClientLibrary({ failStart });
  const extension = loadWith(path.join(OUT, "extension.js"), {
    vscode,
    "vscode-languageclient/node": library.module,
  });
  return { vscode, made: library.made, extension };
}

test("activation starts one client: `kelp lsp` for kelp documents", async () => {
  const { vscode, made, extension } = activateWith();
  const context = fakeContext();
  await extension.activate(context);
  assert.equal(made.length, 1);
  const client = made[0];
  // The client id `kelp` is also the prefix of the client's own `kelp.trace.server` setting
  // (vscode-languageclient reads `<id>.trace.server`).
  assert.equal(client.id, "kelp");
  assert.equal(client.name, "kelp");
  // Executable server options without a transport: the client talks stdio (vscode-languageclient,
  // lib/node/main.js: `transport === undefined || transport === TransportKind.stdio`).
  assert.deepEqual(client.serverOptions, { command: "kelp", args: ["lsp"] });
  assert.equal(client.serverOptions.transport, undefined);
  assert.deepEqual(client.clientOptions.documentSelector, [
    { scheme: "file", language: "kelp" },
    { scheme: "untitled", language: "kelp" },
  ]);
  assert.equal(client.started, 1);
  assert.equal(context.subscriptions.length, 1, "the settings listener is disposed with the extension");
  assert.deepEqual(vscode.errors, []);
  await extension.deactivate();
  assert.equal(client.stopped, 1);
});

test("kelp.serverPath is honoured, relative to the first workspace folder", async () => {
  const { made, extension } = activateWith({
    settings: { "kelp.serverPath": "./target/release/kelp" },
    folders: ["/work/one", "/work/two"],
  });
  await extension.activate(fakeContext());
  assert.deepEqual(made[0].serverOptions, { command: "/work/one/target/release/kelp", args: ["lsp"] });
  const home = activateWith({ settings: { "kelp.serverPath": "~/.cargo/bin/kelp" } });
  await home.extension.activate(fakeContext());
  assert.equal(home.made[0].serverOptions.command, path.join(os.homedir(), ".cargo/bin/kelp"));
});

test("changing kelp.serverPath restarts the server with the new command; other settings do not", async () => {
  const { vscode, made, extension } = activateWith();
  await extension.activate(fakeContext());
  await vscode.change("editor.fontSize", 14);
  assert.equal(made.length, 1);
  await vscode.change("kelp.serverPath", "/opt/kelp");
  assert.equal(made.length, 2);
  assert.equal(made[0].stopped, 1);
  assert.deepEqual(made[1].serverOptions, { command: "/opt/kelp", args: ["lsp"] });
  assert.equal(made[1].started, 1);
  await extension.deactivate();
  assert.equal(made[1].stopped, 1);
  assert.equal(made[0].stopped, 1, "the old client is not stopped twice");
});

test("a server that cannot start gives an error naming the setting, and activation still succeeds", async () => {
  const { vscode, made, extension } = activateWith({
    settings: { "kelp.serverPath": "/nowhere/kelp" },
    failStart: "spawn /nowhere/kelp ENOENT",
  });
  await extension.activate(fakeContext());
  assert.equal(made.length, 1);
  assert.equal(vscode.errors.length, 1);
  assert.match(vscode.errors[0], /`\/nowhere\/kelp lsp`/);
  assert.match(vscode.errors[0], /ENOENT/);
  assert.match(vscode.errors[0], /kelp\.serverPath/);
  // Nothing to stop: deactivation must not touch the failed client.
  await extension.deactivate();
  assert.equal(made[0].stopped, 0);
});
