/**
 * The VS Code side of eigenlens: starts the bundled language server (dist/server.js) over
 * Node IPC and adds the few commands that need editor UI (input box, clipboard, read-only
 * report document). All analysis happens in the server; this file only wires.
 *
 * Which matrix a palette command acts on: the server marks every state matrix with code
 * lenses whose commands carry [uri, matrixIndex, …]. The client asks VS Code for those lenses
 * and takes the one of the matrix at (or nearest above) the cursor, so it never needs to
 * parse the document itself.
 */
import * as path from 'node:path';
import * as vscode from 'vscode';
import {
  CloseAction,
  ErrorAction,
  LanguageClient,
  ResponseError,
  TransportKind,
  type LanguageClientOptions,
  type ServerOptions,
  type WorkspaceEdit as ProtocolWorkspaceEdit,
} from 'vscode-languageclient/node';
import {
  CCodeRequestMethod,
  Commands,
  DiscretizeRequestMethod,
  ReportRequestMethod,
  TransitionTextRequestMethod,
  type TransitionTextRequestResult,
  SETTINGS_SECTION,
  type CCodeRequestParams,
  type CCodeRequestResult,
  type DiscretizeRequestParams,
  type ReportRequestParams,
  type ReportRequestResult,
} from '../../server/src/shared/protocol';
import { ClientCommands, DOCUMENT_LANGUAGES, REPORT_SCHEME } from './commandIds';
import { RestartBudget } from './restartPolicy';
import { parsePeriod } from './period';
import { serverNodeArgs } from './serverArgs';

/** JSON-RPC "method not found": the server does not offer a request (yet). */
const METHOD_NOT_FOUND = -32601;
/** JSON-RPC "invalid params": the server refused the period or method, with a readable reason. */
const INVALID_PARAMS = -32602;

let client: LanguageClient | undefined;
let output: vscode.LogOutputChannel | undefined;
const restartBudget = new RestartBudget();

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  output = vscode.window.createOutputChannel('eigenlens', { log: true });
  context.subscriptions.push(output);

  client = createClient(context, output);
  const reports = new ReportDocuments(() => client);
  context.subscriptions.push(
    vscode.workspace.registerTextDocumentContentProvider(REPORT_SCHEME, reports),
    reports,
    vscode.commands.registerCommand(ClientCommands.showFullAnalysis, (uri?: unknown, matrixIndex?: unknown) =>
      guarded('Show Full Analysis', () => showReport(uri, matrixIndex)),
    ),
    vscode.commands.registerCommand(ClientCommands.copyTransitionMatrix, (...args: unknown[]) =>
      guarded('Copy Transition Matrix', () => copyTransition(args)),
    ),
    vscode.commands.registerCommand(ClientCommands.switchDomain, () => guarded('Switch Continuous/Discrete', switchDomain)),
    vscode.commands.registerCommand(ClientCommands.discretizeAtPeriod, () => guarded('Discretize at Period', discretize)),
    vscode.commands.registerCommand(ClientCommands.copyAsCArrays, () => guarded('Copy Discrete Model as C Arrays', copyAsCArrays)),
    vscode.commands.registerCommand(ClientCommands.restartServer, () => guarded('Restart Server', restartServer)),
  );

  try {
    await client.start();
  } catch (err) {
    log(`The language server did not start: ${errorText(err)}`);
    void vscode.window.showErrorMessage('eigenlens: the language server did not start. See the "eigenlens" output for details.');
  }
}

export async function deactivate(): Promise<void> {
  const running = client;
  client = undefined;
  if (running) await running.stop().catch(() => undefined);
}

function createClient(context: vscode.ExtensionContext, channel: vscode.LogOutputChannel): LanguageClient {
  const serverModule = context.asAbsolutePath(path.join('dist', 'server.js'));
  const nodeArgs = serverNodeArgs(context.extension.packageJSON);
  const serverOptions: ServerOptions = {
    run: { module: serverModule, transport: TransportKind.ipc, options: { execArgv: nodeArgs } },
    debug: { module: serverModule, transport: TransportKind.ipc, options: { execArgv: [...nodeArgs, '--nolazy', '--inspect=6019'] } },
  };
  const clientOptions: LanguageClientOptions = {
    documentSelector: DOCUMENT_LANGUAGES.flatMap((language) => [
      { scheme: 'file', language },
      { scheme: 'untitled', language },
    ]),
    synchronize: { configurationSection: SETTINGS_SECTION },
    outputChannel: channel,
    // Hovers carry plots as data: SVG images and links to our own commands.
    markdown: { isTrusted: true, supportHtml: true },
    errorHandler: {
      error: () => ({ action: ErrorAction.Continue }),
      closed: () => {
        const decision = restartBudget.onCrash(Date.now());
        if (decision.restart) {
          log(`The language server stopped unexpectedly; restarting it (restart ${decision.usedInWindow} of 4 within 3 minutes).`);
          return { action: CloseAction.Restart, handled: true };
        }
        const message =
          `The language server stopped ${decision.crashesInWindow} times within 3 minutes; it will not be restarted. ` +
          'Run "eigenlens: Restart Server" to try again.';
        log(message);
        return { action: CloseAction.DoNotRestart, message: `eigenlens: ${message}` };
      },
    },
  };
  return new LanguageClient('eigenlens', 'eigenlens', serverOptions, clientOptions);
}

// ---------------------------------------------------------------------------------------
// Commands

async function restartServer(): Promise<void> {
  restartBudget.reset();
  if (!client) return;
  log('Restarting the language server on request.');
  await client.restart();
}

async function showReport(uriArg?: unknown, matrixIndexArg?: unknown): Promise<void> {
  let target: MatrixTarget | undefined;
  if (typeof uriArg === 'string') {
    target = { uri: uriArg, matrixIndex: typeof matrixIndexArg === 'number' ? matrixIndexArg : undefined };
  } else {
    const editor = supportedEditor();
    if (!editor) return;
    // From the palette: the matrix at the cursor, or the whole document when there is none.
    const found = await matrixAtCursor(editor);
    target = found ? { uri: found.uri, matrixIndex: found.matrixIndex } : { uri: editor.document.uri.toString() };
  }
  const reportUri = ReportDocuments.uriFor(target);
  const doc = await vscode.workspace.openTextDocument(reportUri);
  // Rendered, because the report carries tables and plots (data: SVG images) that are
  // unreadable as raw Markdown; the raw read-only text where the Markdown preview is absent.
  try {
    await vscode.commands.executeCommand('markdown.showPreviewToSide', reportUri);
  } catch {
    await vscode.window.showTextDocument(doc, { preview: true, viewColumn: vscode.ViewColumn.Beside });
  }
}

/** Lens: [uri, matrixIndex]; palette: the matrix at the cursor; a single string is copied as it is. */
async function copyTransition(args: unknown[]): Promise<void> {
  let text = args.length === 1 && typeof args[0] === 'string' ? args[0] : undefined;
  if (text === undefined) {
    let target: { uri: string; matrixIndex: number } | undefined;
    if (typeof args[0] === 'string' && typeof args[1] === 'number') target = { uri: args[0], matrixIndex: args[1] };
    else {
      const editor = supportedEditor();
      if (!editor) return;
      target = await matrixAtCursor(editor);
    }
    const result = target && client ? await client.sendRequest<TransitionTextRequestResult>(TransitionTextRequestMethod, target) : undefined;
    if (!result?.text) {
      void vscode.window.showInformationMessage(`eigenlens: ${result?.error ?? 'no closed-form transition matrix for the matrix at the cursor.'}`);
      return;
    }
    text = result.text;
  }
  await vscode.env.clipboard.writeText(text);
  vscode.window.setStatusBarMessage('eigenlens: transition matrix copied', 3000);
}

async function switchDomain(): Promise<void> {
  const editor = supportedEditor();
  if (!editor) return;
  const found = await matrixAtCursor(editor);
  if (!found) {
    void vscode.window.showInformationMessage('eigenlens: no state matrix at or above the cursor.');
    return;
  }
  // The server's lens (when it shows one) carries the arguments as it wants them; without a
  // domain argument the server switches to the other domain.
  const lens = found.lenses.find((l) => l.command?.command === Commands.serverSwitchDomain);
  const args = lens?.command?.arguments ?? [found.uri, found.matrixIndex];
  await vscode.commands.executeCommand(Commands.serverSwitchDomain, ...args);
}

async function discretize(): Promise<void> {
  const editor = supportedEditor();
  if (!editor || !client) return;
  const found = await matrixAtCursor(editor);
  if (!found) {
    void vscode.window.showInformationMessage('eigenlens: no state matrix at or above the cursor.');
    return;
  }
  const config = vscode.workspace.getConfiguration(SETTINGS_SECTION, editor.document.uri);
  const defaultPeriod = config.get<number | null>('defaultPeriod');
  const answer = await vscode.window.showInputBox({
    title: 'eigenlens: discretize at sample period',
    prompt: 'Sample period T in seconds (for example 0.01 or 1e-3)',
    value: typeof defaultPeriod === 'number' ? String(defaultPeriod) : '',
    validateInput: (value) => {
      const parsed = parsePeriod(value);
      return parsed.ok ? undefined : parsed.reason;
    },
  });
  if (answer === undefined) return;
  const parsed = parsePeriod(answer);
  if (!parsed.ok) return;
  // No method sent: the server applies the resource's `discretizeMethod` setting itself.
  const params: DiscretizeRequestParams = { uri: found.uri, matrixIndex: found.matrixIndex, period: parsed.period };
  try {
    const result = await client.sendRequest<ProtocolWorkspaceEdit | null>(DiscretizeRequestMethod, params);
    if (!result) {
      void vscode.window.showInformationMessage('eigenlens: the server found nothing to discretize for this matrix.');
      return;
    }
    const edit = await client.protocol2CodeConverter.asWorkspaceEdit(result);
    await vscode.workspace.applyEdit(edit);
  } catch (err) {
    if (!explainRefusal(err, DiscretizeRequestMethod, 'discretize at a chosen period')) throw err;
  }
}

async function copyAsCArrays(): Promise<void> {
  const editor = supportedEditor();
  if (!editor || !client) return;
  const found = await matrixAtCursor(editor);
  if (!found) {
    void vscode.window.showInformationMessage('eigenlens: no state matrix at or above the cursor.');
    return;
  }
  const params: CCodeRequestParams = { uri: found.uri, matrixIndex: found.matrixIndex };
  try {
    const result = await client.sendRequest<CCodeRequestResult>(CCodeRequestMethod, params);
    if (result.text === null) {
      void vscode.window.showInformationMessage(`eigenlens: no C arrays: ${result.error ?? 'the server gave no reason'}`);
      return;
    }
    await vscode.env.clipboard.writeText(result.text);
    vscode.window.setStatusBarMessage('eigenlens: discrete model copied as C arrays', 3000);
  } catch (err) {
    if (!explainRefusal(err, CCodeRequestMethod, 'write C arrays')) throw err;
  }
}

/** A server that lacks a request, or refuses its parameters, gets a message instead of an error. */
function explainRefusal(err: unknown, method: string, what: string): boolean {
  if (!(err instanceof ResponseError)) return false;
  if (err.code === METHOD_NOT_FOUND) {
    log(`The server does not answer ${method}.`);
    void vscode.window.showInformationMessage(`eigenlens: this version of the server cannot ${what} yet.`);
    return true;
  }
  if (err.code === INVALID_PARAMS) {
    void vscode.window.showWarningMessage(`eigenlens: ${err.message}`);
    return true;
  }
  return false;
}

// ---------------------------------------------------------------------------------------
// Finding the matrix at the cursor through the server's own code lenses

interface MatrixTarget {
  uri: string;
  matrixIndex?: number;
}

interface MatrixAtCursor {
  uri: string;
  matrixIndex: number;
  /** Every eigenlens lens of that matrix. */
  lenses: vscode.CodeLens[];
}

const OUR_LENS_COMMANDS = new Set<string>([Commands.showFullAnalysis, Commands.serverSwitchDomain, Commands.copyTransitionMatrix]);

/** Lens argument lists start with [uri, matrixIndex] for report and domain commands. */
function lensMatrixIndex(lens: vscode.CodeLens): number | undefined {
  const args = lens.command?.arguments;
  if (!args) return undefined;
  return typeof args[1] === 'number' ? args[1] : undefined;
}

async function matrixAtCursor(editor: vscode.TextEditor): Promise<MatrixAtCursor | undefined> {
  const uri = editor.document.uri;
  const lenses =
    (await vscode.commands.executeCommand<vscode.CodeLens[]>('vscode.executeCodeLensProvider', uri, 20)) ?? [];
  const ours = lenses.filter((l) => l.command && OUR_LENS_COMMANDS.has(l.command.command));
  const indexed = ours.filter((l) => lensMatrixIndex(l) !== undefined);
  if (indexed.length === 0) return undefined;
  const cursorLine = editor.selection.active.line;
  // The matrix whose lens line is nearest at or above the cursor; else the first below it.
  const above = indexed.filter((l) => l.range.start.line <= cursorLine);
  const chosen = above.length
    ? above.reduce((a, b) => (b.range.start.line > a.range.start.line ? b : a))
    : indexed.reduce((a, b) => (b.range.start.line < a.range.start.line ? b : a));
  const matrixIndex = lensMatrixIndex(chosen)!;
  const sameMatrix = ours.filter((l) => lensMatrixIndex(l) === matrixIndex);
  return { uri: uri.toString(), matrixIndex, lenses: sameMatrix };
}

// ---------------------------------------------------------------------------------------
// Read-only report documents: eigenlens-report:/<name>.md?<source uri and matrix index>

class ReportDocuments implements vscode.TextDocumentContentProvider, vscode.Disposable {
  private readonly changed = new vscode.EventEmitter<vscode.Uri>();
  readonly onDidChange = this.changed.event;
  private readonly listener: vscode.Disposable;
  private refreshTimer: ReturnType<typeof setTimeout> | undefined;

  constructor(private readonly currentClient: () => LanguageClient | undefined) {
    // An open report follows edits of its source document (debounced: the server needs the edit first).
    this.listener = vscode.workspace.onDidChangeTextDocument((event) => {
      const source = event.document.uri.toString();
      const open = vscode.workspace.textDocuments.filter(
        (doc) => doc.uri.scheme === REPORT_SCHEME && ReportDocuments.targetOf(doc.uri)?.uri === source,
      );
      if (open.length === 0) return;
      if (this.refreshTimer) clearTimeout(this.refreshTimer);
      this.refreshTimer = setTimeout(() => open.forEach((doc) => this.changed.fire(doc.uri)), 400);
    });
  }

  static uriFor(target: MatrixTarget): vscode.Uri {
    const base = path.posix.basename(vscode.Uri.parse(target.uri).path) || 'document';
    const which = target.matrixIndex === undefined ? 'all matrices' : `matrix ${target.matrixIndex + 1}`;
    return vscode.Uri.from({
      scheme: REPORT_SCHEME,
      path: `/${base} (${which}).md`,
      query: JSON.stringify(target),
    });
  }

  static targetOf(uri: vscode.Uri): MatrixTarget | undefined {
    try {
      const parsed = JSON.parse(uri.query) as unknown;
      if (parsed && typeof parsed === 'object' && typeof (parsed as MatrixTarget).uri === 'string') {
        const { uri: source, matrixIndex } = parsed as MatrixTarget;
        return { uri: source, matrixIndex: typeof matrixIndex === 'number' ? matrixIndex : undefined };
      }
    } catch {
      // fall through: not one of ours
    }
    return undefined;
  }

  async provideTextDocumentContent(uri: vscode.Uri): Promise<string> {
    const target = ReportDocuments.targetOf(uri);
    if (!target) return '# eigenlens\n\nThis report address is not one eigenlens understands.\n';
    const running = this.currentClient();
    if (!running || !running.isRunning()) {
      return '# eigenlens\n\nThe language server is not running. Run "eigenlens: Restart Server" and open the report again.\n';
    }
    const params: ReportRequestParams = { uri: target.uri, matrixIndex: target.matrixIndex };
    try {
      const result = await running.sendRequest<ReportRequestResult | null>(ReportRequestMethod, params);
      if (!result) return '# eigenlens\n\nNo state matrix was found in this document.\n';
      // The server's Markdown usually opens with its own heading; add the title only when it does not.
      return /^#\s/.test(result.markdown) ? `${result.markdown}\n` : `# ${result.title}\n\n${result.markdown}\n`;
    } catch (err) {
      log(`${ReportRequestMethod} failed: ${errorText(err)}`);
      return `# eigenlens\n\nThe server could not produce this report: ${errorText(err)}\n`;
    }
  }

  dispose(): void {
    if (this.refreshTimer) clearTimeout(this.refreshTimer);
    this.listener.dispose();
    this.changed.dispose();
  }
}

// ---------------------------------------------------------------------------------------
// Small helpers

function supportedEditor(): vscode.TextEditor | undefined {
  const editor = vscode.window.activeTextEditor;
  if (editor && (DOCUMENT_LANGUAGES as readonly string[]).includes(editor.document.languageId)) return editor;
  void vscode.window.showInformationMessage('eigenlens: open a Python, TypeScript, JavaScript or .lti file first.');
  return undefined;
}

/** Runs a command body; an error becomes one message and one output line, never an unhandled rejection. */
async function guarded(title: string, body: () => Promise<void>): Promise<void> {
  try {
    await body();
  } catch (err) {
    log(`${title} failed: ${errorText(err)}`);
    void vscode.window.showErrorMessage(`eigenlens: ${title} failed: ${errorText(err)}`);
  }
}

function log(line: string): void {
  output?.info(line);
}

function errorText(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}
