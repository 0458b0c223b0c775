import type { DefaultSession } from 'next-auth';
import type { Role } from '@/models/user';

declare module 'next-auth' {
  interface Session {
    user: { id: number; role: Role; teamId: number } & DefaultSession['user'];
  }
  interface User {
    id: string;
    role: Role;
    teamId: number;
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    uid?: number;
    role?: Role;
    teamId?: number;
  }
}
