// Stand-ins for the `vscode` module and the language client, so that the compiled
// extension can be loaded and activated by plain Node (VS Code itself is not available).
"use strict";
const Module = require("node:module");
const path = require("node:path");

const OUT = path.join(__dirname, "..", "out");

/** Loads `file` with `require(name)` answered from `fakes` for the names it lists. */
function loadWith(file, fakes) {
  const resolved = require.resolve(file);
  delete require.cache[resolved];
  const original = Module._load;
  Module._load = function (request, parent, isMain) {
    if (Object.prototype.hasOwnProperty.call(fakes, request)) {
      return fakes[request];
    }
    return original.call(this, request, parent, isMain);
  };
  try {
    return require(resolved);
  } finally {
    Module._load = original;
  }
}

/** A `vscode` module with just what the extension and the command feature touch. */
function fakeVscode({ settings = {}, folders = [] } = {}) {
  const listeners = [];
  const vscode = {
    settings: { ...settings },
    errors: [],
    registered: new Map(),
    workspace: {
      workspaceFolders: folders.map((fsPath) => ({ uri: { fsPath } })),
      getConfiguration(section) {
        return {
          get(key, fallback) {
            const value = vscode.settings[`${section}.${key}`];
            return value === undefined ? fallback : value;
          },
        };
      },
      onDidChangeConfiguration(listener) {
        listeners.push(listener);
        return { dispose() {} };
      },
    },
    window: {
      showErrorMessage(message) {
        vscode.errors.push(message);
        return Promise.resolve(undefined);
      },
    },
    commands: {
      registerCommand(id, handler) {
        if (vscode.registered.has(id)) {
          throw new Error(`command '${id}' already exists`);
        }
        vscode.registered.set(id, handler);
        return { dispose: () => vscode.registered.delete(id) };
      },
    },
    /** Changes a setting and tells the listeners, as VS Code does. */
    async change(key, value) {
      vscode.settings[key] = value;
      const event = { affectsConfiguration: (s) => key === s || key.startsWith(`${s}.`) };
      for (const listener of listeners) {
        await listener(event);
      }
    },
  };
  return withClasses(vscode);
}

/** Any other name the client library reads at load time (`class X extends vscode.Y`) is an empty class. */
function withClasses(vscode) {
  const made = new Map();
  return new Proxy(vscode, {
    get(target, name) {
      if (name in target || typeof name === "symbol" || name === "then") {
        return target[name];
      }
      if (!made.has(name)) {
        made.set(name, class {});
      }
      return made.get(name);
    },
  });
}

/** A `vscode-languageclient/node` whose LanguageClient records how it was made and used. */
function fakeClientLibrary({ failStart } = {}) {
  const made = [];
  class LanguageClient {
    constructor(id, name, serverOptions, clientOptions) {
      Object.assign(this, { id, name, serverOptions, clientOptions, started: 0, stopped: 0 });
      made.push(this);
    }
    async start() {
      this.started += 1;
      if (failStart) {
        throw new Error(failStart);
      }
    }
    async stop() {
      this.stopped += 1;
    }
  }
  return { made, module: { LanguageClient } };
}

function fakeContext() {
  return { subscriptions: [] };
}

module.exports = { OUT, loadWith, fakeVscode, fakeClientLibrary, fakeContext };
