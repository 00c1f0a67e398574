/**
 * Price plans. `accounts.plan` names one by its key. Money in the currency's minor unit.
 *
 * The default plans are Ebullio's own (invented) tiers. {@link ensureDefaultPlans} inserts the ones
 * that are missing and never overwrites a stored plan, so an operator's edits in the database
 * survive restarts.
 */
import { eq } from 'drizzle-orm';
import type { plans } from '../db/schema.js';
import type { Store } from '../db/store.js';

export type PlanRow = typeof plans.$inferSelect;

/** Three tiers; 'starter' is the default of a new account (server/accounts/accounts.ts). */
export const DEFAULT_PLANS: readonly PlanRow[] = [
  {
    name: 'starter',
    displayName: 'Starter',
    includedUnits: 10_000,
    monthlyFeeMinor: 0,
    pricePer1000UnitsMinor: 150,
    currency: 'eur',
  },
  {
    name: 'professional',
    displayName: 'Professional',
    includedUnits: 50_000,
    monthlyFeeMinor: 4_900,
    pricePer1000UnitsMinor: 100,
    currency: 'eur',
  },
  {
    name: 'plant',
    displayName: 'Plant-wide',
    includedUnits: 250_000,
    monthlyFeeMinor: 19_900,
    pricePer1000UnitsMinor: 60,
    currency: 'eur',
  },
];

/** Inserts the default plans that are not stored yet; returns how many were inserted. */
export async function ensureDefaultPlans(store: Store): Promise<number> {
  const { plans } = store.t;
  let inserted = 0;
  for (const plan of DEFAULT_PLANS) {
    const [row] = await store.db.insert(plans).values(plan).onConflictDoNothing().returning();
    if (row) inserted++;
  }
  return inserted;
}

export async function listPlans(store: Store): Promise<PlanRow[]> {
  const { plans } = store.t;
  return store.db.select().from(plans).orderBy(plans.includedUnits, plans.name);
}

export async function getPlan(store: Store, name: string): Promise<PlanRow | undefined> {
  const { plans } = store.t;
  const [row] = await store.db.select().from(plans).where(eq(plans.name, name)).limit(1);
  return row;
}
