import type { ExtractedFile } from './types';
export function extractLti(_text: string, _patterns: RegExp[]): ExtractedFile {
  throw new Error('.lti files are not supported yet');
}
