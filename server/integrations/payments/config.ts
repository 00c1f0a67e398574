/**
 * Payment-provider configuration, read from the environment (kept here, not in server/config.ts).
 *
 * | variable | default (development, test) | meaning |
 * |---|---|---|
 * | PAYMENTS_API_KEY | ebpay_dev_key_local | secret API key sent as `Authorization: Bearer …` |
 * | PAYMENTS_API_BASE | http://127.0.0.1:0 (the local fake, on any free port) | base URL of the provider's HTTP API; empty string = the provider's own hosted API |
 * | PAYMENTS_WEBHOOK_SECRET | ebpay_dev_signing_local | secret the provider signs webhook events with |
 *
 * Port 0 in a loopback PAYMENTS_API_BASE means "any free port": main.ts starts the local fake there
 * and points the payments client at the port it was given (see {@link withBoundPort}), so two
 * servers on one machine never contend for a fixed port. A base naming a port keeps it.
 *
 * With NODE_ENV=production there are no defaults: without PAYMENTS_API_KEY and
 * PAYMENTS_WEBHOOK_SECRET, finalizing statements and the webhook are disabled (a 503 problem says so).
 */
export interface PaymentsConfig {
  /** False when no API key is configured (production without PAYMENTS_API_KEY). */
  enabled: boolean;
  apiKey: string;
  /** Undefined = the provider SDK's own default host (the hosted API). */
  apiBase: URL | undefined;
  webhookSecret: string;
}

/** 0: the local fake takes any free port, unless PAYMENTS_API_BASE names one. */
export const FAKE_PROVIDER_DEFAULT_PORT = 0;
export const DEV_API_KEY = 'ebpay_dev_key_local';
export const DEV_WEBHOOK_SECRET = 'ebpay_dev_signing_local';

export class PaymentsConfigError extends Error {
  override readonly name = 'PaymentsConfigError';
}

export function loadPaymentsConfig(env: NodeJS.ProcessEnv = process.env): PaymentsConfig {
  const production = env.NODE_ENV === 'production';
  const apiKey = env.PAYMENTS_API_KEY || (production ? '' : DEV_API_KEY);
  const webhookSecret = env.PAYMENTS_WEBHOOK_SECRET || (production ? '' : DEV_WEBHOOK_SECRET);
  const rawBase =
    env.PAYMENTS_API_BASE !== undefined
      ? env.PAYMENTS_API_BASE
      : production
        ? ''
        : `http://127.0.0.1:${FAKE_PROVIDER_DEFAULT_PORT}`;
  let apiBase: URL | undefined;
  if (rawBase !== '') {
    try {
      apiBase = new URL(rawBase);
    } catch {
      throw new PaymentsConfigError(`PAYMENTS_API_BASE is not a URL: "${rawBase}"`);
    }
    if (apiBase.protocol !== 'http:' && apiBase.protocol !== 'https:') {
      throw new PaymentsConfigError('PAYMENTS_API_BASE must be an http:// or https:// URL');
    }
    if (production && apiBase.protocol === 'http:') {
      throw new PaymentsConfigError('PAYMENTS_API_BASE must use https in production');
    }
  }
  return { enabled: apiKey !== '' && webhookSecret !== '', apiKey, apiBase, webhookSecret };
}

/** The same configuration with its API base on `port`: where the local fake was actually bound. */
export function withBoundPort(config: PaymentsConfig, port: number): PaymentsConfig {
  if (!config.apiBase) return config;
  const apiBase = new URL(config.apiBase.href);
  apiBase.port = String(port);
  return { ...config, apiBase };
}

/** The SDK's host/port/protocol options for a base URL (undefined → the SDK's defaults). */
export function sdkAddress(
  apiBase: URL | undefined,
): { host: string; port: number; protocol: 'http' | 'https' } | Record<string, never> {
  if (!apiBase) return {};
  const protocol = apiBase.protocol === 'http:' ? 'http' : 'https';
  const port = apiBase.port !== '' ? Number(apiBase.port) : protocol === 'http' ? 80 : 443;
  return { host: apiBase.hostname, port, protocol };
}
