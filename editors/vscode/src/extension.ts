// Starts `kelp lsp` for .kelp files; restarts it when `kelp.serverPath` changes.
// The server's commands (`kelp.evaluate`, `kelp.write`, run by code lenses) are registered
// by the language client from the server's executeCommandProvider.
import * as os from "os";
import * as vscode from "vscode";
import { LanguageClient } from "vscode-languageclient/node";
import { CLIENT_ID, CLIENT_NAME, clientOptions, serverExecutable, startFailureMessage } from "./options";

let client: LanguageClient | undefined;

async function start(): Promise<void> {
  const setting = vscode.workspace.getConfiguration("kelp").get<string>("serverPath");
  const folder = vscode.workspace.workspaceFolders?.[0]?.uri.fsPath;
  const server = serverExecutable(setting, { home: os.homedir(), workspaceFolder: folder });
  client = new LanguageClient(CLIENT_ID, CLIENT_NAME, server, clientOptions());
  try {
    await client.start();
  } catch (error) {
    client = undefined;
    void vscode.window.showErrorMessage(startFailureMessage(server, error));
  }
}

async function stop(): Promise<void> {
  const running = client;
  client = undefined;
  await running?.stop();
}

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  context.subscriptions.push(
    vscode.workspace.onDidChangeConfiguration(async (event) => {
      if (event.affectsConfiguration("kelp.serverPath")) {
        await stop();
        await start();
      }
    }),
  );
  await start();
}

export async function deactivate(): Promise<void> {
  await stop();
}
