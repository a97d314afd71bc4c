import 'server-only';
import { QueryTypes } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import type { RatingCheck, StageAnalysis } from '@/lib/calc';
import {
  BenchInputError,
  benchDesignFromStage,
  evaluateBenchCheck,
  resolveTolerances,
  type BenchComparison,
  type BenchDesign,
  type BenchLimits,
  type BenchVerdict,
  type PlateCurrentMethod,
  type ResolvedTolerances,
} from '@/lib/calc/bench';
import { getObject, objectKey, putObject } from '@/lib/storage/s3';
import { benchCheckSchema, benchListQuerySchema, MAX_PHOTO_BYTES, PHOTO_TYPES, type BenchCheckInput, type BenchListQuery } from '@/lib/validation/bench';
import { Attachment, BenchCheck, Project, Stage, TubeType } from '@/models';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';

export type BenchPhoto = { id: number; fileName: string; contentType: string; byteSize: number; url: string };

export type BenchReadingsRecord = {
  supplyVoltage: number;
  plateVoltage: number;
  cathodeVoltage: number;
  screenVoltage: number | null;
  heaterVoltage: number | null;
  measuredCurrent: number | null;
  plateCurrentMethod: PlateCurrentMethod;
  stageVersion: number;
};

export type BenchCheckDTO = {
  id: number;
  stageId: number;
  stageName: string;
  projectId: number;
  projectName: string;
  technician: { id: number; displayName: string } | null;
  createdAt: string;
  verdict: BenchVerdict;
  readings: BenchReadingsRecord;
  comparisons: BenchComparison[];
  summary: string[];
  tubeSerial: string;
  notes: string;
  photos: BenchPhoto[];
};

/** The design values a technician sees beside each reading field. */
export type BenchExpected = {
  supplyVoltage: number | null;
  plateVoltage: number | null;
  cathodeVoltage: number | null;
  screenVoltage: number | null;
  heaterVoltage: number | null;
  plateCurrent: number | null;
  plateCathodeVoltage: number | null;
  plateDissipation: number | null;
};

export type BenchContext = {
  stage: { id: number; name: string; position: number; topology: string; tubeDesignation: string; projectId: number; projectName: string; version: number };
  pentode: boolean;
  fixedBias: boolean;
  /** how the plate current will be derived when no measured current is entered; null = a measured current is needed */
  plateCurrentRoute: PlateCurrentMethod | null;
  expected: BenchExpected;
  tolerances: ResolvedTolerances;
  limits: BenchLimits;
  analysisError: { code: string; message: string } | null;
};

function fallbackLimits(t: TubeType | null): BenchLimits {
  const r = t?.ratings ?? {};
  const out: BenchLimits = {};
  if (r.plateVoltage) out.plateVoltage = r.plateVoltage.value;
  if (r.plateDissipation) out.plateDissipation = r.plateDissipation.value;
  if (r.cathodeCurrent) out.cathodeCurrent = r.cathodeCurrent.value;
  if (r.screenVoltage) out.screenVoltage = r.screenVoltage.value;
  if (r.screenDissipation) out.screenDissipation = r.screenDissipation.value;
  return out;
}

async function loadDesign(stageId: number): Promise<{ context: BenchContext; design: BenchDesign; stage: Stage; project: Project }> {
  const stage = await Stage.findByPk(stageId);
  if (!stage) throw new ApiError('not_found', 'No such stage.');
  const [project, tube] = await Promise.all([Project.findByPk(stage.projectId), TubeType.findByPk(stage.tubeTypeId)]);
  if (!project) throw new ApiError('not_found', 'No such project.');
  const analysis = stage.analysis as unknown as StageAnalysis | null;
  const pentode = tube ? tube.family !== 'triode' : false;
  const heaterNominal = typeof tube?.heater?.voltage === 'number' ? tube.heater.voltage : null;
  const op = analysis?.operatingPoint ?? null;
  const design = benchDesignFromStage({
    inputs: stage.inputs as Record<string, unknown>,
    operatingPoint: op,
    ratings: (analysis?.ratings ?? null) as RatingCheck[] | null,
    fallbackLimits: fallbackLimits(tube),
    pentode,
    heaterNominal,
  });
  let route: PlateCurrentMethod | null = null;
  if (!design.fixedBias && design.cathodeResistor) route = 'cathode';
  else if (design.plateResistor) route = 'plate-resistor';
  else if (design.primaryResistance) route = 'primary-resistance';
  const context: BenchContext = {
    stage: { id: stage.id, name: stage.name, position: stage.position, topology: stage.topology, tubeDesignation: tube?.designation ?? '?', projectId: project.id, projectName: project.name, version: stage.version },
    pentode,
    fixedBias: design.fixedBias,
    plateCurrentRoute: route,
    expected: {
      supplyVoltage: design.supply || null,
      plateVoltage: op?.plateVoltage ?? null,
      cathodeVoltage: op ? op.cathodeVoltage : null,
      screenVoltage: pentode ? (op?.screenVoltage ?? null) : null,
      heaterVoltage: heaterNominal,
      plateCurrent: op?.plateCurrent ?? null,
      plateCathodeVoltage: op?.plateCathodeVoltage ?? null,
      plateDissipation: op?.plateDissipation ?? null,
    },
    tolerances: resolveTolerances(project.benchTolerances),
    limits: design.limits,
    analysisError: (stage.analysisError as BenchContext['analysisError']) ?? null,
  };
  return { context, design, stage, project };
}

export async function benchContext(stageId: number): Promise<BenchContext> {
  return (await loadDesign(stageId)).context;
}

function summaryOf(comparisons: BenchComparison[]): string[] {
  const rank = { fail: 2, check: 1, pass: 0 } as const;
  return comparisons.filter((c) => c.status !== 'pass' && c.advice).sort((a, b) => rank[b.status] - rank[a.status]).map((c) => c.advice!);
}

type Row = {
  id: number;
  stage_id: number;
  stage_name: string;
  project_id: number;
  project_name: string;
  technician_id: number | null;
  technician_name: string | null;
  created_at: Date;
  verdict: BenchVerdict;
  readings: BenchReadingsRecord & { summary?: string[] };
  comparisons: BenchComparison[];
  tube_serial: string;
  notes: string;
};

async function toDTOs(rows: Row[]): Promise<BenchCheckDTO[]> {
  const ids = rows.map((r) => r.id);
  const photos = ids.length ? await Attachment.findAll({ where: { ownerType: 'bench-check', ownerId: ids }, order: [['id', 'ASC']] }) : [];
  return rows.map((r) => {
    const { summary, ...readings } = r.readings;
    return {
      id: r.id,
      stageId: r.stage_id,
      stageName: r.stage_name,
      projectId: r.project_id,
      projectName: r.project_name,
      technician: r.technician_id !== null ? { id: r.technician_id, displayName: r.technician_name ?? '?' } : null,
      createdAt: r.created_at.toISOString(),
      verdict: r.verdict,
      readings,
      comparisons: r.comparisons,
      summary: summary ?? summaryOf(r.comparisons),
      tubeSerial: r.tube_serial,
      notes: r.notes,
      photos: photos
        .filter((p) => p.ownerId === r.id)
        .map((p) => ({ id: p.id, fileName: p.fileName, contentType: p.contentType, byteSize: p.byteSize, url: `/api/bench-checks/${r.id}/photos/${p.id}` })),
    };
  });
}

const SELECT = `SELECT b.id, b.stage_id, s.name AS stage_name, b.project_id, p.name AS project_name, b.technician_id, u.display_name AS technician_name,
                       b.created_at, b.verdict, b.readings, b.comparisons, b.tube_serial, b.notes
                  FROM bench_checks b JOIN stages s ON s.id = b.stage_id JOIN projects p ON p.id = b.project_id
                  LEFT JOIN users u ON u.id = b.technician_id`;

export async function listBenchChecks(filter: { projectId?: number } & Partial<BenchListQuery>): Promise<BenchCheckDTO[]> {
  const q = { ...benchListQuerySchema.parse({}), ...filter };
  const verdict = q.failing ? 'fail' : (q.verdict ?? null);
  const rows = await sequelize.query<Row>(
    `${SELECT}
      WHERE (:projectId::int IS NULL OR b.project_id = :projectId::int)
        AND (:stageId::int IS NULL OR b.stage_id = :stageId::int)
        AND (:verdict::text IS NULL OR b.verdict = :verdict::text)
      ORDER BY b.created_at DESC, b.id DESC LIMIT :limit`,
    { type: QueryTypes.SELECT, replacements: { projectId: filter.projectId ?? null, stageId: q.stageId ?? null, verdict, limit: q.limit } },
  );
  return toDTOs(rows);
}

export async function getBenchCheck(id: number): Promise<BenchCheckDTO> {
  const rows = await sequelize.query<Row>(`${SELECT} WHERE b.id = :id`, { type: QueryTypes.SELECT, replacements: { id } });
  if (!rows[0]) throw new ApiError('not_found', 'No such bench check.');
  return (await toDTOs(rows))[0]!;
}

export async function assertProjectExists(projectId: number) {
  if (!(await Project.findByPk(projectId, { attributes: ['id'] }))) throw new ApiError('not_found', 'No such project.');
}

/** Records a technician's readings with the derived quantities and their verdict, and its audit row, in one transaction. */
export async function recordBenchCheck(actor: CurrentUser, stageId: number, raw: BenchCheckInput): Promise<BenchCheckDTO> {
  const input = benchCheckSchema.parse(raw);
  const { context, design, project } = await loadDesign(stageId);
  let result;
  try {
    result = evaluateBenchCheck(design, input, context.tolerances);
  } catch (err) {
    if (err instanceof BenchInputError) throw new ApiError('unprocessable_entity', err.message, { fieldErrors: { [err.field]: [err.message] } });
    throw err;
  }
  const readings: BenchReadingsRecord & { summary: string[] } = {
    supplyVoltage: input.supplyVoltage,
    plateVoltage: input.plateVoltage,
    cathodeVoltage: input.cathodeVoltage,
    screenVoltage: input.screenVoltage ?? null,
    heaterVoltage: input.heaterVoltage ?? null,
    measuredCurrent: input.measuredCurrent ?? null,
    plateCurrentMethod: result.plateCurrentMethod,
    stageVersion: context.stage.version,
    summary: result.summary,
  };
  const id = await sequelize.transaction(async (transaction) => {
    const row = await BenchCheck.create(
      {
        stageId,
        projectId: project.id,
        technicianId: actor.id,
        readings,
        comparisons: result.comparisons as unknown as Record<string, unknown>[],
        verdict: result.verdict,
        tubeSerial: input.tubeSerial,
        notes: input.notes,
      },
      { transaction },
    );
    await recordAudit(transaction, {
      actorId: actor.id,
      action: 'bench-check.record',
      targetType: 'bench-check',
      targetId: row.id,
      projectId: project.id,
      details: { stageId, stage: context.stage.name, verdict: result.verdict, tubeSerial: input.tubeSerial || undefined },
    });
    return row.id;
  });
  return getBenchCheck(id);
}

const MAGIC: Record<(typeof PHOTO_TYPES)[number], (b: Buffer) => boolean> = {
  'image/jpeg': (b) => b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff,
  'image/png': (b) => b.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])),
  'image/webp': (b) => b.subarray(0, 4).toString('latin1') === 'RIFF' && b.subarray(8, 12).toString('latin1') === 'WEBP',
};

/** Stores a photo of the build for a bench check: bytes to object storage, the row and its audit entry together. */
export async function addBenchPhoto(actor: CurrentUser, checkId: number, file: File): Promise<BenchPhoto> {
  const check = await BenchCheck.findByPk(checkId);
  if (!check) throw new ApiError('not_found', 'No such bench check.');
  if (file.size > MAX_PHOTO_BYTES) {
    throw new ApiError('payload_too_large', `The photo is ${(file.size / 1048576).toFixed(1)} MB; photos are limited to ${MAX_PHOTO_BYTES / 1048576} MB.`, { fieldErrors: { file: ['Too large.'] } });
  }
  const bytes = Buffer.from(await file.arrayBuffer());
  if (bytes.length === 0) throw new ApiError('unprocessable_entity', 'The file is empty.', { fieldErrors: { file: ['The file is empty.'] } });
  const type = PHOTO_TYPES.find((t) => MAGIC[t](bytes));
  if (!type) throw new ApiError('unsupported_media_type', `"${file.name}" is not a JPEG, PNG or WebP image.`, { fieldErrors: { file: ['Not a JPEG, PNG or WebP image.'] } });
  const name = (file.name || `photo.${type.split('/')[1]}`).slice(0, 200);
  const id = await sequelize.transaction(async (transaction) => {
    const row = await Attachment.create(
      { ownerType: 'bench-check', ownerId: checkId, kind: 'photo', fileName: name, contentType: type, byteSize: bytes.length, objectKey: objectKey(`bench-checks/${checkId}/photos`, name), uploadedById: actor.id },
      { transaction },
    );
    await recordAudit(transaction, { actorId: actor.id, action: 'bench-check.photo', targetType: 'attachment', targetId: row.id, projectId: check.projectId, details: { benchCheckId: checkId, fileName: name, byteSize: bytes.length } });
    // Inside the transaction: if the upload fails, no row points at a missing object.
    await putObject(row.objectKey, bytes, type);
    return row.id;
  });
  return { id, fileName: name, contentType: type, byteSize: bytes.length, url: `/api/bench-checks/${checkId}/photos/${id}` };
}

export async function benchPhotoFile(checkId: number, photoId: number) {
  const a = await Attachment.findOne({ where: { id: photoId, ownerType: 'bench-check', ownerId: checkId } });
  if (!a) throw new ApiError('not_found', 'No such photo.');
  const obj = await getObject(a.objectKey);
  return { body: obj.body, fileName: a.fileName, contentType: a.contentType };
}

/** Projects and their stages for the bench page's pickers. */
export async function benchPickerOptions() {
  const rows = await sequelize.query<{ project_id: number; project: string; stage_id: number; stage: string; position: number; designation: string | null; last_verdict: BenchVerdict | null }>(
    `SELECT p.id AS project_id, p.name AS project, s.id AS stage_id, s.name AS stage, s.position, t.designation,
            (SELECT b.verdict FROM bench_checks b WHERE b.stage_id = s.id ORDER BY b.created_at DESC, b.id DESC LIMIT 1) AS last_verdict
       FROM projects p JOIN stages s ON s.project_id = p.id LEFT JOIN tube_types t ON t.id = s.tube_type_id
      WHERE NOT p.archived ORDER BY p.name, s.position`,
    { type: QueryTypes.SELECT },
  );
  const projects = new Map<number, { id: number; name: string; stages: { id: number; name: string; position: number; tubeDesignation: string; lastVerdict: BenchVerdict | null }[] }>();
  for (const r of rows) {
    const p = projects.get(r.project_id) ?? { id: r.project_id, name: r.project, stages: [] };
    p.stages.push({ id: r.stage_id, name: r.stage, position: r.position, tubeDesignation: r.designation ?? '?', lastVerdict: r.last_verdict });
    projects.set(r.project_id, p);
  }
  return [...projects.values()];
}

