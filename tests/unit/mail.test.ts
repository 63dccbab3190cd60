import { describe, it, expect } from 'vitest';
import { escapeHtml, invitationMail, passwordResetMail, signUpConfirmMail, alreadyRegisteredMail } from '../../src/server/mail/templates';

describe('mail templates', () => {
  it.each([
    ['<b>', '&lt;b&gt;'],
    ['Tom & Jerry', 'Tom &amp; Jerry'],
    ['"quoted"', '&quot;quoted&quot;'],
    ["O'Neill", 'O&#39;Neill'],
    ['plain', 'plain'],
  ])('escapes %s', (input, out) => {
    expect(escapeHtml(input)).toBe(out);
  });

  const evil = '<script>alert(1)</script>';
  it.each([
    ['invitation', invitationMail({ workspaceName: evil, inviterName: evil, role: 'staff', link: 'http://127.0.0.1/invite/abc', days: 7 })],
    ['reset', passwordResetMail({ name: evil, link: 'http://127.0.0.1/reset-password/abc', minutes: 30 })],
    ['sign-up', signUpConfirmMail({ name: evil, workspaceName: evil, link: 'http://127.0.0.1/confirm/abc', hours: 24 })],
    ['existing account', alreadyRegisteredMail({ name: evil, signInLink: 'http://127.0.0.1/sign-in', resetLink: 'http://127.0.0.1/forgot-password' })],
  ])('%s mail has text and HTML, with names escaped in the HTML', (_name, mail) => {
    expect(mail.subject.length).toBeGreaterThan(5);
    expect(mail.text).toMatch(/http:\/\/127\.0\.0\.1\//);
    expect(mail.html).toMatch(/^<!doctype html>/);
    expect(mail.html).not.toContain('<script>');
    expect(mail.html).toContain('&lt;script&gt;');
  });

  it('states how long each link lasts', () => {
    expect(invitationMail({ workspaceName: 'W', inviterName: 'I', role: 'planner', link: 'http://x/invite/t', days: 7 }).text).toContain('7 days');
    expect(passwordResetMail({ name: 'N', link: 'http://x/reset-password/t', minutes: 30 }).text).toContain('30 minutes');
  });
});
