/**
 * One ferment of the caller's workspace, as every ferment module reads it. Kept apart from
 * ferments.ts (which writes ferments and re-derives their readings) so that readings.ts and
 * uploads.ts can look a ferment up without importing ferments.ts back.
 */
import { and, asc, eq } from 'drizzle-orm';
import { getDb } from '../db/client';
import { fermentIngredients, fermenters, ferments, washTypes } from '../db/schema';
import { HttpError, notFound } from './http';
import type { Ctx } from './context';

export interface FermentRecord {
  id: number;
  code: string;
  washTypeId: number;
  washTypeName: string;
  category: string;
  terminalMin: number;
  terminalMax: number;
  fermenterId: number | null;
  fermenterName: string | null;
  fermenterCapacityLitres: number | null;
  volumeLitres: number;
  pitchedAt: Date;
  og: number;
  yeast: string | null;
  notes: string | null;
  emptiedAt: Date | null;
  emptiedReason: 'distilled' | 'dumped' | null;
  createdAt: Date;
  updatedAt: Date;
  ingredients: Array<{ id: number; name: string; quantityKg: number }>;
}

const fermentColumns = {
  id: ferments.id,
  code: ferments.code,
  washTypeId: ferments.washTypeId,
  washTypeName: washTypes.name,
  category: washTypes.category,
  terminalMin: washTypes.terminalMin,
  terminalMax: washTypes.terminalMax,
  fermenterId: ferments.fermenterId,
  fermenterName: fermenters.name,
  fermenterCapacityLitres: fermenters.capacityLitres,
  volumeLitres: ferments.volumeLitres,
  pitchedAt: ferments.pitchedAt,
  og: ferments.og,
  yeast: ferments.yeast,
  notes: ferments.notes,
  emptiedAt: ferments.emptiedAt,
  emptiedReason: ferments.emptiedReason,
  createdAt: ferments.createdAt,
  updatedAt: ferments.updatedAt,
};

/** A ferment as the API and the board send it: each instant (a Date field) as its ISO string, as JSON writes it. */
export function fermentJson<F extends object>(f: F): { [K in keyof F]: F[K] extends infer V ? (V extends Date ? string : V) : never } {
  return Object.fromEntries(Object.entries(f).map(([k, v]) => [k, v instanceof Date ? v.toISOString() : v])) as never;
}

/** For pages: the ferment named by a route param, or null when it is not this workspace's (render the 404). */
export async function fermentForPage(ctx: Ctx, param: string | undefined): Promise<FermentRecord | null> {
  const id = Number(param);
  if (!Number.isSafeInteger(id) || id <= 0) return null;
  try {
    return await getFerment(ctx, id);
  } catch (e) {
    if (e instanceof HttpError && e.status === 404) return null;
    throw e;
  }
}

/** One ferment of the workspace, or 404. */
export async function getFerment(ctx: Ctx, id: number): Promise<FermentRecord> {
  const workspaceId = ctx.ws.id;
  const db = getDb();
  const [row] = await db
    .select(fermentColumns)
    .from(ferments)
    .innerJoin(washTypes, eq(washTypes.id, ferments.washTypeId))
    .leftJoin(fermenters, eq(fermenters.id, ferments.fermenterId))
    .where(and(eq(ferments.id, id), eq(ferments.workspaceId, workspaceId)))
    .limit(1);
  if (!row) throw notFound('No such ferment.');
  const ingredients = await db
    .select({ id: fermentIngredients.id, name: fermentIngredients.name, quantityKg: fermentIngredients.quantityKg })
    .from(fermentIngredients)
    .where(and(eq(fermentIngredients.fermentId, id), eq(fermentIngredients.workspaceId, workspaceId)))
    .orderBy(asc(fermentIngredients.id));
  return { ...row, ingredients };
}
