import 'server-only';

/** Seeds the invented demo workspace. Filled in with the data model and the upload path. */
export async function seedDemo(): Promise<string> {
  return 'no demo data yet';
}
