/**
 * Plateau's e-mails: plain text plus a small HTML version in one shared shell.
 * Every interpolated value is escaped; links are only ever our own PUBLIC_URL.
 */
export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

export function escapeHtml(value: string): string {
  return value.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

/** The shared HTML shell: paragraphs (already escaped HTML) and an optional button. Used by every mail. */
export function shell(title: string, paragraphs: string[], action?: { label: string; href: string }, footer?: string): string {
  const body = paragraphs.map((p) => `<p style="margin:0 0 14px">${p}</p>`).join('\n');
  const button = action
    ? `<p style="margin:20px 0"><a href="${escapeHtml(action.href)}" style="display:inline-block;background:#22302d;color:#ffffff;padding:10px 18px;border-radius:6px;text-decoration:none;font-weight:600">${escapeHtml(action.label)}</a></p>
<p style="margin:0 0 14px;font-size:13px;color:#4a5350">Or paste this address into your browser:<br>${escapeHtml(action.href)}</p>`
    : '';
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${escapeHtml(title)}</title></head>
<body style="margin:0;background:#f4f3ef;font-family:Barlow,Arial,sans-serif;color:#1d2321">
<div style="max-width:560px;margin:0 auto;padding:24px">
<p style="font-size:20px;font-weight:700;margin:0 0 16px">Plateau</p>
<div style="background:#ffffff;border:1px solid #d5d8d2;border-radius:8px;padding:20px">
<h1 style="font-size:20px;margin:0 0 14px">${escapeHtml(title)}</h1>
${body}
${button}
</div>
<p style="font-size:12px;color:#4a5350;margin:16px 0 0">${escapeHtml(footer ?? 'Plateau plans still time around your readings. You received this because someone used this address on Plateau.')}</p>
</div></body></html>`;
}

const e = escapeHtml;
const ROLE_WORDS: Record<string, string> = {
  manager: 'manager (settings, people, stills and everything else)',
  planner: 'planner (ferments and still bookings)',
  distiller: 'distiller (readings, uploads and running the stills)',
  staff: 'staff (reading the board and calendar feeds)',
};

export function invitationMail(v: { workspaceName: string; inviterName: string; role: string; link: string; days: number }): MailContent {
  const subject = `Join ${v.workspaceName} on Plateau`;
  const roleText = ROLE_WORDS[v.role] ?? v.role;
  const text = `${v.inviterName} has invited you to ${v.workspaceName} on Plateau as ${roleText}.

Plateau puts the fermenters, the gravity readings and the still bookings on one board.

Accept the invitation here (the link works once and for ${v.days} days):
${v.link}

If you were not expecting this, ignore this message; nothing happens unless the link is followed.`;
  const html = shell(
    subject,
    [
      `${e(v.inviterName)} has invited you to <strong>${e(v.workspaceName)}</strong> on Plateau as ${e(roleText)}.`,
      'Plateau puts the fermenters, the gravity readings and the still bookings on one board.',
      `The link works once and for ${v.days} days. If you were not expecting this, ignore this message.`,
    ],
    { label: 'Accept the invitation', href: v.link },
  );
  return { subject, text, html };
}

export function passwordResetMail(v: { name: string; link: string; minutes: number }): MailContent {
  const subject = 'Choose a new Plateau password';
  const text = `Hello ${v.name},

Someone asked to reset the password for this address on Plateau. Choose a new password here (the link works once and for ${v.minutes} minutes):
${v.link}

Setting a new password signs you out on every device. If you did not ask for this, ignore this message: your password stays as it is.`;
  const html = shell(
    subject,
    [
      `Hello ${e(v.name)},`,
      `Someone asked to reset the password for this address on Plateau. The link works once and for ${v.minutes} minutes.`,
      'Setting a new password signs you out on every device. If you did not ask for this, ignore this message: your password stays as it is.',
    ],
    { label: 'Choose a new password', href: v.link },
  );
  return { subject, text, html };
}

export function signUpConfirmMail(v: { name: string; workspaceName: string; link: string; hours: number }): MailContent {
  const subject = `Confirm your address to open ${v.workspaceName} on Plateau`;
  const text = `Hello ${v.name},

Confirm this address to open ${v.workspaceName} on Plateau; you will be its manager and choose your password on the page the link opens. The link works once and for ${v.hours} hours:
${v.link}

If you did not sign up, ignore this message and nothing will be created.`;
  const html = shell(
    subject,
    [
      `Hello ${e(v.name)},`,
      `Confirm this address to open <strong>${e(v.workspaceName)}</strong> on Plateau; you will be its manager and choose your password on the page the link opens. The link works once and for ${v.hours} hours.`,
      'If you did not sign up, ignore this message and nothing will be created.',
    ],
    { label: 'Confirm and choose a password', href: v.link },
  );
  return { subject, text, html };
}

/** Sent instead of a confirmation when someone signs up with an address that already has an account. */
export function alreadyRegisteredMail(v: { name: string; signInLink: string; resetLink: string }): MailContent {
  const subject = 'You already have a Plateau account';
  const text = `Hello ${v.name},

Someone tried to set up a new distillery on Plateau with this address, which already has an account. Nothing was changed.

Sign in here: ${v.signInLink}
Forgotten your password? ${v.resetLink}

To run another distillery from the same account, ask its manager to invite this address.`;
  const html = shell(
    subject,
    [
      `Hello ${e(v.name)},`,
      'Someone tried to set up a new distillery on Plateau with this address, which already has an account. Nothing was changed.',
      `Forgotten your password? <a href="${e(v.resetLink)}">Choose a new one</a>. To run another distillery from the same account, ask its manager to invite this address.`,
    ],
    { label: 'Sign in', href: v.signInLink },
  );
  return { subject, text, html };
}
