/**
 * Runtime settings of the server, read from process.env when first used (never inlined at build
 * time: `astro build` bakes `import.meta.env`, so server settings deliberately go through
 * process.env). Defaults serve the embedded local setup; a deployment sets the variables.
 */
export interface ServerEnv {
  /** Address people use to reach the app; builds links in mails and decides the Secure cookie flag. */
  publicOrigin: string;
  /** True when publicOrigin is https: session cookies are then Secure. */
  secureCookies: boolean;
  smtpUrl: string;
  mailFrom: string;
  /** The owner-only /dev/mail page listing mails caught by the local fake SMTP server. */
  devMailPage: boolean;
  /** Take the client address from X-Forwarded-For (only behind a proxy you run). */
  trustProxy: boolean;
  rateLimit: {
    /** Failed sign-ins per account within the window before that account is locked for the window. */
    accountFailures: number;
    /** Failed sign-ins per client address within the window. */
    addressFailures: number;
    /** Sign-ups per client address within the window. */
    signUpsPerAddress: number;
    windowSeconds: number;
  };
}

function intFrom(value: string | undefined, fallback: number, name: string): number {
  if (value === undefined || value === '') return fallback;
  const n = Number(value);
  if (!Number.isInteger(n) || n <= 0) throw new Error(`${name} must be a positive integer, got "${value}"`);
  return n;
}

function flag(value: string | undefined, fallback: boolean): boolean {
  if (value === undefined || value === '') return fallback;
  return value === '1' || value.toLowerCase() === 'true' || value.toLowerCase() === 'yes';
}

export function readServerEnv(source: NodeJS.ProcessEnv = process.env): ServerEnv {
  const publicOrigin = new URL(source.PUBLIC_ORIGIN || 'http://127.0.0.1:4321').origin;
  const smtpUrl = source.SMTP_URL || 'smtp://127.0.0.1:2525';
  const smtpHost = new URL(smtpUrl).hostname;
  const loopbackSmtp = smtpHost === '127.0.0.1' || smtpHost === 'localhost' || smtpHost === '::1';
  return {
    publicOrigin,
    secureCookies: publicOrigin.startsWith('https:'),
    smtpUrl,
    mailFrom: source.MAIL_FROM || 'Brinkmap <no-reply@brinkmap.invalid>',
    devMailPage: flag(source.DEV_MAIL_PAGE, loopbackSmtp),
    trustProxy: flag(source.TRUST_PROXY, false),
    rateLimit: {
      accountFailures: intFrom(source.RATE_LIMIT_ACCOUNT_FAILURES, 5, 'RATE_LIMIT_ACCOUNT_FAILURES'),
      addressFailures: intFrom(source.RATE_LIMIT_ADDRESS_FAILURES, 30, 'RATE_LIMIT_ADDRESS_FAILURES'),
      signUpsPerAddress: intFrom(source.RATE_LIMIT_SIGNUPS_PER_ADDRESS, 20, 'RATE_LIMIT_SIGNUPS_PER_ADDRESS'),
      windowSeconds: intFrom(source.RATE_LIMIT_WINDOW_SECONDS, 900, 'RATE_LIMIT_WINDOW_SECONDS'),
    },
  };
}

let cached: ServerEnv | undefined;

export function serverEnv(): ServerEnv {
  return (cached ??= readServerEnv());
}
