'use server';

import { signOut } from '@/src/server/auth/config';

export async function signOutAction(): Promise<void> {
  await signOut({ redirectTo: '/sign-in' });
}
