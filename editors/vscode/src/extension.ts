// Starts `kelp lsp` for .kelp files.
import * as vscode from "vscode";
import { LanguageClient, LanguageClientOptions, ServerOptions } from "vscode-languageclient/node";

let client: LanguageClient | undefined;

export async function activate(_context: vscode.ExtensionContext): Promise<void> {
  const command = vscode.workspace.getConfiguration("kelp").get<string>("serverPath", "kelp");
  const server: ServerOptions = { command, args: ["lsp"] };
  const options: LanguageClientOptions = { documentSelector: [{ scheme: "file", language: "kelp" }] };
  client = new LanguageClient("kelp", "kelp", server, options);
  await client.start();
}

export async function deactivate(): Promise<void> {
  await client?.stop();
}
