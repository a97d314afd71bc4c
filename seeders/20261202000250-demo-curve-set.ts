// Demo data: an invented "measured" curve set for the 12AX7, generated from Koren's published 12AX7 set with 1.5 %
// seeded noise (lib/curves/demo-curves.ts). Not a measurement of any real tube. The raw file goes to the S3 fake
// through the SDK (seeders cannot use the app's server-only storage module), the points to curve_points.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { CreateBucketCommand, DeleteObjectCommand, HeadBucketCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { QueryTypes, type QueryInterface } from 'sequelize';
import { parseCurveCsv } from '../lib/curves/parse-csv';

type Ctx = { context: QueryInterface };

export const DEMO_CURVE_SET_NAME = 'Demo 12AX7 curves (invented, not a measurement)';
const FILE = path.resolve(__dirname, 'data/demo-12ax7-curves.csv');
const KEY = 'tube-types/demo/curves/demo-12ax7-curves.csv';

function s3() {
  return {
    client: new S3Client({
      endpoint: process.env.S3_ENDPOINT || 'http://127.0.0.1:4569',
      region: process.env.S3_REGION || 'us-east-1',
      forcePathStyle: true,
      credentials: { accessKeyId: process.env.S3_ACCESS_KEY_ID || 'S3RVER', secretAccessKey: process.env.S3_SECRET_ACCESS_KEY || 'S3RVER' },
    }),
    bucket: process.env.S3_BUCKET || 'anodyne',
  };
}

export async function up({ context: qi }: Ctx) {
  const bytes = readFileSync(FILE);
  const parsed = parseCurveCsv(bytes.toString('utf8'), { currentUnit: 'mA' });
  if (!parsed.ok) throw new Error(`demo curve file is invalid: ${parsed.errors[0]?.message}`);
  const [tube] = await qi.sequelize.query<{ id: number }>(`SELECT id FROM tube_types WHERE designation = '12AX7'`, { type: QueryTypes.SELECT });
  if (!tube) throw new Error('seed the tube library (12AX7) before the demo curve set');

  const { client, bucket } = s3();
  try {
    await client.send(new HeadBucketCommand({ Bucket: bucket }));
  } catch {
    await client.send(new CreateBucketCommand({ Bucket: bucket }));
  }
  const key = KEY.replace('/demo/', `/${tube.id}/`);
  await client.send(new PutObjectCommand({ Bucket: bucket, Key: key, Body: bytes, ContentType: 'text/csv' }));

  const now = new Date();
  await qi.sequelize.transaction(async (transaction) => {
    const [set] = await qi.sequelize.query<{ id: number }>(
      `INSERT INTO curve_sets (tube_type_id, name, kind, current_unit, file_name, object_key, byte_size, point_count, demo, notes, created_at, updated_at)
       VALUES (:tubeId, :name, :kind, 'mA', 'demo-12ax7-curves.csv', :key, :size, :count, true, :notes, :now, :now) RETURNING id`,
      {
        type: QueryTypes.SELECT,
        transaction,
        replacements: {
          tubeId: tube.id,
          name: DEMO_CURVE_SET_NAME,
          kind: parsed.kind,
          key,
          size: bytes.length,
          count: parsed.points.length,
          notes: 'Demo data: generated from Koren’s published 12AX7 parameters (Koren 1996, Glass Audio 8(5)) with 1.5 % seeded noise. Not a measurement of any real tube; use it to try the fit.',
          now,
        },
      },
    );
    await qi.bulkInsert(
      'curve_points',
      parsed.points.map((p) => ({ curve_set_id: set!.id, grid_voltage: p.gridVoltage, plate_voltage: p.plateVoltage, plate_current: p.plateCurrent, screen_voltage: null, screen_current: null })),
      { transaction },
    );
  });
}

export async function down({ context: qi }: Ctx) {
  const rows = await qi.sequelize.query<{ object_key: string }>(`SELECT object_key FROM curve_sets WHERE name = :name AND demo`, { type: QueryTypes.SELECT, replacements: { name: DEMO_CURVE_SET_NAME } });
  const { client, bucket } = s3();
  for (const r of rows) await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: r.object_key })).catch(() => undefined);
  await qi.sequelize.query(`DELETE FROM curve_sets WHERE name = :name AND demo`, { replacements: { name: DEMO_CURVE_SET_NAME } });
}
