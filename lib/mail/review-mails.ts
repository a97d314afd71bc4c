import 'server-only';
import type { MailAttachmentRecord } from '@/models';
import type { OutgoingMail } from './outbox';
import { escapeHtml, wrapHtml } from './templates';

/** `notChecked`: labels of the ratings that could not be checked (no limit on file for the type). */
export type StageLine = { name: string; tubeDesignation: string; ratingProblems: number; notChecked: string[]; error: string | null };

/** "ok" only when every rating was checked and none is over; otherwise say what is over and what was not checked. */
export function ratingsWords(s: StageLine): { text: string; tone: 'ok' | 'over' | 'unknown' } {
  if (s.error) return { text: `calculation error: ${s.error}`, tone: 'over' };
  const parts: string[] = [];
  if (s.ratingProblems > 0) parts.push(`${s.ratingProblems} rating${s.ratingProblems === 1 ? '' : 's'} over`);
  if (s.notChecked.length > 0) parts.push(`not checked (no rating on file): ${s.notChecked.join(', ')}`);
  if (parts.length === 0) return { text: 'all ratings checked and ok', tone: 'ok' };
  return { text: parts.join('; '), tone: s.ratingProblems > 0 ? 'over' : 'unknown' };
}

const TONE_COLOUR = { ok: '#2e7d32', over: '#b3261e', unknown: '#8a4a0c' } as const;

const button = (href: string, label: string) =>
  `<p><a href="${escapeHtml(href)}" style="background:#d9822b;color:#fff;padding:8px 14px;border-radius:6px;text-decoration:none">${escapeHtml(label)}</a></p>`;

function stageTable(stages: StageLine[]) {
  if (stages.length === 0) return '';
  const rows = stages
    .map(
      (s) =>
        `<tr><td style="padding:4px 8px;border-bottom:1px solid #e6dfd1">${escapeHtml(s.name)}</td><td style="padding:4px 8px;border-bottom:1px solid #e6dfd1;font-family:monospace">${escapeHtml(s.tubeDesignation)}</td><td style="padding:4px 8px;border-bottom:1px solid #e6dfd1">${(() => {
          const w = ratingsWords(s);
          return `<span style="color:${TONE_COLOUR[w.tone]}">${escapeHtml(w.text)}</span>`;
        })()}</td></tr>`,
    )
    .join('');
  return `<table style="border-collapse:collapse;font-size:14px;margin:8px 0"><thead><tr><th align="left" style="padding:4px 8px">Stage</th><th align="left" style="padding:4px 8px">Tube</th><th align="left" style="padding:4px 8px">Ratings</th></tr></thead><tbody>${rows}</tbody></table>`;
}

function stageText(stages: StageLine[]) {
  return stages.map((s) => `  - ${s.name} (${s.tubeDesignation}): ${ratingsWords(s).text}`).join('\n');
}

export function revisionSubmittedMail(opts: {
  to: string[];
  projectName: string;
  number: number;
  submitter: string;
  note: string;
  link: string;
  contentHash: string;
  stages: StageLine[];
}): OutgoingMail {
  const subject = `Review requested: ${opts.projectName}, revision ${opts.number}`;
  return {
    to: opts.to,
    subject,
    text: `${opts.submitter} submitted revision ${opts.number} of "${opts.projectName}" for review.\n\n${opts.note ? `Note: ${opts.note}\n\n` : ''}Stages:\n${stageText(opts.stages)}\n\nContent hash: ${opts.contentHash}\nReview it: ${opts.link}`,
    html: wrapHtml(
      subject,
      `<p><b>${escapeHtml(opts.submitter)}</b> submitted revision ${opts.number} of <b>${escapeHtml(opts.projectName)}</b> for review.</p>
${opts.note ? `<blockquote style="margin:8px 0;padding:8px 12px;border-left:3px solid #d9822b;background:#f6f1e7">${escapeHtml(opts.note)}</blockquote>` : ''}
${stageTable(opts.stages)}
${button(opts.link, 'Open the review')}
<p style="font-size:12px;color:#6a6358">Content hash <span style="font-family:monospace">${escapeHtml(opts.contentHash)}</span></p>`,
    ),
  };
}

export function revisionDecisionMail(opts: {
  to: string[];
  projectName: string;
  number: number;
  decision: 'approve' | 'request-changes';
  reviewer: string;
  comment: string;
  link: string;
  contentHash: string;
  stages: StageLine[];
  pdf: MailAttachmentRecord | null;
}): OutgoingMail {
  const approved = opts.decision === 'approve';
  const subject = `${approved ? 'Approved' : 'Changes requested'}: ${opts.projectName}, revision ${opts.number}`;
  const verdict = approved ? 'approved' : 'asked for changes to';
  return {
    to: opts.to,
    subject,
    attachments: opts.pdf ? [opts.pdf] : [],
    text: `${opts.reviewer} ${verdict} revision ${opts.number} of "${opts.projectName}".\n\n${opts.comment ? `Comment:\n${opts.comment}\n\n` : ''}Stages:\n${stageText(opts.stages)}\n\nContent hash: ${opts.contentHash}\n${opts.pdf ? `The report of the revision is attached (${opts.pdf.filename}).\n` : 'The report could not be rendered; open the revision in Anodyne.\n'}${approved ? 'A later edit to the project starts a new draft; this revision stays as approved.\n' : ''}Open it: ${opts.link}`,
    html: wrapHtml(
      subject,
      `<p><b>${escapeHtml(opts.reviewer)}</b> ${verdict} revision ${opts.number} of <b>${escapeHtml(opts.projectName)}</b>.</p>
<p style="display:inline-block;padding:2px 8px;border-radius:4px;font-weight:600;${approved ? 'background:#e3f1e4;color:#2e7d32' : 'background:#fbeed9;color:#8a4a0c'}">${approved ? 'Approved' : 'Changes requested'}</p>
${opts.comment ? `<blockquote style="margin:8px 0;padding:8px 12px;border-left:3px solid #d9822b;background:#f6f1e7;white-space:pre-wrap">${escapeHtml(opts.comment)}</blockquote>` : ''}
${stageTable(opts.stages)}
<p style="font-size:13px">${opts.pdf ? `The report of the revision is attached (<span style="font-family:monospace">${escapeHtml(opts.pdf.filename)}</span>).` : 'The report could not be rendered for this mail; open the revision in Anodyne.'}${approved ? ' A later edit to the project starts a new draft; this revision stays approved.' : ''}</p>
${button(opts.link, 'Open the revision')}
<p style="font-size:12px;color:#6a6358">Content hash <span style="font-family:monospace">${escapeHtml(opts.contentHash)}</span></p>`,
    ),
  };
}
