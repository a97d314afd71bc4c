import type { CurveCsvError } from './types';

export const MAX_UPLOAD_BYTES = 5 * 1024 * 1024;

export const ACCEPTED_UPLOAD_TYPES: readonly string[] = [
  'text/csv',
  'text/plain',
  'application/vnd.ms-excel',
  'application/csv',
  'text/tab-separated-values',
];

const TEXT_EXTENSIONS = ['.csv', '.txt', '.tsv'];

export type UploadDescriptor = {
  size: number;
  type: string;
  name: string;
  /** The first bytes of the file, if the caller has them; used to spot binary content sent with a text type. */
  head?: Uint8Array;
};

export type ValidateUploadResult = { ok: true } | { ok: false; errors: CurveCsvError[] };

function formatMegabytes(bytes: number): string {
  return `${(bytes / (1024 * 1024)).toFixed(1)} MB`;
}

function startsWith(head: Uint8Array, magic: readonly number[]): boolean {
  return magic.every((b, i) => head[i] === b);
}

function sniffBinary(head: Uint8Array): string | null {
  if (startsWith(head, [0x25, 0x50, 0x44, 0x46])) return 'The file is a PDF, not a CSV text file.';
  if (startsWith(head, [0x89, 0x50, 0x4e, 0x47]) || startsWith(head, [0xff, 0xd8, 0xff]) || startsWith(head, [0x47, 0x49, 0x46, 0x38])) {
    return 'The file is an image, not a CSV text file.';
  }
  // Spreadsheet workbooks (xlsx is a zip archive) are the usual mistake; ask for a CSV export instead.
  if (startsWith(head, [0x50, 0x4b, 0x03, 0x04])) return 'The file is a zip archive or spreadsheet workbook; export the sheet as CSV.';
  if (head.includes(0)) return 'The file contains NUL bytes, so it is binary, not a CSV text file.';
  return null;
}

/** Checks an upload before its text is read: size, declared type, name and (optionally) its first bytes. */
export function validateUpload(file: UploadDescriptor): ValidateUploadResult {
  const errors: CurveCsvError[] = [];
  const add = (message: string) => errors.push({ line: null, column: null, message });

  if (file.size <= 0) add('The file is empty.');
  else if (file.size > MAX_UPLOAD_BYTES) {
    add(`The file is ${formatMegabytes(file.size)}; curve uploads are limited to ${formatMegabytes(MAX_UPLOAD_BYTES)}.`);
  }

  const type = (file.type.split(';')[0] ?? '').trim().toLowerCase();
  const name = file.name.trim().toLowerCase();
  const textName = TEXT_EXTENSIONS.some((ext) => name.endsWith(ext));
  const hasExtension = /\.[a-z0-9]+$/.test(name);
  if (type === '') {
    if (!textName) add(`"${file.name}" is not a CSV or text file; upload a .csv or .txt file.`);
  } else if (!ACCEPTED_UPLOAD_TYPES.includes(type)) {
    add(`Files of type ${type} are not accepted; upload a CSV or plain-text file.`);
  } else if (hasExtension && !textName) {
    add(`"${file.name}" does not look like a CSV file; upload a .csv or .txt file.`);
  }

  if (file.head && file.head.length > 0) {
    const binary = sniffBinary(file.head);
    if (binary) add(binary);
  }

  return errors.length === 0 ? { ok: true } : { ok: false, errors };
}
