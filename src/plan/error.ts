import { diagnostic, DiagnosticError } from '../diagnostics';

/** A plan, profile or JSON file refused: the field path and why. */
export class PlanError extends DiagnosticError<'plan-field'> {
  constructor(
    /** Field path, e.g. `outputs[1].bands[0].q`; empty for the whole document. */
    readonly path: string,
    readonly reason: string,
  ) {
    super(diagnostic('plan-field', 'error', path ? { kind: 'field', path } : { kind: 'plan' }, { reason }));
    this.name = 'PlanError';
  }
}
