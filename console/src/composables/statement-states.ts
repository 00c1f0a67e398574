/**
 * The words the console shows for a statement's state and for the act that issues it. The API's
 * stored values (draft, finalized, paid, void) stay as they are; only what a person reads is here.
 */
import type { StatementStatus } from '../../../shared/console/billing.js';

export interface StatementStateLook {
  text: string;
  colour: string;
  icon: string;
}

export const statementStates: Record<StatementStatus, StatementStateLook> = {
  draft: { text: 'Draft', colour: 'surface-variant', icon: 'mdi-pencil-outline' },
  finalized: { text: 'Issued', colour: 'info', icon: 'mdi-file-send-outline' },
  paid: { text: 'Settled', colour: 'success', icon: 'mdi-check-circle-outline' },
  void: { text: 'Withdrawn', colour: 'error', icon: 'mdi-cancel' },
};

/** The filter choices, in the order a statement moves through them. */
export const statementStateChoices: { title: string; value: StatementStatus }[] = (
  ['draft', 'finalized', 'paid', 'void'] as const
).map((value) => ({ title: statementStates[value].text, value }));

/** The verb for turning a draft into the bill sent to the account. */
export const ISSUE_VERB = 'Issue statement';
