/**
 * Addresses of the services and the app that scripts/test.mjs started for this run. API and
 * browser tests read them here so a missing variable fails with a clear message.
 */
export function required(name: string): string {
  const value = process.env[name];
  if (!value) throw new Error(`${name} is not set: run these tests through \`npm test\` (scripts/test.mjs)`);
  return value;
}

export const appUrl = (): string => required('APP_URL');
export const mailCatcherUrl = (): string => required('MAIL_CATCHER_URL');
