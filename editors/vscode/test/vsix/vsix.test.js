// The packaged .vsix (run `npm run package` first): what VS Code needs is inside, nothing
// from development is, and the engines it declares fit the client library it carries.
"use strict";
const test = require("node:test");
const assert = require("node:assert/strict");
const fs = require("node:fs");
const os = require("node:os");
const path = require("node:path");
const { readZip } = require("../zip");
const { loadWith, fakeVscode } = require("../fakes");

const ROOT = path.join(__dirname, "..", "..");
const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, "package.json"), "utf8"));
const lock = JSON.parse(fs.readFileSync(path.join(ROOT, "package-lock.json"), "utf8"));
// vsce's default output name is `<name>-<version>.vsix`; the README installs that file.
const FILE = path.join(ROOT, `${manifest.name}-${manifest.version}.vsix`);

function open() {
  assert.ok(fs.existsSync(FILE), `${path.basename(FILE)} is missing: run \`npm run package\` first`);
  return readZip(fs.readFileSync(FILE));
}

/** `^1.82.0` → [1, 82, 0]; only the caret ranges these manifests use are accepted. */
function caretMinimum(range) {
  const m = /^\^(\d+)\.(\d+)\.(\d+)$/.exec(range);
  assert.ok(m, `unexpected range ${range}`);
  return m.slice(1).map(Number);
}
function compare(a, b) {
  for (let i = 0; i < 3; i++) {
    if (a[i] !== b[i]) return a[i] - b[i];
  }
  return 0;
}

// Runtime packages: the lockfile's entries not marked dev (npm's package-lock.json format,
// `dev: true` marks packages needed only by devDependencies).
const runtime = Object.entries(lock.packages)
  .filter(([key, entry]) => key.startsWith("node_modules/") && !entry.dev)
  .map(([key]) => key.slice("node_modules/".length));
const devOnly = Object.entries(lock.packages)
  .filter(([key, entry]) => key.startsWith("node_modules/") && entry.dev && !key.includes("/node_modules/", 13))
  .map(([key]) => key.slice("node_modules/".length));

test("the vsix holds the VSIX manifest, the extension's files and what its package.json points to", () => {
  const zip = open();
  const names = new Set(zip.names);
  // A VSIX is an OPC package: [Content_Types].xml and extension.vsixmanifest at the top
  // (vsce's packaging layout; VSIX schema 2.0).
  for (const name of ["[Content_Types].xml", "extension.vsixmanifest", "extension/package.json"]) {
    assert.ok(names.has(name), name);
  }
  const packed = JSON.parse(zip.read("extension/package.json"));
  const pointed = [
    packed.main.replace(/^\.\//, ""),
    ...packed.contributes.languages.map((l) => l.configuration.replace(/^\.\//, "")),
    ...packed.contributes.grammars.map((g) => g.path.replace(/^\.\//, "")),
  ];
  assert.deepEqual(pointed.sort(), ["language-configuration.json", "out/extension.js", "syntaxes/kelp.tmLanguage.json"]);
  for (const file of [...pointed, "out/options.js"]) {
    assert.ok(names.has(`extension/${file}`), file);
  }
  // The grammar and the language configuration are the committed files, byte for byte.
  for (const file of ["syntaxes/kelp.tmLanguage.json", "language-configuration.json"]) {
    assert.deepEqual(zip.read(`extension/${file}`), fs.readFileSync(path.join(ROOT, file)), file);
  }
  const manifestXml = zip.read("extension.vsixmanifest").toString("utf8");
  assert.match(manifestXml, new RegExp(`Id="${manifest.name}" Version="${manifest.version}" Publisher="${manifest.publisher}"`));
});

test("every runtime package of the lockfile is inside, with its entry file; no development file is", () => {
  const zip = open();
  const names = new Set(zip.names);
  assert.ok(runtime.includes("vscode-languageclient"), "the lockfile lists vscode-languageclient as runtime");
  for (const pkg of runtime) {
    const base = `extension/node_modules/${pkg}`;
    assert.ok(names.has(`${base}/package.json`), `${pkg}/package.json`);
    const packed = JSON.parse(zip.read(`${base}/package.json`));
    const main = (packed.main || "index.js").replace(/^\.\//, "");
    const candidates = [main, `${main}.js`, `${main}/index.js`].map((m) => `${base}/${m}`);
    assert.ok(candidates.some((c) => names.has(c)), `${pkg}: entry ${main}`);
  }
  // vscode-languageclient/node is what out/extension.js requires.
  for (const file of ["node.js", "lib/node/main.js", "lib/common/api.js", "lib/common/executeCommand.js"]) {
    assert.ok(names.has(`extension/node_modules/vscode-languageclient/${file}`), file);
  }
  assert.ok(devOnly.includes("typescript") && devOnly.includes("@vscode/vsce"), "the lockfile marks the tools dev");
  for (const name of zip.names) {
    assert.ok(!/^extension\/(src|test|\.npm-cache)\//.test(name), name);
    assert.ok(!/\.(ts|map|vsix)$/.test(name), name);
    for (const pkg of devOnly) {
      assert.ok(!name.startsWith(`extension/node_modules/${pkg}/`), name);
    }
  }
  // Small: a few hundred KB (common practice, no source); 1 MB leaves room, 60 MB would mean
  // node_modules of the tools slipped in.
  assert.ok(fs.statSync(FILE).size < 1024 * 1024, `${fs.statSync(FILE).size} bytes`);
});

test("engines.vscode in the vsix fits the packed vscode-languageclient and the typings used", () => {
  const zip = open();
  const packed = JSON.parse(zip.read("extension/package.json"));
  assert.equal(packed.engines.vscode, manifest.engines.vscode);
  const ours = caretMinimum(packed.engines.vscode);
  // The client library states the oldest VS Code it runs on in its own package.json.
  const library = JSON.parse(zip.read("extension/node_modules/vscode-languageclient/package.json"));
  assert.ok(compare(ours, caretMinimum(library.engines.vscode)) >= 0, `${packed.engines.vscode} vs ${library.engines.vscode}`);
  assert.equal(ours[0], caretMinimum(library.engines.vscode)[0], "same major version");
  // vsce refuses @types/vscode newer than engines.vscode (vsce, out/validation.js:
  // validateVSCodeTypesCompatibility).
  const types = lock.packages["node_modules/@types/vscode"].version.split(".").map(Number);
  assert.ok(compare(types, ours) <= 0, `@types/vscode ${types.join(".")} is newer than ${packed.engines.vscode}`);
});

test("the packed extension loads with its packed client library (only `vscode` faked)", () => {
  const zip = open();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "kelp-vsix-"));
  try {
    for (const name of zip.names.filter((n) => n.startsWith("extension/") && !n.endsWith("/"))) {
      const target = path.join(dir, name);
      fs.mkdirSync(path.dirname(target), { recursive: true });
      fs.writeFileSync(target, zip.read(name));
    }
    const extension = loadWith(path.join(dir, "extension/out/extension.js"), { vscode: fakeVscode() });
    assert.equal(typeof extension.activate, "function");
    assert.equal(typeof extension.deactivate, "function");
    // The client library came from the vsix, not from the development node_modules.
    const loaded = Object.keys(require.cache).filter((f) => f.startsWith(dir));
    assert.ok(loaded.some((f) => f.endsWith(path.join("vscode-languageclient", "lib", "node", "main.js"))), "packed client");
    for (const f of loaded) delete require.cache[f];
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
});
