import type { Tree } from 'web-tree-sitter';
import type { ExtractedFile } from './types';
export function extractTypeScript(_text: string, _tree: Tree, _patterns: RegExp[]): ExtractedFile {
  throw new Error('TypeScript files are not supported yet');
}
