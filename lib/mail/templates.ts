import 'server-only';
import { ROLE_LABELS } from '@/lib/validation/roles';
import type { Role } from '@/models';
import type { OutgoingMail } from './outbox';

export function escapeHtml(s: string) {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export function wrapHtml(title: string, body: string) {
  return `<!doctype html><html><body style="font-family:system-ui,sans-serif;background:#f6f1e7;color:#1f2328;padding:24px">
<div style="max-width:640px;margin:auto;background:#fffdf8;border:1px solid #d9d0bf;border-radius:8px;padding:24px">
<p style="margin:0 0 4px;color:#8a4a0c;font-weight:600;letter-spacing:.04em">ANODYNE</p>
<h1 style="font-size:20px;margin:0 0 16px">${escapeHtml(title)}</h1>${body}
<p style="margin-top:24px;font-size:12px;color:#6a6358">Tube amplifier supplies carry lethal voltages. Figures in Anodyne are estimates to be confirmed by measurement; local electrical codes and licensed practice come first.</p>
</div></body></html>`;
}

export function invitationMail(opts: { to: string; name: string; role: Role; link: string }): OutgoingMail {
  const role = ROLE_LABELS[opts.role];
  return {
    to: [opts.to],
    subject: 'You are invited to Anodyne',
    text: `Hello ${opts.name},\n\nYou have been invited to Anodyne as ${role}. Set your password within 48 hours:\n${opts.link}\n\nThe link works once.`,
    html: wrapHtml(
      'You are invited to Anodyne',
      `<p>Hello ${escapeHtml(opts.name)},</p><p>You have been invited to the workshop's Anodyne as <b>${role}</b>.</p>
<p><a href="${escapeHtml(opts.link)}" style="background:#d9822b;color:#fff;padding:8px 14px;border-radius:6px;text-decoration:none">Set your password</a></p>
<p style="font-size:13px;color:#6a6358">The link works once and expires after 48 hours.<br>${escapeHtml(opts.link)}</p>`,
    ),
  };
}
