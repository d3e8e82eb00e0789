/**
 * Names shared by the language server and the editor client: setting keys, command ids and
 * custom request methods. The VS Code client imports only this file from the server, so it
 * holds constants and plain types, nothing that pulls in server code.
 */

/** Configuration section; every setting key below lives under it (`eigenlens.precision`). */
export const SETTINGS_SECTION = 'eigenlens';

/** Setting keys relative to SETTINGS_SECTION. */
export const SettingKeys = {
  defaultDomain: 'defaultDomain',
  defaultPeriod: 'defaultPeriod',
  precision: 'precision',
  closedFormMaxN: 'closedFormMaxN',
  lightDampingThreshold: 'lightDampingThreshold',
  codeLensEnabled: 'codeLens.enabled',
  stateMatrixNames: 'stateMatrixNames',
  discretizeMethod: 'discretizeMethod',
  /** Significant digits of inexact entries in generated code (2..17; 17 = shortest round-trip). */
  codePrecision: 'codePrecision',
  /** How many open documents keep their analysis in memory (the most recently used). */
  documentsKept: 'documentsKept',
  /** Diagnostics published per document at most; one more says how many were left out. */
  maxDiagnostics: 'maxDiagnostics',
} as const;

/** The settings as the client sends them (`workspace/configuration` for section `eigenlens`). */
export interface EigenlensUserSettings {
  defaultDomain?: 'continuous' | 'discrete';
  defaultPeriod?: number | null;
  precision?: number;
  closedFormMaxN?: number;
  lightDampingThreshold?: number;
  codeLens?: { enabled?: boolean };
  stateMatrixNames?: string[];
  discretizeMethod?: 'zoh' | 'tustin' | 'euler' | 'backward-euler' | 'foh' | null;
  codePrecision?: number;
  documentsKept?: number;
  maxDiagnostics?: number;
}

/**
 * Commands. The first three ids are the ones the manifest declares (client-side, handled by
 * the editor extension). The server executes only SERVER_COMMANDS, under ids of their own so
 * the client's registration of the manifest ids never collides with the language client's.
 */
export const Commands = {
  /** Client: args [uri, matrixIndex?] — request `eigenlens/report` and show it read-only. */
  showFullAnalysis: 'eigenlens.showFullAnalysis',
  /**
   * Client: args [uri, matrixIndex] — ask the server for the closed form as text
   * (`eigenlens/transitionText`) and copy it to the clipboard. A single string argument is
   * copied as it is.
   */
  copyTransitionMatrix: 'eigenlens.copyTransitionMatrix',
  /** Client (palette): forwards to serverSwitchDomain with the active document and cursor. */
  switchDomain: 'eigenlens.switchDomain',
  /**
   * Server: args [uri, matrixIndex, domain?] — insert or rewrite the domain pragma of that
   * matrix; domain omitted = the other one. Applied through workspace/applyEdit.
   */
  serverSwitchDomain: 'eigenlens.server.switchDomain',
} as const;

/** Server-side commands the server announces in executeCommandProvider. */
export const SERVER_COMMANDS: readonly string[] = [Commands.serverSwitchDomain];

/** Custom request: the full analysis of one matrix (or the whole document) as Markdown. */
export const ReportRequestMethod = 'eigenlens/report';

export interface ReportRequestParams {
  uri: string;
  /** MatrixReport.index; omitted = every state matrix of the document. */
  matrixIndex?: number;
}

/**
 * Custom request (no params): the server's memory and cache figures, for benchmarks and bug
 * reports. Memory in MB as Node's process.memoryUsage() reports it.
 */
export const StatsRequestMethod = 'eigenlens/stats';

export interface StatsRequestResult {
  memoryMB: { rss: number; heapUsed: number; heapTotal: number; external: number };
  /** Committed size of each V8 heap space, MB (where the JS heap's resident memory is). */
  heapSpacesMB?: Record<string, number>;
  documents: number;
  /** Open documents whose analysis was freed (setting documentsKept); they keep their diagnostics. */
  released: number;
  matrixCache: { size: number; hits: number; misses: number };
  closedForms: { held: number; terms: number; builds: number };
  /** Matrix analyses whose bulky part is held as objects (the rest is packed), the bound on them, and how often one was unpacked. */
  details?: { hot: number; limit: number; unpacks: number };
  /** Full collections the idle collector ran. */
  idleCollections: number;
  /** Quiet periods whose collection was skipped: the heap was too large to collect without a long pause. */
  idleCollectionsSkipped: number;
}

/** Custom request: the closed-form transition matrix of one state matrix as plain text. */
export const TransitionTextRequestMethod = 'eigenlens/transitionText';

export interface TransitionTextRequestParams {
  uri: string;
  matrixIndex: number;
}

export interface TransitionTextRequestResult {
  /** "Φ(t) = e^{At} …" with ASCII minus signs, or null when there is no closed form. */
  text: string | null;
  error: string | null;
}

export interface ReportRequestResult {
  title: string;
  markdown: string;
}

export type DiscretizeMethodName = 'zoh' | 'tustin' | 'euler' | 'backward-euler' | 'foh';

/**
 * Custom request: insert (or update) the discrete-time model of one continuous state matrix
 * at a period the user chose. The server answers with the WorkspaceEdit to apply (LSP
 * shape), or null when there is nothing to discretize; a bad period or method is a
 * ResponseError (InvalidParams) with a readable message.
 */
export const DiscretizeRequestMethod = 'eigenlens/discretize';

export interface DiscretizeRequestParams {
  uri: string;
  /** MatrixReport.index of a continuous state matrix. */
  matrixIndex: number;
  /** Seconds, > 0. */
  period: number;
  /** Omitted = the `discretizeMethod` setting, else zero-order hold. */
  method?: DiscretizeMethodName;
}

/**
 * Custom request: the discrete model as C array initializers (`static const double Ad[2][2]
 * = {{...}, {...}};`), for the clipboard. Period and method default to the matrix's own
 * period (pragma, model file or setting) and the `discretizeMethod` setting.
 */
export const CCodeRequestMethod = 'eigenlens/cCode';

export interface CCodeRequestParams {
  uri: string;
  matrixIndex: number;
  period?: number;
  method?: DiscretizeMethodName;
  type?: 'double' | 'float';
}

/** `text` is the C source, or null with `error` saying why nothing was generated. */
export interface CCodeRequestResult {
  text: string | null;
  error: string | null;
}

/** Source name on every diagnostic the server publishes. */
export const DIAGNOSTIC_SOURCE = 'eigenlens';
