import 'server-only';
import { toleranceDigests } from '@/lib/explore/service';
import { Op, QueryTypes } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { env } from '@/lib/env';
import { deliverSoon, enqueueMail } from '@/lib/mail/outbox';
import { renderReportPdf } from '@/lib/report/pdf';
import type { ReportOptions } from '@/lib/report/project-report';
import { revisionDecisionMail, revisionSubmittedMail, type StageLine } from '@/lib/mail/review-mails';
import { revisionHash } from '@/lib/review/content';
import { diffSnapshots, type RevisionDiff } from '@/lib/review/diff';
import { toPlainJson } from '@/lib/review/hash';
import type { RevisionSnapshot } from '@/lib/review/types';
import { decisionSchema, submitRevisionSchema, type DecisionInput, type SubmitRevisionInput } from '@/lib/validation/review';
import { Decision, Project, ProjectWatcher, Revision, User, type MailAttachmentRecord } from '@/models';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';
import { getProject, type ProjectDetail } from '@/lib/projects/service';

export type RevisionState = 'submitted' | 'approved' | 'changes-requested';

export type RevisionSummary = {
  id: number;
  projectId: number;
  projectName: string;
  number: number;
  state: RevisionState;
  contentHash: string;
  submittedBy: { id: number; displayName: string } | null;
  submittedAt: string;
  decidedAt: string | null;
  decision: { decision: 'approve' | 'request-changes'; comment: string; reviewer: { id: number; displayName: string } | null; createdAt: string } | null;
  stageCount: number;
};

export type RevisionDetail = RevisionSummary & {
  snapshot: RevisionSnapshot;
  /** the stored hash matches the stored snapshot */
  hashVerified: boolean;
  /** the earlier revision the diff compares with (the previous one unless another was chosen) */
  base: { id: number; number: number; contentHash: string; state: RevisionState } | null;
  /** every earlier revision of the project, newest first (the reviewer may compare with any) */
  earlier: { id: number; number: number; state: RevisionState }[];
  diff: RevisionDiff;
  /** waiting for a decision and the project has changed since submission: what changed (submitted → now) */
  movedOn: { diff: RevisionDiff } | null;
};

type SummaryRow = {
  id: number;
  project_id: number;
  project_name: string;
  number: number;
  state: RevisionState;
  content_hash: string;
  submitted_by_id: number | null;
  submitter: string | null;
  submitted_at: Date;
  decided_at: Date | null;
  decision: 'approve' | 'request-changes' | null;
  comment: string | null;
  reviewer_id: number | null;
  reviewer: string | null;
  decision_at: Date | null;
  stage_count: number;
};

const SUMMARY_SQL = `SELECT r.id, r.project_id, p.name AS project_name, r.number, r.state, r.content_hash, r.submitted_by_id, su.display_name AS submitter,
       r.submitted_at, r.decided_at, d.decision, d.comment, d.reviewer_id, ru.display_name AS reviewer, d.created_at AS decision_at,
       COALESCE(jsonb_array_length(r.snapshot->'stages'), 0)::int AS stage_count
  FROM revisions r JOIN projects p ON p.id = r.project_id
  LEFT JOIN users su ON su.id = r.submitted_by_id
  LEFT JOIN decisions d ON d.revision_id = r.id
  LEFT JOIN users ru ON ru.id = d.reviewer_id`;

function toSummary(r: SummaryRow): RevisionSummary {
  return {
    id: r.id,
    projectId: r.project_id,
    projectName: r.project_name,
    number: r.number,
    state: r.state,
    contentHash: r.content_hash,
    submittedBy: r.submitted_by_id !== null ? { id: r.submitted_by_id, displayName: r.submitter ?? '?' } : null,
    submittedAt: r.submitted_at.toISOString(),
    decidedAt: r.decided_at?.toISOString() ?? null,
    decision: r.decision
      ? { decision: r.decision, comment: r.comment ?? '', reviewer: r.reviewer_id !== null ? { id: r.reviewer_id, displayName: r.reviewer ?? '?' } : null, createdAt: r.decision_at!.toISOString() }
      : null,
    stageCount: r.stage_count,
  };
}

export async function listRevisions(filter: { state?: RevisionState; projectId?: number } = {}): Promise<RevisionSummary[]> {
  const rows = await sequelize.query<SummaryRow>(
    `${SUMMARY_SQL}
      WHERE (:state::text IS NULL OR r.state = :state::text) AND (:projectId::int IS NULL OR r.project_id = :projectId::int)
      ORDER BY (r.state = 'submitted') DESC, COALESCE(r.decided_at, r.submitted_at) DESC, r.id DESC LIMIT 300`,
    { type: QueryTypes.SELECT, replacements: { state: filter.state ?? null, projectId: filter.projectId ?? null } },
  );
  return rows.map(toSummary);
}

async function summaryById(id: number): Promise<RevisionSummary & { snapshot: RevisionSnapshot }> {
  const rows = await sequelize.query<SummaryRow & { snapshot: RevisionSnapshot }>(`${SUMMARY_SQL.replace('SELECT r.id,', 'SELECT r.snapshot, r.id,')} WHERE r.id = :id`, {
    type: QueryTypes.SELECT,
    replacements: { id },
  });
  const r = rows[0];
  if (!r) throw new ApiError('not_found', 'No such revision.');
  return { ...toSummary(r), snapshot: r.snapshot };
}

/** The project as it stands now, frozen the way a submission freezes it (for "moved on since submission"). */
async function liveSnapshot(projectId: number): Promise<RevisionSnapshot> {
  const { watchers: _w, ...rest } = (await getProject(projectId)) as ProjectDetail & { watchers?: unknown };
  return toPlainJson({ ...rest, status: 'in-review' }) as unknown as RevisionSnapshot;
}

/**
 * A revision with its diff against an earlier revision of the same project: `compareWith` (a revision number), by
 * default the previous one whatever its state, so a resubmission after "changes requested" shows what was done.
 * A revision still waiting for a decision also says whether the project has moved on since it was submitted.
 */
export async function getRevision(id: number, opts: { compareWith?: number } = {}): Promise<RevisionDetail> {
  const rev = await summaryById(id);
  const earlier = await Revision.findAll({
    where: { projectId: rev.projectId, number: { [Op.lt]: rev.number } },
    order: [['number', 'DESC']],
    attributes: ['id', 'number', 'state', 'contentHash'],
  });
  if (opts.compareWith !== undefined && !earlier.some((r) => r.number === opts.compareWith)) {
    throw new ApiError('unprocessable_entity', `Revision ${rev.number} can be compared only with an earlier revision of the same project.`, {
      fieldErrors: { compare: [`Choose one of: ${earlier.map((r) => r.number).join(', ') || 'none (this is the first revision)'}.`] },
    });
  }
  const pick = opts.compareWith !== undefined ? earlier.find((r) => r.number === opts.compareWith)! : earlier[0];
  const base = pick ? await Revision.findByPk(pick.id) : null;
  const baseSnapshot = base ? (base.snapshot as unknown as RevisionSnapshot) : null;
  let movedOn: RevisionDetail['movedOn'] = null;
  if (rev.state === 'submitted') {
    const live = await liveSnapshot(rev.projectId).catch(() => null);
    if (live && revisionHash(live) !== rev.contentHash) movedOn = { diff: diffSnapshots(rev.snapshot, live, rev.number) };
  }
  return {
    ...rev,
    hashVerified: revisionHash(rev.snapshot) === rev.contentHash,
    base: base ? { id: base.id, number: base.number, contentHash: base.contentHash, state: base.state } : null,
    earlier: earlier.map((r) => ({ id: r.id, number: r.number, state: r.state })),
    diff: diffSnapshots(baseSnapshot, rev.snapshot, base?.number ?? null),
    movedOn,
  };
}

/** Why this user may not decide on the revision, or null when they may. */
export function decisionBlocker(user: Pick<CurrentUser, 'id' | 'role'>, rev: Pick<RevisionSummary, 'state' | 'submittedBy' | 'number'>): string | null {
  if (user.role !== 'reviewer' && user.role !== 'admin') return 'Only reviewers (and admins) decide on revisions.';
  if (rev.state !== 'submitted') return `Revision ${rev.number} has already been decided; decisions are permanent.`;
  if (rev.submittedBy?.id === user.id) return 'You submitted this revision, so another reviewer must decide on it.';
  return null;
}

function stageLines(snapshot: RevisionSnapshot): StageLine[] {
  return snapshot.stages.map((s) => ({
    name: s.name,
    tubeDesignation: s.tubeDesignation,
    ratingProblems: (s.analysis?.ratings ?? []).filter((r) => r.status === 'over').length,
    notChecked: (s.analysis?.ratings ?? []).filter((r) => r.status === 'not-checked').map((r) => r.label),
    error: s.analysisError?.message ?? null,
  }));
}

const link = (revisionId: number) => `${env.APP_URL}/reviews/${revisionId}`;

/** Freezes the project as a new revision (snapshot + content hash), marks it in review and tells the reviewers. */
export async function submitRevision(actor: CurrentUser, projectId: number, raw: SubmitRevisionInput = {}): Promise<RevisionDetail> {
  const input = submitRevisionSchema.parse(raw ?? {});
  const result = await sequelize.transaction(async (transaction) => {
    // Stage edits lock the project row too (to reopen it), so none can slip in between this lock and the snapshot.
    const project = await Project.findByPk(projectId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!project) throw new ApiError('not_found', 'No such project.');
    if (project.archived) throw new ApiError('conflict', 'This project is archived; restore it before submitting it for review.');
    const open = await Revision.findOne({ where: { projectId, state: 'submitted' }, transaction });
    if (open) throw new ApiError('conflict', `Revision ${open.number} of this project is still waiting for a decision.`, { details: { revisionId: open.id } });
    const detail = await getProject(projectId, transaction);
    if (detail.stages.length === 0) throw new ApiError('conflict', 'Add at least one stage before submitting the project for review.');
    const { watchers: _w, ...rest } = detail as typeof detail & { watchers?: unknown };
    const snapshot = toPlainJson({ ...rest, status: 'in-review' }) as unknown as RevisionSnapshot;
    const hash = revisionHash(snapshot);
    const lastApproved = await Revision.findOne({ where: { projectId, state: 'approved' }, order: [['number', 'DESC']], transaction });
    if (lastApproved && lastApproved.contentHash === hash) {
      throw new ApiError('conflict', `Nothing has changed since revision ${lastApproved.number} was approved.`, { details: { revisionId: lastApproved.id } });
    }
    const max = (await Revision.max('number', { where: { projectId }, transaction })) as number | null;
    const number = (max ?? 0) + 1;
    const rev = await Revision.create(
      { projectId, number, snapshot: snapshot as unknown as Record<string, unknown>, contentHash: hash, state: 'submitted', submittedById: actor.id, decidedAt: null },
      { transaction },
    );
    await sequelize.query(`UPDATE projects SET status = 'in-review' WHERE id = :projectId`, { replacements: { projectId }, transaction });
    const reviewers = await User.findAll({ where: { role: 'reviewer', active: true, id: { [Op.ne]: actor.id } }, transaction });
    let mailId: number | null = null;
    if (reviewers.length) {
      const mail = await enqueueMail(
        transaction,
        revisionSubmittedMail({ to: reviewers.map((u) => u.email), projectName: project.name, number, submitter: actor.displayName, note: input.note, link: link(rev.id), contentHash: hash, stages: stageLines(snapshot) }),
      );
      mailId = mail.id;
    }
    await recordAudit(transaction, {
      actorId: actor.id,
      action: 'revision.submit',
      targetType: 'revision',
      targetId: rev.id,
      projectId,
      details: { number, contentHash: hash, stages: snapshot.stages.length, note: input.note || undefined, notified: reviewers.length },
    });
    return { id: rev.id, mailId };
  });
  if (result.mailId !== null) deliverSoon([result.mailId]);
  return getRevision(result.id);
}

type RevisionDecisionMeta = NonNullable<NonNullable<ReportOptions['revision']>['decision']>;

/** The design report drawn from the frozen snapshot and stamped with the revision, its submitter and its decision. */
async function revisionReport(rev: RevisionSummary & { snapshot: RevisionSnapshot }, decision: RevisionDecisionMeta | null) {
  const state = decision ? (decision.decision === 'approve' ? 'approved' : 'changes-requested') : rev.state;
  // tolerance runs made for exactly the frozen stage versions (Explore), when there are any
  const tolerance = await toleranceDigests(rev.snapshot.stages.map((st) => ({ id: st.id, version: st.version }))).catch(() => []);
  const pdf = await renderReportPdf({ ...rev.snapshot, watchers: [] } as unknown as ProjectDetail, {
    revision: { number: rev.number, contentHash: rev.contentHash, state, submittedBy: rev.submittedBy?.displayName ?? null, submittedAt: rev.submittedAt, decision },
    tolerance,
  });
  const safe = rev.projectName.replace(/[^A-Za-z0-9]+/g, '-').replace(/^-|-$/g, '').toLowerCase() || 'project';
  return { pdf, filename: `anodyne-${safe}-revision-${rev.number}.pdf` };
}

async function reportAttachment(rev: RevisionSummary & { snapshot: RevisionSnapshot }, decision: RevisionDecisionMeta | null): Promise<MailAttachmentRecord | null> {
  try {
    const { pdf, filename } = await revisionReport(rev, decision);
    return { filename, contentType: 'application/pdf', contentBase64: pdf.toString('base64') };
  } catch (err) {
    // The decision must not wait on the report: it is recorded and mailed without the attachment.
    console.error('[revisions] report rendering failed', err instanceof Error ? err.message : err);
    return null;
  }
}

/** Records a reviewer's decision, updates the revision and the project, and queues the summary mail, all in one transaction. */
export async function decideRevision(actor: CurrentUser, revisionId: number, raw: DecisionInput): Promise<RevisionDetail> {
  const input = decisionSchema.parse(raw);
  const before = await summaryById(revisionId);
  const blocked = decisionBlocker(actor, before);
  if (blocked) throw new ApiError(before.state !== 'submitted' ? 'conflict' : 'forbidden', blocked);
  const at = new Date();
  // Rendered before the transaction so that no row lock is held while the PDF is drawn.
  const pdf = await reportAttachment(before, { decision: input.decision, reviewer: actor.displayName, comment: input.comment, at: at.toISOString() });
  const result = await sequelize.transaction(async (transaction) => {
    const rev = await Revision.findByPk(revisionId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!rev) throw new ApiError('not_found', 'No such revision.');
    if (rev.state !== 'submitted') throw new ApiError('conflict', `Revision ${rev.number} has already been decided; decisions are permanent.`);
    if (rev.submittedById === actor.id) throw new ApiError('forbidden', 'You submitted this revision, so another reviewer must decide on it.');
    const state = input.decision === 'approve' ? 'approved' : 'changes-requested';
    await Decision.create({ revisionId, reviewerId: actor.id, decision: input.decision, comment: input.comment, createdAt: at }, { transaction });
    await rev.update({ state, decidedAt: at }, { transaction });
    // Only a project still in review takes the decision's status; one edited since submission stays a draft.
    const [, affected] = (await sequelize.query(`UPDATE projects SET status = :state WHERE id = :projectId AND status = 'in-review'`, {
      replacements: { state, projectId: rev.projectId },
      transaction,
    })) as [unknown, number];
    const project = await Project.findByPk(rev.projectId, { transaction });
    const watcherIds = (await ProjectWatcher.findAll({ where: { projectId: rev.projectId }, transaction })).map((w) => w.userId);
    const recipientIds = [...new Set([rev.submittedById, project?.ownerId, ...watcherIds].filter((x): x is number => typeof x === 'number'))];
    const recipients = recipientIds.length ? await User.findAll({ where: { id: recipientIds, active: true }, transaction }) : [];
    let mailId: number | null = null;
    if (recipients.length) {
      const mail = await enqueueMail(
        transaction,
        revisionDecisionMail({
          to: recipients.map((u) => u.email),
          projectName: project?.name ?? before.projectName,
          number: rev.number,
          decision: input.decision,
          reviewer: actor.displayName,
          comment: input.comment,
          link: link(rev.id),
          contentHash: rev.contentHash,
          stages: stageLines(before.snapshot),
          pdf,
        }),
      );
      mailId = mail.id;
    }
    await recordAudit(transaction, {
      actorId: actor.id,
      action: input.decision === 'approve' ? 'revision.approve' : 'revision.request-changes',
      targetType: 'revision',
      targetId: rev.id,
      projectId: rev.projectId,
      details: { number: rev.number, contentHash: rev.contentHash, comment: input.comment || undefined, projectStatusChanged: Number(affected) > 0, notified: recipients.length },
    });
    return { mailId };
  });
  if (result.mailId !== null) deliverSoon([result.mailId]);
  return getRevision(revisionId);
}

/** The submitter (or an admin) takes back a revision nobody has decided on yet. Decided revisions are the record and stay. */
export async function withdrawRevision(actor: CurrentUser, revisionId: number): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    const rev = await Revision.findByPk(revisionId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!rev) throw new ApiError('not_found', 'No such revision.');
    if (rev.state === 'approved') throw new ApiError('conflict', `Revision ${rev.number} is approved; approved revisions cannot be changed or deleted.`);
    if (rev.state !== 'submitted') throw new ApiError('conflict', `Revision ${rev.number} has been decided; it stays as the record of the review.`);
    if (actor.role !== 'admin' && rev.submittedById !== actor.id) throw new ApiError('forbidden', 'Only the designer who submitted this revision (or an admin) can withdraw it.');
    await rev.destroy({ transaction });
    await sequelize.query(`UPDATE projects SET status = 'draft' WHERE id = :projectId AND status = 'in-review'`, { replacements: { projectId: rev.projectId }, transaction });
    await recordAudit(transaction, { actorId: actor.id, action: 'revision.withdraw', targetType: 'revision', targetId: rev.id, projectId: rev.projectId, details: { number: rev.number, contentHash: rev.contentHash } });
  });
}

/** The PDF of a revision as frozen, with its decision if there is one. */
export async function revisionPdf(revisionId: number) {
  const rev = await summaryById(revisionId);
  const { pdf, filename } = await revisionReport(
    rev,
    rev.decision ? { decision: rev.decision.decision, reviewer: rev.decision.reviewer?.displayName ?? '?', comment: rev.decision.comment, at: rev.decision.createdAt } : null,
  );
  return { body: pdf, fileName: filename };
}
