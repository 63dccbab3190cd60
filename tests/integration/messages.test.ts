/**
 * Messages people understand, over HTTP against the real app: a refused field's message is in
 * words with no "field: " prefix (the `fields` map names the field), sign-up asks the time zone,
 * units and number format and names the field it refuses, every field the settings API can
 * refuse has a place beside it on the page, and a wrong password keeps the e-mail.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { eq, like, or } from 'drizzle-orm';
import { getDb } from '../../src/db/client';
import * as t from '../../src/db/schema';
import { Client, TEST_PASSWORD, createTestWorkspace, type TestWorkspace } from '../helpers/api';
import { linkIn, unique, waitForMail } from '../helpers/mail';

/** A message that starts with a field key and a colon ("name: …", "operatingHours.0.open: …"). */
const KEY_PREFIX = /^[A-Za-z_][\w.]*: /;

async function clearThrottle() {
  await getDb()
    .delete(t.signInThrottle)
    .where(or(like(t.signInThrottle.key, 'sign_up%'), like(t.signInThrottle.key, 'confirm%'), like(t.signInThrottle.key, '%ip:%')));
}

/** The data-field-error slots on a page (where a form shows each field's message beside it). */
const slotsIn = (html: string) => new Set([...html.matchAll(/data-field-error="([^"]+)"/g)].map((m) => m[1]!));

let ws: TestWorkspace;
let manager: Client;
beforeAll(async () => {
  await clearThrottle();
  ws = await createTestWorkspace('Messages');
  manager = await ws.client('manager');
});
afterAll(clearThrottle);

describe('field messages are in words', () => {
  it('a still without a name: "Give the still a name.", not "name: Give the still a name."', async () => {
    const r = await manager.post('/api/stills', {
      name: '  ',
      kind: 'pot',
      capacityLitres: 1000,
      heatingKw: 50,
      operatingHours: [],
      cleaningAfterRunMinutes: 0,
      typicalMinutes: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
    });
    expect(r.status).toBe(400);
    expect(r.json.error).toEqual({ code: 'invalid', message: 'Give the still a name.', fields: { name: 'Give the still a name.' } });
  });

  it("an empty number says what to do, never zod's own wording", async () => {
    const r = await manager.post('/api/stills', {
      name: 'Empty numbers',
      kind: 'pot',
      capacityLitres: null,
      heatingKw: 50,
      operatingHours: [],
      cleaningAfterRunMinutes: 0,
      typicalMinutes: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
    });
    expect(r.status).toBe(400);
    expect(r.json.error.fields.capacityLitres).toMatch(/number/i);
    expect(JSON.stringify(r.json)).not.toMatch(/Invalid input|expected number|received null/);
  });

  // Bodies each route refuses; the message must be the first field's own message, unprefixed.
  it.each([
    ['POST', '/api/fermenters', { name: '', capacity: 1000 }, 'name'],
    ['POST', '/api/wash-types', { name: '', category: 'grain', terminalMin: 1.002, terminalMax: 1.008 }, 'name'],
    ['POST', '/api/ferments', { code: '', washTypeId: 1, fermenterId: null, volume: 100, pitchedAt: '2026-11-30T08:00', og: 1.06 }, 'code'],
    ['POST', '/api/members/invitations', { email: 'not an address', role: 'staff' }, 'email'],
    ['PATCH', '/api/account', { name: '' }, 'name'],
    ['POST', '/api/feeds', { scope: 'nowhere' }, 'scope'],
  ] as const)('%s %s names %s in `fields` and says it in words', async (method, path, body, field) => {
    const r = await manager.request(method, path, body);
    expect(r.status, r.text).toBe(400);
    expect(Object.keys(r.json.error.fields)).toContain(field);
    expect(r.json.error.message).not.toMatch(KEY_PREFIX);
    expect(Object.values(r.json.error.fields)).toContain(r.json.error.message);
  });

  it('a nested field (an opening time) is named by its path in `fields`, and the message still has no prefix', async () => {
    const r = await manager.post('/api/stills', {
      name: 'Spirit still',
      kind: 'pot',
      capacityLitres: 1000,
      heatingKw: 50,
      operatingHours: [{ weekday: 1, open: '08:00', close: '08:00' }],
      cleaningAfterRunMinutes: 0,
      typicalMinutes: { stripping: 300, spirit: 480, redistillation: 420, cleaning: 120, maintenance: 240 },
    });
    expect(r.status).toBe(400);
    expect(Object.keys(r.json.error.fields)).toEqual(['operatingHours.0.close']);
    expect(r.json.error.message).toMatch(/^Opening and closing time are the same/);
  });

  it('a short password on the confirm page: the one message equals the field’s, so the form says it once', async () => {
    const email = unique('shortpw');
    expect((await new Client().post('/api/auth/sign-up', { workspaceName: 'Short Word Distillery', name: 'Ivo', email })).status).toBe(202);
    const { token } = linkIn(await waitForMail(email, 'Confirm'), '/confirm');
    const r = await new Client().post('/api/auth/confirm', { token, password: 'short' });
    expect(r.status).toBe(400);
    expect(r.json.error).toEqual({ code: 'invalid', message: 'Use at least 10 characters.', fields: { password: 'Use at least 10 characters.' } });
    // The same for the reset, invitation and account password forms.
    const reset = await new Client().post('/api/auth/reset-password', { token: 'x'.repeat(43), password: 'short' });
    expect(reset.json.error.message).toBe(reset.json.error.fields.password);
    const change = await manager.post('/api/account/password', { currentPassword: TEST_PASSWORD, newPassword: 'short' });
    expect(change.json.error.message).toBe(change.json.error.fields.newPassword);
    const accept = await new Client().post('/api/auth/accept-invitation', { token: 'y'.repeat(43), name: 'Ivo', password: 'short' });
    expect(accept.json.error.message).toBe(accept.json.error.fields.password);
  });
});

describe('sign-up asks the time zone, units and number format', () => {
  it.each([
    [{ timeZone: 'Mars/Olympus_Mons' }, 'timeZone', 'Choose a time zone from the list.'],
    [{ timeZone: '' }, 'timeZone', 'Choose a time zone from the list.'],
    [{ timeZone: 42 }, 'timeZone', 'Choose a time zone from the list.'],
    [{ units: 'imperial' }, 'units', 'Choose metric or US units.'],
    [{ numberFormat: 'space' }, 'numberFormat', 'Choose how numbers are written: decimal point or decimal comma.'],
  ])('refuses %j with 400 naming %s', async (extra, field, message) => {
    const r = await new Client().post('/api/auth/sign-up', { workspaceName: 'Zone Check', name: 'Ada', email: unique('zone'), ...extra });
    expect(r.status).toBe(400);
    expect(r.json.error.fields).toEqual({ [field]: message });
    expect(r.json.error.message).toBe(message);
  });

  it('stores the choices with the e-mailed link and opens the distillery with them', async () => {
    const email = unique('choices');
    const r = await new Client().post('/api/auth/sign-up', {
      workspaceName: 'Harrowgate Spirits',
      name: 'Ottoline Marsh',
      email,
      // Any spelling the zone database knows is kept in its canonical IANA form.
      timeZone: 'america/chicago',
      units: 'us',
      numberFormat: 'comma',
    });
    expect(r.status, r.text).toBe(202);
    const { token } = linkIn(await waitForMail(email, 'Confirm'), '/confirm');
    const page = await new Client().get(`/confirm/${token}`, { accept: 'text/html' });
    expect(page.text).toContain('America/Chicago');
    const c = new Client();
    const done = await c.post('/api/auth/confirm', { token, password: TEST_PASSWORD });
    expect(done.status, done.text).toBe(200);
    expect(done.json.redirect).toBe('/setup');
    const settings = (await c.get('/api/workspace')).json.workspace;
    expect(settings).toMatchObject({ name: 'Harrowgate Spirits', timeZone: 'America/Chicago', units: 'us', numberFormat: 'comma' });
    const [row] = await getDb().select().from(t.workspaces).where(eq(t.workspaces.id, settings.id));
    expect(row).toMatchObject({ timeZone: 'America/Chicago', units: 'us', numberFormat: 'comma' });
  });

  it('without the choices (an older client) the distillery gets the defaults', async () => {
    const email = unique('defaults');
    expect((await new Client().post('/api/auth/sign-up', { workspaceName: 'Plain Defaults', name: 'Bo', email })).status).toBe(202);
    const { token } = linkIn(await waitForMail(email, 'Confirm'), '/confirm');
    const c = new Client();
    expect((await c.post('/api/auth/confirm', { token, password: TEST_PASSWORD })).status).toBe(200);
    expect((await c.get('/api/workspace')).json.workspace).toMatchObject({ timeZone: 'Europe/London', units: 'metric', numberFormat: 'point' });
  });

  it('the sign-up page offers every time zone and has a place beside each field for its message', async () => {
    const html = (await new Client().get('/sign-up', { accept: 'text/html' })).text;
    expect(html).toContain('<option value="Europe/London" selected');
    expect(html).toContain('value="Pacific/Auckland"');
    expect(html).toMatch(/name="units" value="us"/);
    expect(html).toMatch(/name="numberFormat" value="comma"/);
    // Every field the API can refuse at once.
    const r = await new Client().post('/api/auth/sign-up', {
      workspaceName: '',
      name: '',
      email: 'nope',
      timeZone: 'Nowhere/Here',
      units: 'x',
      numberFormat: 'y',
    });
    expect(r.status).toBe(400);
    const slots = slotsIn(html);
    for (const field of Object.keys(r.json.error.fields)) expect(slots.has(field), `slot for ${field}`).toBe(true);
  });
});

describe('settings form errors', () => {
  it('each field the settings API refuses has its message beside it on the page, unprefixed', async () => {
    const r = await manager.patch('/api/workspace', {
      name: '',
      timeZone: 'Atlantis/Lost',
      units: 'furlongs',
      calibrationTempC: 17,
      stableDays: 0,
      stableTolerance: 1,
      wortCorrectionFactor: 3,
      numberFormat: 'roman',
      atRiskThreshold: 2,
      startEarlyMarginMinutes: -5,
      releaseFermentersOn: 'never',
      bookingHorizonDays: 1,
    });
    expect(r.status).toBe(400);
    expect(r.json.error.message).not.toMatch(KEY_PREFIX);
    expect(r.json.error.fields.stableDays).toBe('At least 1 day.');
    const html = (await manager.get('/settings', { accept: 'text/html' })).text;
    const slots = slotsIn(html);
    const missing = Object.keys(r.json.error.fields).filter((f) => !slots.has(f));
    expect(missing, 'settings fields without a place for their message').toEqual([]);
  });

  it('the invitation form on the members page has a place for each field it can be refused on', async () => {
    const r = await manager.post('/api/members/invitations', { email: 'x', role: 'owner' });
    expect(r.status).toBe(400);
    const slots = slotsIn((await manager.get('/settings/members', { accept: 'text/html' })).text);
    for (const field of Object.keys(r.json.error.fields)) expect(slots.has(field), `slot for ${field}`).toBe(true);
  });
});

describe('sign-in keeps the e-mail after a wrong password', () => {
  it('plain form post: back to sign-in with the reason and where to go next; the page has the e-mail filled and the password empty and focused', async () => {
    const c = new Client();
    const form = new URLSearchParams({ email: ws.users.planner.email, password: 'not the password', next: '/reports' });
    const r = await c.request('POST', '/api/auth/sign-in', form.toString(), { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' });
    expect(r.status).toBe(303);
    const location = new URL(r.headers.get('location')!, 'http://x');
    expect(location.pathname).toBe('/sign-in');
    expect(location.searchParams.get('error')).toBe('credentials');
    expect(location.searchParams.get('next')).toBe('/reports');
    // The e-mail travels in a short-lived cookie for the sign-in page, never in the URL.
    expect(r.headers.get('location')).not.toContain(encodeURIComponent(ws.users.planner.email));
    const kept = r.headers.getSetCookie().find((x) => x.startsWith('plateau_signin_email='));
    expect(kept).toMatch(/HttpOnly/i);
    expect(kept).toMatch(/Path=\/sign-in/i);
    const page = await c.request('GET', `${location.pathname}${location.search}`, undefined, {
      accept: 'text/html',
      cookie: kept!.split(';')[0]!,
    });
    expect(page.status).toBe(200);
    expect(page.text).toContain('That e-mail and password do not match an account.');
    const emailInput = /<input[^>]*id="email"[^>]*>/.exec(page.text)![0];
    const passwordInput = /<input[^>]*id="password"[^>]*>/.exec(page.text)![0];
    expect(emailInput).toContain(`value="${ws.users.planner.email}"`);
    expect(passwordInput).not.toContain('value=');
    expect(passwordInput).toContain('autofocus');
    expect(page.text).toContain('name="next" value="/reports"');
    // Read once: the page forgets it.
    expect(page.headers.getSetCookie().some((x) => /^plateau_signin_email=;|^plateau_signin_email=deleted|Max-Age=0|Expires=Thu, 01 Jan 1970/i.test(x))).toBe(
      true,
    );
  });

  it('JSON (the page’s script): a wrong password is a 400 the page shows once, and the right one signs in', async () => {
    const c = new Client();
    const wrong = await c.post('/api/auth/sign-in', { email: ws.users.planner.email, password: 'still wrong' });
    expect(wrong.status).toBe(400);
    expect(wrong.json.error.code).toBe('bad_credentials');
    const right = await c.post('/api/auth/sign-in', { email: ws.users.planner.email, password: TEST_PASSWORD, next: '/reports' });
    expect(right.status).toBe(200);
    expect(right.json.next).toBe('/reports');
  });
});
