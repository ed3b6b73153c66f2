/**
 * The renderers, one per output form, each a function of the one report model. The CLI picks
 * one by name; `renderReport` is the library entry point.
 */
import type { Report } from '../report/types.js';
import { renderCsv } from './csv.js';
import { renderHtml } from './html.js';
import { renderJson } from './json.js';
import { renderMarkdown } from './markdown.js';
import type { RenderOptions } from './model.js';
import { renderText } from './text.js';

export const RENDER_FORMATS = ['text', 'json', 'md', 'csv', 'html'] as const;
export type RenderFormat = (typeof RENDER_FORMATS)[number];

export const RENDERERS: Record<RenderFormat, (report: Report, options: RenderOptions) => string> = {
  text: (report, options) => renderText(report, { color: options.color ?? false, limit: options.limit, verdicts: options.verdicts }),
  json: (report) => renderJson(report),
  md: (report, options) => renderMarkdown(report, options),
  csv: (report, options) => renderCsv(report, options),
  html: (report, options) => renderHtml(report, options),
};

export function renderReport(format: RenderFormat, report: Report, options: RenderOptions = {}): string {
  return RENDERERS[format](report, options);
}

export type { RenderOptions } from './model.js';
export { renderCsv, renderHtml, renderJson, renderMarkdown, renderText };
