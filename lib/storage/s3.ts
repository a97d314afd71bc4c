import 'server-only';
import { CreateBucketCommand, GetObjectCommand, HeadBucketCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { env } from '@/lib/env';

let client: S3Client | null = null;
let bucketReady: Promise<void> | null = null;

function s3() {
  client ??= new S3Client({
    endpoint: env.S3_ENDPOINT || undefined,
    region: env.S3_REGION,
    forcePathStyle: true,
    credentials: { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY },
  });
  return client;
}

async function ensureBucket() {
  bucketReady ??= (async () => {
    try {
      await s3().send(new HeadBucketCommand({ Bucket: env.S3_BUCKET }));
    } catch {
      await s3().send(new CreateBucketCommand({ Bucket: env.S3_BUCKET }));
    }
  })().catch((err) => {
    bucketReady = null;
    throw err;
  });
  return bucketReady;
}

export async function putObject(key: string, body: Buffer, contentType: string) {
  await ensureBucket();
  await s3().send(new PutObjectCommand({ Bucket: env.S3_BUCKET, Key: key, Body: body, ContentType: contentType }));
  return key;
}

export async function getObject(key: string): Promise<{ body: Buffer; contentType: string }> {
  await ensureBucket();
  const out = await s3().send(new GetObjectCommand({ Bucket: env.S3_BUCKET, Key: key }));
  const bytes = await out.Body!.transformToByteArray();
  return { body: Buffer.from(bytes), contentType: out.ContentType ?? 'application/octet-stream' };
}

export function objectKey(prefix: string, fileName: string) {
  const safe = fileName.replace(/[^A-Za-z0-9._-]+/g, '_').slice(-120);
  return `${prefix}/${Date.now()}-${Math.random().toString(36).slice(2, 8)}-${safe}`;
}
