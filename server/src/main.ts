/**
 * Entry point of the eigenlens language server. The transport (stdio, IPC or a socket) is
 * chosen by vscode-languageserver from the command line: `--stdio`, `--node-ipc`, `--socket=N`.
 */
import { startServer } from './lsp/server';

startServer();
