/** SARIF 2.1.0 (OASIS standard) output of every finding, for code-scanning dashboards. */
import type { JsonFileInput } from './json';
import type { Finding } from './report';
import { lineColumnAt } from './position';

const LEVEL: Record<Finding['severity'], 'error' | 'warning' | 'note'> = { error: 'error', warning: 'warning', information: 'note', hint: 'note' };

export function sarifReport(files: JsonFileInput[], toolVersion: string) {
  const results: unknown[] = [];
  const rules = new Map<string, { id: string }>();
  for (const { path, text, report } of files) {
    const all = [...report.findings, ...report.matrices.flatMap((m) => m.findings)];
    for (const f of all) {
      rules.set(f.code, { id: f.code });
      const start = lineColumnAt(text, f.span.start);
      const end = lineColumnAt(text, f.span.end);
      results.push({
        ruleId: f.code,
        level: LEVEL[f.severity],
        message: { text: f.message },
        locations: [
          {
            physicalLocation: {
              artifactLocation: { uri: path.split('\\').join('/') },
              region: { startLine: start.line, startColumn: start.column, endLine: end.line, endColumn: end.column },
            },
          },
        ],
      });
    }
  }
  return {
    $schema: 'https://json.schemastore.org/sarif-2.1.0.json',
    version: '2.1.0',
    runs: [{ tool: { driver: { name: 'eigenlens', version: toolVersion, rules: [...rules.values()] } }, results }],
  };
}
