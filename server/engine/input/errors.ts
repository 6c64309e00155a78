/** Errors raised while reading orbit input. Every issue names where (a line or a field) and why. */

export interface InputIssue {
  /** "line 12" for KVN input, "field covariance.matrix[2][1]" for JSON input, or "input" */
  where: string;
  message: string;
}

export class OrbitInputError extends Error {
  readonly issues: InputIssue[];
  constructor(what: string, issues: InputIssue[]) {
    super(`${what}: ${issues.map((i) => `${i.where}: ${i.message}`).join('; ')}`);
    this.name = 'OrbitInputError';
    this.issues = issues;
  }
}
