/**
 * The payment provider's client: the official `stripe` SDK, pointed by configuration at the hosted
 * API or at the local fake (server/integrations/payments/fake-provider.ts) through the SDK's
 * documented `host`, `port` and `protocol` options.
 *
 * One client per configuration. The configuration of an app comes from {@link configurePayments}
 * (tests, main.ts) or, by default, from {@link loadPaymentsConfig}(process.env).
 */
import Stripe from 'stripe';
import { loadPaymentsConfig, sdkAddress, type PaymentsConfig } from './config.js';

export type PaymentsClient = Stripe;

export function createPaymentsClient(config: PaymentsConfig): PaymentsClient {
  return new Stripe(config.apiKey, {
    ...sdkAddress(config.apiBase),
    maxNetworkRetries: 2,
    timeout: 15_000,
    telemetry: false,
    appInfo: { name: 'Ebullio' },
  });
}

interface Payments {
  config: PaymentsConfig;
  client: PaymentsClient;
}

const byOwner = new WeakMap<object, Payments>();
let fromEnv: Payments | undefined;

/** Sets the payments configuration of one app (keyed by its deps object). */
export function configurePayments(owner: object, config: PaymentsConfig): void {
  byOwner.set(owner, { config, client: createPaymentsClient(config) });
}

/** The payments configuration and client of an app: configured, else from the environment. */
export function paymentsFor(owner: object): Payments {
  const configured = byOwner.get(owner);
  if (configured) return configured;
  if (!fromEnv) {
    const config = loadPaymentsConfig(process.env);
    fromEnv = { config, client: createPaymentsClient(config) };
  }
  return fromEnv;
}
