// Code lenses run the server's commands: the language client (the real library, with a
// fake `vscode`) registers every command the server advertises and forwards it as
// workspace/executeCommand, so the extension itself must not register them.
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const { loadWith, fakeVscode } = require("../fakes");

// The commands `kelp lsp` advertises in executeCommandProvider and puts in its code lenses
// (lsp/src/server/mod.rs: EVALUATE and WRITE).
const SERVER_COMMANDS = ["kelp.evaluate", "kelp.write"];

function feature(vscode, sent) {
  const { ExecuteCommandFeature } = loadWith(require.resolve("vscode-languageclient/lib/common/executeCommand"), {
    vscode,
  });
  const client = {
    middleware: {},
    sendRequest: async (type, params) => {
      sent.push({ method: type.method, params });
      return { name: "g", value: "2" };
    },
    handleFailedRequest: (_type, _token, error) => {
      throw error;
    },
  };
  return new ExecuteCommandFeature(client);
}

test("the server's commands become VS Code commands that send workspace/executeCommand", async () => {
  const vscode = fakeVscode();
  const sent = [];
  feature(vscode, sent).initialize({ executeCommandProvider: { commands: SERVER_COMMANDS } });
  assert.deepEqual([...vscode.registered.keys()].sort(), SERVER_COMMANDS);
  // A code lens `kelp.evaluate` with arguments [uri, name] (as the server builds them).
  const result = await vscode.registered.get("kelp.evaluate")("file:///w/a.kelp", "g");
  assert.deepEqual(sent, [
    { method: "workspace/executeCommand", params: { command: "kelp.evaluate", arguments: ["file:///w/a.kelp", "g"] } },
  ]);
  assert.deepEqual(result, { name: "g", value: "2" });
  await vscode.registered.get("kelp.write")("file:///w/a.kelp", 3);
  assert.deepEqual(sent[1].params, { command: "kelp.write", arguments: ["file:///w/a.kelp", 3] });
});

test("the extension contributes no command of the same name (a second registration would throw)", () => {
  const manifest = require("../../package.json");
  const contributed = (manifest.contributes.commands || []).map((c) => c.command);
  for (const command of SERVER_COMMANDS) {
    assert.ok(!contributed.includes(command), command);
  }
  // The fake refuses duplicates as VS Code does ("command already exists"): the check above matters.
  const vscode = fakeVscode();
  vscode.commands.registerCommand("kelp.evaluate", () => {});
  const twice = feature(vscode, []);
  assert.throws(() => twice.initialize({ executeCommandProvider: { commands: SERVER_COMMANDS } }), /already exists/);
});
