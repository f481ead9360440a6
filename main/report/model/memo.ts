// The evaluation memo as a document tree, built from results.json (and the per-unit figure
// data) by pure functions. Sections, in order (issue 5 §1): key finding; the rule; the data;
// who the estimate is about; results; checks; limits and caveats; cautions; technical appendix;
// glossary. Every number printed in text and tables is read from the results with its path kept
// as `source` (memo-source.ts); every count goes through one suppression ledger (memo-counts.ts).

import type { Results } from '../../contract/results.ts';
import { writeCaveats } from '../caveats/index.ts';
import { DOCUMENT_FORMAT, type Block, type Document, type Section } from './document.ts';
import type { FigureData } from './figure-types.ts';
import { appendixSection, glossarySection } from './memo-appendix.ts';
import { checksSection } from './memo-checks.ts';
import type { MemoContext } from './memo-context.ts';
import { buildCountLedger } from './memo-counts.ts';
import { keyFindingSection } from './memo-finding.ts';
import { headlineIndex, unitWords } from './memo-format.ts';
import { cautionsSection, limitsSection } from './memo-limits.ts';
import { resultsSection } from './memo-results.ts';
import { dataSection, ruleSection } from './memo-rule-data.ts';
import { whoSection } from './memo-who.ts';
import { suppressionLegend } from './suppress.ts';

export interface MemoOptions {
  /** Creation time (ISO 8601) written into the files' metadata and the date line. */
  createdAt: string;
  author?: string;
}

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

/** "2025-03-12T09:30:00Z" → "12 March 2025" (UTC, so the same instant gives the same words everywhere). */
export function longDate(iso: string): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) throw new Error(`memo: the creation time "${iso}" is not an ISO date`);
  return `${d.getUTCDate()} ${MONTHS[d.getUTCMonth()]} ${d.getUTCFullYear()}`;
}

/** Blocks of the checks that go to the appendix: every figure and the per-characteristic balance table. */
const CHECK_DETAIL = (b: Block): boolean => b.kind === 'figure' || (b.kind === 'table' && b.id === 'balance');

/**
 * The memo's order for a reader with little time (issue 10 §6): a one-page summary (the key finding,
 * the design in a sentence, the main caveat), then the body — rule, data, who, results, checks with
 * their verdicts and compact tables, limits, cautions — on a new page, then the technical appendix,
 * which also receives the checks' figures and long tables ("Details of the checks"), then the
 * glossary. Each check that lost a block to the appendix says where it went.
 */
function arrange(parts: { summary: Section; body: Section[]; appendix: Section; glossary: Section }): Section[] {
  const details: Section[] = [];
  const body = parts.body.map((sec, i) => {
    // The body starts on a new page after the summary and then runs on: a section that asked for a
    // page of its own would leave the page before it half empty.
    const out: Section = { ...sec, pageBreakBefore: i === 0 };
    if (sec.id !== 'checks') return out;
    return {
      ...out,
      sections: (sec.sections ?? []).map((sub): Section => {
        const moved = sub.blocks.filter(CHECK_DETAIL);
        if (!moved.length) return sub;
        details.push({ id: `details-${sub.id}`, heading: sub.heading, blocks: moved });
        return {
          ...sub,
          blocks: [
            ...sub.blocks.filter((b) => !CHECK_DETAIL(b)),
            { kind: 'paragraph', runs: [{ kind: 'text' as const, text: `The ${moved.some((b) => b.kind === 'figure') ? 'figures and details' : 'details'} of this check are in the appendix (“Details of the checks”).`, style: 'italic' as const }] },
          ],
        };
      }),
    };
  });
  const appendix: Section = details.length
    ? { ...parts.appendix, sections: [...(parts.appendix.sections ?? []), { id: 'appendix-checks', heading: 'Details of the checks', blocks: [], sections: details }] }
    : parts.appendix;
  return [parts.summary, ...body, appendix, parts.glossary];
}

export function buildMemo(results: Results, figures: FigureData, opts: MemoOptions): Document {
  const ledger = buildCountLedger(results);
  const ctx: MemoContext = { r: results, ledger, headline: headlineIndex(results), figures, words: unitWords(results) };
  const caveats = writeCaveats(results, { ledger, headline: ctx.headline });
  const s = results.study;
  return {
    format: DOCUMENT_FORMAT,
    title: {
      title: s.title,
      subtitle: `Evaluation memo: ${results.program.name}`,
      dateLine: `${longDate(opts.createdAt)} · Fenceline ${results.version}`,
      createdAt: opts.createdAt,
      provenance: [
        `Data: ${s.dataFile}${s.sheet ? `, sheet “${s.sheet}”` : ''}`,
        `SHA-256: ${s.dataSha256}`,
        'Every number in this memo comes from results.json, written beside it by the same run.',
      ],
      author: opts.author ?? 'Fenceline',
      language: 'en',
    },
    suppression: suppressionLegend(results.settings.smallCellMax),
    sections: arrange({
      summary: keyFindingSection(ctx, caveats),
      body: [ruleSection(ctx), dataSection(ctx), whoSection(ctx), resultsSection(ctx), checksSection(ctx), limitsSection(ctx, caveats), cautionsSection(ctx)],
      appendix: appendixSection(ctx),
      glossary: glossarySection(ctx),
    }),
    footnotes: [],
  };
}
