import { describe, expect, it } from 'vitest';
import { MAX_UPLOAD_BYTES, validateUpload } from '@/lib/curves/validate-upload';
import { acceptFitSchema, curveUploadFieldsSchema, fitRequestSchema } from '@/lib/validation/curve-set';

const bytes = (s: string) => new TextEncoder().encode(s);

describe('validateUpload', () => {
  it.each([
    ['text/csv', 'curves.csv'],
    ['text/csv; charset=utf-8', 'curves.csv'],
    ['text/plain', 'curves.txt'],
    ['application/vnd.ms-excel', 'curves.csv'],
    ['application/csv', 'curves.csv'],
    ['', 'curves.CSV'],
    ['', 'curves.txt'],
    ['text/csv', 'curves'],
  ])('accepts type %j named %j', (type, name) => {
    expect(validateUpload({ size: 1000, type, name, head: bytes('grid_voltage,plate_voltage') })).toEqual({ ok: true });
  });

  it.each([
    ['application/pdf', 'curves.pdf', 'application/pdf are not accepted'],
    ['image/png', 'curves.png', 'image/png are not accepted'],
    ['', 'curves.xlsx', 'not a CSV or text file'],
    ['application/octet-stream', 'curves.bin', 'not accepted'],
    ['text/plain', 'curves.pdf', 'does not look like a CSV file'],
  ])('rejects type %j named %j', (type, name, message) => {
    const r = validateUpload({ size: 1000, type, name });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.message).join(' ')).toContain(message);
  });

  it('accepts exactly 5 MB and rejects one byte more, giving the limit', () => {
    expect(validateUpload({ size: MAX_UPLOAD_BYTES, type: 'text/csv', name: 'a.csv' }).ok).toBe(true);
    const r = validateUpload({ size: MAX_UPLOAD_BYTES + 1, type: 'text/csv', name: 'a.csv' });
    expect(r).toEqual({
      ok: false,
      errors: [{ line: null, column: null, message: 'The file is 5.0 MB; curve uploads are limited to 5.0 MB.' }],
    });
    expect(MAX_UPLOAD_BYTES).toBe(5 * 1024 * 1024);
  });

  it('rejects an empty file', () => {
    expect(validateUpload({ size: 0, type: 'text/csv', name: 'a.csv' }).ok).toBe(false);
  });

  it.each([
    ['%PDF-1.7\n', 'is a PDF'],
    ['\x89PNG\r\n', 'is an image'],
    ['PK\x03\x04', 'spreadsheet workbook'],
  ])('sniffs binary content %j sent as text/csv', (head, message) => {
    const data = Uint8Array.from([...head].map((c) => c.charCodeAt(0)));
    const r = validateUpload({ size: 100, type: 'text/csv', name: 'a.csv', head: data });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]?.message).toContain(message);
  });

  it('rejects content with NUL bytes', () => {
    const r = validateUpload({ size: 100, type: 'text/csv', name: 'a.csv', head: Uint8Array.from([0x31, 0x2c, 0x00, 0x32]) });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors[0]?.message).toContain('NUL bytes');
  });

  it('reports size and type problems together', () => {
    const r = validateUpload({ size: 6 * 1024 * 1024, type: 'application/pdf', name: 'a.pdf' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors).toHaveLength(2);
  });
});

describe('curve-set schemas', () => {
  it('requires a known current unit and trims optional text', () => {
    expect(curveUploadFieldsSchema.parse({ currentUnit: 'mA', name: '  Bench 12AX7 ', notes: '' })).toEqual({
      currentUnit: 'mA',
      name: 'Bench 12AX7',
    });
    expect(curveUploadFieldsSchema.safeParse({ currentUnit: 'uA' }).success).toBe(false);
    expect(curveUploadFieldsSchema.safeParse({}).success).toBe(false);
    expect(curveUploadFieldsSchema.safeParse({ currentUnit: 'A', name: 'x'.repeat(121) }).success).toBe(false);
  });

  it('accepts only the two Koren fit models', () => {
    expect(fitRequestSchema.parse({ model: 'koren-pentode' })).toEqual({ model: 'koren-pentode' });
    expect(fitRequestSchema.safeParse({ model: 'spline' }).success).toBe(false);
  });

  it('keeps accept-fit minimal', () => {
    expect(acceptFitSchema.parse({})).toEqual({});
    expect(acceptFitSchema.parse({ name: 'Fitted 12AX7', setDefault: true })).toEqual({ name: 'Fitted 12AX7', setDefault: true });
    expect(acceptFitSchema.safeParse({ setDefault: 'yes' }).success).toBe(false);
  });
});
