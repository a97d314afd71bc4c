import 'server-only';
import { Op, QueryTypes, type Transaction, type WhereOptions } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import type { CurrentUser } from '@/lib/auth/session';
import * as calc from '@/lib/calc';
import type { Tube } from '@/lib/calc';
import {
  createTubeSchema,
  modelInputSchema,
  RATING_KEYS,
  updateModelSchema,
  updateTubeSchema,
  type CreateTubeInput,
  type ModelInput,
  type TubeListQuery,
  type UpdateModelInput,
  type UpdateTubeInput,
} from '@/lib/validation/tube';
import { Attachment, CurveFit, CurveSet, TubeModel, TubeType, User } from '@/models';
import type { TubeCapacitancesRecord, TubeHeater, TubeRatingsRecord, TypicalPoint } from '@/models/types';
import { engineTubeFrom } from '@/lib/tubes/engine-tube';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';

export type Family = TubeType['family'];
export type ModelRow = {
  id: number;
  tubeTypeId: number;
  name: string;
  kind: TubeModel['kind'];
  parameters: Record<string, number>;
  source: string;
  isDefault: boolean;
  published: boolean;
  curveFitId: number | null;
  createdAt: string;
};
export type FitRow = {
  id: number;
  curveSetId: number;
  model: CurveFit['model'];
  parameters: Record<string, number>;
  rmsErrorPercent: number;
  maxErrorPercent: number;
  status: 'proposed' | 'accepted' | 'discarded';
  createdAt: string;
};
export type CurveSetRow = {
  id: number;
  tubeTypeId: number;
  name: string;
  kind: CurveSet['kind'];
  currentUnit: CurveSet['currentUnit'];
  fileName: string;
  byteSize: number;
  pointCount: number;
  demo: boolean;
  notes: string;
  uploadedBy: string | null;
  createdAt: string;
  fits: FitRow[];
};
export type AttachmentRow = { id: number; kind: string; fileName: string; contentType: string; byteSize: number; uploadedBy: string | null; createdAt: string; url: string };
export type TubeSummary = {
  id: number;
  designation: string;
  aliases: string[];
  family: Family;
  sections: number;
  heater: TubeHeater;
  ratings: TubeRatingsRecord;
  published: boolean;
  retired: boolean;
  modelCount: number;
  curveSetCount: number;
  defaultModel: { id: number; name: string; kind: ModelRow['kind'] } | null;
};
export type TubeDetail = TubeSummary & {
  capacitances: TubeCapacitancesRecord;
  typicalPoints: TypicalPoint[];
  notes: string;
  createdBy: string | null;
  createdAt: string;
  updatedAt: string;
  models: ModelRow[];
  curveSets: CurveSetRow[];
  attachments: AttachmentRow[];
};

export function toModelRow(m: TubeModel): ModelRow {
  return {
    id: m.id,
    tubeTypeId: m.tubeTypeId,
    name: m.name,
    kind: m.kind,
    parameters: m.parameters,
    source: m.source,
    isDefault: m.isDefault,
    published: m.published,
    curveFitId: m.curveFitId,
    createdAt: m.createdAt.toISOString(),
  };
}

export function toFitRow(f: CurveFit): FitRow {
  return {
    id: f.id,
    curveSetId: f.curveSetId,
    model: f.model,
    parameters: f.parameters,
    rmsErrorPercent: f.rmsErrorPercent,
    maxErrorPercent: f.maxErrorPercent,
    status: f.status,
    createdAt: f.createdAt.toISOString(),
  };
}

async function userNames(ids: (number | null)[]): Promise<Map<number, string>> {
  const wanted = [...new Set(ids.filter((x): x is number => typeof x === 'number'))];
  if (wanted.length === 0) return new Map();
  const users = await User.findAll({ where: { id: { [Op.in]: wanted } }, attributes: ['id', 'displayName'] });
  return new Map(users.map((u) => [u.id, u.displayName]));
}

type Counts = { models: number; curveSets: number; defaultModel: TubeSummary['defaultModel'] };

async function countsFor(ids: number[]): Promise<Map<number, Counts>> {
  const out = new Map<number, Counts>(ids.map((id) => [id, { models: 0, curveSets: 0, defaultModel: null }]));
  if (ids.length === 0) return out;
  const models = await TubeModel.findAll({ where: { tubeTypeId: { [Op.in]: ids } }, attributes: ['id', 'tubeTypeId', 'name', 'kind', 'isDefault'] });
  for (const m of models) {
    const c = out.get(m.tubeTypeId)!;
    c.models += 1;
    if (m.isDefault) c.defaultModel = { id: m.id, name: m.name, kind: m.kind };
  }
  const sets = await sequelize.query<{ tube_type_id: number; n: number }>(
    'SELECT tube_type_id, count(*)::int AS n FROM curve_sets WHERE tube_type_id IN (:ids) GROUP BY tube_type_id',
    { type: QueryTypes.SELECT, replacements: { ids } },
  );
  for (const s of sets) out.get(s.tube_type_id)!.curveSets = s.n;
  return out;
}

function summary(t: TubeType, c: Counts | undefined): TubeSummary {
  return {
    id: t.id,
    designation: t.designation,
    aliases: t.aliases,
    family: t.family,
    sections: t.sections,
    heater: t.heater,
    ratings: t.ratings,
    published: t.published,
    retired: t.retired,
    modelCount: c?.models ?? 0,
    curveSetCount: c?.curveSets ?? 0,
    defaultModel: c?.defaultModel ?? null,
  };
}

/** Search matches the designation or any alias, case-insensitively, anywhere in the text. */
export async function listTubes(query: Partial<TubeListQuery> = {}): Promise<{ tubes: TubeSummary[]; total: number; page: number; pageSize: number }> {
  const page = query.page ?? 1;
  const pageSize = query.pageSize ?? 50;
  const and: WhereOptions<TubeType>[] = [];
  if (!query.includeRetired) and.push({ retired: false });
  if (query.family) and.push({ family: query.family });
  if (query.search) {
    const like = `%${query.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    and.push({
      [Op.or]: [
        { designation: { [Op.iLike]: like } },
        sequelize.where(sequelize.fn('array_to_string', sequelize.col('aliases'), ' '), { [Op.iLike]: like }),
      ],
    } as WhereOptions<TubeType>);
  }
  const { rows, count } = await TubeType.findAndCountAll({
    where: { [Op.and]: and },
    order: [['designation', 'ASC']],
    limit: pageSize,
    offset: (page - 1) * pageSize,
  });
  const counts = await countsFor(rows.map((r) => r.id));
  return { tubes: rows.map((t) => summary(t, counts.get(t.id))), total: count, page, pageSize };
}

export async function getTube(id: number): Promise<TubeDetail> {
  const t = await TubeType.findByPk(id);
  if (!t) throw new ApiError('not_found', 'No such tube type.');
  const [models, sets, attachments, counts] = await Promise.all([
    TubeModel.findAll({ where: { tubeTypeId: id }, order: [['isDefault', 'DESC'], ['id', 'ASC']] }),
    CurveSet.findAll({ where: { tubeTypeId: id }, order: [['id', 'DESC']] }),
    Attachment.findAll({ where: { ownerType: 'tube-type', ownerId: id }, order: [['id', 'DESC']] }),
    countsFor([id]),
  ]);
  const fits = sets.length ? await CurveFit.findAll({ where: { curveSetId: { [Op.in]: sets.map((s) => s.id) } }, order: [['id', 'DESC']] }) : [];
  const names = await userNames([t.createdById, ...sets.map((s) => s.uploadedById), ...attachments.map((a) => a.uploadedById)]);
  return {
    ...summary(t, counts.get(id)),
    capacitances: t.capacitances,
    typicalPoints: t.typicalPoints,
    notes: t.notes,
    createdBy: t.createdById ? (names.get(t.createdById) ?? null) : null,
    createdAt: t.createdAt.toISOString(),
    updatedAt: t.updatedAt.toISOString(),
    models: models.map(toModelRow),
    curveSets: sets.map((s) => toCurveSetRow(s, fits.filter((f) => f.curveSetId === s.id), names)),
    attachments: attachments.map((a) => toAttachmentRow(a, names)),
  };
}

export function toCurveSetRow(s: CurveSet, fits: CurveFit[], names: Map<number, string>): CurveSetRow {
  return {
    id: s.id,
    tubeTypeId: s.tubeTypeId,
    name: s.name,
    kind: s.kind,
    currentUnit: s.currentUnit,
    fileName: s.fileName,
    byteSize: s.byteSize,
    pointCount: s.pointCount,
    demo: s.demo,
    notes: s.notes,
    uploadedBy: s.uploadedById ? (names.get(s.uploadedById) ?? null) : null,
    createdAt: s.createdAt.toISOString(),
    fits: fits.map(toFitRow),
  };
}

export function toAttachmentRow(a: Attachment, names: Map<number, string>): AttachmentRow {
  return {
    id: a.id,
    kind: a.kind,
    fileName: a.fileName,
    contentType: a.contentType,
    byteSize: a.byteSize,
    uploadedBy: a.uploadedById ? (names.get(a.uploadedById) ?? null) : null,
    createdAt: a.createdAt.toISOString(),
    url: `/api/attachments/${a.id}`,
  };
}

/** Published (seeded) entries change only with 'tubes:edit-published'; the message says who may. */
export function assertMayEdit(user: CurrentUser, tube: { published: boolean; designation: string }, what = 'edit') {
  if (tube.published && !can(user.role, 'tubes:edit-published')) {
    throw new ApiError('forbidden', `${tube.designation} is a published library entry; only an admin may ${what} it. Add a new model or curve set instead, or ask an admin.`);
  }
}

/** Non-retired type, locked for the rest of the transaction. */
export async function lockTube(id: number, transaction: Transaction, opts: { allowRetired?: boolean } = {}) {
  const t = await TubeType.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
  if (!t) throw new ApiError('not_found', 'No such tube type.');
  if (t.retired && !opts.allowRetired) throw new ApiError('conflict', `${t.designation} is retired; an admin can bring it back before it is changed.`);
  return t;
}

function modelMatchesFamily(kind: ModelRow['kind'], family: Family): boolean {
  return family === 'triode' ? kind === 'koren-triode' : true;
}

async function createModelRow(
  transaction: Transaction,
  actorId: number,
  tube: TubeType,
  m: { name: string; kind: ModelRow['kind']; parameters: Record<string, number>; source: string; setDefault?: boolean; curveFitId?: number | null; mayDefaultPublished?: boolean },
) {
  if (!modelMatchesFamily(m.kind, tube.family)) {
    throw new ApiError('unprocessable_entity', `A ${tube.family} cannot take a ${m.kind} model.`, { fieldErrors: { kind: ['Use a Koren triode model for a triode.'] } });
  }
  const existingDefault = await TubeModel.findOne({ where: { tubeTypeId: tube.id, isDefault: true }, transaction });
  // The first model of a type becomes its default by itself – except on a published entry, whose default only an
  // admin sets (explicitly), so one designer's model does not become everyone's.
  const makeDefault = m.setDefault === true || (!existingDefault && (!tube.published || m.mayDefaultPublished === true));
  if (makeDefault && existingDefault) await existingDefault.update({ isDefault: false }, { transaction });
  const row = await TubeModel.create(
    {
      tubeTypeId: tube.id,
      name: m.name,
      kind: m.kind,
      parameters: m.parameters,
      source: m.source,
      isDefault: makeDefault,
      published: false,
      curveFitId: m.curveFitId ?? null,
      createdById: actorId,
    },
    { transaction },
  );
  await recordAudit(transaction, {
    actorId,
    action: 'tube-model.create',
    targetType: 'tube-model',
    targetId: row.id,
    details: { tubeTypeId: tube.id, designation: tube.designation, name: m.name, kind: m.kind, source: m.source, isDefault: makeDefault, previousDefaultId: makeDefault ? (existingDefault?.id ?? null) : undefined },
  });
  return row;
}

export { createModelRow };

export async function createTube(actor: CurrentUser, input: CreateTubeInput) {
  const data = createTubeSchema.parse(input);
  return sequelize.transaction(async (transaction) => {
    const clash = await TubeType.findOne({ where: { designation: { [Op.iLike]: data.designation } }, transaction });
    if (clash) throw new ApiError('conflict', `${clash.designation} is already in the library.`, { fieldErrors: { designation: ['This designation is already in the library.'] } });
    const tube = await TubeType.create(
      {
        designation: data.designation,
        aliases: data.aliases,
        family: data.family,
        sections: data.sections,
        heater: data.heater,
        ratings: data.ratings as TubeRatingsRecord,
        capacitances: data.capacitances,
        typicalPoints: data.typicalPoints as TypicalPoint[],
        notes: data.notes,
        published: false,
        retired: false,
        createdById: actor.id,
      },
      { transaction },
    );
    await recordAudit(transaction, { actorId: actor.id, action: 'tube.create', targetType: 'tube-type', targetId: tube.id, details: { designation: tube.designation, family: tube.family } });
    if (data.model) await createModelRow(transaction, actor.id, tube, { ...data.model, parameters: data.model.parameters as Record<string, number>, setDefault: true });
    return { id: tube.id };
  }).then(({ id }) => getTube(id));
}

export async function updateTube(actor: CurrentUser, id: number, patch: UpdateTubeInput) {
  const data = updateTubeSchema.parse(patch);
  await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(id, transaction, { allowRetired: true });
    const retiring = data.retired === true && !tube.retired;
    assertMayEdit(actor, tube, retiring ? 'retire' : 'edit');
    if (data.published !== undefined && !can(actor.role, 'tubes:edit-published')) {
      throw new ApiError('forbidden', 'Only an admin may publish or unpublish a library entry.');
    }
    if (tube.retired && data.retired !== false) throw new ApiError('conflict', `${tube.designation} is retired; bring it back first (retired: false).`);
    if (data.designation && data.designation.toLowerCase() !== tube.designation.toLowerCase()) {
      const clash = await TubeType.findOne({ where: { designation: { [Op.iLike]: data.designation }, id: { [Op.ne]: id } }, transaction });
      if (clash) throw new ApiError('conflict', `${clash.designation} is already in the library.`, { fieldErrors: { designation: ['This designation is already in the library.'] } });
    }
    if (data.family && data.family === 'triode' && tube.family !== 'triode') {
      const pentodeModels = await TubeModel.count({ where: { tubeTypeId: id, kind: 'koren-pentode' }, transaction });
      if (pentodeModels > 0) throw new ApiError('conflict', 'This type has pentode models; it cannot become a triode.', { fieldErrors: { family: ['Has pentode models.'] } });
    }
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(data)) {
      const key = k as keyof typeof data;
      const old = tube.get(key as never) as unknown;
      if (JSON.stringify(old) !== JSON.stringify(v)) {
        before[k] = old;
        after[k] = v;
      }
    }
    await tube.update(data as Partial<TubeType>, { transaction });
    const action = retiring ? 'tube.retire' : data.retired === false && before.retired === true ? 'tube.restore' : 'tube.update';
    await recordAudit(transaction, { actorId: actor.id, action, targetType: 'tube-type', targetId: id, details: { designation: tube.designation, before, after } });
  });
  return getTube(id);
}

export async function addModel(actor: CurrentUser, tubeTypeId: number, input: ModelInput) {
  const data = modelInputSchema.parse(input);
  const row = await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(tubeTypeId, transaction);
    if (data.setDefault) assertMayEdit(actor, tube, 'change the default model of');
    return createModelRow(transaction, actor.id, tube, { ...data, parameters: data.parameters as Record<string, number>, mayDefaultPublished: can(actor.role, 'tubes:edit-published') });
  });
  return toModelRow(row);
}

export async function updateModel(actor: CurrentUser, tubeTypeId: number, modelId: number, input: UpdateModelInput) {
  const data = updateModelSchema.parse(input);
  const row = await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(tubeTypeId, transaction);
    const model = await TubeModel.findOne({ where: { id: modelId, tubeTypeId }, transaction, lock: transaction.LOCK.UPDATE });
    if (!model) throw new ApiError('not_found', 'No such model for this tube type.');
    if (model.published) assertMayEdit(actor, { published: true, designation: `${tube.designation} ${model.name}` });
    if (data.setDefault) assertMayEdit(actor, tube, 'change the default model of');
    const previousDefault = data.setDefault ? await TubeModel.findOne({ where: { tubeTypeId, isDefault: true }, transaction }) : null;
    if (previousDefault && previousDefault.id !== model.id) await previousDefault.update({ isDefault: false }, { transaction });
    await model.update({ ...(data.name ? { name: data.name } : {}), ...(data.source ? { source: data.source } : {}), ...(data.setDefault ? { isDefault: true } : {}) }, { transaction });
    await recordAudit(transaction, {
      actorId: actor.id,
      action: data.setDefault ? 'tube-model.set-default' : 'tube-model.update',
      targetType: 'tube-model',
      targetId: model.id,
      details: { tubeTypeId, designation: tube.designation, ...data, previousDefaultId: previousDefault?.id ?? null },
    });
    return model;
  });
  return toModelRow(row);
}

export async function getModel(tubeTypeId: number, modelId: number) {
  const model = await TubeModel.findOne({ where: { id: modelId, tubeTypeId } });
  if (!model) throw new ApiError('not_found', 'No such model for this tube type.');
  return toModelRow(model);
}

/**
 * For the stage designer and others: the inline engine tube of a type from its default (or the given) model.
 * Throws ApiError 'not_found' for an unknown type or model, 'unprocessable_entity' when the type has no model.
 */
export { engineTubeFrom };

/**
 * The model used when none is chosen: the type's default, or failing that one of its published models. A user's
 * own model on a type without a default is used only when chosen by id.
 */
function defaultModelWhere(tubeTypeId: number): WhereOptions<TubeModel> {
  return { tubeTypeId, [Op.or]: [{ isDefault: true }, { published: true }] };
}

export async function getEngineTube(tubeTypeId: number, modelId?: number, transaction?: Transaction): Promise<Tube> {
  const tube = await TubeType.findByPk(tubeTypeId, { transaction });
  if (!tube) throw new ApiError('not_found', 'No such tube type.');
  const model = modelId
    ? await TubeModel.findOne({ where: { id: modelId, tubeTypeId }, transaction })
    : await TubeModel.findOne({ where: defaultModelWhere(tubeTypeId), order: [['isDefault', 'DESC'], ['id', 'ASC']], transaction });
  if (!model) {
    if (modelId) throw new ApiError('not_found', `Model ${modelId} does not belong to ${tube.designation}.`);
    throw new ApiError('unprocessable_entity', `${tube.designation} has no model yet (ratings only); upload measured curves and fit one, or enter parameters by hand.`, {
      fieldErrors: { tubeTypeId: [`${tube.designation} has no model yet.`] },
    });
  }
  return engineTubeFrom(tube, model);
}

/** `rated`: the type has a plate dissipation rating on file, so a stage built on it can be checked. */
export type TubeOption = { id: number; designation: string; family: Family; rated: boolean; models: { id: number; name: string; kind: ModelRow['kind']; isDefault: boolean }[] };

/** For tube selects: every non-retired type with its models, the default first. */
export async function listTubeOptions(): Promise<TubeOption[]> {
  const tubes = await TubeType.findAll({ where: { retired: false }, order: [['designation', 'ASC']], attributes: ['id', 'designation', 'family', 'ratings'] });
  const models = await TubeModel.findAll({ where: { tubeTypeId: { [Op.in]: tubes.map((t) => t.id) } }, order: [['isDefault', 'DESC'], ['id', 'ASC']], attributes: ['id', 'tubeTypeId', 'name', 'kind', 'isDefault'] });
  return tubes.map((t) => ({
    id: t.id,
    designation: t.designation,
    family: t.family,
    rated: typeof t.ratings?.plateDissipation?.value === 'number',
    models: models.filter((m) => m.tubeTypeId === t.id).map((m) => ({ id: m.id, name: m.name, kind: m.kind, isDefault: m.isDefault })),
  }));
}

// ---------------------------------------------------------------------------------------------------------
// Curves for the type page and the comparison chart (computed by lib/calc; the browser only draws them).

export type PlotCurve = { gridVoltage: number; bias: boolean; points: { va: number; ia: number }[] };
export type TypicalCheck = {
  label: string;
  source: string;
  plateVoltage: number;
  gridVoltage: number;
  screenVoltage: number | null;
  datasheetIa: number;
  modelIa: number;
  errorPercent: number | null;
  gm: number;
  ra: number;
  mu: number;
};
export type TubePlot = {
  tubeTypeId: number;
  designation: string;
  model: { id: number; name: string; kind: ModelRow['kind'] };
  vaMax: number;
  screenVoltage: number | null;
  transferPlateVoltage: number;
  plateCurves: PlotCurve[];
  paMax: { va: number; ia: number }[];
  plateDissipation: number | null;
  transfer: { vg: number; ia: number }[];
  typical: TypicalCheck[];
};

function roundUp(v: number, step: number) {
  return Math.ceil(v / step) * step;
}


export async function tubePlot(tubeTypeId: number, opts: { modelId?: number; vaMax?: number; screenVoltage?: number } = {}): Promise<TubePlot> {
  const t = await TubeType.findByPk(tubeTypeId);
  if (!t) throw new ApiError('not_found', 'No such tube type.');
  const m = opts.modelId
    ? await TubeModel.findOne({ where: { id: opts.modelId, tubeTypeId } })
    : await TubeModel.findOne({ where: defaultModelWhere(tubeTypeId), order: [['isDefault', 'DESC'], ['id', 'ASC']] });
  if (!m) throw new ApiError(opts.modelId ? 'not_found' : 'unprocessable_entity', opts.modelId ? 'No such model for this tube type.' : `${t.designation} has no model yet, so there are no curves to draw.`);
  const tube = engineTubeFrom(t, m);
  const engine = calc.tubeModel(tube);
  const pentode = m.kind === 'koren-pentode';
  const ratedVa = t.ratings.plateVoltage?.value;
  // Whole hundreds, so the axis ends where the curves do.
  const vaMax = opts.vaMax ?? (ratedVa ? Math.min(roundUp(ratedVa * 1.5, 100), 1500) : 500);
  const typicalVg2 = t.typicalPoints.find((p) => p.screenVoltage)?.screenVoltage;
  const vg2 = pentode ? (opts.screenVoltage ?? typicalVg2 ?? Math.min(t.ratings.screenVoltage?.value ?? 250, 250)) : 0;
  const plateCurves = calc.plateCurveFamily(engine, { vaMax, screenVoltage: vg2, points: 61 });
  const pa = t.ratings.plateDissipation?.value ?? null;
  const iaTop = Math.max(...plateCurves.flatMap((c) => c.points.map((p) => p.ia)), 1e-6);
  // Clip the hyperbola to the plotted current range so the chart's axis follows the curves, not the asymptote.
  const paMax = pa ? calc.paMaxCurve(pa, vaMax, 61).filter((p) => p.ia <= iaTop * 1.15) : [];
  const transferVa = t.typicalPoints[0]?.plateVoltage ?? Math.min(ratedVa ?? 250, 250);
  const vgMin = Math.min(...plateCurves.map((c) => c.gridVoltage), -1);
  const transfer = calc.transferCurve(engine, { plateVoltage: transferVa, screenVoltage: vg2, vgMin, vgMax: 0, points: 61 });
  const typical: TypicalCheck[] = t.typicalPoints.map((p) => {
    const pvg2 = pentode ? (p.screenVoltage ?? vg2) : 0;
    const modelIa = engine.plateCurrent(p.plateVoltage, p.gridVoltage, pvg2);
    const d = calc.tubeDerivatives(engine, p.plateVoltage, p.gridVoltage, pvg2);
    return {
      label: p.label,
      source: p.source,
      plateVoltage: p.plateVoltage,
      gridVoltage: p.gridVoltage,
      screenVoltage: pentode ? pvg2 : null,
      datasheetIa: p.plateCurrent,
      modelIa,
      errorPercent: p.plateCurrent > 0 ? (modelIa / p.plateCurrent - 1) * 100 : null,
      gm: d.gm,
      ra: d.ra,
      mu: d.mu,
    };
  });
  return {
    tubeTypeId,
    designation: t.designation,
    model: { id: m.id, name: m.name, kind: m.kind },
    vaMax,
    screenVoltage: pentode ? vg2 : null,
    transferPlateVoltage: transferVa,
    plateCurves,
    paMax,
    plateDissipation: pa,
    transfer,
    typical,
  };
}

export type CompareSeries = {
  tubeTypeId: number;
  designation: string;
  modelName: string;
  kind: ModelRow['kind'];
  screenVoltage: number | null;
  plateCurves: PlotCurve[];
  transfer: { vg: number; ia: number }[];
  plateDissipation: number | null;
};

/** Default-model curves of two or three types on common axes: plate curves to vaMax and transfer curves at 250 V. */
export async function compareTubes(ids: number[], opts: { vaMax?: number } = {}): Promise<{ vaMax: number; transferPlateVoltage: number; series: CompareSeries[] }> {
  const unique = [...new Set(ids)];
  if (unique.length < 2) throw new ApiError('unprocessable_entity', 'Choose two or three different types.', { fieldErrors: { ids: ['Choose two or three different types.'] } });
  const types = await TubeType.findAll({ where: { id: { [Op.in]: unique } } });
  if (types.length !== unique.length) throw new ApiError('not_found', 'One of the chosen tube types does not exist.');
  const rated = Math.max(...types.map((t) => t.ratings.plateVoltage?.value ?? 300));
  const vaMax = opts.vaMax ?? Math.min(roundUp(rated * 1.25, 100), 1500);
  const transferVa = 250;
  const series: CompareSeries[] = [];
  for (const id of unique) {
    const t = types.find((x) => x.id === id)!;
    const m = await TubeModel.findOne({ where: defaultModelWhere(id), order: [['isDefault', 'DESC'], ['id', 'ASC']] });
    if (!m) throw new ApiError('unprocessable_entity', `${t.designation} has no model yet, so it cannot be drawn.`, { fieldErrors: { ids: [`${t.designation} has no model.`] } });
    const engine = calc.tubeModel(engineTubeFrom(t, m));
    const pentode = m.kind === 'koren-pentode';
    const vg2 = pentode ? (t.typicalPoints.find((p) => p.screenVoltage)?.screenVoltage ?? 250) : 0;
    const family = calc.plateCurveFamily(engine, { vaMax, screenVoltage: vg2, points: 41 });
    // Five curves per type keep an overlay of three types readable.
    const every = Math.max(1, Math.ceil(family.length / 5));
    const plateCurves = family.filter((_, i) => i % every === 0);
    const vgMin = Math.min(...family.map((c) => c.gridVoltage), -1);
    series.push({
      tubeTypeId: id,
      designation: t.designation,
      modelName: m.name,
      kind: m.kind,
      screenVoltage: pentode ? vg2 : null,
      plateCurves,
      transfer: calc.transferCurve(engine, { plateVoltage: transferVa, screenVoltage: vg2, vgMin, vgMax: 0, points: 41 }),
      plateDissipation: t.ratings.plateDissipation?.value ?? null,
    });
  }
  return { vaMax, transferPlateVoltage: transferVa, series };
}

export function spiceName(designation: string, modelName: string, modelId: number) {
  const base = `${designation}_${modelName}`.replace(/[^A-Za-z0-9]+/g, '_').replace(/^_+|_+$/g, '').toUpperCase().slice(0, 40);
  return `${base}_M${modelId}`;
}

/** A self-contained SPICE include file for one model: helper functions, the grid diode model and the subcircuit. */
export async function spiceModelFile(tubeTypeId: number, modelId: number) {
  const t = await TubeType.findByPk(tubeTypeId);
  if (!t) throw new ApiError('not_found', 'No such tube type.');
  const m = await TubeModel.findOne({ where: { id: modelId, tubeTypeId } });
  if (!m) throw new ApiError('not_found', 'No such model for this tube type.');
  const name = spiceName(t.designation, m.name, m.id);
  const pins = m.kind === 'koren-pentode' ? 'plate grid1 cathode screen' : 'plate grid cathode';
  const text = [
    `* ${t.designation} – ${m.name} (${m.kind}), exported from the Anodyne tube library`,
    `* Source of the parameters: ${m.source}`,
    `* Usage: X1 ${pins} ${name}`,
    `* Model estimates only; confirm by measurement before relying on them.`,
    calc.SPICE_PRELUDE,
    calc.tubeSubcircuit(engineTubeFrom(t, m), name),
    '',
  ].join('\n');
  return { name, fileName: `${name.toLowerCase()}.inc`, text };
}
