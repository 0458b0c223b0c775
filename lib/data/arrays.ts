import 'server-only';
import { Op, Transaction, UniqueConstraintError, col, where, type IncludeOptions } from 'sequelize';
import { ArrayDesign, ArrayRevision, User } from '@/models';
import { arrayMetrics, type ArrayMetrics } from '@/lib/doa/design/array-figures';
import { resolveArrayGeometry, type ArrayInput, type GeometryWarning } from '@/lib/validations/array';
import { mergeArrayInput, requireObjectBody, revisionColumns, validateArrayInput } from '@/lib/validations/array-save';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { recordAudit } from './record-audit';
import { getDb } from '../db';

/**
 * Arrays and their immutable revisions, always inside the caller's team:
 * an id of another team's array is "not found", never "forbidden".
 *
 * A revision stores the validated input as given (`config`) plus the
 * resolved geometry columns (elements, spacing in wavelengths, the frequency
 * and the propagation speed actually used). Saving never changes an old
 * revision: `updateArray` adds revision n + 1 in one transaction.
 *
 * `metrics` are docs/conventions.md §5's figures for the uniform array at broadside
 * (lib/doa `arrayMetrics`), whatever the taper or disabled elements.
 */

export type PersonDto = { id: number; name: string } | null;
export type RevisionSummaryDto = {
  revision: number;
  author: PersonDto;
  createdAt: string;
  elements: number;
  spacingWavelengths: number;
};

/** The array as GET /api/v1/arrays/{id} answers (docs/conventions.md §7) plus extra fields. */
export type ArrayDto = {
  id: number;
  name: string;
  revision: number;
  elements: number;
  spacingWavelengths: number;
  frequencyHz?: number;
  propagationSpeedMps?: number;
  metrics: ArrayMetrics;
  latestRevision: number;
  /** The validated input of this revision, as saved (what the designer opens). */
  config: ArrayInput;
  warnings: GeometryWarning[];
  author: PersonDto;
  createdBy: PersonDto;
  /** When the array was first created. */
  createdAt: string;
  /** When this revision was saved. */
  revisionCreatedAt: string;
};

export type ArrayDetailDto = ArrayDto & { revisions: RevisionSummaryDto[] };

const iso = (d: Date | string): string => new Date(d).toISOString();
const person = (u: User | null | undefined): PersonDto => (u ? { id: u.id, name: u.name } : null);

type RevisionRow = ArrayRevision & { author?: User | null };
type ArrayRow = ArrayDesign & { createdBy?: User | null };

function toArrayDto(array: ArrayRow, rev: RevisionRow): ArrayDto {
  const config = (typeof rev.config === 'string' ? JSON.parse(rev.config) : rev.config) as ArrayInput;
  // The §7 keys first and in their order; optional ones only when known.
  return {
    id: array.id,
    name: config.name ?? array.name,
    revision: rev.revision,
    elements: rev.elements,
    spacingWavelengths: rev.spacingWavelengths,
    ...(rev.frequencyHz != null ? { frequencyHz: rev.frequencyHz } : {}),
    ...(rev.propagationSpeedMps != null ? { propagationSpeedMps: rev.propagationSpeedMps } : {}),
    metrics: arrayMetrics(rev.elements, rev.spacingWavelengths),
    latestRevision: array.latestRevision,
    config,
    warnings: resolveArrayGeometry(config).warnings,
    author: person(rev.author),
    createdBy: person(array.createdBy),
    createdAt: iso(array.createdAt),
    revisionCreatedAt: iso(rev.createdAt),
  };
}

const authorInclude: IncludeOptions = { model: User, as: 'author', attributes: ['id', 'name'] };
const createdByInclude: IncludeOptions = { model: User, as: 'createdBy', attributes: ['id', 'name'] };

async function findOwnArray(caller: Caller, id: number, transaction?: Transaction): Promise<ArrayRow> {
  const array = await ArrayDesign.findOne({
    where: { id, teamId: caller.teamId },
    include: [createdByInclude],
    transaction,
  });
  if (!array) throw new ApiError('not_found', `No array with id ${id} in your team.`);
  return array as ArrayRow;
}

async function findRevision(arrayId: number, revision: number, transaction?: Transaction): Promise<RevisionRow> {
  const rev = await ArrayRevision.findOne({ where: { arrayId, revision }, include: [authorInclude], transaction });
  if (!rev) throw new ApiError('not_found', `Array ${arrayId} has no revision ${revision}.`);
  return rev as RevisionRow;
}

/** Every array of the caller's team at its latest revision, most recently saved first. */
export async function listArrays({ caller }: { caller: Caller }): Promise<ArrayDto[]> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  // One query: each array of the team joined to its latest revision row.
  const rows = (await ArrayRevision.findAll({
    where: where(col('ArrayRevision.revision'), Op.eq, col('array.latestRevision')),
    include: [
      { model: ArrayDesign, as: 'array', where: { teamId: caller.teamId }, include: [createdByInclude] },
      authorInclude,
    ],
  })) as (RevisionRow & { array: ArrayRow })[];
  return rows
    .map((r) => toArrayDto(r.array, r))
    .sort((x, y) => y.revisionCreatedAt.localeCompare(x.revisionCreatedAt) || y.id - x.id);
}

/** One array at its latest revision (or at `revision`), with the list of all its revisions. */
export async function getArray({
  caller,
  id,
  revision,
}: {
  caller: Caller;
  id: number;
  revision?: number;
}): Promise<ArrayDetailDto> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const array = await findOwnArray(caller, id);
  const rev = await findRevision(array.id, revision ?? array.latestRevision);
  return { ...toArrayDto(array, rev), revisions: await listRevisions({ caller, id }) };
}

/** The revisions of one array, newest first, with authors and dates. */
export async function listRevisions({ caller, id }: { caller: Caller; id: number }): Promise<RevisionSummaryDto[]> {
  assertPermission(caller, 'arrays.read');
  await getDb();
  const array = await findOwnArray(caller, id);
  const rows = (await ArrayRevision.findAll({
    where: { arrayId: array.id },
    include: [authorInclude],
    order: [['revision', 'DESC']],
  })) as RevisionRow[];
  return rows.map((r) => ({
    revision: r.revision,
    author: person(r.author),
    createdAt: iso(r.createdAt),
    elements: r.elements,
    spacingWavelengths: r.spacingWavelengths,
  }));
}

/** Creates an array at revision 1 from a raw (unvalidated) body. */
export async function createArray({ caller, input: raw }: { caller: Caller; input: unknown }): Promise<ArrayDetailDto> {
  assertPermission(caller, 'arrays.edit');
  const { input, geometry } = validateArrayInput(raw);
  const db = await getDb();
  const id = await db.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
    const array = await ArrayDesign.create(
      { teamId: caller.teamId, name: input.name, latestRevision: 1, createdById: caller.id },
      { transaction },
    );
    await ArrayRevision.create(
      { arrayId: array.id, revision: 1, authorId: caller.id, ...revisionColumns(input, geometry) },
      { transaction },
    );
    await recordAudit(
      {
        teamId: caller.teamId,
        userId: caller.id,
        action: 'array.created',
        target: input.name,
        detail: {
          arrayId: array.id,
          revision: 1,
          elements: input.elements,
          spacingWavelengths: geometry.spacingWavelengths,
          via: caller.via,
        },
      },
      transaction,
    );
    return array.id;
  });
  return getArray({ caller, id });
}

/** Saves revision n + 1 from a partial (unvalidated) change merged into revision n. Old revisions are never touched. */
export async function updateArray({
  caller,
  id,
  patch,
}: {
  caller: Caller;
  id: number;
  patch: unknown;
}): Promise<ArrayDetailDto> {
  assertPermission(caller, 'arrays.edit');
  const changes = requireObjectBody(patch, 'with the fields to change');
  const db = await getDb();
  try {
    await db.transaction({ type: Transaction.TYPES.IMMEDIATE }, async (transaction) => {
      // Postgres: concurrent saves of one array queue on its row lock, so each reads the revision the last one wrote
      // (SQLite's immediate transaction already serialises writers).
      await ArrayDesign.findOne({
        where: { id, teamId: caller.teamId },
        attributes: ['id'],
        lock: transaction.LOCK.UPDATE,
        transaction,
      });
      const array = await findOwnArray(caller, id, transaction);
      const previous = await findRevision(array.id, array.latestRevision, transaction);
      const { input, geometry } = validateArrayInput(mergeArrayInput(previous.config as ArrayInput, changes));
      const revision = array.latestRevision + 1;
      await ArrayRevision.create(
        { arrayId: array.id, revision, authorId: caller.id, ...revisionColumns(input, geometry) },
        { transaction },
      );
      const renamedFrom = array.name !== input.name ? array.name : undefined;
      await ArrayDesign.update(
        { latestRevision: revision, name: input.name },
        { where: { id: array.id, teamId: caller.teamId }, transaction },
      );
      await recordAudit(
        {
          teamId: caller.teamId,
          userId: caller.id,
          action: 'array.revised',
          target: input.name,
          detail: {
            arrayId: array.id,
            revision,
            changed: Object.keys(changes),
            ...(renamedFrom ? { renamedFrom } : {}),
            via: caller.via,
          },
        },
        transaction,
      );
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError)
      throw new ApiError('conflict', `Array ${id} was saved by someone else at the same moment; reload and try again.`);
    throw err;
  }
  return getArray({ caller, id });
}
