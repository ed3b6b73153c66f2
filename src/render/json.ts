/**
 * The JSON form: the report object itself, keys in the order the model builds them, 2-space
 * indent and a trailing newline. The field-by-field contract is docs/report-schema.md and the
 * machine-checkable one docs/report.schema.json. Filters do not apply: JSON is always whole.
 */
import type { Report } from '../report/types.js';

export function renderJson(report: Report): string {
  return JSON.stringify(report, null, 2) + '\n';
}

/**
 * The same text as renderJson, in pieces that each end a line: the report's top-level arrays
 * (mappings, changes, …) one element at a time, so that writing a report of hundreds of
 * thousands of mappings never holds the whole text (a 4 M-row check writes 171 MB of JSON).
 * JSON strings hold no raw line break, so an element is indented by its lines.
 */
export function* jsonChunks(report: Report): Generator<string> {
  const fields: [string, unknown][] = [];
  for (const [key, value] of Object.entries(report)) {
    // As JSON.stringify: keys whose value has no JSON form are left out.
    if (value === undefined || typeof value === 'function' || typeof value === 'symbol') continue;
    fields.push([key, value]);
  }
  if (fields.length === 0) {
    yield '{}\n';
    return;
  }
  yield '{\n';
  for (let i = 0; i < fields.length; i++) {
    const [key, value] = fields[i];
    const end = i < fields.length - 1 ? ',\n' : '\n';
    const head = `  ${JSON.stringify(key)}: `;
    if (Array.isArray(value) && value.length > 0) {
      yield `${head}[\n`;
      for (let k = 0; k < value.length; k++) {
        const text = JSON.stringify(value[k], null, 2) ?? 'null';
        yield `    ${text.replaceAll('\n', '\n    ')}${k < value.length - 1 ? ',\n' : '\n'}`;
      }
      yield `  ]${end}`;
    } else {
      yield `${head}${JSON.stringify(value, null, 2).replaceAll('\n', '\n  ')}${end}`;
    }
  }
  yield '}\n';
}
