import type { Role } from '@nightyard/contracts';

/** The caller of a request, loaded fresh from the database for each request. */
export interface AuthUser {
  id: string;
  organisationId: string;
  email: string;
  name: string;
  roles: Role[];
}
