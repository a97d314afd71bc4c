import type { BenchPhoto } from '@/lib/bench/service';

export async function uploadPhoto(checkId: number, file: File): Promise<BenchPhoto> {
  const body = new FormData();
  body.set('file', file);
  const res = await fetch(`/api/bench-checks/${checkId}/photos`, { method: 'POST', body });
  const json = (await res.json().catch(() => null)) as { photo?: BenchPhoto; error?: { message: string } } | null;
  if (!res.ok || !json?.photo) throw new Error(json?.error?.message ?? `Upload failed (${res.status})`);
  return json.photo;
}
