/**
 * A formula the tool will not accept, with where in the text the problem sits.
 * `column` is 1-based, or undefined when the part cannot be located exactly.
 */
export class FormulaError extends Error {
  readonly formula: string;
  readonly column: number | undefined;
  readonly reason: string;

  constructor(formula: string, reason: string, column?: number) {
    const where = column !== undefined ? ` at column ${column}` : '';
    // a long formula is quoted by its start only
    const quoted = formula.length > 80 ? `${formula.slice(0, 60)}…" (${formula.length} characters` : `${formula}"`;
    super(`in "${quoted}${formula.length > 80 ? ')' : ''}${where}: ${reason}`);
    this.name = 'FormulaError';
    this.formula = formula;
    this.reason = reason;
    this.column = column;
  }
}
