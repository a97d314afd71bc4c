import { StageEditorSkeleton } from '@/components/stage-editor/stage-editor';

export default function Loading() {
  return <StageEditorSkeleton />;
}
