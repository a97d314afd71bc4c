export function tubeSubcircuit(): string {
  return '';
}
export function stageNetlist(): string {
  return '';
}
