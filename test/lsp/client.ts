// A tiny LSP test client over real stdio: spawns the built server (dist/server.js --stdio),
// answers the requests a real editor answers (configuration, registration, applyEdit,
// refreshes) and records published diagnostics. One server per test file.
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';
import {
  createProtocolConnection,
  StreamMessageReader,
  StreamMessageWriter,
  type ProtocolConnection,
  type PublishDiagnosticsParams,
  type Position,
  type WorkspaceEdit,
  type TextEdit,
} from 'vscode-languageserver-protocol/node';

export interface TestClient {
  connection: ProtocolConnection;
  process: ChildProcess;
  settings: Record<string, unknown>;
  appliedEdits: WorkspaceEdit[];
  stderr: string[];
  open(uri: string, languageId: string, text: string): Promise<void>;
  change(uri: string, text: string): Promise<void>;
  close(uri: string): Promise<void>;
  /** Resolves with the first diagnostics published for `uri` at `version` (or later). */
  diagnostics(uri: string, version: number, timeoutMs?: number): Promise<PublishDiagnosticsParams>;
  /** Resolves with the newest diagnostics published for `uri` that satisfy `test` (waiting for one). */
  diagnosticsWhere(uri: string, test: (p: PublishDiagnosticsParams) => boolean, timeoutMs?: number): Promise<PublishDiagnosticsParams>;
  /** Every publication for `uri` so far, oldest first. */
  publishedFor(uri: string): PublishDiagnosticsParams[];
  versionOf(uri: string): number;
  shutdown(): Promise<void>;
}

/** `resolveActionEdits`: declare codeAction/resolve support for `edit`, as VS Code does. */
export async function startClient(settings: Record<string, unknown> = {}, options: { resolveActionEdits?: boolean } = {}): Promise<TestClient> {
  const serverPath = join(process.cwd(), 'dist', 'server.js');
  const child = spawn(process.execPath, [serverPath, '--stdio'], { stdio: ['pipe', 'pipe', 'pipe'] });
  const stderr: string[] = [];
  child.stderr!.on('data', (chunk: Buffer) => stderr.push(chunk.toString()));
  const connection = createProtocolConnection(new StreamMessageReader(child.stdout!), new StreamMessageWriter(child.stdin!));
  const published: PublishDiagnosticsParams[] = [];
  const waiters: (() => void)[] = [];
  const versions = new Map<string, number>();
  const appliedEdits: WorkspaceEdit[] = [];
  /** The newest publication for `uri` that passes `test`, now or when it arrives. */
  const waitForDiagnostics = (uri: string, test: (p: PublishDiagnosticsParams) => boolean, timeoutMs: number, what: string) =>
    new Promise<PublishDiagnosticsParams>((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`no ${what} for ${uri} within ${timeoutMs} ms; server stderr: ${stderr.join('')}`)), timeoutMs);
      const look = () => {
        const hit = published.find((p) => p.uri === uri && test(p));
        if (!hit) return false;
        clearTimeout(timer);
        resolve(hit);
        return true;
      };
      if (look()) return;
      const waiter = () => {
        if (look()) waiters.splice(waiters.indexOf(waiter), 1);
      };
      waiters.push(waiter);
    });
  const client: TestClient = {
    connection,
    process: child,
    settings,
    appliedEdits,
    stderr,
    async open(uri, languageId, text) {
      versions.set(uri, 1);
      await connection.sendNotification('textDocument/didOpen', { textDocument: { uri, languageId, version: 1, text } });
    },
    async change(uri, text) {
      const version = (versions.get(uri) ?? 0) + 1;
      versions.set(uri, version);
      await connection.sendNotification('textDocument/didChange', { textDocument: { uri, version }, contentChanges: [{ text }] });
    },
    async close(uri) {
      await connection.sendNotification('textDocument/didClose', { textDocument: { uri } });
    },
    versionOf: (uri) => versions.get(uri) ?? 0,
    publishedFor: (uri) => published.filter((p) => p.uri === uri).reverse(),
    diagnosticsWhere: (uri, test, timeoutMs = 20_000) => waitForDiagnostics(uri, test, timeoutMs, 'matching diagnostics'),
    diagnostics: (uri, version, timeoutMs = 20_000) => waitForDiagnostics(uri, (p) => (p.version ?? 0) >= version, timeoutMs, `diagnostics v${version}`),
    async shutdown() {
      try {
        await connection.sendRequest('shutdown');
        await connection.sendNotification('exit');
      } catch {
        // The server may already be gone.
      }
      connection.dispose();
      await new Promise<void>((resolve) => {
        if (child.exitCode !== null) return resolve();
        const timer = setTimeout(() => {
          child.kill();
          resolve();
        }, 2000);
        child.on('exit', () => {
          clearTimeout(timer);
          resolve();
        });
      });
    },
  };
  connection.onNotification('textDocument/publishDiagnostics', (params: PublishDiagnosticsParams) => {
    published.unshift(params);
    for (const waiter of [...waiters]) waiter();
  });
  connection.onRequest('workspace/configuration', (params: unknown) =>
    (params as { items: { section?: string }[] }).items.map((item) => (item.section === 'eigenlens' ? client.settings : null)),
  );
  connection.onRequest('client/registerCapability', () => null);
  connection.onRequest('workspace/codeLens/refresh', () => null);
  connection.onRequest('workspace/applyEdit', (params: unknown) => {
    appliedEdits.push((params as { edit: WorkspaceEdit }).edit);
    return { applied: true };
  });
  connection.onNotification('window/logMessage', (params: { message: string }) => {
    stderr.push(`[log] ${params.message}\n`);
  });
  connection.listen();
  await connection.sendRequest('initialize', {
    processId: process.pid,
    rootUri: null,
    capabilities: {
      workspace: { configuration: true, didChangeConfiguration: { dynamicRegistration: true }, applyEdit: true, workspaceEdit: { documentChanges: true } },
      textDocument: {
        hover: { contentFormat: ['markdown', 'plaintext'] },
        publishDiagnostics: { versionSupport: true },
        codeAction: {
          codeActionLiteralSupport: { codeActionKind: { valueSet: ['quickfix', 'refactor', 'refactor.rewrite', 'source'] } },
          ...(options.resolveActionEdits ? { dataSupport: true, resolveSupport: { properties: ['edit'] } } : {}),
        },
      },
    },
    workspaceFolders: null,
  });
  await connection.sendNotification('initialized', {});
  return client;
}

/** Offsets ↔ positions for test documents (UTF-16 units, as LSP). */
export function positionAt(text: string, offset: number): Position {
  const before = text.slice(0, offset);
  const line = before.split('\n').length - 1;
  return { line, character: offset - (before.lastIndexOf('\n') + 1) };
}

export function offsetAt(text: string, position: Position): number {
  const lines = text.split('\n');
  let offset = 0;
  for (let i = 0; i < position.line; i++) offset += lines[i].length + 1;
  return offset + position.character;
}

/** Applies LSP text edits to a text (edits sorted from last to first so offsets stay valid). */
export function applyTextEdits(text: string, edits: TextEdit[]): string {
  const sorted = [...edits].sort((a, b) => offsetAt(text, b.range.start) - offsetAt(text, a.range.start));
  let out = text;
  for (const edit of sorted) out = out.slice(0, offsetAt(out, edit.range.start)) + edit.newText + out.slice(offsetAt(out, edit.range.end));
  return out;
}
