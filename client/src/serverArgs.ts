/**
 * Node flags for the server process, from the manifest's "eigenlensServerNodeArgs" (the
 * benchmarks start the server with the same ones). A young generation of 8 MB per half
 * rather than Node 20's 16 MB: about 24 MB less resident memory with ten large files open,
 * for no measured loss of speed (npm run bench; see DEVELOPERS.md).
 */
export function serverNodeArgs(manifest: unknown): string[] {
  const args = (manifest as { eigenlensServerNodeArgs?: unknown } | null)?.eigenlensServerNodeArgs;
  return Array.isArray(args) && args.every((a) => typeof a === 'string' && /^--[a-z][a-z0-9-]*(=[A-Za-z0-9._-]+)?$/.test(a)) ? (args as string[]) : [];
}
