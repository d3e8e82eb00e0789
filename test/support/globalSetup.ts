// Builds the bundles once before any test file runs, so the end-to-end suites (CLI, LSP over
// stdio, editors) test exactly what ships, and no two suites rebuild dist/ concurrently.
import { execFileSync } from 'node:child_process';

export default function setup(): void {
  if (process.env.EIGENLENS_SKIP_BUILD === '1') return;
  execFileSync(process.execPath, ['scripts/build.mjs'], { stdio: 'inherit' });
}
