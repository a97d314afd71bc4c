import 'server-only';
import { ApiError } from '@/lib/api/errors';
import type { CurrentUser } from '@/lib/auth/session';
import { getObject, objectKey, putObject } from '@/lib/storage/s3';
import { attachmentFieldsSchema, MAX_ATTACHMENT_BYTES } from '@/lib/validation/tube';
import { Attachment } from '@/models';
import { recordAudit } from '@/lib/db/audit';
import { sequelize } from '@/lib/db';
import { lockTube, toAttachmentRow, type AttachmentRow } from '@/lib/tubes/service';

const PDF_MAGIC = Buffer.from('%PDF-');

/** Stores a datasheet PDF for a tube type: bytes to object storage, the row and its audit entry in one transaction. */
export async function attachDatasheet(actor: CurrentUser, tubeTypeId: number, file: File, rawFields: Record<string, string>): Promise<AttachmentRow> {
  const fields = attachmentFieldsSchema.parse({ kind: rawFields.kind || undefined });
  if (file.size > MAX_ATTACHMENT_BYTES) {
    throw new ApiError('payload_too_large', `The file is ${(file.size / 1048576).toFixed(1)} MB; datasheets are limited to ${MAX_ATTACHMENT_BYTES / 1048576} MB.`, { fieldErrors: { file: ['Too large.'] } });
  }
  const bytes = Buffer.from(await file.arrayBuffer());
  if (bytes.length === 0) throw new ApiError('unprocessable_entity', 'The file is empty.', { fieldErrors: { file: ['The file is empty.'] } });
  if (!bytes.subarray(0, 5).equals(PDF_MAGIC)) {
    throw new ApiError('unsupported_media_type', `"${file.name}" is not a PDF; attach datasheets as PDF files.`, { fieldErrors: { file: ['Not a PDF.'] } });
  }
  const id = await sequelize.transaction(async (transaction) => {
    const tube = await lockTube(tubeTypeId, transaction);
    const name = (file.name || 'datasheet.pdf').slice(0, 200);
    const row = await Attachment.create(
      { ownerType: 'tube-type', ownerId: tubeTypeId, kind: fields.kind, fileName: name, contentType: 'application/pdf', byteSize: bytes.length, objectKey: objectKey(`tube-types/${tubeTypeId}/attachments`, name), uploadedById: actor.id },
      { transaction },
    );
    await recordAudit(transaction, { actorId: actor.id, action: 'attachment.upload', targetType: 'attachment', targetId: row.id, details: { tubeTypeId, designation: tube.designation, fileName: name, byteSize: bytes.length } });
    await putObject(row.objectKey, bytes, 'application/pdf');
    return row.id;
  });
  const row = await Attachment.findByPk(id);
  return toAttachmentRow(row!, new Map([[actor.id, actor.displayName]]));
}

export async function attachmentFile(id: number) {
  const a = await Attachment.findByPk(id);
  if (!a) throw new ApiError('not_found', 'No such attachment.');
  const obj = await getObject(a.objectKey);
  return { body: obj.body, fileName: a.fileName, contentType: a.contentType };
}
