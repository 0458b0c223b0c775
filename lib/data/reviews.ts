import 'server-only';
/**
 * Reviews of one array revision or one estimate run: comments (engineers,
 * reviewers, admins), approvals (sign-off) and requests for changes
 * (reviewers and admins only). A review belongs to exactly one revision, so a
 * later edit (a new revision) starts with no sign-off. The author of the
 * revision or run is told by e-mail; a failed notification does not undo the
 * review (it is logged and reported as `notified: false`).
 */
import { Op } from 'sequelize';
import { ArrayDesign, ArrayRevision, EstimateRun, Review, User } from '@/models';
import type { ReviewKind } from '@/models/review';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';
import { appUrl } from '../env';
import { sendMail } from '../mail/send';
import type { ReviewCreateInput } from '../validations/review';

export type ReviewDto = {
  id: number;
  kind: ReviewKind;
  body: string;
  author: { id: number; name: string; role: string } | null;
  createdAt: string;
};
export type SignOffDto = { by: string; role: string; at: string; note: string };
export type ReviewThreadDto = {
  target:
    { type: 'array-revision'; arrayId: number; arrayName: string; revision: number } | { type: 'run'; runId: number };
  items: ReviewDto[];
  /** Approvals of this target, oldest first. */
  signOffs: SignOffDto[];
  /** The latest decision: approved, changes requested, or none yet. */
  status: 'approved' | 'changes-requested' | 'open';
};

type Target =
  | { revision: ArrayRevision; array: ArrayDesign; run?: undefined }
  | { run: EstimateRun; revision?: undefined; array?: undefined };

async function findTarget(
  caller: Caller,
  where: { arrayId?: number; revision?: number; runId?: number },
): Promise<Target> {
  if (where.runId !== undefined) {
    const run = await EstimateRun.findOne({ where: { id: where.runId, teamId: caller.teamId } });
    if (!run) throw new ApiError('not_found', `No estimate run with id ${where.runId} in your team.`);
    return { run };
  }
  const array = await ArrayDesign.findOne({ where: { id: where.arrayId, teamId: caller.teamId } });
  if (!array) throw new ApiError('not_found', `No array with id ${where.arrayId} in your team.`);
  const revision = await ArrayRevision.findOne({ where: { arrayId: array.id, revision: where.revision } });
  if (!revision) throw new ApiError('not_found', `Array "${array.name}" has no revision ${where.revision}.`);
  return { array, revision };
}

function whereOf(t: Target) {
  return t.run ? { estimateRunId: t.run.id } : { arrayRevisionId: t.revision.id };
}

async function thread(caller: Caller, t: Target): Promise<ReviewThreadDto> {
  const rows = await Review.findAll({
    where: { teamId: caller.teamId, ...whereOf(t) },
    order: [
      ['createdAt', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  const authors = await User.findAll({
    where: { id: { [Op.in]: rows.map((r) => r.authorId as number).filter(Boolean) } },
  });
  const items: ReviewDto[] = rows.map((r) => {
    const a = authors.find((u) => u.id === r.authorId);
    return {
      id: r.id,
      kind: r.kind,
      body: r.body,
      author: a ? { id: a.id, name: a.name, role: a.role } : null,
      createdAt: new Date(r.createdAt).toISOString(),
    };
  });
  const signOffs = items
    .filter((i) => i.kind === 'approval')
    .map((i) => ({
      by: i.author?.name ?? 'a former member',
      role: i.author?.role ?? '',
      at: i.createdAt,
      note: i.body,
    }));
  const decisions = items.filter((i) => i.kind !== 'comment');
  const last = decisions[decisions.length - 1];
  return {
    target: t.run
      ? { type: 'run', runId: t.run.id }
      : { type: 'array-revision', arrayId: t.array.id, arrayName: t.array.name, revision: t.revision.revision },
    items,
    signOffs,
    status: !last ? 'open' : last.kind === 'approval' ? 'approved' : 'changes-requested',
  };
}

export async function listReviews({
  caller,
  arrayId,
  revision,
  runId,
}: {
  caller: Caller;
  arrayId?: number;
  revision?: number;
  runId?: number;
}): Promise<ReviewThreadDto> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  if (runId === undefined && (arrayId === undefined || revision === undefined)) {
    throw new ApiError('validation_failed', 'Give arrayId and revision, or runId.', {
      fields: { arrayId: ['give arrayId and revision, or runId'] },
    });
  }
  return thread(caller, await findTarget(caller, { arrayId, revision, runId }));
}

const verb: Record<ReviewKind, string> = {
  comment: 'commented on',
  approval: 'approved',
  'changes-requested': 'asked for changes to',
};
const auditAction: Record<ReviewKind, string> = {
  comment: 'review.commented',
  approval: 'review.approved',
  'changes-requested': 'review.changes_requested',
};

export async function createReview({
  caller,
  input,
  origin,
}: {
  caller: Caller;
  input: ReviewCreateInput;
  origin?: string;
}): Promise<ReviewThreadDto & { created: ReviewDto; notified: boolean | null }> {
  assertPermission(caller, input.kind === 'comment' ? 'review.comment' : 'review.approve');
  const db = await getDb();
  const t = await findTarget(caller, { arrayId: input.arrayId, revision: input.revision, runId: input.runId });
  if (t.run && t.run.status !== 'done')
    throw new ApiError('conflict', `Estimate run ${t.run.id} is ${t.run.status}; review it once it has finished.`);
  const label = t.run ? `estimate run ${t.run.id}` : `"${t.array.name}" revision ${t.revision.revision}`;
  const review = await db.transaction(async (transaction) => {
    const row = await Review.create(
      {
        teamId: caller.teamId,
        arrayRevisionId: t.revision?.id ?? null,
        estimateRunId: t.run?.id ?? null,
        authorId: caller.id,
        kind: input.kind,
        body: input.body,
      },
      { transaction },
    );
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: auditAction[input.kind],
        target: label,
        detail: {
          reviewId: row.id,
          ...(t.run ? { runId: t.run.id } : { arrayId: t.array.id, revision: t.revision.revision }),
        },
      },
      transaction,
    );
    return row;
  });

  // Tell the author (not when they review their own work).
  const authorId = (t.run ? t.run.createdById : t.revision.authorId) as number | null;
  let notified: boolean | null = null;
  if (authorId && authorId !== caller.id) {
    const author = await User.findByPk(authorId);
    if (author && author.teamId === caller.teamId) {
      const page = t.run
        ? `${appUrl(origin)}/estimates/${t.run.id}`
        : `${appUrl(origin)}/arrays/${t.array.id}?rev=${t.revision.revision}`;
      try {
        await sendMail({
          to: author.email,
          subject: `${caller.name} ${verb[input.kind]} ${label}`,
          text: [
            `Hello ${author.name},`,
            '',
            `${caller.name} (${caller.role}) ${verb[input.kind]} ${label} on Steerwise${input.kind === 'approval' ? `: this ${t.run ? 'run' : 'revision'} now carries their sign-off.` : '.'}`,
            ...(input.body ? ['', ...input.body.split('\n').map((l) => `  ${l}`)] : []),
            '',
            `Open it: ${page}`,
          ].join('\n'),
        });
        notified = true;
      } catch (err) {
        console.error('[steerwise] review notification could not be sent', err);
        notified = false;
      }
    }
  }
  const out = await thread(caller, t);
  return { ...out, created: out.items.find((i) => i.id === review.id)!, notified };
}
