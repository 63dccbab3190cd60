/**
 * Links in mail that carry a secret: a password reset, a sign-up confirmation or an
 * invitation. Whoever holds one can take over or create an account, so such a link only
 * ever travels to its recipient's own mailbox; anywhere else it is shown removed.
 */
const SECRET_LINK = /https?:\/\/[^\s"'<>]+\/(?:reset-password|confirm|invite)\/[A-Za-z0-9_-]{10,}/g;

export const LINK_REMOVED = "[link removed: it works only from the recipient's own mailbox]";

export function secretLinksIn(text: string): string[] {
  return [...text.matchAll(SECRET_LINK)].map((m) => m[0]);
}

export function redactSecretLinks(text: string): string {
  return text.replace(SECRET_LINK, LINK_REMOVED);
}
