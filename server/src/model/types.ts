/**
 * Models: a state matrix grouped with its input, output, feedthrough and noise matrices,
 * with the domain and sample period that apply. Plain data, indices into ExtractedFile.matrices.
 */
export interface ModelGroup {
  /** Stable id within the document: the group key, or the .lti system name. */
  id: string;
  /** Index of the state matrix (A or F) in ExtractedFile.matrices. */
  state: number;
  input: number | null;
  output: number | null;
  feedthrough: number | null;
  noiseInput: number | null;
  noiseCovariance: number | null;
  domain: 'continuous' | 'discrete';
  /** Where the domain came from, for hover text and quick fixes. */
  domainSource: 'pragma' | 'name' | 'system' | 'setting';
  /** Sample period in seconds, when known; exact text where it was exact. */
  period: number | null;
  periodExact: string | null;
  stateNames: string[] | null;
  inputNames: string[] | null;
  outputNames: string[] | null;
}
