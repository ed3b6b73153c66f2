/**
 * The JSON form: the report object itself, keys in the order the model builds them, 2-space
 * indent and a trailing newline. The field-by-field contract is docs/report-schema.md and the
 * machine-checkable one docs/report.schema.json. Filters do not apply: JSON is always whole.
 */
import type { Report } from '../report/types.js';

export function renderJson(report: Report): string {
  return JSON.stringify(report, null, 2) + '\n';
}
