import { notFound } from 'next/navigation';
import { ApiError } from '@/lib/api/errors';
import { pageId } from '@/lib/validation/ids';
import { getTube, type TubeDetail } from '@/lib/tubes/service';

// The tube type named by the route's id, or the 404 screen for a bad or unknown id.
export async function loadTubeOr404(params: Promise<{ id: string }>): Promise<TubeDetail> {
  const id = pageId((await params).id);
  if (id === null) notFound();
  try {
    return await getTube(id);
  } catch (err) {
    if (err instanceof ApiError && err.code === 'not_found') notFound();
    throw err;
  }
}
