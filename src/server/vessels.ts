import { and, asc, eq, isNull } from 'drizzle-orm';
import { z } from 'zod';
import { getDb, type Db } from '../db/client';
import { fermenters, ferments, washTypes } from '../db/schema';
import { WASH_CATEGORIES, type WashCategory } from '../lib/vocabulary';
import { audit } from './audit';
import { conflict, invalid, notFound } from './http';
import type { Ctx } from './context';
import { typedNumber } from './numbers';

/** A fermenter as a manager sends it (POST /api/fermenters; PATCH takes it partial). */
export const fermenterInputSchema = z.object({
  name: z.string().trim().min(1, 'Give the fermenter a name.').max(80),
  /** In the workspace's volume unit (L or US gal). */
  capacity: typedNumber(z.number({ error: 'Enter the capacity as a number.' }).positive('Capacity must be above zero.').max(1_000_000)),
  active: z.boolean().optional(),
  position: z.number().int().min(0).max(10_000).optional(),
});

const sg = (what: string) =>
  typedNumber(
    z
      .number({ error: `Enter the ${what} as an SG, e.g. 1.004.` })
      .min(0.98, `The ${what} must be at least 0.980.`)
      .max(1.2, `The ${what} must be at most 1.200.`),
    { grouping: false },
  );

/** A wash type as a manager sends it (POST /api/wash-types; PATCH takes it partial). */
export const washTypeInputSchema = z.object({
  name: z.string().trim().min(1, 'Give the wash type a name.').max(80),
  category: z.enum(WASH_CATEGORIES, { error: 'Choose sugar, grain, molasses, fruit or other.' }),
  terminalMin: sg('bottom of the terminal range'),
  terminalMax: sg('top of the terminal range'),
  typicalOg: sg('typical OG').nullable().optional(),
});

export type { WashCategory };

export interface WashTypeDefault {
  name: string;
  category: WashCategory;
  terminalMin: number;
  terminalMax: number;
  typicalOg: number | null;
}

/**
 * The trade's usual terminal gravities (common practice): sugar wash 0.990–1.000,
 * all-grain 1.002–1.008, molasses up to about 1.020, dry fruit 0.990–0.996.
 * Every new workspace starts with these; managers edit them.
 */
export function defaultWashTypes(): WashTypeDefault[] {
  return [
    { name: 'Sugar wash', category: 'sugar', terminalMin: 0.99, terminalMax: 1.0, typicalOg: 1.08 },
    { name: 'All-grain wash', category: 'grain', terminalMin: 1.002, terminalMax: 1.008, typicalOg: 1.06 },
    { name: 'Molasses wash', category: 'molasses', terminalMin: 1.01, terminalMax: 1.02, typicalOg: 1.085 },
    { name: 'Fruit wash', category: 'fruit', terminalMin: 0.99, terminalMax: 0.996, typicalOg: 1.055 },
  ];
}

/** The sign-up transaction (or the database itself): only inserts are needed. */
type Inserter = Pick<Db, 'insert'>;

/** Insert the default wash types for a newly created workspace (pass the sign-up transaction). */
export async function insertDefaultWashTypes(workspaceId: number, tx: Inserter = getDb()): Promise<void> {
  await tx.insert(washTypes).values(defaultWashTypes().map((w) => ({ workspaceId, ...w })));
}

export interface FermenterRow {
  id: number;
  name: string;
  capacityLitres: number;
  position: number;
  active: boolean;
  /** The ferment now in it (not emptied), if any. */
  activeFerment: { id: number; code: string } | null;
}

export async function listFermenters(ctx: Ctx): Promise<FermenterRow[]> {
  const db = getDb();
  const workspaceId = ctx.ws.id;
  const rows = await db
    .select({
      id: fermenters.id,
      name: fermenters.name,
      capacityLitres: fermenters.capacityLitres,
      position: fermenters.position,
      active: fermenters.active,
      fermentId: ferments.id,
      fermentCode: ferments.code,
    })
    .from(fermenters)
    .leftJoin(ferments, and(eq(ferments.fermenterId, fermenters.id), isNull(ferments.emptiedAt), eq(ferments.workspaceId, workspaceId)))
    .where(eq(fermenters.workspaceId, workspaceId))
    .orderBy(asc(fermenters.position), asc(fermenters.name), asc(fermenters.id));
  const seen = new Map<number, FermenterRow>();
  for (const r of rows) {
    if (seen.has(r.id)) continue;
    seen.set(r.id, {
      id: r.id,
      name: r.name,
      capacityLitres: r.capacityLitres,
      position: r.position,
      active: r.active,
      activeFerment: r.fermentId ? { id: r.fermentId, code: r.fermentCode! } : null,
    });
  }
  return [...seen.values()];
}

export interface FermenterInput {
  name: string;
  capacityLitres: number;
  active?: boolean;
  position?: number;
}

async function assertUniqueFermenterName(workspaceId: number, name: string, exceptId?: number): Promise<void> {
  const same = await getDb()
    .select({ id: fermenters.id })
    .from(fermenters)
    .where(and(eq(fermenters.workspaceId, workspaceId), eq(fermenters.name, name)));
  if (same.some((r) => r.id !== exceptId)) throw invalid('name', `A fermenter called "${name}" already exists.`);
}

export async function createFermenter(ctx: Ctx, input: FermenterInput): Promise<FermenterRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  await assertUniqueFermenterName(workspaceId, input.name);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(fermenters)
      .values({
        workspaceId,
        name: input.name,
        capacityLitres: input.capacityLitres,
        active: input.active ?? true,
        position: input.position ?? 0,
      })
      .$returningId();
    await audit({ workspaceId, userId, action: 'fermenter.create', entityType: 'fermenter', entityId: row!.id, details: { ...input } }, tx);
    return row!.id;
  });
  return (await listFermenters(ctx)).find((f) => f.id === id)!;
}

export async function updateFermenter(ctx: Ctx, id: number, input: Partial<FermenterInput>): Promise<FermenterRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const db = getDb();
  const [before] = await db
    .select()
    .from(fermenters)
    .where(and(eq(fermenters.id, id), eq(fermenters.workspaceId, workspaceId)))
    .limit(1);
  if (!before) throw notFound('No such fermenter.');
  if (input.name !== undefined) await assertUniqueFermenterName(workspaceId, input.name, id);
  if (input.active === false) {
    const [busy] = await db
      .select({ code: ferments.code })
      .from(ferments)
      .where(and(eq(ferments.workspaceId, workspaceId), eq(ferments.fermenterId, id), isNull(ferments.emptiedAt)))
      .limit(1);
    if (busy) throw conflict(`${before.name} holds ${busy.code}; mark it emptied before retiring the fermenter.`);
  }
  await db.transaction(async (tx) => {
    await tx
      .update(fermenters)
      .set(input)
      .where(and(eq(fermenters.id, id), eq(fermenters.workspaceId, workspaceId)));
    await audit(
      {
        workspaceId,
        userId,
        action: 'fermenter.update',
        entityType: 'fermenter',
        entityId: id,
        details: { before: { name: before.name, capacityLitres: before.capacityLitres, active: before.active, position: before.position }, after: input },
      },
      tx,
    );
  });
  return (await listFermenters(ctx)).find((f) => f.id === id)!;
}

export interface WashTypeRow extends WashTypeDefault {
  id: number;
}

export async function listWashTypes(ctx: Ctx): Promise<WashTypeRow[]> {
  const workspaceId = ctx.ws.id;
  return getDb()
    .select({
      id: washTypes.id,
      name: washTypes.name,
      category: washTypes.category,
      terminalMin: washTypes.terminalMin,
      terminalMax: washTypes.terminalMax,
      typicalOg: washTypes.typicalOg,
    })
    .from(washTypes)
    .where(eq(washTypes.workspaceId, workspaceId))
    .orderBy(asc(washTypes.name), asc(washTypes.id));
}

export interface WashTypeInput {
  name: string;
  category: WashCategory;
  terminalMin: number;
  terminalMax: number;
  typicalOg?: number | null;
}

function checkRange(min: number, max: number, og: number | null | undefined): void {
  if (min > max) throw invalid('terminalMax', 'The top of the terminal range must not be below its bottom.');
  if (og != null && og <= max) throw invalid('typicalOg', 'The typical OG must be above the terminal range.');
}

export async function createWashType(ctx: Ctx, input: WashTypeInput): Promise<WashTypeRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  checkRange(input.terminalMin, input.terminalMax, input.typicalOg);
  const db = getDb();
  const id = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(washTypes)
      .values({ workspaceId, ...input, typicalOg: input.typicalOg ?? null })
      .$returningId();
    await audit({ workspaceId, userId, action: 'wash_type.create', entityType: 'wash_type', entityId: row!.id, details: { ...input } }, tx);
    return row!.id;
  });
  return (await listWashTypes(ctx)).find((w) => w.id === id)!;
}

export async function updateWashType(ctx: Ctx, id: number, input: Partial<WashTypeInput>): Promise<WashTypeRow> {
  const {
    ws: { id: workspaceId },
    actor: { userId },
  } = ctx;
  const db = getDb();
  const [before] = await db
    .select()
    .from(washTypes)
    .where(and(eq(washTypes.id, id), eq(washTypes.workspaceId, workspaceId)))
    .limit(1);
  if (!before) throw notFound('No such wash type.');
  checkRange(
    input.terminalMin ?? before.terminalMin,
    input.terminalMax ?? before.terminalMax,
    input.typicalOg === undefined ? before.typicalOg : input.typicalOg,
  );
  await db.transaction(async (tx) => {
    await tx
      .update(washTypes)
      .set(input)
      .where(and(eq(washTypes.id, id), eq(washTypes.workspaceId, workspaceId)));
    await audit(
      {
        workspaceId,
        userId,
        action: 'wash_type.update',
        entityType: 'wash_type',
        entityId: id,
        details: {
          before: {
            name: before.name,
            category: before.category,
            terminalMin: before.terminalMin,
            terminalMax: before.terminalMax,
            typicalOg: before.typicalOg,
          },
          after: input,
        },
      },
      tx,
    );
  });
  return (await listWashTypes(ctx)).find((w) => w.id === id)!;
}
