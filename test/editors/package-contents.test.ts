// What the .vsix would contain, as the packager itself lists it (`vsce ls`, no archive
// written): the bundles, the grammars and syntax files, the manifest, README, LICENSE and the
// icon, and nothing else (no sources, tests, node_modules or source maps).
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from './harness';

const vsce = join(repoRoot, 'node_modules', '@vscode', 'vsce', 'vsce');

describe('extension package contents', () => {
  it('lists only shipped files, and every file the extension needs at run time', () => {
    const listed = execFileSync(process.execPath, [vsce, 'ls', '--no-dependencies'], { cwd: repoRoot, encoding: 'utf8' })
      .split('\n')
      .map((l) => l.trim())
      .filter(Boolean);
    const allowed = [/^dist\/(client|server)\.js$/, /^dist\/[\w-]+\.wasm$/, /^syntaxes\/[\w.-]+\.json$/, /^(package\.json|README\.md|LICENSE)$/, /^client\/media\/icon\.png$/];
    for (const file of listed) expect(allowed.some((re) => re.test(file)), `unexpected file in package: ${file}`).toBe(true);
    const needed = [
      'package.json',
      'README.md',
      'LICENSE',
      'dist/client.js',
      'dist/server.js',
      'dist/web-tree-sitter.wasm',
      'dist/tree-sitter-python.wasm',
      'dist/tree-sitter-typescript.wasm',
      'syntaxes/lti.tmLanguage.json',
      'syntaxes/lti.language-configuration.json',
    ];
    for (const file of needed) {
      expect(existsSync(join(repoRoot, file)), `${file} does not exist (build first)`).toBe(true);
      expect(listed, `${file} would not ship`).toContain(file);
    }
  });
});
