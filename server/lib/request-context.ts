import type { Role } from '../../shared/contracts/roles.ts';

export interface AuthContext {
  userId: string;
  via: 'session' | 'token';
  /** Session id and expiry, for browser sessions (sign-out revokes the id). */
  sessionId?: string;
  expiresAt?: Date;
  tokenId?: string;
}

export interface LabContext {
  id: string;
  role: Role;
}

declare module 'express-serve-static-core' {
  interface Request {
    auth?: AuthContext;
    lab?: LabContext;
    /** Why a credential that was presented is not valid (see authenticate.ts). */
    authError?: Error;
  }
}
