/**
 * Console routes for billing (admin and billing roles; developers get 403):
 *
 *   GET  /plans                          the price plans
 *   GET  /statements?month&accountId&status
 *   POST /statements/generate {month}    create/refresh DRAFT statements of every account
 *   GET  /statements/:id                 with line items
 *   POST /statements/:id/finalize        invoice at the payment provider, mail 'statement-ready'
 *   GET  /statements/:id/export.csv      line items as CSV
 *
 * Mutations are audited. Start-up calls ensureDefaultPlans(store) (server/billing/plans.ts).
 */
import { z } from 'zod';
import {
  FinalizeStatementResponse,
  GenerateStatementsRequest,
  GenerateStatementsResponse,
  PlansResponse,
  StatementDetail,
  StatementIdParams,
  StatementsQuery,
  StatementsResponse,
  statementCsvColumns,
} from '../../shared/console/billing.js';
import { finalizeStatement } from '../billing/finalize.js';
import { listPlans } from '../billing/plans.js';
import { generateStatements, listStatements, statementCsv, statementDetail } from '../billing/statements.js';
import { problem } from '../http/problem.js';
import { recordAudit } from '../accounts/audit.js';
import { consoleRoute, type ConsoleRouteModule } from './route.js';

const BILLING = ['billing'] as const; // admin is always allowed as well

export const billingRouteModule: ConsoleRouteModule = {
  register(router) {
    consoleRoute(router, {
      method: 'get',
      path: '/plans',
      roles: BILLING,
      tag: 'billing',
      summary: 'List the price plans',
      response: PlansResponse,
      handler: async ({ deps }) => ({ items: await listPlans(deps.store) }),
    });

    consoleRoute(router, {
      method: 'get',
      path: '/statements',
      roles: BILLING,
      tag: 'billing',
      summary: 'List statements (filters: month, accountId, status)',
      request: { query: StatementsQuery },
      response: StatementsResponse,
      handler: async ({ deps, query }) => ({ items: await listStatements(deps.store, query) }),
    });

    consoleRoute(router, {
      method: 'post',
      path: '/statements/generate',
      roles: BILLING,
      tag: 'billing',
      summary:
        'Create or refresh the draft statements of a month for every account (finalized ones stay as they are)',
      request: { body: GenerateStatementsRequest },
      response: GenerateStatementsResponse,
      handler: async ({ deps, body, req, res }) => {
        const result = await generateStatements(deps.store, body.month, deps.clock());
        await recordAudit(deps, req, res, {
          action: 'statement.generate',
          targetType: 'month',
          targetId: body.month,
          detail: {
            created: result.created,
            refreshed: result.refreshed,
            frozen: result.frozen,
            skipped: result.skipped.length,
          },
        });
        return result;
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/statements/:id',
      roles: BILLING,
      tag: 'billing',
      summary: 'One statement with its line items',
      request: { params: StatementIdParams },
      response: StatementDetail,
      handler: async ({ deps, params }) => {
        const detail = await statementDetail(deps.store, params.id);
        if (!detail) throw problem('not-found', `There is no statement ${params.id}.`);
        return detail;
      },
    });

    consoleRoute(router, {
      method: 'post',
      path: '/statements/:id/finalize',
      roles: BILLING,
      tag: 'billing',
      summary: 'Finalize a draft statement of a past month into a provider invoice and mail it',
      description:
        'Recomputes the draft from the month’s usage, creates (or reuses) the provider customer, the invoice and its items, finalizes the invoice and stores its id. 409 if the statement is not a draft or the month is not over; 502 payment-provider-failed if the provider refuses (the statement stays a draft; retrying is safe).',
      request: { params: StatementIdParams },
      response: FinalizeStatementResponse,
      handler: async ({ deps, params, req, res }) => {
        const result = await finalizeStatement(deps, params.id);
        await recordAudit(deps, req, res, {
          action: 'statement.finalize',
          targetType: 'statement',
          targetId: params.id,
          detail: {
            month: result.statement.month,
            accountId: result.statement.accountId,
            amountMinor: result.statement.amountMinor,
            currency: result.statement.currency,
            providerInvoiceId: result.statement.providerInvoiceId,
            mailedTo: result.mailedTo,
          },
        });
        return result;
      },
    });

    consoleRoute(router, {
      method: 'get',
      path: '/statements/:id/export.csv',
      roles: BILLING,
      tag: 'billing',
      summary: 'The statement’s line items as CSV',
      request: { params: StatementIdParams },
      response: z.string().meta({ description: `CSV columns: ${statementCsvColumns.join(', ')}` }),
      responseContentType: 'text/csv',
      handler: async ({ deps, params, res }) => {
        const detail = await statementDetail(deps.store, params.id);
        if (!detail) throw problem('not-found', `There is no statement ${params.id}.`);
        res
          .status(200)
          .type('text/csv; charset=utf-8')
          .setHeader(
            'Content-Disposition',
            `attachment; filename="ebullio-statement-${detail.month}-account-${detail.accountId}.csv"`,
          )
          .send(statementCsv(detail, statementCsvColumns));
      },
    });
  },
};
