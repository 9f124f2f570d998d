// What the extension starts and for which documents, kept free of `vscode` so that
// plain Node can test it (VS Code is not needed to check these decisions).
import * as os from "os";
import * as path from "path";

export const CLIENT_ID = "kelp";
export const CLIENT_NAME = "kelp";
export const LANGUAGE_ID = "kelp";
export const DEFAULT_SERVER = "kelp";
export const SERVER_ARGS: readonly string[] = ["lsp"];

/** Where a relative `kelp.serverPath` is taken from. */
export interface Places {
  home: string;
  workspaceFolder?: string;
}

/**
 * The executable named by the `kelp.serverPath` setting: a bare name is looked up on the
 * PATH by the operating system; `~/...` is under the home folder; a relative path with a
 * separator is taken from the first workspace folder (not from wherever VS Code started).
 */
export function resolveServerCommand(setting: unknown, places: Places = { home: os.homedir() }): string {
  const value = typeof setting === "string" ? setting.trim() : "";
  if (value === "") {
    return DEFAULT_SERVER;
  }
  if (value === "~" || value.startsWith("~/")) {
    return path.join(places.home, value.slice(1));
  }
  const hasSeparator = value.includes("/") || value.includes(path.sep);
  if (hasSeparator && !path.isAbsolute(value) && places.workspaceFolder !== undefined) {
    return path.resolve(places.workspaceFolder, value);
  }
  return value;
}

/** The server process: `<serverPath> lsp` over stdio (the client's default transport). */
export interface ServerExecutable {
  command: string;
  args: string[];
}

export function serverExecutable(setting: unknown, places?: Places): ServerExecutable {
  return { command: resolveServerCommand(setting, places), args: [...SERVER_ARGS] };
}

/** `.kelp` files on disk and unsaved buffers set to the kelp language. */
export function documentSelector(): { scheme: string; language: string }[] {
  return [
    { scheme: "file", language: LANGUAGE_ID },
    { scheme: "untitled", language: LANGUAGE_ID },
  ];
}

export function clientOptions(): { documentSelector: { scheme: string; language: string }[]; outputChannelName: string } {
  return { documentSelector: documentSelector(), outputChannelName: CLIENT_NAME };
}

/** What the user sees when the server cannot be started: the command and the setting to fix. */
export function startFailureMessage(server: ServerExecutable, error: unknown): string {
  const reason = error instanceof Error ? error.message : String(error);
  return (
    `kelp: could not start \`${[server.command, ...server.args].join(" ")}\` (${reason}). ` +
    "Install kelp (`cargo install --path lsp`) or set `kelp.serverPath` to the kelp executable."
  );
}
