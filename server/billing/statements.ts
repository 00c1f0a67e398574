/**
 * Monthly statements: generated from the usage_daily roll-up, one per account and month.
 *
 * `generateStatements` creates missing statements and recomputes DRAFT ones; a finalized, paid or
 * void statement is never changed. Line items are derived from the statement's stored figures and
 * its plan's prices (plans are never edited by the service; see plans.ts).
 */
import { and, eq, sql, type SQL } from 'drizzle-orm';
import type { statements } from '../db/schema.js';
import type { Store } from '../db/store.js';
import { getPlan, listPlans, type PlanRow } from './plans.js';
import { toCsv } from '../http/csv.js';
import {
  computeStatement,
  formatCount,
  isMonthComplete,
  monthDayRange,
  overageBlocks,
  type LineItem,
} from './statement.js';
import type {
  GenerateStatementsResponse,
  Statement,
  StatementDetail,
  StatementStatus,
} from '../../shared/console/billing.js';

export type StatementRow = typeof statements.$inferSelect;

/** Units per account in a month (UTC), from usage_daily. Accounts without usage are absent. */
export async function unitsByAccount(store: Store, month: string): Promise<Map<number, number>> {
  const { fromDay, toDay } = monthDayRange(month);
  const rows = await store.rows<{ accountId: number | string; units: number | string }>(
    sql`SELECT account_id AS "accountId", COALESCE(SUM(units), 0) AS units FROM usage_daily
        WHERE day >= ${fromDay} AND day < ${toDay} GROUP BY account_id`,
  );
  return new Map(rows.map((r) => [Number(r.accountId), Number(r.units)]));
}

function toStatement(row: StatementRow, accountName: string, plan: PlanRow | undefined): Statement {
  return {
    id: row.id,
    accountId: row.accountId,
    accountName,
    month: row.month,
    planName: row.planName,
    planDisplayName: plan?.displayName ?? null,
    units: row.units,
    includedUnits: row.includedUnits,
    overageUnits: row.overageUnits,
    overageBlocks: overageBlocks(row.overageUnits),
    amountMinor: row.amountMinor,
    currency: row.currency,
    status: row.status,
    providerInvoiceId: row.providerInvoiceId,
    createdAt: row.createdAt.toISOString(),
    finalizedAt: row.finalizedAt ? row.finalizedAt.toISOString() : null,
    paidAt: row.paidAt ? row.paidAt.toISOString() : null,
  };
}

/** A draft's figures from its units and plan, with the prices used (kept on the statement). */
function statementValues(units: number, plan: PlanRow) {
  const figures = computeStatement(units, plan);
  return {
    planName: plan.name,
    units: figures.units,
    includedUnits: figures.includedUnits,
    overageUnits: figures.overageUnits,
    amountMinor: figures.amountMinor,
    currency: figures.currency,
    monthlyFeeMinor: plan.monthlyFeeMinor,
    pricePer1000UnitsMinor: plan.pricePer1000UnitsMinor,
  };
}

/** The first instant after `month` ("YYYY-MM"), UTC. */
function monthEnd(month: string): number {
  const [y, m] = month.split('-').map(Number) as [number, number];
  return Date.UTC(y, m, 1);
}

/**
 * Creates or refreshes the statements of `month` for every account that existed in it: an
 * account created after the month ended has nothing to be billed for then, so it gets no draft.
 */
export async function generateStatements(
  store: Store,
  month: string,
  now: Date,
): Promise<GenerateStatementsResponse> {
  const units = await unitsByAccount(store, month);
  const planByName = new Map((await listPlans(store)).map((p) => [p.name, p]));
  const result: GenerateStatementsResponse = {
    month,
    monthComplete: isMonthComplete(month, now),
    created: 0,
    refreshed: 0,
    frozen: 0,
    skipped: [],
    items: [],
  };
  const end = monthEnd(month);
  await store.transaction(async (tx) => {
    const { accounts, statements } = tx.t;
    for (const account of await tx.db.select().from(accounts).orderBy(accounts.id)) {
      if (account.createdAt.getTime() >= end) continue;
      const [existing] = await tx.db
        .select()
        .from(statements)
        .where(and(eq(statements.accountId, account.id), eq(statements.month, month)))
        .limit(1);
      if (existing && existing.status !== 'draft') {
        result.frozen++;
        result.items.push(toStatement(existing, account.name, planByName.get(existing.planName)));
        continue;
      }
      const plan = planByName.get(account.plan);
      if (!plan) {
        result.skipped.push({
          accountId: account.id,
          accountName: account.name,
          reason: `The account's plan "${account.plan}" does not exist.`,
        });
        continue;
      }
      const values = statementValues(units.get(account.id) ?? 0, plan);
      let row: StatementRow | undefined;
      if (existing) {
        [row] = await tx.db.update(statements).set(values).where(eq(statements.id, existing.id)).returning();
        result.refreshed++;
      } else {
        [row] = await tx.db
          .insert(statements)
          .values({ accountId: account.id, month, status: 'draft', createdAt: now, ...values })
          .returning();
        result.created++;
      }
      result.items.push(toStatement(row!, account.name, plan));
    }
  });
  return result;
}

export interface StatementFilter {
  month?: string;
  accountId?: number;
  status?: StatementStatus;
}

export async function listStatements(store: Store, filter: StatementFilter): Promise<Statement[]> {
  const { accounts, statements } = store.t;
  const conditions: SQL[] = [];
  if (filter.month) conditions.push(eq(statements.month, filter.month));
  if (filter.accountId !== undefined) conditions.push(eq(statements.accountId, filter.accountId));
  if (filter.status) conditions.push(eq(statements.status, filter.status));
  const planByName = new Map((await listPlans(store)).map((p) => [p.name, p]));
  const rows = await store.db
    .select({ statement: statements, accountName: accounts.name })
    .from(statements)
    .innerJoin(accounts, eq(statements.accountId, accounts.id))
    .where(conditions.length > 0 ? and(...conditions) : undefined)
    .orderBy(statements.month, statements.accountId);
  return rows.map((r) => toStatement(r.statement, r.accountName, planByName.get(r.statement.planName)));
}

/**
 * Recomputes one DRAFT statement from its month's usage and its account's current plan; leaves
 * any other status alone. Returns the row as it now is (undefined if there is none).
 */
export async function refreshDraft(store: Store, id: number): Promise<StatementRow | undefined> {
  const { accounts, statements } = store.t;
  const row = await getStatementRow(store, id);
  if (!row || row.status !== 'draft') return row;
  const [account] = await store.db.select().from(accounts).where(eq(accounts.id, row.accountId)).limit(1);
  const plan = account ? await getPlan(store, account.plan) : undefined;
  if (!plan) return row;
  const units = (await unitsByAccount(store, row.month)).get(row.accountId) ?? 0;
  const [updated] = await store.db
    .update(statements)
    .set(statementValues(units, plan))
    .where(and(eq(statements.id, id), eq(statements.status, 'draft')))
    .returning();
  return updated;
}

export async function getStatementRow(store: Store, id: number): Promise<StatementRow | undefined> {
  const { statements } = store.t;
  const [row] = await store.db.select().from(statements).where(eq(statements.id, id)).limit(1);
  return row;
}

/**
 * The statement with its line items, from the prices kept on the statement when it was made, so
 * a repriced or removed plan does not change a finalized statement. A statement made before the
 * prices were kept takes them from its plan; if the plan has gone or its prices no longer
 * reproduce the stored amount, the stored total is shown as one line so the lines always sum to
 * `amountMinor`.
 */
export async function statementDetail(store: Store, id: number): Promise<StatementDetail | undefined> {
  const { accounts, statements } = store.t;
  const [found] = await store.db
    .select({ statement: statements, account: accounts })
    .from(statements)
    .innerJoin(accounts, eq(statements.accountId, accounts.id))
    .where(eq(statements.id, id))
    .limit(1);
  if (!found) return undefined;
  const { statement: row, account } = found;
  const plan = await getPlan(store, row.planName);
  let lineItems: LineItem[];
  let monthlyFeeMinor: number;
  let pricePer1000UnitsMinor: number;
  const prices =
    row.monthlyFeeMinor !== null && row.pricePer1000UnitsMinor !== null
      ? {
          displayName: plan?.displayName ?? row.planName,
          includedUnits: row.includedUnits,
          monthlyFeeMinor: row.monthlyFeeMinor,
          pricePer1000UnitsMinor: row.pricePer1000UnitsMinor,
          currency: row.currency,
        }
      : plan
        ? { ...plan, includedUnits: row.includedUnits }
        : undefined;
  const recomputed = prices ? computeStatement(row.units, prices) : undefined;
  if (
    prices &&
    recomputed &&
    recomputed.amountMinor === row.amountMinor &&
    recomputed.currency === row.currency
  ) {
    lineItems = recomputed.lineItems;
    monthlyFeeMinor = prices.monthlyFeeMinor;
    pricePer1000UnitsMinor = prices.pricePer1000UnitsMinor;
  } else {
    // Plan gone or repriced since: keep the stored total, show it as one fee line.
    monthlyFeeMinor = row.amountMinor;
    pricePer1000UnitsMinor = 0;
    lineItems =
      row.amountMinor > 0
        ? [
            {
              code: 'monthly-fee',
              description: `Plan "${row.planName}" for ${row.month} (${formatCount(row.units)} units, ${formatCount(row.overageUnits)} beyond the included ${formatCount(row.includedUnits)}); the plan's current prices differ`,
              quantity: 1,
              unitAmountMinor: row.amountMinor,
              amountMinor: row.amountMinor,
            },
          ]
        : [];
  }
  return {
    ...toStatement(row, account.name, plan),
    billingEmail: account.billingEmail,
    monthlyFeeMinor,
    pricePer1000UnitsMinor,
    lineItems,
  };
}

/** The statement's line items as CSV (header row, one row per line item; ../http/csv.ts). */
export function statementCsv(detail: StatementDetail, columns: readonly string[]): string {
  const rows = detail.lineItems.map((item) => {
    const cells = [
      detail.id,
      detail.accountId,
      detail.accountName,
      detail.month,
      detail.status,
      item.code,
      item.description,
      item.quantity,
      item.unitAmountMinor,
      item.amountMinor,
      detail.currency,
    ];
    return Object.fromEntries(columns.map((c, i) => [c, cells[i]]));
  });
  return toCsv(columns, rows);
}
