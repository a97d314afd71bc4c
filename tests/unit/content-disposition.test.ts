// Download names in headers: ASCII fallback plus the exact UTF-8 name (RFC 6266 / RFC 5987); never a value that the
// HTTP layer refuses (a non-Latin-1 letter or an unpaired surrogate answered 500).
import { describe, expect, it } from 'vitest';
import { contentDisposition } from '@/lib/api/content-disposition';

describe('contentDisposition', () => {
  it('keeps plain names and adds the exact name', () => {
    expect(contentDisposition('attachment', '12AX7 curves.csv')).toBe(`attachment; filename="12AX7 curves.csv"; filename*=UTF-8''12AX7%20curves.csv`);
  });

  it('gives header-safe values for non-ASCII names, quotes and unpaired surrogates', () => {
    for (const name of ['Ω load "A".csv', 'λ-test.pdf', 'bad\uD800name.csv', '\\evil\r\n.csv']) {
      const h = contentDisposition('inline', name);
      expect(h).toMatch(/^[\x20-\x7e]+$/);
      expect(() => new Headers({ 'content-disposition': h })).not.toThrow();
    }
    expect(contentDisposition('inline', 'Ω.csv')).toContain(`filename*=UTF-8''%CE%A9.csv`);
  });
});
