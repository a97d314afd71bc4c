// One Content-Disposition header for every download: an ASCII fallback name and the exact name in RFC 6266 /
// RFC 5987 form. Header values may only carry bytes 0x20–0x7E safely, so a user's file name with non-ASCII letters
// (Ω, Greek, accents) or an unpaired surrogate must never reach the header as it is (that answered 500).

/** `attachment; filename="ascii"; filename*=UTF-8''exact` (or `inline`). */
export function contentDisposition(kind: 'attachment' | 'inline', fileName: string): string {
  const wellFormed = typeof (fileName as { toWellFormed?: () => string }).toWellFormed === 'function' ? (fileName as unknown as { toWellFormed(): string }).toWellFormed() : fileName;
  const ascii = wellFormed.replace(/[^\x20-\x7e]/g, '_').replace(/["\\]/g, '_').trim() || 'download';
  return `${kind}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(wellFormed)}`;
}
