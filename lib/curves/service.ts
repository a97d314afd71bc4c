import 'server-only';
import { QueryTypes } from 'sequelize';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { readFormCapped, refuseUnsafeText } from '@/lib/api/with-user';
import { isSafeText, UNSAFE_TEXT_MESSAGE } from '@/lib/validation/text';
import type { CurrentUser } from '@/lib/auth/session';
import { CurveFitError, fittedCurves, type FitQuality, type FitResult } from '@/lib/calc/fit';
import { runInCalcThread } from '@/lib/calc-worker/pool';
import { parseCurveCsv } from '@/lib/curves/parse-csv';
import type { CurvePoint as MeasuredPoint } from '@/lib/curves/types';
import { MAX_UPLOAD_BYTES, validateUpload } from '@/lib/curves/validate-upload';
import { getObject, objectKey, putObject } from '@/lib/storage/s3';
import { curveUploadFieldsSchema, type FitModel } from '@/lib/validation/curve-set';
import { CurveFit, CurveSet, TubeType } from '@/models';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';
import { currentMagnitudeWarning } from './plausibility';
import { assertMayEdit, createModelRow, lockTube, toCurveSetRow, toFitRow, toModelRow, type CurveSetRow, type FitRow, type ModelRow } from '@/lib/tubes/service';

export type CsvIssue = { line: number | null; column: string | null; message: string };

function describeIssue(e: CsvIssue): string {
  const where = [e.line !== null ? `line ${e.line}` : null, e.column ? `column "${e.column}"` : null].filter(Boolean).join(', ');
  return where ? `${where}: ${e.message}` : e.message;
}

function rejectUpload(code: 'unprocessable_entity' | 'payload_too_large' | 'unsupported_media_type', errors: CsvIssue[]): never {
  const first = errors[0]!;
  const more = errors.length > 1 ? ` (${errors.length - 1} more problem${errors.length > 2 ? 's' : ''} listed)` : '';
  throw new ApiError(code, `The file was not stored. ${describeIssue(first)}${more}`, { details: { errors } });
}

/** A float8[] literal (finite numbers and NULLs only, as the CSV parser returns). */
function pgArray(values: (number | null)[]): string {
  return `{${values.map((v) => (v === null ? 'NULL' : String(v))).join(',')}}`;
}

/** Reads a multipart upload into the fields the DAL needs, with the one error shape for a missing file. */
export async function readUpload(req: Request, maxBytes = MAX_UPLOAD_BYTES): Promise<{ file: File; fields: Record<string, string> }> {
  const form = await readFormCapped(req, maxBytes, 'The upload', 'Send the upload as multipart/form-data with a "file" field.');
  const file = form.get('file');
  if (!(file instanceof File)) {
    throw new ApiError('unprocessable_entity', 'Choose a file to upload.', { fieldErrors: { file: ['Choose a file to upload.'] } });
  }
  const fields: Record<string, string> = {};
  for (const [k, v] of form.entries()) if (typeof v === 'string') fields[k] = v;
  refuseUnsafeText(fields);
  if (!isSafeText(file.name)) throw new ApiError('unprocessable_entity', `The file name: ${UNSAFE_TEXT_MESSAGE}`, { fieldErrors: { file: [UNSAFE_TEXT_MESSAGE] } });
  return { file, fields };
}

/**
 * Checks, parses and stores a measured curve set: the raw file to object storage, the points to PostgreSQL,
 * in one transaction with its audit row. A bad file stores nothing.
 */
export async function uploadCurveSet(actor: CurrentUser, tubeTypeId: number, file: File, rawFields: Record<string, string>): Promise<CurveSetRow> {
  const fields = curveUploadFieldsSchema.parse({ currentUnit: rawFields.currentUnit, name: rawFields.name, notes: rawFields.notes, confirmMagnitude: rawFields.confirmMagnitude });
  if (file.size > MAX_UPLOAD_BYTES) {
    const check = validateUpload({ size: file.size, type: file.type, name: file.name });
    rejectUpload('payload_too_large', check.ok ? [{ line: null, column: null, message: 'The file is larger than 5 MB.' }] : check.errors);
  }
  const bytes = Buffer.from(await file.arrayBuffer());
  const check = validateUpload({ size: bytes.length, type: file.type, name: file.name, head: bytes.subarray(0, 16) });
  if (!check.ok) rejectUpload(bytes.length === 0 ? 'unprocessable_entity' : 'unsupported_media_type', check.errors);
  // A large file is read in the calc thread (tens of thousands of rows take longer than a request should hold it).
  const text = bytes.toString('utf8');
  const parsed = text.length > CSV_THREAD_CHARS
    ? await runInCalcThread({ kind: 'parse-csv', text, options: { currentUnit: fields.currentUnit } })
    : parseCurveCsv(text, { currentUnit: fields.currentUnit });
  if (!parsed.ok) rejectUpload('unprocessable_entity', parsed.errors);

  const id = await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(tubeTypeId, transaction);
    if (fields.confirmMagnitude !== 'yes') {
      const warning = currentMagnitudeWarning(
        parsed.points.map((p) => p.plateCurrent),
        fields.currentUnit,
        tube.designation,
        { cathodeCurrent: tube.ratings.cathodeCurrent?.value, plateDissipation: tube.ratings.plateDissipation?.value },
      );
      if (warning) throw new ApiError('unprocessable_entity', warning, { fieldErrors: { currentUnit: [warning] }, details: { needsConfirmation: 'confirmMagnitude' } });
    }
    const count = await CurveSet.count({ where: { tubeTypeId }, transaction });
    const set = await CurveSet.create(
      {
        tubeTypeId,
        name: fields.name ?? `${tube.designation} curves ${count + 1}`,
        kind: parsed.kind,
        currentUnit: fields.currentUnit,
        fileName: file.name.slice(0, 200) || 'curves.csv',
        objectKey: objectKey(`tube-types/${tubeTypeId}/curves`, file.name || 'curves.csv'),
        byteSize: bytes.length,
        pointCount: parsed.points.length,
        demo: false,
        notes: fields.notes ?? '',
        uploadedById: actor.id,
      },
      { transaction },
    );
    // Column arrays through unnest: one short statement per 20,000 points instead of model instances per row
    // (a 130,000-point file took seconds as a bulkCreate).
    for (let i = 0; i < parsed.points.length; i += 20_000) {
      const chunk = parsed.points.slice(i, i + 20_000);
      await sequelize.query(
        `INSERT INTO curve_points (curve_set_id, grid_voltage, plate_voltage, plate_current, screen_voltage, screen_current)
         SELECT :setId, * FROM unnest(:vg::float8[], :va::float8[], :ia::float8[], :vg2::float8[], :ig2::float8[])`,
        {
          replacements: {
            setId: set.id,
            vg: pgArray(chunk.map((p) => p.gridVoltage)),
            va: pgArray(chunk.map((p) => p.plateVoltage)),
            ia: pgArray(chunk.map((p) => p.plateCurrent)),
            vg2: pgArray(chunk.map((p) => p.screenVoltage ?? null)),
            ig2: pgArray(chunk.map((p) => p.screenCurrent ?? null)),
          },
          transaction,
        },
      );
    }
    await recordAudit(transaction, {
      actorId: actor.id,
      action: 'curve-set.upload',
      targetType: 'curve-set',
      targetId: set.id,
      details: { tubeTypeId, designation: tube.designation, fileName: set.fileName, pointCount: set.pointCount, kind: set.kind, byteSize: set.byteSize, objectKey: set.objectKey },
    });
    // Last, so a failed upload to storage rolls the rows back too.
    await putObject(set.objectKey, bytes, 'text/csv');
    return set.id;
  });
  return getCurveSetRow(id);
}

export async function getCurveSetRow(id: number): Promise<CurveSetRow> {
  const set = await CurveSet.findByPk(id);
  if (!set) throw new ApiError('not_found', 'No such curve set.');
  const fits = await CurveFit.findAll({ where: { curveSetId: id }, order: [['id', 'DESC']] });
  return toCurveSetRow(set, fits, new Map());
}

export async function curveSetPoints(id: number): Promise<MeasuredPoint[]> {
  // plain rows, not model instances: a large set has 100k+ points
  const rows = await sequelize.query<{ gridVoltage: number; plateVoltage: number; plateCurrent: number; screenVoltage: number | null; screenCurrent: number | null }>(
    `SELECT grid_voltage AS "gridVoltage", plate_voltage AS "plateVoltage", plate_current AS "plateCurrent", screen_voltage AS "screenVoltage", screen_current AS "screenCurrent"
       FROM curve_points WHERE curve_set_id = :id ORDER BY id`,
    { type: QueryTypes.SELECT, replacements: { id } },
  );
  return rows.map((r) => ({
    gridVoltage: r.gridVoltage,
    plateVoltage: r.plateVoltage,
    plateCurrent: r.plateCurrent,
    ...(r.screenVoltage !== null ? { screenVoltage: r.screenVoltage } : {}),
    ...(r.screenCurrent !== null ? { screenCurrent: r.screenCurrent } : {}),
  }));
}

export type MeasuredPlotPoint = { va: number; ia: number; vg: number };
export type FittedPlotCurve = { gridVoltage: number; bias: boolean; points: { va: number; ia: number }[] };

/** The screen voltage used for a pentode plot: the one with most points. */
function mainScreenVoltage(points: MeasuredPoint[]): number | undefined {
  const counts = new Map<number, number>();
  for (const p of points) if (p.screenVoltage !== undefined) counts.set(p.screenVoltage, (counts.get(p.screenVoltage) ?? 0) + 1);
  let best: number | undefined;
  let n = 0;
  for (const [v, c] of counts) if (c > n) [best, n] = [v, c];
  return best;
}

/** A chart draws at most this many measured points; larger sets are thinned evenly along each grid curve. */
export const MAX_PLOT_POINTS = 6000;
/** Uploads longer than this (characters) are parsed in the calc thread; shorter ones take a few milliseconds here. */
const CSV_THREAD_CHARS = 200_000;
/** A fit uses at most this many points, spread evenly along every measured curve (a denser file adds time, not information). */
export const MAX_FIT_POINTS = 8000;

function thinForPlot(points: MeasuredPoint[]): MeasuredPoint[] {
  return thinPoints(points, MAX_PLOT_POINTS);
}

function thinPoints(points: MeasuredPoint[], max: number): MeasuredPoint[] {
  if (points.length <= max) return points;
  const stride = Math.ceil(points.length / max);
  // one list per measured curve (grid voltage, and screen voltage for pentodes)
  const byGrid = new Map<string, MeasuredPoint[]>();
  for (const p of points) {
    const key = `${p.gridVoltage}|${p.screenVoltage ?? ''}`;
    const list = byGrid.get(key);
    if (list) list.push(p);
    else byGrid.set(key, [p]);
  }
  const out: MeasuredPoint[] = [];
  for (const list of byGrid.values()) {
    for (let i = 0; i < list.length; i += stride) out.push(list[i]!);
    if ((list.length - 1) % stride !== 0) out.push(list[list.length - 1]!);
  }
  return out;
}

/** Measured points and, when parameters are given, the model's curves at the measured grid voltages. */
export function plotData(model: FitModel, parameters: Record<string, number> | null, points: MeasuredPoint[]) {
  const vg2 = model === 'koren-pentode' ? mainScreenVoltage(points) : undefined;
  const shown = vg2 === undefined ? points : points.filter((p) => p.screenVoltage === vg2);
  const grids = [...new Set(shown.map((p) => p.gridVoltage))].sort((a, b) => b - a);
  // a loop, not Math.max(...points): a large set (100k+ points) overflows the call stack as spread arguments
  let vaMax = 1;
  for (const p of shown) if (p.plateVoltage > vaMax) vaMax = p.plateVoltage;
  const measured: MeasuredPlotPoint[] = thinForPlot(shown).map((p) => ({ va: p.plateVoltage, ia: p.plateCurrent, vg: p.gridVoltage }));
  const curves: FittedPlotCurve[] = parameters
    ? fittedCurves(model, parameters as never, grids, vaMax, { samples: 61, ...(vg2 !== undefined ? { screenVoltage: vg2 } : {}) }).map((c) => ({
        gridVoltage: c.gridVoltage,
        bias: false,
        points: c.points.map((p) => ({ va: p.plateVoltage, ia: p.plateCurrent })),
      }))
    : [];
  return { measured, curves, screenVoltage: vg2 ?? null, vaMax };
}

export async function getCurveSetDetail(id: number) {
  const set = await getCurveSetRow(id);
  const points = await curveSetPoints(id);
  const model: FitModel = set.kind === 'pentode' ? 'koren-pentode' : 'koren-triode';
  const latest = set.fits.find((f) => f.status !== 'discarded') ?? null;
  const plot = plotData(latest?.model ?? model, latest?.parameters ?? null, points);
  return { curveSet: set, ...plot, fit: latest };
}

export async function curveSetFile(id: number) {
  const set = await CurveSet.findByPk(id);
  if (!set) throw new ApiError('not_found', 'No such curve set.');
  const obj = await getObject(set.objectKey);
  return { body: obj.body, fileName: set.fileName };
}

export type FitAnswer = {
  fit: FitRow & { pointCount: number; skippedCount: number; iterations: number; starts: number; elapsedMs: number; notes: string[]; kg2Fitted?: boolean; screen?: FitQuality };
  curves: FittedPlotCurve[];
  measured: MeasuredPlotPoint[];
  screenVoltage: number | null;
  vaMax: number;
};

/** Runs the Levenberg–Marquardt fit in the calc thread (lib/calc-worker) and stores it as a proposed fit. */
export async function runFit(actor: CurrentUser, curveSetId: number, model: FitModel): Promise<FitAnswer> {
  const set = await CurveSet.findByPk(curveSetId);
  if (!set) throw new ApiError('not_found', 'No such curve set.');
  const tube = await TubeType.findByPk(set.tubeTypeId);
  if (!tube) throw new ApiError('not_found', 'No such tube type.');
  if (tube.retired) throw new ApiError('conflict', `${tube.designation} is retired.`);
  if (model === 'koren-pentode' && set.kind !== 'pentode') {
    throw new ApiError('unprocessable_entity', 'This curve set has no screen voltages, so only a Koren triode fit is possible.', { fieldErrors: { model: ['Use koren-triode for this set.'] } });
  }
  if (model === 'koren-pentode' && tube.family === 'triode') {
    throw new ApiError('unprocessable_entity', `${tube.designation} is a triode; fit a Koren triode model.`, { fieldErrors: { model: ['Use koren-triode for a triode.'] } });
  }
  const points = await curveSetPoints(curveSetId);
  let result: FitResult;
  try {
    result = await runInCalcThread({ kind: 'fit', model, points: thinPoints(points, MAX_FIT_POINTS) });
  } catch (err) {
    if (err instanceof CurveFitError) throw new ApiError('unprocessable_entity', `The fit could not run: ${err.message}`);
    throw err;
  }
  if (![result.rmsErrorPercent, result.maxErrorPercent, ...Object.values(result.parameters)].every((x) => Number.isFinite(x))) {
    throw new ApiError('unprocessable_entity', 'The fit did not converge to finite parameters; check the measured points.');
  }
  const fit = await sequelize.transaction(async (transaction) => {
    const row = await CurveFit.create(
      {
        curveSetId,
        model,
        parameters: result.parameters as unknown as Record<string, number>,
        rmsErrorPercent: result.rmsErrorPercent,
        maxErrorPercent: result.maxErrorPercent,
        status: 'proposed',
        createdById: actor.id,
      },
      { transaction },
    );
    await recordAudit(transaction, {
      actorId: actor.id,
      action: 'curve-fit.run',
      targetType: 'curve-fit',
      targetId: row.id,
      details: { curveSetId, tubeTypeId: tube.id, designation: tube.designation, model, rmsErrorPercent: result.rmsErrorPercent, maxErrorPercent: result.maxErrorPercent },
    });
    return row;
  });
  const plot = plotData(model, result.parameters as unknown as Record<string, number>, points);
  return {
    fit: {
      ...toFitRow(fit),
      pointCount: result.pointCount,
      skippedCount: result.skippedCount,
      iterations: result.iterations,
      starts: result.starts,
      elapsedMs: Math.round((result.elapsedMs ?? 0) * 10) / 10,
      notes: result.notes,
      ...(result.model === 'koren-pentode' ? { kg2Fitted: result.kg2Fitted, ...(result.screen ? { screen: result.screen } : {}) } : {}),
    },
    ...plot,
  };
}

async function pickFit(curveSetId: number, fitId: number | undefined, transaction: import('sequelize').Transaction) {
  const fit = fitId
    ? await CurveFit.findOne({ where: { id: fitId, curveSetId }, transaction, lock: transaction.LOCK.UPDATE })
    : await CurveFit.findOne({ where: { curveSetId, status: 'proposed' }, order: [['id', 'DESC']], transaction, lock: transaction.LOCK.UPDATE });
  if (!fit) throw new ApiError(fitId ? 'not_found' : 'conflict', fitId ? 'No such fit for this curve set.' : 'This curve set has no proposed fit; run a fit first.');
  if (fit.status !== 'proposed') throw new ApiError('conflict', `Fit ${fit.id} was already ${fit.status}.`);
  return fit;
}

/** Turns a proposed fit into a new model of the curve set's type, source "fitted from curve set N". */
export async function acceptFit(actor: CurrentUser, curveSetId: number, body: { fitId?: number; name?: string; setDefault?: boolean }): Promise<{ model: ModelRow; fit: FitRow }> {
  return sequelize.transaction(async (transaction) => {
    const set = await CurveSet.findByPk(curveSetId, { transaction });
    if (!set) throw new ApiError('not_found', 'No such curve set.');
    const tube = await lockTube(set.tubeTypeId, transaction);
    if (body.setDefault) assertMayEdit(actor, tube, 'change the default model of');
    const fit = await pickFit(curveSetId, body.fitId, transaction);
    await fit.update({ status: 'accepted' }, { transaction });
    await recordAudit(transaction, { actorId: actor.id, action: 'curve-fit.accept', targetType: 'curve-fit', targetId: fit.id, details: { curveSetId, tubeTypeId: tube.id, designation: tube.designation } });
    const model = await createModelRow(transaction, actor.id, tube, {
      name: body.name ?? `Fitted from ${set.name}`.slice(0, 120),
      kind: fit.model,
      parameters: fit.parameters,
      source: `fitted from curve set ${set.id}`,
      setDefault: body.setDefault,
      curveFitId: fit.id,
      mayDefaultPublished: can(actor.role, 'tubes:edit-published'),
    });
    return { model: toModelRow(model), fit: toFitRow(fit) };
  });
}

export async function discardFit(actor: CurrentUser, curveSetId: number, body: { fitId?: number }): Promise<{ fit: FitRow }> {
  return sequelize.transaction(async (transaction) => {
    const set = await CurveSet.findByPk(curveSetId, { transaction });
    if (!set) throw new ApiError('not_found', 'No such curve set.');
    const fit = await pickFit(curveSetId, body.fitId, transaction);
    await fit.update({ status: 'discarded' }, { transaction });
    await recordAudit(transaction, { actorId: actor.id, action: 'curve-fit.discard', targetType: 'curve-fit', targetId: fit.id, details: { curveSetId, tubeTypeId: set.tubeTypeId } });
    return { fit: toFitRow(fit) };
  });
}
