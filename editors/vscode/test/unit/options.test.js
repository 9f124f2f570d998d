// The settings → server command logic, tested without VS Code.
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const path = require("node:path");
const Module = require("node:module");
const { OUT } = require("../fakes");

const manifest = require("../../package.json");
const places = { home: "/home/ada", workspaceFolder: "/work/proj" };

function loadOptions() {
  // The module must load where `vscode` does not exist: make any require of it fail.
  const file = path.join(OUT, "options.js");
  delete require.cache[file];
  const original = Module._load;
  Module._load = function (request, ...rest) {
    if (request === "vscode" || request.startsWith("vscode-languageclient")) {
      throw new Error(`options.js must not load ${request}`);
    }
    return original.call(this, request, ...rest);
  };
  try {
    return require(file);
  } finally {
    Module._load = original;
  }
}
const options = loadOptions();

test("no setting, an empty one or a non-string one starts `kelp` from the PATH", () => {
  // The default named in package.json's contributed setting (the README promises `kelp`).
  assert.equal(manifest.contributes.configuration.properties["kelp.serverPath"].default, "kelp");
  for (const setting of [undefined, null, "", "   ", 42]) {
    assert.equal(options.resolveServerCommand(setting, places), "kelp", String(setting));
  }
});

test("bare names and absolute paths are kept (the OS searches the PATH for bare names)", () => {
  // execvp semantics: a name without a slash is searched on PATH (common practice, no source).
  assert.equal(options.resolveServerCommand("kelp-dev", places), "kelp-dev");
  assert.equal(options.resolveServerCommand("  /opt/kelp/bin/kelp ", places), "/opt/kelp/bin/kelp");
});

test("`~/` is the home folder and relative paths are taken from the workspace folder", () => {
  // Node's path.join/path.resolve semantics (Node documentation, path module).
  assert.equal(options.resolveServerCommand("~/.cargo/bin/kelp", places), "/home/ada/.cargo/bin/kelp");
  assert.equal(options.resolveServerCommand("~", places), "/home/ada");
  assert.equal(options.resolveServerCommand("./target/release/kelp", places), "/work/proj/target/release/kelp");
  assert.equal(options.resolveServerCommand("../bin/kelp", places), "/work/bin/kelp");
  // No folder open: left for the OS to resolve against the current directory.
  assert.equal(options.resolveServerCommand("target/kelp", { home: "/home/ada" }), "target/kelp");
});

test("the server is `<command> lsp`, a fresh argument list each time", () => {
  // `kelp lsp` is the server subcommand (lsp/src/cli.rs, editors/README.md).
  const a = options.serverExecutable("~/kelp", places);
  assert.deepEqual(a, { command: "/home/ada/kelp", args: ["lsp"] });
  a.args.push("--oops");
  assert.deepEqual(options.serverExecutable(undefined, places).args, ["lsp"]);
});

test("documents served: the contributed language, on disk and unsaved", () => {
  // The language id must be the one package.json contributes for `.kelp`; `file` and
  // `untitled` are VS Code's URI schemes for saved and new documents (VS Code API, DocumentFilter).
  const contributed = manifest.contributes.languages.find((l) => l.extensions.includes(".kelp"));
  assert.ok(contributed, "package.json contributes a language for .kelp");
  assert.deepEqual(options.documentSelector(), [
    { scheme: "file", language: contributed.id },
    { scheme: "untitled", language: contributed.id },
  ]);
  assert.deepEqual(options.clientOptions(), { documentSelector: options.documentSelector(), outputChannelName: "kelp" });
});

test("a start failure names the command and the setting to fix", () => {
  const message = options.startFailureMessage({ command: "/nope/kelp", args: ["lsp"] }, new Error("spawn ENOENT"));
  assert.match(message, /`\/nope\/kelp lsp`/);
  assert.match(message, /spawn ENOENT/);
  assert.match(message, /kelp\.serverPath/);
  assert.match(options.startFailureMessage({ command: "kelp", args: ["lsp"] }, "odd"), /\(odd\)/);
});
