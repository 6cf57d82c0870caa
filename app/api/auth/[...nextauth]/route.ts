import { handlers } from '@/src/server/auth/config';

export const { GET, POST } = handlers;
