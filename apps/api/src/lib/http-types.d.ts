import type { SessionUser } from '@coilpath/contract';

declare global {
  namespace Express {
    interface Request {
      user?: SessionUser;
      /** The signed-in session (set with `user`): its id (null for a token from before ids) and expiry. */
      session?: { id: string | null; expiresAt: Date };
    }
  }
}
export {};
