import 'express-serve-static-core';
import type { GroupRole, SessionUser } from '../auth/types';

declare module 'express-serve-static-core' {
  interface Request {
    /** Set by the requestId middleware on every request. */
    id: string;
    /** Set by requireUser (and optionalUser when a valid session exists). */
    user?: SessionUser;
    /** Set by authorize(): the group the resource belongs to and the caller's role in it. */
    groupId?: number;
    groupRole?: GroupRole;
  }
}
